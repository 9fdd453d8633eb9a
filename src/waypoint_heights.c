/* waypoint_heights.c - a GPX rover's waypoints given the corrected track's
 * height at their times: one pass over the track with the waypoints in
 * time order. */
#include "waypoint_heights.h"

#include <math.h>
#include <stdlib.h>

void hyp__waypoint_heights_free(hyp_waypoint_heights *h)
{
    free(h->height_m);
    free(h->sigma_m);
    free(h->status);
    *h = (hyp_waypoint_heights){0};
}

typedef struct wkey {
    double t_s;
    size_t i;
} wkey;

static int by_time(const void *a, const void *b)
{
    const wkey *x = a, *y = b;
    return x->t_s < y->t_s ? -1 : x->t_s > y->t_s ? 1 : x->i < y->i ? -1 : x->i > y->i;
}

/* Waypoint k between corrected samples a and b (a == SIZE_MAX: none before;
 * b: the sample at or after its time). Linear interpolation in time: the
 * track is sampled every few seconds, between which a walker's height
 * changes smoothly. */
static void place(hyp_waypoint_heights *o, size_t k, double t_s, const hyp_series *s, const hyp_correct_result *res,
                  size_t a, size_t b)
{
    double tb = s->time_s[b];
    if (t_s == tb) {
        o->height_m[k] = res->height_m[b];
        o->sigma_m[k] = res->sigma_m[b];
    } else if (a != SIZE_MAX && tb - s->time_s[a] <= HYP__WPT_MAX_GAP_S) {
        double ta = s->time_s[a], f = (t_s - ta) / (tb - ta);
        o->height_m[k] = res->height_m[a] + f * (res->height_m[b] - res->height_m[a]);
        o->sigma_m[k] = fmax(res->sigma_m[a], res->sigma_m[b]);
    } else {
        o->status[k] = HYP_WPT_OUTSIDE;
        return;
    }
    o->status[k] = HYP_WPT_CORRECTED;
}

hyp_status hyp__waypoint_heights(const hyp_waypoints *w, const hyp_series *s, const hyp_correct_result *res,
                                 hyp_waypoint_heights *out, hyp_error *err)
{
    *out = (hyp_waypoint_heights){0};
    size_t n = w ? w->count : 0;
    if (!n)
        return HYP_OK;
    out->height_m = malloc(n * sizeof(double));
    out->sigma_m = malloc(n * sizeof(double));
    out->status = malloc(n);
    wkey *key = malloc(n * sizeof *key);
    if (!out->height_m || !out->sigma_m || !out->status || !key) {
        free(key);
        hyp__waypoint_heights_free(out);
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    out->count = n;
    size_t m = 0;
    for (size_t k = 0; k < n; k++) {
        out->height_m[k] = out->sigma_m[k] = NAN;
        out->status[k] = HYP_WPT_OUTSIDE;
        if (w->time_s[k] == w->time_s[k])
            key[m++] = (wkey){w->time_s[k], k};
        else
            out->status[k] = HYP_WPT_NO_TIME;
    }
    qsort(key, m, sizeof *key, by_time);
    /* the corrected samples are in time order (readers.h): walk them once */
    size_t j = 0, prev = SIZE_MAX;
    for (size_t i = 0; i < res->count && j < m; i++) {
        if (res->status[i] != HYP_PT_OK)
            continue;
        for (; j < m && key[j].t_s <= s->time_s[i]; j++)
            place(out, key[j].i, key[j].t_s, s, res, prev, i);
        prev = i;
    }
    /* those after the last corrected sample stay outside */
    free(key);
    for (size_t k = 0; k < n; k++) {
        out->n_corrected += out->status[k] == HYP_WPT_CORRECTED;
        out->n_outside += out->status[k] == HYP_WPT_OUTSIDE;
        out->n_no_time += out->status[k] == HYP_WPT_NO_TIME;
    }
    return HYP_OK;
}
