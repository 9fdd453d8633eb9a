/* report_figures.c - the figures of a rover's HTML report along the
 * track: heights against time and distance, the bases' pressure and
 * tendency, the offset model, the ties and the error budget. Long series
 * are thinned per pixel column (hyp__thin) without copying them. */
#include "report_html.h"
#include "correct_int.h"
#include "base_view.h"
#include "svg.h"
#include "hypsolev/geo.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define LONG_STEP_M 1000.0   /* steps longer than this go to the geodesic solver */

void hyp__rover_span(const hyp_series *s, double *t0_s, double *t1_s)
{
    *t0_s = *t1_s = NAN;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i]) {
            if (*t0_s != *t0_s)
                *t0_s = s->time_s[i];
            *t1_s = s->time_s[i];
        }
}

/* Steps between track points are metres long and a million of them would
 * take the geodesic solver about half a second; over such a step the
 * geodesic is the straight line in the local tangent plane, with the
 * ellipsoid's meridian radius M = a (1 - e^2) / W^3 and prime vertical
 * radius N = a / W, W = sqrt(1 - e^2 sin^2 lat), at the mean latitude
 * (the radii: Torge and Mueller, Geodesy, 4th ed. 2012, section 4.1, from
 * memory), with a relative error of the order of (step / radius)^2: under
 * 1e-7 below 1 km. Longer steps (after gaps) use the solver. WGS84: a =
 * 6378137 m, f = 1/298.257223563 (NIMA TR8350.2). */
#define WGS84_A 6378137.0
#define WGS84_E2 (1.0 / 298.257223563 * (2.0 - 1.0 / 298.257223563))
#define DEG (3.14159265358979323846 / 180.0)

static void cache_at(hyp__step_cache *c, double lat_deg)
{
    double s = sin(lat_deg * DEG), co = cos(lat_deg * DEG), w2 = 1.0 - WGS84_E2 * s * s, w = sqrt(w2);
    c->lat_deg = lat_deg, c->sin_lat = s, c->cos_lat = co;
    c->m_m = WGS84_A * (1.0 - WGS84_E2) / (w2 * w);
    c->n_m = WGS84_A / w;
    c->km = 3.0 * WGS84_E2 * s * co / w2;   /* dM/dlat / M */
    c->kn = WGS84_E2 * s * co / w2;         /* dN/dlat / N */
    c->set = 1;
}

static double chord(double dlat_deg, double dlon_deg, double m_m, double n_m, double cos_lat)
{
    dlon_deg = dlon_deg > 180 ? dlon_deg - 360 : dlon_deg < -180 ? dlon_deg + 360 : dlon_deg;
    double dn = dlat_deg * DEG * m_m, de = dlon_deg * DEG * n_m * cos_lat;
    return sqrt(dn * dn + de * de);
}

static int no_position(double a, double b, double c, double d)
{
    return !(a == a) || !(b == b) || !(c == c) || !(d == d);
}

double hyp__track_step_m(double lat1_deg, double lon1_deg, double lat2_deg, double lon2_deg)
{
    if (no_position(lat1_deg, lon1_deg, lat2_deg, lon2_deg))
        return NAN;
    hyp__step_cache c;
    cache_at(&c, 0.5 * (lat1_deg + lat2_deg));
    double d = chord(lat2_deg - lat1_deg, lon2_deg - lon1_deg, c.m_m, c.n_m, c.cos_lat);
    return d < LONG_STEP_M ? d : hyp_geo_distance_m(lat1_deg, lon1_deg, lat2_deg, lon2_deg);
}

/* The same with the radii and the cosine carried from a latitude within
 * 0.01 degree by their first derivatives: the terms left out are below
 * (1.75e-4)^2 / 2 = 1.5e-8 of them. */
double hyp__track_step_fast(hyp__step_cache *c, double lat1_deg, double lon1_deg, double lat2_deg, double lon2_deg)
{
    if (no_position(lat1_deg, lon1_deg, lat2_deg, lon2_deg))
        return NAN;
    double mid = 0.5 * (lat1_deg + lat2_deg);
    if (!c->set || fabs(mid - c->lat_deg) > 0.01)
        cache_at(c, mid);
    double dl = (mid - c->lat_deg) * DEG;
    double d = chord(lat2_deg - lat1_deg, lon2_deg - lon1_deg, c->m_m * (1.0 + c->km * dl), c->n_m * (1.0 + c->kn * dl),
                     c->cos_lat - c->sin_lat * dl);
    return d < LONG_STEP_M ? d : hyp_geo_distance_m(lat1_deg, lon1_deg, lat2_deg, lon2_deg);
}

/* ---- heights along the track ----------------------------------------- */

/* x of the track figures: time, or distance walked so far (a point with no
 * position keeps the distance of the one before). */
typedef struct walk {
    int by_distance;
    double unit_m;          /* metres per axis unit (1 or 1000) */
    double cum_m, lat, lon;
    int has;
    hyp__step_cache cache;
} walk;

static double walk_x(walk *w, const hyp_series *s, size_t i)
{
    if (s->flag[i])
        return NAN;
    if (!w->by_distance)
        return s->time_s[i];
    double la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
    if (la == la && lo == lo) {
        if (w->has)
            w->cum_m += hyp__track_step_fast(&w->cache, w->lat, w->lon, la, lo);
        w->lat = la, w->lon = lo, w->has = 1;
    }
    return w->cum_m / w->unit_m;
}

/* The four series: h - 2 sigma, h + 2 sigma, h, the GNSS height. */
static void track_values(const hyp_rover_run *r, size_t i, double y[4])
{
    double h = r->result.height_m[i], sg = (double)r->result.sigma_m[i];
    y[0] = h - 2.0 * sg;
    y[1] = h + 2.0 * sg;
    y[2] = h;
    y[3] = r->gnss_out_m ? (double)r->gnss_out_m[i] : NAN;
}

typedef struct track_pts {
    size_t n;
    double *x, *y[4];
} track_pts;

static void track_pts_free(track_pts *t)
{
    free(t->x);
    for (int k = 0; k < 4; k++)
        free(t->y[k]);
}

/* What both track figures need, in one pass: the time range where any
 * series is finite, the band's range, the distance walked. */
typedef struct track_range {
    double t[2], y[2], dist_m;
} track_range;

static void track_ranges(const hyp_rover_run *r, track_range *tr)
{
    const hyp_series *s = r->rover;
    walk w = {.by_distance = 1, .unit_m = 1.0};
    tr->t[0] = tr->y[0] = INFINITY;
    tr->t[1] = tr->y[1] = -INFINITY;
    for (size_t i = 0; i < s->count; i++) {
        walk_x(&w, s, i);
        double y[4];
        track_values(r, i, y);
        if (s->flag[i] || !(isfinite(y[0]) || isfinite(y[3])))
            continue;
        tr->t[0] = fmin(tr->t[0], s->time_s[i]), tr->t[1] = fmax(tr->t[1], s->time_s[i]);
        if (isfinite(y[0]) && isfinite(y[1]))
            tr->y[0] = fmin(tr->y[0], y[0]), tr->y[1] = fmax(tr->y[1], y[1]);
    }
    tr->dist_m = w.cum_m;
}

/* Thins the four series to the figure's columns and gathers the kept
 * points into arrays. */
static hyp_status track_thin(const hyp_rover_run *r, walk w, const hyp__svg *f, track_pts *out, hyp_error *err)
{
    const hyp_series *s = r->rover;
    hyp__thin th;
    memset(out, 0, sizeof *out);
    hyp_status st = hyp__thin_begin(&th, 4, f->x_lo, f->x_hi, hyp__svg_columns(f), err);
    for (size_t i = 0; !st && i < s->count; i++) {
        double x = walk_x(&w, s, i), y[4];
        track_values(r, i, y);
        st = hyp__thin_add(&th, i, x, y, err);
    }
    if (!st)
        st = hyp__thin_end(&th, err);
    size_t m = th.n ? th.n : 1;
    out->x = malloc(m * sizeof(double));
    for (int k = 0; k < 4; k++)
        out->y[k] = malloc(m * sizeof(double));
    if (!st && (!out->x || !out->y[0] || !out->y[1] || !out->y[2] || !out->y[3]))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: out of memory");
    for (size_t k = 0; !st && k < th.n; k++) {
        double y[4];
        track_values(r, th.pts[k].i, y);
        out->x[k] = th.pts[k].x;
        for (int q = 0; q < 4; q++)
            out->y[q][k] = y[q];
    }
    out->n = st ? 0 : th.n;
    hyp__thin_free(&th);
    return st;
}

static void vref_title(const hyp_rover_run *r, char *buf, size_t n)
{
    snprintf(buf, n, "height [m, %s]", hyp_vref_name(r->out_ref));
}

/* The calibrations as markers at their mid time and known height, 2 sigma bars. */
static void calib_markers(hyp__svg *f, const hyp_rover_run *r)
{
    const hyp_correct_result *res = &r->result;
    for (size_t k = 0; k < res->n_calibs; k++) {
        const hyp_calib *c = &res->calibs[k];
        double x = 0.5 * (c->start_s + c->end_s), y = c->known_m, e = 2.0 * c->known_sigma_m;
        hyp__svg_style st = hyp__svg_style_nth(2, k == 0 ? "calibration: known height, +-2 sigma" : NULL);
        st.marker = HYP__SVG_TRIANGLE;
        hyp__svg_markers(f, &x, &y, &e, 1, &st);
    }
}

static hyp_status track_figure(hyp__page *p, const hyp_rover_run *r, const track_range *tr, int by_distance,
                               hyp_error *err)
{
    walk w = {.by_distance = by_distance, .unit_m = by_distance && tr->dist_m >= 5000.0 ? 1000.0 : 1.0};
    if (by_distance && !(tr->dist_m > 0)) {
        hyp__page_out(p, "<p class=\"note\">No height against distance: the track has no two positions apart.</p>\n");
        return HYP_OK;
    }
    char ytitle[96];
    vref_title(r, ytitle, sizeof ytitle);
    hyp__svg_spec spec = {
        .id = by_distance ? "height-distance" : "height-time",
        .title = by_distance ? "Corrected height along the track" : "Corrected height against time",
        .width_px = HYP__FIG_W, .height_px = HYP__FIG_H,
        .x = {.title = by_distance ? (w.unit_m > 1 ? "distance along the track [km]" : "distance along the track [m]")
                                   : "time [UTC]",
              .lo = by_distance ? 0 : tr->t[0], .hi = by_distance ? tr->dist_m / w.unit_m : tr->t[1],
              .time_utc = !by_distance, .ticks = 8},
        .y = {.title = ytitle, .lo = tr->y[0], .hi = tr->y[1]},
    };
    hyp__svg f;
    track_pts t = {0};
    hyp__page_figure(p);
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st && (st = track_thin(r, w, &f, &t, err)))
        hyp__svg_discard(&f);
    if (!st) {
        hyp__svg_style g = {.colour = 1, .dash = 0, .width_px = 0.6, .label = "GNSS height (the track's own)"};
        hyp__svg_style h = {.colour = 0, .dash = 0, .width_px = 1.4, .label = "corrected height"};
        if (r->gnss_out_m)
            hyp__svg_line(&f, t.x, t.y[3], t.n, &g);
        hyp__svg_band(&f, t.x, t.y[0], t.y[1], t.n, 0, "+-2 sigma");
        hyp__svg_line(&f, t.x, t.y[2], t.n, &h);
        if (!by_distance)
            calib_markers(&f, r);
        st = hyp__svg_end(&f);
    }
    if (!st)
        hyp__page_figure_end(p,
                             "Corrected heights (line) with their &#177;2-sigma band, and the track's own GNSS heights "
                             "(thin line) in the same reference%s. %s%z samples drawn as %z points: per pixel column the "
                             "first, lowest, highest and last point of each series, so every extreme is shown. GNSS "
                             "heights outside the band's range are cut at the frame.",
                             by_distance ? "" : "; triangles are the calibrations' known heights with &#177;2 sigma",
                             by_distance ? "Distance: the geodesic length of the steps between positions, summed. " : "",
                             r->rover->count, t.n);
    track_pts_free(&t);
    return st;
}

hyp_status hyp__fig_heights(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    track_range tr;
    track_ranges(r, &tr);
    if (!(tr.y[1] >= tr.y[0]) || !(tr.t[1] >= tr.t[0])) {
        hyp__page_out(p, "<p class=\"note\">No corrected height to draw.</p>\n");
        return HYP_OK;
    }
    hyp_status st = track_figure(p, r, &tr, 0, err);
    return st ? st : track_figure(p, r, &tr, 1, err);
}

/* ---- the bases ------------------------------------------------------- */

static const hyp__base_view *base_views(const hyp_rover_run *r, size_t *n)
{
    const hyp__work *w = r->result.priv;
    *n = w ? w->nb : 0;
    return w ? w->bvs : NULL;
}

/* Indices [*a, *b) of view samples within [t0, t1]. */
static void view_window(const hyp__base_view *v, double t0, double t1, size_t *a, size_t *b)
{
    *a = 0;
    while (*a < v->n && v->t[*a] < t0)
        (*a)++;
    *b = *a;
    while (*b < v->n && v->t[*b] <= t1)
        (*b)++;
}

/* A figure of the bases: pressure or tendency, bases k0 .. k1-1 (`one`:
 * a figure of one base among several), over t0 .. t1. */
typedef struct base_fig {
    const hyp_rover_run *r;
    const hyp__base_view *v;
    int tendency, one;
    size_t k0, k1;
    double t0, t1, scale;   /* hPa or hPa/h per Pa or Pa/s */
} base_fig;

static double base_value(const base_fig *b, size_t k, size_t i)
{
    return (b->tendency ? b->v[k].rate[i] : b->v[k].p[i]) * b->scale;
}

/* The values' and times' ranges; 0 when there is no sample. */
static int base_ranges(const base_fig *b, double y[2], double t[2])
{
    y[0] = t[0] = INFINITY, y[1] = t[1] = -INFINITY;
    for (size_t k = b->k0; k < b->k1; k++) {
        size_t a, z;
        view_window(&b->v[k], b->t0, b->t1, &a, &z);
        for (size_t i = a; i < z; i++)
            if (isfinite(base_value(b, k, i)))
                y[0] = fmin(y[0], base_value(b, k, i)), y[1] = fmax(y[1], base_value(b, k, i)),
                t[0] = fmin(t[0], b->v[k].t[i]), t[1] = fmax(t[1], b->v[k].t[i]);
    }
    return y[1] >= y[0];
}

static hyp_status base_lines(hyp__svg *f, const base_fig *b, hyp_error *err)
{
    for (size_t k = b->k0; k < b->k1 && !f->status; k++) {
        size_t a, z;
        view_window(&b->v[k], b->t0, b->t1, &a, &z);
        double *y = malloc((z > a ? z - a : 1) * sizeof *y);
        if (!y)
            return hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: out of memory");
        for (size_t i = a; i < z; i++)
            y[i - a] = base_value(b, k, i);
        hyp__svg_style sty = hyp__svg_style_nth((int)k, b->tendency ? b->r->bases[k].path : NULL);
        sty.dash = b->one ? 0 : sty.dash;
        hyp__svg_line(f, b->v[k].t + a, y, z - a, &sty);
        free(y);
    }
    return HYP_OK;
}

static void rapid_lines(hyp__svg *f, const double t[2], double rapid)
{
    double x[2] = {t[0], t[1]}, up[2] = {rapid, rapid}, dn[2] = {-rapid, -rapid};
    hyp__svg_style lim = {.colour = 6, .dash = 1, .width_px = 1.0, .label = "rapid change (threshold)"};
    hyp__svg_line(f, x, up, 2, &lim);
    lim.label = NULL;
    hyp__svg_line(f, x, dn, 2, &lim);
}

static void base_caption(hyp__page *p, const base_fig *b, double rapid)
{
    if (b->tendency)
        hyp__page_figure_end(p, "The change of each base's pressure over an hour, as the correction estimated it at "
                                "each base sample, from an hour before the track to an hour after; the dashed lines are "
                                "the threshold above which a change counts as rapid (&#177;%.2f hPa/h). A passing front or "
                                "a pressure surge shows as a run beyond them.",
                             rapid);
    else
        hyp__page_figure_end(p, "Station pressure at %s as the correction used it: on true time (the clock offset "
                                "applied), the base's instrument offset removed, a QNH series reduced to the station. From "
                                "an hour before the track to an hour after.%s",
                             b->one ? "this base" : "the base",
                             b->one ? " One figure a base: their pressures differ by their heights." : "");
}

static hyp_status base_figure(hyp__page *p, const base_fig *b, hyp_error *err)
{
    double y[2], t[2], rapid = b->r->rapid_pa_per_s * b->scale;
    if (!base_ranges(b, y, t)) {
        hyp__page_out(p, "<p class=\"note\">No base samples over the track's span.</p>\n");
        return HYP_OK;
    }
    if (b->tendency)
        y[0] = fmin(y[0], -rapid), y[1] = fmax(y[1], rapid);
    char id[48], title[300];
    snprintf(id, sizeof id, b->tendency ? "base-tendency" : b->one ? "base-pressure-%zu" : "base-pressure", b->k0 + 1);
    snprintf(title, sizeof title, "%s%s%s", b->tendency ? "Hourly tendency of the base pressure" : "Base pressure",
             b->one ? ": " : "", b->one ? b->r->bases[b->k0].path : "");
    hyp__svg_spec spec = {
        .id = id, .title = title,
        .width_px = HYP__FIG_W, .height_px = b->tendency || b->one ? 300 : HYP__FIG_H,
        .x = {.title = "time [UTC]", .lo = t[0], .hi = t[1], .time_utc = 1, .ticks = 8},
        .y = {.title = b->tendency ? "tendency [hPa/h]" : "pressure [hPa]", .lo = y[0], .hi = y[1]},
    };
    hyp__svg f;
    hyp__page_figure(p);
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st && (st = base_lines(&f, b, err)))
        hyp__svg_discard(&f);
    if (!st && b->tendency)
        rapid_lines(&f, t, rapid);
    if (!st)
        st = hyp__svg_end(&f);
    if (!st)
        base_caption(p, b, rapid);
    return st;
}

static base_fig base_fig_of(const hyp_rover_run *r, int tendency)
{
    base_fig b = {.r = r, .tendency = tendency, .scale = tendency ? 3600.0 / 100.0 : 0.01};
    b.v = base_views(r, &b.k1);
    hyp__rover_span(r->rover, &b.t0, &b.t1);
    b.t0 -= 3600, b.t1 += 3600;
    return b;
}

hyp_status hyp__fig_base_pressure(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    base_fig all = base_fig_of(r, 0);
    if (all.k1 <= 1)
        return base_figure(p, &all, err);
    hyp_status st = HYP_OK;
    for (size_t k = 0; !st && k < all.k1; k++) {
        base_fig one = all;
        one.k0 = k, one.k1 = k + 1, one.one = 1;
        st = base_figure(p, &one, err);
    }
    return st;
}

hyp_status hyp__fig_tendency(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    base_fig all = base_fig_of(r, 1);
    return base_figure(p, &all, err);
}
