/* batch.h - worker threads, progress and signals for the program. */
#ifndef HYP_CLI_BATCH_H
#define HYP_CLI_BATCH_H

#include <stddef.h>

typedef struct cli_job_result {
    size_t points, corrected, ties;
    double median_sigma_m;
    char method[48];
    char status[1100];     /* "ok", "skipped: ...", or the error */
    int rc;                /* exit status of this file */
} cli_job_result;

typedef void (*cli_job_fn)(void *ctx, int index, cli_job_result *out);

/* Runs fn for 0..n-1 on `jobs` threads; prints progress when asked.
 * Returns 0, or the signal number that stopped it. */
int cli_run_jobs(int n, int jobs, int progress, cli_job_fn fn, void *ctx, cli_job_result *results);
/* 1 once SIGINT or SIGTERM arrived: no output may be renamed into place. */
int cli_cancelled(void);
/* Prints a finished file's messages in one piece. */
void cli_emit(const char *text, size_t len);

#endif
