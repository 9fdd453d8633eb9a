/* svg_thin.c - the decimation of svg_decimate.c fed one point at a time,
 * for series that are not arrays of double (see svg.h). */
#include "svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static void keep(hyp__thin *t, size_t i)
{
    if (t->oom)
        return;
    if (t->n_idx == t->alloc) {
        size_t n = t->alloc ? 2 * t->alloc : 1024;
        size_t *p = realloc(t->idx, n * sizeof *p);
        if (!p) {
            t->oom = 1;
            return;
        }
        t->idx = p;
        t->alloc = n;
    }
    t->idx[t->n_idx++] = i;
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

static void add_point(hyp__thin_col *c, size_t i, double y, long col)
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
                keep(t, i);
            }
            continue;
        }
        if (c->open && col != c->col)
            flush(t, c);
        add_point(c, i, y[k], col);
    }
    return HYP_OK;
}

static int by_index(const void *a, const void *b)
{
    size_t x = *(const size_t *)a, y = *(const size_t *)b;
    return x < y ? -1 : x > y;
}

hyp_status hyp__thin_end(hyp__thin *t, hyp_error *err)
{
    for (size_t k = 0; k < t->n_series; k++)
        flush(t, &t->c[k]);
    if (t->oom)
        return hyp_error_set(err, HYP_ERR_NOMEM, "thinning: out of memory");
    if (t->n_idx)
        qsort(t->idx, t->n_idx, sizeof *t->idx, by_index);
    size_t m = 0;
    for (size_t j = 0; j < t->n_idx; j++)
        if (!m || t->idx[m - 1] != t->idx[j])
            t->idx[m++] = t->idx[j];
    t->n_idx = m;
    return HYP_OK;
}

void hyp__thin_free(hyp__thin *t)
{
    free(t->idx);
    t->idx = NULL;
    t->n_idx = t->alloc = 0;
}
