/* outfile.h - write-to-temporary-then-rename output files (private). */
#ifndef HYP_OUTFILE_H
#define HYP_OUTFILE_H

#include <stdio.h>
#include "hypsolev/error.h"

/* The stdio buffer of an output: glibc ignores the size asked of setvbuf
 * unless it is given the buffer, and its own is 4 KiB (a write call per
 * 4 KiB). */
#define HYP__OUT_BUF (1 << 18)

typedef struct hyp__outfile {
    FILE *f;
    char *buf;       /* HYP__OUT_BUF bytes, or NULL (stdio's own) */
    int to_stdout;   /* 1 stdout, 2 a device or pipe written directly */
    char tmp[4096];
    char final[4096];
} hyp__outfile;

/* Opens a temporary file beside path ("-" is stdout). */
hyp_status hyp__out_open(hyp__outfile *o, const char *path, hyp_error *err);
/* Flushes, syncs, closes and renames into place; on any failure removes the
 * temporary file and leaves an existing target untouched. */
hyp_status hyp__out_commit(hyp__outfile *o, hyp_error *err);
/* Closes and removes the temporary file. */
void hyp__out_abort(hyp__outfile *o);

#endif
