/* cmd_correct.c - "hypsolev correct": parses the options into a survey
 * run of the library, runs it, prints what the library reports. */
#define _GNU_SOURCE
#include "cli.h"
#include "hypsolev/hypsolev.h"

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
    hyp_report_info report_info;
    char *command_line;         /* for the HTML report */
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

/* O_SET: a survey setting of the library, O_BASE_SET: one of the --base
 * before it; both named as the option (hyp_survey_opts_set). */
enum { O_SET = 256, O_BASE_SET, O_BASE, O_CLOCK, O_COLOC, O_OUTDIR, O_TABLE, O_HELP, O_BASE_DIR, O_SUMMARY,
       O_PROGRESS, O_OVERWRITE, O_REPORT, O_REPORT_HTML };
#define SET(name) {name, required_argument, 0, O_SET}
#define FLAG(name) {name, no_argument, 0, O_SET}
#define BASE(name) {name, required_argument, 0, O_BASE_SET}

static const struct option longopts[] = {
    {"base", required_argument, 0, O_BASE}, BASE("base-height"), BASE("base-at"),
    {"base-clock-offset", required_argument, 0, O_CLOCK}, BASE("base-time-zone"), BASE("base-offset"),
    BASE("base-offset-sigma"), {"base-qnh", no_argument, 0, O_BASE_SET}, {"colocate", required_argument, 0, O_COLOC},
    FLAG("no-auto-colocate"), FLAG("no-gnss-anchor"), SET("column-temp"), SET("pressure-unit"),
    SET("temperature-unit"), SET("pressure-field"), SET("temperature-field"), SET("humidity-field"), SET("time-zone"),
    SET("benchmarks"), SET("ties"), SET("gnss-heights"), SET("known-heights"), SET("height-crs"), SET("crs"),
    SET("bases-colocated"), SET("method"), SET("offset"), SET("offset-sigma"), SET("colocate-radius"),
    SET("colocate-min"), SET("max-gap"), SET("humidity"), SET("lapse-rate"), SET("tie-radius"), SET("tie-min"),
    SET("smooth"), SET("gradient-sigma"), SET("clock-sigma"), SET("column-temp-sigma"), SET("lapse-sigma"),
    SET("benchmark-sigma"),
    {"output", required_argument, 0, 'o'}, {"out-dir", required_argument, 0, O_OUTDIR},
    {"table", required_argument, 0, O_TABLE}, {"report", required_argument, 0, O_REPORT},
    {"report-html", no_argument, 0, O_REPORT_HTML},
    {"quiet", no_argument, 0, 'q'}, {"help", no_argument, 0, O_HELP}, {"base-dir", required_argument, 0, O_BASE_DIR},
    {"summary", required_argument, 0, O_SUMMARY}, {"progress", no_argument, 0, O_PROGRESS},
    {"overwrite", no_argument, 0, O_OVERWRITE}, {"jobs", required_argument, 0, 'j'},
    {0, 0, 0, 0},
};

/* A setting the library refused: its message under the option's name. */
static int setting(hyp_status st, const hyp_error *err)
{
    return st ? usage_error("--%s", err->message) : 0;
}

static int parse_one(args *a, int c, const char *name, const char *arg)
{
    hyp_error err;
    hyp_base_spec *b = a->n_bases ? &a->bases[a->n_bases - 1] : NULL;
    char *end;
    switch (c) {
    case O_SET: return setting(hyp_survey_opts_set(&a->so, name, arg, &err), &err);
    case O_BASE_SET:
    case O_CLOCK:
        if (!b) {
            fprintf(stderr, "hypsolev correct: --%s must follow the --base it applies to\n", name);
            return EXIT_USAGE;
        }
        if (c == O_CLOCK && !strcmp(arg, "auto"))
            return a->so.correct.estimate_clock = 1, 0;
        return setting(hyp_base_spec_set(b, name, arg, &err), &err);
    case O_BASE:
        if (a->n_bases == HYP_MAX_BASES)
            return usage_error("more than %d bases", HYP_MAX_BASES);
        hyp_base_spec_init(&a->bases[a->n_bases++], arg, NAN);
        return 0;
    case O_COLOC:
        if (a->so.n_colocate == MAX_WINDOWS)
            return usage_error("more than %d --colocate windows", MAX_WINDOWS);
        a->colocate[a->so.n_colocate++] = arg;
        return 0;
    case 'j':
        a->jobs = (int)strtol(arg, &end, 10);
        return *end || a->jobs < 1 || a->jobs > 256 ? usage_error("--jobs \"%s\": expected a whole number from 1 to 256", arg) : 0;
    case O_BASE_DIR: a->base_dir = arg; return 0;
    case O_SUMMARY: a->summary_path = arg; return 0;
    case O_PROGRESS: a->progress = 1; return 0;
    case O_OVERWRITE: a->out.overwrite = 1; return 0;
    case O_REPORT: a->out.report = arg; return 0;
    case O_REPORT_HTML: a->out.report_html = 1; return 0;
    case 'o': a->out.gpx = arg; return 0;
    case O_OUTDIR: a->out.dir = arg; return 0;
    case O_TABLE: a->out.table = arg; return 0;
    case 'q': a->quiet = 1; return 0;
    }
    return EXIT_USAGE;
}

/* The command as typed, for the HTML report: words joined by spaces, a
 * word with anything but [A-Za-z0-9_./:,=+@%-] in it single-quoted as a
 * POSIX shell would need it. */
static char *join_command(int argc, char **argv)
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

static int parse_args(args *a, int argc, char **argv)
{
    memset(a, 0, sizeof *a);
    a->command_line = join_command(argc, argv);
    a->report_info.tool = "hypsolev " HYPSOLEV_VERSION;
    a->report_info.command_line = a->command_line;
    a->out.report_info = &a->report_info;
    hyp_survey_opts_init(&a->so);
    a->so.colocate = a->colocate;
    a->so.cancelled = cli_cancelled_cb;
    opterr = 0;
    optind = 1;
    int c, idx = -1;
    /* "-" first: positional arguments come in order as 1, so the per-base
     * options keep their place after their --base */
    while ((c = getopt_long(argc, argv, "-:o:qj:", longopts, &idx)) != -1) {
        int r = 0;
        if (c == 1)
            r = cli_files_add(&a->rovers, optarg);
        else if (c == O_HELP)
            return cli_correct_help(), -1;
        else if (c == '?' || c == ':')
            return cli_bad_option("correct", argv[optind - 1], optopt, c == ':');
        else
            r = parse_one(a, c, idx >= 0 ? longopts[idx].name : "", optarg);
        if (r)
            return r;
        idx = -1;
    }
    if (!a->rovers.n)
        return usage_error("no rover file given");
    if (!a->n_bases && !a->base_dir)
        return usage_error("no --base or --base-dir given: a base station's pressure log is needed");
    if (a->out.report_html && !a->out.dir)
        return usage_error("--report-html names the reports of --out-dir (DIR/NAME.report.html); for one rover give --report FILE.html");
    if (a->out.report_html && a->out.report)
        return usage_error("--report-html and --report both given; --report FILE.html alone chooses HTML");
    return cli_files_expand(&a->rovers, "correct");
}

/* Each rover as it ends: its messages and summary, whole. */
static void rover_done(void *ctx, size_t i, const hyp_rover_run *run)
{
    const args *a = ctx;
    char *buf = NULL;
    size_t len = 0;
    unsigned parts = a->quiet ? HYP_TEXT_WARNINGS : HYP_TEXT_ALL;
    FILE *f = open_memstream(&buf, &len);
    (void)i;
    if (!f) {   /* out of memory: straight to stderr */
        hyp_rover_run_write_text(stderr, run, parts);
        return;
    }
    hyp_rover_run_write_text(f, run, parts);
    fclose(f);
    cli_emit(buf, len);
    free(buf);
}

static hyp_status open_survey(args *a, hyp_survey **sv, hyp_error *err)
{
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_status st = hyp_survey_new(sv, &a->so, &m, err);
    for (int k = 0; !st && k < a->n_bases; k++)
        st = hyp_survey_add_base(*sv, &a->bases[k], &m, err);
    if (!st && a->base_dir)
        st = hyp_survey_add_base_dir(*sv, a->base_dir, &m, err);
    hyp_msgs_write(stderr, &m, a->quiet ? HYP_WARNING : HYP_NOTE);
    hyp_msgs_free(&m);
    if (!st)
        st = hyp_survey_check_outputs(*sv, (const char *const *)a->rovers.path, a->rovers.n, &a->out, a->summary_path, err);
    return st;
}

static int run(args *a)
{
    hyp_error err;
    hyp_survey *sv = NULL;
    size_t n = a->rovers.n;
    hyp_run_info *infos = NULL;
    hyp_status st = open_survey(a, &sv, &err);
    if (!st && !(infos = calloc(n, sizeof *infos)))
        st = hyp_error_set(&err, HYP_ERR_NOMEM, "out of memory");
    int rc = 0, progress = a->progress || (!a->quiet && n > 1 && isatty(2));
    if (!st) {
        cli_signals_catch();
        hyp_survey_run_many(sv, (const char *const *)a->rovers.path, n, &a->out, a->jobs, rover_done,
                            progress ? cli_progress : cli_progress_quiet, a, infos, &err);
        for (size_t i = 0; i < n; i++) {
            int r = infos[i].started ? hyp_exit_status(infos[i].status) : EXIT_INPUT;
            rc = r > rc ? r : rc;
        }
        if (n > 1 && !a->quiet)
            hyp_batch_table_write(stderr, infos, n);
        if (a->summary_path && hyp_survey_write_summary(sv, a->summary_path, infos, n, &err)) {
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = rc > EXIT_INPUT ? rc : EXIT_INPUT;
        }
        rc = cli_signal() ? 128 + cli_signal() : rc;
    } else {
        fprintf(stderr, st == HYP_ERR_USAGE ? "hypsolev correct: %s\n(hypsolev correct --help lists the options)\n"
                                            : "hypsolev: error: %s\n", err.message);
        rc = hyp_exit_status(st);
    }
    free(infos);
    hyp_survey_free(sv);
    return rc;
}

int cmd_correct(int argc, char **argv)
{
    args a;
    int rc = parse_args(&a, argc, argv);
    if (rc == 0)
        rc = run(&a);
    cli_files_free(&a.rovers);
    free(a.command_line);
    return rc < 0 ? 0 : rc;
}
