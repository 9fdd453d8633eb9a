/* correct.c - the single-base correction, orchestrated: base log aligned to
 * the rover's times, column inputs, raw heights, calibrations and the drift
 * fit (calib.c, drift.c), corrected heights from the hypsometric equation,
 * and the error budget (budget.c). */
#include "correct_int.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/timeparse.h"
#include "stats.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void hyp_correct_opts_init(hyp_correct_opts *o)
{
    memset(o, 0, sizeof *o);
    o->offset_pa = NAN;
    o->auto_colocate = 1;
    o->coloc_radius_m = 30.0;
    o->coloc_min_s = 300.0;
    o->max_gap_s = 180.0;
    o->tcol = HYP_TCOL_BASE_LAPSE;
    o->lapse_k_per_m = -0.0065;
    o->tcol_sigma_k = 0.5;
    o->lapse_sigma_k_per_m = 0.001;
    o->default_rh_pct = 50.0;
    o->default_rh_sigma_pct = 30.0;
    o->uncal_offset_sigma_pa = 150.0;
    o->tie_radius_m = 30.0;
    o->tie_min_s = 60.0;
    o->stationary_m = 15.0;
    o->scale_min_span_m = 200.0;
    o->max_condition = 1e6;
    o->drift_rw_pa2_per_s = 4.0 / 3600.0;
    o->gradient_sigma_pa_per_m = 100.0 / 100000.0;
    o->front_speed_m_s = 30.0 / 3.6;
    o->clock_sigma_s = 2.0;
    o->rh_sigma_pct = 5.0;
    o->rapid_pa_per_s = 100.0 / 3600.0;
    o->clock_max_lag_s = 600.0;
    o->gnss_anchor = 1;
    o->gnss_bias_sigma_m = 1.0;
    o->method = HYP_METHOD_AUTO;
    o->base_colocate.start_s = o->base_colocate.end_s = NAN;
    o->extrapolate_min_m = 100.0;
    o->extrapolate_frac = 0.25;
    o->curvature_sigma_k = 1.0;
    o->qnh_sigma_pa = 100.0 / sqrt(12.0);   /* 1 hPa reporting resolution, uniform */
}

void hyp_base_init(hyp_base *b, const hyp_series *log, const char *name, double height_m)
{
    memset(b, 0, sizeof *b);
    b->log = log;
    b->name = name;
    b->height_m = height_m;
    b->lat_deg = b->lon_deg = NAN;
    b->kind = HYP_BASE_STATION;
    b->offset_pa = NAN;
}

const char *hyp_method_name(hyp_method m)
{
    switch (m) {
    case HYP_METHOD_AUTO: return "automatic";
    case HYP_METHOD_SINGLE: return "single base";
    case HYP_METHOD_TWO_BASE: return "two-base";
    case HYP_METHOD_FIELD: return "pressure field";
    }
    return "?";
}

void hyp_correct_result_init(hyp_correct_result *r)
{
    memset(r, 0, sizeof *r);
}

void hyp_correct_result_free(hyp_correct_result *r)
{
    free(r->height_m);
    free(r->sigma_m);
    free(r->base_p_pa);
    free(r->offset_pa);
    free(r->tcol_k);
    free(r->status);
    for (int k = 0; k < HYP_B_COUNT; k++)
        free(r->budget_m[k]);
    free(r->calibs);
    free(r->rapid);
    free(r->extrapolated);
    hyp_correct_result_init(r);
}

const char *hyp_point_status_text(hyp_point_status s)
{
    switch (s) {
    case HYP_PT_OK: return "ok";
    case HYP_PT_REFUSED: return "sample refused by the reader";
    case HYP_PT_OUTSIDE_BASE: return "time outside the base log";
    case HYP_PT_BASE_GAP: return "gap in the base log";
    case HYP_PT_NO_CONVERGE: return "height could not be computed";
    case HYP_PT_EXTRAPOLATION: return "too far outside the two bases' heights";
    case HYP_PT_STATUS_COUNT: break;
    }
    return "unknown";
}

/* ---- memory ---- */

static double *dalloc(size_t n)
{
    return malloc((n ? n : 1) * sizeof(double));
}

void hyp__base_view_free(hyp__base_view *b)
{
    free(b->t);
    free(b->p);
    free(b->temp);
    free(b->rh);
    free(b->rate);
    memset(b, 0, sizeof *b);
}

static void work_free(hyp__work *w)
{
    for (size_t k = 0; k < HYP__MAX_BASES; k++)
        hyp__base_view_free(&w->bvs[k]);
    free(w->pU);
    free(w->xfrac);
    free(w->pr);
    free(w->navg);
    free(w->rate);
    free(w->dt_base);
    free(w->tb);
    free(w->rhb);
    free(w->rhr);
    free(w->raw);
    free(w->sens);
    free(w->tv);
}

static hyp_status work_alloc(hyp__work *w)
{
    size_t n = w->n;
    hyp_correct_result *r = w->r;
    w->pU = dalloc(n), w->xfrac = dalloc(n);
    r->extrapolated = calloc(n ? n : 1, 1);
    w->pr = dalloc(n), w->navg = dalloc(n), w->rate = dalloc(n), w->dt_base = dalloc(n);
    w->tb = dalloc(n), w->rhb = dalloc(n), w->rhr = dalloc(n);
    w->raw = dalloc(n), w->sens = dalloc(n), w->tv = dalloc(n);
    r->count = n;
    r->height_m = dalloc(n), r->sigma_m = dalloc(n), r->base_p_pa = dalloc(n);
    r->offset_pa = dalloc(n), r->tcol_k = dalloc(n);
    r->status = malloc(n ? n : 1);
    int bad = !w->pU || !w->xfrac || !r->extrapolated || !w->pr || !w->navg || !w->rate ||
              !w->dt_base || !w->tb || !w->rhb || !w->rhr || !w->raw || !w->sens || !w->tv ||
              !r->height_m || !r->sigma_m || !r->base_p_pa || !r->offset_pa || !r->tcol_k || !r->status;
    for (int k = 0; k < HYP_B_COUNT; k++)
        bad |= !(r->budget_m[k] = dalloc(n));
    if (bad)
        return HYP_ERR_NOMEM;
    for (size_t i = 0; i < n; i++) {
        r->height_m[i] = r->sigma_m[i] = r->base_p_pa[i] = r->offset_pa[i] = r->tcol_k[i] = NAN;
        for (int k = 0; k < HYP_B_COUNT; k++)
            r->budget_m[k][i] = NAN;
    }
    return HYP_OK;
}

/* ---- the base log ---- */

/* Hourly tendency at each base sample: least-squares slope over the
 * samples within 30 minutes either side (robust to white noise, which the
 * slope of two neighbours is not). */
static void base_rates(hyp__base_view *b)
{
    size_t lo = 0, hi = 0;
    double st = 0, sp = 0, stt = 0, stp = 0;
    for (size_t i = 0; i < b->n; i++) {
        double t0 = b->t[i];
        while (hi < b->n && b->t[hi] <= t0 + 1800.0) {
            double t = b->t[hi] - b->t[0];
            st += t, sp += b->p[hi], stt += t * t, stp += t * b->p[hi];
            hi++;
        }
        while (b->t[lo] < t0 - 1800.0) {
            double t = b->t[lo] - b->t[0];
            st -= t, sp -= b->p[lo], stt -= t * t, stp -= t * b->p[lo];
            lo++;
        }
        double n = (double)(hi - lo), den = n * stt - st * st;
        b->rate[i] = n >= 3 && den > 0 ? (n * stp - st * sp) / den : 0.0;
    }
}

hyp_status hyp__base_view_make(const hyp_base *base, hyp__base_view *b, hyp_error *err)
{
    const hyp_series *s = base->log;
    size_t m = s->count;
    memset(b, 0, sizeof *b);
    b->t = dalloc(m), b->p = dalloc(m), b->temp = dalloc(m), b->rh = dalloc(m), b->rate = dalloc(m);
    if (!b->t || !b->p || !b->temp || !b->rh || !b->rate)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    double off = base->offset_pa == base->offset_pa ? base->offset_pa : 0.0;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        double p = s->pressure_pa[i];
        if (base->kind == HYP_BASE_QNH)   /* ICAO standard-atmosphere reduction */
            p = hyp_station_from_qnh_pa(p, base->height_m);
        b->t[b->n] = s->time_s[i] - base->clock_offset_s;
        b->p[b->n] = p - off;
        b->temp[b->n] = s->temp_k[i];
        b->rh[b->n] = s->rh_pct[i];
        b->n++;
    }
    if (b->n < 2)
        return hyp_error_set(err, HYP_ERR_NODATA, "%s: fewer than two usable base samples", base->name);
    base_rates(b);
    return HYP_OK;
}

static double lerp(const double *v, size_t k, double w)
{
    double a = v[k], b = v[k + 1];
    if (a != a)
        return b;
    if (b != b)
        return a;
    return a + w * (b - a);
}

static hyp_point_status bracket(const hyp__base_view *b, double x, double max_gap_s, size_t *k, double *w);

hyp_point_status hyp__base_at(const hyp__base_view *b, const double *v, double x, double max_gap_s, double *out)
{
    size_t k;
    double f;
    hyp_point_status st = bracket(b, x, max_gap_s, &k, &f);
    *out = st ? NAN : lerp(v, k, f);
    return st;
}

static hyp_point_status bracket(const hyp__base_view *b, double x, double max_gap_s, size_t *k, double *w)
{
    if (!(x >= b->t[0] && x <= b->t[b->n - 1]))
        return HYP_PT_OUTSIDE_BASE;
    size_t lo = 0, hi = b->n - 1;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (b->t[mid] <= x)
            lo = mid;
        else
            hi = mid;
    }
    double dt = b->t[lo + 1] - b->t[lo];
    if (dt > max_gap_s && x != b->t[lo] && x != b->t[lo + 1])
        return HYP_PT_BASE_GAP;
    *k = lo;
    *w = dt > 0.0 ? (x - b->t[lo]) / dt : 0.0;
    return HYP_PT_OK;
}

static double pick(double a, double b, double c)
{
    return a == a ? a : b == b ? b : c;
}

static void align(hyp__work *w)
{
    const hyp_series *rv = w->rv;
    hyp_correct_result *r = w->r;
    for (size_t i = 0; i < w->n; i++) {
        r->status[i] = HYP_PT_OK;
        if (rv->flag[i]) {
            r->status[i] = HYP_PT_REFUSED;
            r->n_flag[rv->flag[i]]++;
            continue;
        }
        size_t k;
        double f;
        hyp_point_status st = bracket(&w->bv, rv->time_s[i], w->o->max_gap_s, &k, &f);
        if (st) {
            r->status[i] = (uint8_t)st;
            continue;
        }
        const hyp__base_view *b = &w->bv;
        r->base_p_pa[i] = b->p[k] + f * (b->p[k + 1] - b->p[k]);
        w->rate[i] = b->rate[k] + f * (b->rate[k + 1] - b->rate[k]);
        w->dt_base[i] = b->t[k + 1] - b->t[k];
        double rhb = lerp(b->rh, k, f);
        w->tb[i] = lerp(b->temp, k, f);
        w->rhr[i] = pick(rv->rh_pct[i], rhb, w->o->default_rh_pct);
        w->rhb[i] = pick(rhb, rv->rh_pct[i], w->o->default_rh_pct);
    }
}

/* Centred moving average of the rover pressure over smooth_s (white noise
 * falls as 1/sqrt(samples averaged); a height change faster than the window
 * is smoothed with it). */
static void smooth(hyp__work *w)
{
    const hyp_series *rv = w->rv;
    double half = 0.5 * w->o->smooth_s;
    size_t lo = 0, hi = 0;
    double sum = 0;
    size_t cnt = 0;
    for (size_t i = 0; i < w->n; i++) {
        w->pr[i] = rv->pressure_pa[i];
        w->navg[i] = 1.0;
        if (half <= 0 || rv->flag[i])
            continue;
        double t = rv->time_s[i];
        while (hi < w->n && (rv->flag[hi] || rv->time_s[hi] <= t + half)) {
            if (!rv->flag[hi])
                sum += rv->pressure_pa[hi], cnt++;
            hi++;
        }
        while (lo < hi && (rv->flag[lo] || rv->time_s[lo] < t - half)) {
            if (!rv->flag[lo])
                sum -= rv->pressure_pa[lo], cnt--;
            lo++;
        }
        if (cnt) {
            w->pr[i] = sum / (double)cnt;
            w->navg[i] = (double)cnt;
        }
    }
}

/* ---- heights ---- */

double hyp__lat(const hyp__work *w, size_t i)
{
    return pick(w->rv->lat_deg[i], w->base->lat_deg, 45.0);
}

/* The rover-end temperature depends on the height (base + lapse), so
 * fixed-point steps; each changes dz by about lapse * dz / T (< 3 %), so four
 * converge to well under 1 mm. */
double hyp__height_above_base(const hyp__work *w, size_t i, double pb, double pr, double *tv_out)
{
    const hyp_correct_opts *o = w->o;
    if (w->method == HYP_METHOD_TWO_BASE) {
        /* h = hL + (hU - hL) ln(pL/p) / ln(pL/pU): the two-base proportion
         * in log-pressure (the hypsometric equation with the column
         * temperature the two bases imply). */
        double pu = w->pU[i], dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m;
        double l = log(pb / pu);
        if (!(pb > 0 && pu > 0 && pr > 0) || fabs(l) < 1e-9)
            return NAN;
        double g = hyp_gravity_at_height_m_s2(hyp__lat(w, i), w->base->height_m + 0.5 * dh);
        *tv_out = g * dh / (HYP_RD_J_KG_K * l);
        return dh * log(pb / pr) / l;
    }
    double tb = w->tb[i], tr = w->rv->temp_k[i], lat = hyp__lat(w, i);
    double dz = 0.0, tv = NAN;
    if (tb != tb) {
        /* No base thermometer: the rover's carried down with the lapse
         * rate, or the standard atmosphere at the base (USSA 1976). */
        double dz0 = (pb - pr) / 12.0;   /* ~12 Pa per m: first guess only */
        tb = tr == tr ? tr - o->lapse_k_per_m * dz0
                      : hyp_isa_temperature_k(hyp_geopotential_from_geometric_m(w->base->height_m));
    }
    double tvb = hyp_virtual_temperature_k(tb, w->rhb[i], pb);
    for (int it = 0; it < 4; it++) {
        double t_top = tb + o->lapse_k_per_m * dz;
        if (o->tcol == HYP_TCOL_ROVER && tr == tr)
            t_top = tr;
        else if (o->tcol == HYP_TCOL_BOTH && tr == tr)
            t_top = 0.5 * (t_top + tr);
        double tvr = hyp_virtual_temperature_k(t_top, w->rhr[i], pr);
        tv = hyp_layer_mean_temperature_k(tvb, tvr);
        dz = hyp_height_difference_m(hyp_hypsometric_dphi_j_kg(pb, pr, tv), w->base->height_m, lat);
        if (dz != dz)
            break;
    }
    *tv_out = tv;
    return dz;
}

static void raw_heights(hyp__work *w)
{
    for (size_t i = 0; i < w->n; i++) {
        if (w->r->status[i] != HYP_PT_OK)
            continue;
        double tv, pb = w->r->base_p_pa[i];
        double dz = hyp__height_above_base(w, i, pb, w->pr[i], &tv);
        if (dz != dz) {
            w->r->status[i] = HYP_PT_NO_CONVERGE;
            continue;
        }
        w->raw[i] = w->base->height_m + dz;
        w->tv[i] = tv;
        /* dh/dp = Rd Tv / (g p) (differentiating the hypsometric equation) */
        w->sens[i] = HYP_RD_J_KG_K * tv / (hyp_gravity_at_height_m_s2(hyp__lat(w, i), w->base->height_m + 0.5 * dz) * w->pr[i]);
    }
}

static void corrected_heights(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    const hyp_drift *d = &r->drift;
    r->tcol_min_k = INFINITY;
    r->tcol_max_k = -INFINITY;
    for (size_t i = 0; i < w->n; i++) {
        if (r->status[i] != HYP_PT_OK)
            continue;
        double off = hyp__drift_offset(d, w->rv->time_s[i], NULL), tv;
        double dz = hyp__height_above_base(w, i, r->base_p_pa[i], w->pr[i] - off, &tv);
        if (dz != dz) {
            r->status[i] = HYP_PT_NO_CONVERGE;
            continue;
        }
        dz *= 1.0 + d->scale;
        if (w->method == HYP_METHOD_TWO_BASE) {
            /* the place in the bracket, from the corrected height; outside
             * by more than a metre counts as extrapolated */
            double dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m;
            w->xfrac[i] = dz / dh;
            r->extrapolated[i] = dz < -1.0 || dz > dh + 1.0;
            r->n_extrapolated += r->extrapolated[i];
        }
        if (d->kind == HYP_DRIFT_GNSS)
            dz += d->gnss_a_m + d->gnss_b_m_per_s * (w->rv->time_s[i] - d->gnss_t0_s);
        r->height_m[i] = w->base->height_m + dz;
        r->offset_pa[i] = off;
        r->tcol_k[i] = tv * (1.0 + d->scale);
        r->tcol_min_k = fmin(r->tcol_min_k, r->tcol_k[i]);
        r->tcol_max_k = fmax(r->tcol_max_k, r->tcol_k[i]);
        hyp__budget(w, i, dz);
    }
    /* residuals of the calibrations after the fit */
    for (size_t k = 0; k < r->n_calibs; k++) {
        hyp_calib *c = &r->calibs[k];
        double s = 0;
        size_t n = 0;
        for (size_t i = 0; i < w->n; i++)
            if (r->status[i] == HYP_PT_OK && w->rv->time_s[i] >= c->start_s && w->rv->time_s[i] <= c->end_s)
                s += r->height_m[i], n++;
        c->residual_m = n ? s / (double)n - c->known_m : NAN;
    }
}

/* ---- noise, weather, summary ---- */

static hyp_status estimate_noise(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    const double floor_pa = 0.5;   /* below half a pascal the estimate is resolution-limited */
    if (hyp__noise_second_diff(w->bv.t, w->bv.p, NULL, w->bv.n, 3.0 * w->o->max_gap_s, &r->base_noise_pa))
        return HYP_ERR_NOMEM;
    if (w->base->kind == HYP_BASE_QNH)   /* a QNH series: resolution and reduction */
        r->base_noise_pa = hypot(r->base_noise_pa == r->base_noise_pa ? r->base_noise_pa : 0.0, w->o->qnh_sigma_pa);
    if (!(r->base_noise_pa >= floor_pa))
        r->base_noise_pa = floor_pa;
    double ss = 0, nn = 0;
    for (size_t k = 0; k < r->n_calibs; k++)
        if (r->calibs[k].kind == HYP_CAL_BASE && r->calibs[k].n > 1) {
            ss += r->calibs[k].scatter_pa * r->calibs[k].scatter_pa * (double)(r->calibs[k].n - 1);
            nn += (double)(r->calibs[k].n - 1);
        }
    r->diff_noise_pa = nn > 0 ? sqrt(ss / nn) : NAN;
    if (nn > 0) {
        double v = ss / nn - r->base_noise_pa * r->base_noise_pa;
        r->rover_noise_pa = sqrt(v > floor_pa * floor_pa ? v : floor_pa * floor_pa);
        return HYP_OK;
    }
    unsigned char *ok = malloc(w->n ? w->n : 1);
    if (!ok)
        return HYP_ERR_NOMEM;
    for (size_t i = 0; i < w->n; i++)
        ok[i] = w->rv->flag[i] == 0;
    int bad = hyp__noise_second_diff(w->rv->time_s, w->rv->pressure_pa, ok, w->n, 3.0 * w->o->max_gap_s, &r->rover_noise_pa);
    free(ok);
    if (bad)
        return HYP_ERR_NOMEM;
    if (!(r->rover_noise_pa >= floor_pa))
        r->rover_noise_pa = floor_pa;
    hyp_msgs_add(w->msgs, HYP_NOTE, "rover noise %.2f Pa estimated from second differences along the track (no co-location to measure it)",
                 r->rover_noise_pa);
    return HYP_OK;
}

static hyp_status rapid_periods(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    const hyp__base_view *b = &w->bv;
    double thr = w->o->rapid_pa_per_s;
    r->max_rate_pa_s = 0;
    for (size_t i = 0; i < b->n; i++) {
        double a = fabs(b->rate[i]);
        r->max_rate_pa_s = fmax(r->max_rate_pa_s, a);
        if (a <= thr)
            continue;
        hyp_period *last = r->n_rapid ? &r->rapid[r->n_rapid - 1] : NULL;
        if (last && b->t[i] - last->end_s <= 2.0 * w->o->max_gap_s) {
            last->end_s = b->t[i];
            last->max_rate_pa_s = fmax(last->max_rate_pa_s, a);
            continue;
        }
        hyp_period *p = realloc(r->rapid, (r->n_rapid + 1) * sizeof *p);
        if (!p)
            return HYP_ERR_NOMEM;
        r->rapid = p;
        r->rapid[r->n_rapid++] = (hyp_period){b->t[i], b->t[i], a};
    }
    return HYP_OK;
}

static void summarise(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    const hyp__base_view *b = &w->bv;
    for (size_t i = 0; i < w->n; i++) {
        r->n_status[r->status[i]]++;
        r->n_ok += r->status[i] == HYP_PT_OK;
    }
    double mt = 0, mp = 0, sxy = 0, sxx = 0;
    for (size_t i = 0; i < b->n; i++)
        mt += b->t[i], mp += b->p[i];
    mt /= (double)b->n;
    mp /= (double)b->n;
    for (size_t i = 0; i < b->n; i++) {
        sxy += (b->t[i] - mt) * (b->p[i] - mp);
        sxx += (b->t[i] - mt) * (b->t[i] - mt);
    }
    r->base_tendency_pa_s = sxx > 0 ? sxy / sxx : 0.0;
    static const char *tsrc[] = {"base thermometer and lapse rate", "base and rover thermometers",
                                 "mean of lapse-rate and rover estimates", "standard atmosphere"};
    if (w->method == HYP_METHOD_TWO_BASE)
        snprintf(r->method, sizeof r->method, "two-base (%s and %s); column temperature from the two bases%s",
                 w->bases[w->ref].name, w->bases[w->upper].name, r->drift.has_scale ? ", scaled by the ties" : "");
    else
        snprintf(r->method, sizeof r->method, "%s; column temperature from %s%s",
                 w->method == HYP_METHOD_FIELD ? "pressure field of the bases" : "single base", tsrc[r->tcol_source],
                 r->drift.has_scale ? ", scaled by the ties" : "");
}

static void column_setup(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    int base_has_t = 0;
    for (size_t i = 0; i < w->bv.n && !base_has_t; i++)
        base_has_t = w->bv.temp[i] == w->bv.temp[i];
    r->tcol_source = !base_has_t && !w->rv->has_temp ? 3 : (int)w->o->tcol;
    w->tsig_k = w->o->tcol_sigma_k;
    if (r->tcol_source == 3) {
        w->tsig_k = hypot(w->tsig_k, 10.0);   /* a season's spread about the standard atmosphere, from memory */
        hyp_msgs_add(w->msgs, HYP_WARNING, "no temperature in any log: the column temperature is the standard atmosphere's, with a 1-sigma of %.0f K",
                     w->tsig_k);
    }
}

static void warn_uncalibrated(hyp__work *w)
{
    if (w->r->drift.kind == HYP_DRIFT_GNSS)
        hyp_msgs_add(w->msgs, HYP_WARNING,
                     "%s: no co-location, no tie and no --offset: the level is GNSS-anchored (the track's own GNSS heights, %zu samples worth %.0f independent ones), a lower grade than a tie",
                     w->base->name, w->r->drift.gnss_n, w->r->drift.gnss_neff);
    if (w->r->drift.kind == HYP_DRIFT_NONE)
        hyp_msgs_add(w->msgs, HYP_WARNING,
                     "%s: no co-location, no tie and no --offset: rover and base are taken to read alike, with a 1-sigma offset of %.0f Pa (about %.0f m) in every height",
                     w->base->name, w->o->uncal_offset_sigma_pa, w->o->uncal_offset_sigma_pa / 12.0);
}

static hyp_status correct_once(const hyp_series *rover, const hyp_base *bases, size_t nb,
                               const hyp_correct_opts *opts, hyp_correct_result *res,
                               hyp_msgs *msgs, hyp_error *err)
{
    hyp_correct_result_free(res);
    if (nb == 0 || nb > HYP__MAX_BASES)
        return hyp_error_set(err, HYP_ERR_USAGE, "between 1 and %d bases are needed, %zu given", HYP__MAX_BASES, nb);
    for (size_t k = 0; k < nb; k++)
        if (!(bases[k].height_m == bases[k].height_m && fabs(bases[k].height_m) < 10000.0))
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: base height %g m is not a height between -10000 and 10000 m",
                                 bases[k].name, bases[k].height_m);
    hyp__work w = {.rv = rover, .base = &bases[0], .bases = bases, .nb = nb, .o = opts, .r = res, .msgs = msgs,
                   .n = rover->count, .method = HYP_METHOD_SINGLE};
    hyp_status st = work_alloc(&w);
    if (st) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    for (size_t k = 0; k < nb; k++)
        if ((st = hyp__base_view_make(&bases[k], &w.bvs[k], err)))
            goto out;
    w.bv = w.bvs[0];
    res->n_bases = nb;
    if ((nb > 1 || opts->method > HYP_METHOD_SINGLE) && (st = hyp__multibase(&w, err)))
        goto out;
    align(&w);
    smooth(&w);
    if (w.method != HYP_METHOD_SINGLE && (st = hyp__multibase_fill(&w, err)))
        goto out;
    column_setup(&w);
    raw_heights(&w);
    if ((st = hyp__find_calibrations(&w, err)) || (st = hyp__fit_drift(&w, err)))
        goto out;
    if (res->drift.kind == HYP_DRIFT_NONE && opts->gnss_height_m && opts->gnss_anchor &&
        hyp__gnss_anchor(&w)) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    w.tcol_scaled = res->drift.has_scale;
    if (res->drift.kind >= HYP_DRIFT_CONSTANT) {
        for (size_t k = 0; k < res->n_calibs; k++)
            w.dz_ref_m += (res->calibs[k].known_m - w.base->height_m) / (double)res->n_calibs;
    }
    warn_uncalibrated(&w);
    if (estimate_noise(&w) || rapid_periods(&w)) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    corrected_heights(&w);
    summarise(&w);
    res->method_used = w.method;
    if (res->n_ok == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA,
                           "no rover sample could be corrected (%zu outside the base log's time span, %zu in base gaps, %zu refused by the reader, %zu too far outside the bases' heights, %zu not computable)",
                           res->n_status[HYP_PT_OUTSIDE_BASE], res->n_status[HYP_PT_BASE_GAP], res->n_status[HYP_PT_REFUSED],
                           res->n_status[HYP_PT_EXTRAPOLATION], res->n_status[HYP_PT_NO_CONVERGE]);
out:
    work_free(&w);
    return st;
}

hyp_status hyp_correct(const hyp_series *rover, const hyp_base *bases, size_t n_bases,
                       const hyp_correct_opts *opts, hyp_correct_result *res,
                       hyp_msgs *msgs, hyp_error *err)
{
    hyp_correct_opts dflt;
    if (!opts) {
        hyp_correct_opts_init(&dflt);
        opts = &dflt;
    }
    /* With an estimated clock the first pass only finds the co-locations;
     * its messages would repeat, so they are dropped. */
    int est_clock = opts->estimate_clock && n_bases == 1;
    hyp_status st = correct_once(rover, bases, n_bases, opts, res, est_clock ? NULL : msgs, err);
    if (st || n_bases != 1)
        return st;
    const hyp_base *base = &bases[0];
    double est = NAN, sig = NAN;
    hyp_error cerr;
    hyp_status cst = hyp_estimate_base_clock(rover, base, res, opts->clock_max_lag_s, &est, &sig, &cerr);
    if (cst == HYP_ERR_NOMEM)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    int ok = cst == HYP_OK;
    double applied = base->clock_offset_s;
    if (est_clock) {
        hyp_base b2 = *base;
        if (ok)
            b2.clock_offset_s = applied = est;
        else
            hyp_msgs_add(msgs, HYP_WARNING, "%s: %s; clock offset left at %+.1f s", base->name, cerr.message, base->clock_offset_s);
        st = correct_once(rover, &b2, 1, opts, res, msgs, err);
    }
    res->clock_est_ok = ok;
    res->clock_est_s = est;
    res->clock_est_sigma_s = sig;
    res->clock_applied_s = applied;
    return st;
}

hyp_status hyp_correct_single_base(const hyp_series *rover, const hyp_base *base,
                                   const hyp_correct_opts *opts, hyp_correct_result *res,
                                   hyp_msgs *msgs, hyp_error *err)
{
    hyp_base b = *base;
    /* callers that filled the struct by hand before kind/offset existed get
     * zeros there: a zero offset is no offset */
    return hyp_correct(rover, &b, 1, opts, res, msgs, err);
}
