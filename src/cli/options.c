/* options.c - the options `correct` and `adjust` share: the bases, every
 * setting of the survey (handed to the library by name), the rovers, the
 * threads; and opening the survey they describe. */
#define _GNU_SOURCE
#include "cli.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#define SET(name) {name, required_argument, 0, CLI_SET}
#define FLAG(name) {name, no_argument, 0, CLI_SET}
#define BASE(name) {name, required_argument, 0, CLI_BASE_SET}

const struct option cli_common_options[] = {
    {"base", required_argument, 0, CLI_BASE}, BASE("base-height"), BASE("base-at"),
    {"base-clock-offset", required_argument, 0, CLI_CLOCK}, BASE("base-time-zone"), BASE("base-offset"),
    BASE("base-offset-sigma"), {"base-qnh", no_argument, 0, CLI_BASE_SET}, BASE("base-pressure-unit"),
    BASE("base-temperature-unit"), BASE("base-pressure-field"), BASE("base-temperature-field"), BASE("base-humidity-field"), {"colocate", required_argument, 0, CLI_COLOC},
    {"base-dir", required_argument, 0, CLI_BASE_DIR}, FLAG("no-auto-colocate"), FLAG("no-gnss-anchor"),
    SET("column-temp"), SET("pressure-unit"), SET("temperature-unit"), SET("pressure-field"), SET("temperature-field"),
    SET("humidity-field"), SET("time-zone"), SET("benchmarks"), SET("ties"), SET("gnss-heights"), SET("known-heights"),
    SET("height-crs"), SET("crs"), SET("bases-colocated"), SET("method"), SET("offset"), SET("offset-sigma"),
    SET("colocate-radius"), SET("colocate-min"), SET("max-gap"), SET("humidity"), SET("lapse-rate"), SET("tie-radius"),
    SET("tie-min"), SET("smooth"), SET("gradient-sigma"), SET("clock-sigma"), SET("column-temp-sigma"),
    SET("lapse-sigma"), SET("benchmark-sigma"), {"quiet", no_argument, 0, 'q'}, {"jobs", required_argument, 0, 'j'},
    {"rover", required_argument, 0, CLI_ROVER}, {"rover-pressure-unit", required_argument, 0, CLI_ROVER_SET},
    {"rover-temperature-unit", required_argument, 0, CLI_ROVER_SET},
    {"rover-pressure-field", required_argument, 0, CLI_ROVER_SET},
    {"rover-temperature-field", required_argument, 0, CLI_ROVER_SET},
    {"rover-humidity-field", required_argument, 0, CLI_ROVER_SET},
    {"rover-time-zone", required_argument, 0, CLI_ROVER_SET}, {"rover-clock-offset", required_argument, 0, CLI_ROVER_SET},
    SET("baro-altitude"),
    SET("time-format"), BASE("base-time-format"),
    {0, 0, 0, 0},
};

int cli_usage(const char *cmd, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    fprintf(stderr, "hypsolev %s: ", cmd);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fprintf(stderr, "\n(hypsolev %s --help lists the options)\n", cmd);
    return EXIT_USAGE;
}

void cli_common_init(cli_common *c, const char *cmd)
{
    memset(c, 0, sizeof *c);
    c->cmd = cmd;
    hyp_survey_opts_init(&c->so);
    c->so.colocate = c->colocate;
    c->so.cancelled = cli_cancelled_cb;
}

/* A setting the library refused: its message under the option's name. */
static int setting(const cli_common *c, hyp_status st, const hyp_error *err)
{
    return st ? cli_usage(c->cmd, "--%s", err->message) : 0;
}

/* --rover FILE: one file (not a folder or a pattern, whose files would
 * not carry its name), added to the rovers; its --rover-* options follow. */
static int rover_option(cli_common *c, const char *arg)
{
    struct stat st;
    if (stat(arg, &st) == 0 && S_ISDIR(st.st_mode))
        return cli_usage(c->cmd, "--rover %s: a folder; --rover names one rover file (give folders without --rover)", arg);
    if (strpbrk(arg, "*?[") && stat(arg, &st) != 0)
        return cli_usage(c->cmd, "--rover %s: no such file; --rover names one rover file, not a pattern", arg);
    hyp_rover_spec *p = realloc(c->rover_specs, (size_t)(c->n_rover_specs + 1) * sizeof *p);
    if (!p) {
        fputs("hypsolev: error: out of memory\n", stderr);
        return EXIT_INPUT;
    }
    c->rover_specs = p;
    hyp_rover_spec_init(&p[c->n_rover_specs++], arg);
    return cli_files_add(&c->rovers, arg);
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

/* A --rover file must be its own only rover: also given as a rover
 * (positional, in a folder or pattern, or a second --rover) it would be
 * read twice, once without its options. */
static int check_rover_specs(const cli_common *c)
{
    for (int k = 0; k < c->n_rover_specs; k++) {
        size_t seen = 0;
        for (size_t i = 0; i < c->rovers.n; i++)
            seen += same_file(c->rover_specs[k].path, c->rovers.path[i]);
        if (seen > 1)
            return cli_usage(c->cmd, "--rover %s is also given as a rover (or twice): give it once, with --rover",
                             c->rover_specs[k].path);
    }
    return 0;
}

int cli_common_option(cli_common *c, int code, const char *name, const char *arg)
{
    hyp_error err;
    hyp_base_spec *b = c->n_bases ? &c->bases[c->n_bases - 1] : NULL;
    char *end;
    switch (code) {
    case CLI_SET: return setting(c, hyp_survey_opts_set(&c->so, name, arg, &err), &err);
    case CLI_BASE_SET:
    case CLI_CLOCK:
        if (!b) {
            fprintf(stderr, "hypsolev %s: --%s must follow the --base it applies to\n", c->cmd, name);
            return EXIT_USAGE;
        }
        if (code == CLI_CLOCK && !strcmp(arg, "auto"))
            return c->so.correct.estimate_clock = 1, 0;
        return setting(c, hyp_base_spec_set(b, name, arg, &err), &err);
    case CLI_BASE:
        if (c->n_bases == HYP_MAX_BASES)
            return cli_usage(c->cmd, "more than %d bases", HYP_MAX_BASES);
        hyp_base_spec_init(&c->bases[c->n_bases++], arg, NAN);
        return 0;
    case CLI_COLOC:
        if (c->so.n_colocate == CLI_MAX_WINDOWS)
            return cli_usage(c->cmd, "more than %d --colocate windows", CLI_MAX_WINDOWS);
        c->colocate[c->so.n_colocate++] = arg;
        return 0;
    case CLI_BASE_DIR: c->base_dir = arg; return 0;
    case CLI_ROVER: return rover_option(c, arg);
    case CLI_ROVER_SET:
        if (!c->n_rover_specs)
            return cli_usage(c->cmd, "--%s must follow the --rover it applies to", name);
        return setting(c, hyp_rover_spec_set(&c->rover_specs[c->n_rover_specs - 1], name, arg, &err), &err);
    case 'q': c->quiet = 1; return 0;
    case 'j':
        c->jobs = (int)strtol(arg, &end, 10);
        return *end || c->jobs < 1 || c->jobs > 256 ? cli_usage(c->cmd, "--jobs \"%s\": expected a whole number from 1 to 256", arg) : 0;
    }
    return EXIT_USAGE;
}

/* The command's table: its own options, then the common ones. */
static struct option table[128];

int cli_parse(cli_common *c, int argc, char **argv, const struct option *own, int (*fn)(void *, int, const char *),
              void *ctx)
{
    size_t n = 0;
    for (const struct option *o = own; o->name && n < 127; o++)
        table[n++] = *o;
    for (const struct option *o = cli_common_options; o->name && n < 127; o++)
        table[n++] = *o;
    table[n] = (struct option){0, 0, 0, 0};
    opterr = 0;
    optind = 1;
    int code, idx = -1;
    /* "-" first: positional arguments come in order as 1, so the per-base
     * options keep their place after their --base */
    while ((code = getopt_long(argc, argv, "-:o:qj:", table, &idx)) != -1) {
        int r;
        if (code == 1)
            r = cli_files_add(&c->rovers, optarg);
        else if (code == '?' || code == ':')
            return cli_bad_option(c->cmd, argv[optind - 1], optopt, code == ':');
        else if (code >= CLI_SET && code < CLI_OWN)
            r = cli_common_option(c, code, idx >= 0 ? table[idx].name : "", optarg);
        else if (code == 'q' || code == 'j')
            r = cli_common_option(c, code, "", optarg);
        else
            r = fn(ctx, code, optarg);
        if (r)
            return r;
        idx = -1;
    }
    if (!c->rovers.n)
        return cli_usage(c->cmd, "no rover file given");
    hyp_error err;
    char **list;
    size_t n_list;
    hyp_status st = hyp_rover_list_expand((const char *const *)c->rovers.path, c->rovers.n, &list, &n_list, &err);
    if (st)
        return cli_fail(c, st, &err);
    cli_files_free(&c->rovers);
    c->rovers.path = list;
    c->rovers.n = c->rovers.alloc = n_list;
    return check_rover_specs(c);
}

hyp_status cli_open_survey(cli_common *c, hyp_survey **sv, hyp_error *err)
{
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_status st = hyp_survey_new(sv, &c->so, &m, err);
    for (int k = 0; !st && k < c->n_bases; k++)
        st = hyp_survey_add_base(*sv, &c->bases[k], &m, err);
    if (!st && c->base_dir)
        st = hyp_survey_add_base_dir(*sv, c->base_dir, &m, err);
    for (int k = 0; !st && k < c->n_rover_specs; k++)
        st = hyp_survey_add_rover_spec(*sv, &c->rover_specs[k], err);
    hyp_msgs_write(stderr, &m, c->quiet ? HYP_WARNING : HYP_NOTE);
    hyp_msgs_free(&m);
    return st;
}

int cli_fail(const cli_common *c, hyp_status st, const hyp_error *err)
{
    if (st == HYP_ERR_USAGE)
        return cli_usage(c->cmd, "%s", err->message);
    fprintf(stderr, "hypsolev: error: %s\n", err->message);
    return hyp_exit_status(st);
}

/* The command line as typed, quoted for a shell where a word needs it
 * (for the reports). NULL when out of memory. */
char *cli_join_command(int argc, char **argv)
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
