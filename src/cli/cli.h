/* cli.h - the hypsolev program's commands (a thin client of the library). */
#ifndef HYP_CLI_H
#define HYP_CLI_H

#define EXIT_INPUT 1   /* an input could not be used */
#define EXIT_USAGE 2   /* the command line is wrong */

int cmd_correct(int argc, char **argv);
int cmd_inspect(int argc, char **argv);
#include <stdio.h>
#include "hypsolev/inspect.h"
void cli_print_issue(FILE *f, const char *indent, const hyp_issue *is);
void cli_print_safety(void);

#endif
