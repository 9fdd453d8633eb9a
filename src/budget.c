/* budget.c - the error budget of each corrected height: 1-sigma components
 * combined in quadrature. Every default and its origin is listed in
 * docs/methods.md section 4. */
#include "correct_int.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"

#include <math.h>

const char *hyp_budget_term_name(hyp_budget_term t)
{
    static const char *n[HYP_B_COUNT] = {"noise", "fit", "tcol", "rh", "interp", "clock", "horiz"};
    return t < HYP_B_COUNT ? n[t] : "?";
}

/* Model part: g^T C g with g = dh/d(parameters): c phi_j(t) for each knot,
 * dz for the scale; plus the random-walk drift away from the calibrations. */
static double fit_term(const hyp__work *w, size_t i, double dz, double c)
{
    const hyp_drift *d = &w->r->drift;
    if (d->kind == HYP_DRIFT_GNSS) {
        double tau = w->rv->time_s[i] - d->gnss_t0_s;
        double v = d->gnss_cov[0] + 2 * tau * d->gnss_cov[1] + tau * tau * d->gnss_cov[3];
        return sqrt(v + d->gnss_floor_m * d->gnss_floor_m);
    }
    double g[HYP_MAX_KNOTS + 1], phi[HYP_MAX_KNOTS];
    size_t p = d->p;
    hyp__drift_offset(d, w->rv->time_s[i], phi);
    for (size_t j = 0; j < d->n_knots && j < p; j++)
        g[j] = c * phi[j];
    if (d->has_scale)
        g[d->n_knots] = dz;
    double v = 0;
    for (size_t j = 0; j < p; j++)
        for (size_t k = 0; k < p; k++)
            v += g[j] * d->cov[j * p + k] * g[k];
    double rw = w->o->drift_rw_pa2_per_s * hyp__drift_distance_s(d, w->rv->time_s[i]);
    return sqrt(v + c * c * rw);
}

/* Distance (m) over which the horizontal gradient acts: from the nearest
 * calibration's position (whose offset absorbed the gradient there), else
 * from the base; 0 when positions are unknown. */
static double separation_m(const hyp__work *w, size_t i)
{
    double la = hyp_series_lat(w->rv, i), lo = hyp_series_lon(w->rv, i);
    if (la != la)
        return 0.0;
    double best = INFINITY;
    const hyp_correct_result *r = w->r;
    if (r->drift.kind != HYP_DRIFT_NONE && r->drift.kind != HYP_DRIFT_EXPLICIT)
        for (size_t k = 0; k < r->n_calibs; k++) {
            double d = hyp_geo_distance_m(la, lo, r->calibs[k].lat_deg, r->calibs[k].lon_deg);
            if (d == d && d < best && !r->calibs[k].rejected)   /* a rejected one calibrated nothing */
                best = d;
        }
    if (best == INFINITY)
        for (size_t k = 0; k < w->nb; k++)
            if (w->bases[k].lat_deg == w->bases[k].lat_deg)
                best = fmin(best, hyp_geo_distance_m(la, lo, w->bases[k].lat_deg, w->bases[k].lon_deg));
    return best == INFINITY ? 0.0 : best;
}

static double rh_term(const hyp__work *w, size_t i, const hyp__in *in, double dz, double tv)
{
    int measured = w->rv->rh_pct[i] == w->rv->rh_pct[i] || in->rhb == in->rhb;
    double sig = measured ? w->o->rh_sigma_pct : w->o->default_rh_sigma_pct;
    double rh = in->rhr, p = in->pb, t = in->tb;
    double hi = rh + sig > 100.0 ? 100.0 : rh + sig;
    double t1 = hyp_virtual_temperature_k(t, rh, p), t2 = hyp_virtual_temperature_k(t, hi, p);
    if (t1 != t1 || t2 != t2)
        return 0.0;
    return fabs(dz) * fabs(t2 - t1) * (sig / (hi - rh > 0 ? hi - rh : sig)) / tv;
}

/* Column term outside a calibrated bracket: the single-base prior over the
 * distance d beyond it. */
static double prior_term(const hyp__work *w, double d, double tv)
{
    double st = hypot(w->tsig_k, w->o->lapse_sigma_k_per_m * 0.5 * d);
    return fabs(d) * st / tv;
}

double hyp__budget(const hyp__work *w, size_t i, const hyp__in *in, double dz, double c, double tv,
                   double b[HYP_B_COUNT])
{
    const hyp_correct_opts *o = w->o;
    const hyp_correct_result *r = w->r;
    double rate = fabs(in->rate);
    double rn = r->rover_noise_pa, bn = r->base_noise_pa;
    b[HYP_B_FIT] = fit_term(w, i, dz, c);
    if (w->method == HYP_METHOD_TWO_BASE) {
        /* h = hL + dh x: dh/dpL = c (1 - x), dh/dpU = c x (differentiating
         * the proportion), so each base's noise and the upper base's offset
         * relative to the lower enter weighted by the position x. */
        double x = in->xfrac;
        b[HYP_B_NOISE] = c * sqrt(rn * rn / in->navg + (1 - x) * (1 - x) * bn * bn + x * x * bn * bn);
        double so = r->base_offset_sigma_pa[w->upper];
        b[HYP_B_FIT] = hypot(b[HYP_B_FIT], c * x * (so == so ? so : 0.0));
        /* inside the bracket the bases measure the column; a sub-layer's mean
         * temperature can still depart from the whole layer's (an inversion):
         * dh x (1 - x) 2 sigma_c / Tv, largest mid-way; outside, the prior
         * over the distance beyond the nearer base */
        double dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m;
        if (x >= 0 && x <= 1)
            b[HYP_B_TCOL] = dh * x * (1 - x) * 2.0 * o->curvature_sigma_k / tv;
        else
            b[HYP_B_TCOL] = prior_term(w, x < 0 ? x * dh : (x - 1) * dh, tv);
    } else {
        b[HYP_B_NOISE] = c * sqrt(rn * rn / in->navg + bn * bn);
        /* A column temperature error dT shifts heights by dz dT / Tv; an
         * offset calibrated at height difference dz_ref absorbs dz_ref dT / Tv
         * of it, leaving (dz - dz_ref) dT / Tv. */
        b[HYP_B_TCOL] = w->tcol_scaled ? 0.0 : prior_term(w, dz - w->dz_ref_m, tv);
        if (w->method == HYP_METHOD_SINGLE) {
            double so = r->base_offset_sigma_pa[w->ref];
            if (so == so && so > 0)
                b[HYP_B_FIT] = hypot(b[HYP_B_FIT], c * so);
        }
    }
    b[HYP_B_RH] = rh_term(w, i, in, dz, tv);
    b[HYP_B_INTERP] = c * rate * in->dt_base / sqrt(12.0);
    b[HYP_B_CLOCK] = c * rate * o->clock_sigma_s;
    double grad = hypot(o->gradient_sigma_pa_per_m, rate / o->front_speed_m_s);
    b[HYP_B_HORIZ] = c * hypot(grad * separation_m(w, i), w->field_sigma_pa);
    double ss = 0;
    for (int k = 0; k < HYP_B_COUNT; k++)
        ss += b[k] * b[k];
    return sqrt(ss);
}
