/* survey.h - a survey run: everything `hypsolev correct` does, as a
 * library. Open a run with its options, add its bases, run one rover or
 * many (worker threads, progress), read each rover's result, free it.
 * Reader choice, base selection by time, vertical references, projection,
 * output naming, staging and the all-or-nothing commit of a rover's
 * outputs all happen behind these calls.
 *
 *   hyp_survey *sv;
 *   hyp_survey_opts o;  hyp_survey_opts_init(&o);
 *   hyp_survey_new(&sv, &o, &msgs, &err);
 *   hyp_base_spec b;    hyp_base_spec_init(&b, "base.csv", 812.4);
 *   hyp_survey_add_base(sv, &b, &msgs, &err);
 *   hyp_outputs out = {.gpx = "walk-corrected.gpx"};
 *   hyp_rover_run *run;
 *   hyp_survey_run(sv, "walk.gpx", &out, &run, &err);
 *   hyp_rover_run_write_text(stdout, run, HYP_TEXT_ALL);
 *   hyp_rover_run_free(run);
 *   hyp_survey_free(sv);
 */
#ifndef HYPSOLEV_SURVEY_H
#define HYPSOLEV_SURVEY_H

#include <stddef.h>
#include <stdio.h>
#include "hypsolev/export.h"
#include "hypsolev/error.h"
#include "hypsolev/samples.h"
#include "hypsolev/units.h"
#include "hypsolev/geo.h"
#include "hypsolev/correct.h"
#include "hypsolev/readers.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct hyp_survey hyp_survey;

/* One base station's log and what is known of it. */
typedef struct hyp_base_spec {
    const char *path;          /* the log (CSV or GPX) */
    double height_m;           /* height of the base sensor, m (required) */
    double lat_deg, lon_deg;   /* position, degrees; NaN when not given */
    double clock_offset_s;     /* s the logger's clock is ahead of true time */
    const char *time_zone;     /* zone of stamps that carry none; NULL: none */
    hyp_base_kind kind;        /* station pressure, or a QNH series */
    double offset_pa;          /* the base reads this much high, Pa; NaN: unknown */
    double offset_sigma_pa;
    /* How this log is read where it differs from the survey's reading
     * options (hyp_survey_opts.read): HYP_UNIT_NONE and NULL take those. */
    hyp_unit pressure_unit, temperature_unit;
    const char *pressure_field, *temperature_field, *humidity_field;
    const char *time_format;   /* CSV time column's format (timeparse.h,
                                  hyp_time_parse_format); NULL: detected.
                                  Never the rovers' (read.time_format) */
} hyp_base_spec;

/* path and height; no position, clock offset 0, station pressure, offset
 * unknown. */
HYP_API void hyp_base_spec_init(hyp_base_spec *b, const char *path, double height_m);

typedef struct hyp_survey_opts {
    hyp_correct_opts correct;  /* the science (see correct.h); its benchmarks,
                                  ties, colocate, waypoints, gnss_height_m and
                                  threads are set by the run from the fields
                                  below */
    hyp_read_opts read;        /* how logs are read (its zone is ignored:
                                  rover_time_zone and each base's own); the
                                  default of every rover and base without
                                  its own (hyp_rover_spec, hyp_base_spec) */
    const char *rover_time_zone;      /* NULL: stamps must carry a zone */
    const char *const *colocate;      /* "START/END" windows, ISO 8601 */
    size_t n_colocate;
    const char *bases_colocated;      /* "START/END" or NULL */
    const char *benchmarks_path;      /* NULL: none */
    double benchmark_sigma_m;         /* for benchmarks that give none, default 0.01 m */
    const char *ties_path;            /* NULL: none */
    hyp_vref gnss_ref;                /* what the track's own ele is (default geoid) */
    hyp_vref known_ref;               /* base and benchmark heights (default geoid) */
    hyp_vref out_ref;                 /* heights written (default: known_ref) */
    int out_ref_set;                  /* 0: out_ref follows known_ref */
    const char *crs;                  /* easting/northing CRS, NULL: none */
    int threads;                      /* threads in all, default 0: one per core */
    int check_bases;                  /* warn about base log problems, default 1 */
    /* Polled between steps: once it returns non-zero no output is renamed
     * into place (a signal handler may set what it reads). NULL: never. */
    int (*cancelled)(void *ctx);
    void *cancel_ctx;
} hyp_survey_opts;

HYP_API void hyp_survey_opts_init(hyp_survey_opts *o);

/* Sets an option by its name, as the program's long option without the
 * dashes ("lapse-rate", "method", "benchmarks", ...: every option of
 * `hypsolev correct` that is not about bases, outputs or the batch; the
 * catalogue of settings.h lists them with their help), from
 * its text in the user's unit (documented in the man page: K/km, hPa per
 * 100 km, Pa, m, s, %). Flags ("no-auto-colocate", "no-gnss-anchor") take
 * NULL. Texts are kept by pointer: they must outlive the survey.
 * HYP_ERR_USAGE with a message ("smooth \"-5\": expected a number from 0
 * to 3600") for an unknown name or a bad value. */
HYP_API hyp_status hyp_survey_opts_set(hyp_survey_opts *o, const char *name, const char *value, hyp_error *err);
/* The same for a base: "base-height" (m), "base-at" (LAT,LON degrees),
 * "base-clock-offset" (s), "base-time-zone", "base-offset" and
 * "base-offset-sigma" (Pa), "base-qnh" (NULL), and how its log is read:
 * "base-pressure-unit", "base-temperature-unit", "base-pressure-field",
 * "base-temperature-field", "base-humidity-field"; and "base-time-format". */
HYP_API hyp_status hyp_base_spec_set(hyp_base_spec *b, const char *name, const char *value, hyp_error *err);

/* What an HTML report says of the program that wrote it. */
typedef struct hyp_report_info {
    const char *tool;          /* name and version, e.g. "hypsolev 0.1.0";
                                  NULL: the library's */
    const char *command_line;  /* the full command as typed; NULL: not shown */
} hyp_report_info;

/* Where a rover's outputs go. Every output named is written through a
 * staging file, and all of a rover's outputs are renamed into place
 * together, only when each is complete and on disk. */
typedef struct hyp_outputs {
    const char *gpx;           /* corrected GPX (one rover only) */
    const char *table;         /* per-sample CSV; "-" is standard output */
    const char *report;        /* the run's report (one rover only): HTML when
                                  the name ends in .html (any case), else text */
    const char *dir;           /* DIR/NAME.gpx, DIR/NAME.csv (unless table is
                                  given) and DIR/NAME.report.txt per rover */
    int overwrite;             /* with dir: replace existing outputs; else the
                                  rover is skipped */
    int report_html;           /* with dir and no report: the report is
                                  DIR/NAME.report.html in place of .txt */
    const hyp_report_info *report_info;   /* shown in HTML reports; NULL: none */
} hyp_outputs;

/* No outputs, no overwrite (then name those wanted). */
HYP_API void hyp_outputs_init(hyp_outputs *o);

/* A base as one rover's correction used it. */
typedef struct hyp_base_used {
    const char *path;
    const hyp_series *log;
    hyp_unit pressure_unit;    /* as found or inferred */
    double height_m, lat_deg, lon_deg;
    double clock_offset_s;     /* as given (the result says what was applied) */
    hyp_base_kind kind;
} hyp_base_used;

struct hyp__rover_priv;

/* Everything about one rover's run that the summary, the report and the
 * batch summary print. Valid until hyp_rover_run_free, and only while its
 * survey lives: the bases' logs (bases[].log) are the survey's. */
typedef struct hyp_rover_run {
    const char *path;          /* the rover file as given */
    char name[256];            /* file name without folder and extension */
    hyp_status status;         /* HYP_OK, or why the rover could not be used */
    hyp_error error;
    int skipped;               /* outputs exist and overwrite was not asked:
                                  nothing written (error.message says which) */
    hyp_msgs msgs;             /* this rover's warnings and notes, in order */
    const hyp_series *rover;   /* as read (NULL when it could not be read) */
    hyp_unit rover_pressure_unit;
    size_t n_bases;
    hyp_base_used bases[HYP_MAX_BASES];
    hyp_correct_result result; /* heights in out_ref */
    hyp_vref gnss_ref, known_ref, out_ref;
    const float *gnss_out_m;   /* the track's own heights in out_ref */
    const double *easting_m, *northing_m;  /* NULL without a CRS */
    char crs_name[256];
    double rapid_pa_per_s;     /* the tendency called rapid */
    size_t n_written;
    const char *written[4];    /* the GPX and table written ("-" standard
                                  output); a report asked for is written
                                  with them, all or none */
    struct hyp__rover_priv *priv;
    int test_failed;           /* status HYP_OK, outputs written, but a test of
                                  the data failed (result.calib_test): the
                                  program's exit status 3 */
    hyp_waypoint_heights waypoints; /* the GPX rover's waypoints corrected
                                  (count 0: none, or a CSV rover) */
} hyp_rover_run;

HYP_API void hyp_rover_run_free(hyp_rover_run *r);

/* The small part of a rover's run that a batch summary lists. */
typedef struct hyp_run_info {
    const char *path;          /* the rover file as given */
    int started;               /* 0: not run (interrupted before it) */
    hyp_status status;
    int skipped;
    size_t points, corrected, ties;
    double median_sigma_m;     /* 1 sigma, m; NaN when none */
    char method[48];
    char message[1100];        /* "ok", "skipped: ...", the error, or
                                  "not started (interrupted)" */
    int test_failed;           /* ran and wrote its outputs, but a test of its
                                  data failed (hyp_rover_run.test_failed) */
} hyp_run_info;

/* The exit status the program gives for a status: 0 ok, 1 an input could
 * not be used, 2 a usage error (inconsistent request). */
HYP_API int hyp_exit_status(hyp_status s);

/* Opens a run: parses the zones and windows, reads the benchmarks and
 * ties. Messages of those files go to msgs. */
HYP_API hyp_status hyp_survey_new(hyp_survey **sv, const hyp_survey_opts *o, hyp_msgs *msgs, hyp_error *err);
HYP_API void hyp_survey_free(hyp_survey *sv);

/* Reads a base log now (its problems as warnings to msgs). At most
 * HYP_MAX_BASES bases when every rover uses all of them. */
HYP_API hyp_status hyp_survey_add_base(hyp_survey *sv, const hyp_base_spec *b, hyp_msgs *msgs, hyp_error *err);
/* A folder of base logs listed in DIR/bases.csv (file, height, lat, lon,
 * clock_offset, kind); each rover then gets the logs that cover at least
 * 95 % of its time span. */
HYP_API hyp_status hyp_survey_add_base_dir(hyp_survey *sv, const char *dir, hyp_msgs *msgs, hyp_error *err);

/* Checks before anything runs that the outputs of these rovers are
 * distinct, name no input (nor a hard link to one) and that their
 * folders exist, and that the outputs asked for agree (one of gpx, dir,
 * table; report_html only with dir and no report; ...): HYP_ERR_USAGE (or
 * HYP_ERR_IO) with a message otherwise. */
HYP_API hyp_status hyp_survey_check_outputs(const hyp_survey *sv, const char *const *rovers, size_t n,
                                            const hyp_outputs *out, const char *summary_path, hyp_error *err);

/* Runs one rover: reads it, chooses its bases, corrects it, writes its
 * outputs. *run is always set (free it) unless out of memory; its status
 * says whether the rover succeeded. `threads` (0: the survey's) are those
 * this rover's correction and writing may use. */
HYP_API hyp_status hyp_survey_run(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                  hyp_rover_run **run, hyp_error *err);

/* Called as each rover ends, one call at a time (never concurrently), in
 * the order they end; the run is freed after it returns. */
typedef void (*hyp_rover_done_fn)(void *ctx, size_t index, const hyp_rover_run *run);
/* Called about twice a second while rovers run, and once at the end;
 * never while a done callback runs. */
typedef void (*hyp_progress_fn)(void *ctx, size_t done, size_t n, double points_done);

/* Runs n rovers on `jobs` worker threads (0: the survey's threads); the
 * threads the workers leave idle go to each rover's own passes. infos[n]
 * gets each rover's line of the batch summary. Returns HYP_OK when every
 * rover was run (each may have failed: see infos), or the error that
 * stopped the whole batch. */
HYP_API hyp_status hyp_survey_run_many(hyp_survey *sv, const char *const *rovers, size_t n, const hyp_outputs *out,
                                       int jobs, hyp_rover_done_fn done, hyp_progress_fn progress, void *ctx,
                                       hyp_run_info *infos, hyp_error *err);

/* What a text of a rover's run holds. */
typedef enum hyp_text_parts {
    HYP_TEXT_WARNINGS = 1,     /* warnings and the error */
    HYP_TEXT_NOTES = 2,        /* notes */
    HYP_TEXT_SUMMARY = 4,      /* the run summary with the error budget */
    HYP_TEXT_ALL = 7
} hyp_text_parts;

/* Writes a rover's messages, its error or skip, and its summary (units on
 * every number, the cautions last) as text. */
HYP_API void hyp_rover_run_write_text(FILE *f, const hyp_rover_run *r, unsigned parts);
/* Writes a rover's report as one self-contained HTML page: figures
 * (inline SVG: heights against time and distance with their 2-sigma band,
 * base pressure and tendency, the offset model, the ties, the error
 * budget, a plan coloured by sigma) and tables (inputs, method, the
 * calibrations and fit, warnings, vertical reference, tool and command
 * line, cautions). Inline CSS, no script, nothing fetched; long tracks are
 * drawn thinned per pixel column with every extreme kept. A failed run
 * gets its error and messages. info may be NULL. The survey the run came
 * from must still exist. HYP_ERR_NOMEM, or HYP_ERR_IO when f refuses the
 * page; nothing is written to f unless the whole page was built. */
HYP_API hyp_status hyp_rover_run_write_html(FILE *f, const hyp_rover_run *r, const hyp_report_info *info,
                                            hyp_error *err);
/* Messages as "hypsolev: warning: TEXT" lines, those of level >= min. */
HYP_API void hyp_msgs_write(FILE *f, const hyp_msgs *m, hyp_level min);

typedef enum hyp_summary_format { HYP_SUMMARY_CSV = 0, HYP_SUMMARY_JSON = 1 } hyp_summary_format;

/* The batch's table as text (one row per rover). */
HYP_API void hyp_batch_table_write(FILE *f, const hyp_run_info *infos, size_t n);
/* The batch summary as CSV or JSON into f. */
HYP_API void hyp_batch_summary_write(FILE *f, const hyp_run_info *infos, size_t n, hyp_summary_format fmt);
/* The same into a file (JSON when the name ends in .json), staged and
 * renamed into place; refused when it names an input of the survey. */
HYP_API hyp_status hyp_survey_write_summary(const hyp_survey *sv, const char *path, const hyp_run_info *infos,
                                            size_t n, hyp_error *err);

/* The exit status of a run that completed and wrote its outputs, but
 * where a statistical test of the data failed: a calibration rejected, or
 * calibrations that disagree with too few to tell which is wrong. The
 * outputs are the best estimate, their sigmas widened where the test
 * could not decide; the summary and the report say what failed. */
#define HYP_EXIT_TEST_FAILED 3

/* The exit status of one rover of a batch: hyp_exit_status of its status
 * (0, 1 input, 2 usage), HYP_EXIT_TEST_FAILED when it ran but a test
 * failed, 1 when it was not started. The program exits with the worst
 * over its rovers, in the order usage 2, input 1, test failed 3, ok 0. */
HYP_API int hyp_run_exit_status(const hyp_run_info *r);

/* One rover's own reading options, where its logger differs from the
 * survey's (hyp_survey_opts.read and rover_time_zone, which stay the
 * default for every rover and base that has no setting of its own: a
 * rover storing <baro> in Pa beside a base whose column is "pressure" in
 * hPa). HYP_UNIT_NONE, NULL and 0 take the survey's. */
typedef struct hyp_rover_spec {
    const char *path;          /* the rover file, exactly as given to
                                  hyp_survey_run (matched by this text) */
    hyp_unit pressure_unit, temperature_unit;
    const char *pressure_field, *temperature_field, *humidity_field;
    const char *time_zone;     /* zone of stamps that carry none; NULL: the
                                  survey's rover_time_zone */
    double clock_offset_s;     /* s the rover logger's clock is ahead of true
                                  time (default 0): its times, waypoints' too,
                                  are moved to true time as it is read, so
                                  tables and new GPX files show true time */
    const char *display_name;  /* the rover's name in the run's texts (its
                                  path, messages, error), e.g. "stdin" for a
                                  copy of standard input; NULL: its path */
} hyp_rover_spec;

/* path; everything else the survey's. */
HYP_API void hyp_rover_spec_init(hyp_rover_spec *r, const char *path);
/* Sets one by name, as the program's option without the dashes:
 * "rover-pressure-unit", "rover-temperature-unit" (a unit name, see
 * units.h), "rover-pressure-field", "rover-temperature-field",
 * "rover-humidity-field" (a GPX extension element's local name or a CSV
 * column), "rover-time-zone" (checked by hyp_survey_add_rover_spec),
 * "rover-clock-offset" (s, -86400 to 86400). Texts are kept by pointer.
 * HYP_ERR_USAGE with a message ("rover-pressure-unit \"bar\": expected one
 * of ...") for an unknown name or a bad value. */
HYP_API hyp_status hyp_rover_spec_set(hyp_rover_spec *r, const char *name, const char *value, hyp_error *err);
/* Gives the rover at spec->path its own reading options in this survey
 * (copied; texts must outlive the survey). HYP_ERR_USAGE for an empty
 * path, a path given a spec twice, or a time zone that cannot be read. */
HYP_API hyp_status hyp_survey_add_rover_spec(hyp_survey *sv, const hyp_rover_spec *r, hyp_error *err);

/* The rovers as a command line or an archive gives them: a folder becomes
 * its .gpx and .csv files (any case; not hidden ones, not its subfolders),
 * a name with * ? or [ that is no file becomes the files it matches
 * (glob(3)), anything else stays as given; each folder's or pattern's files
 * sorted by name so that runs repeat. On HYP_OK *out holds *n_out strings
 * (free with hyp_rover_list_free); HYP_ERR_NODATA for a folder with no log
 * or a pattern matching nothing, HYP_ERR_IO for a folder that cannot be
 * read, each naming it. */
HYP_API hyp_status hyp_rover_list_expand(const char *const *in, size_t n, char ***out, size_t *n_out, hyp_error *err);
HYP_API void hyp_rover_list_free(char **paths, size_t n);

/* The exit status of a batch: the worst of its rovers'
 * (hyp_run_exit_status), a usage error 2 before an input error 1 before a
 * failed test 3 before 0 (a batch with an input error and a failed test
 * exits 1: the failed test's outputs exist, the input's do not). 0 for
 * n = 0. */
HYP_API int hyp_batch_exit_status(const hyp_run_info *infos, size_t n);

#ifdef __cplusplus
}
#endif
#endif
