/* cli.h - the hypsolev program: commands, rover lists, signals, progress
 * (a thin client of the library: it parses options and prints). */
#ifndef HYP_CLI_H
#define HYP_CLI_H

#include <stddef.h>
#include <stdio.h>

#define EXIT_INPUT 1   /* an input could not be used */
#define EXIT_USAGE 2   /* the command line is wrong */

#include <getopt.h>
#include "hypsolev/hypsolev.h"

#define EXIT_TEST 3    /* ran, but a statistical test failed */

int cmd_correct(int argc, char **argv);
int cmd_adjust(int argc, char **argv);
void cli_adjust_help(void);
int cmd_inspect(int argc, char **argv);
void cli_correct_help(void);
void cli_print_safety(void);
/* "option ... is unknown" or "... needs a value"; returns EXIT_USAGE. */
int cli_bad_option(const char *cmd, const char *arg, int optopt, int missing);

/* Usage message of a command ("hypsolev CMD: ..." and the --help hint). */
int cli_usage(const char *cmd, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* The options correct and adjust share (options.c): every setting of the
 * library's catalogue has the code CLI_SET; a command's own start at
 * CLI_OWN. */
enum { CLI_SET = 256, CLI_OWN = 300 };
typedef struct cli_common {
    const char *cmd;
    hyp_survey_setup *setup;       /* the settings, bases and rovers given */
    const char *const *rovers;     /* expanded, after cli_parse (the setup's) */
    size_t n_rovers;
    int jobs, quiet;
    hyp_network_opts *net;         /* adjust: its settings are options too */
} cli_common;
/* 0, or the exit status when out of memory. */
int cli_common_init(cli_common *c, const char *cmd);
/* Parses argv: settings into the setup, the command's own (table `own`,
 * codes from CLI_OWN) through fn; then expands the rovers. 0, -1 after
 * --help (fn returns -1), or the exit status of a usage error. */
int cli_parse(cli_common *c, int argc, char **argv, const struct option *own, int (*fn)(void *, int, const char *),
              void *ctx);
hyp_status cli_open_survey(cli_common *c, hyp_survey **sv, hyp_error *err);
/* Prints a failure of the survey (usage or error); returns the exit status. */
int cli_fail(const cli_common *c, hyp_status st, const hyp_error *err);

/* SIGINT, SIGTERM and SIGHUP set a flag the library polls: no output is
 * renamed into place after it. */
void cli_signals_catch(void);
int cli_signal(void);                 /* the signal caught, or 0 */
int cli_cancelled_cb(void *ctx);      /* for hyp_survey_opts.cancelled */
/* Progress callbacks: on stderr, or only the note of an interruption. */
void cli_progress(void *ctx, size_t done, size_t n, double points);
void cli_progress_quiet(void *ctx, size_t done, size_t n, double points);
/* Prints a finished rover's text in one piece (clearing the progress line). */
void cli_emit(const char *text, size_t len);
/* As cli_signals_catch, but a signal interrupts a read under way (a rover
 * on standard input that never ends can be stopped, its copy removed). */
void cli_signals_catch_reads(void);

#endif
