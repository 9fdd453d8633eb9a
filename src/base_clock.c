/* base_clock.c - estimating a base logger's clock offset from
 * co-locations by lining up the pressure changes both loggers saw. */
#include "base_clock.h"
#include "base_view.h"
#include "stats.h"
#include "hypsolev/geo.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Whole and half hours: the clock errors of a logger set to local time, or
 * to summer time, and written as UTC, up to 14 h either way. */
#define HOURS_STEP_S 1800.0
#define HOURS_STEPS 28

typedef struct pts { size_t n; double *t, *p; int *win; int nwin; } pts;

/* Scatter about the window means of rover - base with the base clock taken
 * as `off` s ahead; NaN when a sample falls outside the base log. */
static double scatter(const pts *q, const hyp__base_view *b, double max_gap_s, double off, double *resid)
{
    double sum[64] = {0}, cnt[64] = {0}, ss = 0;
    for (size_t i = 0; i < q->n; i++) {
        double pb;
        if (hyp__base_at(b, b->p, q->t[i] + off, max_gap_s, &pb))
            return NAN;
        resid[i] = q->p[i] - pb;
        sum[q->win[i]] += resid[i];
        cnt[q->win[i]] += 1;
    }
    for (size_t i = 0; i < q->n; i++) {
        resid[i] -= sum[q->win[i]] / cnt[q->win[i]];
        ss += resid[i] * resid[i];
    }
    return ss;
}

static hyp_status collect(const hyp_series *rv, const hyp_correct_result *res, pts *q)
{
    size_t m = 0;   /* the co-located samples only */
    for (size_t k = 0, nw = 0; k < res->n_calibs && nw < 64; k++) {
        const hyp_calib *c = &res->calibs[k];
        if (c->kind != HYP_CAL_BASE || c->rejected)   /* a rejected window: the rover was elsewhere */
            continue;
        for (size_t i = 0; i < rv->count; i++)
            m += res->status[i] == HYP_PT_OK && rv->time_s[i] >= c->start_s && rv->time_s[i] <= c->end_s;
        nw++;
    }
    q->t = malloc((m ? m : 1) * sizeof(double));
    q->p = malloc((m ? m : 1) * sizeof(double));
    q->win = malloc((m ? m : 1) * sizeof(int));
    if (!q->t || !q->p || !q->win)
        return HYP_ERR_NOMEM;
    for (size_t k = 0; k < res->n_calibs && q->nwin < 64; k++) {
        const hyp_calib *c = &res->calibs[k];
        if (c->kind != HYP_CAL_BASE || c->rejected)   /* a rejected window: the rover was elsewhere */
            continue;
        for (size_t i = 0; i < rv->count; i++)
            if (res->status[i] == HYP_PT_OK && rv->time_s[i] >= c->start_s && rv->time_s[i] <= c->end_s) {
                q->t[q->n] = rv->time_s[i];
                q->p[q->n] = rv->pressure_pa[i];
                q->win[q->n++] = q->nwin;
            }
        q->nwin++;
    }
    return HYP_OK;
}

hyp_status hyp__estimate_base_clock(const hyp_series *rover, const hyp_base *base, const hyp_correct_result *res,
                                    double max_lag_s, double max_gap_s, double *offset_s, double *sigma_s,
                                    hyp_error *err)
{
    pts q = {0};
    double *resid = NULL, *ss = NULL;
    /* the base on its own clock: the lag is searched around its offset */
    hyp_base logged = *base;
    logged.clock_offset_s = 0.0;
    hyp__base_view bv;
    hyp_status st = hyp__base_view_make(&logged, &bv, err);
    if (st)
        return st;
    st = collect(rover, res, &q);
    int nlag = (int)floor(max_lag_s);
    if (!st && (!(resid = malloc((q.n ? q.n : 1) * sizeof *resid)) || !(ss = malloc((size_t)(2 * nlag + 1) * sizeof *ss))))
        st = HYP_ERR_NOMEM;
    if (st) {
        hyp_error_set(err, st, "out of memory");
        goto out;
    }
    if (q.n < 60 || nlag < 2) {
        st = hyp_error_set(err, HYP_ERR_NODATA, "base clock not estimable: fewer than 60 rover samples beside the base");
        goto out;
    }
    int best = -1;
    for (int k = 0; k <= 2 * nlag; k++) {
        ss[k] = scatter(&q, &bv, max_gap_s, base->clock_offset_s + (k - nlag), resid);
        if (ss[k] == ss[k] && (best < 0 || ss[k] < ss[best]))
            best = k;
    }
    if (best <= 0 || best >= 2 * nlag) {
        st = hyp_error_set(err, HYP_ERR_NODATA, "base clock not estimable: no clear best lag within %.0f s", max_lag_s);
        goto out;
    }
    /* Is there a minimum at all? Without shared pressure changes the scatter
     * hardly depends on the lag, and its ripple (linear interpolation
     * between base samples averages their noise unevenly) makes false
     * minima. Require the best lag to explain at least a fifth of the
     * scatter found at a typical lag (a threshold of common practice, no
     * source). */
    double *sorted = malloc((size_t)(2 * nlag + 1) * sizeof *sorted);
    size_t ns = 0;
    if (!sorted) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    for (int k = 0; k <= 2 * nlag; k++)
        if (ss[k] == ss[k])
            sorted[ns++] = ss[k];
    double med = hyp__median_inplace(sorted, ns);
    free(sorted);
    if (!(ss[best] < 0.8 * med)) {
        st = hyp_error_set(err, HYP_ERR_NODATA,
                           "base clock not estimable: no pressure changes to line up (best lag explains %.0f %% of the scatter)",
                           100.0 * (1.0 - ss[best] / med));
        goto out;
    }
    /* Least-squares parabola over +-10 s around the minimum, wide enough to
     * step over the interpolation ripple. */
    int lo = best - 10 < 0 ? 0 : best - 10, hi = best + 10 > 2 * nlag ? 2 * nlag : best + 10;
    double s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, y0 = 0, y1 = 0, y2 = 0;
    for (int k = lo; k <= hi; k++) {
        if (ss[k] != ss[k])
            continue;
        double x = k - best, y = ss[k];
        s0 += 1, s1 += x, s2 += x * x, s3 += x * x * x, s4 += x * x * x * x;
        y0 += y, y1 += x * y, y2 += x * x * y;
    }
    /* normal equations for y = c0 + c1 x + c2 x^2, by Cramer's rule */
    double m[3][3] = {{s0, s1, s2}, {s1, s2, s3}, {s2, s3, s4}}, rhs[3] = {y0, y1, y2}, coef[3];
    double det = m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
                 m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
    for (int j = 0; j < 3; j++) {
        double t[3][3];
        for (int r = 0; r < 3; r++)
            for (int c = 0; c < 3; c++)
                t[r][c] = c == j ? rhs[r] : m[r][c];
        coef[j] = (t[0][0] * (t[1][1] * t[2][2] - t[1][2] * t[2][1]) - t[0][1] * (t[1][0] * t[2][2] - t[1][2] * t[2][0]) +
                   t[0][2] * (t[1][0] * t[2][1] - t[1][1] * t[2][0])) / det;
    }
    double curv = 2.0 * coef[2];
    if (!(curv > 0) || !(det != 0)) {
        st = hyp_error_set(err, HYP_ERR_NODATA, "base clock not estimable: the scatter does not change with the lag");
        goto out;
    }
    double shift = -coef[1] / curv;
    if (shift > 10.0) shift = 10.0;
    if (shift < -10.0) shift = -10.0;
    double lag = best - nlag + shift, b = ss[best];
    scatter(&q, &bv, max_gap_s, base->clock_offset_s + lag, resid);
    double mean, sd, neff;
    hyp__mean_sd_neff(resid, q.n, &mean, &sd, &neff);
    double sigma2 = b / (double)(q.n - (size_t)q.nwin - 1);
    /* SS(L) ~ SS_min + SS''/2 (L - L0)^2: var = 2 sigma^2 / SS'' */
    double sig = sqrt(2.0 * sigma2 / curv * ((double)q.n / neff));
    if (!(sig < max_lag_s / 3.0)) {
        st = hyp_error_set(err, HYP_ERR_NODATA, "base clock not estimable: uncertainty %.0f s", sig);
        goto out;
    }
    *offset_s = base->clock_offset_s + lag;
    *sigma_s = sig;
out:
    hyp__base_view_free(&bv);
    free(q.t);
    free(q.p);
    free(q.win);
    free(resid);
    free(ss);
    return st;
}

/* The rover's samples standing near the base's position, grouped into
 * windows (gaps of two minutes or more split them) of at least min_s. */
static hyp_status near_base(const hyp_series *rv, const hyp_base *base, double radius_m, double min_s, pts *q)
{
    q->t = malloc((rv->count ? rv->count : 1) * sizeof(double));
    q->p = malloc((rv->count ? rv->count : 1) * sizeof(double));
    q->win = malloc((rv->count ? rv->count : 1) * sizeof(int));
    if (!q->t || !q->p || !q->win)
        return HYP_ERR_NOMEM;
    size_t start = 0;
    for (size_t i = 0; i <= rv->count; i++) {
        int near = i < rv->count && !rv->flag[i] &&
                   hyp_geo_distance_m(hyp_series_lat(rv, i), hyp_series_lon(rv, i), base->lat_deg, base->lon_deg) <= radius_m;
        int joins = near && q->n > start && rv->time_s[i] - q->t[q->n - 1] < 120.0;
        if (!joins && q->n > start) {   /* close the window under way */
            if (q->t[q->n - 1] - q->t[start] < min_s || q->nwin >= 64)
                q->n = start;           /* too short (or too many): dropped */
            else
                q->nwin++;
            start = q->n;
        }
        if (near) {
            q->t[q->n] = rv->time_s[i];
            q->p[q->n] = rv->pressure_pa[i];
            q->win[q->n++] = q->nwin;
        }
    }
    q->n = start;
    return HYP_OK;
}

hyp_status hyp__base_clock_hours(const hyp_series *rover, const hyp_base *base, const hyp_correct_opts *o,
                                 double *lag_s, char *others, size_t n_others, hyp_error *err)
{
    *lag_s = 0.0;
    others[0] = '\0';
    if (!(base->lat_deg == base->lat_deg) || !rover->has_position)
        return HYP_OK;   /* no position: no co-location to line up */
    pts q = {0};
    hyp_base logged = *base;
    logged.clock_offset_s = 0.0;
    hyp__base_view bv;
    double *resid = NULL, ss[2 * HOURS_STEPS + 1];
    hyp_status st = hyp__base_view_make(&logged, &bv, err);
    if (st)
        return st;
    if ((st = near_base(rover, base, o->coloc_radius_m, o->coloc_min_s, &q)) ||
        !(resid = malloc((q.n ? q.n : 1) * sizeof *resid))) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    /* The given clock covers the co-locations: nothing to say here (the
     * fine estimate looks at seconds). It does not, and a whole or half
     * hour shift does: the log's clock is off by it. A linear weather
     * trend moves every shift alike, so the scatter of rover - base within
     * the windows (the fine estimate's measure) only ranks the shifts that
     * cover them; the others are named too. */
    double given = q.n >= 8 ? scatter(&q, &bv, INFINITY, base->clock_offset_s, resid) : 0.0;
    if (given == given)
        goto out;   /* covered as given (or too little to tell) */
    int best = -1;
    for (int k = 0; k <= 2 * HOURS_STEPS; k++) {
        ss[k] = scatter(&q, &bv, INFINITY, base->clock_offset_s + (k - HOURS_STEPS) * HOURS_STEP_S, resid);
        if (ss[k] == ss[k] && (best < 0 || ss[k] < ss[best]))
            best = k;
    }
    if (best < 0)
        goto out;
    *lag_s = (best - HOURS_STEPS) * HOURS_STEP_S;
    for (int k = 0; k <= 2 * HOURS_STEPS; k++) {
        size_t l = strlen(others);
        int m = abs(k - HOURS_STEPS) * 30;
        if (k != best && ss[k] == ss[k] && l + 24 < n_others)
            snprintf(others + l, n_others - l, "%s%s%d h %02d min", l ? ", " : "", k > HOURS_STEPS ? "+" : "-", m / 60, m % 60);
    }
out:
    hyp__base_view_free(&bv);
    free(resid);
    free(q.t);
    free(q.p);
    free(q.win);
    return st;
}
