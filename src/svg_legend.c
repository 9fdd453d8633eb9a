/* svg_legend.c - the end of a figure for the SVG drawing layer: frame,
 * legend and colour bar (see svg.h). */
#include "svg_int.h"

#include <math.h>
#include <string.h>

#define CHAR_PX 6.6   /* as in svg.c */
#define ROW_PX 16.0
#define SWATCH_PX 24.0

static void key_swatch(hyp__svg *f, const hyp__svg_key *k, double x, double yc)
{
    const char *c = hyp__svg_colour(k->colour);
    switch (k->kind) {
    case HYP__KEY_LINE:
        hyp__svg_out(f, "<line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\" stroke=\"%s\" stroke-width=\"%p\" stroke-dasharray=\"%s\"/>",
                     x, yc, x + SWATCH_PX, yc, c, k->width_px, hyp__svg_dash(k->dash));
        break;
    case HYP__KEY_BAND:
        hyp__svg_out(f, "<rect x=\"%p\" y=\"%p\" width=\"%p\" height=\"10\" fill=\"%s\" fill-opacity=\"0.25\" stroke=\"%s\" stroke-width=\"0.5\"/>",
                     x, yc - 5, SWATCH_PX, c, c);
        break;
    case HYP__KEY_MARKER:
        hyp__svg_marker_at(f, (hyp__svg_marker)k->marker, x + SWATCH_PX / 2, yc, 4 * k->width_px + 1, c, 0);
        break;
    default:
        hyp__svg_hatched_rect(f, x + 5, yc - 5, 14, 10, k->colour, k->hatch);
        break;
    }
}

/* Cells of the plot area a box at (x0, y0), w x h px, covers that hold
 * something drawn. */
static int covered(const hyp__svg *f, double x0, double y0, double w, double h)
{
    double cw = (f->right_px - f->left_px) / HYP__SVG_OCC_COLS, ch = (f->bottom_px - f->top_px) / HYP__SVG_OCC_ROWS;
    int n = 0;
    for (int r = 0; r < HYP__SVG_OCC_ROWS; r++)
        for (int c = 0; c < HYP__SVG_OCC_COLS; c++) {
            double cx = f->left_px + c * cw, cy = f->top_px + r * ch;
            if (f->occ[r][c] && cx < x0 + w && cx + cw > x0 && cy < y0 + h && cy + ch > y0)
                n++;
        }
    return n;
}

/* The corner whose box hides the fewest drawn cells; top right first on a
 * tie, then top left, bottom right, bottom left. */
static void legend_corner(const hyp__svg *f, double w, double h, double *x0, double *y0)
{
    double xs[2] = {f->right_px - w - 6, f->left_px + 6}, ys[2] = {f->top_px + 6, f->bottom_px - h - 6};
    int best = -1;
    *x0 = xs[0], *y0 = ys[0];
    for (int k = 0; k < 4; k++) {
        double x = xs[k % 2], y = ys[k / 2];
        int n = covered(f, x, y, w, h);
        if (best < 0 || n < best)
            best = n, *x0 = x, *y0 = y;
    }
}

/* A box in a corner of the plot area, one row a series, in the order
 * the series were drawn. */
static void write_legend(hyp__svg *f)
{
    size_t chars = 0;
    for (int i = 0; i < f->n_keys; i++) {
        size_t n = hyp__svg_text_chars(f->keys[i].text);
        chars = n > chars ? n : chars;
    }
    double w = 8 + SWATCH_PX + 6 + CHAR_PX * (double)chars + 8, h = 6 + ROW_PX * f->n_keys + 2;
    double x0, y0;
    legend_corner(f, w, h, &x0, &y0);
    hyp__svg_out(f, "<g class=\"legend\"><rect x=\"%p\" y=\"%p\" width=\"%p\" height=\"%p\" fill=\"#ffffff\" "
                    "fill-opacity=\"0.85\" stroke=\"#999999\"/>\n",
                 x0, y0, w, h);
    for (int i = 0; i < f->n_keys; i++) {
        double yc = y0 + 6 + ROW_PX * (i + 0.5);
        key_swatch(f, &f->keys[i], x0 + 8, yc);
        hyp__svg_out(f, "<text x=\"%p\" y=\"%p\" dy=\"0.35em\" fill=\"#222222\">%t</text>\n", x0 + 8 + SWATCH_PX + 6, yc,
                     f->keys[i].text);
    }
    hyp__svg_out(f, "</g>\n");
}

/* The sequential scale as 32 steps beside the plot, its ticks inside the
 * value range, its title turned along it. */
static void write_colour_bar(hyp__svg *f)
{
    hyp__ticks t;
    if (hyp__ticks_nice(f->cbar_lo, f->cbar_hi, 5, &t, f->err)) {
        hyp__svg_fail(f, HYP_ERR_INTERNAL);
        return;
    }
    double lo = f->cbar_lo, hi = f->cbar_hi;
    if (hi > lo)
        hyp__ticks_inside(&t, lo, hi);
    else
        lo = hyp__ticks_value(&t, 0), hi = hyp__ticks_value(&t, t.count - 1);
    double x0 = f->right_px + 18, top = f->top_px, bot = f->bottom_px, seg = (bot - top) / 32;
    hyp__svg_out(f, "<g class=\"colourbar\">\n");
    for (int i = 0; i < 32; i++) {
        char col[8];
        hyp__svg_seq_colour((i + 0.5) / 32, col);
        hyp__svg_out(f, "<rect x=\"%p\" y=\"%p\" width=\"14\" height=\"%p\" fill=\"%s\"/>", x0, bot - (i + 1) * seg, seg + 0.5, col);
    }
    hyp__svg_out(f, "\n<rect x=\"%p\" y=\"%p\" width=\"14\" height=\"%p\" fill=\"none\" stroke=\"#444444\"/>\n", x0, top, bot - top);
    for (int i = 0; i < t.count; i++) {
        char label[HYP__SVG_NUM_MAX], date[16];
        hyp__ticks_label(&t, i, label, date);
        double py = bot - (hyp__ticks_value(&t, i) - lo) / (hi - lo) * (bot - top);
        hyp__svg_out(f, "<g class=\"ctick\"><line x1=\"%p\" y1=\"%p\" x2=\"%p\" y2=\"%p\" stroke=\"#444444\"/>"
                        "<text x=\"%p\" y=\"%p\" dy=\"0.35em\" fill=\"#222222\">%t</text></g>\n",
                     x0 + 14, py, x0 + 18, py, x0 + 21, py, label);
    }
    double xt = f->w_px - 10, yt = (top + bot) / 2;
    hyp__svg_out(f, "<text class=\"ctitle\" x=\"%p\" y=\"%p\" transform=\"rotate(-90 %p %p)\" text-anchor=\"middle\" "
                    "font-size=\"12\">%t</text>\n</g>\n",
                 xt, yt, xt, yt, f->cbar_title);
}

hyp_status hyp__svg_end(hyp__svg *f)
{
    if (!f->out)
        return f->status ? f->status : HYP_ERR_USAGE;
    hyp__svg_clip_leave(f);
    hyp__svg_out(f, "<rect class=\"frame\" x=\"%p\" y=\"%p\" width=\"%p\" height=\"%p\" fill=\"none\" stroke=\"#444444\"/>\n",
                 f->left_px, f->top_px, f->right_px - f->left_px, f->bottom_px - f->top_px);
    if (f->n_keys >= 2)
        write_legend(f);
    if (f->has_cbar && f->cbar_set)
        write_colour_bar(f);
    hyp__svg_out(f, "</svg>\n");
    hyp_status st = hyp__svg_settle(f);
    if (st)
        hyp__svg_discard(f);
    return st;
}
