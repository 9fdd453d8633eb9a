/* cli.h - the hypsolev program: commands, rover lists, signals, progress
 * (a thin client of the library: it parses options and prints). */
#ifndef HYP_CLI_H
#define HYP_CLI_H

#include <stddef.h>
#include <stdio.h>

#define EXIT_INPUT 1   /* an input could not be used */
#define EXIT_USAGE 2   /* the command line is wrong */

int cmd_correct(int argc, char **argv);
int cmd_inspect(int argc, char **argv);
void cli_correct_help(void);
void cli_print_safety(void);
/* "option ... is unknown" or "... needs a value"; returns EXIT_USAGE. */
int cli_bad_option(const char *cmd, const char *arg, int optopt, int missing);

/* Rover files: folders become their .gpx and .csv files, quoted patterns
 * their matches (sorted, so runs repeat), plain files stay as given. */
typedef struct cli_files {
    char **path;
    size_t n, alloc;
} cli_files;
int cli_files_add(cli_files *f, const char *path);
int cli_files_expand(cli_files *f, const char *cmd);
void cli_files_free(cli_files *f);

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

#endif
