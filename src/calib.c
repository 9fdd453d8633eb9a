/* calib.c - calibration windows: the rover beside the base (co-location)
 * and on benchmarks (ties), found from positions, from GPX waypoints named
 * like a benchmark, or given explicitly; and their statistics. */
#include "correct_int.h"
#include "base_offset.h"
#include "near_index.h"
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

/* Standing still, robustly. GNSS positions of a receiver at rest scatter
 * by metres and now and then jump tens of metres for a fix or two
 * (multipath), so a stretch is not grown from one reference fix (itself
 * off by the scatter) but judged against the median position of the
 * fixes: those within stationary_m of it count as standing; an excursion
 * beyond it whose fixes span at most EXCURSION_S (common practice, no
 * source; a walker covers 15 m in that time) is isolated, tolerated and
 * counted; a longer one ends the stretch. */
#define EXCURSION_S 15.0
#define EARTH_R_M 6371008.8   /* mean Earth radius (IUGG), for metres over a few tens of metres */

typedef struct still { size_t a, b, outliers; } still;

/* Distance (m) of sample i from (lat, lon) on the local plane (the
 * equirectangular approximation: millimetres over 100 m). */
static double plane_dist(const hyp__work *w, size_t i, double lat, double lon)
{
    const double rad = 3.14159265358979323846 / 180.0;
    double n = (hyp_series_lat(w->rv, i) - lat) * rad * EARTH_R_M;
    double e = (hyp_series_lon(w->rv, i) - lon) * rad * EARTH_R_M * cos(lat * rad);
    return hypot(e, n);
}

/* Component-wise median position of the usable samples lo..hi; -1 out of
 * memory, 0 when none has a position. */
static int median_pos(const hyp__work *w, size_t lo, size_t hi, double *lat, double *lon)
{
    double *la = malloc((hi - lo + 1) * sizeof *la), *ln = malloc((hi - lo + 1) * sizeof *ln);
    size_t n = 0;
    int ok = la && ln ? 1 : -1;
    for (size_t i = lo; ok > 0 && i <= hi; i++)
        if (w->r->status[i] == HYP_PT_OK && hyp_series_lat(w->rv, i) == hyp_series_lat(w->rv, i)) {
            la[n] = hyp_series_lat(w->rv, i);
            ln[n++] = hyp_series_lon(w->rv, i);
        }
    if (ok > 0 && n) {
        *lat = hyp__median_inplace(la, n);
        *lon = hyp__median_inplace(ln, n);
    } else if (ok > 0)
        ok = 0;
    free(la);
    free(ln);
    return ok;
}

/* From sample k (inside) one way (step +1 or -1) within lo..hi: the last
 * fix of the stretch, adding its tolerated outliers to *out. A sample the
 * reader refused ends it. */
static size_t extend(const hyp__work *w, size_t k, int step, size_t lo, size_t hi, double lat, double lon, double r,
                     size_t *out)
{
    const double *t = w->rv->time_s;
    size_t last = k, first_out = k, n_out = 0;
    while (step > 0 ? k < hi : k > lo) {
        k = step > 0 ? k + 1 : k - 1;
        if (w->r->status[k] != HYP_PT_OK)
            break;
        if (plane_dist(w, k, lat, lon) <= r) {
            *out += n_out;
            n_out = 0;
            last = k;
            continue;
        }
        if (n_out++ == 0)
            first_out = k;
        if (fabs(t[k] - t[first_out]) > EXCURSION_S)
            break;
    }
    return last;
}

/* The stretch of lo..hi where the rover stood still about the median
 * position of the core s->a..s->b, grown both ways from the fix nearest
 * that median (twice: the second time about the median of the first
 * stretch). 0 when none; -1 out of memory. */
static int still_stretch(const hyp__work *w, size_t lo, size_t hi, still *s)
{
    double lat, lon, r = w->o->stationary_m;
    s->outliers = 0;
    for (int pass = 0; pass < 2; pass++) {
        int ok = median_pos(w, s->a, s->b, &lat, &lon);
        if (ok <= 0)
            return ok;
        size_t anchor = lo;
        double best = INFINITY;
        for (size_t k = lo; k <= hi; k++) {
            double d = w->r->status[k] == HYP_PT_OK ? plane_dist(w, k, lat, lon) : NAN;
            if (d < best)
                best = d, anchor = k;
        }
        if (!(best <= r))
            return 0;
        s->outliers = 0;
        s->a = extend(w, anchor, -1, lo, hi, lat, lon, r, &s->outliers);
        s->b = extend(w, anchor, +1, lo, hi, lat, lon, r, &s->outliers);
    }
    return 1;
}

/* The end of a run of samples within radius of (lat, lon) from i: isolated
 * excursions beyond it (at most EXCURSION_S) do not end it. */
static size_t run_end(const hyp__work *w, size_t i, double lat, double lon, double radius)
{
    const hyp_series *rv = w->rv;
    size_t j = i;
    for (size_t k = i + 1; k < w->n && !rv->flag[k]; k++) {
        if (dist_to(w, k, lat, lon) <= radius)
            j = k;
        else if (rv->time_s[k] - rv->time_s[j] > EXCURSION_S + (rv->time_s[j + 1] - rv->time_s[j]))
            break;
    }
    return j;
}

/* Runs of samples within radius of (lat, lon), standing still there for at
 * least min_s. cand (ascending, nc of them), when not NULL, holds exactly
 * the samples within radius (near_index.c), which spares a geodesic per
 * sample in the search for where a run starts. */
static hyp_status find_near(hyp__work *w, hyp_calib *proto, double lat, double lon, double radius,
                            double min_s, const size_t *cand, size_t nc)
{
    const hyp_series *rv = w->rv;
    size_t i = 0, next = 0;
    while (i < w->n) {
        if (cand) {
            while (next < nc && cand[next] < i)
                next++;
            if (next == nc)
                break;
            i = cand[next];
        }
        if (!(w->r->status[i] == HYP_PT_OK && (cand || dist_to(w, i, lat, lon) <= radius))) {
            i++;
            continue;
        }
        size_t j = run_end(w, i, lat, lon, radius);
        still st = {i, j, 0};
        int ok = still_stretch(w, i, j, &st);
        if (ok < 0)
            return HYP_ERR_NOMEM;
        if (ok && rv->time_s[st.b] - rv->time_s[st.a] >= min_s) {
            hyp_calib c = *proto;
            c.start_s = rv->time_s[st.a];
            c.end_s = rv->time_s[st.b];
            c.pos_outliers = st.outliers;
            int got = window_stats(w, &c);
            if (got < 0 || (got && push(w->r, &c)))
                return HYP_ERR_NOMEM;
        }
        i = j + 1;
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
        while (i > 0 && w->r->status[i - 1] == HYP_PT_OK && t - w->rv->time_s[i - 1] <= 600.0)
            i--;
        while (j + 1 < w->n && w->r->status[j + 1] == HYP_PT_OK && w->rv->time_s[j + 1] - t <= 600.0)
            j++;
        /* standing still about the median of the minute around the waypoint */
        still st = {(size_t)a, (size_t)a, 0};
        while (st.a > i && t - w->rv->time_s[st.a - 1] <= 30.0)
            st.a--;
        while (st.b < j && w->rv->time_s[st.b + 1] - t <= 30.0)
            st.b++;
        int got = still_stretch(w, i, j, &st);
        if (got < 0)
            return HYP_ERR_NOMEM;
        if (!got)
            continue;
        i = st.a, j = st.b;
        hyp_calib c;
        proto_for(w, &c, bm, HYP_HOW_WAYPOINT);
        c.start_s = w->rv->time_s[i];
        c.end_s = w->rv->time_s[j];
        c.pos_outliers = st.outliers;
        int ok = j - i >= 2 ? window_stats(w, &c) : 0;
        if (ok < 0 || (ok && push(w->r, &c)))
            return HYP_ERR_NOMEM;
    }
    return HYP_OK;
}

/* Ties found from positions: each benchmark's samples within the tie
 * radius from the index (12 bytes a sample while it lasts), not from a
 * geodesic per benchmark and sample. */
static hyp_status benchmark_ties(hyp__work *w, hyp_error *err)
{
    const hyp_correct_opts *o = w->o;
    hyp__near_index ix;
    size_t *cand = NULL, nc = 0, cap = 0;
    hyp_status st = hyp__near_index_build(&ix, w->rv->lat_e7, w->rv->lon_e7, w->n, o->tie_radius_m);
    for (size_t b = 0; !st && b < o->benchmarks->count; b++) {
        st = hyp__near_index_query(&ix, o->benchmarks->lat_deg[b], o->benchmarks->lon_deg[b], o->tie_radius_m,
                                   &cand, &nc, &cap);
        if (st || !nc)
            continue;
        hyp_calib proto;
        proto_for(w, &proto, (long)b, HYP_HOW_POSITION);
        st = find_near(w, &proto, o->benchmarks->lat_deg[b], o->benchmarks->lon_deg[b], o->tie_radius_m,
                       o->tie_min_s, cand, nc);
    }
    hyp__near_index_free(&ix);
    free(cand);
    return st ? hyp_error_set(err, HYP_ERR_NOMEM, "out of memory") : HYP_OK;
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

/* Two bases never compared: their relative offset from what the survey
 * observes (base_offset.c); the calibrations' raw heights then change with
 * the upper base's pressures, so their statistics are computed again. */
static hyp_status upper_base_offset(hyp__work *w, hyp_error *err)
{
    int changed = hyp__estimate_base_offset(w);
    if (changed < 0)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t k = 0; changed && k < w->r->n_calibs; k++)
        if (window_stats(w, &w->r->calibs[k]) < 0)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    return HYP_OK;
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
        if (find_near(w, &proto, b->lat_deg, b->lon_deg, o->coloc_radius_m, o->coloc_min_s, NULL, 0))
            st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    if (!st && o->benchmarks && waypoint_ties(w))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    if (!st && o->benchmarks && w->rv->has_position && o->benchmarks->count)
        st = benchmark_ties(w, err);
    if (!st && o->auto_colocate && o->n_colocate == 0 && !base_pos && o->offset_pa != o->offset_pa)
        hyp_msgs_add_at(w->msgs, HYP_WARNING, "calibration", w->base->name, 0, "no base position (--base-at) or no rover positions: co-location cannot be found automatically");
    if (!st && w->r->n_calibs) {
        dedup(w->r);
        qsort(w->r->calibs, w->r->n_calibs, sizeof *w->r->calibs, by_time);
    }
    if (!st)
        st = upper_base_offset(w, err);
    return st;
}
