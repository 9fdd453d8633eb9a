/* network_occupations.c - the windows in which a rover stood on a station:
 * booked in the field book, marked by a GPX waypoint named like the
 * station, or found in the track (within a radius of the station for a
 * minimum time, isolated stray fixes tolerated). The book wins; a found
 * window that contradicts it is reported. */
#define _GNU_SOURCE
#include "network_int.h"
#include "hypsolev/geo.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#define MAX_STRAY 3          /* fixes off the station in a row that do not end a window */
#define MAX_SAMPLE_GAP_S 120 /* a longer gap between fixes ends a window */

typedef struct winlist {
    hyp__window *w;
    size_t n, alloc;
} winlist;

static int win_add(winlist *l, size_t station, hyp_occ_source src, double t0, double t1, unsigned line)
{
    if (l->n == l->alloc) {
        size_t na = l->alloc ? 2 * l->alloc : 32;
        hyp__window *p = realloc(l->w, na * sizeof *p);
        if (!p)
            return -1;
        l->w = p;
        l->alloc = na;
    }
    l->w[l->n++] = (hyp__window){station, src, t0, t1, line};
    return 0;
}

static int overlaps(const hyp__window *a, double t0, double t1)
{
    return a->t0 < t1 && t0 < a->t1;
}

/* Stations sorted by latitude, for a band search around a fix. */
typedef struct near {
    const hyp_benchmarks *st;
    size_t *by_lat;
} near;

static int cmp_lat(const void *a, const void *b, void *ctx)
{
    const hyp_benchmarks *st = ctx;
    double x = st->lat_deg[*(const size_t *)a], y = st->lat_deg[*(const size_t *)b];
    return (x > y) - (x < y);
}

/* The nearest station within r_m of (lat, lon), or -1: a latitude band by
 * binary search, a longitude check, then the geodesic distance. */
static long nearest(const near *nr, double lat, double lon, double r_m)
{
    const hyp_benchmarks *st = nr->st;
    double dlat = r_m / 111000.0 * 1.01, coslat = cos(lat * 3.14159265358979323846 / 180.0);
    double dlon = coslat > 1e-6 ? dlat / coslat : 360.0;
    size_t lo = 0, hi = st->count;
    while (lo < hi) {   /* first station with lat >= lat - dlat */
        size_t mid = lo + (hi - lo) / 2;
        if (st->lat_deg[nr->by_lat[mid]] < lat - dlat)
            lo = mid + 1;
        else
            hi = mid;
    }
    long best = -1;
    double best_d = r_m;
    for (size_t j = lo; j < st->count && st->lat_deg[nr->by_lat[j]] <= lat + dlat; j++) {
        size_t s = nr->by_lat[j];
        double dl = fabs(st->lon_deg[s] - lon);
        if (dl > 180.0)
            dl = 360.0 - dl;
        if (dl > dlon)
            continue;
        double d = hyp_geo_distance_m(lat, lon, st->lat_deg[s], st->lon_deg[s]);
        if (d <= best_d)
            best_d = d, best = (long)s;
    }
    return best;
}

/* Windows found from the positions. */
static int found_windows(const hyp__net *N, const hyp_series *s, const near *nr, winlist *out)
{
    long cur = -1;
    double start = 0, last = 0;
    int stray = 0;
    for (size_t i = 0; i <= s->count; i++) {
        long st = -1;
        double t = i < s->count ? s->time_s[i] : INFINITY;
        if (i < s->count && !s->flag[i]) {
            double la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
            if (la == la && lo == lo)
                st = nearest(nr, la, lo, N->o->occ_radius_m);
        }
        if (cur >= 0 && st == cur && t - last <= MAX_SAMPLE_GAP_S) {
            last = t, stray = 0;
            continue;
        }
        if (cur >= 0 && i < s->count && st != cur && ++stray <= MAX_STRAY && t - last <= MAX_SAMPLE_GAP_S)
            continue;
        if (cur >= 0 && last - start >= N->o->occ_min_s && win_add(out, (size_t)cur, HYP_OCC_FOUND, start, last, 0))
            return -1;
        cur = st, start = last = t, stray = 0;
    }
    return 0;
}

static int book_for_track(const hyp__net *N, size_t e, const char *name)
{
    const char *r = N->book[e].rover;
    return r[0] ? strcmp(r, name) == 0 : N->r->n_tracks == 1;
}

static hyp_status book_windows(hyp__net *N, size_t k, winlist *out, hyp_error *err)
{
    const hyp_network_track *t = &N->r->tracks[k];
    const hyp_benchmarks *st = &N->r->stations;
    for (size_t e = 0; e < N->n_book; e++) {
        const hyp_book_entry *b = &N->book[e];
        if (!book_for_track(N, e, t->name))
            continue;
        N->book_matched[e] = 1;
        if (b->end_s < t->t0_s || b->start_s > t->t1_s) {
            char a[40], z[40];
            hyp_time_format(t->t0_s, a, sizeof a);
            hyp_time_format(t->t1_s, z, sizeof z);
            hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", N->o->fieldbook_path, b->line,
                            "the window on %s lies outside the track %s (%s to %s); not used", b->station, t->name, a, z);
            continue;
        }
        for (size_t j = 0; j < out->n; j++)
            if (overlaps(&out->w[j], b->start_s, b->end_s))
                return hyp_error_set(err, HYP_ERR_VALUE,
                                     "%s:%u: the window on %s overlaps line %u's on %s for the same rover %s; one of them is "
                                     "booked wrong", N->o->fieldbook_path, b->line, b->station, out->w[j].line,
                                     st->name[out->w[j].station], t->name);
        if (win_add(out, (size_t)hyp_benchmarks_find(st, b->station), HYP_OCC_BOOK, b->start_s, b->end_s, b->line))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    return HYP_OK;
}

/* Adds a found or waypoint window unless a window already there covers its
 * time: the same station is the same occupation; another station is a
 * contradiction, reported. */
static int merge_one(hyp__net *N, const hyp_network_track *t, winlist *out, const hyp__window *w)
{
    const hyp_benchmarks *st = &N->r->stations;
    for (size_t j = 0; j < out->n; j++) {
        const hyp__window *b = &out->w[j];
        if (!overlaps(b, w->t0, w->t1))
            continue;
        if (b->station != w->station) {
            char a[40];
            hyp_time_format(w->t0, a, sizeof a);
            if (b->source == HYP_OCC_BOOK)
                hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", N->o->fieldbook_path, b->line,
                                "%s was %s on %s from %s, where the book has %s; the book is used", t->name,
                                w->source == HYP_OCC_WAYPOINT ? "marked (waypoint)" : "found standing", st->name[w->station],
                                a, st->name[b->station]);
            else
                hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", t->path, 0,
                                "a waypoint names %s at %s, where the track stood on %s; the position's station is used",
                                st->name[w->station], a, st->name[b->station]);
        }
        return 0;
    }
    return win_add(out, w->station, w->source, w->t0, w->t1, w->line);
}

static int waypoint_windows(const hyp__net *N, const hyp_waypoints *wp, winlist *out)
{
    if (!wp)
        return 0;
    double half = 0.5 * N->o->waypoint_window_s;
    for (size_t i = 0; i < wp->count; i++) {
        long s = wp->name[i] ? hyp_benchmarks_find(&N->r->stations, wp->name[i]) : -1;
        if (s >= 0 && wp->time_s[i] == wp->time_s[i] &&
            win_add(out, (size_t)s, HYP_OCC_WAYPOINT, wp->time_s[i] - half, wp->time_s[i] + half, 0))
            return -1;
    }
    return 0;
}

static int cmp_win(const void *a, const void *b)
{
    double x = ((const hyp__window *)a)->t0, y = ((const hyp__window *)b)->t0;
    return (x > y) - (x < y);
}

hyp_status hyp__net_windows(hyp__net *N, size_t k, const hyp_series *s, const hyp_waypoints *wp, hyp__window **wout,
                            size_t *nout, hyp_error *err)
{
    winlist out = {0}, found = {0}, wpts = {0};
    const hyp_benchmarks *st = &N->r->stations;
    near nr = {st, malloc((st->count ? st->count : 1) * sizeof(size_t))};
    hyp_status rc = nr.by_lat ? book_windows(N, k, &out, err) : hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    if (!rc) {
        for (size_t i = 0; i < st->count; i++)
            nr.by_lat[i] = i;
        qsort_r(nr.by_lat, st->count, sizeof *nr.by_lat, cmp_lat, (void *)st);
        if ((N->o->auto_occupations && found_windows(N, s, &nr, &found)) || waypoint_windows(N, wp, &wpts))
            rc = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    for (size_t j = 0; !rc && j < found.n; j++)
        if (merge_one(N, &N->r->tracks[k], &out, &found.w[j]))
            rc = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t j = 0; !rc && j < wpts.n; j++)
        if (merge_one(N, &N->r->tracks[k], &out, &wpts.w[j]))
            rc = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    free(found.w);
    free(wpts.w);
    free(nr.by_lat);
    if (rc) {
        free(out.w);
        return rc;
    }
    if (out.n)   /* none (no window falls in the track): out.w is NULL, which qsort may not take */
        qsort(out.w, out.n, sizeof *out.w, cmp_win);
    *wout = out.w;
    *nout = out.n;
    return HYP_OK;
}
