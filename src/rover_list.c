/* rover_list.c - a survey's rover list as a command line or a season's
 * archive gives it: folders become their .gpx and .csv files, patterns
 * their matches, each group sorted so that runs repeat. */
#define _GNU_SOURCE
#include "hypsolev/survey.h"

#include <dirent.h>
#include <glob.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

typedef struct rover_vec {
    char **path;
    size_t n, alloc;
} rover_vec;

static hyp_status push(rover_vec *l, const char *path, hyp_error *err)
{
    if (l->n == l->alloc) {
        size_t na = l->alloc ? 2 * l->alloc : 16;
        char **p = realloc(l->path, na * sizeof *p);
        if (!p)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory listing the rovers");
        l->path = p;
        l->alloc = na;
    }
    if (!(l->path[l->n] = strdup(path)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory listing the rovers");
    l->n++;
    return HYP_OK;
}

static int cmp_str(const void *x, const void *y)
{
    return strcmp(*(char *const *)x, *(char *const *)y);
}

/* A log's name: .gpx or .csv in any case, not hidden. */
static int log_name(const char *name)
{
    size_t n = strlen(name);
    return name[0] != '.' && n > 4 && (!strcasecmp(name + n - 4, ".gpx") || !strcasecmp(name + n - 4, ".csv"));
}

static hyp_status add_folder(rover_vec *l, const char *dir, hyp_error *err)
{
    size_t start = l->n;
    DIR *d = opendir(dir);
    if (!d)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot read the folder", dir);
    hyp_status st = HYP_OK;
    struct dirent *e;
    char p[4096];
    while (!st && (e = readdir(d)))
        if (log_name(e->d_name)) {
            if ((size_t)snprintf(p, sizeof p, "%s/%s", dir, e->d_name) >= sizeof p)
                st = hyp_error_set(err, HYP_ERR_USAGE, "%s/%s: a path longer than %zu bytes", dir, e->d_name, sizeof p - 1);
            else
                st = push(l, p, err);
        }
    closedir(d);
    if (!st && l->n == start)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: a folder with no .gpx or .csv file", dir);
    return st;
}

static hyp_status add_pattern(rover_vec *l, const char *pat, hyp_error *err)
{
    glob_t g;
    if (glob(pat, 0, NULL, &g) != 0 || g.gl_pathc == 0) {
        globfree(&g);
        return hyp_error_set(err, HYP_ERR_NODATA, "%s: no file matches", pat);
    }
    hyp_status st = HYP_OK;
    for (size_t k = 0; k < g.gl_pathc && !st; k++)
        st = push(l, g.gl_pathv[k], err);
    globfree(&g);
    return st;
}

hyp_status hyp_rover_list_expand(const char *const *in, size_t n, char ***out, size_t *n_out, hyp_error *err)
{
    rover_vec l = {0};
    hyp_status st = HYP_OK;
    for (size_t i = 0; i < n && !st; i++) {
        const char *r = in[i];
        struct stat sb;
        size_t start = l.n;
        if (stat(r, &sb) == 0 && S_ISDIR(sb.st_mode))
            st = add_folder(&l, r, err);
        else if (strpbrk(r, "*?[") && stat(r, &sb) != 0)
            st = add_pattern(&l, r, err);
        else
            st = push(&l, r, err);
        if (!st)
            qsort(l.path + start, l.n - start, sizeof *l.path, cmp_str);
    }
    if (st) {
        hyp_rover_list_free(l.path, l.n);
        l.path = NULL;
        l.n = 0;
    }
    *out = l.path;
    *n_out = l.n;
    return st;
}

void hyp_rover_list_free(char **paths, size_t n)
{
    for (size_t i = 0; paths && i < n; i++)
        free(paths[i]);
    free(paths);
}
