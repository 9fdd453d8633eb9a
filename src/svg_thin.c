/* svg_thin.c - the decimation of svg_decimate.c fed one point at a time,
 * for series that are not arrays of double (see svg.h). */
#include "svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static void keep(hyp__thin *t, hyp__thin_pt p)
{
    if (t->oom)
        return;
    if (t->n == t->alloc) {
        size_t n = t->alloc ? 2 * t->alloc : 1024;
        hyp__thin_pt *q = realloc(t->pts, n * sizeof *q);
        if (!q) {
            t->oom = 1;
            return;
        }
        t->pts = q;
        t->alloc = n;
    }
    t->pts[t->n++] = p;
}

/* The column's first, lowest, highest and last point, as flush() in
 * svg_decimate.c keeps them. */
static void flush(hyp__thin *t, hyp__thin_col *c)
{
    if (!c->open)
        return;
    c->open = 0;
    keep(t, c->first);
    keep(t, c->low);
    keep(t, c->high);
    keep(t, c->last);
}

hyp_status hyp__thin_begin(hyp__thin *t, size_t n_series, double x_lo, double x_hi, int columns, hyp_error *err)
{
    memset(t, 0, sizeof *t);
    if (n_series < 1 || n_series > HYP__THIN_SERIES)
        return hyp_error_set(err, HYP_ERR_USAGE, "thinning: %zu series; expected 1 to %d", n_series, HYP__THIN_SERIES);
    if (columns < 1 || columns > 1000000)
        return hyp_error_set(err, HYP_ERR_USAGE, "thinning: %d pixel columns; expected 1 to 1000000", columns);
    if (!isfinite(x_lo) || !isfinite(x_hi) || !isfinite(x_hi - x_lo) || !(x_hi > x_lo))
        return hyp_error_set(err, HYP_ERR_USAGE, "thinning: the x range is empty or not finite");
    t->n_series = n_series;
    t->x_lo = x_lo;
    t->columns = columns;
    t->scale = columns / (x_hi - x_lo);   /* the expression hyp__decimate uses, so columns agree */
    t->x_prev = -INFINITY;
    return HYP_OK;
}

static void add_point(hyp__thin_col *c, hyp__thin_pt i, double y, long col)
{
    if (!c->open) {
        c->first = c->low = c->high = c->last = i;
        c->y_low = c->y_high = y;
        c->col = col;
        c->open = 1;
        return;
    }
    if (y < c->y_low)
        c->low = i, c->y_low = y;
    if (y > c->y_high)
        c->high = i, c->y_high = y;
    c->last = i;
}

hyp_status hyp__thin_add(hyp__thin *t, size_t i, double x, const double *y, hyp_error *err)
{
    long col = 0;
    if (isfinite(x)) {
        if (x < t->x_prev)
            return hyp_error_set(err, HYP_ERR_USAGE, "thinning: point %zu: x %.17g is below the point before (%.17g)", i, x,
                                 t->x_prev);
        t->x_prev = x;
        double cd = floor((x - t->x_lo) * t->scale);
        col = cd < 0 ? 0 : cd >= t->columns ? t->columns - 1 : (long)cd;
    }
    for (size_t k = 0; k < t->n_series; k++) {
        hyp__thin_col *c = &t->c[k];
        if (!isfinite(x) || !isfinite(y[k])) {
            if (c->open) {   /* the segment ends here: keep the point that ends it */
                flush(t, c);
                keep(t, (hyp__thin_pt){i, x});
            }
            continue;
        }
        if (c->open && col != c->col)
            flush(t, c);
        add_point(c, (hyp__thin_pt){i, x}, y[k], col);
    }
    return HYP_OK;
}

static int by_index(const void *a, const void *b)
{
    size_t x = ((const hyp__thin_pt *)a)->i, y = ((const hyp__thin_pt *)b)->i;
    return x < y ? -1 : x > y;
}

hyp_status hyp__thin_end(hyp__thin *t, hyp_error *err)
{
    for (size_t k = 0; k < t->n_series; k++)
        flush(t, &t->c[k]);
    if (t->oom)
        return hyp_error_set(err, HYP_ERR_NOMEM, "thinning: out of memory");
    if (t->n)
        qsort(t->pts, t->n, sizeof *t->pts, by_index);
    size_t m = 0;
    for (size_t j = 0; j < t->n; j++)
        if (!m || t->pts[m - 1].i != t->pts[j].i)
            t->pts[m++] = t->pts[j];
    t->n = m;
    return HYP_OK;
}

void hyp__thin_free(hyp__thin *t)
{
    free(t->pts);
    t->pts = NULL;
    t->n = t->alloc = 0;
}
