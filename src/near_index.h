/* near_index.h - which samples of a track lie within a radius of a point,
 * without a geodesic per sample: a latitude-band and longitude sort with a
 * bound that can only let too many through, the exact geodesic (PROJ's
 * geodesic.h, hyp_geo_distance_m) deciding; private. */
#ifndef HYP_NEAR_INDEX_H
#define HYP_NEAR_INDEX_H

#include "hypsolev/error.h"

#include <stddef.h>
#include <stdint.h>

typedef struct hyp__near_ent hyp__near_ent;

typedef struct hyp__near_index {
    const int32_t *lat_e7, *lon_e7;   /* the caller's positions (kept, not copied) */
    hyp__near_ent *e;                 /* usable positions sorted by band, longitude */
    size_t n;
    int32_t band_e7;                  /* latitude band height, 1e-7 degrees */
} hyp__near_index;

/* Indexes n positions in 1e-7 degrees (hyp_series lat_e7/lon_e7; those
 * without one, HYP_NO_POSITION or HYP_BAD_POSITION, or with |lat| > 90 are
 * left out: their distance is NaN). radius_m (> 0) is the radius most
 * queries will use: it sizes the bands, not the answers. 12 bytes per
 * position until hyp__near_index_free. */
hyp_status hyp__near_index_build(hyp__near_index *ix, const int32_t *lat_e7, const int32_t *lon_e7, size_t n,
                                 double radius_m);
void hyp__near_index_free(hyp__near_index *ix);

/* The indices i (ascending) with hyp_geo_distance_m(lat_i, lon_i, lat_deg,
 * lon_deg) <= radius_m, into *out (grown with realloc; *cap its capacity),
 * their number in *count: exactly the samples an exhaustive scan with the
 * same distance finds. */
hyp_status hyp__near_index_query(const hyp__near_index *ix, double lat_deg, double lon_deg, double radius_m,
                                 size_t **out, size_t *count, size_t *cap);

/* The same by trying every position: the reference the index is tested
 * against. */
hyp_status hyp__near_exhaustive(const int32_t *lat_e7, const int32_t *lon_e7, size_t n, double lat_deg,
                                double lon_deg, double radius_m, size_t **out, size_t *count, size_t *cap);

#endif
