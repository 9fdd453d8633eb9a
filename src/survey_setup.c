/* survey_setup.c - a survey set up from named settings in the order a
 * user gives them (bases and rovers with their own settings, a base
 * folder, co-location windows), its rovers expanded and checked, a rover
 * on standard input copied, and the survey opened: what a command line,
 * a configuration file or a form hands over by name (settings.h). */
#define _GNU_SOURCE
#include "hypsolev/settings.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#define MAX_WINDOWS 64

struct hyp_survey_setup {
    hyp_survey_opts so;
    hyp_base_spec bases[HYP_MAX_BASES];
    int n_bases;
    const char *base_dir;
    const char *colocate[MAX_WINDOWS];
    hyp_rover_spec *specs;      /* "rover" and its settings */
    size_t n_specs;
    char **typed;               /* the rovers as given */
    size_t n_typed;
    char **rovers;              /* expanded (hyp_survey_setup_rovers) */
    size_t n_rovers;
    char **texts;               /* copies of the values, kept by pointer above */
    size_t n_texts;
    char spool[4096];           /* the copy of a rover on standard input, "" for none */
};

hyp_status hyp_survey_setup_new(hyp_survey_setup **s, hyp_error *err)
{
    if (!(*s = calloc(1, sizeof **s)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    hyp_survey_opts_init(&(*s)->so);
    (*s)->so.colocate = (*s)->colocate;
    return HYP_OK;
}

static void free_list(char **list, size_t n)
{
    for (size_t k = 0; k < n; k++)
        free(list[k]);
    free(list);
}

void hyp_survey_setup_free(hyp_survey_setup *s)
{
    if (!s)
        return;
    hyp_spool_remove(s->spool);
    free_list(s->typed, s->n_typed);
    hyp_rover_list_free(s->rovers, s->n_rovers);
    free_list(s->texts, s->n_texts);
    free(s->specs);
    free(s);
}

hyp_survey_opts *hyp_survey_setup_opts(hyp_survey_setup *s)
{
    return &s->so;
}

/* Appends a copy of text to a list; NULL when out of memory. */
static char *push(char ***list, size_t *n, const char *text)
{
    char **p = realloc(*list, (*n + 1) * sizeof *p);
    if (!p)
        return NULL;
    *list = p;
    if (!(p[*n] = strdup(text)))
        return NULL;
    return p[(*n)++];
}


/* "rover FILE": one file (not a folder or a pattern, whose files would
 * not carry its settings), added to the rovers. */
static hyp_status start_rover(hyp_survey_setup *s, const char *path, hyp_error *err)
{
    struct stat st;
    if (stat(path, &st) == 0 && S_ISDIR(st.st_mode))
        return hyp_error_set(err, HYP_ERR_USAGE, "--rover %s: a folder; --rover names one rover file (give folders without --rover)", path);
    if (strpbrk(path, "*?[") && stat(path, &st) != 0)
        return hyp_error_set(err, HYP_ERR_USAGE, "--rover %s: no such file; --rover names one rover file, not a pattern", path);
    hyp_rover_spec *p = realloc(s->specs, (s->n_specs + 1) * sizeof *p);
    if (!p)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    s->specs = p;
    hyp_rover_spec_init(&p[s->n_specs++], path);
    return hyp_survey_setup_add_rover(s, path, err);
}

/* The settings that shape the survey rather than set a value. */
static hyp_status set_setup(hyp_survey_setup *s, const char *name, const char *v, hyp_error *err)
{
    if (!strcmp(name, "base")) {
        if (s->n_bases == HYP_MAX_BASES)
            return hyp_error_set(err, HYP_ERR_USAGE, "more than %d bases", HYP_MAX_BASES);
        hyp_base_spec_init(&s->bases[s->n_bases++], v, NAN);
    } else if (!strcmp(name, "colocate")) {
        if (s->so.n_colocate == MAX_WINDOWS)
            return hyp_error_set(err, HYP_ERR_USAGE, "more than %d --colocate windows", MAX_WINDOWS);
        s->colocate[s->so.n_colocate++] = v;
    } else if (!strcmp(name, "base-dir"))
        s->base_dir = v;
    else if (!strcmp(name, "rover"))
        return start_rover(s, v, err);
    else
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: no such setting", name);
    return HYP_OK;
}

hyp_status hyp_survey_setup_set(hyp_survey_setup *s, const char *name, const char *value, hyp_error *err)
{
    const hyp_setting_info *info = hyp_setting_find(name);
    if (!info)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: no such setting", name ? name : "");
    if (info->takes_value && !value)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s needs a value", name);
    const char *v = NULL;
    if (info->takes_value && !(v = push(&s->texts, &s->n_texts, value)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    switch (info->scope) {
    case HYP_SCOPE_SURVEY: return hyp_survey_opts_set(&s->so, name, v, err);
    case HYP_SCOPE_SETUP: return set_setup(s, name, v, err);
    case HYP_SCOPE_NETWORK:
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: a network adjustment's setting (hyp_network_opts_set)", name);
    case HYP_SCOPE_ROVER:
        if (!s->n_specs)
            return hyp_error_set(err, HYP_ERR_USAGE, "--%s must follow the --rover it applies to", name);
        return hyp_rover_spec_set(&s->specs[s->n_specs - 1], name, v, err);
    case HYP_SCOPE_BASE:
        if (!s->n_bases)
            return hyp_error_set(err, HYP_ERR_USAGE, "--%s must follow the --base it applies to", name);
        if (!strcmp(name, "base-clock-offset") && !strcmp(v, "auto"))   /* a survey's decision: one base only */
            return s->so.correct.estimate_clock = 1, HYP_OK;
        return hyp_base_spec_set(&s->bases[s->n_bases - 1], name, v, err);
    }
    return HYP_ERR_USAGE;
}

hyp_status hyp_survey_setup_add_rover(hyp_survey_setup *s, const char *path, hyp_error *err)
{
    return push(&s->typed, &s->n_typed, path) ? HYP_OK : hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
}

/* The same file twice: stat's device and inode where both exist, else the
 * names. */
static int same_file(const char *a, const char *b)
{
    struct stat x, y;
    if (stat(a, &x) == 0 && stat(b, &y) == 0)
        return x.st_dev == y.st_dev && x.st_ino == y.st_ino;
    return strcmp(a, b) == 0;
}

hyp_status hyp_survey_setup_rovers(hyp_survey_setup *s, const char *const **rovers, size_t *n, hyp_error *err)
{
    if (!s->n_typed)
        return hyp_error_set(err, HYP_ERR_USAGE, "no rover file given");
    hyp_rover_list_free(s->rovers, s->n_rovers);
    s->rovers = NULL;
    s->n_rovers = 0;
    hyp_status st = hyp_rover_list_expand((const char *const *)s->typed, s->n_typed, &s->rovers, &s->n_rovers, err);
    if (st)
        return st;
    /* A "rover" file must be its own only rover: also given as a rover
     * (plain, in a folder or pattern, or a second "rover") it would be
     * read twice, once without its settings. */
    for (size_t k = 0; k < s->n_specs; k++) {
        size_t seen = 0;
        for (size_t i = 0; i < s->n_rovers; i++)
            seen += same_file(s->specs[k].path, s->rovers[i]);
        if (seen > 1)
            return hyp_error_set(err, HYP_ERR_USAGE, "--rover %s is also given as a rover (or twice): give it once, with --rover",
                                 s->specs[k].path);
    }
    *rovers = (const char *const *)s->rovers;
    *n = s->n_rovers;
    return HYP_OK;
}

int hyp_survey_setup_has_bases(const hyp_survey_setup *s)
{
    return s->n_bases > 0 || s->base_dir != NULL;
}

int hyp_survey_setup_reads_stdin(const hyp_survey_setup *s)
{
    for (size_t k = 0; k < s->n_typed; k++)
        if (!strcmp(s->typed[k], "-"))
            return 1;
    return 0;
}

/* The rover "-" becomes the copy, named "stdin" in the run's texts: its
 * own settings ("rover -") move to the copy, or it gets a spec of its own
 * for the name. */
static hyp_status name_copy(hyp_survey_setup *s, size_t k, hyp_error *err)
{
    char *copy = strdup(s->spool);
    if (!copy)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    free(s->rovers[k]);
    s->rovers[k] = copy;
    size_t j = 0;
    while (j < s->n_specs && strcmp(s->specs[j].path, "-") != 0)
        j++;
    if (j == s->n_specs) {
        hyp_rover_spec *p = realloc(s->specs, (s->n_specs + 1) * sizeof *p);
        if (!p)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        s->specs = p;
        hyp_rover_spec_init(&p[s->n_specs++], copy);
    }
    s->specs[j].path = copy;
    s->specs[j].display_name = "stdin";
    return HYP_OK;
}

hyp_status hyp_survey_setup_spool_stdin(hyp_survey_setup *s, FILE *in, const char *tmpdir, const hyp_outputs *out,
                                        hyp_error *err)
{
    size_t k = 0;
    while (k < s->n_rovers && strcmp(s->rovers[k], "-") != 0)
        k++;
    if (k == s->n_rovers)
        return HYP_OK;
    if (s->n_rovers > 1)
        return hyp_error_set(err, HYP_ERR_USAGE, "a rover from standard input (-) must be the only rover");
    if (!out || !out->gpx)
        return hyp_error_set(err, HYP_ERR_USAGE, "a rover from standard input (-) needs -o FILE for its corrected GPX");
    if (isatty(fileno(in)))
        return hyp_error_set(err, HYP_ERR_USAGE,
                             "a rover from standard input (-): standard input is a terminal; pipe or redirect a log into it");
    hyp_status st = hyp_spool_stream(in, tmpdir, s->spool, sizeof s->spool, err);
    return st ? st : name_copy(s, k, err);
}

hyp_status hyp_survey_setup_open(const hyp_survey_setup *s, hyp_survey **sv, hyp_msgs *msgs, hyp_error *err)
{
    hyp_status st = hyp_survey_new(sv, &s->so, msgs, err);
    for (int k = 0; !st && k < s->n_bases; k++)
        st = hyp_survey_add_base(*sv, &s->bases[k], msgs, err);
    if (!st && s->base_dir)
        st = hyp_survey_add_base_dir(*sv, s->base_dir, msgs, err);
    for (size_t k = 0; !st && k < s->n_specs; k++)
        st = hyp_survey_add_rover_spec(*sv, &s->specs[k], err);
    return st;
}

char *hyp_command_line_join(int argc, char **argv)
{
    size_t n = sizeof "hypsolev";
    for (int i = 0; i < argc; i++)
        n += 4 * strlen(argv[i]) + 3;
    char *s = malloc(n), *p = s;
    if (!s)
        return NULL;
    p += sprintf(p, "hypsolev");
    for (int i = 0; i < argc; i++) {
        const char *w = argv[i];
        int plain = *w && strspn(w, "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789_./:,=+@%-") == strlen(w);
        *p++ = ' ';
        if (plain) {
            p += sprintf(p, "%s", w);
            continue;
        }
        *p++ = '\'';
        for (; *w; w++)
            p += *w == '\'' ? sprintf(p, "'\\''") : sprintf(p, "%c", *w);
        *p++ = '\'';
    }
    *p = '\0';
    return s;
}
