/* base_view.c - a base log as the core uses it: its valid samples on true
 * time (clock offset removed), QNH reduced to station pressure, the
 * instrument offset removed, hourly tendencies; and its values at any
 * time by linear interpolation, refusing gaps. */
#include "base_view.h"
#include "hypsolev/atmosphere.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

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
    /* a failed view owns nothing: some callers return without freeing it */
    if (!b->t || !b->p || !b->temp || !b->rh || !b->rate) {
        hyp__base_view_free(b);
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
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
    if (b->n < 2) {
        hyp__base_view_free(b);
        return hyp_error_set(err, HYP_ERR_NODATA, "%s: fewer than two usable base samples", base->name);
    }
    base_rates(b);
    return HYP_OK;
}

double hyp__base_lerp(const double *v, size_t k, double w)
{
    double a = v[k], b = v[k + 1];
    if (a != a)
        return b;
    if (b != b)
        return a;
    return a + w * (b - a);
}

hyp_point_status hyp__base_at(const hyp__base_view *b, const double *v, double x, double max_gap_s, double *out)
{
    size_t k = 0;
    double f;
    hyp_point_status st = hyp__base_bracket(b, x, max_gap_s, &k, &f);
    *out = st ? NAN : hyp__base_lerp(v, k, f);
    return st;
}

hyp_point_status hyp__base_bracket(const hyp__base_view *b, double x, double max_gap_s, size_t *k, double *w)
{
    if (!(x >= b->t[0] && x <= b->t[b->n - 1]))
        return HYP_PT_OUTSIDE_BASE;
    size_t lo = 0, hi = b->n - 1, h = *k;
    /* the interval of the last call or the next one: a walk in time order */
    if (h + 1 < b->n && b->t[h] <= x && x <= b->t[h + 1])
        lo = h, hi = h + 1;
    else if (h + 2 < b->n && b->t[h + 1] <= x && x <= b->t[h + 2])
        lo = h + 1, hi = h + 2;
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

