/* cmd_correct.c - "hypsolev correct": the options into a survey run of the
 * library, the run, and what the library reports, printed. */
#define _GNU_SOURCE
#include "cli.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

typedef struct args {
    cli_common c;
    const char *summary_path;
    hyp_outputs out;
    hyp_report_info report_info;
    char *command_line;         /* for the HTML report */
    int progress;
    char spool[4096];           /* the copy of a rover on standard input, "" for none */
} args;

enum { O_OUTDIR = CLI_OWN, O_TABLE, O_HELP, O_SUMMARY, O_PROGRESS, O_OVERWRITE, O_REPORT, O_REPORT_HTML };

static const struct option own[] = {
    {"output", required_argument, 0, 'o'}, {"out-dir", required_argument, 0, O_OUTDIR},
    {"table", required_argument, 0, O_TABLE}, {"report", required_argument, 0, O_REPORT},
    {"report-html", no_argument, 0, O_REPORT_HTML},
    {"help", no_argument, 0, O_HELP}, {"summary", required_argument, 0, O_SUMMARY},
    {"progress", no_argument, 0, O_PROGRESS}, {"overwrite", no_argument, 0, O_OVERWRITE},
    {0, 0, 0, 0},
};

static int own_option(void *ctx, int code, const char *arg)
{
    args *a = ctx;
    switch (code) {
    case O_HELP: cli_correct_help(); return -1;
    case O_SUMMARY: a->summary_path = arg; return 0;
    case O_PROGRESS: a->progress = 1; return 0;
    case O_OVERWRITE: a->out.overwrite = 1; return 0;
    case O_REPORT: a->out.report = arg; return 0;
    case O_REPORT_HTML: a->out.report_html = 1; return 0;
    case 'o': a->out.gpx = arg; return 0;
    case O_OUTDIR: a->out.dir = arg; return 0;
    case O_TABLE: a->out.table = arg; return 0;
    }
    return EXIT_USAGE;
}

/* The command as typed, for the HTML report: words joined by spaces, a
 * word with anything but [A-Za-z0-9_./:,=+@%-] in it single-quoted as a
 * POSIX shell would need it. */

/* --report-html names the reports of --out-dir only. */
static int check_report_html(const args *a)
{
    if (a->out.report_html && !a->out.dir)
        return cli_usage("correct", "--report-html names the reports of --out-dir (DIR/NAME.report.html); for one rover give --report FILE.html");
    if (a->out.report_html && a->out.report)
        return cli_usage("correct", "--report-html and --report both given; --report FILE.html alone chooses HTML");
    return 0;
}

/* The text printed for a rover on standard input names it "stdin", not
 * its temporary copy (which is gone when the run ends). */
static void emit_named(const args *a, const char *buf, size_t len)
{
    size_t sl = strlen(a->spool);
    const char *p = buf, *end = buf + len, *hit;
    while (sl && (hit = memmem(p, (size_t)(end - p), a->spool, sl))) {
        cli_emit(p, (size_t)(hit - p));
        cli_emit("stdin", 5);
        p = hit + sl;
    }
    cli_emit(p, (size_t)(end - p));
}

/* Each rover as it ends: its messages and summary, whole. */
static void rover_done(void *ctx, size_t i, const hyp_rover_run *run)
{
    const args *a = ctx;
    char *buf = NULL;
    size_t len = 0;
    unsigned parts = a->c.quiet ? HYP_TEXT_WARNINGS : HYP_TEXT_ALL;
    FILE *f = open_memstream(&buf, &len);
    (void)i;
    if (!f) {   /* out of memory: straight to stderr */
        hyp_rover_run_write_text(stderr, run, parts);
        return;
    }
    hyp_rover_run_write_text(f, run, parts);
    fclose(f);
    emit_named(a, buf, len);
    free(buf);
}

/* The worse of two exit statuses: usage 2, then input 1, then a failed
 * test 3, then 0 (a run with an input error and a failed test exits 1). */
static int worse(int a, int b)
{
    static const int rank[4] = {0, 2, 3, 1};   /* by status 0, 1, 2, 3 */
    int ra = a >= 0 && a <= 3 ? rank[a] : 3, rb = b >= 0 && b <= 3 ? rank[b] : 3;
    return rb > ra ? b : a;
}

static int run(args *a)
{
    hyp_error err;
    hyp_survey *sv = NULL;
    size_t n = a->c.rovers.n;
    const char *const *rovers = (const char *const *)a->c.rovers.path;
    hyp_run_info *infos = NULL;
    cli_signals_catch();   /* before anything is read: a signal then still ends it in order */
    hyp_status st = cli_open_survey(&a->c, &sv, &err);
    if (!st)
        st = hyp_survey_check_outputs(sv, rovers, n, &a->out, a->summary_path, &err);
    if (!st && !(infos = calloc(n, sizeof *infos)))
        st = hyp_error_set(&err, HYP_ERR_NOMEM, "out of memory");
    int rc = 0, progress = a->progress || (!a->c.quiet && n > 1 && isatty(2));
    if (!st) {
        hyp_survey_run_many(sv, rovers, n, &a->out, a->c.jobs, rover_done, progress ? cli_progress : cli_progress_quiet,
                            a, infos, &err);
        for (size_t i = 0; i < n; i++)
            rc = worse(rc, hyp_run_exit_status(&infos[i]));
        if (n > 1 && !a->c.quiet)
            hyp_batch_table_write(stderr, infos, n);
        if (a->summary_path && hyp_survey_write_summary(sv, a->summary_path, infos, n, &err)) {
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = worse(rc, EXIT_INPUT);
        }
        rc = cli_signal() ? 128 + cli_signal() : rc;
    } else
        rc = cli_fail(&a->c, st, &err);
    free(infos);
    hyp_survey_free(sv);
    return rc;
}

/* A rover "-" is read from standard input: copied by the library into a
 * temporary file under TMPDIR (else /tmp), run as that file, and removed
 * after the run, whatever its end. One rover only, with -o (its output has
 * no name of its own). Returns 0, or the exit status of a refusal. */
static int stdin_rover(args *a, char *spool, size_t n)
{
    size_t k = 0;
    while (k < a->c.rovers.n && strcmp(a->c.rovers.path[k], "-") != 0)
        k++;
    if (k == a->c.rovers.n)
        return 0;
    if (a->c.rovers.n > 1)
        return cli_usage("correct", "a rover from standard input (-) must be the only rover");
    if (!a->out.gpx)
        return cli_usage("correct", "a rover from standard input (-) needs -o FILE for its corrected GPX");
    if (isatty(0))
        return cli_usage("correct", "a rover from standard input (-): standard input is a terminal; pipe or redirect a log into it");
    hyp_error err;
    cli_signals_catch_reads();
    hyp_status st = hyp_spool_stream(stdin, getenv("TMPDIR"), spool, n, &err);
    if (st && cli_signal()) {   /* the copy is already removed */
        fprintf(stderr, "hypsolev: stopped by a signal while reading standard input; nothing written\n");
        return 128 + cli_signal();
    }
    if (st)
        return cli_fail(&a->c, st, &err);
    free(a->c.rovers.path[k]);
    if (!(a->c.rovers.path[k] = strdup(spool))) {
        hyp_spool_remove(spool);
        spool[0] = '\0';
        fprintf(stderr, "hypsolev: error: out of memory\n");
        return EXIT_INPUT;
    }
    return 0;
}

int cmd_correct(int argc, char **argv)
{
    args a;
    memset(&a, 0, sizeof a);
    cli_common_init(&a.c, "correct");
    a.command_line = cli_join_command(argc, argv);
    a.report_info.tool = "hypsolev " HYPSOLEV_VERSION;
    a.report_info.command_line = a.command_line;
    a.out.report_info = &a.report_info;
    int rc = cli_parse(&a.c, argc, argv, own, own_option, &a);
    if (!rc && !a.c.n_bases && !a.c.base_dir)
        rc = cli_usage("correct", "no --base or --base-dir given: a base station's pressure log is needed");
    if (!rc)
        rc = check_report_html(&a);
    if (!rc)
        rc = stdin_rover(&a, a.spool, sizeof a.spool);
    if (!rc)
        rc = run(&a);
    hyp_spool_remove(a.spool);
    cli_files_free(&a.c.rovers);
    free(a.c.rover_specs);
    free(a.command_line);
    return rc < 0 ? 0 : rc;
}
