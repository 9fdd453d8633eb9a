/* correct.c - single-base correction: base log interpolated to the rover's
 * times, the rover-minus-base instrument offset calibrated from co-location,
 * and each height from the hypsometric equation with its uncertainty. */
#include "hypsolev/correct.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"
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
    o->offset_sigma_pa = 0.0;
    o->auto_colocate = 1;
    o->coloc_radius_m = 30.0;
    o->coloc_min_s = 300.0;
    o->max_gap_s = 180.0;
    o->tcol = HYP_TCOL_BASE_LAPSE;
    o->lapse_k_per_m = -0.0065;
    o->tcol_sigma_k = 1.0;
    o->lapse_sigma_k_per_m = 0.001;
    o->default_rh_pct = 50.0;
    o->default_rh_sigma_pct = 30.0;
    o->uncal_offset_sigma_pa = 150.0;
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
    free(r->colocs);
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
    case HYP_PT_STATUS_COUNT: break;
    }
    return "unknown";
}

/* The base log as the core needs it: valid samples only, on true time. */
typedef struct base_view {
    size_t n;
    double *t, *p, *temp, *rh;
} base_view;

static void base_view_free(base_view *b)
{
    free(b->t);
    free(b->p);
    free(b->temp);
    free(b->rh);
}

static hyp_status base_view_make(const hyp_base *base, base_view *b, hyp_error *err)
{
    const hyp_series *s = base->log;
    memset(b, 0, sizeof *b);
    size_t n = s->count;
    b->t = malloc((n ? n : 1) * sizeof(double));
    b->p = malloc((n ? n : 1) * sizeof(double));
    b->temp = malloc((n ? n : 1) * sizeof(double));
    b->rh = malloc((n ? n : 1) * sizeof(double));
    if (!b->t || !b->p || !b->temp || !b->rh)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < n; i++) {
        if (s->flag[i])
            continue;
        b->t[b->n] = s->time_s[i] - base->clock_offset_s;
        b->p[b->n] = s->pressure_pa[i];
        b->temp[b->n] = s->temp_k[i];
        b->rh[b->n] = s->rh_pct[i];
        b->n++;
    }
    if (b->n < 2)
        return hyp_error_set(err, HYP_ERR_NODATA, "%s: fewer than two usable base samples", base->name);
    return HYP_OK;
}

/* Linear interpolation of a base quantity that may have NaN gaps: the
 * nearest valid neighbours within the bracket, or NaN. */
static double lerp(const double *v, size_t k, double w)
{
    double a = v[k], b = v[k + 1];
    if (a != a)
        return b;
    if (b != b)
        return a;
    return a + w * (b - a);
}

/* Finds k with t[k] <= x <= t[k+1]; returns the point status. */
static hyp_point_status bracket(const base_view *b, double x, double max_gap_s, size_t *k, double *w)
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

static hyp_status alloc_result(hyp_correct_result *r, size_t n)
{
    hyp_correct_result_free(r);
    r->count = n;
    size_t m = n ? n : 1;
    r->height_m = malloc(m * sizeof(double));
    r->sigma_m = malloc(m * sizeof(double));
    r->base_p_pa = malloc(m * sizeof(double));
    r->offset_pa = malloc(m * sizeof(double));
    r->tcol_k = malloc(m * sizeof(double));
    r->status = malloc(m);
    if (!r->height_m || !r->sigma_m || !r->base_p_pa || !r->offset_pa || !r->tcol_k || !r->status)
        return HYP_ERR_NOMEM;
    for (size_t i = 0; i < n; i++)
        r->height_m[i] = r->sigma_m[i] = r->base_p_pa[i] = r->offset_pa[i] = r->tcol_k[i] = NAN;
    return HYP_OK;
}

static hyp_status add_coloc(hyp_correct_result *r, const hyp_coloc *c)
{
    hyp_coloc *p = realloc(r->colocs, (r->n_colocs + 1) * sizeof *p);
    if (!p)
        return HYP_ERR_NOMEM;
    r->colocs = p;
    r->colocs[r->n_colocs++] = *c;
    return HYP_OK;
}

/* Statistics of rover - base pressure over [t0, t1]; 0 samples: n = 0. */
static void window_stats(const hyp_series *rv, const hyp_correct_result *r, double t0, double t1,
                         double *buf, hyp_coloc *c)
{
    size_t n = 0;
    for (size_t i = 0; i < rv->count; i++)
        if (r->status[i] == HYP_PT_OK && rv->time_s[i] >= t0 && rv->time_s[i] <= t1)
            buf[n++] = rv->pressure_pa[i] - r->base_p_pa[i];
    c->start_s = t0;
    c->end_s = t1;
    c->n = n;
    if (n < 2) {
        c->n = 0;
        return;
    }
    double mean, sd, neff;
    hyp__mean_sd_neff(buf, n, &mean, &sd, &neff);
    c->offset_pa = mean;
    c->scatter_pa = sd;
    c->se_pa = sd / sqrt(neff);
}

/* Runs of samples within radius of the base, lasting at least min_s. */
static hyp_status find_colocations(const hyp_series *rv, const hyp_base *base, const hyp_correct_opts *o,
                                   hyp_correct_result *r, double *buf)
{
    size_t i = 0, n = rv->count;
    while (i < n) {
        double d = hyp_geo_distance_m(rv->lat_deg[i], rv->lon_deg[i], base->lat_deg, base->lon_deg);
        if (!(r->status[i] == HYP_PT_OK && d <= o->coloc_radius_m)) {
            i++;
            continue;
        }
        size_t j = i;
        while (j + 1 < n) {
            double dj = hyp_geo_distance_m(rv->lat_deg[j + 1], rv->lon_deg[j + 1], base->lat_deg, base->lon_deg);
            if (!(dj <= o->coloc_radius_m) || rv->flag[j + 1])
                break;
            j++;
        }
        if (rv->time_s[j] - rv->time_s[i] >= o->coloc_min_s) {
            hyp_coloc c = {0};
            window_stats(rv, r, rv->time_s[i], rv->time_s[j], buf, &c);
            c.automatic = 1;
            if (c.n && add_coloc(r, &c))
                return HYP_ERR_NOMEM;
        }
        i = j + 1;
    }
    return HYP_OK;
}

/* Offset model: constant from one calibration; with several, linear in time
 * through the midpoints of successive calibrations (instrument drift),
 * carried on to the ends of the first and last window and held constant
 * beyond them (no extrapolation of drift into time nothing calibrates). The
 * 1-sigma follows by linear error propagation of the two window means. */
static void offset_at(const hyp_correct_result *r, double t, double *off, double *sig)
{
    const hyp_coloc *c = r->colocs;
    size_t n = r->n_colocs;
    if (n == 1) {
        *off = c[0].offset_pa;
        *sig = c[0].se_pa;
        return;
    }
    if (t < c[0].start_s)
        t = c[0].start_s;
    if (t > c[n - 1].end_s)
        t = c[n - 1].end_s;
    size_t k = 0;
    while (k + 2 < n && t > 0.5 * (c[k + 1].start_s + c[k + 1].end_s))
        k++;
    double a = 0.5 * (c[k].start_s + c[k].end_s), b = 0.5 * (c[k + 1].start_s + c[k + 1].end_s);
    double w = b > a ? (t - a) / (b - a) : 0.0;
    *off = (1.0 - w) * c[k].offset_pa + w * c[k + 1].offset_pa;
    *sig = hypot((1.0 - w) * c[k].se_pa, w * c[k + 1].se_pa);
}

typedef struct column {
    double tb_k, rhb, tr_k, rhr;   /* base and rover thermometer, humidity */
} column;

/* Height of one sample above the base sensor, m, and the column's mean
 * virtual temperature. The rover-end temperature depends on the height
 * (base + lapse), so three fixed-point steps; each changes dz by a factor
 * of about lapse * dz / T (< 3 %), so three are converged to < 1 mm. */
static double height_above_base(const hyp_correct_opts *o, const column *c, double pb, double pr,
                                double h_base, double lat, double *tv_mean)
{
    double dz = 0.0, tv = NAN;
    for (int it = 0; it < 4; it++) {
        double t_top = c->tb_k + o->lapse_k_per_m * dz;
        if (o->tcol == HYP_TCOL_ROVER && c->tr_k == c->tr_k)
            t_top = c->tr_k;
        else if (o->tcol == HYP_TCOL_BOTH && c->tr_k == c->tr_k)
            t_top = 0.5 * (t_top + c->tr_k);
        double tvb = hyp_virtual_temperature_k(c->tb_k, c->rhb, pb);
        double tvr = hyp_virtual_temperature_k(t_top, c->rhr, pr);
        tv = hyp_layer_mean_temperature_k(tvb, tvr);
        double dphi = hyp_hypsometric_dphi_j_kg(pb, pr, tv);
        dz = hyp_height_difference_m(dphi, h_base, lat);
        if (dz != dz)
            break;
    }
    *tv_mean = tv;
    return dz;
}

static double pick(double a, double b, double c)
{
    return a == a ? a : b == b ? b : c;
}

typedef struct noise { double rover_pa, base_pa, tsig_k, lapse_sig; } noise;

static void estimate_noise(const hyp_series *rv, const base_view *bv, const hyp_correct_opts *o,
                           hyp_correct_result *r, noise *nz, hyp_msgs *msgs)
{
    r->base_noise_pa = hyp__noise_second_diff(bv->t, bv->p, NULL, bv->n, 3.0 * o->max_gap_s);
    double floor_pa = 0.5;   /* below half a pascal the estimate is resolution-limited */
    if (!(r->base_noise_pa >= floor_pa))
        r->base_noise_pa = floor_pa;
    double ss = 0.0, nn = 0.0;
    for (size_t k = 0; k < r->n_colocs; k++) {
        ss += r->colocs[k].scatter_pa * r->colocs[k].scatter_pa * (double)(r->colocs[k].n - 1);
        nn += (double)(r->colocs[k].n - 1);
    }
    r->diff_noise_pa = nn > 0 ? sqrt(ss / nn) : NAN;
    if (r->diff_noise_pa == r->diff_noise_pa) {
        double v = r->diff_noise_pa * r->diff_noise_pa - r->base_noise_pa * r->base_noise_pa;
        r->rover_noise_pa = sqrt(v > floor_pa * floor_pa ? v : floor_pa * floor_pa);
    } else {
        unsigned char *ok = malloc(rv->count ? rv->count : 1);
        if (ok) {
            for (size_t i = 0; i < rv->count; i++)
                ok[i] = rv->flag[i] == 0;
            r->rover_noise_pa = hyp__noise_second_diff(rv->time_s, rv->pressure_pa, ok, rv->count, 3.0 * o->max_gap_s);
            free(ok);
        }
        if (!(r->rover_noise_pa >= floor_pa))
            r->rover_noise_pa = floor_pa;
        hyp_msgs_add(msgs, HYP_NOTE, "rover noise %.2f Pa estimated from second differences along the track (no co-location to measure it)",
                     r->rover_noise_pa);
    }
    nz->rover_pa = r->rover_noise_pa;
    nz->base_pa = r->base_noise_pa;
    nz->tsig_k = o->tcol_sigma_k;
    nz->lapse_sig = o->lapse_sigma_k_per_m;
}

static void interpolate_base(const hyp_series *rv, const base_view *bv, const hyp_correct_opts *o,
                             hyp_correct_result *r, column *cols)
{
    for (size_t i = 0; i < rv->count; i++) {
        r->status[i] = HYP_PT_OK;
        if (rv->flag[i]) {
            r->status[i] = HYP_PT_REFUSED;
            r->n_flag[rv->flag[i]]++;
            continue;
        }
        size_t k;
        double w;
        hyp_point_status st = bracket(bv, rv->time_s[i], o->max_gap_s, &k, &w);
        if (st) {
            r->status[i] = (uint8_t)st;
            continue;
        }
        r->base_p_pa[i] = bv->p[k] + w * (bv->p[k + 1] - bv->p[k]);
        cols[i].tb_k = lerp(bv->temp, k, w);
        cols[i].rhb = lerp(bv->rh, k, w);
    }
}

static hyp_status calibrate(const hyp_series *rv, const hyp_base *base, const hyp_correct_opts *o,
                            hyp_correct_result *r, hyp_msgs *msgs, hyp_error *err)
{
    double *buf = malloc((rv->count ? rv->count : 1) * sizeof *buf);
    if (!buf)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    hyp_status st = HYP_OK;
    for (size_t k = 0; k < o->n_colocate && !st; k++) {
        hyp_coloc c = {0};
        window_stats(rv, r, o->colocate[k].start_s, o->colocate[k].end_s, buf, &c);
        if (!c.n) {
            char a[32], b[32];
            hyp_time_format(o->colocate[k].start_s, a, sizeof a);
            hyp_time_format(o->colocate[k].end_s, b, sizeof b);
            st = hyp_error_set(err, HYP_ERR_NODATA, "co-location window %s to %s holds fewer than two rover samples with base pressure", a, b);
        } else if (add_coloc(r, &c))
            st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    int have_pos = base->lat_deg == base->lat_deg && base->lon_deg == base->lon_deg && rv->has_position;
    if (!st && o->auto_colocate && o->n_colocate == 0 && have_pos && find_colocations(rv, base, o, r, buf))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    if (!st && o->auto_colocate && o->n_colocate == 0 && !have_pos && o->offset_pa != o->offset_pa)
        hyp_msgs_add(msgs, HYP_WARNING, "%s: no base position (--base-at) or no rover positions: co-location cannot be found automatically",
                     base->name);
    free(buf);
    return st;
}

static void compute_heights(const hyp_series *rv, const hyp_base *base, const hyp_correct_opts *o,
                            const noise *nz, const column *cols, hyp_correct_result *r)
{
    r->tcol_min_k = INFINITY;
    r->tcol_max_k = -INFINITY;
    for (size_t i = 0; i < rv->count; i++) {
        if (r->status[i] != HYP_PT_OK)
            continue;
        double off, off_sig;
        if (r->offset_source == 1) {
            off = o->offset_pa;
            off_sig = o->offset_sigma_pa;
        } else if (r->offset_source == 2) {
            offset_at(r, rv->time_s[i], &off, &off_sig);
        } else {
            off = 0.0;
            off_sig = o->uncal_offset_sigma_pa;
        }
        column c = cols[i];
        double pb = r->base_p_pa[i], pr = rv->pressure_pa[i] - off;
        double lat = pick(rv->lat_deg[i], base->lat_deg, 45.0);
        c.tr_k = rv->temp_k[i];
        c.rhr = pick(rv->rh_pct[i], c.rhb, o->default_rh_pct);
        c.rhb = pick(c.rhb, rv->rh_pct[i], o->default_rh_pct);
        if (c.tb_k != c.tb_k) {
            /* No base thermometer: carry the rover's down, or the standard
             * atmosphere at the base height (USSA 1976). */
            double dz0 = (pb - pr) / 12.0;  /* ~12 Pa per m, first guess only */
            c.tb_k = c.tr_k == c.tr_k ? c.tr_k - o->lapse_k_per_m * dz0
                                      : hyp_isa_temperature_k(hyp_geopotential_from_geometric_m(base->height_m));
        }
        double tv;
        double dz = height_above_base(o, &c, pb, pr, base->height_m, lat, &tv);
        if (dz != dz) {
            r->status[i] = HYP_PT_NO_CONVERGE;
            continue;
        }
        double g = hyp_gravity_at_height_m_s2(lat, base->height_m + 0.5 * dz);
        double k = HYP_RD_J_KG_K * tv / g;   /* m per unit of ln p */
        double sr = k * hypot(nz->rover_pa, off_sig) / pr, sb = k * nz->base_pa / pb;
        double st = dz * hypot(nz->tsig_k, nz->lapse_sig * 0.5 * dz) / tv;
        r->height_m[i] = base->height_m + dz;
        r->sigma_m[i] = sqrt(sr * sr + sb * sb + st * st);
        r->offset_pa[i] = off;
        r->tcol_k[i] = tv;
        if (tv < r->tcol_min_k) r->tcol_min_k = tv;
        if (tv > r->tcol_max_k) r->tcol_max_k = tv;
    }
}

static void choose_offset(const hyp_correct_opts *o, hyp_correct_result *r, const hyp_base *base, hyp_msgs *msgs)
{
    if (o->offset_pa == o->offset_pa) {
        r->offset_source = 1;
        if (r->n_colocs)
            hyp_msgs_add(msgs, HYP_NOTE, "explicit --offset %.1f Pa used; %zu co-location(s) found but not used",
                         o->offset_pa, r->n_colocs);
    } else if (r->n_colocs) {
        r->offset_source = 2;
    } else {
        r->offset_source = 0;
        hyp_msgs_add(msgs, HYP_WARNING,
                     "%s: no co-location and no --offset: rover and base are taken to read alike, with a 1-sigma offset of %.0f Pa (about %.0f m) in every height",
                     base->name, o->uncal_offset_sigma_pa, o->uncal_offset_sigma_pa / 12.0);
    }
}

static void summarise(const hyp_series *rv, const base_view *bv, const hyp_correct_opts *o, hyp_correct_result *r)
{
    for (size_t i = 0; i < rv->count; i++) {
        r->n_status[r->status[i]]++;
        r->n_ok += r->status[i] == HYP_PT_OK;
    }
    /* least-squares slope of base pressure over time */
    double mt = 0, mp = 0;
    for (size_t i = 0; i < bv->n; i++) {
        mt += bv->t[i];
        mp += bv->p[i];
    }
    mt /= (double)bv->n;
    mp /= (double)bv->n;
    double sxy = 0, sxx = 0;
    for (size_t i = 0; i < bv->n; i++) {
        sxy += (bv->t[i] - mt) * (bv->p[i] - mp);
        sxx += (bv->t[i] - mt) * (bv->t[i] - mt);
    }
    r->base_tendency_pa_s = sxx > 0 ? sxy / sxx : 0.0;
    static const char *tsrc[] = {"base thermometer and lapse rate", "base and rover thermometers",
                                 "mean of lapse-rate and rover estimates", "standard atmosphere"};
    snprintf(r->method, sizeof r->method, "single base; column temperature from %s", tsrc[r->tcol_source]);
    (void)o;
}

hyp_status hyp_correct_single_base(const hyp_series *rover, const hyp_base *base,
                                   const hyp_correct_opts *opts, hyp_correct_result *res,
                                   hyp_msgs *msgs, hyp_error *err)
{
    hyp_correct_opts dflt;
    if (!opts) {
        hyp_correct_opts_init(&dflt);
        opts = &dflt;
    }
    if (!(base->height_m == base->height_m && fabs(base->height_m) < 10000.0))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: base height %g m is not a height between -10000 and 10000 m",
                             base->name, base->height_m);
    base_view bv;
    column *cols = NULL;
    hyp_status st = base_view_make(base, &bv, err);
    if (st)
        goto out;
    if (alloc_result(res, rover->count) || !(cols = calloc(rover->count ? rover->count : 1, sizeof *cols))) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    interpolate_base(rover, &bv, opts, res, cols);
    st = calibrate(rover, base, opts, res, msgs, err);
    if (st)
        goto out;
    choose_offset(opts, res, base, msgs);
    noise nz;
    estimate_noise(rover, &bv, opts, res, &nz, msgs);
    int base_has_t = 0;
    for (size_t i = 0; i < bv.n && !base_has_t; i++)
        base_has_t = bv.temp[i] == bv.temp[i];
    res->tcol_source = !base_has_t && !rover->has_temp ? 3 : (int)opts->tcol;
    if (res->tcol_source == 3) {
        nz.tsig_k = hypot(nz.tsig_k, 10.0);   /* a season's spread about the standard atmosphere, from memory */
        hyp_msgs_add(msgs, HYP_WARNING, "no temperature in any log: the column temperature is the standard atmosphere's, with a 1-sigma of %.0f K",
                     nz.tsig_k);
    }
    compute_heights(rover, base, opts, &nz, cols, res);
    summarise(rover, &bv, opts, res);
    if (res->n_ok == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA,
                           "no rover sample could be corrected (%zu outside the base log's time span, %zu in base gaps, %zu refused by the reader)",
                           res->n_status[HYP_PT_OUTSIDE_BASE], res->n_status[HYP_PT_BASE_GAP], res->n_status[HYP_PT_REFUSED]);
out:
    free(cols);
    base_view_free(&bv);
    return st;
}
