/* correct_int.h - the working state of one correction, shared by the
 * core's files (correct.c, calib.c, drift.c, budget.c); private. */
#ifndef HYP_CORRECT_INT_H
#define HYP_CORRECT_INT_H

#include "hypsolev/correct.h"
#include "hypsolev/readers.h"

/* The base log as the core needs it: valid samples only, on true time. */
typedef struct hyp__base_view {
    size_t n;
    double *t, *p, *temp, *rh;
    double *rate;      /* hourly tendency at each sample, Pa/s */
} hyp__base_view;

#define HYP__MAX_BASES 16

typedef struct hyp__work {
    const hyp_series *rv;
    const hyp_base *base;      /* the reference base: the lower one for two-base,
                                  a virtual one at h_ref for the field */
    const hyp_base *bases;     /* all bases as given */
    size_t nb;
    hyp_method method;
    hyp_base virt;             /* the field method's virtual base */
    hyp__base_view bvs[HYP__MAX_BASES];  /* every base's view (bvs[ref] is bv) */
    size_t ref, upper;         /* two-base: indices of the lower and upper base */
    double *pU;                /* two-base: upper base pressure at rover times */
    double *xfrac;             /* two-base: position in the bracket (0 lower, 1 upper) */
    double field_sigma_pa;     /* field: scatter of the bases about the field */
    const hyp_correct_opts *o;
    hyp_correct_result *r;
    hyp_msgs *msgs;
    hyp__base_view bv;
    size_t n;
    double *pr;        /* rover pressure used: smoothed or as read, Pa */
    double *navg;      /* samples averaged into pr */
    double *rate;      /* base tendency at the rover time, Pa/s */
    double *dt_base;   /* base sampling interval there, s */
    double *tb, *rhb, *rhr;  /* column inputs at each rover time */
    double *raw;       /* height with no offset and no scale, m */
    double *sens;      /* dh/dp at the rover pressure, m/Pa */
    double *tv;        /* column mean virtual temperature, K */
    double tsig_k;     /* column temperature uncertainty at the base end */
    int tcol_scaled;   /* the column is calibrated by the fitted scale */
    double dz_ref_m;   /* mean height above the base of the calibrations */
} hyp__work;

/* Fills a base's view: valid samples on true time, QNH reduced to station
 * pressure, the base's offset removed, hourly tendencies. */
hyp_status hyp__base_view_make(const hyp_base *b, hyp__base_view *v, hyp_error *err);
void hyp__base_view_free(hyp__base_view *v);
/* Base quantity v (of view b) at true time x; status of the bracket. */
hyp_point_status hyp__base_at(const hyp__base_view *b, const double *v, double x, double max_gap_s, double *out);

/* Several bases: chooses the method, compares the bases, and prepares the
 * per-point inputs (two-base: pU, xfrac; field: base_p_pa, tb of a virtual
 * base at the mean base height). Runs after align(). */
hyp_status hyp__multibase(hyp__work *w, hyp_error *err);
hyp_status hyp__multibase_fill(hyp__work *w, hyp_error *err);

/* Height above the base (m) for base pressure pb and rover pressure pr (Pa),
 * with the column of sample i; *tv gets the mean virtual temperature. */
double hyp__height_above_base(const hyp__work *w, size_t i, double pb, double pr, double *tv);

/* Latitude used for gravity at sample i (rover, else base, else 45 deg). */
double hyp__lat(const hyp__work *w, size_t i);

/* Finds base co-locations and benchmark ties; fills r->calibs. */
hyp_status hyp__find_calibrations(hyp__work *w, hyp_error *err);

/* Fits the offset/drift/scale model to the calibrations (r->drift). */
hyp_status hyp__fit_drift(hyp__work *w, hyp_error *err);

/* The model's offset (Pa) at time t; phi (n_knots values, may be NULL)
 * gets the basis weights, so offset = sum phi_j knot_pa[j]. */
double hyp__drift_offset(const hyp_drift *d, double t, double *phi);

/* Drift not captured by the model at t, as seconds of random walk. */
double hyp__drift_distance_s(const hyp_drift *d, double t);

/* With no calibration and GNSS heights given: levels the track on them
 * (r->drift becomes HYP_DRIFT_GNSS); leaves it alone with too few. */
hyp_status hyp__gnss_anchor(hyp__work *w);

/* The error budget of sample i with corrected height difference dz_m. */
void hyp__budget(hyp__work *w, size_t i, double dz_m);

#endif
