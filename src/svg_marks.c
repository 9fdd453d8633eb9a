/* svg_marks.c - what a figure shows of the data: lines, bands, markers
 * with error bars, coloured points, stacked bars and text (see svg.h). */
#include "svg_int.h"

#include <math.h>

#define DEFAULT_WIDTH_PX 1.5
#define BAND_OPACITY "0.25"
#define MAX_PARTS 64

int hyp__svg_columns(const hyp__svg *f)
{
    return (int)ceil(f->right_px - f->left_px);
}

static hyp_status need(hyp__svg *f, int ok, const char *what)
{
    if (f->status || ok)
        return f->status;
    return hyp__svg_fail(f, hyp_error_set(f->err, HYP_ERR_USAGE, "figure %s: %s", f->id, what));
}

static double width_of(const hyp__svg_style *st)
{
    return st->width_px > 0 && st->width_px < 50 ? st->width_px : DEFAULT_WIDTH_PX;
}

static size_t seg_start(const hyp__decim *d, size_t s)
{
    return s ? d->seg_end[s - 1] : 0;
}

/* One segment: a polyline, or a dot when it has a single point. */
static void write_segment(hyp__svg *f, const double *x, const double *y, const hyp__decim *d, size_t s,
                          double width, const char *colour)
{
    size_t a = seg_start(d, s), b = d->seg_end[s];
    if (b - a == 1) {
        size_t i = d->idx[a];
        hyp__svg_out(f, "<circle cx=\"%p\" cy=\"%p\" r=\"%p\" fill=\"%s\" stroke=\"none\"/>\n", hyp__svg_px_x(f, x[i]),
                     hyp__svg_px_y(f, y[i]), width, colour);
        hyp__svg_occupy(f, hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y[i]));
        return;
    }
    hyp__svg_out(f, "<polyline points=\"");
    for (size_t k = a; k < b; k++) {
        size_t i = d->idx[k];
        double px = hyp__svg_px_x(f, x[i]), py = hyp__svg_px_y(f, y[i]);
        hyp__svg_out(f, k + 1 < b ? "%p,%p " : "%p,%p", px, py);
        if (k > a)
            hyp__svg_occupy_seg(f, hyp__svg_px_x(f, x[d->idx[k - 1]]), hyp__svg_px_y(f, y[d->idx[k - 1]]), px, py);
    }
    hyp__svg_out(f, "\"/>\n");
}

hyp_status hyp__svg_line(hyp__svg *f, const double *x, const double *y, size_t n, const hyp__svg_style *st)
{
    if (need(f, !n || (x && y), "a line without its x or y values"))
        return f->status;
    hyp__svg_style def = hyp__svg_style_nth(0, NULL);
    st = st ? st : &def;
    hyp__decim d;
    hyp__decim_init(&d);
    hyp_status rc = hyp__decimate(x, y, NULL, n, f->x_lo, f->x_hi, hyp__svg_columns(f), &d, f->err);
    if (rc) {
        hyp__decim_free(&d);
        return hyp__svg_fail(f, rc);
    }
    double width = width_of(st);
    const char *colour = hyp__svg_colour(st->colour);
    hyp__svg_clip_enter(f);
    hyp__svg_out(f, "<g class=\"line\" fill=\"none\" stroke=\"%s\" stroke-width=\"%p\" stroke-dasharray=\"%s\" "
                    "stroke-linejoin=\"round\">\n",
                 colour, width, hyp__svg_dash(st->dash));
    for (size_t s = 0; s < d.n_seg; s++)
        write_segment(f, x, y, &d, s, width, colour);
    hyp__svg_out(f, "</g>\n");
    hyp__decim_free(&d);
    hyp__svg_add_key(f, HYP__KEY_LINE, st->colour, st->dash, -1, 0, width, st->label);
    return hyp__svg_settle(f);
}

/* One segment of a band: the upper edge forward, the lower edge back. */
static void write_band_segment(hyp__svg *f, const double *x, const double *y_lo, const double *y_hi,
                               const hyp__decim *up, const hyp__decim *dn, size_t s)
{
    size_t a = seg_start(up, s), b = up->seg_end[s], c = seg_start(dn, s), e = dn->seg_end[s];
    if (b - a == 1 && e - c == 1) {   /* one sample: its vertical extent */
        size_t i = up->idx[a];
        double px = hyp__svg_px_x(f, x[i]);
        hyp__svg_out(f, "<line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\" stroke-width=\"1\"/>\n", px, hyp__svg_px_y(f, y_hi[i]), px,
                     hyp__svg_px_y(f, y_lo[i]));
        return;
    }
    hyp__svg_out(f, "<polygon points=\"");
    for (size_t k = a; k < b; k++) {
        size_t i = up->idx[k];
        hyp__svg_out(f, "%p,%p ", hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y_hi[i]));
        hyp__svg_occupy_seg(f, hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y_hi[i]), hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y_lo[i]));
    }
    for (size_t k = e; k-- > c;)
        hyp__svg_out(f, k > c ? "%p,%p " : "%p,%p", hyp__svg_px_x(f, x[dn->idx[k]]), hyp__svg_px_y(f, y_lo[dn->idx[k]]));
    hyp__svg_out(f, "\"/>\n");
}

hyp_status hyp__svg_band(hyp__svg *f, const double *x, const double *y_lo, const double *y_hi, size_t n,
                         int colour, const char *label)
{
    if (need(f, !n || (x && y_lo && y_hi), "a band without its x or edge values"))
        return f->status;
    hyp__decim up, dn;
    hyp__decim_init(&up);
    hyp__decim_init(&dn);
    int cols = hyp__svg_columns(f);
    hyp_status rc = hyp__decimate(x, y_hi, y_lo, n, f->x_lo, f->x_hi, cols, &up, f->err);
    if (!rc)
        rc = hyp__decimate(x, y_lo, y_hi, n, f->x_lo, f->x_hi, cols, &dn, f->err);
    if (!rc && up.n_seg != dn.n_seg)   /* both edges break at the same gaps */
        rc = hyp_error_set(f->err, HYP_ERR_INTERNAL, "figure %s: band edges split differently", f->id);
    if (!rc) {
        const char *c = hyp__svg_colour(colour);
        hyp__svg_clip_enter(f);
        hyp__svg_out(f, "<g class=\"band\" fill=\"%s\" fill-opacity=\"" BAND_OPACITY "\" stroke=\"%s\" stroke-opacity=\"" BAND_OPACITY
                        "\">\n",
                     c, c);
        for (size_t s = 0; s < up.n_seg; s++)
            write_band_segment(f, x, y_lo, y_hi, &up, &dn, s);
        hyp__svg_out(f, "</g>\n");
        hyp__svg_add_key(f, HYP__KEY_BAND, colour, 0, -1, 0, 0, label);
    }
    hyp__decim_free(&up);
    hyp__decim_free(&dn);
    return rc ? hyp__svg_fail(f, rc) : hyp__svg_settle(f);
}

void hyp__svg_marker_at(hyp__svg *f, hyp__svg_marker m, double px, double py, double s, const char *colour,
                        int hollow)
{
    const char *fill = hollow ? "none" : colour, *rim = hollow ? colour : "#ffffff";
    double h = s / 2;
    switch (m) {
    case HYP__SVG_SQUARE:
        h *= 0.9;   /* a square looks larger than a circle of the same width */
        hyp__svg_out(f, "<rect x=\"%p\" y=\"%p\" width=\"%p\" height=\"%p\" fill=\"%s\" stroke=\"%s\" stroke-width=\"0.75\"/>",
                     px - h, py - h, 2 * h, 2 * h, fill, rim);
        break;
    case HYP__SVG_TRIANGLE:
        hyp__svg_out(f, "<polygon points=\"%p,%p %p,%p %p,%p\" fill=\"%s\" stroke=\"%s\" stroke-width=\"0.75\"/>", px,
                     py - 1.15 * h, px + 1.1 * h, py + 0.85 * h, px - 1.1 * h, py + 0.85 * h, fill, rim);
        break;
    case HYP__SVG_CROSS:
        hyp__svg_out(f, "<path d=\"M%p %pL%p %pM%p %pL%p %p\" fill=\"none\" stroke=\"%s\" stroke-width=\"1.5\"/>", px - h,
                     py - h, px + h, py + h, px - h, py + h, px + h, py - h, colour);
        break;
    default:
        hyp__svg_out(f, "<circle cx=\"%p\" cy=\"%p\" r=\"%p\" fill=\"%s\" stroke=\"%s\" stroke-width=\"0.75\"/>", px, py, h, fill,
                     rim);
        break;
    }
}

static void error_bar(hyp__svg *f, double x, double y, double e, const char *colour)
{
    if (!(isfinite(e) && e > 0))
        return;
    double px = hyp__svg_px_x(f, x), y0 = hyp__svg_px_y(f, y - e), y1 = hyp__svg_px_y(f, y + e);
    hyp__svg_occupy_seg(f, px, y0, px, y1);
    hyp__svg_out(f, "<path d=\"M%p %pV%pM%p %ph6M%p %ph6\" fill=\"none\" stroke=\"%s\" stroke-width=\"1\"/>", px, y0, y1,
                 px - 3, y0, px - 3, y1, colour);
}

hyp_status hyp__svg_markers(hyp__svg *f, const double *x, const double *y, const double *y_err, size_t n,
                            const hyp__svg_style *st)
{
    if (need(f, !n || (x && y), "markers without their x or y values"))
        return f->status;
    hyp__svg_style def = hyp__svg_style_nth(0, NULL);
    st = st ? st : &def;
    const char *colour = hyp__svg_colour(st->colour);
    double size = 4 * width_of(st) + 1;
    hyp__svg_clip_enter(f);
    hyp__svg_out(f, "<g class=\"markers\">\n");
    for (size_t i = 0; i < n && !f->status; i++) {
        if (!isfinite(x[i]) || !isfinite(y[i]))
            continue;
        if (y_err)
            error_bar(f, x[i], y[i], y_err[i], colour);
        hyp__svg_occupy(f, hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y[i]));
        hyp__svg_marker_at(f, st->marker, hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y[i]), size, colour, 0);
        hyp__svg_out(f, "\n");
    }
    hyp__svg_out(f, "</g>\n");
    hyp__svg_add_key(f, HYP__KEY_MARKER, st->colour, 0, st->marker, 0, width_of(st), st->label);
    return hyp__svg_settle(f);
}

hyp_status hyp__svg_points_coloured(hyp__svg *f, const double *x, const double *y, const double *v, size_t n,
                                    double v_lo, double v_hi, hyp__svg_marker m)
{
    if (need(f, !n || (x && y && v), "coloured points without their x, y or values") ||
        need(f, isfinite(v_lo) && isfinite(v_hi) && v_lo <= v_hi, "colour scale range empty or not finite") ||
        need(f, !f->cbar_set || (f->cbar_lo == v_lo && f->cbar_hi == v_hi),
             "coloured points: the colour range differs from an earlier call's (one colour bar a figure)"))
        return f->status;
    hyp__svg_clip_enter(f);
    hyp__svg_out(f, "<g class=\"coloured\">\n");
    for (size_t i = 0; i < n && !f->status; i++) {
        if (!isfinite(x[i]) || !isfinite(y[i]))
            continue;
        char col[8];
        double t = v_hi > v_lo ? (v[i] - v_lo) / (v_hi - v_lo) : 0.5;
        hyp__svg_seq_colour(isfinite(v[i]) ? t : NAN, col);   /* no value: hollow grey */
        hyp__svg_marker_at(f, m, hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y[i]), 7, col, !isfinite(v[i]));
        hyp__svg_occupy(f, hyp__svg_px_x(f, x[i]), hyp__svg_px_y(f, y[i]));
        hyp__svg_out(f, "\n");
    }
    hyp__svg_out(f, "</g>\n");
    f->cbar_lo = v_lo;
    f->cbar_hi = v_hi;
    f->cbar_set = 1;
    return hyp__svg_settle(f);
}

/* White hatching for the parts of a stack after the first, so that parts
 * differ in more than colour: / \ and | (the ids carry the figure's). */
static void define_hatches(hyp__svg *f)
{
    if (f->hatches)
        return;
    static const char *const turn[3] = {"45", "-45", "0"};
    hyp__svg_out(f, "<defs>");
    for (int k = 0; k < 3; k++)
        hyp__svg_out(f, "<pattern id=\"%s-h%d\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
                        "patternTransform=\"rotate(%s)\"><path d=\"M0 0V6\" stroke=\"#ffffff\" stroke-width=\"1.5\"/></pattern>",
                     f->id, k + 1, turn[k]);
    hyp__svg_out(f, "</defs>\n");
    f->hatches = 1;
}

void hyp__svg_hatched_rect(hyp__svg *f, double x, double y, double w, double h, int colour, int hatch)
{
    hyp__svg_out(f, "<rect x=\"%p\" y=\"%p\" width=\"%p\" height=\"%p\" fill=\"%s\"/>", x, y, w, h, hyp__svg_colour(colour));
    if (hatch >= 1 && hatch <= 3)
        hyp__svg_out(f, "<rect x=\"%p\" y=\"%p\" width=\"%p\" height=\"%p\" fill=\"url(#%s-h%d)\"/>", x, y, w, h, f->id, hatch);
}

static hyp_status check_parts(hyp__svg *f, const double *v, size_t n_bars, size_t n_parts)
{
    for (size_t b = 0; b < n_bars; b++)
        for (size_t p = 0; p < n_parts; p++)
            if (v[b * n_parts + p] < 0)
                return hyp__svg_fail(f, hyp_error_set(f->err, HYP_ERR_USAGE,
                                                      "figure %s: stacked bar %zu, part %zu: value %.17g is negative; expected 0 or more",
                                                      f->id, b + 1, p + 1, v[b * n_parts + p]));
    return HYP_OK;
}

static void write_bar(hyp__svg *f, double x, const double *v, size_t n_parts, double bar_width)
{
    double xl = hyp__svg_px_x(f, x - bar_width / 2), xr = hyp__svg_px_x(f, x + bar_width / 2), base = 0;
    for (size_t p = 0; p < n_parts; p++) {
        if (!isfinite(v[p]))
            continue;
        double y1 = hyp__svg_px_y(f, base + v[p]), y0 = hyp__svg_px_y(f, base);
        hyp__svg_hatched_rect(f, xl, y1, xr - xl, y0 - y1, (int)p, (int)(p % 4));
        hyp__svg_occupy_rect(f, xl, y1, xr - xl, y0 - y1);
        base += v[p];
    }
    hyp__svg_out(f, "\n");
}

hyp_status hyp__svg_bars(hyp__svg *f, const double *x, size_t n_bars, const double *v, size_t n_parts,
                         double bar_width, const char *const *part_labels)
{
    if (need(f, !n_bars || (x && v), "bars without their x or values") ||
        need(f, n_parts >= 1 && n_parts <= MAX_PARTS, "stacked bars: expected 1 to 64 parts") ||
        need(f, isfinite(bar_width) && bar_width > 0, "stacked bars: the bar width is not a positive number") ||
        check_parts(f, v, n_bars, n_parts))
        return f->status;
    hyp__svg_clip_enter(f);
    define_hatches(f);
    hyp__svg_out(f, "<g class=\"bars\" stroke=\"#ffffff\" stroke-width=\"0.5\">\n");
    for (size_t b = 0; b < n_bars && !f->status; b++)
        if (isfinite(x[b]))
            write_bar(f, x[b], v + b * n_parts, n_parts, bar_width);
    hyp__svg_out(f, "</g>\n");
    for (size_t p = 0; part_labels && p < n_parts; p++)
        hyp__svg_add_key(f, HYP__KEY_BAR, (int)p, 0, -1, (int)(p % 4), 0, part_labels[p]);
    return hyp__svg_settle(f);
}

hyp_status hyp__svg_text(hyp__svg *f, double x, double y, const char *text, int anchor)
{
    if (f->status || !isfinite(x) || !isfinite(y))
        return f->status;
    static const char *const how[3] = {"start", "middle", "end"};
    hyp__svg_clip_leave(f);
    hyp__svg_out(f, "<text class=\"label\" x=\"%p\" y=\"%p\" text-anchor=\"%s\" fill=\"#222222\" stroke=\"#ffffff\" "
                    "stroke-width=\"3\" paint-order=\"stroke\">%t</text>\n",
                 hyp__svg_px_x(f, x), hyp__svg_px_y(f, y), how[anchor < 0 ? 0 : anchor > 0 ? 2 : 1], text);
    return hyp__svg_settle(f);
}

/* ---- where marks were drawn, for the legend -------------------------- */

void hyp__svg_occupy(hyp__svg *f, double px, double py)
{
    double w = f->right_px - f->left_px, h = f->bottom_px - f->top_px;
    double cx = floor((px - f->left_px) / w * HYP__SVG_OCC_COLS), cy = floor((py - f->top_px) / h * HYP__SVG_OCC_ROWS);
    if (cx >= 0 && cx < HYP__SVG_OCC_COLS && cy >= 0 && cy < HYP__SVG_OCC_ROWS)
        f->occ[(int)cy][(int)cx] = 1;
}

/* Steps of at most half a cell along the stroke, so no cell it crosses is
 * missed (a stroke leaving the plot area is cut at +-1e9 px: the cap on
 * steps keeps that cheap). */
void hyp__svg_occupy_seg(hyp__svg *f, double x0, double y0, double x1, double y1)
{
    double cw = (f->right_px - f->left_px) / HYP__SVG_OCC_COLS, ch = (f->bottom_px - f->top_px) / HYP__SVG_OCC_ROWS;
    double steps = ceil(fmax(fabs(x1 - x0) / cw, fabs(y1 - y0) / ch) * 2);
    steps = fmin(fmax(steps, 1), 4 * (HYP__SVG_OCC_COLS + HYP__SVG_OCC_ROWS));
    for (double k = 0; k <= steps; k++)
        hyp__svg_occupy(f, x0 + (x1 - x0) * k / steps, y0 + (y1 - y0) * k / steps);
}

void hyp__svg_occupy_rect(hyp__svg *f, double x, double y, double w, double h)
{
    double ch = (f->bottom_px - f->top_px) / HYP__SVG_OCC_ROWS;
    for (double yy = y; yy <= y + h + ch / 2; yy += ch / 2)
        hyp__svg_occupy_seg(f, x, fmin(yy, y + h), x + w, fmin(yy, y + h));
}
