/* svg.c - a figure's frame for the SVG drawing layer: the <svg> element,
 * plot area, scales, grid, ticks and axis titles, and the writer the marks
 * share (see svg.h). */
#include "svg_int.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#define FONT_PX 11.0
#define CHAR_PX 6.6       /* mean glyph width of a sans-serif at 11 px, 0.6 em (common practice, no source) */
#define TICK_PX 5.0
#define PX_LIMIT 1e9

/* ---- the writer ------------------------------------------------------ */

static double clamp_px(double v)
{
    return v < -PX_LIMIT ? -PX_LIMIT : v > PX_LIMIT ? PX_LIMIT : v;
}

double hyp__svg_px_x(const hyp__svg *f, double x)
{
    return clamp_px(f->left_px + (x - f->x_lo) * ((f->right_px - f->left_px) / (f->x_hi - f->x_lo)));
}

double hyp__svg_px_y(const hyp__svg *f, double y)
{
    return clamp_px(f->bottom_px - (y - f->y_lo) * ((f->bottom_px - f->top_px) / (f->y_hi - f->y_lo)));
}

hyp_status hyp__svg_fail(hyp__svg *f, hyp_status st)
{
    if (!f->status)
        f->status = st;
    return f->status;
}

static void put_number(hyp__svg *f, double v)
{
    char num[HYP__SVG_NUM_MAX];
    if (!hyp__svg_fmt(num, v, 2, 1)) {
        hyp__svg_fail(f, hyp_error_set(f->err, HYP_ERR_INTERNAL, "figure %s: a non-finite coordinate reached the writer", f->id));
        return;
    }
    hyp__buf_adds(f->out, num);
}

void hyp__svg_out(hyp__svg *f, const char *fmt, ...)
{
    if (f->status)
        return;
    va_list ap;
    va_start(ap, fmt);
    for (const char *p = fmt; *p && !f->status; p++) {
        const char *pct = strchr(p, '%');
        size_t lit = pct ? (size_t)(pct - p) : strlen(p);
        hyp__buf_add(f->out, p, lit);
        if (!pct)
            break;
        p = pct + 1;
        char num[HYP__SVG_NUM_MAX];
        switch (*p) {
        case 'p': put_number(f, va_arg(ap, double)); break;
        case 's': hyp__buf_adds(f->out, va_arg(ap, const char *)); break;
        case 't': hyp__svg_escape(f->out, va_arg(ap, const char *)); break;
        case 'd': hyp__svg_fmt(num, va_arg(ap, int), 0, 0), hyp__buf_adds(f->out, num); break;
        case '%': hyp__buf_addc(f->out, '%'); break;
        default: hyp__svg_fail(f, hyp_error_set(f->err, HYP_ERR_INTERNAL, "figure writer: bad directive")); break;
        }
        if (!*p)
            break;
    }
    va_end(ap);
}

hyp_status hyp__svg_settle(hyp__svg *f)
{
    if (!f->status && f->out->fail == HYP__BUF_CAPPED)
        hyp__svg_fail(f, hyp_error_set(f->err, HYP_ERR_NOMEM, "figure %s: the SVG would pass its size cap of %zu bytes",
                                       f->id, f->out->cap));
    else if (!f->status && f->out->fail)
        hyp__svg_fail(f, hyp_error_set(f->err, HYP_ERR_NOMEM, "figure %s: out of memory", f->id));
    return f->status;
}

void hyp__svg_clip_enter(hyp__svg *f)
{
    if (!f->in_clip)
        hyp__svg_out(f, "<g clip-path=\"url(#%s-plot)\">\n", f->id);
    f->in_clip = 1;
}

void hyp__svg_clip_leave(hyp__svg *f)
{
    if (f->in_clip)
        hyp__svg_out(f, "</g>\n");
    f->in_clip = 0;
}

void hyp__svg_copy_text(char dst[HYP__SVG_TEXT_MAX], const char *s)
{
    size_t n = s ? strlen(s) : 0;
    if (n > HYP__SVG_TEXT_MAX - 1) {
        n = HYP__SVG_TEXT_MAX - 1;
        while (n > 0 && ((unsigned char)s[n] & 0xC0) == 0x80)   /* s[n] continues a character: cut before it */
            n--;
    }
    if (n)
        memcpy(dst, s, n);
    dst[n] = '\0';
}

void hyp__svg_add_key(hyp__svg *f, int kind, int colour, int dash, int marker, int hatch, double width_px,
                      const char *text)
{
    if (!text || f->n_keys >= HYP__SVG_LEGEND_MAX)
        return;
    hyp__svg_key *k = &f->keys[f->n_keys++];
    k->kind = kind, k->colour = colour, k->dash = dash, k->marker = marker, k->hatch = hatch;
    k->width_px = width_px;
    hyp__svg_copy_text(k->text, text);
}

hyp__svg_style hyp__svg_style_nth(int k, const char *label)
{
    hyp__svg_style s = {k, k, (hyp__svg_marker)(k % HYP__SVG_MARKER_N), 1.5, label};
    return s;
}

void hyp__svg_range(const double *v, size_t n, double *lo, double *hi)
{
    *lo = *hi = NAN;
    for (size_t i = 0; i < n; i++)
        if (isfinite(v[i])) {
            if (!(v[i] >= *lo))
                *lo = v[i];
            if (!(v[i] <= *hi))
                *hi = v[i];
        }
}

/* ---- layout ---------------------------------------------------------- */

static double size_or(double px, double def)
{
    return px != 0 ? px : def;   /* NaN stays NaN, for check_spec to refuse */
}

static hyp_status check_spec(const hyp__svg_spec *s, hyp_error *err)
{
    const char *id = s->id ? s->id : "";
    size_t n = strlen(id);
    int ok = n >= 1 && n <= 31 && ((id[0] | 32) >= 'a' && (id[0] | 32) <= 'z');
    for (size_t i = 0; ok && i < n; i++)
        ok = (id[i] >= '0' && id[i] <= '9') || ((id[i] | 32) >= 'a' && (id[i] | 32) <= 'z') || id[i] == '_' || id[i] == '-';
    if (!ok)
        return hyp_error_set(err, HYP_ERR_USAGE, "figure id: expected a letter then up to 30 letters, digits, '_' or '-'");
    double w = size_or(s->width_px, 720), h = size_or(s->height_px, 400);
    if (!(w >= 120 && w <= 10000 && h >= 80 && h <= 10000))
        return hyp_error_set(err, HYP_ERR_USAGE, "figure %s: size out of range; expected 120 to 10000 px wide, 80 to 10000 px high", id);
    if (s->equal_aspect && (s->x.time_utc || s->y.time_utc))
        return hyp_error_set(err, HYP_ERR_USAGE, "figure %s: equal aspect asked of a time axis", id);
    return HYP_OK;
}

/* The axis's ticks; a failure's message says which figure and axis. */
static hyp_status axis_ticks(const char *id, const char *name, const hyp__svg_axis *a, hyp__ticks *t, hyp_error *err)
{
    int target = a->ticks ? a->ticks : 6;
    hyp_error e;
    hyp_status st = a->time_utc ? hyp__ticks_time(a->lo, a->hi, target, t, &e) : hyp__ticks_nice(a->lo, a->hi, target, t, &e);
    if (st)
        hyp_error_set(err, st, "figure %s, %s axis: %s", id, name, e.message);
    return st;
}

static size_t widest_label(const hyp__ticks *t, int *has_date)
{
    size_t w = 0;
    for (int i = 0; i < t->count; i++) {
        char label[HYP__SVG_NUM_MAX], date[16];
        hyp__ticks_label(t, i, label, date);
        size_t n = strlen(label);
        w = n > w ? n : w;
        if (date[0] && has_date)
            *has_date = 1;
    }
    return w;
}

/* Margins from what they must hold: tick labels, axis titles, the title,
 * the colour bar. */
static void layout(hyp__svg *f, const hyp__svg_spec *s)
{
    int has_date = 0;
    size_t ylab = widest_label(&f->yt, NULL);
    widest_label(&f->xt, &has_date);
    f->w_px = size_or(s->width_px, 720);
    f->h_px = size_or(s->height_px, 400);
    f->left_px = 10 + (s->y.title ? 18 : 0) + CHAR_PX * (double)ylab + TICK_PX + 4;
    f->right_px = f->w_px - 18 - (s->colour_title ? 96 : 0);
    f->top_px = s->title ? 34 : 14;
    f->bottom_px = f->h_px - (TICK_PX + 4 + 13 + (has_date ? 13 : 0) + (s->x.title ? 20 : 0) + 6);
    f->x_lo = hyp__ticks_value(&f->xt, 0);
    f->x_hi = hyp__ticks_value(&f->xt, f->xt.count - 1);
    f->y_lo = hyp__ticks_value(&f->yt, 0);
    f->y_hi = hyp__ticks_value(&f->yt, f->yt.count - 1);
}

/* Widens one axis so that a data unit is as long on both (plans); the
 * widened axis takes the other's step, so grid squares are squares, with
 * its ticks inside its new range. */
static void equal_aspect(hyp__svg *f)
{
    double pw = f->right_px - f->left_px, ph = f->bottom_px - f->top_px;
    double sx = pw / (f->x_hi - f->x_lo), sy = ph / (f->y_hi - f->y_lo);
    int widen_x = sx > sy;
    double scale = widen_x ? sy : sx;
    double *lo = widen_x ? &f->x_lo : &f->y_lo, *hi = widen_x ? &f->x_hi : &f->y_hi;
    double c = *lo / 2 + *hi / 2, half = (widen_x ? pw : ph) / (2 * scale);
    *lo = c - half;
    *hi = c + half;
    hyp__ticks *t = widen_x ? &f->xt : &f->yt;
    *t = widen_x ? f->yt : f->xt;
    hyp__ticks_inside(t, *lo, *hi);
}

/* ---- the frame ------------------------------------------------------- */

static void write_head(hyp__svg *f, const hyp__svg_spec *s)
{
    hyp__svg_out(f,
                 "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%p\" height=\"%p\" viewBox=\"0 0 %p %p\" "
                 "font-family=\"sans-serif\" font-size=\"11\" role=\"img\">\n",
                 f->w_px, f->h_px, f->w_px, f->h_px);
    if (s->title)
        hyp__svg_out(f, "<title>%t</title>\n", s->title);
    hyp__svg_out(f, "<defs><clipPath id=\"%s-plot\"><rect x=\"%p\" y=\"%p\" width=\"%p\" height=\"%p\"/></clipPath></defs>\n",
                 f->id, f->left_px, f->top_px, f->right_px - f->left_px, f->bottom_px - f->top_px);
    hyp__svg_out(f, "<rect width=\"%p\" height=\"%p\" fill=\"#ffffff\"/>\n", f->w_px, f->h_px);
    if (s->title)
        hyp__svg_out(f, "<text class=\"title\" x=\"%p\" y=\"22\" text-anchor=\"middle\" font-size=\"14\" font-weight=\"bold\">%t</text>\n",
                     f->w_px / 2, s->title);
}

static void write_grid(hyp__svg *f)
{
    hyp__svg_out(f, "<g class=\"grid\" stroke=\"#e3e3e3\" stroke-width=\"1\">\n");
    for (int i = 0; i < f->xt.count; i++) {
        double px = hyp__svg_px_x(f, hyp__ticks_value(&f->xt, i));
        hyp__svg_out(f, "<line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\"/>\n", px, f->top_px, px, f->bottom_px);
    }
    for (int i = 0; i < f->yt.count; i++) {
        double py = hyp__svg_px_y(f, hyp__ticks_value(&f->yt, i));
        hyp__svg_out(f, "<line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\"/>\n", f->left_px, py, f->right_px, py);
    }
    hyp__svg_out(f, "</g>\n");
}

static void write_x_ticks(hyp__svg *f)
{
    double y0 = f->bottom_px, ylab = y0 + TICK_PX + 3 + FONT_PX;
    for (int i = 0; i < f->xt.count; i++) {
        char label[HYP__SVG_NUM_MAX], date[16];
        hyp__ticks_label(&f->xt, i, label, date);
        double px = hyp__svg_px_x(f, hyp__ticks_value(&f->xt, i));
        hyp__svg_out(f, "<g class=\"xtick\"><line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\" stroke=\"#444444\"/>"
                        "<text x=\"%p\" y=\"%p\" text-anchor=\"middle\" fill=\"#222222\">%t</text>",
                     px, y0, px, y0 + TICK_PX, px, ylab, label);
        if (date[0])
            hyp__svg_out(f, "<text class=\"date\" x=\"%p\" y=\"%p\" text-anchor=\"middle\" fill=\"#222222\">%t</text>",
                         px, ylab + 13, date);
        hyp__svg_out(f, "</g>\n");
    }
}

static void write_y_ticks(hyp__svg *f)
{
    double x0 = f->left_px;
    for (int i = 0; i < f->yt.count; i++) {
        char label[HYP__SVG_NUM_MAX], date[16];
        hyp__ticks_label(&f->yt, i, label, date);
        double py = hyp__svg_px_y(f, hyp__ticks_value(&f->yt, i));
        hyp__svg_out(f, "<g class=\"ytick\"><line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\" stroke=\"#444444\"/>"
                        "<text x=\"%p\" y=\"%p\" dy=\"0.35em\" text-anchor=\"end\" fill=\"#222222\">%t</text></g>\n",
                     x0 - TICK_PX, py, x0, py, x0 - TICK_PX - 3, py, label);
    }
}

static void write_axis_titles(hyp__svg *f, const hyp__svg_spec *s)
{
    if (s->x.title)
        hyp__svg_out(f, "<text class=\"xtitle\" x=\"%p\" y=\"%p\" text-anchor=\"middle\" font-size=\"12\">%t</text>\n",
                     (f->left_px + f->right_px) / 2, f->h_px - 8, s->x.title);
    if (s->y.title) {
        double x = 10 + 12, y = (f->top_px + f->bottom_px) / 2;
        hyp__svg_out(f, "<text class=\"ytitle\" x=\"%p\" y=\"%p\" transform=\"rotate(-90 %p %p)\" "
                        "text-anchor=\"middle\" font-size=\"12\">%t</text>\n",
                     x, y, x, y, s->y.title);
    }
}

hyp_status hyp__svg_begin(hyp__svg *f, hyp__buf *out, const hyp__svg_spec *spec, hyp_error *err)
{
    memset(f, 0, sizeof *f);
    f->out = out;
    f->start = out->len;
    f->err = err;
    f->start_fail = out->fail;
    hyp_status st = check_spec(spec, err);
    if (!st)
        snprintf(f->id, sizeof f->id, "%s", spec->id);
    if (!st)
        st = axis_ticks(f->id, "x", &spec->x, &f->xt, err);
    if (!st)
        st = axis_ticks(f->id, "y", &spec->y, &f->yt, err);
    if (st)
        return hyp__svg_fail(f, st);
    layout(f, spec);
    if (f->right_px - f->left_px < 40 || f->bottom_px - f->top_px < 30)
        return hyp__svg_fail(f, hyp_error_set(err, HYP_ERR_USAGE, "figure %s: %.0f x %.0f px leave no room for the plot area",
                                              f->id, f->w_px, f->h_px));
    if (spec->equal_aspect)
        equal_aspect(f);
    f->has_cbar = spec->colour_title != NULL;
    hyp__svg_copy_text(f->cbar_title, spec->colour_title);
    write_head(f, spec);
    write_grid(f);
    write_x_ticks(f);
    write_y_ticks(f);
    write_axis_titles(f, spec);
    return hyp__svg_settle(f);
}

void hyp__svg_discard(hyp__svg *f)
{
    if (f->out) {
        hyp__buf_truncate(f->out, f->start);
        f->out->fail = f->start_fail;   /* a failure from before the figure stays the caller's */
    }
}
