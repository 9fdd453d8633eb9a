/* output_set.c - all-or-nothing outputs: staging files beside their
 * targets, renamed into place only when every output of the set is
 * complete and on disk (rename(2) is atomic within a file system; the
 * directory is synced after it so the new names survive a power cut). */
#define _GNU_SOURCE   /* syncfs */
#include "output_set.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* The directory part of path ("." when there is none). */
static void dir_of(const char *path, char *dir, size_t n)
{
    snprintf(dir, n, "%s", path);
    char *slash = strrchr(dir, '/');
    if (!slash)
        snprintf(dir, n, ".");
    else if (slash == dir)
        dir[1] = '\0';
    else
        *slash = '\0';
}

static hyp_status open_direct(hyp__outfile *o, const char *path, hyp_error *err)
{
    o->f = fopen(path, "wb");
    if (!o->f)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot write: %s", path, strerror(errno));
    o->kind = HYP__OUT_DEVICE;
    snprintf(o->final, sizeof o->final, "%s", path);
    return HYP_OK;
}

hyp_status hyp__out_open(hyp__outfile *o, const char *path, hyp_error *err)
{
    memset(o, 0, sizeof *o);
    if (!path[0])
        return hyp_error_set(err, HYP_ERR_USAGE, "an output file name is empty");
    if (strcmp(path, "-") == 0) {
        o->f = stdout;
        o->kind = HYP__OUT_STDOUT;
        return HYP_OK;
    }
    struct stat st;
    if (stat(path, &st) == 0 && S_ISDIR(st.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected an output file name", path);
    if (stat(path, &st) == 0 && !S_ISREG(st.st_mode))
        return open_direct(o, path, err);
    if (strlen(path) + 40 >= sizeof o->tmp)
        return hyp_error_set(err, HYP_ERR_IO, "%s: path too long", path);
    snprintf(o->final, sizeof o->final, "%s", path);
    snprintf(o->tmp, sizeof o->tmp, "%s%s%ld-XXXXXX", path, HYP__STAGE_TAG, (long)getpid());
    int fd = mkstemp(o->tmp);
    if (fd < 0) {
        int e = errno;
        o->tmp[0] = '\0';
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot write: %s", path,
                             e == ENOENT ? "the directory does not exist" : strerror(e));
    }
    /* mkstemp makes 0600; outputs are ordinary files */
    mode_t um = umask(0);
    umask(um);
    fchmod(fd, 0666 & ~um);
    o->f = fdopen(fd, "wb");
    if (!o->f) {
        close(fd);
        unlink(o->tmp);
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot write: %s", path, strerror(errno));
    }
    if ((o->buf = malloc(HYP__OUT_BUF)))
        setvbuf(o->f, o->buf, _IOFBF, HYP__OUT_BUF);
    return HYP_OK;
}

/* Flush, sync (unless nosync: a group commit syncs the file system once)
 * and close; the staging file stays until renamed or removed. */
static hyp_status out_finish_x(hyp__outfile *o, int nosync, hyp_error *err);

static hyp_status out_finish(hyp__outfile *o, hyp_error *err)
{
    return out_finish_x(o, 0, err);
}

static hyp_status out_finish_x(hyp__outfile *o, int nosync, hyp_error *err)
{
    if (o->finished)
        return HYP_OK;
    o->finished = 1;
    if (o->kind == HYP__OUT_STDOUT) {
        if (fflush(stdout) != 0 || ferror(stdout))
            return hyp_error_set(err, HYP_ERR_IO, "standard output: write error: %s", strerror(errno));
        return HYP_OK;
    }
    int bad = fflush(o->f) != 0 || ferror(o->f);
    int e = errno;
    if (!bad && o->kind == HYP__OUT_STAGED && !nosync && fsync(fileno(o->f)) != 0 && errno != EINVAL) {
        bad = 1;
        e = errno;
    }
    if (fclose(o->f) != 0 && !bad) {
        bad = 1;
        e = errno;
    }
    o->f = NULL;
    free(o->buf);
    o->buf = NULL;
    if (!bad)
        return HYP_OK;
    if (o->kind == HYP__OUT_DEVICE)
        return hyp_error_set(err, HYP_ERR_IO, "%s: write error: %s", o->final, strerror(e));
    return hyp_error_set(err, HYP_ERR_IO, "%s: write failed: %s; the previous file (if any) is unchanged", o->final, strerror(e));
}

void hyp__out_abort(hyp__outfile *o)
{
    if (o->kind == HYP__OUT_STDOUT)
        return;
    if (o->f)
        fclose(o->f);
    o->f = NULL;
    free(o->buf);
    o->buf = NULL;
    if (o->kind == HYP__OUT_STAGED && o->tmp[0])
        unlink(o->tmp);
    o->tmp[0] = '\0';
}

static void sync_dir(const char *path)
{
    char dir[4096];
    dir_of(path, dir, sizeof dir);
    int fd = open(dir, O_RDONLY | O_DIRECTORY);
    if (fd >= 0) {
        fsync(fd);   /* best effort: some file systems refuse it on directories */
        close(fd);
    }
}

hyp_status hyp__out_commit(hyp__outfile *o, hyp_error *err)
{
    hyp__outset s;
    hyp__outset_init(&s);
    s.files[0] = *o;
    s.n = 1;
    o->f = NULL;
    o->buf = NULL;
    return hyp__outset_commit(&s, NULL, NULL, err);
}

void hyp__outset_init(hyp__outset *s)
{
    s->n = 0;
}

hyp__outfile *hyp__outset_add(hyp__outset *s, const char *path, hyp_error *err)
{
    if (s->n == HYP__OUTSET_MAX) {
        hyp_error_set(err, HYP_ERR_INTERNAL, "%s: more than %d outputs in one set", path, HYP__OUTSET_MAX);
        return NULL;
    }
    hyp__outfile *o = &s->files[s->n];
    if (hyp__out_open(o, path, err))
        return NULL;
    s->n++;
    return o;
}

void hyp__outset_abort(hyp__outset *s)
{
    for (size_t k = 0; k < s->n; k++)
        hyp__out_abort(&s->files[k]);
    s->n = 0;
}

hyp_status hyp__outset_commit(hyp__outset *s, int (*cancelled)(void *), void *ctx, hyp_error *err)
{
    hyp_status st = HYP_OK;
    for (size_t k = 0; k < s->n && !st; k++)
        st = out_finish(&s->files[k], err);
    if (!st && cancelled && cancelled(ctx))
        st = hyp_error_set(err, HYP_ERR_IO, "interrupted: nothing written");
    for (size_t k = 0; k < s->n && !st; k++) {
        hyp__outfile *o = &s->files[k];
        if (o->kind == HYP__OUT_STAGED && rename(o->tmp, o->final) != 0)
            st = hyp_error_set(err, HYP_ERR_IO, "%s: write failed: cannot rename into place: %s", o->final, strerror(errno));
        else
            o->tmp[0] = '\0';
    }
    if (st) {
        /* a rename that failed after others succeeded cannot be undone;
         * with the set's files in one directory it does not happen short
         * of a failing disk, and the message says which file it was */
        hyp__outset_abort(s);
        return st;
    }
    for (size_t k = 0; k < s->n; k++) {
        const hyp__outfile *o = &s->files[k];
        int seen = 0;   /* each directory once */
        for (size_t j = 0; j < k && !seen; j++) {
            char a[4096], b[4096];
            dir_of(o->final, a, sizeof a);
            dir_of(s->files[j].final, b, sizeof b);
            seen = s->files[j].kind == HYP__OUT_STAGED && strcmp(a, b) == 0;
        }
        if (o->kind == HYP__OUT_STAGED && !seen)
            sync_dir(o->final);
    }
    s->n = 0;
    return HYP_OK;
}

hyp_status hyp__outset_stage(hyp__outset *s, hyp_error *err)
{
    hyp_status st = HYP_OK;
    for (size_t k = 0; k < s->n && !st; k++)
        st = out_finish_x(&s->files[k], 1, err);
    if (st)
        hyp__outset_abort(s);
    return st;
}

/* Each staged file's directory once: fn(dir) for each. */
static int each_dir(hyp__outset *const *sets, size_t n, int (*fn)(const char *))
{
    char seen[8][4096];
    size_t ns = 0;
    int bad = 0;
    for (size_t i = 0; i < n; i++)
        for (size_t k = 0; k < sets[i]->n; k++) {
            const hyp__outfile *o = &sets[i]->files[k];
            if (o->kind != HYP__OUT_STAGED)
                continue;
            char d[4096];
            dir_of(o->final, d, sizeof d);
            int found = 0;
            for (size_t j = 0; j < ns && !found; j++)
                found = strcmp(seen[j], d) == 0;
            if (found)
                continue;
            if (ns < 8)
                memcpy(seen[ns++], d, sizeof d);
            bad |= fn(d);
        }
    return bad;
}

/* syncfs(2) writes every dirty page and inode of the file system holding
 * dir, and reports a write-back error of any of them (Linux 5.8 and
 * later): one call puts a whole group's staging files on disk. */
static int syncfs_dir(const char *dir)
{
    int fd = open(dir, O_RDONLY | O_DIRECTORY);
    if (fd < 0)
        return 1;
    int bad = syncfs(fd) != 0;
    close(fd);
    return bad;
}

static int sync_dir_only(const char *dir)
{
    int fd = open(dir, O_RDONLY | O_DIRECTORY);
    if (fd >= 0) {
        fsync(fd);   /* best effort, as sync_dir */
        close(fd);
    }
    return 0;
}

/* One staged set's files: each fsynced (the way of a group of one). */
static hyp_status fsync_staged(hyp__outset *s, hyp_error *err)
{
    for (size_t k = 0; k < s->n; k++) {
        const hyp__outfile *o = &s->files[k];
        if (o->kind != HYP__OUT_STAGED)
            continue;
        int fd = open(o->tmp, O_RDONLY);
        int bad = fd < 0 || (fsync(fd) != 0 && errno != EINVAL);
        int e = errno;
        if (fd >= 0)
            close(fd);
        if (bad)
            return hyp_error_set(err, HYP_ERR_IO, "%s: write failed: %s; the previous file (if any) is unchanged", o->final,
                                 strerror(e));
    }
    return HYP_OK;
}

void hyp__outset_commit_group(hyp__outset *const *sets, size_t n, int (*cancelled)(void *), void *ctx,
                              hyp_status *st, hyp_error *errs)
{
    size_t live = 0;
    for (size_t i = 0; i < n; i++) {
        st[i] = HYP_OK;
        live += sets[i]->n > 0;
    }
    if (live == 1) {   /* one set: its files synced one by one, as a commit */
        for (size_t i = 0; i < n; i++)
            if (sets[i]->n && (st[i] = fsync_staged(sets[i], &errs[i])))
                hyp__outset_abort(sets[i]);
    } else if (live > 1 && each_dir(sets, n, syncfs_dir)) {
        int e = errno;
        for (size_t i = 0; i < n; i++)
            if (sets[i]->n) {
                st[i] = hyp_error_set(&errs[i], HYP_ERR_IO, "%s: write failed: %s; the previous file (if any) is unchanged",
                                      sets[i]->files[0].final, strerror(e));
                hyp__outset_abort(sets[i]);
            }
    }
    int stop = cancelled && cancelled(ctx);
    for (size_t i = 0; i < n; i++) {
        hyp__outset *s = sets[i];
        if (!s->n || st[i])
            continue;
        if (stop) {
            st[i] = hyp_error_set(&errs[i], HYP_ERR_IO, "interrupted: nothing written");
            hyp__outset_abort(s);
            continue;
        }
        for (size_t k = 0; k < s->n && !st[i]; k++) {
            hyp__outfile *o = &s->files[k];
            if (o->kind == HYP__OUT_STAGED && rename(o->tmp, o->final) != 0)
                st[i] = hyp_error_set(&errs[i], HYP_ERR_IO, "%s: write failed: cannot rename into place: %s", o->final,
                                      strerror(errno));
            else
                o->tmp[0] = '\0';
        }
        if (st[i])
            hyp__outset_abort(s);
    }
    if (!stop)
        each_dir(sets, n, sync_dir_only);
    for (size_t i = 0; i < n; i++)
        sets[i]->n = 0;
}

/* The pid of a staging name's tail "PID-XXXXXX", or 0 when it is not one. */
static long stage_pid(const char *tail)
{
    char *end;
    long pid = strtol(tail, &end, 10);
    if (pid <= 0 || end == tail || *end != '-' || strlen(end + 1) != 6)
        return 0;
    return pid;
}

/* Removes the stale staging files in dir: of target `base` (NULL: of any
 * target), whose process no longer exists. */
static size_t stale_scan(const char *dir, const char *base)
{
    DIR *d = opendir(dir);
    if (!d)
        return 0;
    size_t blen = base ? strlen(base) : 0, tlen = strlen(HYP__STAGE_TAG), removed = 0;
    struct dirent *e;
    while ((e = readdir(d))) {
        const char *nm = e->d_name;
        const char *tag = base ? (strncmp(nm, base, blen) == 0 ? nm + blen : NULL) : strstr(nm, HYP__STAGE_TAG);
        if (!tag || strncmp(tag, HYP__STAGE_TAG, tlen) != 0)
            continue;
        long pid = stage_pid(tag + tlen);
        if (!pid || pid == (long)getpid() || !(kill((pid_t)pid, 0) != 0 && errno == ESRCH))
            continue;   /* not ours, or its process may still be writing it */
        char full[8192];
        snprintf(full, sizeof full, "%s/%s", dir, nm);
        if (unlink(full) == 0)
            removed++;
    }
    closedir(d);
    return removed;
}

size_t hyp__stale_remove(const char *path)
{
    char dir[4096];
    dir_of(path, dir, sizeof dir);
    const char *base = strrchr(path, '/');
    return stale_scan(dir, base ? base + 1 : path);
}

size_t hyp__stale_dir_remove(const char *dir)
{
    return stale_scan(dir, NULL);
}
