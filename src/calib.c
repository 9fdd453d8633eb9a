/* calib.c - calibration windows: the rover beside the base (co-location)
 * and on benchmarks (ties), found from positions, from GPX waypoints named
 * like a benchmark, or given explicitly; and their statistics. */
#include "correct_int.h"
#include "hypsolev/geo.h"
#include "hypsolev/timeparse.h"
#include "stats.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static hyp_status push(hyp_correct_result *r, const hyp_calib *c)
{
    hyp_calib *p = realloc(r->calibs, (r->n_calibs + 1) * sizeof *p);
    if (!p)
        return HYP_ERR_NOMEM;
    r->calibs = p;
    r->calibs[r->n_calibs++] = *c;
    return HYP_OK;
}

/* Statistics of the raw heights over [t0, t1], computed here (no raw
 * height is kept per sample). 0 when fewer than 2 samples. */
static int window_stats(hyp__work *w, hyp_calib *c)
{
    size_t n = 0, cap = 0;
    double sens = 0, lat = 0, lon = 0, *buf = NULL;
    size_t npos = 0;
    hyp__in in = {0};   /* kept across samples: its hint */
    for (size_t i = 0; i < w->n; i++) {
        if (w->r->status[i] != HYP_PT_OK || w->rv->time_s[i] < c->start_s || w->rv->time_s[i] > c->end_s)
            continue;
        double si, tv, raw = hyp__inputs(w, i, &in) ? NAN : hyp__raw_height(w, i, &in, &si, &tv);
        if (raw != raw)
            continue;
        if (n == cap) {
            double *p = realloc(buf, (cap = cap ? 2 * cap : 256) * sizeof *buf);
            if (!p) {
                free(buf);
                return -1;
            }
            buf = p;
        }
        buf[n++] = raw;
        sens += si;
        if (hyp_series_lat(w->rv, i) == hyp_series_lat(w->rv, i)) {
            lat += hyp_series_lat(w->rv, i);
            lon += hyp_series_lon(w->rv, i);
            npos++;
        }
    }
    if (n < 2) {
        free(buf);
        return 0;
    }
    double mean, sd, neff;
    hyp__mean_sd_neff(buf, n, &mean, &sd, &neff);
    free(buf);
    c->n = n;
    c->raw_m = mean;
    c->se_m = sd / sqrt(neff);
    c->sens_m_per_pa = sens / (double)n;
    c->scatter_pa = sd / c->sens_m_per_pa;
    c->lat_deg = npos ? lat / (double)npos : w->base->lat_deg;
    c->lon_deg = npos ? lon / (double)npos : w->base->lon_deg;
    /* the offset that closes it: h(p - o) = known, h(p - o) ~ raw + sens o */
    c->offset_pa = (c->known_m - c->raw_m) / c->sens_m_per_pa;
    c->misclosure_m = c->raw_m - c->known_m;
    return 1;
}

static double dist_to(const hyp__work *w, size_t i, double lat, double lon)
{
    return hyp_geo_distance_m(hyp_series_lat(w->rv, i), hyp_series_lon(w->rv, i), lat, lon);
}

/* Within the run i..j near a point, the stretch where the rover stood
 * still: grown from the sample nearest the point while positions stay within
 * stationary_m of it. */
static void stationary_part(const hyp__work *w, size_t *i, size_t *j, double lat, double lon)
{
    size_t a = *i;
    double best = INFINITY;
    for (size_t k = *i; k <= *j; k++) {
        double d = dist_to(w, k, lat, lon);
        if (d < best)
            best = d, a = k;
    }
    double la = hyp_series_lat(w->rv, a), lo = hyp_series_lon(w->rv, a), r = w->o->stationary_m;
    size_t lo_i = a, hi_i = a;
    while (lo_i > *i && dist_to(w, lo_i - 1, la, lo) <= r)
        lo_i--;
    while (hi_i < *j && dist_to(w, hi_i + 1, la, lo) <= r)
        hi_i++;
    *i = lo_i;
    *j = hi_i;
}

/* Runs of samples within radius of (lat, lon), standing still there for at
 * least min_s. */
static hyp_status find_near(hyp__work *w, hyp_calib *proto, double lat, double lon, double radius,
                            double min_s)
{
    const hyp_series *rv = w->rv;
    size_t i = 0;
    while (i < w->n) {
        if (!(w->r->status[i] == HYP_PT_OK && dist_to(w, i, lat, lon) <= radius)) {
            i++;
            continue;
        }
        size_t j = i;
        while (j + 1 < w->n && !rv->flag[j + 1] && dist_to(w, j + 1, lat, lon) <= radius)
            j++;
        size_t next = j + 1, a = i, b = j;
        stationary_part(w, &a, &b, lat, lon);
        if (rv->time_s[b] - rv->time_s[a] >= min_s) {
            hyp_calib c = *proto;
            c.start_s = rv->time_s[a];
            c.end_s = rv->time_s[b];
            int ok = window_stats(w, &c);
            if (ok < 0 || (ok && push(w->r, &c)))
                return HYP_ERR_NOMEM;
        }
        i = next;
    }
    return HYP_OK;
}

/* bm >= 0: benchmark bm; bm < 0: base -1 - bm (so -1 is the first base). */
static void proto_for(hyp__work *w, hyp_calib *c, long bm, hyp_calib_how how)
{
    memset(c, 0, sizeof *c);
    c->how = how;
    if (bm < 0) {
        const hyp_base *b = &w->bases[-1 - bm];
        c->kind = HYP_CAL_BASE;
        snprintf(c->name, sizeof c->name, "%s", w->nb > 1 ? b->name : "base");
        c->known_m = b->height_m;
        c->known_sigma_m = 0.0;
    } else {
        const hyp_benchmarks *b = w->o->benchmarks;
        c->kind = HYP_CAL_BENCHMARK;
        snprintf(c->name, sizeof c->name, "%s", b->name[bm]);
        c->known_m = b->height_m[bm];
        c->known_sigma_m = b->sigma_m[bm];
    }
}

static hyp_status explicit_windows(hyp__work *w, hyp_error *err)
{
    const hyp_correct_opts *o = w->o;
    for (size_t k = 0; k < o->n_colocate + o->n_ties; k++) {
        hyp_calib c;
        long bm = -1;
        double t0, t1;
        if (k < o->n_colocate) {
            t0 = o->colocate[k].start_s;
            t1 = o->colocate[k].end_s;
        } else {
            const hyp_tie_spec *ts = &o->ties[k - o->n_colocate];
            t0 = ts->start_s;
            t1 = ts->end_s;
            if (strcmp(ts->name, "base") != 0 && (bm = hyp_benchmarks_find(o->benchmarks, ts->name)) < 0)
                return hyp_error_set(err, HYP_ERR_VALUE, "tie list line %u: \"%s\" is not a benchmark (nor \"base\")",
                                     ts->line, ts->name);
        }
        proto_for(w, &c, bm, HYP_HOW_EXPLICIT);
        c.start_s = t0;
        c.end_s = t1;
        int ok = window_stats(w, &c);
        if (ok < 0)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        if (!ok) {
            char a[40], b[40];
            hyp_time_format(t0, a, sizeof a);
            hyp_time_format(t1, b, sizeof b);
            return hyp_error_set(err, HYP_ERR_NODATA, "%s window %s to %s holds fewer than two rover samples with base pressure",
                                 c.name, a, b);
        }
        if (push(w->r, &c))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    return HYP_OK;
}

/* Nearest usable rover sample to time t, or -1 beyond max_dt_s. */
static long nearest_sample(const hyp__work *w, double t, double max_dt_s)
{
    long best = -1;
    double bd = max_dt_s;
    for (size_t i = 0; i < w->n; i++)
        if (w->r->status[i] == HYP_PT_OK && fabs(w->rv->time_s[i] - t) <= bd) {
            bd = fabs(w->rv->time_s[i] - t);
            best = (long)i;
        }
    return best;
}

/* A waypoint named like a benchmark: the stationary run of samples around
 * its time (within stationary_m of the sample nearest to it, at most 10
 * minutes either side). */
static hyp_status waypoint_ties(hyp__work *w)
{
    const hyp_waypoints *wp = w->o->waypoints;
    for (size_t k = 0; wp && k < wp->count; k++) {
        long bm = hyp_benchmarks_find(w->o->benchmarks, wp->name[k]);
        if (bm < 0 || wp->time_s[k] != wp->time_s[k])
            continue;
        long a = nearest_sample(w, wp->time_s[k], 120.0);
        if (a < 0) {
            hyp_msgs_add(w->msgs, HYP_WARNING, "waypoint %s: no rover sample within 2 minutes of its time; not used as a tie",
                         wp->name[k]);
            continue;
        }
        double la = hyp_series_lat(w->rv, a), lo = hyp_series_lon(w->rv, a);
        double d = hyp_geo_distance_m(la, lo, w->o->benchmarks->lat_deg[bm], w->o->benchmarks->lon_deg[bm]);
        if (d > w->o->tie_radius_m)
            hyp_msgs_add(w->msgs, HYP_WARNING, "waypoint %s is %.0f m from the benchmark's listed position; tied as the waypoint says",
                         wp->name[k], d);
        size_t i = (size_t)a, j = (size_t)a;
        double t = w->rv->time_s[a];
        while (i > 0 && w->r->status[i - 1] == HYP_PT_OK && t - w->rv->time_s[i - 1] <= 600.0 &&
               !(dist_to(w, i - 1, la, lo) > w->o->stationary_m))
            i--;
        while (j + 1 < w->n && w->r->status[j + 1] == HYP_PT_OK && w->rv->time_s[j + 1] - t <= 600.0 &&
               !(dist_to(w, j + 1, la, lo) > w->o->stationary_m))
            j++;
        hyp_calib c;
        proto_for(w, &c, bm, HYP_HOW_WAYPOINT);
        c.start_s = w->rv->time_s[i];
        c.end_s = w->rv->time_s[j];
        int ok = j - i >= 2 ? window_stats(w, &c) : 0;
        if (ok < 0 || (ok && push(w->r, &c)))
            return HYP_ERR_NOMEM;
    }
    return HYP_OK;
}

/* Drops a window that overlaps an earlier one for the same point found a
 * more trusted way (explicit > waypoint > positions). */
static void dedup(hyp_correct_result *r)
{
    size_t out = 0;
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        int dup = 0;
        for (size_t j = 0; j < r->n_calibs && !dup; j++) {
            const hyp_calib *d = &r->calibs[j];
            if (j == k || strcmp(c->name, d->name) != 0 || d->end_s < c->start_s || d->start_s > c->end_s)
                continue;
            dup = d->how > c->how || (d->how == c->how && j < k);
        }
        if (!dup)
            r->calibs[out++] = *c;
    }
    r->n_calibs = out;
}

static int by_time(const void *a, const void *b)
{
    double x = ((const hyp_calib *)a)->start_s, y = ((const hyp_calib *)b)->start_s;
    return (x > y) - (x < y);
}

hyp_status hyp__find_calibrations(hyp__work *w, hyp_error *err)
{
    const hyp_correct_opts *o = w->o;
    hyp_status st = explicit_windows(w, err);
    int base_pos = 0;
    for (size_t k = 0; k < w->nb && !st; k++) {
        const hyp_base *b = &w->bases[k];
        if (!(b->lat_deg == b->lat_deg && w->rv->has_position))
            continue;
        base_pos = 1;
        if (!(o->auto_colocate && o->n_colocate == 0))
            continue;
        hyp_calib proto;
        proto_for(w, &proto, -1 - (long)k, HYP_HOW_POSITION);
        if (find_near(w, &proto, b->lat_deg, b->lon_deg, o->coloc_radius_m, o->coloc_min_s))
            st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    if (!st && o->benchmarks && waypoint_ties(w))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t b = 0; !st && o->benchmarks && w->rv->has_position && b < o->benchmarks->count; b++) {
        hyp_calib proto;
        proto_for(w, &proto, (long)b, HYP_HOW_POSITION);
        if (find_near(w, &proto, o->benchmarks->lat_deg[b], o->benchmarks->lon_deg[b], o->tie_radius_m,
                      o->tie_min_s))
            st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    if (!st && o->auto_colocate && o->n_colocate == 0 && !base_pos && o->offset_pa != o->offset_pa)
        hyp_msgs_add_at(w->msgs, HYP_WARNING, "calibration", w->base->name, 0, "no base position (--base-at) or no rover positions: co-location cannot be found automatically");
    if (!st && w->r->n_calibs) {
        dedup(w->r);
        qsort(w->r->calibs, w->r->n_calibs, sizeof *w->r->calibs, by_time);
    }
    return st;
}
