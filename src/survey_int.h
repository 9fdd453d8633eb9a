/* survey_int.h - the survey run's private parts shared by survey.c (the
 * run), survey_batch.c (many rovers) and run_text.c (the texts). */
#ifndef HYP_SURVEY_INT_H
#define HYP_SURVEY_INT_H

#include <pthread.h>
#include "hypsolev/survey.h"
#include "hypsolev/readers.h"
#include "hypsolev/marks.h"

/* A log read by either reader. */
typedef struct hyp__log {
    int is_gpx;
    hyp_gpx_doc doc;
    hyp_series csv;
    hyp_unit punit;
} hyp__log;

const hyp_series *hyp__log_series(const hyp__log *l);
hyp_status hyp__log_read(const char *path, const hyp_read_opts *ro, hyp__log *l, hyp_msgs *msgs, hyp_error *err);
void hyp__log_free(hyp__log *l);

typedef struct hyp__pool_base {
    hyp_base_spec spec;
    char *path;            /* owned copy of spec.path */
    hyp__log log;
    double t0_s, t1_s;     /* true-time span of its valid samples */
} hyp__pool_base;

struct hyp_survey {
    hyp_survey_opts o;
    hyp_correct_opts copts;     /* with benchmarks, ties and windows set */
    hyp_zone rover_zone;
    hyp_window *windows;
    hyp_benchmarks bms;
    hyp_tie_spec *ties;
    size_t n_ties;
    hyp__pool_base *pool;
    size_t n_pool, pool_alloc;
    char *base_dir;             /* set: bases chosen per rover by time */
    char *inputs[3];            /* bases.csv, benchmarks, ties (NULL when none) */
    pthread_mutex_t lock;       /* the list below */
    char **cleaned;             /* directories cleared of stale staging files */
    size_t n_cleaned;
    struct hyp__rover_own *rover_own;   /* rovers' own reading options */
    size_t n_rover_own;
};

struct hyp__rover_priv {
    hyp__log rv;
    hyp_geo *geo;
    float *own_known, *own_out;
    double *east, *north;
    char *paths[4];             /* owned strings behind run->written */
    const hyp_survey *sv;       /* the survey it ran in (benchmarks and inputs
                                   for the HTML report) */
    const hyp_report_info *report_info;   /* the outputs' (NULL: none) */
    struct hyp__baro *baro;     /* a barometric-altitude rover's steps (NULL: none) */
};

/* How the rover at `rover` (a path as given) is read: the survey's
 * reading options, its zone, positions wanted. */
void hyp__rover_read_opts(const hyp_survey *sv, const char *rover, hyp_read_opts *ro);

/* A rover's own reading options (survey_rover_spec.c): the spec with
 * an owned path, its zone parsed. */
typedef struct hyp__rover_own {
    hyp_rover_spec spec;
    char *path;
    hyp_zone zone;
    char *display;              /* owned copy of spec.display_name, or NULL */
} hyp__rover_own;
/* The rover's own options, NULL when it has none. */
const hyp__rover_own *hyp__rover_own_find(const hyp_survey *sv, const char *rover);
void hyp__rover_own_free(hyp_survey *sv);
/* Moves a rover read with its own clock offset to true time. */
void hyp__rover_clock_apply(const hyp__rover_own *own, hyp__log *l);
/* A finished run of a rover with a display name: its path, error and
 * messages name the rover by it (survey_rover_spec.c). */
void hyp__rover_display_apply(const hyp_survey *sv, hyp_rover_run *r);

/* The bases a rover uses (indices into the pool). */
hyp_status hyp__select_bases(const hyp_survey *sv, const hyp_series *rv, size_t *sel, size_t *n, hyp_error *err);

/* hyp_survey_run with other correction options than the survey's (the
 * network runs its rovers with the offset fixed at 0). */
hyp_status hyp__survey_run_with(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                const hyp_correct_opts *copts, hyp_rover_run **run, hyp_error *err);

/* The three outputs of a rover (empty strings where none). */
typedef struct hyp__rover_paths {
    char gpx[4096], table[4096], report[4096];
} hyp__rover_paths;

void hyp__rover_paths_make(const hyp_outputs *out, const char *rover, hyp__rover_paths *p);
/* The file name of path without folder and extension. */
void hyp__stem(const char *path, char *out, size_t n);
/* Removes stale staging files of the run's directory once per survey. */
void hyp__survey_clean_dir(hyp_survey *sv, const char *target);
/* 1 when path names one of the survey's inputs (or a hard link to one). */
int hyp__survey_is_input(const hyp_survey *sv, const char *path, const char *const *rovers, size_t n);

/* hyp_survey_run for a batch's group commit: the rover's outputs are
 * staged (flushed and closed, not synced, not renamed) into *staged (n 0
 * when there is none) for hyp__outset_commit_group (output_set.h); r is
 * reported only after that commit. */
struct hyp__outset;
hyp_status hyp__survey_run_staged(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                  hyp_rover_run **run, struct hyp__outset *staged, hyp_error *err);
/* A run whose staged outputs did not get into place: its error, and
 * nothing written. */
void hyp__rover_run_unwritten(hyp_rover_run *r, const hyp_error *why);

/* hyp__survey_run_staged with a worker's geo lent to the rover (*geo
 * NULL: the rover opens one): PROJ's context, geoid transformation and
 * last projection are made once per worker, not per rover (about 11 ms
 * a rover with a geoid, 1.5 ms with --crs). The geo is taken back into
 * *geo once the outputs are staged; the run keeps none. */
hyp_status hyp__survey_run_lent(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                hyp_geo **geo, hyp_rover_run **run, struct hyp__outset *staged, hyp_error *err);
/* A run whose geo was taken back gets one again, with its CRS, for an
 * HTML report written later (no CRS asked: nothing to do). */
hyp_status hyp__rover_geo_reopen(const hyp_rover_run *r, hyp_error *err);

#endif
