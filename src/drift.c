/* drift.c - the rover-minus-base offset as a function of time, and a scale
 * on the height difference, fitted by weighted least squares to every
 * calibration (co-locations and benchmark ties).
 *
 * Model, per calibration k with raw height r_k (no offset, no scale) over a
 * window around time t_k, known height H_k and sensitivity c_k = dh/dp:
 *   H_k - r_k = c_k * offset(t_k) + s * (r_k - h_base)
 * offset(t) = sum_j a_j phi_j(t), phi the piecewise-linear "hat" basis on the
 * knots. Linear in (a, s), solved by lsq.c.
 *
 * The rule (docs/methods.md): calibrations within 20 minutes form one epoch;
 * one epoch: a constant offset; two or more: a straight line between the
 * first and last; three or more whose straight-line fit leaves a reduced
 * chi-square above 4: piecewise linear with a knot at every epoch. The scale
 * joins when the known heights span at least scale_min_span_m and there are
 * three or more calibrations. A fit whose column-scaled design has a
 * condition number above max_condition drops the scale, then knots, and says
 * so. With more observations than parameters the covariance is inflated by
 * the reduced chi-square when that exceeds 1.
 *
 * Before the fit the calibrations are tested against each other
 * (calib_test.c, through the adjustment engine): a rejected one is left
 * out of the fit. The estimate stays with this rule and the SVD rather
 * than the test's model: with no rejection the offset, its covariance and
 * every height are what they were before the test existed, and the
 * budget's fit term keeps the covariance it was built on; the engine's job
 * is the test. When the test cannot tell which calibration is wrong, the
 * knots' covariance is widened by the suspects' range of offsets over
 * sqrt(2) (fully correlated: an unknown common offset), so the sigmas
 * cover either being right. */
#include "correct_int.h"
#include "calib_test.h"
#include "svd_solve.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define EPOCH_S 1200.0

/* The calibrations the fit uses (those the test did not reject). */
typedef struct calset {
    const hyp_calib *c;
    size_t n;
} calset;

static double clampd(double x, double lo, double hi)
{
    return x < lo ? lo : x > hi ? hi : x;
}

double hyp__drift_offset(const hyp_drift *d, double t, double *phi)
{
    size_t n = d->n_knots;
    if (phi)
        for (size_t j = 0; j < n; j++)
            phi[j] = 0.0;
    if (n == 0)
        return 0.0;
    if (n == 1) {
        if (phi)
            phi[0] = 1.0;
        return d->knot_pa[0];
    }
    t = clampd(t, d->t_lo_s, d->t_hi_s);
    size_t k = 0;
    while (k + 2 < n && t > d->knot_s[k + 1])
        k++;
    double w = (t - d->knot_s[k]) / (d->knot_s[k + 1] - d->knot_s[k]);
    if (phi) {
        phi[k] = 1.0 - w;
        phi[k + 1] = w;
    }
    return (1.0 - w) * d->knot_pa[k] + w * d->knot_pa[k + 1];
}

double hyp__drift_distance_s(const hyp_drift *d, double t)
{
    /* Variance of a random-walk drift not captured by the model, in units of
     * time: growing with the distance from the calibrated span, and inside
     * it a Brownian bridge (t - a)(b - t) / (b - a) between the knots that
     * pin it (Karatzas and Shreve, Brownian Motion and Stochastic Calculus,
     * section 5.6.B). */
    size_t n = d->n_knots;
    if (d->kind == HYP_DRIFT_NONE || d->kind == HYP_DRIFT_EXPLICIT || n == 0)
        return 0.0;
    if (n == 1)
        return fabs(t - d->knot_s[0]);
    if (t <= d->knot_s[0])
        return d->knot_s[0] - t;
    if (t >= d->knot_s[n - 1])
        return t - d->knot_s[n - 1];
    size_t k = 0;
    while (k + 2 < n && t > d->knot_s[k + 1])
        k++;
    double a = d->knot_s[k], b = d->knot_s[k + 1];
    return (t - a) * (b - t) / (b - a);
}

static double mid(const hyp_calib *c)
{
    return 0.5 * (c->start_s + c->end_s);
}

/* Epoch times: calibrations (sorted by time) closer than EPOCH_S merge. */
static size_t epochs(const calset *cs, double *t)
{
    size_t e = 0, cnt = 0;
    double sum = 0, last = -INFINITY;
    for (size_t k = 0; k < cs->n; k++) {
        double m = mid(&cs->c[k]);
        if (m - last > EPOCH_S && cnt) {
            if (e < HYP_MAX_KNOTS)
                t[e++] = sum / (double)cnt;
            sum = 0;
            cnt = 0;
        }
        sum += m;
        cnt++;
        last = m;
    }
    if (cnt && e < HYP_MAX_KNOTS)
        t[e++] = sum / (double)cnt;
    return e;
}

/* One weighted fit with the given knots (and scale). */
static hyp_status try_fit(hyp__work *w, const calset *cs, hyp_drift *d, const double *knots, size_t nk, int scale)
{
    size_t m = cs->n, p = nk + (size_t)scale;
    if (m < p || p > HYP_LSQ_MAXP)
        return HYP_ERR_VALUE;
    double a[64 * HYP_LSQ_MAXP], b[64];
    if (m > 64)
        return HYP_ERR_VALUE;
    hyp_drift trial = *d;
    trial.n_knots = nk;
    memcpy(trial.knot_s, knots, nk * sizeof *knots);
    for (size_t k = 0; k < m; k++) {
        const hyp_calib *c = &cs->c[k];
        double s = hyp__calib_sigma_m(c), phi[HYP_MAX_KNOTS];
        hyp__drift_offset(&trial, mid(c), phi);
        for (size_t j = 0; j < nk; j++)
            a[k * p + j] = c->sens_m_per_pa * phi[j] / s;
        if (scale)
            a[k * p + nk] = (c->raw_m - w->base->height_m) / s;
        b[k] = (c->known_m - c->raw_m) / s;
    }
    hyp__lsq fit;
    hyp_status st = hyp__lsq_solve(a, b, m, p, &fit);
    d->condition = fit.cond;
    if (st || fit.cond > w->o->max_condition)
        return HYP_ERR_VALUE;
    *d = trial;
    d->condition = fit.cond;
    for (size_t j = 0; j < nk; j++)
        d->knot_pa[j] = fit.x[j];
    d->has_scale = scale;
    d->scale = scale ? fit.x[nk] : 0.0;
    d->p = p;
    d->chi2 = fit.chi2;
    d->dof = m - p;
    d->inflation = 1.0;
    if (d->dof > 0 && fit.chi2 / (double)d->dof > 1.0)
        d->inflation = sqrt(fit.chi2 / (double)d->dof);
    for (size_t i = 0; i < p * p; i++)
        d->cov[i] = fit.cov[i] * d->inflation * d->inflation;
    d->scale_sigma = scale ? sqrt(d->cov[nk * p + nk]) : 0.0;
    return HYP_OK;
}

static void note(hyp_drift *d, const char *text)
{
    size_t l = strlen(d->note);
    snprintf(d->note + l, sizeof d->note - l, "%s%s", l ? "; " : "", text);
}

/* Fits with the scale if wanted, else (or if that is ill-conditioned)
 * without; 0 on success. */
static int fit_kind(hyp__work *w, const calset *cs, hyp_drift *d, const double *knots, size_t nk, int want_scale)
{
    if (want_scale) {
        /* The scale is kept only when the ties determine it better than the
         * prior on the column temperature does (sigma_T / Tv at 285 K):
         * otherwise drift and scale are not separated (ties on a steady
         * climb, where height grows with time) and the fit would only
         * trade one for the other. */
        double prior = w->tsig_k / 285.0;
        hyp_drift trial = *d;
        if (try_fit(w, cs, &trial, knots, nk, 1) == HYP_OK && trial.scale_sigma < prior) {
            *d = trial;
            return 0;
        }
        char buf[200];
        snprintf(buf, sizeof buf, "column scale not estimated: the ties do not separate it from the drift (condition %.1e, scale sigma %.2f %% against a prior of %.2f %%)",
                 trial.condition, 100.0 * trial.scale_sigma, 100.0 * prior);
        note(d, buf);
    }
    return try_fit(w, cs, d, knots, nk, 0) == HYP_OK ? 0 : -1;
}

static double height_span(const calset *cs)
{
    double lo = INFINITY, hi = -INFINITY;
    for (size_t k = 0; k < cs->n; k++) {
        lo = fmin(lo, cs->c[k].known_m);
        hi = fmax(hi, cs->c[k].known_m);
    }
    return cs->n ? hi - lo : 0.0;
}

static hyp_status fit_calibrated(hyp__work *w, const calset *cs, hyp_drift *d)
{
    double ep[HYP_MAX_KNOTS] = {0};
    size_t e = epochs(cs, ep);
    d->t_lo_s = cs->c[0].start_s;
    d->t_hi_s = cs->c[0].end_s;
    for (size_t k = 0; k < cs->n; k++)
        d->t_hi_s = fmax(d->t_hi_s, cs->c[k].end_s);
    int want_scale = cs->n >= 3 && height_span(cs) >= w->o->scale_min_span_m;
    double line[2] = {ep[0], ep[e - 1]};
    if (e >= 2 && fit_kind(w, cs, d, line, 2, want_scale) == 0) {
        d->kind = HYP_DRIFT_LINEAR;
        note(d, "linear drift between the first and last calibration");
        if (e >= 3 && d->dof > 0 && d->chi2 / (double)d->dof > 4.0) {
            hyp_drift pw = *d;
            pw.note[0] = '\0';
            if (fit_kind(w, cs, &pw, ep, e, want_scale) == 0) {
                char buf[160];
                snprintf(buf, sizeof buf, "straight line misfits (reduced chi-square %.1f): piecewise linear through %zu epochs",
                         d->chi2 / (double)d->dof, e);
                *d = pw;
                d->kind = HYP_DRIFT_PIECEWISE;
                note(d, buf);
            }
        }
        return HYP_OK;
    }
    if (e >= 2)
        note(d, "drift not estimable (ill-conditioned): constant offset");
    double one = 0.5 * (d->t_lo_s + d->t_hi_s);
    if (fit_kind(w, cs, d, &one, 1, want_scale) == 0) {
        d->kind = HYP_DRIFT_CONSTANT;
        d->t_lo_s = d->t_hi_s = one;
        note(d, e >= 2 ? "constant offset" : "constant offset (calibrations within 20 minutes of each other)");
        return HYP_OK;
    }
    return HYP_ERR_VALUE;
}

/* Every calibration untested, the test not run. */
static void test_clear(hyp_correct_result *r)
{
    memset(&r->calib_test, 0, sizeof r->calib_test);
    r->calib_test.s0_sq = r->calib_test.s0_sq_lower = r->calib_test.s0_sq_upper = NAN;
    for (size_t k = 0; k < r->n_calibs; k++) {
        hyp_calib *c = &r->calibs[k];
        c->test_w = c->test_redundancy = NAN;
        c->rejected = c->suspect = 0;
        c->test_note[0] = '\0';
    }
}

/* The test cannot tell which calibration is wrong: every knot gets a
 * common offset uncertainty (calib_test.c: the suspects' range over
 * sqrt(2)). */
static void widen(hyp_drift *d, double spread_pa)
{
    if (!(spread_pa > 0))
        return;
    for (size_t j = 0; j < d->n_knots; j++)
        for (size_t k = 0; k < d->n_knots; k++)
            d->cov[j * d->p + k] += spread_pa * spread_pa;
    char buf[160];
    snprintf(buf, sizeof buf, "the calibrations disagree and the test cannot tell which is wrong: "
             "sigma widened by %.2f hPa", spread_pa / 100.0);
    note(d, buf);
}

/* The test, then the fit on the calibrations it kept. */
static hyp_status fit_tested(hyp__work *w, hyp_drift *d, hyp_error *err)
{
    hyp_correct_result *r = w->r;
    hyp_status st = hyp__calib_test(w, err);
    if (st)
        return st;
    hyp_calib *kept = malloc(r->n_calibs * sizeof *kept);
    if (!kept)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    calset cs = {kept, 0};
    for (size_t k = 0; k < r->n_calibs; k++)
        if (!r->calibs[k].rejected)
            kept[cs.n++] = r->calibs[k];
    st = fit_calibrated(w, &cs, d);
    free(kept);
    if (st)
        return hyp_error_set(err, HYP_ERR_NODATA, "the calibrations do not determine an offset (ill-conditioned fit)");
    if (r->calib_test.state == HYP_CALTEST_UNRESOLVED)
        widen(d, r->calib_test.spread_pa);
    return HYP_OK;
}

hyp_status hyp__fit_drift(hyp__work *w, hyp_error *err)
{
    hyp_drift *d = &w->r->drift;
    memset(d, 0, sizeof *d);
    test_clear(w->r);
    d->n_knots = 1;
    d->p = 1;
    d->inflation = 1.0;
    const hyp_correct_opts *o = w->o;
    if (o->offset_pa == o->offset_pa) {
        d->kind = HYP_DRIFT_EXPLICIT;
        d->knot_pa[0] = o->offset_pa;
        d->cov[0] = o->offset_sigma_pa * o->offset_sigma_pa;
        note(d, "offset given (--offset); calibrations only reported");
        return HYP_OK;
    }
    if (w->r->n_calibs == 0) {
        d->kind = HYP_DRIFT_NONE;
        d->cov[0] = o->uncal_offset_sigma_pa * o->uncal_offset_sigma_pa;
        note(d, "no calibration: offset taken as 0");
        return HYP_OK;
    }
    hyp_status st = fit_tested(w, d, err);
    if (st)
        return st;
    if (d->n_knots >= 2)
        d->rate_pa_per_s = (d->knot_pa[d->n_knots - 1] - d->knot_pa[0]) / (d->knot_s[d->n_knots - 1] - d->knot_s[0]);
    /* dz (1 + s) = dz Tv' / Tv: a scale s is a column temperature error of
     * s Tv; 285 K is a nominal column (15 K below ISA sea level: a rough
     * figure for a field day at height, common practice, no source) */
    d->scale_tcol_k = d->has_scale ? d->scale * 285.0 : 0.0;
    return HYP_OK;
}
