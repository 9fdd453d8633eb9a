/* files.c - the rover list of a command: folders become their .gpx and
 * .csv files, quoted patterns their matches, each group sorted so that
 * runs are repeatable. */
#define _GNU_SOURCE
#include "cli.h"

#include <dirent.h>
#include <glob.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

int cli_files_add(cli_files *f, const char *path)
{
    if (f->n == f->alloc) {
        size_t na = f->alloc ? 2 * f->alloc : 16;
        char **p = realloc(f->path, na * sizeof *p);
        if (!p)
            goto oom;
        f->path = p;
        f->alloc = na;
    }
    if ((f->path[f->n] = strdup(path))) {
        f->n++;
        return 0;
    }
oom:
    fputs("hypsolev: error: out of memory\n", stderr);
    return EXIT_INPUT;
}

void cli_files_free(cli_files *f)
{
    for (size_t i = 0; i < f->n; i++)
        free(f->path[i]);
    free(f->path);
    memset(f, 0, sizeof *f);
}

static int cmp_str(const void *x, const void *y)
{
    return strcmp(*(char *const *)x, *(char *const *)y);
}

static int log_name(const char *name)
{
    size_t n = strlen(name);
    return name[0] != '.' && n > 4 && (!strcasecmp(name + n - 4, ".gpx") || !strcasecmp(name + n - 4, ".csv"));
}

static int add_folder(cli_files *out, const char *dir, const char *cmd)
{
    size_t start = out->n;
    DIR *d = opendir(dir);
    struct dirent *e;
    char p[4096];
    while (d && (e = readdir(d)))
        if (log_name(e->d_name) && (snprintf(p, sizeof p, "%s/%s", dir, e->d_name), cli_files_add(out, p))) {
            closedir(d);
            return EXIT_INPUT;
        }
    if (d)
        closedir(d);
    if (out->n == start) {
        fprintf(stderr, "hypsolev %s: %s: a folder with no .gpx or .csv file\n", cmd, dir);
        return EXIT_INPUT;
    }
    return 0;
}

static int add_pattern(cli_files *out, const char *pat, const char *cmd)
{
    glob_t g;
    if (glob(pat, 0, NULL, &g) != 0 || g.gl_pathc == 0) {
        fprintf(stderr, "hypsolev %s: %s: no file matches\n", cmd, pat);
        return EXIT_INPUT;
    }
    int rc = 0;
    for (size_t k = 0; k < g.gl_pathc && !rc; k++)
        rc = cli_files_add(out, g.gl_pathv[k]);
    globfree(&g);
    return rc;
}

int cli_files_expand(cli_files *f, const char *cmd)
{
    cli_files out = {0};
    int rc = 0;
    for (size_t i = 0; i < f->n && !rc; i++) {
        const char *r = f->path[i];
        struct stat st;
        size_t start = out.n;
        if (stat(r, &st) == 0 && S_ISDIR(st.st_mode))
            rc = add_folder(&out, r, cmd);
        else if (strpbrk(r, "*?[") && stat(r, &st) != 0)
            rc = add_pattern(&out, r, cmd);
        else
            rc = cli_files_add(&out, r);
        if (!rc)
            qsort(out.path + start, out.n - start, sizeof *out.path, cmp_str);
    }
    cli_files_free(f);
    *f = out;
    return rc;
}
