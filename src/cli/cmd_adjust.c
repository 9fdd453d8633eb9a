/* cmd_adjust.c - "hypsolev adjust": station heights from a whole survey,
 * adjusted and tested as one network by the library; prints its summary. */
#define _GNU_SOURCE
#include "cli.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef struct args {
    cli_common c;
    hyp_report_info report_info;
    char *command_line;
    hyp_network_opts no;
    hyp_network_outputs out;
} args;

enum { O_GPX = CLI_OWN, O_RESIDUALS, O_REPORT, O_HELP };

/* Its own options: the outputs. The network's settings (--stations and
 * the others) come from the library's catalogue (cli_common.net). */
static const struct option own[] = {
    {"output", required_argument, 0, 'o'}, {"gpx", required_argument, 0, O_GPX},
    {"residuals", required_argument, 0, O_RESIDUALS}, {"report", required_argument, 0, O_REPORT},
    {"help", no_argument, 0, O_HELP}, {0, 0, 0, 0},
};

static int own_option(void *ctx, int code, const char *arg)
{
    args *a = ctx;
    switch (code) {
    case O_HELP: cli_adjust_help(); return -1;
    case 'o': a->out.stations_csv = arg; return 0;
    case O_GPX: a->out.gpx = arg; return 0;
    case O_RESIDUALS: a->out.residuals_csv = arg; return 0;
    case O_REPORT: a->out.report = arg; return 0;
    }
    return EXIT_USAGE;
}

static int run(args *a)
{
    hyp_error err;
    hyp_survey *sv = NULL;
    hyp_network_result *res = NULL;
    cli_signals_catch();   /* before anything is read: a signal then still ends it in order */
    hyp_status st = cli_open_survey(&a->c, &sv, &err);
    if (!st)
        st = hyp_network_check_outputs(sv, &a->no, a->c.rovers, a->c.n_rovers, &a->out, &err);
    if (!st) {
        st = hyp_network_run(sv, &a->no, a->c.rovers, a->c.n_rovers, &res, &err);
        if (res)
            hyp_msgs_write(stderr, &res->msgs, a->c.quiet ? HYP_WARNING : HYP_NOTE);
    }
    if (!st)
        st = hyp_network_write(sv, res, &a->out, &err);
    int rc;
    if (st)
        rc = cli_fail(&a->c, st, &err);
    else {
        if (!a->c.quiet)
            hyp_network_write_text(stderr, res);
        rc = res->tests_failed ? EXIT_TEST : 0;
    }
    hyp_network_result_free(res);
    hyp_survey_free(sv);
    return cli_signal() ? 128 + cli_signal() : rc;
}

int cmd_adjust(int argc, char **argv)
{
    args a;
    memset(&a, 0, sizeof a);
    int rc = cli_common_init(&a.c, "adjust");
    hyp_network_opts_init(&a.no);
    a.c.net = &a.no;
    a.command_line = hyp_command_line_join(argc, argv);
    a.report_info.tool = "hypsolev " HYPSOLEV_VERSION;
    a.report_info.command_line = a.command_line;
    a.out.report_info = &a.report_info;
    if (!rc)
        rc = cli_parse(&a.c, argc, argv, own, own_option, &a);
    if (!rc && !a.no.stations_path)
        rc = cli_usage("adjust", "no --stations FILE given: the stations to determine and the control marks");
    if (!rc && !a.out.stations_csv && !a.out.gpx && !a.out.residuals_csv && !a.out.report)
        rc = cli_usage("adjust", "no output: give -o STATIONS.csv, --gpx FILE, --residuals FILE or --report FILE");
    if (!rc)
        rc = run(&a);
    hyp_survey_setup_free(a.c.setup);
    free(a.command_line);
    return rc < 0 ? 0 : rc;
}
