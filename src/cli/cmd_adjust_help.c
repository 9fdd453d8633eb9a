/* cmd_adjust_help.c - the help text of "hypsolev adjust": its own options;
 * the network's settings' help comes from the library's catalogue. */
#include "cli.h"

#include <stdio.h>

void cli_adjust_help(void)
{
    fputs(
"usage: hypsolev adjust ROVER [ROVER...] --stations FILE [--base FILE --base-height M ...]\n"
"                       [--occupations FILE] -o STATIONS.csv [options]\n"
"\n"
"Station heights from a whole survey: every occupation of a station by a rover\n"
"observes its height; the rovers' offsets and drifts (one each per track) and the\n"
"station heights are adjusted together by weighted least squares and tested\n"
"(global test of the variance factor, Baarda's w-test with data snooping).\n"
"Rovers no --base covers need none: two or more at once give leapfrog legs\n"
"(height differences from simultaneous pressures), one alone a loop (the weather\n"
"solved from repeat occupations and known marks).\n"
"\n", stdout);
    hyp_settings_write_help(stdout, HYP_SCOPE_BIT(HYP_SCOPE_NETWORK));   /* from the library's catalogue */
    fputs(
"  bases, units, zones, column temperature, datums: the options of correct\n"
"  (hypsolev correct --help), with the same names and meaning; each rover its\n"
"  own units, fields, zone and clock with --rover FILE --rover-* as there\n"
"\n"
"outputs (at least one; all written or none):\n"
"  -o, --output FILE        stations: height, sigma (m), occupations used and\n"
"                           rejected, largest |w|, the sigma in mGal (free-air,\n"
"                           Bouguer)\n"
"  --gpx FILE               the stations as GPX waypoints\n"
"  --residuals FILE         one row per observation: residual, w, redundancy, flag\n"
"  --report FILE            the report: an HTML page with figures when FILE ends\n"
"                           in .html, else the summary as text\n"
"  -q, --quiet              no summary, warnings only\n"
"\n"
"exit status: 0 the adjustment passed its tests, 1 an input could not be used,\n"
"2 usage error, 3 it ran but the global test failed or an occupation was rejected.\n"
"\n", stdout);
    cli_print_safety();
}
