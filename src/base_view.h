/* base_view.h - a base log as the core uses it (private): valid samples
 * on true time, station pressure with the instrument offset removed,
 * hourly tendencies, and interpolation that refuses gaps. Used by the
 * point model, the pressure field, the clock estimate and the base
 * comparison; it calls none of them. */
#ifndef HYP_BASE_VIEW_H
#define HYP_BASE_VIEW_H

#include "hypsolev/correct.h"

/* The base log as the core needs it: valid samples only, on true time. */
typedef struct hyp__base_view {
    size_t n;
    double *t, *p, *temp, *rh;
    double *rate;      /* hourly tendency at each sample, Pa/s */
} hyp__base_view;

/* Fills a base's view: valid samples on true time, QNH reduced to station
 * pressure, the base's offset removed, hourly tendencies. */
hyp_status hyp__base_view_make(const hyp_base *b, hyp__base_view *v, hyp_error *err);
void hyp__base_view_free(hyp__base_view *v);
/* Base quantity v (of view b) at true time x; status of the bracket. */
hyp_point_status hyp__base_at(const hyp__base_view *b, const double *v, double x, double max_gap_s, double *out);
/* The interval k of b holding true time x and the weight w of its end
 * (*k is also a hint: the interval found last, 0 to start); the status
 * says why there is none (outside the log, or a gap over max_gap_s). */
hyp_point_status hyp__base_bracket(const hyp__base_view *b, double x, double max_gap_s, size_t *k, double *w);
/* v[k] + w (v[k+1] - v[k]), or the one of them that is not NaN. */
double hyp__base_lerp(const double *v, size_t k, double w);

#endif
