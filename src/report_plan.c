/* report_plan.c - the plan of a rover's HTML report: the track seen from
 * above, coloured by each point's sigma, with the bases, the benchmarks
 * near the track and the calibrations marked. Projected easting and
 * northing when the run had a CRS, else a local equirectangular plan. */
#include "report_html.h"
#include "svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define CELL_PX 4.0   /* one point drawn per cell of this size */
#define EARTH_R_M 6371008.8   /* mean radius R1 of GRS80 (Moritz, Geodetic Reference System 1980, 2000) */
#define DEG (3.14159265358979323846 / 180.0)

typedef struct plan {
    const hyp_rover_run *r;
    hyp_geo *geo;          /* the run's, with its CRS; NULL: local plan */
    double lat0, lon0, coslat0;
    double lat_lo, lat_hi, lon_lo, lon_hi;   /* the track's positions */
} plan;

/* A position on the plan, m; 0 with x, y set, -1 when it has none. */
static int plan_xy(const plan *pl, double lat, double lon, double *x, double *y)
{
    if (!(lat == lat) || !(lon == lon))
        return -1;
    if (pl->geo)
        return hyp_geo_project(pl->geo, lat, lon, x, y) ? -1 : 0;
    /* equirectangular about the track's centre: true to scale along the
     * central parallel, within 0.1 % over tens of km (common practice, no
     * source) */
    *x = EARTH_R_M * pl->coslat0 * (lon - pl->lon0) * DEG;
    *y = EARTH_R_M * (lat - pl->lat0) * DEG;
    return 0;
}

static int point_xy(const plan *pl, size_t i, double *x, double *y)
{
    const hyp_rover_run *r = pl->r;
    if (r->easting_m) {
        *x = r->easting_m[i], *y = r->northing_m[i];
        return isfinite(*x) && isfinite(*y) ? 0 : -1;
    }
    return plan_xy(pl, hyp_series_lat(r->rover, i), hyp_series_lon(r->rover, i), x, y);
}

static void plan_setup(plan *pl, const hyp_rover_run *r)
{
    memset(pl, 0, sizeof *pl);
    pl->r = r;
    if (r->easting_m && r->priv && !r->priv->geo) {   /* a batch took its geo back */
        hyp_error e;
        hyp_error_clear(&e);
        hyp__rover_geo_reopen(r, &e);   /* failing, the plan is drawn in metres about the centre */
    }
    pl->geo = r->easting_m && r->priv ? r->priv->geo : NULL;
    double la_lo = INFINITY, la_hi = -INFINITY, lo_lo = INFINITY, lo_hi = -INFINITY;
    for (size_t i = 0; i < r->rover->count; i++) {
        double la = hyp_series_lat(r->rover, i), lo = hyp_series_lon(r->rover, i);
        if (la == la && lo == lo)
            la_lo = fmin(la_lo, la), la_hi = fmax(la_hi, la), lo_lo = fmin(lo_lo, lo), lo_hi = fmax(lo_hi, lo);
    }
    pl->lat_lo = la_lo, pl->lat_hi = la_hi, pl->lon_lo = lo_lo, pl->lon_hi = lo_hi;
    pl->lat0 = 0.5 * (la_lo + la_hi);
    pl->lon0 = 0.5 * (lo_lo + lo_hi);
    pl->coslat0 = cos(pl->lat0 * DEG);
}

static void grow(double box[4], double x, double y)
{
    box[0] = fmin(box[0], x), box[1] = fmax(box[1], x), box[2] = fmin(box[2], y), box[3] = fmax(box[3], y);
}

static int inside(const double box[4], double margin, double x, double y)
{
    return x >= box[0] - margin && x <= box[1] + margin && y >= box[2] - margin && y <= box[3] + margin;
}

static const hyp_benchmarks *run_benchmarks(const hyp_rover_run *r)
{
    return r->priv && r->priv->sv ? &r->priv->sv->bms : NULL;
}

/* The track's box (track) and the plan's: the track's, the bases and
 * the benchmarks within `margin` of the track. -1 without positions. */
static int plan_box(const plan *pl, double track[4], double box[4], double *margin)
{
    const hyp_rover_run *r = pl->r;
    track[0] = track[2] = INFINITY, track[1] = track[3] = -INFINITY;
    double x, y;
    if (r->easting_m) {
        for (size_t i = 0; i < r->rover->count; i++)
            if (!point_xy(pl, i, &x, &y))
                grow(track, x, y);
    } else if (pl->lat_hi >= pl->lat_lo) {   /* the local plan is linear in lat and lon: the box's corners */
        plan_xy(pl, pl->lat_lo, pl->lon_lo, &track[0], &track[2]);
        plan_xy(pl, pl->lat_hi, pl->lon_hi, &track[1], &track[3]);
    }
    if (!(track[1] >= track[0]))
        return -1;
    *margin = 0.1 * fmax(track[1] - track[0], track[3] - track[2]) + 100.0;
    memcpy(box, track, 4 * sizeof *box);
    for (size_t k = 0; k < r->n_bases; k++)
        if (!plan_xy(pl, r->bases[k].lat_deg, r->bases[k].lon_deg, &x, &y))
            grow(box, x, y);
    const hyp_benchmarks *bm = run_benchmarks(r);
    for (size_t k = 0; bm && k < bm->count; k++)
        if (!plan_xy(pl, bm->lat_deg[k], bm->lon_deg[k], &x, &y) && inside(track, *margin, x, y))
            grow(box, x, y);
    return 0;
}

/* ---- the track's points, one per cell -------------------------------- */

typedef struct kept {
    size_t n;
    double *x, *y, *v;
} kept;

static int by_value(const void *a, const void *b)
{
    const double *p = a, *q = b;   /* (x, y, v) triples: NaN first, then rising */
    int pa = p[2] == p[2], qa = q[2] == q[2];
    if (pa != qa || !pa)
        return pa - qa;
    return (p[2] > q[2]) - (p[2] < q[2]);
}

/* Per cell of CELL_PX the point with the largest sigma (a point with none
 * only where no other is), drawn in rising order of sigma so the worst lie
 * on top. */
static hyp_status thin_cells(const plan *pl, const hyp__svg *f, kept *out, double *v_lo, double *v_hi, hyp_error *err)
{
    const hyp_rover_run *r = pl->r;
    double w = f->right_px - f->left_px, h = f->bottom_px - f->top_px;
    size_t nx = (size_t)ceil(w / CELL_PX), ny = (size_t)ceil(h / CELL_PX);
    size_t *cell = malloc(nx * ny * sizeof *cell);
    if (!cell)
        return hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: out of memory");
    for (size_t c = 0; c < nx * ny; c++)
        cell[c] = SIZE_MAX;
    double sx = (double)nx / (f->x_hi - f->x_lo), sy = (double)ny / (f->y_hi - f->y_lo), x, y;
    *v_lo = INFINITY, *v_hi = -INFINITY;
    for (size_t i = 0; i < r->rover->count; i++) {
        float sg = r->result.sigma_m[i];
        if (sg == sg)
            *v_lo = fmin(*v_lo, sg), *v_hi = fmax(*v_hi, sg);
        if (point_xy(pl, i, &x, &y) || x < f->x_lo || x > f->x_hi || y < f->y_lo || y > f->y_hi)
            continue;
        size_t cx = (size_t)fmin(floor((x - f->x_lo) * sx), (double)nx - 1);
        size_t cy = (size_t)fmin(floor((y - f->y_lo) * sy), (double)ny - 1);
        size_t *c = &cell[cy * nx + cx];
        float v = r->result.sigma_m[i];
        if (*c == SIZE_MAX || (v == v && !(v <= r->result.sigma_m[*c])))
            *c = i;
    }
    size_t n = 0;
    for (size_t c = 0; c < nx * ny; c++)
        if (cell[c] != SIZE_MAX)
            cell[n++] = cell[c];
    double *t = malloc((n ? n : 1) * 3 * sizeof *t);
    memset(out, 0, sizeof *out);
    out->x = malloc((n ? n : 1) * sizeof(double));
    out->y = malloc((n ? n : 1) * sizeof(double));
    out->v = malloc((n ? n : 1) * sizeof(double));
    hyp_status st = !t || !out->x || !out->y || !out->v ? hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: out of memory") : HYP_OK;
    for (size_t k = 0; !st && k < n; k++) {
        point_xy(pl, cell[k], &t[3 * k], &t[3 * k + 1]);
        t[3 * k + 2] = (double)r->result.sigma_m[cell[k]];
    }
    if (!st) {
        qsort(t, n, 3 * sizeof *t, by_value);
        for (size_t k = 0; k < n; k++)
            out->x[k] = t[3 * k], out->y[k] = t[3 * k + 1], out->v[k] = t[3 * k + 2];
        out->n = n;
    }
    free(t);
    free(cell);
    return st;
}

static void kept_free(kept *k)
{
    free(k->x), free(k->y), free(k->v);
}

/* ---- marks ----------------------------------------------------------- */

static void mark(hyp__svg *f, const plan *pl, double lat, double lon, const hyp__svg_style *st, const char *name)
{
    double x, y;
    if (plan_xy(pl, lat, lon, &x, &y) || x < f->x_lo || x > f->x_hi || y < f->y_lo || y > f->y_hi)
        return;
    hyp__svg_markers(f, &x, &y, NULL, 1, st);
    if (name)
        hyp__svg_text(f, x + (f->x_hi - f->x_lo) * 0.012, y, name, -1);
}

static const char *file_part(const char *path)
{
    const char *s = strrchr(path, '/');
    return s ? s + 1 : path;
}

static size_t plan_marks(hyp__svg *f, const plan *pl, double margin, const double track[4])
{
    const hyp_rover_run *r = pl->r;
    hyp__svg_style sb = {.colour = 6, .marker = HYP__SVG_SQUARE, .width_px = 2.2, .label = "base"};
    for (size_t k = 0; k < r->n_bases; k++, sb.label = NULL)
        mark(f, pl, r->bases[k].lat_deg, r->bases[k].lon_deg, &sb, file_part(r->bases[k].path));
    size_t outside = 0;
    const hyp_benchmarks *bm = run_benchmarks(r);
    hyp__svg_style sm = {.colour = 4, .marker = HYP__SVG_TRIANGLE, .width_px = 2.0, .label = "benchmark"};
    for (size_t k = 0; bm && k < bm->count; k++) {
        double x, y;
        if (plan_xy(pl, bm->lat_deg[k], bm->lon_deg[k], &x, &y) || !inside(track, margin, x, y)) {
            outside++;
            continue;
        }
        mark(f, pl, bm->lat_deg[k], bm->lon_deg[k], &sm, bm->name[k]);
        sm.label = NULL;
    }
    hyp__svg_style sc = {.colour = 1, .marker = HYP__SVG_CROSS, .width_px = 2.0, .label = "calibration (mean position)"};
    for (size_t k = 0; k < r->result.n_calibs; k++, sc.label = NULL)
        mark(f, pl, r->result.calibs[k].lat_deg, r->result.calibs[k].lon_deg, &sc, NULL);
    return outside;
}

hyp_status hyp__fig_plan(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    plan pl;
    plan_setup(&pl, r);
    double box[4], track[4], margin, v_lo = INFINITY, v_hi = -INFINITY;
    if (plan_box(&pl, track, box, &margin)) {
        hyp__page_out(p, "<p class=\"note\">No plan: the track has no positions.</p>\n");
        return HYP_OK;
    }
    char xt[300], yt[300];
    if (pl.geo) {
        snprintf(xt, sizeof xt, "easting [m] (%s)", r->crs_name);
        snprintf(yt, sizeof yt, "northing [m]");
    } else {
        snprintf(xt, sizeof xt, "east of the track's centre [m]");
        snprintf(yt, sizeof yt, "north of the track's centre [m]");
    }
    hyp__svg_spec spec = {
        .id = "plan", .title = "Plan of the track, coloured by sigma",
        .width_px = HYP__FIG_W, .height_px = 640,
        .x = {.title = xt, .lo = box[0], .hi = box[1]},
        .y = {.title = yt, .lo = box[2], .hi = box[3]},
        .equal_aspect = 1, .colour_title = "1 sigma [m]",
    };
    hyp__svg f;
    kept k = {0};
    hyp__page_figure(p);
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st && (st = thin_cells(&pl, &f, &k, &v_lo, &v_hi, err)))
        hyp__svg_discard(&f);
    if (!(v_hi >= v_lo))
        v_lo = 0, v_hi = 1;
    size_t outside = 0;
    if (!st) {
        hyp__svg_points_coloured(&f, k.x, k.y, k.v, k.n, v_lo, v_hi, HYP__SVG_CIRCLE);
        outside = plan_marks(&f, &pl, margin, track);
        st = hyp__svg_end(&f);
    }
    if (!st)
        hyp__page_figure_end(p, "%s Each point's colour is its 1-sigma (%.2f m to %.2f m); hollow grey points were not "
                                "corrected. %z samples drawn as %z points: in each %d-pixel cell the one with the largest "
                                "sigma, the worst drawn on top. Squares: bases; triangles: benchmarks within %.0f m of the "
                                "track%s; crosses: the calibrations' mean positions.",
                             pl.geo ? "Easting and northing in the run's CRS." :
                                      "No CRS was given: a local equirectangular plan about the track's centre (true to "
                                      "scale along its parallel; give --crs for a projection).",
                             v_lo, v_hi, r->rover->count, k.n, (int)CELL_PX, margin,
                             outside ? " (others are off the plan)" : "");
    kept_free(&k);
    return st;
}
