/* correct.h - the correction request and its result: a rover's heights
 * from its pressures against a base station's log (single-base method). */
#ifndef HYPSOLEV_CORRECT_H
#define HYPSOLEV_CORRECT_H

#include "hypsolev/export.h"

#include <stddef.h>
#include <stdint.h>
#include "hypsolev/error.h"
#include "hypsolev/samples.h"

#ifdef __cplusplus
extern "C" {
#endif

struct hyp_benchmarks;
struct hyp_waypoints;
struct hyp_tie_spec;

/* How the temperature of the air column between base and rover is taken.
 * Default HYP_TCOL_BASE_LAPSE: a rover's thermometer is warmed by the body
 * and the sun (readings several kelvin high are common practice, no
 * source), while a shaded base logger is not; the base temperature carried
 * up the column with a lapse rate is the more robust choice. */
typedef enum hyp_tcol_mode {
    HYP_TCOL_BASE_LAPSE = 0,  /* base temperature + lapse rate * height */
    HYP_TCOL_ROVER = 1,       /* base and rover thermometers, linear between */
    HYP_TCOL_BOTH = 2         /* average of the two estimates of the rover end */
} hyp_tcol_mode;

typedef struct hyp_window { double start_s, end_s; } hyp_window;

/* The most bases one correction uses. */
#define HYP_MAX_BASES 16

typedef enum hyp_base_kind {
    HYP_BASE_STATION = 0,    /* the log holds the station's own pressure */
    HYP_BASE_QNH = 1         /* the log holds sea-level pressure (QNH) of a
                                weather station at height_m */
} hyp_base_kind;

typedef struct hyp_base {
    const hyp_series *log;
    const char *name;        /* for messages (file name) */
    double height_m;         /* known height of the base sensor, m */
    double lat_deg, lon_deg; /* NaN when not given */
    double clock_offset_s;   /* s the base logger's clock is ahead of true time */
    hyp_base_kind kind;
    double offset_pa;        /* this base reads this much high, Pa; NaN: unknown */
    double offset_sigma_pa;
} hyp_base;

/* Initialises a base description: no position, no clock offset, station
 * pressure, offset unknown. */
HYP_API void hyp_base_init(hyp_base *b, const hyp_series *log, const char *name, double height_m);

/* How heights are computed from the bases. */
typedef enum hyp_method {
    HYP_METHOD_AUTO = 0,     /* one base: single; two bracketing: two-base;
                                three or more: field */
    HYP_METHOD_SINGLE = 1,   /* hypsometric from one base (the first) */
    HYP_METHOD_TWO_BASE = 2, /* log-pressure proportion between two bases */
    HYP_METHOD_FIELD = 3     /* a pressure field from three or more bases */
} hyp_method;

HYP_API const char *hyp_method_name(hyp_method m);

typedef struct hyp_correct_opts {
    double offset_pa;          /* explicit rover-minus-base offset, NaN: none */
    double offset_sigma_pa;    /* its 1-sigma uncertainty, Pa (default 0) */
    const hyp_window *colocate;/* explicit co-location windows (true time) */
    size_t n_colocate;
    int auto_colocate;         /* find co-locations from positions (default 1) */
    double coloc_radius_m;     /* default 30 m */
    double coloc_min_s;        /* default 300 s */
    double max_gap_s;          /* base gaps longer than this are not bridged,
                                  default 180 s */
    hyp_tcol_mode tcol;
    double lapse_k_per_m;      /* default -0.0065 K/m (USSA 1976 troposphere) */
    /* 1-sigma uncertainty of the column mean temperature is
     * sqrt(tcol_sigma_k^2 + (lapse_sigma_k_per_m * dz / 2)^2): the base
     * thermometer's error as a measure of the air at the base (default
     * 0.5 K: radiation error and siting of a shaded logger, common practice,
     * no source) and the spread of real lapse rates about the assumed one
     * (default 1 K/km, from memory: daytime mountain lapse rates mostly lie
     * between -5 and -8 K/km). Its height effect is dz * sigma / Tv. */
    double tcol_sigma_k;
    double lapse_sigma_k_per_m;
    double default_rh_pct;     /* humidity when no log has one, default 50 % */
    double default_rh_sigma_pct; /* its uncertainty, default 30 % */
    /* 1-sigma offset between two uncalibrated barometers, used when there is
     * neither co-location nor --offset: default 150 Pa (absolute accuracy of
     * +-1.5 hPa is typical of the data sheets of small digital barometers;
     * common practice, no source). */
    double uncal_offset_sigma_pa;

    /* Ties to benchmarks (NULL / 0: none). */
    const struct hyp_benchmarks *benchmarks;
    const struct hyp_waypoints *waypoints;   /* GPX wpt named like a benchmark */
    const struct hyp_tie_spec *ties;         /* explicit tie windows */
    size_t n_ties;
    double tie_radius_m;       /* automatic ties: within this of a benchmark, default 30 m */
    double tie_min_s;          /* ... stationary at least this long, default 60 s */
    double stationary_m;       /* standing still: fixes within this of the window's
                                  median position, default 15 m (isolated
                                  excursions of at most 15 s tolerated) */
    /* Drift and column calibration. */
    double scale_min_span_m;   /* estimate a column scale when ties span this, default 200 m */
    double max_condition;      /* refuse fits whose scaled design is worse, default 1e6 */
    double drift_rw_pa2_per_s; /* random-walk drift away from calibrations, default
                                  (2 Pa)^2 per hour (common practice, no source) */
    /* Error budget. */
    double smooth_s;           /* centred moving average of rover pressure, s (0: none) */
    double gradient_sigma_pa_per_m; /* horizontal pressure gradient, default 1 hPa/100 km
                                  (synoptic scale: 10 hPa over 1000 km) */
    /* Speed of moving pressure patterns (fronts, troughs), default 20 km/h:
     * the slow end of frontal speeds (from memory, 20-50 km/h), since a
     * slower pattern with the same tendency has the steeper gradient. The
     * horizontal term reads the base's log over the time such a pattern
     * takes to cross the rover's distance (docs/methods.md, section 4). */
    double front_speed_m_s;
    double clock_sigma_s;      /* uncertainty of the base clock after correction, default 2 s */
    double rh_sigma_pct;       /* of a measured humidity, default 5 % */
    double rapid_pa_per_s;     /* tendency flagged as rapid, default 1 hPa/h */
    /* Base clock: estimated from co-locations always (reported); applied
     * in place of base->clock_offset_s only when estimate_clock is set. */
    int estimate_clock;
    double clock_max_lag_s;    /* search range either side, default 600 s */
    /* GNSS anchoring: the track's own GNSS heights in the reference of the
     * known heights (one per rover sample, NaN where none; NULL: none),
     * used for the level when there is no calibration and no --offset. */
    const float *gnss_height_m;
    int gnss_anchor;           /* default 1 */
    /* A bias shared by a whole track's GNSS heights, added to the level's
     * sigma, m; default 0: no published figure gives the part of GNSS
     * height error that lasts a whole track (the level's own sigma comes
     * from the errors' correlation as the track shows it). Set it from
     * what is known of the receiver. */
    double gnss_bias_sigma_m;
    /* Several bases. */
    hyp_method method;         /* default HYP_METHOD_AUTO */
    hyp_window base_colocate;  /* base loggers side by side (true time); start NaN: none */
    double extrapolate_min_m;  /* two-base: extrapolate at most max(this, */
    double extrapolate_frac;   /* frac x the bases' height difference); 100 m, 0.25 */
    double curvature_sigma_k;  /* two-base: column departing from the bracket's mean, 1 K */
    double qnh_sigma_pa;       /* a QNH series' own uncertainty, default 29 Pa: its 1 hPa
                                  reporting resolution as a uniform error */
    int threads;               /* threads for the per-point passes, default 1 (the
                                  results do not depend on it) */
    /* A rover whose pressures were made from barometric altitudes
     * (hyp_read_opts.baro_altitude_field): the 1-sigma quantisation of
     * those altitudes in Pa (a floor of the rover noise; 0: none), and the
     * re-settings found and joined (hyp_baro_step), whose joining errors
     * add to the noise of points beyond them as seen from the nearest
     * calibration. */
    double rover_quant_pa;
    const struct hyp_baro_step *baro_steps;
    size_t n_baro_steps;
    /* ... the 1-sigma (Pa) of what scales its heights above the base by
     * sigma / p: the recorder's own additive offset, when its pressures
     * were rescaled by the reference a first correction found, else the
     * reference's departure from 1013.25 hPa (0: none). */
    double baro_offset_sigma_pa;
} hyp_correct_opts;

/* A re-setting of a barometric-altitude recorder's reference: between the
 * samples before and at time_s the altitude stepped by size_m more than
 * the motion allows; the later samples were rescaled by `ratio` (the
 * reference before over the one after) to join the earlier ones, with
 * a relative 1-sigma error sigma_rel of the pressures after it. */
typedef struct hyp_baro_step {
    double time_s, prev_time_s;
    double size_m, sigma_m;
    double ratio, sigma_rel;
    uint32_t line;
} hyp_baro_step;

HYP_API void hyp_correct_opts_init(hyp_correct_opts *o);

typedef enum hyp_point_status {
    HYP_PT_OK = 0,
    HYP_PT_REFUSED,        /* the reader refused the sample (see its flag) */
    HYP_PT_OUTSIDE_BASE,   /* the time is outside the base log */
    HYP_PT_BASE_GAP,       /* the base log has a gap longer than max_gap_s */
    HYP_PT_NO_CONVERGE,    /* the height iteration failed */
    HYP_PT_EXTRAPOLATION,  /* two-base: too far outside the bases' bracket */
    HYP_PT_STATUS_COUNT
} hyp_point_status;

HYP_API const char *hyp_point_status_text(hyp_point_status s);

/* One calibration: the rover beside the base (co-location) or on a
 * benchmark (tie), over a window of samples. */
typedef enum hyp_calib_kind { HYP_CAL_BASE = 0, HYP_CAL_BENCHMARK = 1 } hyp_calib_kind;
typedef enum hyp_calib_how {
    HYP_HOW_POSITION = 0,   /* found from positions */
    HYP_HOW_WAYPOINT = 1,   /* a GPX waypoint named like the benchmark */
    HYP_HOW_EXPLICIT = 2    /* a window the user gave */
} hyp_calib_how;

typedef struct hyp_calib {
    hyp_calib_kind kind;
    hyp_calib_how how;
    char name[64];             /* benchmark name, or "base" */
    double start_s, end_s;     /* true time */
    size_t n;                  /* samples used */
    double lat_deg, lon_deg;   /* mean rover position */
    double known_m, known_sigma_m; /* height it is tied to, m */
    double raw_m;              /* mean height with no offset and no scale, m */
    double se_m;               /* standard error of raw_m */
    double sens_m_per_pa;      /* dh/dp of the rover pressure there, m/Pa */
    double offset_pa;          /* rover - expected pressure that closes it */
    double scatter_pa;         /* sample standard deviation of the pressure */
    double misclosure_m;       /* raw_m - known_m: before adjustment */
    double residual_m;         /* corrected - known_m: after the fit */
    /* The test of the calibrations against each other (hyp_calib_test):
     * this calibration's standardized residual w (N(0, 1) when it agrees
     * with the others; NaN when nothing else checks it) and redundancy
     * number (0: unchecked, 1: fully checked; NaN: not in the test), both
     * from the adjustment that rejected it when it was rejected. */
    double test_w;
    double test_redundancy;
    int rejected;              /* left out of the offset fit: |w| beyond the
                                  critical value */
    int suspect;               /* |w| beyond the critical value, kept: the test
                                  cannot tell whether this one or another is wrong */
    char test_note[200];       /* why rejected or suspect; "" otherwise */
    size_t pos_outliers;       /* isolated fixes farther than stationary_m from
                                  the window's median position, tolerated
                                  (found from positions; 0 otherwise) */
} hyp_calib;

/* The calibrations tested against each other before the offset is fitted
 * (docs/methods.md, "Testing the calibrations"): a model of everything
 * that may legitimately make them disagree (a drift with a random walk,
 * a column scale, a horizontal gradient, each with its prior), adjusted
 * by weighted least squares with Baarda's w-test and data snooping. */
typedef enum hyp_calib_test_state {
    HYP_CALTEST_NONE = 0,      /* nothing to test: no calibration, or --offset */
    HYP_CALTEST_UNTESTED,      /* too few calibrations: none is checked by another */
    HYP_CALTEST_PASSED,        /* every calibration agrees with the others */
    HYP_CALTEST_REJECTED,      /* some disagreed and were left out of the fit;
                                  the rest agree */
    HYP_CALTEST_UNRESOLVED     /* some disagree and the test cannot tell which
                                  (too few calibrations): all kept, the offset's
                                  sigma widened to cover the disagreement */
} hyp_calib_test_state;

typedef enum hyp_global_test {
    HYP_GLOBAL_NONE = 0,       /* no degree of freedom: no test */
    HYP_GLOBAL_PASS,
    HYP_GLOBAL_LOW,            /* the calibrations agree better than their sigmas say */
    HYP_GLOBAL_HIGH            /* they scatter more than their sigmas allow */
} hyp_global_test;

typedef struct hyp_calib_test {
    hyp_calib_test_state state;
    int failed;                /* REJECTED or UNRESOLVED: a test of the data failed
                                  (exit status 3 of the program) */
    size_t n_tested;           /* calibrations with a w */
    size_t n_rejected, n_suspect;
    double alpha_w, w_crit;    /* two-sided significance of the w-test (0.001)
                                  and its critical |w| (3.29) */
    /* The global test of the final adjustment (rejections left out):
     * variance factor s0^2 = v^T P v / dof and its two-sided bounds at
     * alpha_global (NaN when dof is 0). */
    size_t dof;
    double vtpv, s0_sq, s0_sq_lower, s0_sq_upper, alpha_global;
    hyp_global_test global;
    double spread_pa;          /* UNRESOLVED: the range of the suspects' offsets
                                  over sqrt(2), added to the offset's sigma, Pa */
} hyp_calib_test;

/* The offset model fitted to the calibrations: offset(t) piecewise linear
 * through knots (constant beyond the first and last), and optionally a
 * scale on the height difference (a column temperature correction). */
typedef enum hyp_drift_kind {
    HYP_DRIFT_NONE = 0,       /* uncalibrated: offset 0 */
    HYP_DRIFT_EXPLICIT = 1,   /* --offset */
    HYP_DRIFT_CONSTANT = 2,
    HYP_DRIFT_LINEAR = 3,
    HYP_DRIFT_PIECEWISE = 4,
    HYP_DRIFT_GNSS = 5        /* no calibration: levelled on the track's GNSS heights */
} hyp_drift_kind;

#define HYP_MAX_KNOTS 16

typedef struct hyp_drift {
    hyp_drift_kind kind;
    size_t n_knots;
    double t_lo_s, t_hi_s;     /* calibrated span: the model is linear out to
                                  here, constant beyond */
    double knot_s[HYP_MAX_KNOTS];
    double knot_pa[HYP_MAX_KNOTS];
    int has_scale;
    double scale, scale_sigma; /* dimensionless: h = base + dz (1 + scale) */
    double scale_tcol_k;       /* the scale as a column temperature error, K:
                                  scale times a nominal 285 K column */
    double rate_pa_per_s;      /* drift between the first and last knot, Pa/s
                                  (0 with fewer than two knots) */
    size_t p;                  /* parameters: knots, then the scale */
    double cov[(HYP_MAX_KNOTS + 1) * (HYP_MAX_KNOTS + 1)];
    double chi2;
    size_t dof;
    double condition;
    double inflation;          /* factor applied to the covariance (>= 1) */
    char note[320];            /* what the rule chose and why */
    /* HYP_DRIFT_GNSS: heights += a + b (t - t0), fitted robustly to
     * GNSS - barometric heights; covariance over an effective number of
     * independent samples (GNSS errors are correlated for minutes). */
    double gnss_a_m, gnss_b_m_per_s, gnss_t0_s;
    double gnss_cov[4];
    double gnss_floor_m;       /* GNSS height bias no averaging removes */
    double gnss_neff;
    size_t gnss_n;
} hyp_drift;

/* The error budget: 1-sigma components of each height, m. */
typedef enum hyp_budget_term {
    HYP_B_NOISE = 0,   /* rover and base sensor noise (after smoothing) */
    HYP_B_FIT,         /* offset/drift/scale model, and drift away from ties */
    HYP_B_TCOL,        /* column temperature */
    HYP_B_RH,          /* humidity */
    HYP_B_INTERP,      /* base interpolation in time */
    HYP_B_CLOCK,       /* base clock */
    HYP_B_HORIZ,       /* horizontal pressure gradient over the separation */
    HYP_B_COUNT
} hyp_budget_term;

HYP_API const char *hyp_budget_term_name(hyp_budget_term t);

typedef struct hyp_period { double start_s, end_s, max_rate_pa_s; } hyp_period;

struct hyp__work;

/* Per point the result stores only what every output needs (height, its
 * 1-sigma and a status); the rest of a point (base pressure, offset,
 * column temperature, the budget's components) is recomputed on demand by
 * hyp_correct_point(), which keeps the memory to a few bytes a point. */
typedef struct hyp_correct_result {
    size_t count;              /* = rover sample count */
    double *height_m;          /* NaN where status != OK */
    float *sigma_m;            /* 1-sigma, m; NaN where status != OK */
    uint8_t *status;           /* hyp_point_status */
    size_t n_ok;
    size_t n_status[HYP_PT_STATUS_COUNT];
    size_t n_flag[HYP_SAMPLE_FLAG_COUNT]; /* rover samples refused, by flag */
    size_t base_refused;       /* base samples the reader refused */
    /* The corrected points with the median and the largest sigma (SIZE_MAX
     * when none), and the median sigma (m; the upper middle for an even
     * count). */
    size_t median_index, worst_index;
    double median_sigma_m;
    hyp_calib *calibs;
    size_t n_calibs;
    hyp_drift drift;
    hyp_period *rapid;         /* periods of rapid pressure change at the base */
    size_t n_rapid;
    double max_rate_pa_s;      /* largest hourly tendency at the base */
    /* Base clock offset estimated from the co-locations (s the base clock is
     * ahead of the rover's), with its 1-sigma; clock_est_ok 0 when the data
     * do not determine it (no co-location, or no pressure changes to line
     * up); clock_applied_s is the offset the heights used. */
    int clock_est_ok;
    double clock_est_s, clock_est_sigma_s, clock_applied_s;
    /* Several bases: the method used and why; each base's offset applied
     * (Pa, reads high) and its sigma; whether the bases were compared; the
     * two-base column temperature the bases imply and the thermometers'. */
    hyp_method method_used;
    char method_why[200];
    size_t n_bases;
    double base_offset_pa[HYP_MAX_BASES], base_offset_sigma_pa[HYP_MAX_BASES];
    int bases_compared;
    double implied_tcol_k, thermo_tcol_k;
    size_t n_extrapolated;     /* two-base points outside the bracket, within the limit */
    uint8_t *extrapolated;     /* two-base only (else NULL): per point, 1 when
                                  outside the bracket */
    double base_noise_pa;      /* estimated white-noise level of the base */
    double diff_noise_pa;      /* scatter of rover - base in co-locations */
    double rover_noise_pa;     /* rover noise derived from the two above */
    double tcol_min_k, tcol_max_k;
    int tcol_source;           /* 0 base + lapse, 1 rover, 2 both, 3 standard
                                  atmosphere (no thermometer at all) */
    double base_tendency_pa_s; /* least-squares trend of base pressure */
    char method[240];          /* what was done, one line */
    struct hyp__work *priv;    /* what hyp_correct_point() needs; private */
    hyp_calib_test calib_test; /* the calibrations tested against each other */
    /* GNSS-anchored: the mean square height above the base of the samples
     * the level was fitted to, m^2 (the column term's lapse part grows
     * away from it); 0 otherwise. */
    double level_dz2_m2;
    /* Two bases never compared side by side: which constraint fixed the
     * upper base's offset relative to the lower (base_offset_pa and
     * base_offset_sigma_pa hold it), with each constraint's share of the
     * information, e.g. "ties at different heights (93 % of the weight);
     * GNSS heights (lower grade) 5 %"; empty otherwise. */
    char base_offset_how[200];
} hyp_correct_result;

/* One corrected point in full. */
typedef struct hyp_point_detail {
    double height_m;           /* as the correction computed it (in the known
                                  heights' reference) */
    double sigma_m;
    double base_p_pa;          /* base pressure at the rover time (the field's
                                  for the field method), Pa */
    double offset_pa;          /* rover offset applied, Pa */
    double tcol_k;             /* column mean virtual temperature used, K */
    double budget_m[HYP_B_COUNT];
    double sens_m_per_pa;      /* the height gained per Pa the rover pressure
                                  falls (-dh/dp), m/Pa */
} hyp_point_detail;

/* The details of point i of a result, recomputed from the inputs: the
 * rover and base series given to hyp_correct must still exist, unchanged.
 * HYP_ERR_NODATA when point i was not corrected (or res holds no
 * correction), HYP_ERR_USAGE when i is out of range. Only reads res, so
 * several threads may call it at once. */
HYP_API hyp_status hyp_correct_point(const hyp_correct_result *res, size_t i, hyp_point_detail *d);

HYP_API void hyp_correct_result_init(hyp_correct_result *r);
HYP_API void hyp_correct_result_free(hyp_correct_result *r);

/* Correction of `rover` against n_bases bases (method by opts->method):
 * fills `res` (one entry per rover sample); warnings and notes go to msgs.
 * HYP_ERR_NODATA when no rover sample could be corrected. */
HYP_API hyp_status hyp_correct(const hyp_series *rover, const hyp_base *bases, size_t n_bases,
                       const hyp_correct_opts *opts, hyp_correct_result *res,
                       hyp_msgs *msgs, hyp_error *err);



#ifdef __cplusplus
}
#endif
#endif
