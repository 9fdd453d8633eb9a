/* correct_int.h - the working state of one correction, shared by the
 * core's files (correct.c, calib.c, drift.c, budget.c); private. */
#ifndef HYP_CORRECT_INT_H
#define HYP_CORRECT_INT_H

#include "hypsolev/correct.h"
#include "hypsolev/readers.h"

#include "base_view.h"


/* What one rover sample needs from the bases, computed on demand (nothing
 * of it is stored per sample: see docs/performance.md). */
typedef struct hyp__in {
    double pb;         /* base pressure at the rover time (the field's for the
                          field method), Pa */
    double pu;         /* two-base: the upper base's pressure, Pa */
    double xfrac;      /* two-base: place in the bracket from the pressures
                          (0 lower, 1 upper) */
    double pr;         /* rover pressure used: smoothed or as read, Pa */
    double navg;       /* samples averaged into pr */
    double rate;       /* base tendency at the rover time, Pa/s */
    double dt_base;    /* base sampling interval there, s */
    double tb, rhb, rhr;  /* column inputs: base temperature (K), humidity at
                             the base and rover ends (%) */
    size_t hint;       /* the base interval found last: callers walking the
                          samples in order keep it (0 to start), which
                          spares the search */
} hyp__in;

/* The working state of one correction. It outlives hyp_correct (the
 * result keeps it) so that a point's details can be recomputed later; it
 * owns copies of the options and bases and is never changed after the
 * correction, so reading it from several threads is safe. */
typedef struct hyp__work {
    const hyp_series *rv;
    const hyp_base *base;      /* the reference base: the lower one for two-base,
                                  a virtual one at h_ref for the field */
    const hyp_base *bases;     /* all bases (points at base_copy) */
    size_t nb;
    hyp_method method;
    hyp_base virt;             /* the field method's virtual base */
    hyp_base base_copy[HYP_MAX_BASES];
    hyp__base_view bvs[HYP_MAX_BASES];  /* every base's view (bvs[ref] is bv) */
    size_t ref, upper;         /* two-base: indices of the lower and upper base */
    double field_sigma_pa;     /* field: scatter of the bases about the field */
    hyp_correct_opts opts;     /* copy of the caller's options (o points here) */
    const hyp_correct_opts *o;
    hyp_correct_result *r;     /* written during the correction only */
    hyp_msgs *msgs;            /* NULL after the correction */
    hyp__base_view bv;
    size_t n;
    double tsig_k;     /* column temperature uncertainty at the base end */
    int tcol_scaled;   /* the column is calibrated by the fitted scale */
    double dz_ref_m;   /* mean height above the base of the calibrations */
    /* A short track's points' details as the correction computed them
     * (NULL for a track longer than HYP__DETAIL_CACHE_MAX): the table
     * reads them instead of computing every point a second time. */
    hyp_point_detail *detail;
} hyp__work;

/* Tracks up to this many points keep their details (104 bytes a point,
 * at most 5.2 MB): an archive of small tracks writes its tables at half
 * the cost, and a long track's memory per point is what it was. */
#define HYP__DETAIL_CACHE_MAX 50000

/* The inputs of rover sample i (its status: OK, or why it cannot be
 * corrected). The two-base extrapolation limit is checked here too. */
hyp_point_status hyp__inputs(const hyp__work *w, size_t i, hyp__in *in);
/* The same; for the field method *chi2 (may be NULL) gets the reduced
 * chi-square of the bases about the plane (NaN without one). */
hyp_point_status hyp__inputs_chi2(const hyp__work *w, size_t i, hyp__in *in, double *chi2);

/* Height with no offset and no scale (m) of sample i with inputs in, its
 * sensitivity dh/dp (m/Pa) and column temperature (K); NaN when the
 * iteration fails. */
double hyp__raw_height(const hyp__work *w, size_t i, const hyp__in *in, double *sens, double *tv);


/* Several bases: compares the bases and chooses the method (sets ref,
 * upper, base and bv). */
hyp_status hyp__multibase(hyp__work *w, hyp_error *err);
/* Field method: pb and tb of the virtual base at the mean base height at
 * the rover sample's time and place (in already holds the reference base's
 * inputs); *chi2 gets the plane's reduced chi-square (NaN without). */
hyp_point_status hyp__field_inputs(const hyp__work *w, size_t i, hyp__in *in, double *chi2);
/* Two-base: the column temperature the bases imply over the track and the
 * thermometers' (result fields implied_tcol_k, thermo_tcol_k). */
void hyp__two_base_columns(const hyp__work *w, double *implied_k, double *thermo_k);

/* Height above the base (m) for base pressure pb and rover pressure pr (Pa),
 * with the column of sample i; *tv gets the mean virtual temperature. */
double hyp__height_above_base(const hyp__work *w, size_t i, const hyp__in *in, double pr, double *tv);

/* Latitude used for gravity at sample i (rover, else base, else 45 deg). */
double hyp__lat(const hyp__work *w, size_t i);

/* The corrected point i (inputs in) into d; dz_out gets the height above
 * the base before GNSS levelling. HYP_PT_NO_CONVERGE when the height
 * iteration fails. */
hyp_point_status hyp__corrected_point(const hyp__work *w, size_t i, const hyp__in *in, double *dz_out,
                                      hyp_point_detail *d);

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

/* The error budget of sample i (inputs in) with corrected height
 * difference dz_m, sensitivity c (m/Pa) and column temperature tv (K):
 * the components into b, the 1-sigma (their quadrature sum) returned. */
double hyp__budget(const hyp__work *w, size_t i, const hyp__in *in, double dz_m, double c, double tv,
                   double b[HYP_B_COUNT]);

#endif
