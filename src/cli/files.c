/* files.c - the rover list of a command as typed; the library's
 * hyp_rover_list_expand turns folders and patterns into files. */
#define _POSIX_C_SOURCE 200809L
#include "cli.h"

#include <stdlib.h>
#include <string.h>

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
