/* budget.c - the error budget of each corrected height: 1-sigma components
 * combined in quadrature. Every default and its origin is listed in
 * docs/methods.md section 4. */
#include "correct_int.h"
#include "baro_altitude.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"

#include <math.h>

#define PI 3.14159265358979323846

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

/* Base pressure at true time x by linear interpolation, searched from
 * interval k (a hint near x); beyond the log, its end value carried on by
 * the end's tendency. Gaps are bridged: this is for the budget only. */
static double base_p_at(const hyp__base_view *b, size_t k, double x)
{
    size_t n = b->n;
    if (x <= b->t[0])
        return b->p[0] + b->rate[0] * (x - b->t[0]);
    if (x >= b->t[n - 1])
        return b->p[n - 1] + b->rate[n - 1] * (x - b->t[n - 1]);
    double step = (b->t[n - 1] - b->t[0]) / (double)(n - 1);
    double g = (double)k + floor((x - b->t[k]) / step);
    size_t lo = g < 0 ? 0 : g > (double)(n - 2) ? n - 2 : (size_t)g;
    for (int walk = 0; walk < 8 && !(b->t[lo] <= x && x <= b->t[lo + 1]); walk++)
        lo = b->t[lo] > x ? lo - 1 : lo + 1;
    if (!(b->t[lo] <= x && x <= b->t[lo + 1])) {   /* an irregular log: bisect */
        size_t hi = n - 1;
        lo = 0;
        while (hi - lo > 1) {
            size_t mid = lo + (hi - lo) / 2;
            *(b->t[mid] <= x ? &lo : &hi) = mid;
        }
    }
    double f = (x - b->t[lo]) / (b->t[lo + 1] - b->t[lo]);
    return b->p[lo] + f * (b->p[lo + 1] - b->p[lo]);
}

/* The calibration whose offset the model applies at t most (the nearest in
 * time of those the fit used), NULL when the level comes from no
 * calibration at a place. */
static const hyp_calib *calib_at(const hyp__work *w, double t)
{
    const hyp_correct_result *r = w->r;
    if (r->drift.kind == HYP_DRIFT_NONE || r->drift.kind == HYP_DRIFT_EXPLICIT || r->drift.kind == HYP_DRIFT_GNSS)
        return NULL;
    const hyp_calib *best = NULL;
    double bd = INFINITY;
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        double d = fabs(0.5 * (c->start_s + c->end_s) - t);
        if (c->lat_deg == c->lat_deg && d < bd && !c->rejected)
            bd = d, best = c;
    }
    return best;
}

/* A pressure pattern moving at speed v (a front, a trough) over the base
 * reaches a place s metres further along its motion s / v later, so the
 * rover sees now what the base saw then: p_r(t) - p_b(t) = p_b(t - s_r / v)
 * - p_b(t), s_r the rover's distance from the base along the (unknown)
 * direction of motion. A calibration at (t_c, s_c) absorbed the same
 * difference there and then; what is left at the rover is
 *   E = [p_b(t - s_r/v) - p_b(t)] - [p_b(t_c - s_c/v) - p_b(t_c)],
 * read off the base's own log. Its mean square over eight directions of
 * motion (uniform: no direction is preferred), less the base noise the
 * two or four interpolated pressures carry, is the moving-pattern
 * variance (Pa^2). For a steady tendency dp/dt it is
 * (dp/dt d / v)^2 / 2, d the rover-calibration distance: the mean of
 * cos^2 over the directions. */
/* East and north (m) of (lat, lon) from (lat0, lon0) on the local plane
 * (equirectangular, mean Earth radius 6371008.8 m, IUGG: under 0.1 % over
 * the few tens of kilometres a budget term needs). */
static void plane_en(double lat0, double lon0, double lat, double lon, double *e, double *n)
{
    const double r = 6371008.8, rad = PI / 180.0;
    *n = (lat - lat0) * rad * r;
    *e = (lon - lon0) * rad * r * cos(0.5 * (lat + lat0) * rad);
}

static double moving_var(const hyp__work *w, size_t i, const hyp__in *in, double v)
{
    const hyp_base *b = &w->bases[w->method == HYP_METHOD_SINGLE ? 0 : w->ref];
    double t = w->rv->time_s[i], la = hyp_series_lat(w->rv, i), lo = hyp_series_lon(w->rv, i);
    double er, nr, ec = 0.0, nc = 0.0, tc = t;
    if (b->lat_deg != b->lat_deg)
        return NAN;
    plane_en(b->lat_deg, b->lon_deg, la, lo, &er, &nr);
    const hyp_calib *c = calib_at(w, t);
    if (c) {
        plane_en(b->lat_deg, b->lon_deg, c->lat_deg, c->lon_deg, &ec, &nc);
        tc = 0.5 * (c->start_s + c->end_s);
    }
    int cal = c && hypot(ec, nc) > 0.0;
    const hyp__base_view *bv = &w->bv;
    size_t k = in->hint;
    double p0 = base_p_at(bv, k, t), pc0 = base_p_at(bv, k, tc), ss = 0.0;
    /* directions 45 degrees apart: (sin, cos) of j pi / 4 */
    static const double sn[8] = {0, 0.70710678118654752, 1, 0.70710678118654752, 0, -0.70710678118654752, -1, -0.70710678118654752};
    for (int j = 0; j < 8; j++) {
        double ue = sn[j], un = sn[(j + 2) % 8];   /* the unit vector of motion */
        double e = base_p_at(bv, k, t - (er * ue + nr * un) / v) - p0;
        if (cal)
            e -= base_p_at(bv, k, tc - (ec * ue + nc * un) / v) - pc0;
        ss += e * e;
    }
    double bn = w->r->base_noise_pa;
    return fmax(0.0, ss / 8.0 - (cal ? 4.0 : 2.0) * bn * bn);
}

/* Horizontal term (Pa): a gradient that stays put, G over the distance
 * from the calibration (the synoptic scale, see correct.h), the moving
 * pattern as read off the base log, and the field method's scatter. */
static double horiz_pa(const hyp__work *w, size_t i, const hyp__in *in)
{
    const hyp_correct_opts *o = w->o;
    double d = separation_m(w, i), v = o->front_speed_m_s;
    double mv = d > 0.0 ? moving_var(w, i, in, v) : 0.0;
    if (mv != mv) {   /* no base position: the tendency as a moving gradient */
        double g = fabs(in->rate) / v * d;
        mv = 0.5 * g * g;
    }
    double s = o->gradient_sigma_pa_per_m * d;
    return sqrt(s * s + mv + w->field_sigma_pa * w->field_sigma_pa);
}

/* The base's tendency at the rover time (Pa/s): the larger of the hourly
 * slope and the change over the ten minutes around it, less the base
 * noise that change carries (2 sigma_b^2 / (600 s)^2), so a sharp rise
 * that the hourly fit smooths out still counts. */
static double local_rate(const hyp__work *w, size_t i, const hyp__in *in)
{
    const double half_s = 300.0;
    double t = w->rv->time_s[i], bn = w->r->base_noise_pa;
    double s = (base_p_at(&w->bv, in->hint, t + half_s) - base_p_at(&w->bv, in->hint, t - half_s)) / (2.0 * half_s);
    double v = s * s - 2.0 * bn * bn / (4.0 * half_s * half_s), h = fabs(in->rate);
    return v > h * h ? sqrt(v) : h;
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

/* The mean square height above the base (m^2) of where the level was set:
 * the calibrations' (as the mean height dz_ref is theirs) or the
 * GNSS-anchored samples'. */
static double level_dz2(const hyp__work *w)
{
    const hyp_correct_result *r = w->r;
    if (r->drift.kind == HYP_DRIFT_GNSS)
        return r->level_dz2_m2;
    if (r->drift.kind < HYP_DRIFT_CONSTANT || !r->n_calibs)
        return 0.0;
    double s = 0.0, n = 0.0;
    for (size_t k = 0; k < r->n_calibs; k++)
        if (!r->calibs[k].rejected) {   /* over the calibrations the fit used, as dz_ref */
            double d = r->calibs[k].known_m - w->base->height_m;
            s += d * d, n++;
        }
    return n > 0 ? s / n : 0.0;
}

/* Column term of a single-base height dz above the base. A column whose
 * base-end temperature is off by dT_b and whose lapse rate is off by dG
 * has a mean temperature off by dT_b + dG dz / 2, so heights are off by
 * (dT_b dz + dG dz^2 / 2) / Tv; a level set where the heights above the
 * base average dz_ref (and their squares q_ref) absorbs the same there,
 * leaving sqrt((s_T (dz - dz_ref))^2 + (s_G (dz^2 - q_ref) / 2)^2) / Tv. */
static double column_term(const hyp__work *w, double dz, double tv)
{
    double a = w->tsig_k * (dz - w->dz_ref_m);
    double b = 0.5 * w->o->lapse_sigma_k_per_m * (dz * dz - level_dz2(w));
    return hypot(a, b) / tv;
}

/* Column term outside a calibrated bracket: the single-base prior over the
 * distance d beyond it. */
static double prior_term(const hyp__work *w, double d, double tv)
{
    double st = hypot(w->tsig_k, w->o->lapse_sigma_k_per_m * 0.5 * d);
    return fabs(d) * st / tv;
}

/* A barometric-altitude track's re-settings (baro_altitude.c): each
 * joining error lies between a point and the calibration nearest in time
 * that fixes the offset there (the track's start when none), Pa. */
static double baro_join_pa(const hyp__work *w, size_t i)
{
    const hyp_correct_opts *o = w->o;
    if (!o->n_baro_steps)
        return 0.0;
    double t = w->rv->time_s[i], ref = w->rv->time_s[0], bd = INFINITY;
    for (size_t k = 0; k < w->r->n_calibs; k++) {
        const hyp_calib *cb = &w->r->calibs[k];
        double m = 0.5 * (cb->start_s + cb->end_s);
        if (!cb->rejected && fabs(m - t) < bd)
            bd = fabs(m - t), ref = m;
    }
    return w->rv->pressure_pa[i] * sqrt(hyp__baro_join_var(o->baro_steps, o->n_baro_steps, t, ref));
}

double hyp__budget(const hyp__work *w, size_t i, const hyp__in *in, double dz, double c, double tv,
                   double b[HYP_B_COUNT])
{
    const hyp_correct_opts *o = w->o;
    const hyp_correct_result *r = w->r;
    double rate = local_rate(w, i, in);
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
        b[HYP_B_TCOL] = w->tcol_scaled ? 0.0 : column_term(w, dz, tv);
        if (w->method == HYP_METHOD_SINGLE) {
            double so = r->base_offset_sigma_pa[w->ref];
            if (so == so && so > 0)
                b[HYP_B_FIT] = hypot(b[HYP_B_FIT], c * so);
        }
    }
    if (w->o->n_baro_steps)
        b[HYP_B_FIT] = hypot(b[HYP_B_FIT], c * baro_join_pa(w, i));
    if (w->o->baro_offset_sigma_pa > 0)   /* docs/methods.md, "Barometric-altitude tracks" */
        b[HYP_B_FIT] = hypot(b[HYP_B_FIT], fabs(dz) * w->o->baro_offset_sigma_pa / w->rv->pressure_pa[i]);
    b[HYP_B_RH] = rh_term(w, i, in, dz, tv);
    b[HYP_B_INTERP] = c * rate * in->dt_base / sqrt(12.0);
    b[HYP_B_CLOCK] = c * rate * o->clock_sigma_s;
    b[HYP_B_HORIZ] = c * horiz_pa(w, i, in);
    double ss = 0;
    for (int k = 0; k < HYP_B_COUNT; k++)
        ss += b[k] * b[k];
    return sqrt(ss);
}
