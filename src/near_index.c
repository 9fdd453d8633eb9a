/* near_index.c - the samples within a radius of a point (benchmark ties):
 * candidates from a sort by latitude band and longitude under bounds that
 * can only admit too many, the exact geodesic deciding. Matching 10 000
 * benchmarks against a track took a geodesic per benchmark and sample
 * (issue 15: 31 s); this takes a geodesic per candidate only. */
#include "near_index.h"
#include "hypsolev/geo.h"
#include "hypsolev/samples.h"

#include <math.h>
#include <stdlib.h>

struct hyp__near_ent {
    int32_t band;     /* latitude band */
    int32_t lon_e7;   /* longitude in [-180, 180] degrees, 1e-7 */
    uint32_t i;       /* sample index */
};

/* WGS84 (NIMA TR8350.2, table 3.1): a, 1/f. */
#define WGS84_A_M 6378137.0
#define WGS84_F (1.0 / 298.257223563)
#define E7 10000000.0
#define RAD_DEG (180.0 / 3.14159265358979323846)

/* The bounds. On the ellipsoid ds^2 = (M dphi)^2 + (N cos(phi) dlambda)^2
 * (M, N the meridian and prime-vertical radii of curvature: Torge &
 * Mueller, Geodesy, 4th ed., sec. 4.1), so a path of length s from a point
 * changes latitude by at most s / min M, with min M = a (1 - e^2) at the
 * equator, and longitude by at most s / (a cos(phi_max)) where phi_max
 * bounds |phi| on the path (N >= a). The margin (a millionth and two
 * storage steps) covers rounding; the geodesic decides, so a wider bound
 * costs time only. */
static double dlat_deg(double radius_m)
{
    const double e2 = WGS84_F * (2.0 - WGS84_F);
    return radius_m / (WGS84_A_M * (1.0 - e2)) * RAD_DEG * (1.0 + 1e-6) + 2e-7;
}

/* Longitude half-width (degrees) about a point of latitude lat_deg, or 360
 * when a path of radius_m may reach a pole (every longitude). */
static double dlon_deg(double lat_deg, double radius_m)
{
    double phi_max = fabs(lat_deg) + dlat_deg(radius_m);
    if (phi_max >= 90.0)
        return 360.0;
    double d = radius_m / (WGS84_A_M * cos(phi_max / RAD_DEG)) * RAD_DEG * (1.0 + 1e-6) + 2e-7;
    return d < 180.0 ? d : 360.0;
}

static int32_t band_of(int64_t lat_e7, int32_t band_e7)
{
    return (int32_t)((lat_e7 + 900000000) / band_e7);
}

static int cmp_ent(const void *pa, const void *pb)
{
    const hyp__near_ent *a = pa, *b = pb;
    if (a->band != b->band)
        return a->band < b->band ? -1 : 1;
    if (a->lon_e7 != b->lon_e7)
        return a->lon_e7 < b->lon_e7 ? -1 : 1;
    return (a->i > b->i) - (a->i < b->i);
}

static int cmp_size(const void *pa, const void *pb)
{
    size_t a = *(const size_t *)pa, b = *(const size_t *)pb;
    return (a > b) - (a < b);
}

static int32_t wrap_lon_e7(int32_t lon_e7)
{
    int64_t l = lon_e7;
    if (l > 1800000000)
        l -= 3600000000LL;
    else if (l < -1800000000)
        l += 3600000000LL;
    return (int32_t)l;
}

/* The distance exactly as the exhaustive scan and calib.c compute it:
 * the sample first, the point second (hyp_series_lat/lon's conversion). */
static double dist(const int32_t *lat_e7, const int32_t *lon_e7, size_t i, double lat_deg, double lon_deg)
{
    if (lat_e7[i] <= HYP_BAD_POSITION || lon_e7[i] <= HYP_BAD_POSITION)
        return NAN;
    return hyp_geo_distance_m((double)lat_e7[i] * 1e-7, (double)lon_e7[i] * 1e-7, lat_deg, lon_deg);
}

static hyp_status push(size_t **out, size_t *count, size_t *cap, size_t i)
{
    if (*count == *cap) {
        size_t nc = *cap ? 2 * *cap : 64;
        size_t *p = realloc(*out, nc * sizeof *p);
        if (!p)
            return HYP_ERR_NOMEM;
        *out = p;
        *cap = nc;
    }
    (*out)[(*count)++] = i;
    return HYP_OK;
}

hyp_status hyp__near_index_build(hyp__near_index *ix, const int32_t *lat_e7, const int32_t *lon_e7, size_t n,
                                 double radius_m)
{
    *ix = (hyp__near_index){lat_e7, lon_e7, NULL, 0, 1};
    if (n > UINT32_MAX)
        return HYP_ERR_NOMEM;
    double b = ceil(dlat_deg(radius_m > 0 ? radius_m : 1.0) * E7);
    ix->band_e7 = b >= 1.0 && b <= 1800000000.0 ? (int32_t)b : 1800000000;
    ix->e = malloc((n ? n : 1) * sizeof *ix->e);
    if (!ix->e)
        return HYP_ERR_NOMEM;
    for (size_t i = 0; i < n; i++) {
        if (lat_e7[i] <= HYP_BAD_POSITION || lon_e7[i] <= HYP_BAD_POSITION || lat_e7[i] > 900000000 ||
            lat_e7[i] < -900000000)
            continue;   /* no distance (NaN): never within */
        ix->e[ix->n++] = (hyp__near_ent){band_of(lat_e7[i], ix->band_e7), wrap_lon_e7(lon_e7[i]), (uint32_t)i};
    }
    qsort(ix->e, ix->n, sizeof *ix->e, cmp_ent);
    return HYP_OK;
}

void hyp__near_index_free(hyp__near_index *ix)
{
    free(ix->e);
    ix->e = NULL;
    ix->n = 0;
}

/* First entry not before (band, lon_e7). */
static size_t lower_bound(const hyp__near_index *ix, int32_t band, int32_t lon_e7)
{
    size_t lo = 0, hi = ix->n;
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        const hyp__near_ent *m = &ix->e[mid];
        if (m->band < band || (m->band == band && m->lon_e7 < lon_e7))
            lo = mid + 1;
        else
            hi = mid;
    }
    return lo;
}

/* Entries of one band with longitude in [lo, hi] (1e-7 degrees) and
 * latitude in [la0, la1]: the geodesic decides. */
static hyp_status scan(const hyp__near_index *ix, int32_t band, int64_t lo, int64_t hi, int64_t la0, int64_t la1,
                       double lat_deg, double lon_deg, double radius_m, size_t **out, size_t *count, size_t *cap)
{
    for (size_t k = lower_bound(ix, band, (int32_t)lo); k < ix->n && ix->e[k].band == band && ix->e[k].lon_e7 <= hi;
         k++) {
        uint32_t i = ix->e[k].i;
        if (ix->lat_e7[i] < la0 || ix->lat_e7[i] > la1)
            continue;
        if (dist(ix->lat_e7, ix->lon_e7, i, lat_deg, lon_deg) <= radius_m && push(out, count, cap, i))
            return HYP_ERR_NOMEM;
    }
    return HYP_OK;
}

hyp_status hyp__near_index_query(const hyp__near_index *ix, double lat_deg, double lon_deg, double radius_m,
                                 size_t **out, size_t *count, size_t *cap)
{
    *count = 0;
    if (!(fabs(lat_deg) <= 90.0 && fabs(lon_deg) <= 540.0 && radius_m >= 0.0))
        return HYP_OK;   /* the distance is NaN (or nothing is within): none */
    double dphi = dlat_deg(radius_m), dlam = dlon_deg(lat_deg, radius_m);
    int64_t la0 = (int64_t)floor((lat_deg - dphi) * E7), la1 = (int64_t)ceil((lat_deg + dphi) * E7);
    la0 = la0 < -900000000 ? -900000000 : la0;
    la1 = la1 > 900000000 ? 900000000 : la1;
    double lq = fmod(lon_deg, 360.0);
    lq = lq > 180.0 ? lq - 360.0 : lq < -180.0 ? lq + 360.0 : lq;
    /* at most three longitude ranges: the main one and its wrap across the
     * antimeridian (disjoint, as the half-width is under 180 degrees) */
    int64_t r[3][2];
    int nr = 0;
    if (dlam >= 360.0) {
        r[nr][0] = -1800000000, r[nr++][1] = 1800000000;
    } else {
        int64_t lo = (int64_t)floor((lq - dlam) * E7), hi = (int64_t)ceil((lq + dlam) * E7);
        r[nr][0] = lo < -1800000000 ? -1800000000 : lo;
        r[nr++][1] = hi > 1800000000 ? 1800000000 : hi;
        if (lo < -1800000000)
            r[nr][0] = lo + 3600000000LL, r[nr++][1] = 1800000000;
        if (hi > 1800000000)
            r[nr][0] = -1800000000, r[nr++][1] = hi - 3600000000LL;
    }
    for (int32_t b = band_of(la0, ix->band_e7); b <= band_of(la1, ix->band_e7); b++)
        for (int k = 0; k < nr; k++)
            if (scan(ix, b, r[k][0], r[k][1], la0, la1, lat_deg, lon_deg, radius_m, out, count, cap))
                return HYP_ERR_NOMEM;
    if (*count > 1)
        qsort(*out, *count, sizeof **out, cmp_size);
    return HYP_OK;
}

hyp_status hyp__near_exhaustive(const int32_t *lat_e7, const int32_t *lon_e7, size_t n, double lat_deg,
                                double lon_deg, double radius_m, size_t **out, size_t *count, size_t *cap)
{
    *count = 0;
    for (size_t i = 0; i < n; i++)
        if (dist(lat_e7, lon_e7, i, lat_deg, lon_deg) <= radius_m && push(out, count, cap, i))
            return HYP_ERR_NOMEM;
    return HYP_OK;
}
