/* cmd_correct_help.c - the help text of "hypsolev correct": the program's
 * own options; the settings' help comes from the library's catalogue. */
#include "cli.h"

#include <stdio.h>

void cli_correct_help(void)
{
    fputs(
"usage: hypsolev correct ROVER [ROVER...] --base FILE --base-height M [options]\n"
"\n"
"Corrects each ROVER (GPX track, or CSV log with time, pressure, lat, lon)\n"
"against the pressure log of a base station of known height.\n"
"\n", stdout);
    hyp_settings_write_help(stdout, ~HYP_SCOPE_BIT(HYP_SCOPE_NETWORK));   /* every setting, from the library's catalogue */
    fputs(
"\n"
"batch:\n"
"  ROVER may be a folder (its .gpx and .csv files) or a quoted pattern\n"
"  ROVER - is standard input (the only rover, with -o; spooled under TMPDIR)\n"
"  -j, --jobs N             threads in all (default: the number of cores): one\n"
"                           rover per thread, and a single rover uses them all\n"
"  --summary FILE           one row per rover (.json for JSON, else CSV)\n"
"  --progress               progress on stderr even when it is not a terminal\n"
"  --overwrite              replace existing outputs (default: skip those rovers)\n"
"\n"
"outputs (at least one):\n"
"  -o, --output FILE        corrected GPX (one rover only)\n"
"  --out-dir DIR            DIR/NAME.gpx and DIR/NAME.csv for each rover NAME.*\n"
"  --table FILE             per-sample table (CSV); - is standard output\n"
"  --report FILE            the run's report: FILE.html a page with figures and\n"
"                           tables (one file, nothing fetched), else text (the\n"
"                           messages and summary); with --out-dir always\n"
"                           DIR/NAME.report.txt, or with\n"
"  --report-html            DIR/NAME.report.html (with --out-dir)\n"
"  -q, --quiet              no run summary, warnings only\n"
"\n"
"examples:\n"
"  hypsolev correct walk.gpx --base base.csv --base-height 812.4 \\\n"
"      --base-at 46.80,9.90 -o walk-corrected.gpx --table walk.csv\n"
"  hypsolev correct day1.csv --base hut.csv --base-height 1520 --offset 35 \\\n"
"      --out-dir results/\n"
"\n"
"exit status: 0 all went well, 1 an input could not be used, 2 usage error;\n"
"a signal ends it with 128 + the signal number, after the files under way.\n"
"\n", stdout);
    cli_print_safety();
}
