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

enum { O_STATIONS = CLI_OWN, O_BOOK, O_GPX, O_RESIDUALS, O_REPORT, O_HELP, O_RADIUS, O_MIN, O_CONTROL_SIGMA,
       O_NO_FIND, O_MIN_COMMON, O_WEATHER_WALK };

static const struct option own[] = {
    {"stations", required_argument, 0, O_STATIONS}, {"occupations", required_argument, 0, O_BOOK},
    {"output", required_argument, 0, 'o'}, {"gpx", required_argument, 0, O_GPX},
    {"residuals", required_argument, 0, O_RESIDUALS}, {"report", required_argument, 0, O_REPORT},
    {"occupation-radius", required_argument, 0, O_RADIUS}, {"occupation-min", required_argument, 0, O_MIN},
    {"control-sigma", required_argument, 0, O_CONTROL_SIGMA}, {"no-find-occupations", no_argument, 0, O_NO_FIND},
    {"help", no_argument, 0, O_HELP}, {"min-common", required_argument, 0, O_MIN_COMMON},
    {"weather-walk", required_argument, 0, O_WEATHER_WALK}, {0, 0, 0, 0},
};

static int number(const char *opt, const char *text, double lo, double hi, double *v)
{
    char *end;
    double x = strtod(text, &end);
    if (!text[0] || *end || strpbrk(text, "xXnN") || !(x >= lo && x <= hi))
        return cli_usage("adjust", "%s \"%s\": expected a number from %g to %g", opt, text, lo, hi);
    *v = x;
    return 0;
}

static int own_option(void *ctx, int code, const char *arg)
{
    args *a = ctx;
    switch (code) {
    case O_HELP: cli_adjust_help(); return -1;
    case O_STATIONS: a->no.stations_path = arg; return 0;
    case O_BOOK: a->no.fieldbook_path = arg; return 0;
    case 'o': a->out.stations_csv = arg; return 0;
    case O_GPX: a->out.gpx = arg; return 0;
    case O_RESIDUALS: a->out.residuals_csv = arg; return 0;
    case O_REPORT: a->out.report = arg; return 0;
    case O_NO_FIND: a->no.auto_occupations = 0; return 0;
    case O_RADIUS: return number("--occupation-radius", arg, 1, 1000, &a->no.occ_radius_m);
    case O_MIN: return number("--occupation-min", arg, 10, 86400, &a->no.occ_min_s);
    case O_CONTROL_SIGMA: return number("--control-sigma", arg, 0.0001, 100, &a->no.control_sigma_m);
    case O_MIN_COMMON: return number("--min-common", arg, 10, 86400, &a->no.min_common_s);
    case O_WEATHER_WALK: return number("--weather-walk", arg, 0.01, 20, &a->no.weather_walk_hpa_sqrt_h);
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
