/* main.c - entry point of the hypsolev program: dispatches to a command. */
#include "cli.h"
#include "hypsolev/hypsolev.h"

#include <stdio.h>
#include <string.h>

static void usage(FILE *f)
{
    fputs("usage: hypsolev COMMAND [OPTIONS]\n"
          "\n"
          "Barometric heights from a roving barometer and a base station, post-processed.\n"
          "\n"
          "commands:\n"
          "  correct   correct rover tracks against a base station's pressure log\n"
          "  adjust    station heights from a whole survey, adjusted and tested as a network\n"
          "  inspect   check pressure logs: gaps, spikes, steps, flat lines, tendency\n"
          "\n"
          "  hypsolev correct --help    options of a command\n"
          "  hypsolev --version\n", f);
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        usage(stderr);
        return EXIT_USAGE;
    }
    if (strcmp(argv[1], "--help") == 0 || strcmp(argv[1], "-h") == 0) {
        usage(stdout);
        putchar('\n');
        cli_print_safety();
        return 0;
    }
    if (strcmp(argv[1], "--version") == 0) {
        printf("hypsolev %s\n", HYPSOLEV_VERSION);
        return 0;
    }
    if (strcmp(argv[1], "correct") == 0)
        return cmd_correct(argc - 1, argv + 1);
    if (strcmp(argv[1], "adjust") == 0)
        return cmd_adjust(argc - 1, argv + 1);
    if (strcmp(argv[1], "inspect") == 0)
        return cmd_inspect(argc - 1, argv + 1);
    fprintf(stderr, "hypsolev: unknown command \"%s\"\n", argv[1]);
    usage(stderr);
    return EXIT_USAGE;
}
