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
    cli_emit(buf, len);
    free(buf);
}

static int run(args *a)
{
    hyp_error err;
    hyp_survey *sv = NULL;
    size_t n = a->c.n_rovers;
    const char *const *rovers = a->c.rovers;
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
        rc = hyp_batch_exit_status(infos, n);
        if (n > 1 && !a->c.quiet)
            hyp_batch_table_write(stderr, infos, n);
        if (a->summary_path && hyp_survey_write_summary(sv, a->summary_path, infos, n, &err)) {
            fprintf(stderr, "hypsolev: error: %s\n", err.message);
            rc = rc == EXIT_USAGE ? rc : EXIT_INPUT;   /* as hyp_batch_exit_status ranks them */
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
 * with the setup, whatever the end of the run. A signal interrupts the
 * read. Returns 0, or the exit status of a refusal. */
static int stdin_rover(args *a)
{
    if (!hyp_survey_setup_reads_stdin(a->c.setup))
        return 0;
    hyp_error err;
    cli_signals_catch_reads();
    hyp_status st = hyp_survey_setup_spool_stdin(a->c.setup, stdin, getenv("TMPDIR"), &a->out, &err);
    if (st && st != HYP_ERR_USAGE && cli_signal()) {   /* the copy is already removed */
        fprintf(stderr, "hypsolev: stopped by a signal while reading standard input; nothing written\n");
        return 128 + cli_signal();
    }
    return st ? cli_fail(&a->c, st, &err) : 0;
}

int cmd_correct(int argc, char **argv)
{
    args a;
    memset(&a, 0, sizeof a);
    int rc = cli_common_init(&a.c, "correct");
    a.command_line = hyp_command_line_join(argc, argv);
    a.report_info.tool = "hypsolev " HYPSOLEV_VERSION;
    a.report_info.command_line = a.command_line;
    a.out.report_info = &a.report_info;
    if (!rc)
        rc = cli_parse(&a.c, argc, argv, own, own_option, &a);
    if (!rc && !hyp_survey_setup_has_bases(a.c.setup))
        rc = cli_usage("correct", "no --base or --base-dir given: a base station's pressure log is needed");
    if (!rc)
        rc = stdin_rover(&a);
    if (!rc)
        rc = run(&a);
    hyp_survey_setup_free(a.c.setup);
    free(a.command_line);
    return rc < 0 ? 0 : rc;
}
