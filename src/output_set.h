/* output_set.h - all-or-nothing outputs (private): every output of a run is
 * written to a staging file beside its target, and only when all of them
 * are complete are they synced and renamed into place, then their
 * directories synced. A reader of the targets sees the old files or the
 * complete new set, never half of one. */
#ifndef HYP_OUTPUT_SET_H
#define HYP_OUTPUT_SET_H

#include <stdio.h>
#include "hypsolev/error.h"

/* The stdio buffer of an output: glibc ignores the size asked of setvbuf
 * unless it is given the buffer, and its own is 4 KiB (a write call per
 * 4 KiB). */
#define HYP__OUT_BUF (1 << 18)

/* Staging files are named TARGET + HYP__STAGE_TAG + PID "-" + 6 random
 * characters, so a later run can tell its own stale ones (left by a
 * SIGKILL or a power cut) from anything else: see hyp__stale_remove. */
#define HYP__STAGE_TAG ".hyp-tmp-"

/* At most this many outputs in one set (GPX, table, report, and the
 * station outputs of a network: a handful). */
#define HYP__OUTSET_MAX 8

typedef enum hyp__outkind {
    HYP__OUT_STAGED = 0,   /* a staging file renamed over the target */
    HYP__OUT_STDOUT = 1,   /* "-": standard output */
    HYP__OUT_DEVICE = 2    /* an existing device or pipe, written as it is
                              (renaming a file over /dev/null would replace it) */
} hyp__outkind;

typedef struct hyp__outfile {
    FILE *f;
    char *buf;               /* HYP__OUT_BUF bytes, or NULL (stdio's own) */
    hyp__outkind kind;
    int finished;            /* flushed, synced and closed */
    char tmp[4096];          /* the staging file (HYP__OUT_STAGED) */
    char final[4096];        /* the target */
} hyp__outfile;

typedef struct hyp__outset {
    size_t n;
    hyp__outfile files[HYP__OUTSET_MAX];
} hyp__outset;

/* Opens a staging file for path ("-" is standard output). */
hyp_status hyp__out_open(hyp__outfile *o, const char *path, hyp_error *err);
/* A one-file set: finishes, renames into place and syncs the directory;
 * on any failure removes the staging file and leaves the target as it was. */
hyp_status hyp__out_commit(hyp__outfile *o, hyp_error *err);
/* Closes and removes the staging file. */
void hyp__out_abort(hyp__outfile *o);

void hyp__outset_init(hyp__outset *s);
/* Adds an output to the set and opens its staging file; NULL (err set)
 * when it cannot be opened or the set is full. */
hyp__outfile *hyp__outset_add(hyp__outset *s, const char *path, hyp_error *err);
/* Finishes every file (flush, fsync, close); then, unless cancelled(ctx)
 * says stop (cancelled may be NULL), renames each into place and syncs
 * each directory once. On any failure nothing is renamed and every
 * staging file is removed. */
hyp_status hyp__outset_commit(hyp__outset *s, int (*cancelled)(void *), void *ctx, hyp_error *err);
/* Removes every staging file of the set (after a failure). */
void hyp__outset_abort(hyp__outset *s);

/* A group commit (a batch's rovers): hyp__outset_stage flushes and closes
 * a set's files without syncing them (on failure it removes them all);
 * hyp__outset_commit_group then puts every staged set of the group on disk
 * at once (syncfs(2) of each directory's file system; a group with one set
 * fsyncs its files), and only then, unless cancelled(ctx), renames each set
 * into place and syncs each directory once. st[i] and errs[i] say how set
 * i ended; a failed or cancelled set's staging files are removed. The
 * promise is commit's: nothing is renamed into place before it is on
 * disk, and the targets of a set are all new or all old. */
hyp_status hyp__outset_stage(hyp__outset *s, hyp_error *err);
void hyp__outset_commit_group(hyp__outset *const *sets, size_t n, int (*cancelled)(void *), void *ctx,
                              hyp_status *st, hyp_error *errs);

/* Removes the stale staging files of target `path`: names of our pattern
 * beside it whose process no longer exists. Returns how many. */
size_t hyp__stale_remove(const char *path);
/* The same for every target in a directory. */
size_t hyp__stale_dir_remove(const char *dir);

#endif
