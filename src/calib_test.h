/* calib_test.h - the calibrations tested against each other before the
 * offset is fitted (private; docs/methods.md, "Testing the calibrations"). */
#ifndef HYP_CALIB_TEST_H
#define HYP_CALIB_TEST_H

#include "correct_int.h"

/* A calibration's own 1-sigma, m: its window's standard error, the known
 * height's sigma and a 1 Pa floor for unresolved micro-pressure changes
 * (common practice, no source); the offset fit weighs by it too. */
double hyp__calib_sigma_m(const hyp_calib *c);

/* What may legitimately make calibrations disagree, as priors of the
 * test's model (each a 1-sigma). */
typedef struct hyp__caltest_priors {
    double rw_pa2_per_s;       /* random walk of the offset between calibrations */
    double rate_sigma_pa_s;    /* the offset's drift rate */
    double scale_sigma;        /* the column scale (dimensionless: the base end's
                                  temperature and humidity sigma / 285 K) */
    double lapse_sigma_k_per_m;/* the lapse rate's departure from the assumed one */
    double gradient_sigma_pa_m;/* each component of a horizontal pressure gradient */
    double extra_sigma_pa;     /* per calibration, beyond its own sigma: the
                                  base's error that no window averages out
                                  (a QNH series' rounding); 0 for a station log */
} hyp__caltest_priors;

/* The priors of correction w: its options, its column and humidity
 * uncertainty over the calibrations' heights, its base. */
void hyp__calib_test_priors(const hyp__work *w, hyp__caltest_priors *p);

/* Tests w->r's calibrations (at least one) under priors p by the
 * adjustment engine with data snooping: fills each calibration's test
 * fields and w->r->calib_test; warnings to w->msgs (may be NULL).
 * HYP_ERR_NOMEM only: a test the engine cannot compute is reported as
 * untested, never an error of the run. */
hyp_status hyp__calib_test_run(hyp__work *w, const hyp__caltest_priors *p, hyp_error *err);

/* Both: the priors of w, then the test. */
hyp_status hyp__calib_test(hyp__work *w, hyp_error *err);

#endif
