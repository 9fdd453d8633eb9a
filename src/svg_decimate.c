/* svg_decimate.c - long series thinned to what the screen can show, with
 * every extreme kept (see svg.h). */
#include "svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* The points of one pixel column of one segment seen so far. */
typedef struct column {
    size_t first, low, high, last;
    long col;
    int open;
} column;

void hyp__decim_init(hyp__decim *d)
{
    memset(d, 0, sizeof *d);
}

void hyp__decim_free(hyp__decim *d)
{
    free(d->idx);
    free(d->seg_end);
    hyp__decim_init(d);
}

static int grow(size_t **p, size_t *alloc, size_t need)
{
    if (need <= *alloc)
        return 0;
    size_t n = *alloc ? 2 * *alloc : 64;
    while (n < need)
        n *= 2;
    size_t *q = realloc(*p, n * sizeof *q);
    if (!q)
        return -1;
    *p = q;
    *alloc = n;
    return 0;
}

/* Drawing a column as first, lowest, highest, last (in input order) keeps
 * its whole vertical extent and joins it to its neighbours at the right
 * points: the min/max envelope decimation in common use for time-series
 * displays (common practice, no source). */
static int flush(hyp__decim *d, column *c)
{
    if (!c->open)
        return 0;
    c->open = 0;
    size_t mid1 = c->low < c->high ? c->low : c->high, mid2 = c->low < c->high ? c->high : c->low;
    size_t pick[4] = {c->first, mid1, mid2, c->last};
    if (grow(&d->idx, &d->alloc_idx, d->n_idx + 4))
        return -1;
    for (int k = 0; k < 4; k++)
        if (d->n_idx == 0 || d->idx[d->n_idx - 1] < pick[k])
            d->idx[d->n_idx++] = pick[k];
    return 0;
}

/* Closes the segment being built, if it has any point. */
static int end_segment(hyp__decim *d)
{
    size_t start = d->n_seg ? d->seg_end[d->n_seg - 1] : 0;
    if (d->n_idx == start)
        return 0;
    if (grow(&d->seg_end, &d->alloc_seg, d->n_seg + 1))
        return -1;
    d->seg_end[d->n_seg++] = d->n_idx;
    return 0;
}

static void add_point(column *c, const double *y, size_t i, long col)
{
    if (!c->open) {
        c->first = c->low = c->high = c->last = i;
        c->col = col;
        c->open = 1;
        return;
    }
    if (y[i] < y[c->low])
        c->low = i;
    if (y[i] > y[c->high])
        c->high = i;
    c->last = i;
}

static hyp_status check_args(double x_lo, double x_hi, int columns, hyp_error *err)
{
    if (columns < 1 || columns > 1000000)
        return hyp_error_set(err, HYP_ERR_USAGE, "decimation: %d pixel columns; expected 1 to 1000000", columns);
    if (!isfinite(x_lo) || !isfinite(x_hi) || !isfinite(x_hi - x_lo) || !(x_hi > x_lo))
        return hyp_error_set(err, HYP_ERR_USAGE, "decimation: the x range is empty or not finite");
    return HYP_OK;
}

hyp_status hyp__decimate(const double *x, const double *y, const double *also, size_t n,
                         double x_lo, double x_hi, int columns, hyp__decim *d, hyp_error *err)
{
    hyp_status st = check_args(x_lo, x_hi, columns, err);
    if (st)
        return st;
    d->n_idx = d->n_seg = 0;
    double scale = columns / (x_hi - x_lo), x_prev = -INFINITY;
    column c = {0, 0, 0, 0, 0, 0};
    int oom = 0;
    for (size_t i = 0; i < n && !oom; i++) {
        if (!isfinite(x[i]) || !isfinite(y[i]) || (also && !isfinite(also[i]))) {
            oom = flush(d, &c) || end_segment(d);   /* a gap: never a line across it */
            continue;
        }
        if (x[i] < x_prev)
            return hyp_error_set(err, HYP_ERR_USAGE,
                                 "series point %zu: x %.17g is below the point before (%.17g); expected x in increasing order",
                                 i, x[i], x_prev);
        x_prev = x[i];
        double cd = floor((x[i] - x_lo) * scale);
        long col = cd < 0 ? 0 : cd >= columns ? columns - 1 : (long)cd;
        if (c.open && col != c.col)
            oom = flush(d, &c);
        add_point(&c, y, i, col);
    }
    if (oom || flush(d, &c) || end_segment(d))
        return hyp_error_set(err, HYP_ERR_NOMEM, "decimation: out of memory for %zu points", n);
    return HYP_OK;
}
