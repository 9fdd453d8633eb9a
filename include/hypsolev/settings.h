/* settings.h - every setting of a survey by name: the catalogue (name,
 * what it applies to, its value, its help), and a survey set up from
 * named settings in the order a user gives them. A client that reads a
 * configuration file, builds a form or parses a command line lists and
 * describes the settings from here and hands them over by name; it need
 * not know one of them.
 *
 *   hyp_survey_setup *s;
 *   hyp_survey_setup_new(&s, &err);
 *   hyp_survey_setup_set(s, "base", "base.csv", &err);
 *   hyp_survey_setup_set(s, "base-height", "812.4", &err);
 *   hyp_survey_setup_add_rover(s, "walk.gpx", &err);
 *   hyp_survey_setup_rovers(s, &rovers, &n, &err);
 *   hyp_survey_setup_open(s, &sv, &msgs, &err);
 *   ... hyp_survey_run_many(sv, rovers, n, ...) ...
 *   hyp_survey_free(sv);  hyp_survey_setup_free(s);
 */
#ifndef HYPSOLEV_SETTINGS_H
#define HYPSOLEV_SETTINGS_H

#include <stddef.h>
#include <stdio.h>
#include "hypsolev/export.h"
#include "hypsolev/error.h"
#include "hypsolev/survey.h"
#include "hypsolev/network.h"

#ifdef __cplusplus
extern "C" {
#endif

/* What a setting applies to, and so which function takes it. */
typedef enum hyp_setting_scope {
    HYP_SCOPE_SURVEY,   /* the whole survey: hyp_survey_opts_set */
    HYP_SCOPE_BASE,     /* the base named before it: hyp_base_spec_set */
    HYP_SCOPE_ROVER,    /* the --rover named before it: hyp_rover_spec_set */
    HYP_SCOPE_SETUP,    /* the survey's shape, taken by hyp_survey_setup_set
                           only: "base" and "rover" start a base or a rover
                           of their own, "base-dir" a folder of base logs,
                           "colocate" one more co-location window */
    HYP_SCOPE_NETWORK   /* a network adjustment's: hyp_network_opts_set */
} hyp_setting_scope;
#define HYP_SCOPE_BIT(scope) (1u << (scope))

/* One entry of the catalogue. Names are the program's long options
 * without the dashes. */
typedef struct hyp_setting_info {
    const char *name;         /* "base-height" */
    hyp_setting_scope scope;
    int takes_value;          /* 0: a flag, set with a NULL value */
    const char *metavar;      /* what the value is, "M", "FILE"; NULL for a flag */
    const char *help;         /* its meaning, unit and default; lines split by
                                 '\n', each at most 52 characters */
    const char *group;        /* heading of its group in the help, settings of
                                 one group being adjacent in the catalogue */
    const char *example;      /* a valid value ("812.4"); NULL for a flag */
} hyp_setting_info;

/* The catalogue, in the help's order; *n its number of entries. Static:
 * never freed, the same on every call. */
HYP_API const hyp_setting_info *hyp_settings(size_t *n);
/* The entry of a name; NULL when there is no such setting. */
HYP_API const hyp_setting_info *hyp_setting_find(const char *name);
/* Writes the help of every setting whose scope is in `scopes` (a set of
 * HYP_SCOPE_BIT), by group ("heading:" then one entry a line,
 * "  --name METAVAR" and its help from column 28), each group after an
 * empty line. */
HYP_API void hyp_settings_write_help(FILE *f, unsigned scopes);
/* Sets a network adjustment's option by name (the catalogue's
 * HYP_SCOPE_NETWORK entries): "stations", "occupations" (files, kept by
 * pointer), "control-sigma" (m), "occupation-radius" (m),
 * "occupation-min", "min-common" (s), "weather-walk" (hPa per sqrt(hour)),
 * "no-find-occupations" (NULL). HYP_ERR_USAGE with a message for an
 * unknown name or a bad value ("min-common \"5\": expected a number from
 * 10 to 86400"). */
HYP_API hyp_status hyp_network_opts_set(hyp_network_opts *o, const char *name, const char *value, hyp_error *err);

/* A survey being set up: its options, bases, base folder, co-location
 * windows, rovers with their own options, and the rovers as given. Values
 * are copied: the caller's texts need not outlive it. */
typedef struct hyp_survey_setup hyp_survey_setup;

HYP_API hyp_status hyp_survey_setup_new(hyp_survey_setup **s, hyp_error *err);
/* Frees it, and removes the copy of a rover read from standard input
 * (hyp_survey_setup_spool_stdin), whatever the end of the run. NULL: nothing. */
HYP_API void hyp_survey_setup_free(hyp_survey_setup *s);
/* The survey's options, for what has no name (threads, cancelled). */
HYP_API hyp_survey_opts *hyp_survey_setup_opts(hyp_survey_setup *s);
/* Sets a setting of the catalogue by name, in order: a base setting
 * applies to the last "base", a rover one to the last "rover";
 * "base-clock-offset" also takes "auto" (the clock estimated from
 * co-locations). HYP_ERR_USAGE with a message for an unknown name, a bad
 * value, a base or rover setting with no base or rover before it, a
 * "rover" that is a folder or a pattern matching nothing, too many bases
 * (HYP_MAX_BASES) or windows (64). */
HYP_API hyp_status hyp_survey_setup_set(hyp_survey_setup *s, const char *name, const char *value, hyp_error *err);
/* A rover as typed: a file, a folder, a pattern, or "-" (standard input). */
HYP_API hyp_status hyp_survey_setup_add_rover(hyp_survey_setup *s, const char *path, hyp_error *err);
/* Expands the rovers (hyp_rover_list_expand) into *rovers (owned by s,
 * valid until the next call or its free) and checks them: at least one,
 * and a "rover" with its own settings given once only (not also as a
 * plain rover, in a folder or by a pattern). HYP_ERR_USAGE otherwise. */
HYP_API hyp_status hyp_survey_setup_rovers(hyp_survey_setup *s, const char *const **rovers, size_t *n, hyp_error *err);
/* Whether a base or a base folder was given. */
HYP_API int hyp_survey_setup_has_bases(const hyp_survey_setup *s);
/* Whether a rover is "-", to be read from standard input. */
HYP_API int hyp_survey_setup_reads_stdin(const hyp_survey_setup *s);
/* A rover "-" (after hyp_survey_setup_rovers): the only rover, written to
 * out->gpx (its output has no name of its own), and `in` no terminal;
 * copied by hyp_spool_stream under tmpdir (NULL or "": /tmp) and run as
 * that copy, which every text of the run names "stdin". HYP_OK with
 * nothing done when no rover is "-"; HYP_ERR_USAGE for the refusals; the
 * spool's status otherwise (HYP_ERR_IO also when a signal interrupted the
 * read: the copy is then already removed). */
HYP_API hyp_status hyp_survey_setup_spool_stdin(hyp_survey_setup *s, FILE *in, const char *tmpdir,
                                                const hyp_outputs *out, hyp_error *err);
/* Opens the survey of its options and adds its bases, base folder and
 * rovers' own options (warnings about the bases into msgs). The survey
 * keeps pointers into s: free s after the survey. */
HYP_API hyp_status hyp_survey_setup_open(const hyp_survey_setup *s, hyp_survey **sv, hyp_msgs *msgs, hyp_error *err);

/* The command line as typed, for a report: "hypsolev" and each word,
 * joined by spaces, a word with anything but [A-Za-z0-9_./:,=+@%-] (or
 * empty) single-quoted as a POSIX shell needs it. Free it with free();
 * NULL when out of memory. */
HYP_API char *hyp_command_line_join(int argc, char **argv);

#ifdef __cplusplus
}
#endif

#endif
