/* spool.c - a log read from a stream (standard input) copied into a
 * private temporary file first: the readers need a regular file, and the
 * lossless GPX writer copies the input's bytes by offset. */
#include "hypsolev/readers.h"

#include <errno.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

hyp_status hyp_spool_stream(FILE *in, const char *dir, char *path, size_t n, hyp_error *err)
{
    char tmpl[PATH_MAX];
    if (!dir || !dir[0])
        dir = "/tmp";
    if (!path || n < 2 ||
        (size_t)snprintf(tmpl, sizeof tmpl, "%s/hypsolev-stdin.XXXXXX", dir) >= sizeof tmpl ||
        strlen(tmpl) + sizeof "/stdin" > n)
        return hyp_error_set(err, HYP_ERR_USAGE, "standard input: the temporary folder's name \"%s\" is too long", dir);
    path[0] = '\0';
    if (!mkdtemp(tmpl))   /* mode 0700: nobody else reads the copy */
        return hyp_error_set(err, HYP_ERR_IO, "standard input: cannot make a temporary folder in %s: %s (set TMPDIR)",
                             dir, strerror(errno));
    snprintf(path, n, "%s/stdin", tmpl);
    FILE *out = fopen(path, "wbx");
    hyp_status st = HYP_OK;
    if (!out)
        st = hyp_error_set(err, HYP_ERR_IO, "standard input: cannot write %s: %s", path, strerror(errno));
    char buf[65536];
    size_t got;
    while (!st && (got = fread(buf, 1, sizeof buf, in)) > 0)
        if (fwrite(buf, 1, got, out) != got)
            st = hyp_error_set(err, HYP_ERR_IO, "standard input: cannot write %s: %s", path, strerror(errno));
    if (!st && ferror(in))
        st = hyp_error_set(err, HYP_ERR_IO, "standard input: read error");
    if (out && fclose(out) != 0 && !st)
        st = hyp_error_set(err, HYP_ERR_IO, "standard input: cannot write %s: %s", path, strerror(errno));
    if (st)
        hyp_spool_remove(path[0] ? path : NULL), rmdir(tmpl), path[0] = '\0';
    return st;
}

void hyp_spool_remove(const char *path)
{
    if (!path || !path[0])
        return;
    unlink(path);
    const char *slash = strrchr(path, '/');
    char dir[PATH_MAX];
    if (slash && (size_t)(slash - path) < sizeof dir) {
        memcpy(dir, path, (size_t)(slash - path));
        dir[slash - path] = '\0';
        rmdir(dir);
    }
}
