/* cmd_correct.c - "hypsolev correct": parses the options into a survey
 * run of the library, runs it, prints what the library reports. */
#define _GNU_SOURCE
#include "cli.h"
#include "hypsolev/hypsolev.h"

#include <errno.h>
#include <stddef.h>
#include <getopt.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#define MAX_WINDOWS 64

typedef struct args {
    hyp_survey_opts so;
    hyp_base_spec bases[HYP_MAX_BASES];
    int n_bases;
    const char *base_dir, *summary_path;
    const char *colocate[MAX_WINDOWS];
    hyp_outputs out;
    int jobs, progress, quiet;
    cli_files rovers;
} args;

static int usage_error(const char *fmt, ...) __attribute__((format(printf, 1, 2)));

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

enum {
    O_BASE = 256, O_BASE_HEIGHT, O_BASE_AT, O_BASE_CLOCK, O_BASE_TZ, O_BASE_OFF, O_BASE_OFF_SIG, O_BASE_QNH,
    O_NUM,   /* the plain numeric options: see nums[] */
    O_COLOC = O_NUM + 32, O_NO_AUTO, O_TCOL, O_PUNIT, O_TUNIT, O_PFIELD, O_TFIELD, O_HFIELD, O_TZ, O_OUTDIR,
    O_TABLE, O_HELP, O_BENCH, O_TIES, O_GNSS_REF, O_KNOWN_REF, O_OUT_REF, O_CRS, O_NO_ANCHOR, O_BASES_COLOC,
    O_METHOD, O_BASE_DIR, O_SUMMARY, O_PROGRESS, O_OVERWRITE, O_REPORT
};

/* Numeric options: name, range, the factor to SI units, where it goes. */
typedef struct num_opt {
    const char *name;
    double lo, hi, scale;
    size_t at;   /* offset in hyp_correct_opts; SIZE_MAX: elsewhere */
} num_opt;

#define C(f) offsetof(hyp_correct_opts, f)
static const num_opt nums[] = {
    {"offset", -5000, 5000, 1, C(offset_pa)},
    {"offset-sigma", 0, 5000, 1, C(offset_sigma_pa)},
    {"colocate-radius", 0, 10000, 1, C(coloc_radius_m)},
    {"colocate-min", 10, 86400, 1, C(coloc_min_s)},
    {"max-gap", 1, 86400, 1, C(max_gap_s)},
    {"humidity", 0, 100, 1, C(default_rh_pct)},
    {"lapse-rate", -12, 12, 1e-3, C(lapse_k_per_m)},            /* K/km */
    {"tie-radius", 1, 10000, 1, C(tie_radius_m)},
    {"tie-min", 1, 86400, 1, C(tie_min_s)},
    {"smooth", 0, 3600, 1, C(smooth_s)},
    {"gradient-sigma", 0, 100, 1e-3, C(gradient_sigma_pa_per_m)}, /* hPa/100 km */
    {"clock-sigma", 0, 3600, 1, C(clock_sigma_s)},
    {"column-temp-sigma", 0, 30, 1, C(tcol_sigma_k)},
    {"lapse-sigma", 0, 10, 1e-3, C(lapse_sigma_k_per_m)},        /* K/km */
    {"benchmark-sigma", 0, 100, 1, SIZE_MAX},
    {"jobs", 1, 256, 1, SIZE_MAX},
};
#undef C
#define N_NUMS (sizeof nums / sizeof nums[0])

static const struct option longopts[] = {
    {"base", required_argument, 0, O_BASE}, {"base-height", required_argument, 0, O_BASE_HEIGHT},
    {"base-at", required_argument, 0, O_BASE_AT}, {"base-clock-offset", required_argument, 0, O_BASE_CLOCK},
    {"base-time-zone", required_argument, 0, O_BASE_TZ}, {"base-offset", required_argument, 0, O_BASE_OFF},
    {"base-offset-sigma", required_argument, 0, O_BASE_OFF_SIG}, {"base-qnh", no_argument, 0, O_BASE_QNH},
    {"colocate", required_argument, 0, O_COLOC}, {"no-auto-colocate", no_argument, 0, O_NO_AUTO},
    {"column-temp", required_argument, 0, O_TCOL}, {"pressure-unit", required_argument, 0, O_PUNIT},
    {"temperature-unit", required_argument, 0, O_TUNIT}, {"pressure-field", required_argument, 0, O_PFIELD},
    {"temperature-field", required_argument, 0, O_TFIELD}, {"humidity-field", required_argument, 0, O_HFIELD},
    {"time-zone", required_argument, 0, O_TZ}, {"output", required_argument, 0, 'o'},
    {"out-dir", required_argument, 0, O_OUTDIR}, {"table", required_argument, 0, O_TABLE},
    {"quiet", no_argument, 0, 'q'}, {"help", no_argument, 0, O_HELP}, {"benchmarks", required_argument, 0, O_BENCH},
    {"ties", required_argument, 0, O_TIES}, {"gnss-heights", required_argument, 0, O_GNSS_REF},
    {"known-heights", required_argument, 0, O_KNOWN_REF}, {"height-crs", required_argument, 0, O_OUT_REF},
    {"crs", required_argument, 0, O_CRS}, {"no-gnss-anchor", no_argument, 0, O_NO_ANCHOR},
    {"bases-colocated", required_argument, 0, O_BASES_COLOC}, {"method", required_argument, 0, O_METHOD},
    {"base-dir", required_argument, 0, O_BASE_DIR}, {"summary", required_argument, 0, O_SUMMARY},
    {"progress", no_argument, 0, O_PROGRESS}, {"overwrite", no_argument, 0, O_OVERWRITE},
    {"report", required_argument, 0, O_REPORT}, {"jobs", required_argument, 0, 'j'},
    {"offset", required_argument, 0, O_NUM}, {"offset-sigma", required_argument, 0, O_NUM + 1},
    {"colocate-radius", required_argument, 0, O_NUM + 2}, {"colocate-min", required_argument, 0, O_NUM + 3},
    {"max-gap", required_argument, 0, O_NUM + 4}, {"humidity", required_argument, 0, O_NUM + 5},
    {"lapse-rate", required_argument, 0, O_NUM + 6}, {"tie-radius", required_argument, 0, O_NUM + 7},
    {"tie-min", required_argument, 0, O_NUM + 8}, {"smooth", required_argument, 0, O_NUM + 9},
    {"gradient-sigma", required_argument, 0, O_NUM + 10}, {"clock-sigma", required_argument, 0, O_NUM + 11},
    {"column-temp-sigma", required_argument, 0, O_NUM + 12}, {"lapse-sigma", required_argument, 0, O_NUM + 13},
    {"benchmark-sigma", required_argument, 0, O_NUM + 14},
    {0, 0, 0, 0},
};

/* A number within [lo, hi] (decimal only: no hexadecimal, no inf/nan). */
static int number(const char *name, const char *text, double lo, double hi, double *v)
{
    char *end;
    errno = 0;
    *v = strtod(text, &end);
    int hex = strpbrk(text, "xX") != NULL;
    if (!text[0] || *end || errno || hex || !isfinite(*v) || *v < lo || *v > hi) {
        fprintf(stderr, "hypsolev correct: %s \"%s\": expected a number from %g to %g\n", name, text, lo, hi);
        return EXIT_USAGE;
    }
    return 0;
}

static int parse_num(args *a, int k, const char *arg)
{
    const num_opt *n = &nums[k];
    char name[48];
    snprintf(name, sizeof name, "--%s", n->name);
    double v;
    if (number(name, arg, n->lo, n->hi, &v))
        return EXIT_USAGE;
    v *= n->scale;
    if (n->at != SIZE_MAX)
        *(double *)((char *)&a->so.correct + n->at) = v;
    else if (!strcmp(n->name, "jobs"))
        a->jobs = (int)v;
    else
        a->so.benchmark_sigma_m = v;
    return 0;
}

static int parse_base_opt(args *a, int c, const char *arg)
{
    if (c == O_BASE) {
        if (a->n_bases == HYP_MAX_BASES)
            return usage_error("more than %d bases", HYP_MAX_BASES);
        hyp_base_spec_init(&a->bases[a->n_bases++], arg, NAN);
        return 0;
    }
    const char *name = longopts[c - O_BASE].name;
    if (!a->n_bases) {
        fprintf(stderr, "hypsolev correct: --%s must follow the --base it applies to\n", name);
        return EXIT_USAGE;
    }
    hyp_base_spec *b = &a->bases[a->n_bases - 1];
    char buf[128], *comma;
    switch (c) {
    case O_BASE_HEIGHT: return number("--base-height", arg, -500, 9000, &b->height_m);
    case O_BASE_OFF: return number("--base-offset", arg, -5000, 5000, &b->offset_pa);
    case O_BASE_OFF_SIG: return number("--base-offset-sigma", arg, 0, 5000, &b->offset_sigma_pa);
    case O_BASE_QNH: b->kind = HYP_BASE_QNH; return 0;
    case O_BASE_TZ: b->time_zone = arg; return 0;
    case O_BASE_CLOCK:
        if (strcmp(arg, "auto") == 0) {
            a->so.correct.estimate_clock = 1;
            return 0;
        }
        return number("--base-clock-offset", arg, -86400, 86400, &b->clock_offset_s);
    }
    snprintf(buf, sizeof buf, "%s", arg);
    if (!(comma = strchr(buf, ',')))
        return usage_error("--base-at \"%s\": expected LAT,LON in degrees", arg);
    *comma = '\0';
    return number("--base-at latitude", buf, -90, 90, &b->lat_deg) || number("--base-at longitude", comma + 1, -180, 180, &b->lon_deg)
               ? EXIT_USAGE : 0;
}

/* A word of a fixed list: its index, or -1 after a usage message. */
static int choice(const char *opt, const char *arg, const char *const *words, const char *expected)
{
    for (int k = 0; words[k]; k++)
        if (strcmp(arg, words[k]) == 0)
            return k;
    usage_error("%s \"%s\": expected %s", opt, arg, expected);
    return -1;
}

static int parse_vref(const char *opt, const char *arg, hyp_vref *v)
{
    int r = hyp_vref_parse(arg);
    if (r < 0)
        return usage_error("%s \"%s\": expected geoid or ellipsoidal", opt, arg);
    *v = (hyp_vref)r;
    return 0;
}

static int parse_unit(hyp_quantity q, const char *name, const char *arg, hyp_unit *u)
{
    if (!(*u = hyp_unit_parse(q, arg)))
        return usage_error("%s \"%s\": expected one of %s", name, arg, hyp_unit_choices(q));
    return 0;
}

static int parse_one(args *a, int c, const char *arg)
{
    static const char *const methods[] = {"auto", "single", "two-base", "field", NULL};
    static const char *const tcols[] = {"base", "rover", "both", NULL};
    hyp_survey_opts *s = &a->so;
    int k;
    if (c >= O_BASE && c < O_NUM)
        return parse_base_opt(a, c, arg);
    if (c >= O_NUM && c < O_NUM + (int)N_NUMS)
        return parse_num(a, c - O_NUM, arg);
    switch (c) {
    case 'j': return parse_num(a, (int)N_NUMS - 1, arg);
    case O_METHOD:
        if ((k = choice("--method", arg, methods, "auto, single, two-base or field")) < 0)
            return EXIT_USAGE;
        s->correct.method = (hyp_method)k;
        return 0;
    case O_TCOL:
        if ((k = choice("--column-temp", arg, tcols, "base, rover or both")) < 0)
            return EXIT_USAGE;
        s->correct.tcol = (hyp_tcol_mode)k;
        return 0;
    case O_COLOC:
        if (s->n_colocate == MAX_WINDOWS)
            return usage_error("more than %d --colocate windows", MAX_WINDOWS);
        a->colocate[s->n_colocate++] = arg;
        return 0;
    case O_NO_AUTO: s->correct.auto_colocate = 0; return 0;
    case O_NO_ANCHOR: s->correct.gnss_anchor = 0; return 0;
    case O_PUNIT: return parse_unit(HYP_Q_PRESSURE, "--pressure-unit", arg, &s->read.pressure_unit);
    case O_TUNIT: return parse_unit(HYP_Q_TEMPERATURE, "--temperature-unit", arg, &s->read.temperature_unit);
    case O_PFIELD: s->read.pressure_field = arg; return 0;
    case O_TFIELD: s->read.temperature_field = arg; return 0;
    case O_HFIELD: s->read.humidity_field = arg; return 0;
    case O_TZ: s->rover_time_zone = arg; return 0;
    case O_BENCH: s->benchmarks_path = arg; return 0;
    case O_TIES: s->ties_path = arg; return 0;
    case O_CRS: s->crs = arg; return 0;
    case O_GNSS_REF: return parse_vref("--gnss-heights", arg, &s->gnss_ref);
    case O_KNOWN_REF: return parse_vref("--known-heights", arg, &s->known_ref);
    case O_OUT_REF: s->out_ref_set = 1; return parse_vref("--height-crs", arg, &s->out_ref);
    case O_BASES_COLOC: s->bases_colocated = arg; return 0;
    case O_BASE_DIR: a->base_dir = arg; return 0;
    case O_SUMMARY: a->summary_path = arg; return 0;
    case O_PROGRESS: a->progress = 1; return 0;
    case O_OVERWRITE: a->out.overwrite = 1; return 0;
    case O_REPORT: a->out.report = arg; return 0;
    case 'o': a->out.gpx = arg; return 0;
    case O_OUTDIR: a->out.dir = arg; return 0;
    case O_TABLE: a->out.table = arg; return 0;
    case 'q': a->quiet = 1; return 0;
    }
    return EXIT_USAGE;
}

static int parse_args(args *a, int argc, char **argv)
{
    memset(a, 0, sizeof *a);
    hyp_survey_opts_init(&a->so);
    a->so.colocate = a->colocate;
    a->so.cancelled = cli_cancelled_cb;
    opterr = 0;
    optind = 1;
    int c;
    /* "-" first: positional arguments come in order as 1, so the per-base
     * options keep their place after their --base */
    while ((c = getopt_long(argc, argv, "-:o:qj:", longopts, NULL)) != -1) {
        if (c == 1) {
            if (cli_files_add(&a->rovers, optarg))
                return EXIT_INPUT;
            continue;
        }
        if (c == O_HELP) {
            cli_correct_help();
            return -1;
        }
        if (c == '?' || c == ':')
            return cli_bad_option("correct", argv[optind - 1], optopt, c == ':');
        int r = parse_one(a, c, optarg);
        if (r)
            return r;
    }
    if (!a->rovers.n)
        return usage_error("no rover file given");
    if (!a->n_bases && !a->base_dir)
        return usage_error("no --base or --base-dir given: a base station's pressure log is needed");
    if (a->n_bases && a->base_dir)
        return usage_error("--base and --base-dir both given; choose one");
    for (int k = 0; k < a->n_bases; k++)
        if (!(a->bases[k].height_m == a->bases[k].height_m))
            return usage_error("--base %s has no --base-height", a->bases[k].path);
    return cli_files_expand(&a->rovers, "correct");
}

/* Each rover as it ends: its messages and summary, whole. */
static void rover_done(void *ctx, size_t i, const hyp_rover_run *run)
{
    const args *a = ctx;
    (void)i;
    char *buf = NULL;
    size_t len = 0;
    unsigned parts = a->quiet ? HYP_TEXT_WARNINGS : HYP_TEXT_ALL;
    FILE *f = open_memstream(&buf, &len);
    if (!f) {   /* out of memory: straight to stderr */
        hyp_rover_run_write_text(stderr, run, parts);
        return;
    }
    hyp_rover_run_write_text(f, run, parts);
    fclose(f);
    cli_emit(buf, len);
    free(buf);
}

static int run(args *a)
{
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    hyp_survey *sv = NULL;
    hyp_run_info *infos = NULL;
    const char *const *rovers = (const char *const *)a->rovers.path;
    size_t n = a->rovers.n;
    hyp_status st = hyp_survey_new(&sv, &a->so, &m, &err);
    for (int k = 0; !st && k < a->n_bases; k++)
        st = hyp_survey_add_base(sv, &a->bases[k], &m, &err);
    if (!st && a->base_dir)
        st = hyp_survey_add_base_dir(sv, a->base_dir, &m, &err);
    hyp_msgs_write(stderr, &m, a->quiet ? HYP_WARNING : HYP_NOTE);
    if (!st)
        st = hyp_survey_check_outputs(sv, rovers, n, &a->out, a->summary_path, &err);
    if (!st && !(infos = calloc(n, sizeof *infos)))
        st = hyp_error_set(&err, HYP_ERR_NOMEM, "out of memory");
    int rc = 0;
    if (!st) {
        cli_signals_catch();
        int progress = a->progress || (!a->quiet && n > 1 && isatty(2));
        st = hyp_survey_run_many(sv, rovers, n, &a->out, a->jobs, rover_done, progress ? cli_progress : cli_progress_quiet,
                                 a, infos, &err);
        for (size_t i = 0; i < n; i++) {
            int r = infos[i].started ? hyp_exit_status(infos[i].status) : EXIT_INPUT;
            rc = r > rc ? r : rc;
        }
        if (n > 1 && !a->quiet)
            hyp_batch_table_write(stderr, infos, n);
        if (!st && a->summary_path && hyp_survey_write_summary(sv, a->summary_path, infos, n, &err)) {
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = rc > hyp_exit_status(err.status) ? rc : hyp_exit_status(err.status);
        }
        if (cli_signal())
            rc = 128 + cli_signal();
    }
    if (st) {
        fprintf(stderr, st == HYP_ERR_USAGE ? "hypsolev correct: %s\n(hypsolev correct --help lists the options)\n"
                                            : "hypsolev: error: %s\n", err.message);
        rc = hyp_exit_status(st);
    }
    free(infos);
    hyp_survey_free(sv);
    hyp_msgs_free(&m);
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
    cli_files_free(&a.rovers);
    return rc;
}
