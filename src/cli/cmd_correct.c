/* cmd_correct.c - "hypsolev correct": reads the logs, calls the library's
 * correction, writes the outputs, prints the run summary on stderr. */
#define _POSIX_C_SOURCE 200809L
#include "cli.h"
#include "hypsolev/hypsolev.h"

#include <errno.h>
#include <getopt.h>
#include <libgen.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#define MAX_BASES 16
#define MAX_WINDOWS 64

typedef struct base_arg {
    const char *path;
    double height_m, lat_deg, lon_deg, clock_s, offset_pa, offset_sigma_pa;
    const char *zone;
    int qnh;
} base_arg;

typedef struct args {
    const char **rovers;
    int n_rovers;
    base_arg bases[MAX_BASES];
    int n_bases;
    const char *out, *out_dir, *table, *rover_zone;
    const char *benchmarks_path, *ties_path, *crs, *bases_coloc_text;
    hyp_vref gnss_ref, known_ref, out_ref;
    int out_ref_set;
    hyp_geo *geo;
    double benchmark_sigma_m;
    const char *colocate_text[MAX_WINDOWS];
    int n_colocate;
    int quiet;
    hyp_read_opts ropts;
    hyp_correct_opts copts;
} args;

static void help(void)
{
    fputs(
"usage: hypsolev correct ROVER [ROVER...] --base FILE --base-height M [options]\n"
"\n"
"Corrects each ROVER (GPX track, or CSV log with time, pressure, lat, lon)\n"
"against the pressure log of a base station of known height.\n"
"\n"
"base station (these apply to the --base before them):\n"
"  --base FILE              base log (CSV or GPX) with time and pressure\n"
"  --base-height M          height of the base sensor, m (required)\n"
"  --base-at LAT,LON        base position, degrees; enables automatic co-location\n"
"  --base-clock-offset S    seconds the base logger's clock is ahead of true time;\n"
"                           auto: estimated from co-locations (pressure changes)\n"
"  --base-time-zone Z       zone of base times that carry none (+HH:MM, UTC, Area/City)\n"
"  --base-offset PA         this base reads PA high (instrument offset), with\n"
"  --base-offset-sigma PA   its 1-sigma\n"
"  --base-qnh               the log holds sea-level pressure (QNH) of a weather\n"
"                           station at --base-height\n"
"\n"
"several bases (repeat --base):\n"
"  --method M               auto (default), single, two-base or field\n"
"  --bases-colocated START/END  the base loggers stood side by side then\n"
"\n"
"rover-minus-base instrument offset:\n"
"  --offset PA              offset in Pa (rover reads this much higher than base)\n"
"  --offset-sigma PA        its 1-sigma uncertainty, Pa (default 0)\n"
"  --colocate START/END     rover beside the base in this window (ISO 8601 times);\n"
"                           repeatable; replaces automatic detection\n"
"  --no-auto-colocate       do not look for co-location from positions\n"
"  --colocate-radius M      co-location radius, m (default 30)\n"
"  --colocate-min S         minimum co-location time, s (default 300)\n"
"\n"
"benchmarks and ties:\n"
"  --benchmarks FILE        CSV: name, lat, lon, height [m], optional sigma [m], note\n"
"  --benchmark-sigma M      sigma of benchmarks that give none (default 0.01 m)\n"
"  --ties FILE              CSV: name, start, end: the rover stood on benchmark name\n"
"                           (or \"base\") over that window\n"
"  --tie-radius M           automatic ties: within M of a benchmark (default 30)\n"
"  --tie-min S              ... and standing still at least S (default 60)\n"
"                           GPX waypoints named like a benchmark are ties too\n"
"\n"
"heights and positions:\n"
"  --gnss-heights REF       what the track's own ele is: geoid (EGM96, default) or\n"
"                           ellipsoidal; a point's <geoidheight> is used where given\n"
"  --known-heights REF      reference of --base-height and benchmarks (default geoid)\n"
"  --height-crs REF         reference of the heights written (default: as known)\n"
"  --crs CRS                add easting/northing: EPSG:n, a PROJ string, WKT, or utm\n"
"  --no-gnss-anchor         with no co-location, tie or offset, do not level the\n"
"                           track on its GNSS heights\n"
"\n"
"error budget:\n"
"  --smooth S               centred moving average of rover pressure over S seconds\n"
"  --gradient-sigma G       horizontal pressure gradient, hPa per 100 km (default 1)\n"
"  --clock-sigma S          base clock uncertainty, s (default 2)\n"
"\n"
"air column:\n"
"  --column-temp MODE       base (base thermometer and lapse rate, default),\n"
"                           rover (base and rover thermometers), both (their mean)\n"
"  --lapse-rate K_PER_KM    default -6.5 K/km (standard atmosphere)\n"
"  --humidity PCT           humidity when no log has one (default 50 %)\n"
"  --column-temp-sigma K    base thermometer as a measure of the air, 1 sigma (default 0.5 K)\n"
"  --lapse-sigma K_PER_KM   spread of real lapse rates about --lapse-rate (default 1 K/km)\n"
"  --max-gap S              longest base gap bridged, s (default 180)\n"
"\n"
"inputs:\n"
"  --pressure-unit U        Pa, hPa, mbar, kPa, inHg, mmHg (when the file says none)\n"
"  --temperature-unit U     degC, K, degF\n"
"  --pressure-field NAME    element or column name of pressure (default pressure)\n"
"  --temperature-field NAME (default temperature)\n"
"  --humidity-field NAME    (default humidity)\n"
"  --time-zone Z            zone of rover times that carry none\n"
"\n"
"outputs (at least one):\n"
"  -o, --output FILE        corrected GPX (one rover only)\n"
"  --out-dir DIR            DIR/NAME.gpx and DIR/NAME.csv for each rover NAME.*\n"
"  --table FILE             per-sample table (CSV); - is standard output\n"
"  -q, --quiet              no run summary, warnings only\n"
"\n"
"examples:\n"
"  hypsolev correct walk.gpx --base base.csv --base-height 812.4 \\\n"
"      --base-at 46.80,9.90 -o walk-corrected.gpx --table walk.csv\n"
"  hypsolev correct day1.csv --base hut.csv --base-height 1520 --offset 35 \\\n"
"      --out-dir results/\n"
"\n"
"exit status: 0 all went well, 1 an input could not be used, 2 usage error.\n"
"\n", stdout);
    cli_print_safety();
}

static int usage_error(const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 1, 2)))
#endif
    ;

static int usage_error(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    fputs("hypsolev correct: ", stderr);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fputs("\n(hypsolev correct --help lists the options)\n", stderr);
    return EXIT_USAGE;
}

static int parse_double(const char *s, double *v)
{
    char *end;
    errno = 0;
    *v = strtod(s, &end);
    return s[0] && *end == '\0' && errno == 0 && isfinite(*v);
}

enum {
    O_BASE = 256, O_BASE_HEIGHT, O_BASE_AT, O_BASE_CLOCK, O_BASE_TZ, O_OFFSET, O_OFFSET_SIGMA,
    O_COLOC, O_NO_AUTO, O_COLOC_R, O_COLOC_MIN, O_TCOL, O_LAPSE, O_RH, O_GAP, O_PUNIT, O_TUNIT,
    O_PFIELD, O_TFIELD, O_HFIELD, O_TZ, O_OUTDIR, O_TABLE, O_HELP, O_BENCH, O_BENCH_SIG, O_TIES,
    O_TIE_R, O_TIE_MIN, O_SMOOTH, O_GRAD, O_CLOCK_SIG, O_TSIG, O_LSIG, O_GNSS_REF, O_KNOWN_REF,
    O_OUT_REF, O_CRS, O_NO_ANCHOR, O_BASE_OFF, O_BASE_OFF_SIG, O_BASE_QNH, O_BASES_COLOC, O_METHOD
};

static const struct option longopts[] = {
    {"base", required_argument, 0, O_BASE},
    {"base-height", required_argument, 0, O_BASE_HEIGHT},
    {"base-at", required_argument, 0, O_BASE_AT},
    {"base-clock-offset", required_argument, 0, O_BASE_CLOCK},
    {"base-time-zone", required_argument, 0, O_BASE_TZ},
    {"offset", required_argument, 0, O_OFFSET},
    {"offset-sigma", required_argument, 0, O_OFFSET_SIGMA},
    {"colocate", required_argument, 0, O_COLOC},
    {"no-auto-colocate", no_argument, 0, O_NO_AUTO},
    {"colocate-radius", required_argument, 0, O_COLOC_R},
    {"colocate-min", required_argument, 0, O_COLOC_MIN},
    {"column-temp", required_argument, 0, O_TCOL},
    {"lapse-rate", required_argument, 0, O_LAPSE},
    {"humidity", required_argument, 0, O_RH},
    {"max-gap", required_argument, 0, O_GAP},
    {"pressure-unit", required_argument, 0, O_PUNIT},
    {"temperature-unit", required_argument, 0, O_TUNIT},
    {"pressure-field", required_argument, 0, O_PFIELD},
    {"temperature-field", required_argument, 0, O_TFIELD},
    {"humidity-field", required_argument, 0, O_HFIELD},
    {"time-zone", required_argument, 0, O_TZ},
    {"output", required_argument, 0, 'o'},
    {"out-dir", required_argument, 0, O_OUTDIR},
    {"table", required_argument, 0, O_TABLE},
    {"quiet", no_argument, 0, 'q'},
    {"help", no_argument, 0, O_HELP},
    {"benchmarks", required_argument, 0, O_BENCH},
    {"benchmark-sigma", required_argument, 0, O_BENCH_SIG},
    {"ties", required_argument, 0, O_TIES},
    {"tie-radius", required_argument, 0, O_TIE_R},
    {"tie-min", required_argument, 0, O_TIE_MIN},
    {"smooth", required_argument, 0, O_SMOOTH},
    {"gradient-sigma", required_argument, 0, O_GRAD},
    {"clock-sigma", required_argument, 0, O_CLOCK_SIG},
    {"column-temp-sigma", required_argument, 0, O_TSIG},
    {"lapse-sigma", required_argument, 0, O_LSIG},
    {"gnss-heights", required_argument, 0, O_GNSS_REF},
    {"known-heights", required_argument, 0, O_KNOWN_REF},
    {"height-crs", required_argument, 0, O_OUT_REF},
    {"crs", required_argument, 0, O_CRS},
    {"no-gnss-anchor", no_argument, 0, O_NO_ANCHOR},
    {"base-offset", required_argument, 0, O_BASE_OFF},
    {"base-offset-sigma", required_argument, 0, O_BASE_OFF_SIG},
    {"base-qnh", no_argument, 0, O_BASE_QNH},
    {"bases-colocated", required_argument, 0, O_BASES_COLOC},
    {"method", required_argument, 0, O_METHOD},
    {0, 0, 0, 0},
};

/* A numeric option value within [lo, hi]; returns 0 on success. */
static int num_opt(const char *name, const char *text, double lo, double hi, double *v)
{
    if (!parse_double(text, v) || *v < lo || *v > hi) {
        fprintf(stderr, "hypsolev correct: %s \"%s\": expected a number from %g to %g\n", name, text, lo, hi);
        return -1;
    }
    return 0;
}

static base_arg *last_base(args *a, const char *opt)
{
    if (a->n_bases == 0) {
        fprintf(stderr, "hypsolev correct: %s must follow the --base it applies to\n", opt);
        return NULL;
    }
    return &a->bases[a->n_bases - 1];
}

static int parse_base_opt(args *a, int c, const char *arg)
{
    if (c == O_BASE) {
        if (a->n_bases == MAX_BASES)
            return usage_error("more than %s bases", "16");
        base_arg *b = &a->bases[a->n_bases++];
        b->path = arg;
        b->height_m = b->lat_deg = b->lon_deg = NAN;
        b->clock_s = 0.0;
        b->zone = NULL;
        b->offset_pa = NAN;
        b->offset_sigma_pa = 0.0;
        b->qnh = 0;
        return 0;
    }
    const char *name = c == O_BASE_HEIGHT ? "--base-height" : c == O_BASE_AT ? "--base-at"
                     : c == O_BASE_CLOCK ? "--base-clock-offset" : c == O_BASE_OFF ? "--base-offset"
                     : c == O_BASE_OFF_SIG ? "--base-offset-sigma" : c == O_BASE_QNH ? "--base-qnh" : "--base-time-zone";
    base_arg *b = last_base(a, name);
    if (!b)
        return EXIT_USAGE;
    if (c == O_BASE_HEIGHT)
        return num_opt(name, arg, -500.0, 9000.0, &b->height_m) ? EXIT_USAGE : 0;
    if (c == O_BASE_OFF)
        return num_opt(name, arg, -5000.0, 5000.0, &b->offset_pa) ? EXIT_USAGE : 0;
    if (c == O_BASE_OFF_SIG)
        return num_opt(name, arg, 0.0, 5000.0, &b->offset_sigma_pa) ? EXIT_USAGE : 0;
    if (c == O_BASE_QNH) {
        b->qnh = 1;
        return 0;
    }
    if (c == O_BASE_CLOCK) {
        if (strcmp(arg, "auto") == 0) {
            a->copts.estimate_clock = 1;
            b->clock_s = 0.0;
            return 0;
        }
        return num_opt(name, arg, -86400.0, 86400.0, &b->clock_s) ? EXIT_USAGE : 0;
    }
    if (c == O_BASE_TZ) {
        b->zone = arg;
        return 0;
    }
    char buf[128];
    snprintf(buf, sizeof buf, "%s", arg);
    char *comma = strchr(buf, ',');
    if (!comma)
        return usage_error("--base-at \"%s\": expected LAT,LON in degrees", arg);
    *comma = '\0';
    if (num_opt("--base-at latitude", buf, -90, 90, &b->lat_deg) ||
        num_opt("--base-at longitude", comma + 1, -180, 180, &b->lon_deg))
        return EXIT_USAGE;
    return 0;
}

static int parse_unit_opt(hyp_quantity q, const char *name, const char *arg, hyp_unit *u)
{
    *u = hyp_unit_parse(q, arg);
    if (!*u) {
        fprintf(stderr, "hypsolev correct: %s \"%s\": expected one of %s\n", name, arg, hyp_unit_choices(q));
        return EXIT_USAGE;
    }
    return 0;
}

static int parse_one(args *a, int c, const char *arg)
{
    hyp_correct_opts *o = &a->copts;
    switch (c) {
    case O_BASE: case O_BASE_HEIGHT: case O_BASE_AT: case O_BASE_CLOCK: case O_BASE_TZ:
    case O_BASE_OFF: case O_BASE_OFF_SIG: case O_BASE_QNH:
        return parse_base_opt(a, c, arg);
    case O_BASES_COLOC: a->bases_coloc_text = arg; return 0;
    case O_METHOD:
        if (strcmp(arg, "auto") == 0) o->method = HYP_METHOD_AUTO;
        else if (strcmp(arg, "single") == 0) o->method = HYP_METHOD_SINGLE;
        else if (strcmp(arg, "two-base") == 0) o->method = HYP_METHOD_TWO_BASE;
        else if (strcmp(arg, "field") == 0) o->method = HYP_METHOD_FIELD;
        else return usage_error("--method \"%s\": expected auto, single, two-base or field", arg);
        return 0;
    case O_OFFSET: return num_opt("--offset", arg, -5000, 5000, &o->offset_pa) ? EXIT_USAGE : 0;
    case O_OFFSET_SIGMA: return num_opt("--offset-sigma", arg, 0, 5000, &o->offset_sigma_pa) ? EXIT_USAGE : 0;
    case O_COLOC:
        if (a->n_colocate == MAX_WINDOWS)
            return usage_error("more than %s --colocate windows", "64");
        a->colocate_text[a->n_colocate++] = arg;
        return 0;
    case O_NO_AUTO: o->auto_colocate = 0; return 0;
    case O_COLOC_R: return num_opt("--colocate-radius", arg, 0, 10000, &o->coloc_radius_m) ? EXIT_USAGE : 0;
    case O_COLOC_MIN: return num_opt("--colocate-min", arg, 10, 86400, &o->coloc_min_s) ? EXIT_USAGE : 0;
    case O_GAP: return num_opt("--max-gap", arg, 1, 86400, &o->max_gap_s) ? EXIT_USAGE : 0;
    case O_RH: return num_opt("--humidity", arg, 0, 100, &o->default_rh_pct) ? EXIT_USAGE : 0;
    case O_LAPSE: {
        double l;
        if (num_opt("--lapse-rate", arg, -12, 12, &l))
            return EXIT_USAGE;
        o->lapse_k_per_m = l / 1000.0;
        return 0;
    }
    case O_TCOL:
        if (strcmp(arg, "base") == 0) o->tcol = HYP_TCOL_BASE_LAPSE;
        else if (strcmp(arg, "rover") == 0) o->tcol = HYP_TCOL_ROVER;
        else if (strcmp(arg, "both") == 0) o->tcol = HYP_TCOL_BOTH;
        else return usage_error("--column-temp \"%s\": expected base, rover or both", arg);
        return 0;
    case O_PUNIT: return parse_unit_opt(HYP_Q_PRESSURE, "--pressure-unit", arg, &a->ropts.pressure_unit);
    case O_TUNIT: return parse_unit_opt(HYP_Q_TEMPERATURE, "--temperature-unit", arg, &a->ropts.temperature_unit);
    case O_PFIELD: a->ropts.pressure_field = arg; return 0;
    case O_TFIELD: a->ropts.temperature_field = arg; return 0;
    case O_HFIELD: a->ropts.humidity_field = arg; return 0;
    case O_TZ: a->rover_zone = arg; return 0;
    case 'o': a->out = arg; return 0;
    case O_OUTDIR: a->out_dir = arg; return 0;
    case O_TABLE: a->table = arg; return 0;
    case 'q': a->quiet = 1; return 0;
    case O_BENCH: a->benchmarks_path = arg; return 0;
    case O_BENCH_SIG: return num_opt("--benchmark-sigma", arg, 0, 100, &a->benchmark_sigma_m) ? EXIT_USAGE : 0;
    case O_TIES: a->ties_path = arg; return 0;
    case O_TIE_R: return num_opt("--tie-radius", arg, 1, 10000, &o->tie_radius_m) ? EXIT_USAGE : 0;
    case O_TIE_MIN: return num_opt("--tie-min", arg, 1, 86400, &o->tie_min_s) ? EXIT_USAGE : 0;
    case O_SMOOTH: return num_opt("--smooth", arg, 0, 3600, &o->smooth_s) ? EXIT_USAGE : 0;
    case O_GRAD: {
        double g;
        if (num_opt("--gradient-sigma", arg, 0, 100, &g))
            return EXIT_USAGE;
        o->gradient_sigma_pa_per_m = g * 100.0 / 100000.0;
        return 0;
    }
    case O_CLOCK_SIG: return num_opt("--clock-sigma", arg, 0, 3600, &o->clock_sigma_s) ? EXIT_USAGE : 0;
    case O_GNSS_REF: case O_KNOWN_REF: case O_OUT_REF: {
        int v = hyp_vref_parse(arg);
        if (v < 0)
            return usage_error("%s \"%s\": expected geoid or ellipsoidal",
                               c == O_GNSS_REF ? "--gnss-heights" : c == O_KNOWN_REF ? "--known-heights" : "--height-crs", arg);
        if (c == O_GNSS_REF) a->gnss_ref = (hyp_vref)v;
        else if (c == O_KNOWN_REF) a->known_ref = (hyp_vref)v;
        else a->out_ref = (hyp_vref)v, a->out_ref_set = 1;
        return 0;
    }
    case O_CRS: a->crs = arg; return 0;
    case O_NO_ANCHOR: o->gnss_anchor = 0; return 0;
    case O_TSIG: return num_opt("--column-temp-sigma", arg, 0, 30, &o->tcol_sigma_k) ? EXIT_USAGE : 0;
    case O_LSIG: {
        double l;
        if (num_opt("--lapse-sigma", arg, 0, 10, &l))
            return EXIT_USAGE;
        o->lapse_sigma_k_per_m = l / 1000.0;
        return 0;
    }
    }
    return EXIT_USAGE;
}

static int check_args(args *a)
{
    if (a->n_rovers == 0)
        return usage_error("no rover file given");
    if (a->n_bases == 0)
        return usage_error("no --base given: a base station's pressure log is needed");
    for (int k = 0; k < a->n_bases; k++)
        if (a->bases[k].height_m != a->bases[k].height_m)
            return usage_error("--base %s has no --base-height", a->bases[k].path);
    if (!a->out && !a->out_dir && !a->table)
        return usage_error("no output: give -o FILE.gpx, --out-dir DIR or --table FILE");
    if (a->out && a->n_rovers > 1)
        return usage_error("-o names one output but %s rovers are given; use --out-dir", "several");
    if (a->out && a->out_dir)
        return usage_error("-o and --out-dir both given; choose one");
    if (a->table && a->n_rovers > 1 && strcmp(a->table, "-") != 0)
        return usage_error("--table names one file but several rovers are given; use --out-dir (it writes one table per rover)");
    return 0;
}

static int parse_args(args *a, int argc, char **argv)
{
    memset(a, 0, sizeof *a);
    hyp_read_opts_init(&a->ropts);
    hyp_correct_opts_init(&a->copts);
    a->benchmark_sigma_m = 0.01;
    a->rovers = calloc((size_t)argc, sizeof *a->rovers);
    if (!a->rovers)
        return EXIT_INPUT;
    opterr = 0;
    optind = 1;
    int c;
    /* "-" first: positional arguments are returned in order as 1, so the
     * per-base options keep their place after their --base. */
    while ((c = getopt_long(argc, argv, "-o:q", longopts, NULL)) != -1) {
        if (c == 1) {
            a->rovers[a->n_rovers++] = optarg;
            continue;
        }
        if (c == O_HELP) {
            help();
            return -1;
        }
        if (c == '?' || c == ':') {
            if (optopt)
                fprintf(stderr, "hypsolev correct: option -%c %s\n", optopt, c == ':' ? "needs a value" : "is unknown");
            else
                fprintf(stderr, "hypsolev correct: option \"%s\" is unknown or needs a value\n", argv[optind - 1]);
            fputs("(hypsolev correct --help lists the options)\n", stderr);
            return EXIT_USAGE;
        }
        int r = parse_one(a, c, optarg);
        if (r)
            return r;
    }
    if (!a->out_ref_set)
        a->out_ref = a->known_ref;
    return check_args(a);
}

static void print_msgs(const hyp_msgs *m, int quiet)
{
    for (size_t i = 0; i < m->count; i++) {
        if (quiet && m->items[i].level == HYP_NOTE)
            continue;
        fprintf(stderr, "hypsolev: %s: %s\n", m->items[i].level == HYP_WARNING ? "warning" : "note", m->items[i].text);
    }
    if (m->dropped)
        fprintf(stderr, "hypsolev: %zu more messages not shown\n", m->dropped);
}

/* A log read by either reader, into a series. */
typedef struct log_in {
    int is_gpx;
    hyp_gpx_doc doc;
    hyp_series csv;
    hyp_unit punit;
} log_in;

static const hyp_series *log_series(const log_in *l)
{
    return l->is_gpx ? &l->doc.pts : &l->csv;
}

static hyp_status read_log(const char *path, const hyp_read_opts *ro, log_in *l, hyp_msgs *msgs, hyp_error *err)
{
    hyp_gpx_doc_init(&l->doc);
    hyp_series_init(&l->csv);
    l->punit = HYP_UNIT_NONE;
    int x = hyp_file_is_xml(path);
    l->is_gpx = x == 1;
    if (l->is_gpx) {
        hyp_status st = hyp_gpx_read(path, ro, &l->doc, msgs, err);
        l->punit = l->doc.pressure_unit;
        return st;
    }
    return hyp_csv_read(path, ro, &l->csv, &l->punit, msgs, err);
}

static void log_free(log_in *l)
{
    hyp_gpx_doc_free(&l->doc);
    hyp_series_free(&l->csv);
}

static void span_text(const hyp_series *s, char *buf, size_t n)
{
    double t0 = NAN, t1 = NAN;
    size_t used = 0;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i]) {
            if (t0 != t0)
                t0 = s->time_s[i];
            t1 = s->time_s[i];
            used++;
        }
    char a[40], b[40];
    hyp_time_format(t0, a, sizeof a);
    hyp_time_format(t1, b, sizeof b);
    snprintf(buf, n, "%zu samples (%zu usable), %s to %s (%.2f h)", s->count, used, a, b, (t1 - t0) / 3600.0);
}

static int cmp_d(const void *x, const void *y)
{
    double a = *(const double *)x, b = *(const double *)y;
    return (a > b) - (a < b);
}


static const char *how_text(hyp_calib_how h)
{
    return h == HYP_HOW_POSITION ? "found from positions" : h == HYP_HOW_WAYPOINT ? "waypoint" : "given";
}

static void print_calibrations(const hyp_correct_result *r)
{
    if (!r->n_calibs)
        return;
    fprintf(stderr, "  ties      %zu calibration(s); misclosure = height before adjustment - known, residual = after\n", r->n_calibs);
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        char a[40], b[40];
        hyp_time_format(c->start_s, a, sizeof a);
        hyp_time_format(c->end_s, b, sizeof b);
        fprintf(stderr, "            %-10s %s to %s, %zu samples (%s): known %.3f m +- %.3f m, misclosure %+.3f m, residual %+.3f m, offset %+.3f hPa\n",
                c->name, a, b + 11, c->n, how_text(c->how), c->known_m, c->known_sigma_m, c->misclosure_m,
                c->residual_m, c->offset_pa / 100.0);
    }
}

static void print_drift(const hyp_correct_result *r)
{
    const hyp_drift *d = &r->drift;
    fprintf(stderr, "  offset    %s\n", d->note);
    if (d->kind == HYP_DRIFT_NONE)
        return;
    for (size_t j = 0; j < d->n_knots; j++) {
        char t[40];
        hyp_time_format(d->knot_s[j], t, sizeof t);
        fprintf(stderr, "            %s %+.3f hPa +- %.3f hPa\n", d->kind == HYP_DRIFT_EXPLICIT ? "(all times)" : t,
                d->knot_pa[j] / 100.0, sqrt(d->cov[j * d->p + j]) / 100.0);
    }
    if (d->n_knots >= 2)
        fprintf(stderr, "            drift %+.3f hPa/h between the first and last knot\n",
                (d->knot_pa[d->n_knots - 1] - d->knot_pa[0]) / 100.0 / ((d->knot_s[d->n_knots - 1] - d->knot_s[0]) / 3600.0));
    if (d->has_scale)
        fprintf(stderr, "            column scale %+.3f %% +- %.3f %% (about %+.2f K on the column temperature)\n",
                100.0 * d->scale, 100.0 * d->scale_sigma, 100.0 * d->scale * 2.85);
    if (d->kind >= HYP_DRIFT_CONSTANT)
        fprintf(stderr, "            fit: chi-square %.2f on %zu degree(s) of freedom, condition %.1e%s\n", d->chi2, d->dof,
                d->condition, d->inflation > 1.0 ? ", covariance inflated to match the misfit" : "");
}

static void budget_row(const hyp_correct_result *r, size_t i, const char *label)
{
    fprintf(stderr, "            %-7s", label);
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(stderr, " %6.2f", r->budget_m[k][i]);
    fprintf(stderr, "  %6.2f\n", r->sigma_m[i]);
}

static void print_budget(const hyp_series *s, const hyp_correct_result *r)
{
    if (!r->n_ok)
        return;
    size_t *idx = malloc(r->n_ok * sizeof *idx), n = 0;
    if (!idx)
        return;
    for (size_t i = 0; i < r->count; i++)
        if (r->status[i] == HYP_PT_OK)
            idx[n++] = i;
    if (!n) {
        free(idx);
        return;
    }
    /* the median and the worst point by sigma */
    size_t worst = idx[0];
    for (size_t k = 0; k < n; k++)
        if (r->sigma_m[idx[k]] > r->sigma_m[worst])
            worst = idx[k];
    size_t med = idx[0];
    double *v = malloc(n * sizeof *v);
    if (v) {
        for (size_t k = 0; k < n; k++)
            v[k] = r->sigma_m[idx[k]];
        qsort(v, n, sizeof *v, cmp_d);
        for (size_t k = 0; k < n; k++)
            if (r->sigma_m[idx[k]] == v[n / 2])
                med = idx[k];
        fprintf(stderr, "  sigma     median %.2f m, largest %.2f m (1 sigma)\n", v[n / 2], v[n - 1]);
    }
    fprintf(stderr, "  budget    1 sigma, m:");
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(stderr, " %6s", hyp_budget_term_name((hyp_budget_term)k));
    fprintf(stderr, "   total\n");
    budget_row(r, med, "median");
    budget_row(r, worst, "worst");
    char t[40];
    hyp_time_format(s->time_s[worst], t, sizeof t);
    fprintf(stderr, "            (worst point: line %u, %s)\n", s->line[worst], t);
    free(v);
    free(idx);
}

static void print_weather(const hyp_correct_result *r, double rapid_pa_s)
{
    fprintf(stderr, "  weather   base pressure trend %+.3f hPa/h over the log; largest hourly tendency %.2f hPa/h\n",
            r->base_tendency_pa_s * 36.0, r->max_rate_pa_s * 36.0);
    for (size_t k = 0; k < r->n_rapid; k++) {
        char a[40], b[40];
        hyp_time_format(r->rapid[k].start_s, a, sizeof a);
        hyp_time_format(r->rapid[k].end_s, b, sizeof b);
        fprintf(stderr, "            rapid change (over %.1f hPa/h): %s to %s, up to %.2f hPa/h\n", rapid_pa_s * 36.0, a, b,
                r->rapid[k].max_rate_pa_s * 36.0);
    }
}

static void print_summary(const char *rover_path, const log_in *rv, const args *a, const log_in *bls,
                          const hyp_correct_result *r, double rapid_pa_s)
{
    char span[200];
    fprintf(stderr, "hypsolev correct: %s\n", rover_path);
    span_text(log_series(rv), span, sizeof span);
    fprintf(stderr, "  rover     %s; pressure in %s\n", span, hyp_unit_name(rv->punit));
    for (int k = 0; k < a->n_bases; k++) {
        const base_arg *ba = &a->bases[k];
        const log_in *bl = &bls[k];
        span_text(log_series(bl), span, sizeof span);
        fprintf(stderr, "  base      %s: %s; %s in %s\n", ba->path, span, ba->qnh ? "QNH" : "pressure", hyp_unit_name(bl->punit));
        fprintf(stderr, "            height %.3f m", ba->height_m);
        if (ba->lat_deg == ba->lat_deg)
            fprintf(stderr, ", at %.6f, %.6f deg", ba->lat_deg, ba->lon_deg);
        fprintf(stderr, ", clock offset %+.1f s applied", a->n_bases == 1 ? r->clock_applied_s : ba->clock_s);
        if (a->n_bases > 1)
            fprintf(stderr, ", instrument offset %+.3f hPa +- %.3f hPa", r->base_offset_pa[k] / 100.0,
                    r->base_offset_sigma_pa[k] / 100.0);
        fputc('\n', stderr);
    }
    const base_arg *ba = &a->bases[0];
    if (r->clock_est_ok)
        fprintf(stderr, "            clock offset estimated from the co-locations: %+.1f s +- %.1f s%s\n", r->clock_est_s,
                r->clock_est_sigma_s, ba->clock_s == r->clock_applied_s && !(r->clock_est_s == r->clock_applied_s) ? " (not applied; --base-clock-offset auto applies it)" : "");
    fprintf(stderr, "  method    %s\n", r->method);
    if (r->method_why[0])
        fprintf(stderr, "            chosen: %s%s\n", r->method_why,
                a->n_bases > 1 && !r->bases_compared ? "; the bases were never compared" : "");
    if (r->method_used == HYP_METHOD_TWO_BASE) {
        fprintf(stderr, "            column mean virtual temperature the bases imply %.2f degC", r->implied_tcol_k - 273.15);
        if (r->thermo_tcol_k == r->thermo_tcol_k)
            fprintf(stderr, ", the thermometers %.2f degC (difference %+.2f K)", r->thermo_tcol_k - 273.15,
                    r->implied_tcol_k - r->thermo_tcol_k);
        fprintf(stderr, "\n            %zu points extrapolated outside the bases' heights (flagged in the table)\n", r->n_extrapolated);
    }
    print_calibrations(r);
    print_drift(r);
    fprintf(stderr, "  noise     rover %.3f hPa, base %.3f hPa (1 sigma, estimated from the data)\n",
            r->rover_noise_pa / 100.0, r->base_noise_pa / 100.0);
    if (r->n_ok)
        fprintf(stderr, "  column    mean virtual temperature %.2f to %.2f degC\n", r->tcol_min_k - 273.15, r->tcol_max_k - 273.15);
    print_weather(r, rapid_pa_s);
    fprintf(stderr, "  heights   %zu of %zu corrected", r->n_ok, r->count);
    for (int s = 1; s < HYP_PT_STATUS_COUNT; s++)
        if (r->n_status[s])
            fprintf(stderr, "; %zu %s", r->n_status[s], hyp_point_status_text((hyp_point_status)s));
    fputc('\n', stderr);
    for (int f = 1; f < HYP_SAMPLE_FLAG_COUNT; f++)
        if (r->n_flag[f])
            fprintf(stderr, "            %zu dropped by the reader: %s\n", r->n_flag[f], hyp_sample_flag_text((hyp_sample_flag)f));
    print_budget(log_series(rv), r);
}

static void print_footer(const char *wrote)
{
    fprintf(stderr, "  wrote     %s\n", wrote);
    fprintf(stderr, "  (not for aviation or navigation; survey deliverables defer to local codes and licensed surveyors)\n");
}

static hyp_status parse_windows(args *a, const hyp_zone *z, hyp_window *w, hyp_error *err)
{
    for (int k = 0; k < a->n_colocate; k++) {
        char buf[128];
        snprintf(buf, sizeof buf, "%s", a->colocate_text[k]);
        char *slash = strchr(buf, '/');
        if (slash)
            *slash = '\0';
        if (!slash || hyp_time_parse(buf, z, &w[k].start_s) || hyp_time_parse(slash + 1, z, &w[k].end_s) ||
            !(w[k].end_s > w[k].start_s))
            return hyp_error_set(err, HYP_ERR_USAGE,
                                 "--colocate \"%s\": expected START/END, two ISO 8601 times with zone, END after START",
                                 a->colocate_text[k]);
    }
    a->copts.colocate = w;
    a->copts.n_colocate = (size_t)a->n_colocate;
    return HYP_OK;
}

static void stem_of(const char *path, char *out, size_t n)
{
    char tmp[4096];
    snprintf(tmp, sizeof tmp, "%s", path);
    const char *b = basename(tmp);
    snprintf(out, n, "%s", b);
    char *dot = strrchr(out, '.');
    if (dot && dot != out)
        *dot = '\0';
}

static int same_as_any_input(const args *a, const char *out)
{
    for (int i = 0; i < a->n_rovers; i++)
        if (hyp_same_file(a->rovers[i], out))
            return 1;
    for (int k = 0; k < a->n_bases; k++)
        if (hyp_same_file(a->bases[k].path, out))
            return 1;
    return 0;
}

static hyp_status write_outputs(const args *a, const char *rover_path, const log_in *rv,
                                const hyp_correct_result *res, const hyp_output_info *info,
                                char *wrote, size_t wn, hyp_error *err)
{
    char gpx_path[4096] = "", csv_path[4096] = "";
    if (a->out)
        snprintf(gpx_path, sizeof gpx_path, "%s", a->out);
    if (a->table)
        snprintf(csv_path, sizeof csv_path, "%s", a->table);
    if (a->out_dir) {
        char stem[1024];
        stem_of(rover_path, stem, sizeof stem);
        snprintf(gpx_path, sizeof gpx_path, "%s/%s.gpx", a->out_dir, stem);
        if (!a->table)
            snprintf(csv_path, sizeof csv_path, "%s/%s.csv", a->out_dir, stem);
    }
    const char *paths[2] = {gpx_path, csv_path};
    for (int k = 0; k < 2; k++)
        if (paths[k][0] && strcmp(paths[k], "-") != 0 && same_as_any_input(a, paths[k]))
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: output would overwrite an input; choose another name", paths[k]);
    for (int k = 0; k < 2; k++) {
        if (!paths[k][0] || strcmp(paths[k], "-") == 0)
            continue;
        struct stat sb;
        char dir[4096];
        snprintf(dir, sizeof dir, "%s", paths[k]);
        char *slash = strrchr(dir, '/');
        if (slash)
            *slash = '\0';
        if (stat(paths[k], &sb) == 0 && S_ISDIR(sb.st_mode))
            return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected an output file name", paths[k]);
        if (stat(slash ? (dir[0] ? dir : "/") : ".", &sb) != 0 || !S_ISDIR(sb.st_mode))
            return hyp_error_set(err, HYP_ERR_IO, "%s: cannot write: the directory does not exist", paths[k]);
    }
    /* All or nothing: each output goes to a staging name beside its target
     * (itself written through a temporary file), and only when every one is
     * complete are they renamed into place. */
    char stage[2][4200] = {"", ""};
    hyp_status st = HYP_OK;
    wrote[0] = '\0';
    for (int k = 0; k < 2; k++)
        if (paths[k][0] && strcmp(paths[k], "-") != 0)
            snprintf(stage[k], sizeof stage[k], "%s.new-%ld", paths[k], (long)getpid());
    if (gpx_path[0]) {
        char name[1024];
        stem_of(rover_path, name, sizeof name);
        st = rv->is_gpx ? hyp_gpx_write_spliced(rover_path, &rv->doc, res, info, stage[0], err)
                        : hyp_gpx_write_new(&rv->csv, res, info, name, stage[0], err);
    }
    if (!st && csv_path[0])
        st = hyp_table_write(log_series(rv), res, info, stage[1][0] ? stage[1] : "-", err);
    for (int k = 0; k < 2; k++) {
        if (!stage[k][0])
            continue;
        if (st) {
            unlink(stage[k]);
        } else if (rename(stage[k], paths[k]) != 0) {
            st = hyp_error_set(err, HYP_ERR_IO, "%s: cannot rename into place: %s", paths[k], strerror(errno));
            unlink(stage[k]);
        }
    }
    if (st)
        return st;
    if (gpx_path[0])
        snprintf(wrote, wn, "%s", gpx_path);
    if (csv_path[0]) {
        size_t l = strlen(wrote);
        snprintf(wrote + l, wn - l, "%s%s", l ? ", " : "", strcmp(csv_path, "-") ? csv_path : "(table on standard output)");
    }
    return HYP_OK;
}

/* Per-rover arrays beside the result: GNSS heights in the known and the
 * output reference, and projected positions. */
typedef struct extras {
    double *gnss_known, *gnss_out, *east, *north;
    char crs_name[256];
} extras;

static void extras_free(extras *x)
{
    free(x->gnss_known);
    free(x->gnss_out);
    free(x->east);
    free(x->north);
}

static hyp_status prepare_extras(args *a, const log_in *rv, extras *x, hyp_error *err)
{
    const hyp_series *s = log_series(rv);
    size_t n = s->count ? s->count : 1;
    memset(x, 0, sizeof *x);
    x->gnss_known = malloc(n * sizeof(double));
    x->gnss_out = malloc(n * sizeof(double));
    if (!x->gnss_known || !x->gnss_out)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    const double *gh = rv->is_gpx && rv->doc.has_geoidheight ? rv->doc.geoidheight_m : NULL;
    hyp_status st = hyp_track_heights(a->geo, s, gh, a->gnss_ref, a->known_ref, x->gnss_known, err);
    if (!st)
        st = hyp_track_heights(a->geo, s, gh, a->gnss_ref, a->out_ref, x->gnss_out, err);
    if (st || !a->crs)
        return st;
    double la = NAN, lo = NAN;
    for (size_t i = 0; i < s->count && la != la; i++)
        if (s->lat_deg[i] == s->lat_deg[i])
            la = s->lat_deg[i], lo = s->lon_deg[i];
    st = hyp_geo_set_crs(a->geo, a->crs, la, lo, x->crs_name, sizeof x->crs_name, err);
    if (st)
        return st;
    x->east = malloc(n * sizeof(double));
    x->north = malloc(n * sizeof(double));
    if (!x->east || !x->north)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < s->count; i++)
        if (hyp_geo_project(a->geo, s->lat_deg[i], s->lon_deg[i], &x->east[i], &x->north[i]))
            x->east[i] = x->north[i] = NAN;
    return HYP_OK;
}

static void print_heights(const args *a, const hyp_correct_result *res, const extras *x)
{
    fprintf(stderr, "  heights   in %s; known heights in %s; the track's own heights taken as %s\n",
            hyp_vref_name(a->out_ref), hyp_vref_name(a->known_ref), hyp_vref_name(a->gnss_ref));
    double m, sd;
    size_t k;
    hyp_diff_stats(x->gnss_out, res->height_m, res->count, &m, &sd, &k);
    if (k)
        fprintf(stderr, "  gnss      GNSS - corrected height: mean %+.2f m, standard deviation %.2f m over %zu points\n", m, sd, k);
    if (x->east)
        fprintf(stderr, "  crs       easting/northing in %s\n", x->crs_name);
}

static int correct_one(args *a, const char *rover_path, const log_in *bls, const hyp_zone *rz)
{
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    hyp_error err;
    hyp_error_clear(&err);
    log_in rv;
    extras x = {0};
    hyp_correct_result res;
    hyp_correct_result_init(&res);
    hyp_read_opts ro = a->ropts;
    ro.zone = rz;
    ro.need_position = 1;
    hyp_status st = read_log(rover_path, &ro, &rv, &msgs, &err);
    if (!st)
        st = prepare_extras(a, &rv, &x, &err);
    if (!st) {
        hyp_base bases[MAX_BASES];
        for (int k = 0; k < a->n_bases; k++) {
            const base_arg *ba = &a->bases[k];
            hyp_base_init(&bases[k], log_series(&bls[k]), ba->path, ba->height_m);
            bases[k].lat_deg = ba->lat_deg;
            bases[k].lon_deg = ba->lon_deg;
            bases[k].clock_offset_s = ba->clock_s;
            bases[k].offset_pa = ba->offset_pa;
            bases[k].offset_sigma_pa = ba->offset_sigma_pa;
            bases[k].kind = ba->qnh ? HYP_BASE_QNH : HYP_BASE_STATION;
        }
        hyp_correct_opts co = a->copts;
        co.waypoints = rv.is_gpx ? &rv.doc.wpts : NULL;
        co.gnss_height_m = x.gnss_known;
        st = hyp_correct(log_series(&rv), bases, (size_t)a->n_bases, &co, &res, &msgs, &err);
    }
    if (!st)
        st = hyp_heights_convert(a->geo, log_series(&rv), res.height_m, a->known_ref, a->out_ref, &err);
    char wrote[8300] = "";
    hyp_output_info info = {.vref = hyp_vref_name(a->out_ref), .gnss_m = x.gnss_out, .easting_m = x.east,
                            .northing_m = x.north, .crs_name = x.crs_name};
    if (!st)
        st = write_outputs(a, rover_path, &rv, &res, &info, wrote, sizeof wrote, &err);
    print_msgs(&msgs, a->quiet);
    if (!st && !a->quiet) {
        print_summary(rover_path, &rv, a, bls, &res, a->copts.rapid_pa_per_s);
        print_heights(a, &res, &x);
        print_footer(wrote);
    }
    if (st)
        fprintf(stderr, "hypsolev: error: %s\n", err.message);
    hyp_correct_result_free(&res);
    extras_free(&x);
    log_free(&rv);
    hyp_msgs_free(&msgs);
    return st == HYP_ERR_USAGE ? EXIT_USAGE : st ? EXIT_INPUT : 0;
}

/* The checks of "inspect" on a base log; its problems become warnings. */
static void warn_base_quality(const char *path, const hyp_series *s)
{
    hyp_inspection r;
    hyp_error err;
    if (hyp_inspect(s, NULL, &r, &err))
        return;
    size_t shown = 0;
    for (size_t i = 0; i < r.n_issues; i++) {
        if (r.issues[i].kind == HYP_ISSUE_RAPID)
            continue;   /* the summary's weather line reports those */
        if (shown++ < 10) {
            fprintf(stderr, "hypsolev: warning: %s: ", path);
            cli_print_issue(stderr, "", &r.issues[i]);
        }
    }
    if (shown > 10)
        fprintf(stderr, "hypsolev: warning: %s: %zu problems in all (hypsolev inspect lists them)\n", path, shown);
    hyp_inspection_free(&r);
}

static int make_zone(const char *text, const char *opt, hyp_zone *z)
{
    hyp_zone_init(z);
    if (!text)
        return 0;
    hyp_error err;
    if (hyp_zone_parse(z, text, NULL, &err)) {
        fprintf(stderr, "hypsolev correct: %s: %s\n", opt, err.message);
        return EXIT_USAGE;
    }
    return 0;
}

static int run(args *a)
{
    hyp_zone rz, bz;
    int rc = make_zone(a->rover_zone, "--time-zone", &rz);
    if (!rc)
        rc = make_zone(a->bases[0].zone, "--base-time-zone", &bz);
    else
        hyp_zone_init(&bz);
    hyp_window w[MAX_WINDOWS];
    hyp_error err;
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    log_in bls[MAX_BASES];
    for (int k = 0; k < MAX_BASES; k++) {
        hyp_gpx_doc_init(&bls[k].doc);
        hyp_series_init(&bls[k].csv);
    }
    if (!rc && parse_windows(a, &rz, w, &err)) {
        fprintf(stderr, "hypsolev correct: %s\n", err.message);
        rc = EXIT_USAGE;
    }
    if (!rc && hyp_geo_open(&a->geo, &err)) {
        fprintf(stderr, "hypsolev: error: %s\n", err.message);
        rc = EXIT_INPUT;
    }
    hyp_benchmarks bms;
    hyp_benchmarks_init(&bms);
    hyp_tie_spec *ties = NULL;
    size_t n_ties = 0;
    if (!rc && a->benchmarks_path) {
        if (hyp_benchmarks_read(a->benchmarks_path, a->benchmark_sigma_m, &bms, &msgs, &err)) {
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = EXIT_INPUT;
        } else
            a->copts.benchmarks = &bms;
    }
    if (!rc && a->ties_path) {
        if (hyp_ties_read(a->ties_path, &rz, a->copts.benchmarks, &ties, &n_ties, &err)) {
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = EXIT_INPUT;
        } else {
            a->copts.ties = ties;
            a->copts.n_ties = n_ties;
        }
    }
    if (!rc && a->bases_coloc_text) {
        hyp_window bw[1];
        const char *saved[1] = {a->colocate_text[0]};
        int n = a->n_colocate;
        a->colocate_text[0] = a->bases_coloc_text;
        a->n_colocate = 1;
        hyp_correct_opts keep = a->copts;
        if (parse_windows(a, &rz, bw, &err)) {
            fprintf(stderr, "hypsolev correct: --bases-colocated: %s\n", err.message);
            rc = EXIT_USAGE;
        }
        a->copts = keep;
        a->colocate_text[0] = saved[0];
        a->n_colocate = n;
        a->copts.base_colocate = bw[0];
    }
    for (int k = 0; !rc && k < a->n_bases; k++) {
        hyp_zone kz;
        hyp_zone_init(&kz);
        if (make_zone(a->bases[k].zone, "--base-time-zone", &kz)) {
            rc = EXIT_USAGE;
            break;
        }
        hyp_read_opts ro = a->ropts;
        ro.zone = &kz;
        ro.need_position = 0;
        if (a->bases[k].qnh)
            ro.pressure_unit = ro.pressure_unit ? ro.pressure_unit : HYP_UNIT_HPA;
        if (read_log(a->bases[k].path, &ro, &bls[k], &msgs, &err)) {
            print_msgs(&msgs, a->quiet);
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = EXIT_INPUT;
        } else {
            print_msgs(&msgs, a->quiet);
            warn_base_quality(a->bases[k].path, log_series(&bls[k]));
        }
        hyp_msgs_free(&msgs);
        hyp_msgs_init(&msgs);
        hyp_zone_free(&kz);
    }
    /* One rover's failure is reported and the others still run; the exit
     * status is the worst of them. */
    int base_ok = rc == 0;
    for (int i = 0; base_ok && i < a->n_rovers; i++) {
        int r = correct_one(a, a->rovers[i], bls, &rz);
        if (r > rc)
            rc = r;
    }
    for (int k = 0; k < MAX_BASES; k++)
        log_free(&bls[k]);
    hyp_geo_close(a->geo);
    a->geo = NULL;
    hyp_benchmarks_free(&bms);
    free(ties);
    hyp_msgs_free(&msgs);
    hyp_zone_free(&rz);
    hyp_zone_free(&bz);
    return rc;
}

int cmd_correct(int argc, char **argv)
{
    args a;
    int rc = parse_args(&a, argc, argv);
    if (rc == 0)
        rc = run(&a);
    else if (rc < 0)
        rc = 0;
    free(a.rovers);
    return rc;
}
