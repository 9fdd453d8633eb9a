/* messages.c - what every command prints alike: the cautions and the
 * message for a bad option. */
#include "cli.h"

#include <stdio.h>

void cli_print_safety(void)
{
    puts("Heights from this tool are not for aviation or navigation. Survey deliverables\n"
         "must follow local codes and be checked by a licensed surveyor.");
}

int cli_bad_option(const char *cmd, const char *arg, int optopt, int missing)
{
    if (missing)
        fprintf(stderr, "hypsolev %s: option \"%s\" needs a value\n", cmd, arg);
    else if (optopt > ' ' && optopt < 127)
        fprintf(stderr, "hypsolev %s: option -%c is unknown\n", cmd, optopt);
    else
        fprintf(stderr, "hypsolev %s: option \"%s\" is unknown\n", cmd, arg);
    fprintf(stderr, "(hypsolev %s --help lists the options)\n", cmd);
    return EXIT_USAGE;
}
