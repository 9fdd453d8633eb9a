/* correct.h - the correction request and its result: a rover's heights
 * from its pressures against a base station's log (single-base method). */
#ifndef HYPSOLEV_CORRECT_H
#define HYPSOLEV_CORRECT_H

#include <stddef.h>
#include <stdint.h>
#include "hypsolev/error.h"
#include "hypsolev/samples.h"

#ifdef __cplusplus
extern "C" {
#endif

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

typedef struct hyp_base {
    const hyp_series *log;
    const char *name;        /* for messages (file name) */
    double height_m;         /* known height of the base sensor, m */
    double lat_deg, lon_deg; /* NaN when not given */
    double clock_offset_s;   /* s the base logger's clock is ahead of true time */
} hyp_base;

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
     * thermometer's error as a measure of the air at the base (default 1 K:
     * radiation error and siting of a shaded logger, common practice, no
     * source) and the spread of real lapse rates about the assumed one
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
} hyp_correct_opts;

void hyp_correct_opts_init(hyp_correct_opts *o);

typedef enum hyp_point_status {
    HYP_PT_OK = 0,
    HYP_PT_REFUSED,        /* the reader refused the sample (see its flag) */
    HYP_PT_OUTSIDE_BASE,   /* the time is outside the base log */
    HYP_PT_BASE_GAP,       /* the base log has a gap longer than max_gap_s */
    HYP_PT_NO_CONVERGE,    /* the height iteration failed */
    HYP_PT_STATUS_COUNT
} hyp_point_status;

const char *hyp_point_status_text(hyp_point_status s);

/* One calibration of the rover-minus-base offset. */
typedef struct hyp_coloc {
    double start_s, end_s;     /* true time */
    size_t n;                  /* samples used */
    double offset_pa;          /* mean rover - base pressure */
    double se_pa;              /* its standard error */
    double scatter_pa;         /* sample standard deviation of the difference */
    int automatic;             /* found from positions (1) or given (0) */
} hyp_coloc;

typedef struct hyp_correct_result {
    size_t count;              /* = rover sample count */
    double *height_m;          /* NaN where status != OK */
    double *sigma_m;           /* 1-sigma, m */
    double *base_p_pa;         /* base pressure at the rover time */
    double *offset_pa;         /* offset applied */
    double *tcol_k;            /* column mean virtual temperature used */
    uint8_t *status;           /* hyp_point_status */
    size_t n_ok;
    size_t n_status[HYP_PT_STATUS_COUNT];
    size_t n_flag[HYP_SAMPLE_FLAG_COUNT]; /* rover samples refused, by flag */
    size_t base_refused;       /* base samples the reader refused */
    hyp_coloc *colocs;
    size_t n_colocs;
    int offset_source;         /* 0 none, 1 explicit value, 2 co-location */
    double base_noise_pa;      /* estimated white-noise level of the base */
    double diff_noise_pa;      /* scatter of rover - base in co-locations */
    double rover_noise_pa;     /* rover noise derived from the two above */
    double tcol_min_k, tcol_max_k;
    int tcol_source;           /* 0 base + lapse, 1 rover, 2 both, 3 standard
                                  atmosphere (no thermometer at all) */
    double base_tendency_pa_s; /* least-squares trend of base pressure */
    char method[96];           /* what was done, one line */
} hyp_correct_result;

void hyp_correct_result_init(hyp_correct_result *r);
void hyp_correct_result_free(hyp_correct_result *r);

/* Single-base correction of `rover` against `base`. Fills `res` (one entry
 * per rover sample). Warnings go to msgs. HYP_ERR_NODATA when no rover
 * sample could be corrected. */
hyp_status hyp_correct_single_base(const hyp_series *rover,
                                   const hyp_base *base,
                                   const hyp_correct_opts *opts,
                                   hyp_correct_result *res,
                                   hyp_msgs *msgs, hyp_error *err);

#ifdef __cplusplus
}
#endif
#endif
