/* outfile.c - outputs are written to a temporary file in the target's
 * directory and renamed over the target only when complete (rename(2) is
 * atomic within a file system), so a reader never sees half a file. */
#define _POSIX_C_SOURCE 200809L
#include "outfile.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

hyp_status hyp__out_open(hyp__outfile *o, const char *path, hyp_error *err)
{
    memset(o, 0, sizeof *o);
    if (strcmp(path, "-") == 0) {
        o->f = stdout;
        o->to_stdout = 1;
        return HYP_OK;
    }
    struct stat st;
    if (stat(path, &st) == 0 && S_ISDIR(st.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected an output file name", path);
    if (stat(path, &st) == 0 && !S_ISREG(st.st_mode)) {
        /* a device or a pipe (/dev/null, /dev/stdout): write to it as it
         * is; renaming a file over it would replace the device */
        o->f = fopen(path, "wb");
        if (!o->f)
            return hyp_error_set(err, HYP_ERR_IO, "%s: cannot write: %s", path, strerror(errno));
        o->to_stdout = 2;
        snprintf(o->final, sizeof o->final, "%s", path);
        return HYP_OK;
    }
    if (strlen(path) + 16 >= sizeof o->tmp)
        return hyp_error_set(err, HYP_ERR_IO, "%s: path too long", path);
    snprintf(o->final, sizeof o->final, "%s", path);
    snprintf(o->tmp, sizeof o->tmp, "%s.tmp-XXXXXX", path);
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

hyp_status hyp__out_commit(hyp__outfile *o, hyp_error *err)
{
    if (o->to_stdout == 2) {
        int bad = fflush(o->f) != 0 || ferror(o->f);
        bad |= fclose(o->f) != 0;
        o->f = NULL;
        if (bad)
            return hyp_error_set(err, HYP_ERR_IO, "%s: write error: %s", o->final, strerror(errno));
        return HYP_OK;
    }
    if (o->to_stdout) {
        if (fflush(stdout) != 0 || ferror(stdout))
            return hyp_error_set(err, HYP_ERR_IO, "standard output: write error: %s", strerror(errno));
        return HYP_OK;
    }
    int bad = fflush(o->f) != 0 || ferror(o->f);
    int e = errno;
    if (!bad && fsync(fileno(o->f)) != 0 && errno != EINVAL) {
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
    if (!bad && rename(o->tmp, o->final) != 0) {
        bad = 1;
        e = errno;
    }
    if (bad) {
        unlink(o->tmp);
        return hyp_error_set(err, HYP_ERR_IO, "%s: write failed: %s; the previous file (if any) is unchanged", o->final, strerror(e));
    }
    return HYP_OK;
}

void hyp__out_abort(hyp__outfile *o)
{
    if (o->to_stdout == 2 && o->f) {
        fclose(o->f);
        o->f = NULL;
        return;
    }
    if (o->to_stdout || !o->f)
        return;
    fclose(o->f);
    o->f = NULL;
    free(o->buf);
    o->buf = NULL;
    unlink(o->tmp);
}
