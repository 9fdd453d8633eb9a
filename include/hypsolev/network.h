/* network.h - station heights from a whole survey: every occupation of a
 * station by a rover (found in the tracks, booked in a field book, or a
 * GPX waypoint) gives an observation of the station's height; with the
 * rovers' offsets and drifts (per track) as further unknowns, the
 * co-locations with a base as observations of them, and control stations
 * as weighted observations, one weighted least-squares adjustment gives
 * every station's height and sigma, tested: the global test of the
 * variance factor and Baarda's w-test with data snooping. */
#ifndef HYPSOLEV_NETWORK_H
#define HYPSOLEV_NETWORK_H

#include "hypsolev/export.h"

#include <stddef.h>
#include <stdio.h>
#include "hypsolev/error.h"
#include "hypsolev/marks.h"
#include "hypsolev/survey.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Stations: a CSV with name, lat, lon (degrees) and optional height (m)
 * and sigma (m, 1 sigma; default default_sigma_m). A station with a height
 * is control; one without is to be determined (its height is NaN). A
 * benchmarks file is a valid stations file. */
HYP_API hyp_status hyp_stations_read(const char *path, double default_sigma_m, hyp_benchmarks *out, hyp_msgs *msgs,
                                     hyp_error *err);

/* A field book entry: rover `rover` (a track's file name without folder
 * and extension; empty when the survey has one rover) stood on `station`
 * from start to end (true time). */
typedef struct hyp_book_entry {
    char station[64];
    char rover[256];
    double start_s, end_s;
    unsigned line;
} hyp_book_entry;

/* Reads a field book: CSV with station, rover (optional), start, end;
 * every station must be one of `stations`. *out is allocated: free() it. */
HYP_API hyp_status hyp_fieldbook_read(const char *path, const hyp_zone *zone, const hyp_benchmarks *stations,
                                      hyp_book_entry **out, size_t *count, hyp_error *err);

typedef struct hyp_network_opts {
    const char *stations_path;      /* required */
    double control_sigma_m;         /* sigma of control heights that give none,
                                       default 0.02 m (a levelled mark to third-order
                                       standards; common practice, no source) */
    const char *fieldbook_path;     /* NULL: none */
    int auto_occupations;           /* find occupations in the tracks, default 1 */
    double occ_radius_m;            /* within this of a station, default 15 m */
    double occ_min_s;               /* ... for at least this long, default 180 s */
    double waypoint_window_s;       /* a waypoint's occupation: this long, centred
                                       on its time, default 120 s */
    double alpha_w;                 /* Baarda's w-test, default 0.001 (3.29) */
    double alpha_global;            /* global test of the variance factor, default 0.05 */
    double drift_prior_pa_per_h;    /* 1 sigma of a track's linear drift before the
                                       data, default 10 Pa/h (a weak constraint that
                                       keeps a track with one calibration solvable;
                                       common practice, no source) */
    /* Surveys without a base (rovers no base log covers; docs/methods.md,
     * "Surveys without a base"): */
    double min_common_s;            /* leapfrog: two occupations by different
                                       instruments give an observation when they
                                       overlap at least this long, default 120 s */
    double weather_walk_hpa_sqrt_h; /* loop: the weather's pressure as a random
                                       walk, 1 sigma in hPa per sqrt(hour), default
                                       0.6 (docs/methods.md says from where) */
} hyp_network_opts;

HYP_API void hyp_network_opts_init(hyp_network_opts *o);

/* Where an occupation came from. */
typedef enum hyp_occ_source { HYP_OCC_BOOK = 0, HYP_OCC_FOUND = 1, HYP_OCC_WAYPOINT = 2 } hyp_occ_source;

/* One observation of the adjustment. */
typedef enum hyp_obs_kind {
    HYP_OBS_OCCUPATION = 0,   /* a rover on a station */
    HYP_OBS_COLOCATION = 1,   /* a rover beside a base: its offset */
    HYP_OBS_CONTROL = 2,      /* a control station's published height */
    HYP_OBS_DRIFT_PRIOR = 3,  /* a track's drift before the data */
    HYP_OBS_LEAPFROG = 4,     /* two instruments at once on two stations: H(station)
                                 - H(station2), m */
    HYP_OBS_SIDE_BY_SIDE = 5, /* two instruments at once on one station (or within
                                 a few metres): their index difference, as m */
    HYP_OBS_LOOP = 6,         /* one rover, no base: H(station) - c w, m (w: the
                                 weather node of the occupation) */
    HYP_OBS_WEATHER_STEP = 7, /* loop: w(next) - w = 0, Pa */
    HYP_OBS_INDEX_PRIOR = 8   /* a rover read without a base: its index before the
                                 data (0, wide), Pa */
} hyp_obs_kind;

typedef struct hyp_network_obs {
    hyp_obs_kind kind;
    hyp_occ_source source;    /* occupations */
    size_t station;           /* index into stations (occupation, control) */
    size_t track;             /* index into tracks (occupation, co-location, drift) */
    double start_s, end_s;    /* the window (true time; occupations, co-locations) */
    size_t samples;
    double observed_m;        /* occupation: the mean barometric height with no
                                 offset; co-location: that minus the base height;
                                 control: the height; drift prior: 0 (Pa/h:
                                 the unit of sigma and residual there too) */
    double sigma_m;           /* a-priori 1 sigma (unit of observed) */
    double residual_m;        /* adjusted minus observed (unit of observed) */
    double w;                 /* standardized residual, NaN when none (a
                                 rejected one: w and residual of the
                                 adjustment that rejected it) */
    double redundancy;        /* NaN when not used */
    int used;                 /* in the final adjustment */
    int rejected;             /* taken out by data snooping */
    char flag[160];           /* "" or why it was rejected or left out */
    unsigned line;            /* field book line (0: none) */
    size_t station2;          /* leapfrog, side by side: the second instrument's
                                 station (SIZE_MAX: none) */
    size_t track2;            /* leapfrog, side by side: the second instrument */
} hyp_network_obs;

typedef struct hyp_network_station {
    double height_m;          /* adjusted, in the output reference; NaN: not determined */
    double sigma_m;           /* 1 sigma, m */
    size_t used, rejected;    /* occupations */
    int control;
    double max_abs_w;         /* largest |w| of its occupations (NaN: none) */
    double free_air_mgal;     /* sigma as a free-air reduction error, mGal */
    double bouguer_mgal;      /* sigma as a Bouguer slab error, mGal */
    char method[16];          /* what gave its height: "base", "leapfrog", "loop",
                                 "control", "mixed" or "" (not determined) */
} hyp_network_station;

typedef struct hyp_network_track {
    const char *path;
    char name[256];
    double t0_s, t1_s;        /* span of its samples */
    int has_drift;
    double offset_pa, offset_sigma_pa;   /* rover minus base at t0 */
    double drift_pa_per_h, drift_sigma_pa_per_h;
    size_t occupations, colocations;
    hyp_status status;        /* HYP_OK, or why the track could not be used */
    char error[1024];
    int raw;                  /* read without a base: 1 leapfrog, 2 loop */
} hyp_network_track;

typedef struct hyp_network_result {
    hyp_benchmarks stations;          /* as read */
    hyp_network_station *st;          /* per station */
    hyp_network_track *tracks;
    size_t n_tracks;
    hyp_network_obs *obs;
    size_t n_obs;
    size_t n_unknowns, n_used, dof;
    size_t n_rejected;                /* observations of any kind rejected */
    double vtpv, s0_sq, chi2_lower, chi2_upper, w_crit, alpha_global, alpha_w;
    int global_pass;                  /* 1 passed, 0 failed, -1 no test (dof 0) */
    int scaled;                       /* sigmas scaled by the variance factor */
    int tests_failed;                 /* the global test failed on its upper side (the
                                         observations scatter more than their sigmas
                                         say) or an observation was rejected; a
                                         failure on the lower side (sigmas larger
                                         than the scatter) is reported, not failed */
    hyp_vref out_ref;
    hyp_msgs msgs;
    const char *stations_path, *fieldbook_path;   /* the caller's strings */
} hyp_network_result;

/* Runs every rover of the survey (bases, units, zones and the rest as the
 * survey's options say: the same as `correct`), finds the occupations,
 * adjusts the network and tests it. A rover no base covers is read raw:
 * with others at once it gives leapfrog legs, alone a loop (the weather
 * solved; it needs an occupied control station, else HYP_ERR_NODATA). *res is set (free it) unless out of
 * memory, on an error too (its messages say what came before; its heights
 * are then not filled); on HYP_OK its tests_failed says whether the tests
 * passed. */
HYP_API hyp_status hyp_network_run(hyp_survey *sv, const hyp_network_opts *o, const char *const *rovers, size_t n,
                                   hyp_network_result **res, hyp_error *err);
HYP_API void hyp_network_result_free(hyp_network_result *r);

/* The outputs of a network: one output set, all or nothing. */
typedef struct hyp_network_outputs {
    const char *stations_csv;   /* one row per station */
    const char *gpx;            /* the stations as GPX 1.1 waypoints */
    const char *residuals_csv;  /* one row per observation */
    const char *report;         /* the report: HTML with figures when the name ends
                                   in .html (any case), else the summary as text */
    const hyp_report_info *report_info;   /* tool and command line for HTML; may be NULL */
} hyp_network_outputs;

HYP_API hyp_status hyp_network_write(const hyp_survey *sv, const hyp_network_result *r,
                                     const hyp_network_outputs *out, hyp_error *err);
/* Checks before a run that the outputs are distinct and name no input
 * (rovers, stations, field book, the survey's bases): HYP_ERR_USAGE. */
HYP_API hyp_status hyp_network_check_outputs(const hyp_survey *sv, const hyp_network_opts *o, const char *const *rovers,
                                             size_t n, const hyp_network_outputs *out, hyp_error *err);
/* The report as one self-contained HTML page: the network in plan, the
 * stations' sigmas, the standardized residuals per track, the repeat
 * occupations, the tracks' offsets and drifts, and the tables. Nothing is
 * written unless the whole page was built. */
HYP_API hyp_status hyp_network_write_html(FILE *f, const hyp_network_result *r, const hyp_report_info *info,
                                          hyp_error *err);
/* The summary as text: counts, the tests, rejections, per track the offset
 * and drift, repeat differences, the cautions. */
HYP_API void hyp_network_write_text(FILE *f, const hyp_network_result *r);

#ifdef __cplusplus
}
#endif
#endif
