/* options.c - the options `correct` and `adjust` share: every setting of
 * the library's catalogue (settings.h, handed over by name), the threads
 * and quiet; and opening the survey they describe. */
#define _GNU_SOURCE
#include "cli.h"

#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

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

int cli_common_init(cli_common *c, const char *cmd)
{
    hyp_error err;
    memset(c, 0, sizeof *c);
    c->cmd = cmd;
    if (hyp_survey_setup_new(&c->setup, &err))
        return cli_fail(c, HYP_ERR_NOMEM, &err);
    hyp_survey_setup_opts(c->setup)->cancelled = cli_cancelled_cb;
    return 0;
}

/* A setting the library refused: its message under the option's name. */
static int setting(const cli_common *c, const char *name, const char *arg)
{
    hyp_error err;
    hyp_status st = c->net && hyp_setting_find(name)->scope == HYP_SCOPE_NETWORK
                        ? hyp_network_opts_set(c->net, name, arg, &err)
                        : hyp_survey_setup_set(c->setup, name, arg, &err);
    if (st == HYP_ERR_USAGE)
        return cli_usage(c->cmd, "%s%s", strncmp(err.message, name, strlen(name)) ? "" : "--", err.message);
    return st ? cli_fail(c, st, &err) : 0;
}

static int own_common(cli_common *c, int code, const char *arg)
{
    char *end;
    if (code == 'q')
        return c->quiet = 1, 0;
    c->jobs = (int)strtol(arg, &end, 10);
    return *end || c->jobs < 1 || c->jobs > 256 ? cli_usage(c->cmd, "--jobs \"%s\": expected a whole number from 1 to 256", arg) : 0;
}

/* The command's table: its own options, then every setting of the
 * catalogue (the network's only with c->net), then -q and -j. */
static struct option table[160];

static void make_table(const cli_common *c, const struct option *own)
{
    size_t n = 0, n_set;
    const hyp_setting_info *set = hyp_settings(&n_set);
    for (const struct option *o = own; o->name && n < 150; o++)
        table[n++] = *o;
    for (size_t k = 0; k < n_set && n < 157; k++)
        if (c->net || set[k].scope != HYP_SCOPE_NETWORK)
            table[n++] = (struct option){set[k].name, set[k].takes_value ? required_argument : no_argument, 0, CLI_SET};
    table[n++] = (struct option){"quiet", no_argument, 0, 'q'};
    table[n++] = (struct option){"jobs", required_argument, 0, 'j'};
    table[n] = (struct option){0, 0, 0, 0};
}

int cli_parse(cli_common *c, int argc, char **argv, const struct option *own, int (*fn)(void *, int, const char *),
              void *ctx)
{
    make_table(c, own);
    opterr = 0;
    optind = 1;
    int code, idx = -1;
    hyp_error err;
    /* "-" first: positional arguments come in order as 1, so the per-base
     * options keep their place after their --base */
    while ((code = getopt_long(argc, argv, "-:o:qj:", table, &idx)) != -1) {
        int r;
        if (code == 1)
            r = hyp_survey_setup_add_rover(c->setup, optarg, &err) ? cli_fail(c, HYP_ERR_NOMEM, &err) : 0;
        else if (code == '?' || code == ':')
            return cli_bad_option(c->cmd, argv[optind - 1], optopt, code == ':');
        else if (code == CLI_SET)
            r = setting(c, idx >= 0 ? table[idx].name : "", optarg);
        else if (code == 'q' || code == 'j')
            r = own_common(c, code, optarg);
        else
            r = fn(ctx, code, optarg);
        if (r)
            return r;
        idx = -1;
    }
    hyp_status st = hyp_survey_setup_rovers(c->setup, &c->rovers, &c->n_rovers, &err);
    return st ? cli_fail(c, st, &err) : 0;
}

hyp_status cli_open_survey(cli_common *c, hyp_survey **sv, hyp_error *err)
{
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_status st = hyp_survey_setup_open(c->setup, sv, &m, err);
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
