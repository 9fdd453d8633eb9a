/* cmd_inspect.c - "hypsolev inspect": the quality of pressure logs. */
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

int cmd_inspect(int argc, char **argv)
{
    static const struct option lo[] = {
        {"pressure-unit", required_argument, 0, 'p'}, {"temperature-unit", required_argument, 0, 't'},
        {"pressure-field", required_argument, 0, 'f'}, {"time-zone", required_argument, 0, 'z'},
        {"help", no_argument, 0, 'h'}, {"time-format", required_argument, 0, 'F'}, {0, 0, 0, 0}};
    hyp_read_opts ro;
    hyp_read_opts_init(&ro);
    hyp_zone z;
    hyp_zone_init(&z);
    const char *files[256];
    int nf = 0, c, rc = 0;
    opterr = 0;
    optind = 1;
    while ((c = getopt_long(argc, argv, "-:", lo, NULL)) != -1) {
        hyp_error err;
        switch (c) {
        case 1:
            if (nf < 256)
                files[nf++] = optarg;
            break;
        case 'p':
        case 't':
            if (!(c == 'p' ? (ro.pressure_unit = hyp_unit_parse(HYP_Q_PRESSURE, optarg))
                           : (ro.temperature_unit = hyp_unit_parse(HYP_Q_TEMPERATURE, optarg)))) {
                fprintf(stderr, "hypsolev inspect: unit \"%s\" is unknown\n", optarg);
                return EXIT_USAGE;
            }
            break;
        case 'f': ro.pressure_field = optarg; break;
        case 'z':
            if (hyp_zone_parse(&z, optarg, NULL, &err)) {
                fprintf(stderr, "hypsolev inspect: --time-zone: %s\n", err.message);
                return EXIT_USAGE;
            }
            ro.zone = &z;
            break;
        case 'F': {
            char why[160];
            if (hyp_time_format_check(optarg, why, sizeof why)) {
                fprintf(stderr, "hypsolev inspect: --time-format \"%s\" %s\n", optarg, why);
                return EXIT_USAGE;
            }
            ro.time_format = optarg;
            break;
        }
        case 'h': help(); return 0;
        default:
            return cli_bad_option("inspect", argv[optind - 1], optopt, c == ':');
        }
    }
    if (!nf) {
        fprintf(stderr, "hypsolev inspect: no file given\n(hypsolev inspect --help lists the options)\n");
        return EXIT_USAGE;
    }
    for (int i = 0; i < nf; i++) {
        int r = inspect_one(files[i], &ro);
        if (r > rc)
            rc = r;
    }
    hyp_zone_free(&z);
    return rc;
}
