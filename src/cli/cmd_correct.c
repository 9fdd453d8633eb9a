/* cmd_correct.c - "hypsolev correct": reads the logs, calls the library's
 * correction, writes the outputs, prints the run summary on stderr. */
#define _GNU_SOURCE
#include "batch.h"
#include "cli.h"
#include "hypsolev/hypsolev.h"

#include <dirent.h>
#include <errno.h>
#include <glob.h>
#include <getopt.h>
#include <libgen.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>

#include <libxml/parser.h>

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
    int rover_threads;   /* threads inside one rover's correction and writing */
    const char *benchmarks_path, *ties_path, *crs, *bases_coloc_text;
    const char *base_dir, *summary_path, *report_path;
    int jobs, progress, overwrite;
    char **owned;          /* rover paths found in folders or by patterns */
    int n_owned;
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
"batch:\n"
"  ROVER may be a folder (its .gpx and .csv files) or a quoted pattern\n"
"  --base-dir DIR           base logs listed in DIR/bases.csv (file, height, lat,\n"
"                           lon, clock_offset, kind); each rover gets the logs\n"
"                           that cover its time span\n"
"  -j, --jobs N             threads in all (default: the number of cores): one\n"
"                           rover per thread, and a single rover uses them all\n"
"  --summary FILE           one row per rover (.json for JSON, else CSV)\n"
"  --progress               progress on stderr even when it is not a terminal\n"
"  --overwrite              replace existing outputs (default: skip those rovers)\n"
"\n"
"outputs (at least one):\n"
"  -o, --output FILE        corrected GPX (one rover only)\n"
"  --out-dir DIR            DIR/NAME.gpx and DIR/NAME.csv for each rover NAME.*\n"
"  --table FILE             per-sample table (CSV); - is standard output\n"
"  --report FILE            the run's report (messages and summary) as a text\n"
"                           file; with --out-dir always DIR/NAME.report.txt\n"
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
    O_OUT_REF, O_CRS, O_NO_ANCHOR, O_BASE_OFF, O_BASE_OFF_SIG, O_BASE_QNH, O_BASES_COLOC, O_METHOD,
    O_BASE_DIR, O_SUMMARY, O_PROGRESS, O_OVERWRITE, O_REPORT
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
    {"base-dir", required_argument, 0, O_BASE_DIR},
    {"jobs", required_argument, 0, 'j'},
    {"summary", required_argument, 0, O_SUMMARY},
    {"progress", no_argument, 0, O_PROGRESS},
    {"overwrite", no_argument, 0, O_OVERWRITE},
    {"report", required_argument, 0, O_REPORT},
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
    case O_BASE_DIR: a->base_dir = arg; return 0;
    case O_SUMMARY: a->summary_path = arg; return 0;
    case O_PROGRESS: a->progress = 1; return 0;
    case O_OVERWRITE: a->overwrite = 1; return 0;
    case O_REPORT: a->report_path = arg; return 0;
    case 'j': {
        double j;
        if (num_opt("--jobs", arg, 1, 256, &j))
            return EXIT_USAGE;
        a->jobs = (int)j;
        return 0;
    }
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

static int same_as_any_input(const args *a, const char *out);

/* An existing target that is not a regular file (/dev/null, a pipe): it is
 * written as it is, never replaced by a renamed file. */
static int is_special(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0 && !S_ISREG(st.st_mode) && !S_ISDIR(st.st_mode);
}

static int check_args(args *a)
{
    if (a->n_rovers == 0)
        return usage_error("no rover file given");
    if (a->n_bases == 0 && !a->base_dir)
        return usage_error("no --base or --base-dir given: a base station's pressure log is needed");
    if (a->n_bases && a->base_dir)
        return usage_error("--base and --base-dir both given; choose one");
    for (int k = 0; k < a->n_bases; k++)
        if (a->bases[k].height_m != a->bases[k].height_m)
            return usage_error("--base %s has no --base-height", a->bases[k].path);
    if (!a->out && !a->out_dir && !a->table)
        return usage_error("no output: give -o FILE.gpx, --out-dir DIR or --table FILE");
    if (a->out && a->n_rovers > 1)
        return usage_error("-o names one output but %s rovers are given; use --out-dir", "several");
    if (a->out && a->out_dir)
        return usage_error("-o and --out-dir both given; choose one");
    const char *named[4] = {a->summary_path, a->report_path, a->out, a->table};
    for (int k = 0; k < 4; k++)
        if (named[k] && strcmp(named[k], "-") != 0 && same_as_any_input(a, named[k]))
            return usage_error("%s: %s would overwrite an input; choose another name", named[k],
                               k == 0 ? "--summary" : k == 1 ? "--report" : k == 2 ? "-o" : "--table");
    if (a->report_path && a->n_rovers > 1)
        return usage_error("--report names one file but several rovers are given; --out-dir writes one report per rover");
    if (a->table && a->n_rovers > 1 && strcmp(a->table, "-") != 0)
        return usage_error("--table names one file but several rovers are given; use --out-dir (it writes one table per rover)");
    return 0;
}

static int cmp_str(const void *x, const void *y)
{
    return strcmp(*(char *const *)x, *(char *const *)y);
}

static int own(args *a, const char *path)
{
    char **p = realloc(a->owned, (size_t)(a->n_owned + 1) * sizeof *p);
    if (p)
        a->owned = p;
    if (!p || !(a->owned[a->n_owned] = strdup(path))) {
        fprintf(stderr, "hypsolev: error: out of memory\n");
        return -1;
    }
    a->n_owned++;
    return 0;
}

static int ends_with(const char *s, const char *e)
{
    size_t n = strlen(s), m = strlen(e);
    return n >= m && strcasecmp(s + n - m, e) == 0;
}

/* Folders become their .gpx and .csv files, quoted patterns their matches
 * (sorted, so that runs are repeatable); plain files stay as given. */
static int expand_rovers(args *a)
{
    for (int i = 0; i < a->n_rovers; i++) {
        const char *r = a->rovers[i];
        struct stat st;
        int start = a->n_owned;
        if (stat(r, &st) == 0 && S_ISDIR(st.st_mode)) {
            DIR *d = opendir(r);
            struct dirent *e;
            while (d && (e = readdir(d))) {
                if (e->d_name[0] == '.' || !(ends_with(e->d_name, ".gpx") || ends_with(e->d_name, ".csv")))
                    continue;
                char p[4096];
                snprintf(p, sizeof p, "%s/%s", r, e->d_name);
                if (own(a, p))
                    return EXIT_INPUT;
            }
            if (d)
                closedir(d);
            if (a->n_owned == start) {
                fprintf(stderr, "hypsolev correct: %s: a folder with no .gpx or .csv file\n", r);
                return EXIT_INPUT;
            }
        } else if (strpbrk(r, "*?[") && stat(r, &st) != 0) {
            glob_t g;
            if (glob(r, 0, NULL, &g) != 0 || g.gl_pathc == 0) {
                fprintf(stderr, "hypsolev correct: %s: no file matches\n", r);
                return EXIT_INPUT;
            }
            for (size_t k = 0; k < g.gl_pathc; k++)
                if (own(a, g.gl_pathv[k]))
                    return EXIT_INPUT;
            globfree(&g);
        } else if (own(a, r))
            return EXIT_INPUT;
        qsort(a->owned + start, (size_t)(a->n_owned - start), sizeof *a->owned, cmp_str);
    }
    a->n_rovers = a->n_owned;
    return 0;
}

static int parse_args(args *a, int argc, char **argv)
{
    memset(a, 0, sizeof *a);
    hyp_read_opts_init(&a->ropts);
    hyp_correct_opts_init(&a->copts);
    a->benchmark_sigma_m = 0.01;
    a->rovers = calloc((size_t)argc, sizeof *a->rovers);
    if (!a->rovers) {
        fprintf(stderr, "hypsolev: error: out of memory\n");
        return EXIT_INPUT;
    }
    opterr = 0;
    optind = 1;
    int c;
    /* "-" first: positional arguments are returned in order as 1, so the
     * per-base options keep their place after their --base. */
    while ((c = getopt_long(argc, argv, "-o:qj:", longopts, NULL)) != -1) {
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
    int r = expand_rovers(a);
    return r ? r : check_args(a);
}

/* Where a rover's messages and summary go: stderr, or a worker's buffer
 * that is printed whole when its rover is done (so that parallel rovers
 * do not interleave). */
static _Thread_local FILE *tl_out;

static FILE *cli_out(void)
{
    return tl_out ? tl_out : stderr;
}

static void print_msgs(const hyp_msgs *m, int quiet)
{
    for (size_t i = 0; i < m->count; i++) {
        if (quiet && m->items[i].level == HYP_NOTE)
            continue;
        fprintf(cli_out(), "hypsolev: %s: %s\n", m->items[i].level == HYP_WARNING ? "warning" : "note", m->items[i].text);
    }
    if (m->dropped)
        fprintf(cli_out(), "hypsolev: %zu more messages not shown\n", m->dropped);
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

static const char *how_text(hyp_calib_how h)
{
    return h == HYP_HOW_POSITION ? "found from positions" : h == HYP_HOW_WAYPOINT ? "waypoint" : "given";
}

static void print_calibrations(const hyp_correct_result *r)
{
    if (!r->n_calibs)
        return;
    fprintf(cli_out(), "  ties      %zu calibration(s); misclosure = height before adjustment - known, residual = after\n", r->n_calibs);
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        char a[40], b[40];
        hyp_time_format(c->start_s, a, sizeof a);
        hyp_time_format(c->end_s, b, sizeof b);
        fprintf(cli_out(), "            %-10s %s to %s, %zu samples (%s): known %.3f m +- %.3f m, misclosure %+.3f m, residual %+.3f m, offset %+.3f hPa\n",
                c->name, a, b + 11, c->n, how_text(c->how), c->known_m, c->known_sigma_m, c->misclosure_m,
                c->residual_m, c->offset_pa / 100.0);
    }
}

static void print_drift(const hyp_correct_result *r)
{
    const hyp_drift *d = &r->drift;
    fprintf(cli_out(), "  offset    %s\n", d->note);
    if (d->kind == HYP_DRIFT_NONE)
        return;
    for (size_t j = 0; j < d->n_knots; j++) {
        char t[40];
        hyp_time_format(d->knot_s[j], t, sizeof t);
        fprintf(cli_out(), "            %s %+.3f hPa +- %.3f hPa\n", d->kind == HYP_DRIFT_EXPLICIT ? "(all times)" : t,
                d->knot_pa[j] / 100.0, sqrt(d->cov[j * d->p + j]) / 100.0);
    }
    if (d->n_knots >= 2)
        fprintf(cli_out(), "            drift %+.3f hPa/h between the first and last knot\n",
                (d->knot_pa[d->n_knots - 1] - d->knot_pa[0]) / 100.0 / ((d->knot_s[d->n_knots - 1] - d->knot_s[0]) / 3600.0));
    if (d->has_scale)
        fprintf(cli_out(), "            column scale %+.3f %% +- %.3f %% (about %+.2f K on the column temperature)\n",
                100.0 * d->scale, 100.0 * d->scale_sigma, 100.0 * d->scale * 2.85);
    if (d->kind >= HYP_DRIFT_CONSTANT)
        fprintf(cli_out(), "            fit: chi-square %.2f on %zu degree(s) of freedom, condition %.1e%s\n", d->chi2, d->dof,
                d->condition, d->inflation > 1.0 ? ", covariance inflated to match the misfit" : "");
}

static void budget_row(const hyp_correct_result *r, size_t i, const char *label)
{
    hyp_point_detail d;
    if (hyp_correct_point(r, i, &d) != HYP_OK)
        return;
    fprintf(cli_out(), "            %-7s", label);
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(cli_out(), " %6.2f", d.budget_m[k]);
    fprintf(cli_out(), "  %6.2f\n", d.sigma_m);
}

static void print_budget(const hyp_series *s, const hyp_correct_result *r)
{
    if (!r->n_ok || r->median_index == SIZE_MAX)
        return;
    /* the points with the median and the largest sigma */
    size_t med = r->median_index, worst = r->worst_index;
    fprintf(cli_out(), "  sigma     median %.2f m, largest %.2f m (1 sigma)\n", r->median_sigma_m, (double)r->sigma_m[worst]);
    fprintf(cli_out(), "  budget    1 sigma, m:");
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(cli_out(), " %6s", hyp_budget_term_name((hyp_budget_term)k));
    fprintf(cli_out(), "   total\n");
    budget_row(r, med, "median");
    budget_row(r, worst, "worst");
    char t[40];
    hyp_time_format(s->time_s[worst], t, sizeof t);
    fprintf(cli_out(), "            (worst point: line %u, %s)\n", (unsigned)hyp_series_line(s, worst), t);
    fprintf(cli_out(), "            noise: sensors; fit: offset, drift and scale model; tcol: column temperature;\n"
                       "            rh: humidity; interp: base interpolation; clock: base clock; horiz: pressure gradient\n");
}

static void print_weather(const hyp_correct_result *r, double rapid_pa_s)
{
    fprintf(cli_out(), "  weather   base pressure trend %+.3f hPa/h over the log; largest hourly tendency %.2f hPa/h\n",
            r->base_tendency_pa_s * 36.0, r->max_rate_pa_s * 36.0);
    for (size_t k = 0; k < r->n_rapid; k++) {
        char a[40], b[40];
        hyp_time_format(r->rapid[k].start_s, a, sizeof a);
        hyp_time_format(r->rapid[k].end_s, b, sizeof b);
        fprintf(cli_out(), "            rapid change (over %.1f hPa/h): %s to %s, up to %.2f hPa/h\n", rapid_pa_s * 36.0, a, b,
                r->rapid[k].max_rate_pa_s * 36.0);
    }
}

static void print_summary(const char *rover_path, const log_in *rv, const args *a, const log_in *bls,
                          const hyp_correct_result *r, double rapid_pa_s)
{
    char span[200];
    fprintf(cli_out(), "hypsolev correct: %s\n", rover_path);
    span_text(log_series(rv), span, sizeof span);
    fprintf(cli_out(), "  rover     %s; pressure in %s\n", span, hyp_unit_name(rv->punit));
    for (int k = 0; k < a->n_bases; k++) {
        const base_arg *ba = &a->bases[k];
        const log_in *bl = &bls[k];
        span_text(log_series(bl), span, sizeof span);
        fprintf(cli_out(), "  base      %s: %s; %s in %s\n", ba->path, span, ba->qnh ? "QNH" : "pressure", hyp_unit_name(bl->punit));
        fprintf(cli_out(), "            height %.3f m", ba->height_m);
        if (ba->lat_deg == ba->lat_deg)
            fprintf(cli_out(), ", at %.6f, %.6f deg", ba->lat_deg, ba->lon_deg);
        fprintf(cli_out(), ", clock offset %+.1f s applied", a->n_bases == 1 ? r->clock_applied_s : ba->clock_s);
        if (a->n_bases > 1)
            fprintf(cli_out(), ", instrument offset %+.3f hPa +- %.3f hPa", r->base_offset_pa[k] / 100.0,
                    r->base_offset_sigma_pa[k] / 100.0);
        fputc('\n', cli_out());
    }
    const base_arg *ba = &a->bases[0];
    if (r->clock_est_ok)
        fprintf(cli_out(), "            clock offset estimated from the co-locations: %+.1f s +- %.1f s%s\n", r->clock_est_s,
                r->clock_est_sigma_s, ba->clock_s == r->clock_applied_s && !(r->clock_est_s == r->clock_applied_s) ? " (not applied; --base-clock-offset auto applies it)" : "");
    fprintf(cli_out(), "  method    %s\n", r->method);
    if (r->method_why[0])
        fprintf(cli_out(), "            chosen: %s%s\n", r->method_why,
                a->n_bases > 1 && !r->bases_compared ? "; the bases were never compared" : "");
    if (r->method_used == HYP_METHOD_TWO_BASE) {
        fprintf(cli_out(), "            column mean virtual temperature the bases imply %.2f degC", r->implied_tcol_k - 273.15);
        if (r->thermo_tcol_k == r->thermo_tcol_k)
            fprintf(cli_out(), ", the thermometers %.2f degC (difference %+.2f K)", r->thermo_tcol_k - 273.15,
                    r->implied_tcol_k - r->thermo_tcol_k);
        fprintf(cli_out(), "\n            %zu points extrapolated outside the bases' heights (flagged in the table)\n", r->n_extrapolated);
    }
    print_calibrations(r);
    print_drift(r);
    fprintf(cli_out(), "  noise     rover %.3f hPa, base %.3f hPa (1 sigma, estimated from the data)\n",
            r->rover_noise_pa / 100.0, r->base_noise_pa / 100.0);
    if (r->n_ok)
        fprintf(cli_out(), "  column    mean virtual temperature %.2f to %.2f degC\n", r->tcol_min_k - 273.15, r->tcol_max_k - 273.15);
    print_weather(r, rapid_pa_s);
    fprintf(cli_out(), "  heights   %zu of %zu corrected", r->n_ok, r->count);
    for (int s = 1; s < HYP_PT_STATUS_COUNT; s++)
        if (r->n_status[s])
            fprintf(cli_out(), "; %zu %s", r->n_status[s], hyp_point_status_text((hyp_point_status)s));
    fputc('\n', cli_out());
    for (int f = 1; f < HYP_SAMPLE_FLAG_COUNT; f++)
        if (r->n_flag[f])
            fprintf(cli_out(), "            %zu dropped by the reader: %s\n", r->n_flag[f], hyp_sample_flag_text((hyp_sample_flag)f));
    print_budget(log_series(rv), r);
}

static void print_footer(const char *wrote)
{
    fprintf(cli_out(), "  wrote     %s\n", wrote);
    fprintf(cli_out(), "  (not for aviation or navigation; survey deliverables defer to local codes and licensed surveyors)\n");
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
        if (hyp_same_file(a->owned[i], out))
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
    if (!a->overwrite && a->out_dir)
        for (int k = 0; k < 2; k++) {
            struct stat sb;
            if (paths[k][0] && strcmp(paths[k], "-") != 0 && stat(paths[k], &sb) == 0)
                return hyp_error_set(err, HYP_OK, "%s exists (--overwrite replaces it)", paths[k]);
        }
    /* All or nothing: each output goes to a staging name beside its target
     * (itself written through a temporary file), and only when every one is
     * complete are they renamed into place. */
    char stage[2][4200] = {"", ""};
    hyp_status st = HYP_OK;
    wrote[0] = '\0';
    for (int k = 0; k < 2; k++)
        if (paths[k][0] && strcmp(paths[k], "-") != 0 && !is_special(paths[k]))
            snprintf(stage[k], sizeof stage[k], "%s.new-%ld", paths[k], (long)getpid());
    if (gpx_path[0]) {
        char name[1024];
        stem_of(rover_path, name, sizeof name);
        const char *to = stage[0][0] ? stage[0] : gpx_path;
        st = rv->is_gpx ? hyp_gpx_write_spliced(rover_path, &rv->doc, res, info, to, err)
                        : hyp_gpx_write_new(&rv->csv, res, info, name, to, err);
    }
    if (!st && csv_path[0])
        st = hyp_table_write(log_series(rv), res, info, stage[1][0] ? stage[1] : csv_path, err);
    if (!st && cli_cancelled())
        st = hyp_error_set(err, HYP_ERR_IO, "interrupted: nothing written");
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
    const float *gnss_known, *gnss_out;   /* the track's own heights when no
                                             conversion is needed, else own_* */
    float *own_known, *own_out;           /* heights to about 1 mm (float) */
    double *east, *north;
    char crs_name[256];
} extras;

static void extras_free(extras *x)
{
    free(x->own_known);
    free(x->own_out);
    free(x->east);
    free(x->north);
}

/* The track's heights in reference `to`: the series' own array when they
 * are in it already (no copy), else a converted copy in *own. */
static hyp_status track_heights(args *a, const log_in *rv, hyp_vref to, const float **out, float **own, hyp_error *err)
{
    const hyp_series *s = log_series(rv);
    if (to == a->gnss_ref) {
        *out = s->ele_m;
        return HYP_OK;
    }
    if (!(*own = malloc((s->count ? s->count : 1) * sizeof(float))))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    *out = *own;
    const double *gh = rv->is_gpx && rv->doc.has_geoidheight ? rv->doc.geoidheight_m : NULL;
    return hyp_track_heights(a->geo, s, gh, a->gnss_ref, to, *own, err);
}

static hyp_status prepare_extras(args *a, const log_in *rv, extras *x, hyp_error *err)
{
    const hyp_series *s = log_series(rv);
    size_t n = s->count ? s->count : 1;
    memset(x, 0, sizeof *x);
    hyp_status st = track_heights(a, rv, a->known_ref, &x->gnss_known, &x->own_known, err);
    if (!st && a->out_ref == a->known_ref)
        x->gnss_out = x->gnss_known;   /* the same heights: one array */
    else if (!st)
        st = track_heights(a, rv, a->out_ref, &x->gnss_out, &x->own_out, err);
    if (st || !a->crs)
        return st;
    double la = NAN, lo = NAN;
    for (size_t i = 0; i < s->count && la != la; i++)
        if (hyp_series_lat(s, i) == hyp_series_lat(s, i))
            la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
    st = hyp_geo_set_crs(a->geo, a->crs, la, lo, x->crs_name, sizeof x->crs_name, err);
    if (st)
        return st;
    x->east = malloc(n * sizeof(double));
    x->north = malloc(n * sizeof(double));
    if (!x->east || !x->north)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < s->count; i++)
        if (hyp_geo_project(a->geo, hyp_series_lat(s, i), hyp_series_lon(s, i), &x->east[i], &x->north[i]))
            x->east[i] = x->north[i] = NAN;
    return HYP_OK;
}

static void print_heights(const args *a, const hyp_correct_result *res, const extras *x)
{
    fprintf(cli_out(), "  heights   in %s; known heights in %s; the track's own heights taken as %s\n",
            hyp_vref_name(a->out_ref), hyp_vref_name(a->known_ref), hyp_vref_name(a->gnss_ref));
    double m, sd;
    size_t k;
    hyp_diff_stats(x->gnss_out, res->height_m, res->count, &m, &sd, &k);
    if (k)
        fprintf(cli_out(), "  gnss      GNSS - corrected height: mean %+.2f m, standard deviation %.2f m over %zu points\n", m, sd, k);
    if (x->east)
        fprintf(cli_out(), "  crs       easting/northing in %s\n", x->crs_name);
}

/* The bases a rover uses: all given with --base, or from --base-dir those
 * whose logs cover at least 95 % of the rover's time span. */
static int select_bases(const args *a, const hyp_series *rv, const base_arg *pool, const log_in *logs, int n,
                        int *sel, hyp_error *err)
{
    if (!a->base_dir) {
        for (int k = 0; k < n; k++)
            sel[k] = k;
        return n;
    }
    double t0 = NAN, t1 = NAN;
    for (size_t i = 0; i < rv->count; i++)
        if (!rv->flag[i]) {
            if (t0 != t0)
                t0 = rv->time_s[i];
            t1 = rv->time_s[i];
        }
    int m = 0;
    for (int k = 0; k < n && m < MAX_BASES; k++) {
        const hyp_series *b = log_series(&logs[k]);
        double b0 = NAN, b1 = NAN;
        for (size_t i = 0; i < b->count; i++)
            if (!b->flag[i]) {
                if (b0 != b0)
                    b0 = b->time_s[i] - pool[k].clock_s;
                b1 = b->time_s[i] - pool[k].clock_s;
            }
        double cover = fmin(t1, b1) - fmax(t0, b0);
        if (t1 > t0 ? cover >= 0.95 * (t1 - t0) : (t0 >= b0 && t0 <= b1))
            sel[m++] = k;
    }
    if (m == 0) {
        char x[40], y[40];
        hyp_time_format(t0, x, sizeof x);
        hyp_time_format(t1, y, sizeof y);
        hyp_error_set(err, HYP_ERR_NODATA, "no base log in %s covers the track's %s to %s", a->base_dir, x, y);
    }
    return m;
}

static void fill_result(cli_job_result *jr, const hyp_series *s, const hyp_correct_result *res)
{
    jr->points = s->count;
    jr->corrected = res->n_ok;
    jr->ties = res->n_calibs;
    snprintf(jr->method, sizeof jr->method, "%s", hyp_method_name(res->method_used ? res->method_used : HYP_METHOD_SINGLE));
    jr->median_sigma_m = res->median_sigma_m;
}

static int correct_one(const args *a0, const char *rover_path, const base_arg *pool, const log_in *pool_logs, int pool_n,
                       const hyp_zone *rz, cli_job_result *jr)
{
    args *a = malloc(sizeof *a);   /* this rover's view of the options: its bases, its PROJ */
    if (!a) {
        snprintf(jr->status, sizeof jr->status, "out of memory");
        fprintf(cli_out(), "hypsolev: error: %s: out of memory\n", rover_path);
        return EXIT_INPUT;
    }
    *a = *a0;
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
    log_in bls[MAX_BASES];
    hyp_status st = hyp_geo_open(&a->geo, &err);
    if (!st)
        st = read_log(rover_path, &ro, &rv, &msgs, &err);
    else
        hyp_gpx_doc_init(&rv.doc), hyp_series_init(&rv.csv);
    int sel[MAX_BASES];
    if (!st) {
        int m = select_bases(a, log_series(&rv), pool, pool_logs, pool_n, sel, &err);
        if (m == 0)
            st = HYP_ERR_NODATA;
        a->n_bases = m;
        for (int k = 0; k < m; k++)
            a->bases[k] = pool[sel[k]], bls[k] = pool_logs[sel[k]];
    }
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
        co.threads = a->rover_threads;
        st = hyp_correct(log_series(&rv), bases, (size_t)a->n_bases, &co, &res, &msgs, &err);
    }
    if (!st)
        st = hyp_heights_convert(a->geo, log_series(&rv), res.height_m, a->known_ref, a->out_ref, &err);
    char wrote[8300] = "";
    hyp_output_info info = {.vref = hyp_vref_name(a->out_ref), .gnss_m = x.gnss_out, .easting_m = x.east,
                            .northing_m = x.north, .crs_name = x.crs_name, .threads = a->rover_threads};
    err.status = HYP_ERR_IO;
    if (!st) {
        st = write_outputs(a, rover_path, &rv, &res, &info, wrote, sizeof wrote, &err);
        if (!st && err.status == HYP_OK && err.message[0]) {   /* skipped: the output exists */
            snprintf(jr->status, sizeof jr->status, "skipped: %s", err.message);
            fprintf(cli_out(), "hypsolev: %s: skipped: %s\n", rover_path, err.message);
            fill_result(jr, log_series(&rv), &res);
            goto done;
        }
    }
    print_msgs(&msgs, a->quiet);
    if (!st && !a->quiet) {
        print_summary(rover_path, &rv, a, bls, &res, a->copts.rapid_pa_per_s);
        print_heights(a, &res, &x);
        print_footer(wrote);
    }
    if (st)
        fprintf(cli_out(), "hypsolev: error: %s%s%s\n", strstr(err.message, rover_path) ? "" : rover_path,
                strstr(err.message, rover_path) ? "" : ": ", err.message);
    if (!st)
        fill_result(jr, log_series(&rv), &res);
    else
        jr->points = rv.is_gpx ? rv.doc.pts.count : rv.csv.count;
    snprintf(jr->status, sizeof jr->status, "%s", st ? err.message : "ok");
done:
    hyp_correct_result_free(&res);
    extras_free(&x);
    log_free(&rv);
    hyp_msgs_free(&msgs);
    hyp_geo_close(a->geo);
    free(a);
    return st == HYP_ERR_USAGE ? EXIT_USAGE : st ? EXIT_INPUT : 0;
}

typedef struct batch_ctx {
    const args *a;
    const base_arg *pool;
    const log_in *logs;
    int n_pool;
    const hyp_zone *rz;
} batch_ctx;

/* The run's report of one rover (its messages and summary, as printed),
 * kept beside its outputs for auditing: --report FILE, or DIR/NAME.report.txt
 * with --out-dir. Written through a temporary file and renamed; not after an
 * interruption, and not for a rover that was skipped. */
static void write_report(const args *a, const char *rover, const char *text, size_t len, const cli_job_result *jr)
{
    char path[4200];
    if (a->report_path)
        snprintf(path, sizeof path, "%s", a->report_path);
    else if (a->out_dir) {
        char stem[1024];
        stem_of(rover, stem, sizeof stem);
        snprintf(path, sizeof path, "%s/%s.report.txt", a->out_dir, stem);
    } else
        return;
    if (cli_cancelled() || !strncmp(jr->status, "skipped", 7))
        return;
    if (same_as_any_input(a, path)) {
        fprintf(stderr, "hypsolev: error: %s: the report would overwrite an input; not written\n", path);
        return;
    }
    char tmp[4300];
    int direct = is_special(path);
    snprintf(tmp, sizeof tmp, "%s.tmp-%ld", path, (long)getpid());
    FILE *f = fopen(direct ? path : tmp, "w");
    if (!f) {
        fprintf(stderr, "hypsolev: warning: %s: cannot write the report: %s\n", path, strerror(errno));
        return;
    }
    int bad = fwrite(text, 1, len, f) != len;
    bad |= fclose(f) != 0;
    if (!direct && (bad || rename(tmp, path) != 0)) {
        unlink(tmp);
        fprintf(stderr, "hypsolev: warning: %s: the report could not be written\n", path);
    }
}

/* In quiet mode stderr gets only the warnings and errors of a rover's
 * text (the report keeps all of it). */
static void emit_quiet(const char *buf, size_t len)
{
    const char *p = buf, *end = buf + len;
    while (p < end) {
        const char *nl = memchr(p, '\n', (size_t)(end - p));
        size_t l = nl ? (size_t)(nl - p + 1) : (size_t)(end - p);
        if (!strncmp(p, "hypsolev: warning", 17) || !strncmp(p, "hypsolev: error", 15) || memmem(p, l, ": skipped: ", 11))
            cli_emit(p, l);
        p += l;
    }
}

static void run_job(void *vctx, int i, cli_job_result *jr)
{
    const batch_ctx *c = vctx;
    jr->median_sigma_m = NAN;
    char *buf = NULL;
    size_t len = 0;
    int report = c->a->report_path || c->a->out_dir;
    args *full = NULL;
    const args *a = c->a;
    if (report && c->a->quiet && (full = malloc(sizeof *full))) {
        *full = *c->a;     /* the report holds the whole summary even with -q */
        full->quiet = 0;
        a = full;
    }
    tl_out = open_memstream(&buf, &len);
    jr->rc = correct_one(a, c->a->owned[i], c->pool, c->logs, c->n_pool, c->rz, jr);
    if (tl_out) {
        fclose(tl_out);
        tl_out = NULL;
        if (c->a->quiet)
            emit_quiet(buf, len);
        else
            cli_emit(buf, len);
        if (report)
            write_report(c->a, c->a->owned[i], buf, len, jr);
    }
    free(full);
    free(buf);
}

static void csv_field(FILE *f, const char *s)
{
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"')
            fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

static void json_string(FILE *f, const char *s)
{
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"' || *s == '\\')
            fputc('\\', f);
        if ((unsigned char)*s < 0x20)
            fprintf(f, "\\u%04x", *s);
        else
            fputc(*s, f);
    }
    fputc('"', f);
}

/* The run's table: on stderr, and as CSV or JSON in --summary (written to
 * a temporary file and renamed). */
static int write_summary(const args *a, const cli_job_result *r, int n)
{
    if (n > 1) {
        fprintf(stderr, "hypsolev correct: %d files\n  %-40s %9s %9s  %-14s %4s %8s  %s\n", n, "file", "points",
                "corrected", "method", "ties", "sigma", "status");
        for (int i = 0; i < n; i++)
            fprintf(stderr, "  %-40s %9zu %9zu  %-14s %4zu %6.2f m  %.80s\n", a->owned[i], r[i].points, r[i].corrected,
                    r[i].method[0] ? r[i].method : "-", r[i].ties, r[i].median_sigma_m, r[i].status);
    }
    if (!a->summary_path)
        return 0;
    if (same_as_any_input(a, a->summary_path)) {
        fprintf(stderr, "hypsolev: error: %s: --summary would overwrite an input; choose another name\n", a->summary_path);
        return EXIT_USAGE;
    }
    char tmp[4200];
    int direct = is_special(a->summary_path);
    snprintf(tmp, sizeof tmp, "%s.tmp-%ld", a->summary_path, (long)getpid());
    FILE *f = fopen(direct ? a->summary_path : tmp, "w");
    if (!f) {
        fprintf(stderr, "hypsolev: error: %s: cannot write: %s\n", a->summary_path, strerror(errno));
        return EXIT_INPUT;
    }
    int json = ends_with(a->summary_path, ".json");
    if (json)
        fputs("[\n", f);
    else
        fputs("file,points,corrected,method,ties,median_sigma_m,exit_status,status\n", f);
    for (int i = 0; i < n; i++) {
        if (json) {
            fputs("  {\"file\": ", f);
            json_string(f, a->owned[i]);
            fprintf(f, ", \"points\": %zu, \"corrected\": %zu, \"method\": ", r[i].points, r[i].corrected);
            json_string(f, r[i].method);
            fprintf(f, ", \"ties\": %zu, \"median_sigma_m\": ", r[i].ties);
            if (r[i].median_sigma_m == r[i].median_sigma_m)
                fprintf(f, "%.3f", r[i].median_sigma_m);
            else
                fputs("null", f);
            fprintf(f, ", \"exit_status\": %d, \"status\": ", r[i].rc);
            json_string(f, r[i].status);
            fprintf(f, "}%s\n", i + 1 < n ? "," : "");
        } else {
            csv_field(f, a->owned[i]);
            fprintf(f, ",%zu,%zu,%s,%zu,", r[i].points, r[i].corrected, r[i].method, r[i].ties);
            if (r[i].median_sigma_m == r[i].median_sigma_m)
                fprintf(f, "%.3f", r[i].median_sigma_m);
            fprintf(f, ",%d,", r[i].rc);
            csv_field(f, r[i].status);
            fputc('\n', f);
        }
    }
    if (json)
        fputs("]\n", f);
    if (fflush(f) || ferror(f) || fclose(f) || (!direct && rename(tmp, a->summary_path))) {
        unlink(tmp);
        fprintf(stderr, "hypsolev: error: %s: write failed\n", a->summary_path);
        return EXIT_INPUT;
    }
    return 0;
}

/* --base-dir: the folder's index and every log in it. */
static int load_base_dir(args *a, base_arg **pool, int *n)
{
    char path[4096];
    snprintf(path, sizeof path, "%s/bases.csv", a->base_dir);
    hyp_base_entry *e = NULL;
    size_t cnt = 0;
    hyp_error err;
    if (hyp_base_index_read(path, &e, &cnt, &err)) {
        fprintf(stderr, "hypsolev: error: %s\n", err.message);
        return EXIT_INPUT;
    }
    *pool = calloc(cnt, sizeof **pool);
    if (!*pool) {
        fprintf(stderr, "hypsolev: error: out of memory\n");
        free(e);
        return EXIT_INPUT;
    }
    for (size_t k = 0; k < cnt; k++) {
        base_arg *b = &(*pool)[k];
        snprintf(path, sizeof path, "%s/%s", a->base_dir, e[k].file);
        char *copy = strdup(path);   /* freed with the pool in run() */
        if (!copy) {
            fprintf(stderr, "hypsolev: error: out of memory\n");
            *n = (int)k;
            free(e);
            return EXIT_INPUT;
        }
        b->path = copy;
        b->height_m = e[k].height_m;
        b->lat_deg = e[k].lat_deg;
        b->lon_deg = e[k].lon_deg;
        b->clock_s = e[k].clock_offset_s;
        b->offset_pa = NAN;
        b->qnh = e[k].qnh;
    }
    *n = (int)cnt;
    free(e);
    return 0;
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
            fprintf(cli_out(), "hypsolev: warning: %s: ", path);
            cli_print_issue(cli_out(), "", &r.issues[i]);
        }
    }
    if (shown > 10)
        fprintf(cli_out(), "hypsolev: warning: %s: %zu problems in all (hypsolev inspect lists them)\n", path, shown);
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
        rc = make_zone(a->n_bases ? a->bases[0].zone : NULL, "--base-time-zone", &bz);
    else
        hyp_zone_init(&bz);
    hyp_window w[MAX_WINDOWS];
    hyp_error err;
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    if (!rc && parse_windows(a, &rz, w, &err)) {
        fprintf(stderr, "hypsolev correct: %s\n", err.message);
        rc = EXIT_USAGE;
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
    base_arg *pool = a->bases;
    int n_pool = a->n_bases;
    base_arg *dir_pool = NULL;
    if (!rc && a->base_dir) {
        rc = load_base_dir(a, &dir_pool, &n_pool);
        pool = dir_pool;
    }
    log_in *logs = calloc((size_t)(n_pool ? n_pool : 1), sizeof *logs);
    if (!logs) {
        fprintf(stderr, "hypsolev: error: out of memory\n");
        rc = EXIT_INPUT;
    }
    for (int k = 0; logs && k < n_pool; k++) {
        hyp_gpx_doc_init(&logs[k].doc);
        hyp_series_init(&logs[k].csv);
    }
    for (int k = 0; !rc && k < n_pool; k++) {
        hyp_zone kz;
        hyp_zone_init(&kz);
        if (make_zone(pool[k].zone, "--base-time-zone", &kz)) {
            rc = EXIT_USAGE;
            break;
        }
        hyp_read_opts ro = a->ropts;
        ro.zone = &kz;
        ro.need_position = 0;
        if (pool[k].qnh)
            ro.pressure_unit = ro.pressure_unit ? ro.pressure_unit : HYP_UNIT_HPA;
        if (read_log(pool[k].path, &ro, &logs[k], &msgs, &err)) {
            print_msgs(&msgs, a->quiet);
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = EXIT_INPUT;
        } else {
            print_msgs(&msgs, a->quiet);
            warn_base_quality(pool[k].path, log_series(&logs[k]));
        }
        hyp_msgs_free(&msgs);
        hyp_msgs_init(&msgs);
        hyp_zone_free(&kz);
    }
    /* One rover's failure is reported and the others still run; the exit
     * status is the worst of them. */
    if (!rc) {
        cli_job_result *res = calloc((size_t)a->n_rovers, sizeof *res);
        if (!res) {
            fprintf(stderr, "hypsolev: error: out of memory\n");
            rc = EXIT_INPUT;
        }
        else {
            batch_ctx ctx = {a, pool, logs, n_pool, &rz};
            long cores = sysconf(_SC_NPROCESSORS_ONLN);
            int jobs = a->jobs ? a->jobs : (int)(cores > 0 ? cores : 1);
            /* -j is the number of threads in all: those the workers leave
             * idle (fewer rovers than -j) go to each rover's own passes */
            int busy = jobs < a->n_rovers ? jobs : a->n_rovers;
            a->rover_threads = jobs > busy ? jobs / busy : 1;
            int progress = a->progress || (!a->quiet && a->n_rovers > 1 && isatty(2));
            xmlInitParser();   /* libxml2 wants its one-time set-up before threads */
            int sig = cli_run_jobs(a->n_rovers, jobs, progress, run_job, &ctx, res);
            for (int i = 0; i < a->n_rovers; i++) {
                if (!res[i].status[0])
                    snprintf(res[i].status, sizeof res[i].status, "not started (interrupted)"), res[i].rc = EXIT_INPUT;
                if (res[i].rc > rc)
                    rc = res[i].rc;
            }
            int srr = write_summary(a, res, a->n_rovers);
            if (srr > rc)
                rc = srr;
            if (sig)
                rc = 128 + sig;
            free(res);
        }
    }
    for (int k = 0; logs && k < n_pool; k++)
        log_free(&logs[k]);
    free(logs);
    for (int k = 0; dir_pool && k < n_pool; k++)
        free((char *)dir_pool[k].path);
    free(dir_pool);
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
    for (int i = 0; i < a.n_owned; i++)
        free(a.owned[i]);
    free(a.owned);
    return rc;
}
