/* cmd_inspect.c - "hypsolev inspect": the quality of pressure logs, read
 * as the settings of correct say (by the library's names). */
#define _POSIX_C_SOURCE 200809L
#include "cli.h"
#include "hypsolev/hypsolev.h"

#include <getopt.h>
#include <stdio.h>
#include <string.h>

static void help(void)
{
    fputs("usage: hypsolev inspect FILE [FILE...] [options]\n"
          "\n"
          "Prints, for each pressure log (CSV or GPX): time span, sampling interval,\n"
          "value ranges and units, the pressure tendency, and problems: gaps, spikes,\n"
          "steps (a logger moved, re-powered or swapped), flat lines (a frozen\n"
          "sensor), clock jumps and periods of rapid change.\n"
          "\n"
          "  --pressure-unit U, --temperature-unit U, --pressure-field NAME,\n"
          "  --time-zone Z, --time-format FMT  as for correct\n"
          "\n"
          "exit status: 0 every log was read, 1 a log could not be used, 2 usage error.\n\n", stdout);
    cli_print_safety();
}

static int inspect_one(const char *path, const hyp_read_opts *ro)
{
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    hyp_status st = hyp_inspect_file(path, ro, stdout, &m, &err);
    hyp_msgs_write(stderr, &m, HYP_NOTE);
    hyp_msgs_free(&m);
    if (st)
        fprintf(stderr, "hypsolev: error: %s%s%s\n", strstr(err.message, path) ? "" : path, strstr(err.message, path) ? "" : ": ",
                err.message);
    return st ? EXIT_INPUT : 0;
}

/* The settings of correct that say how a log is read, by the library's
 * names (settings.h), and --help. */
static const char *const settings[] = {"pressure-unit", "temperature-unit", "pressure-field", "time-zone", "time-format"};

int cmd_inspect(int argc, char **argv)
{
    struct option lo[7] = {{"help", no_argument, 0, 'h'}, {0, 0, 0, 0}};
    for (int k = 0; k < 5; k++)
        lo[k + 1] = (struct option){settings[k], required_argument, 0, 's'};
    hyp_survey_opts so;
    hyp_survey_opts_init(&so);
    hyp_zone z;
    hyp_zone_init(&z);
    const char *files[256];
    int nf = 0, c, rc = 0, idx = -1;
    hyp_error err;
    opterr = 0;
    optind = 1;
    while ((c = getopt_long(argc, argv, "-:", lo, &idx)) != -1) {
        if (c == 1 && nf < 256)
            files[nf++] = optarg;
        else if (c == 's' && hyp_survey_opts_set(&so, lo[idx].name, optarg, &err))
            return cli_usage("inspect", "--%s", err.message);
        else if (c == 'h')
            return help(), 0;
        else if (c != 1 && c != 's')
            return cli_bad_option("inspect", argv[optind - 1], optopt, c == ':');
        idx = -1;
    }
    if (so.rover_time_zone && hyp_zone_parse(&z, so.rover_time_zone, NULL, &err))
        return cli_usage("inspect", "--time-zone: %s", err.message);
    if (!nf)
        return cli_usage("inspect", "no file given");
    so.read.zone = so.rover_time_zone ? &z : NULL;
    for (int i = 0; i < nf; i++) {
        int r = inspect_one(files[i], &so.read);
        if (r > rc)
            rc = r;
    }
    hyp_zone_free(&z);
    return rc;
}
