/* vertical.c - whole-track conversions between the EGM96 geoid and the
 * WGS84 ellipsoid (ellipsoidal height h = orthometric height H + N, the
 * geoid undulation; e.g. NGA, EGM96 documentation). */
#include "hypsolev/vertical.h"

#include <math.h>

static hyp_status need_geoid(hyp_geo *g, hyp_error *err)
{
    if (!g)
        return hyp_error_set(err, HYP_ERR_USAGE, "a vertical conversion needs PROJ (no hyp_geo given)");
    return hyp_geo_enable_geoid(g, err);
}

hyp_status hyp_track_heights(hyp_geo *g, const hyp_series *s, const double *geoidheight_m,
                             hyp_vref from, hyp_vref to, float *out, hyp_error *err)
{
    hyp_status st = from == to ? HYP_OK : need_geoid(g, err);
    if (st)
        return st;
    for (size_t i = 0; i < s->count; i++) {
        double h = s->ele_m[i];
        if (from == to || h != h) {
            out[i] = (float)h;
            continue;
        }
        double n = geoidheight_m && geoidheight_m[i] == geoidheight_m[i]
                       ? geoidheight_m[i]
                       : hyp_geo_undulation_m(g, hyp_series_lat(s, i), hyp_series_lon(s, i));
        out[i] = (float)(to == HYP_VREF_ELLIPSOID ? h + n : h - n);
    }
    return HYP_OK;
}

hyp_status hyp_heights_convert(hyp_geo *g, const hyp_series *s, double *h, hyp_vref from,
                               hyp_vref to, hyp_error *err)
{
    if (from == to)
        return HYP_OK;
    hyp_status st = need_geoid(g, err);
    if (st)
        return st;
    for (size_t i = 0; i < s->count; i++) {
        if (h[i] != h[i])
            continue;
        double n = hyp_geo_undulation_m(g, hyp_series_lat(s, i), hyp_series_lon(s, i));
        h[i] = to == HYP_VREF_ELLIPSOID ? h[i] + n : h[i] - n;
    }
    return HYP_OK;
}

void hyp_diff_stats(const float *a, const double *b, size_t n, double *mean, double *sd, size_t *count)
{
    double s = 0, ss = 0;
    size_t k = 0;
    for (size_t i = 0; i < n; i++) {
        double d = a[i] - b[i];
        if (d == d) {
            s += d;
            ss += d * d;
            k++;
        }
    }
    *count = k;
    *mean = k ? s / (double)k : NAN;
    *sd = k > 1 ? sqrt((ss - s * s / (double)k) / (double)(k - 1)) : NAN;
}
