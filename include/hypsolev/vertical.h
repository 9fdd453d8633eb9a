/* vertical.h - heights between vertical references (EGM96 geoid and WGS84
 * ellipsoid) for whole tracks, and the comparison of two height series. */
#ifndef HYPSOLEV_VERTICAL_H
#define HYPSOLEV_VERTICAL_H

#include "hypsolev/export.h"

#include <stddef.h>
#include "hypsolev/error.h"
#include "hypsolev/geo.h"
#include "hypsolev/samples.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The track's own heights (s->ele_m, in reference `from`) in reference
 * `to`, into out[s->count]. Where geoidheight_m (may be NULL) holds the
 * device's own geoid separation for a point (GPX <geoidheight>), that is
 * used instead of EGM96. g may be NULL when from == to. NaN where no ele. */
HYP_API hyp_status hyp_track_heights(hyp_geo *g, const hyp_series *s, const double *geoidheight_m,
                             hyp_vref from, hyp_vref to, float *out, hyp_error *err);

/* Converts heights h[s->count] at the series' positions from `from` to
 * `to` in place (EGM96: ellipsoidal = orthometric + N). NaN stays NaN. */
HYP_API hyp_status hyp_heights_convert(hyp_geo *g, const hyp_series *s, double *h, hyp_vref from,
                               hyp_vref to, hyp_error *err);

/* Mean and sample standard deviation of a[i] - b[i] where both are finite. */
HYP_API void hyp_diff_stats(const float *a, const double *b, size_t n, double *mean, double *sd,
                    size_t *count);

#ifdef __cplusplus
}
#endif
#endif
