/* correct.c - the single-base correction, orchestrated: base log aligned to
 * the rover's times, column inputs, raw heights, calibrations and the drift
 * fit (calib.c, drift.c), corrected heights from the hypsometric equation,
 * and the error budget (budget.c). */
#include "correct_int.h"
#include "base_clock.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/timeparse.h"
#include "parallel_for.h"
#include "stats.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void hyp_correct_result_init(hyp_correct_result *r)
{
    memset(r, 0, sizeof *r);
    r->median_index = r->worst_index = SIZE_MAX;
    r->median_sigma_m = NAN;
}

static void work_free(hyp__work *w);

void hyp_correct_result_free(hyp_correct_result *r)
{
    free(r->height_m);
    free(r->sigma_m);
    free(r->status);
    free(r->calibs);
    free(r->rapid);
    free(r->extrapolated);
    if (r->priv) {
        work_free(r->priv);
        free(r->priv);
    }
    hyp_correct_result_init(r);
}

/* ---- memory ---- */

static void work_free(hyp__work *w)
{
    free(w->detail);
    w->detail = NULL;
    for (size_t k = 0; k < HYP_MAX_BASES; k++)
        hyp__base_view_free(&w->bvs[k]);
}

/* One pass of the median search: a histogram of 16 bits of the sigmas'
 * bit patterns (positive floats order like their patterns), among those
 * whose top 16 bits are `top` (all when top is -1). */
static void sigma_hist(const hyp_correct_result *r, long top, size_t *hist)
{
    memset(hist, 0, 65536 * sizeof *hist);
    for (size_t i = 0; i < r->count; i++) {
        if (r->status[i] != HYP_PT_OK)
            continue;
        uint32_t u;
        memcpy(&u, &r->sigma_m[i], sizeof u);
        if (top < 0)
            hist[u >> 16]++;
        else if ((long)(u >> 16) == top)
            hist[u & 0xffffu]++;
    }
}

static size_t bin_of(const size_t *hist, size_t *rank)
{
    size_t b = 0;
    while (*rank >= hist[b])
        *rank -= hist[b++];
    return b;
}

/* Below this many corrected points the median is selected from a copy of
 * the sigmas (at most 512 KiB): the two 512 KiB histograms
 * cost a short track more than its whole median (perf, 5000 points). */
#define SMALL_MEDIAN 65536

/* The median (upper middle) and the largest sigma, exactly: for a long
 * track without a copy of the sigmas, by radix selection in two 16-bit
 * passes. Positive floats order like their bit patterns. */
static hyp_status sigma_median(hyp_correct_result *r)
{
    size_t n = 0;
    for (size_t i = 0; i < r->count; i++)
        if (r->status[i] == HYP_PT_OK) {
            n++;
            if (r->worst_index == SIZE_MAX || r->sigma_m[i] > r->sigma_m[r->worst_index])
                r->worst_index = i;
        }
    size_t *hist = NULL;
    double *vals = NULL;
    if (n && n < SMALL_MEDIAN ? !(vals = malloc(n * sizeof *vals)) : !(hist = malloc(65536 * sizeof *hist)))
        return HYP_ERR_NOMEM;
    if (n) {
        uint32_t pat;
        if (vals) {
            size_t m = 0;
            for (size_t i = 0; i < r->count; i++)
                if (r->status[i] == HYP_PT_OK)
                    vals[m++] = r->sigma_m[i];
            float med = (float)hyp__select_kth(vals, n, n / 2);   /* exact: a float widened */
            memcpy(&pat, &med, sizeof pat);
        } else {
            size_t rank = n / 2;
            sigma_hist(r, -1, hist);
            uint32_t hi = (uint32_t)bin_of(hist, &rank);
            sigma_hist(r, (long)hi, hist);
            pat = hi << 16 | (uint32_t)bin_of(hist, &rank);
        }
        for (size_t i = 0; i < r->count && r->median_index == SIZE_MAX; i++) {
            uint32_t u;
            memcpy(&u, &r->sigma_m[i], sizeof u);
            if (r->status[i] == HYP_PT_OK && u == pat)
                r->median_index = i;
        }
        r->median_sigma_m = r->sigma_m[r->median_index];
    }
    free(hist);
    free(vals);
    return HYP_OK;
}

/* What each part of a parallel pass adds up. */
typedef struct part_sums {
    size_t n_extrapolated, n_flag[HYP_SAMPLE_FLAG_COUNT], chi_n;
    double tcol_min_k, tcol_max_k, chi_ss;
} part_sums;

typedef struct pass {
    hyp__work *w;
    part_sums sum[HYP__MAX_PARTS];
} pass;

/* The parts of a pass. LAPACK calls (the field method's plane fit) may run
 * in several threads at once: reference LAPACK has kept no state between
 * calls since 3.1 removed its SAVE and DATA statements ("Improvements in
 * LAPACK 3.1.0", netlib), and LAPACKE's work arrays are the caller's. */
static int pass_parts(const hyp__work *w)
{
    return w->o->threads < 2 ? 1 : w->o->threads;
}

static void corrected_range(void *ctx, size_t lo, size_t hi, int part)
{
    pass *ps = ctx;
    hyp__work *w = ps->w;
    hyp_correct_result *r = w->r;
    part_sums *sm = &ps->sum[part];
    sm->tcol_min_k = INFINITY;
    sm->tcol_max_k = -INFINITY;
    double dh = w->method == HYP_METHOD_TWO_BASE ? w->bases[w->upper].height_m - w->bases[w->ref].height_m : 0.0;
    hyp__in in = {0};   /* kept across samples: its hint */
    for (size_t i = lo; i < hi; i++) {
        r->height_m[i] = NAN;
        r->sigma_m[i] = NAN;
        if (r->status[i] != HYP_PT_OK)
            continue;
        hyp_point_detail d;
        double dz;
        if (hyp__inputs(w, i, &in) || hyp__corrected_point(w, i, &in, &dz, &d)) {
            r->status[i] = HYP_PT_NO_CONVERGE;
            continue;
        }
        if (w->method == HYP_METHOD_TWO_BASE) {
            /* outside the bracket by more than a metre counts as extrapolated */
            r->extrapolated[i] = dz < -1.0 || dz > dh + 1.0;
            sm->n_extrapolated += r->extrapolated[i];
        }
        r->height_m[i] = d.height_m;
        r->sigma_m[i] = (float)d.sigma_m;
        if (w->detail)
            w->detail[i] = d;
        sm->tcol_min_k = fmin(sm->tcol_min_k, d.tcol_k);
        sm->tcol_max_k = fmax(sm->tcol_max_k, d.tcol_k);
    }
}

static hyp_status corrected_heights(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    size_t n = w->n ? w->n : 1;
    r->height_m = malloc(n * sizeof *r->height_m);
    r->sigma_m = malloc(n * sizeof *r->sigma_m);
    if (!r->height_m || !r->sigma_m)
        return HYP_ERR_NOMEM;
    if (w->method == HYP_METHOD_TWO_BASE && !(r->extrapolated = calloc(n, 1)))
        return HYP_ERR_NOMEM;
    free(w->detail);
    w->detail = NULL;
    if (w->n <= HYP__DETAIL_CACHE_MAX && !(w->detail = malloc(n * sizeof *w->detail)))
        return HYP_ERR_NOMEM;
    pass ps = {.w = w};
    int parts = hyp__parallel(w->n, pass_parts(w), corrected_range, &ps);
    r->tcol_min_k = INFINITY;
    r->tcol_max_k = -INFINITY;
    for (int k = 0; k < parts; k++) {
        r->n_extrapolated += ps.sum[k].n_extrapolated;
        r->tcol_min_k = fmin(r->tcol_min_k, ps.sum[k].tcol_min_k);
        r->tcol_max_k = fmax(r->tcol_max_k, ps.sum[k].tcol_max_k);
    }
    /* residuals of the calibrations after the fit */
    for (size_t k = 0; k < r->n_calibs; k++) {
        hyp_calib *c = &r->calibs[k];
        double s = 0;
        size_t m = 0;
        for (size_t i = 0; i < w->n; i++)
            if (r->status[i] == HYP_PT_OK && w->rv->time_s[i] >= c->start_s && w->rv->time_s[i] <= c->end_s)
                s += r->height_m[i], m++;
        c->residual_m = m ? s / (double)m - c->known_m : NAN;
    }
    return sigma_median(r);
}

hyp_status hyp_correct_point(const hyp_correct_result *res, size_t i, hyp_point_detail *d)
{
    if (!res->priv || i >= res->count)
        return res->priv ? HYP_ERR_USAGE : HYP_ERR_NODATA;
    if (res->status[i] != HYP_PT_OK)
        return HYP_ERR_NODATA;
    if (res->priv->detail) {   /* a short track: as the correction computed it */
        *d = res->priv->detail[i];
        return HYP_OK;
    }
    /* the kept state with the caller's result (it may have moved); only read */
    hyp__work w = *res->priv;
    w.r = (hyp_correct_result *)res;
    w.o = &w.opts;
    hyp__in in = {0};
    double dz;
    if (hyp__inputs(&w, i, &in) || hyp__corrected_point(&w, i, &in, &dz, d))
        return HYP_ERR_NODATA;
    return HYP_OK;
}

/* ---- noise, weather, summary ---- */

static hyp_status estimate_noise(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    /* below half a pascal the estimate is resolution-limited; a rover of
     * quantised altitudes is no better than their quantisation noise (a
     * still recorder shows one value: its scatter alone would say 0) */
    const double floor_pa = 0.5, rfloor_pa = fmax(floor_pa, w->o->rover_quant_pa);
    if (hyp__noise_second_diff(w->bv.t, w->bv.p, NULL, NULL, w->bv.n, 3.0 * w->o->max_gap_s, &r->base_noise_pa))
        return HYP_ERR_NOMEM;
    if (w->base->kind == HYP_BASE_QNH)   /* a QNH series: resolution and reduction */
        r->base_noise_pa = hypot(r->base_noise_pa == r->base_noise_pa ? r->base_noise_pa : 0.0, w->o->qnh_sigma_pa);
    if (!(r->base_noise_pa >= floor_pa))
        r->base_noise_pa = floor_pa;
    double ss = 0, nn = 0;
    for (size_t k = 0; k < r->n_calibs; k++)
        if (r->calibs[k].kind == HYP_CAL_BASE && r->calibs[k].n > 1 && !r->calibs[k].rejected) {
            ss += r->calibs[k].scatter_pa * r->calibs[k].scatter_pa * (double)(r->calibs[k].n - 1);
            nn += (double)(r->calibs[k].n - 1);
        }
    r->diff_noise_pa = nn > 0 ? sqrt(ss / nn) : NAN;
    if (nn > 0) {
        double v = ss / nn - r->base_noise_pa * r->base_noise_pa;
        r->rover_noise_pa = sqrt(v > rfloor_pa * rfloor_pa ? v : rfloor_pa * rfloor_pa);
        return HYP_OK;
    }
    if (hyp__noise_second_diff(w->rv->time_s, NULL, w->rv->pressure_pa, w->rv->flag, w->n, 3.0 * w->o->max_gap_s,
                               &r->rover_noise_pa))
        return HYP_ERR_NOMEM;
    if (!(r->rover_noise_pa >= rfloor_pa))
        r->rover_noise_pa = rfloor_pa;
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
        hyp_msgs_add_at(w->msgs, HYP_WARNING, "method", w->base->name, 0, "no co-location, no tie and no --offset: the level is GNSS-anchored (the track's own GNSS heights, %zu samples worth %.0f independent ones), a lower grade than a tie", w->r->drift.gnss_n, w->r->drift.gnss_neff);
    if (w->r->drift.kind == HYP_DRIFT_NONE)
        hyp_msgs_add_at(w->msgs, HYP_WARNING, "method", w->base->name, 0, "no co-location, no tie and no --offset: rover and base are taken to read alike, with a 1-sigma offset of %.0f Pa (about %.0f m) in every height", w->o->uncal_offset_sigma_pa, w->o->uncal_offset_sigma_pa / 12.0);
}

/* Every point's status (refused, outside the base log, gaps, two-base
 * extrapolation; the field's reduction), and for the field method the
 * scatter of the bases about the plane. */
static void status_range(void *ctx, size_t lo, size_t hi, int part)
{
    pass *ps = ctx;
    hyp__work *w = ps->w;
    part_sums *sm = &ps->sum[part];
    hyp__in in = {0};   /* kept across samples: its hint */
    for (size_t i = lo; i < hi; i++) {
        double chi2 = NAN;
        hyp_point_status st = hyp__inputs_chi2(w, i, &in, &chi2);
        if (st == HYP_PT_OK && chi2 == chi2)
            sm->chi_ss += chi2, sm->chi_n++;
        w->r->status[i] = (uint8_t)st;
        if (st == HYP_PT_REFUSED)
            sm->n_flag[w->rv->flag[i]]++;
    }
}

static hyp_status status_pass(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    if (!(r->status = malloc(w->n ? w->n : 1)))
        return HYP_ERR_NOMEM;
    pass ps = {.w = w};
    int parts = hyp__parallel(w->n, pass_parts(w), status_range, &ps);
    double chi_ss = 0;
    size_t chi_n = 0;
    for (int k = 0; k < parts; k++) {
        chi_ss += ps.sum[k].chi_ss, chi_n += ps.sum[k].chi_n;
        for (int f = 0; f < HYP_SAMPLE_FLAG_COUNT; f++)
            r->n_flag[f] += ps.sum[k].n_flag[f];
    }
    w->field_sigma_pa = chi_n ? sqrt(chi_ss / (double)chi_n) : 0.0;
    if (w->method == HYP_METHOD_TWO_BASE)
        hyp__two_base_columns(w, &r->implied_tcol_k, &r->thermo_tcol_k);
    return HYP_OK;
}

static hyp_status correct_once(const hyp_series *rover, const hyp_base *bases, size_t nb,
                               const hyp_correct_opts *opts, hyp_correct_result *res,
                               hyp_msgs *msgs, hyp_error *err)
{
    hyp_correct_result_free(res);
    if (nb == 0 || nb > HYP_MAX_BASES)
        return hyp_error_set(err, HYP_ERR_USAGE, "between 1 and %d bases are needed, %zu given", HYP_MAX_BASES, nb);
    for (size_t k = 0; k < nb; k++)
        if (!(bases[k].height_m == bases[k].height_m && fabs(bases[k].height_m) < 10000.0))
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: base height %g m is not a height between -10000 and 10000 m",
                                 bases[k].name, bases[k].height_m);
    hyp__work *wp = calloc(1, sizeof *wp);
    if (!wp)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    res->priv = wp;
    hyp__work *w = wp;
    memcpy(w->base_copy, bases, nb * sizeof *bases);
    w->opts = *opts;
    w->rv = rover, w->bases = w->base_copy, w->base = &w->base_copy[0], w->nb = nb, w->o = &w->opts;
    w->r = res, w->msgs = msgs, w->n = rover->count, w->method = HYP_METHOD_SINGLE;
    res->count = w->n;
    hyp_status st = HYP_OK;
    for (size_t k = 0; k < nb; k++)
        if ((st = hyp__base_view_make(&w->bases[k], &w->bvs[k], err)))
            goto out;
    w->bv = w->bvs[0];
    res->n_bases = nb;
    if ((nb > 1 || opts->method > HYP_METHOD_SINGLE) && (st = hyp__multibase(w, err)))
        goto out;
    if (status_pass(w)) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    column_setup(w);
    if ((st = hyp__find_calibrations(w, err)) || (st = hyp__fit_drift(w, err)))
        goto out;
    if (res->drift.kind == HYP_DRIFT_NONE && opts->gnss_height_m && opts->gnss_anchor &&
        hyp__gnss_anchor(w)) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    w->tcol_scaled = res->drift.has_scale;
    if (res->drift.kind >= HYP_DRIFT_CONSTANT) {   /* over the calibrations the fit used */
        size_t n = res->n_calibs - res->calib_test.n_rejected;
        for (size_t k = 0; k < res->n_calibs; k++)
            if (!res->calibs[k].rejected)
                w->dz_ref_m += (res->calibs[k].known_m - w->base->height_m) / (double)n;
    }
    warn_uncalibrated(w);
    if (estimate_noise(w) || rapid_periods(w) || corrected_heights(w)) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    summarise(w);
    res->method_used = w->method;
    if (res->n_ok == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA,
                           "no rover sample could be corrected (%zu outside the base log's time span, %zu in base gaps, %zu refused by the reader, %zu too far outside the bases' heights, %zu not computable)",
                           res->n_status[HYP_PT_OUTSIDE_BASE], res->n_status[HYP_PT_BASE_GAP], res->n_status[HYP_PT_REFUSED],
                           res->n_status[HYP_PT_EXTRAPOLATION], res->n_status[HYP_PT_NO_CONVERGE]);
out:
    w->msgs = NULL;
    if (st) {
        /* nothing per point survives a failure: the counts stay for the message */
        work_free(w);
        free(w);
        res->priv = NULL;
    }
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
    for (size_t k = 0; k < n_bases; k++) {
        double lag;
        char others[400];
        hyp_status cst = hyp__base_clock_hours(rover, &bases[k], opts, &lag, others, sizeof others, err);
        if (cst)
            return cst;
        if (lag != 0.0) {
            int m = (int)lround(fabs(lag) / 60.0);
            return hyp_error_set(err, HYP_ERR_VALUE,
                                 "%s: the base's clock looks %d h %02d min %s the rover's: the rover stood beside the "
                                 "base at times the log does not cover until it is shifted so%s%s (a log kept in local "
                                 "or summer time and marked as UTC?); give the base's zone (--base-time-zone) or its "
                                 "clock offset (--base-clock-offset %+.0f)", bases[k].name, m / 60, m % 60,
                                 lag > 0 ? "ahead of" : "behind", others[0] ? "; other shifts that would: " : "",
                                 others, bases[k].clock_offset_s + lag);
        }
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
    hyp_status cst = hyp__estimate_base_clock(rover, base, res, opts->clock_max_lag_s, opts->max_gap_s, &est, &sig, &cerr);
    if (cst == HYP_ERR_NOMEM)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    int ok = cst == HYP_OK;
    double applied = base->clock_offset_s;
    if (est_clock) {
        hyp_base b2 = *base;
        if (ok)
            b2.clock_offset_s = applied = est;
        else
            hyp_msgs_add_at(msgs, HYP_WARNING, "method", base->name, 0, "%s; clock offset left at %+.1f s", cerr.message, base->clock_offset_s);
        st = correct_once(rover, &b2, 1, opts, res, msgs, err);
    }
    res->clock_est_ok = ok;
    res->clock_est_s = est;
    res->clock_est_sigma_s = sig;
    res->clock_applied_s = applied;
    return st;
}
