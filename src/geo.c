/* geo.c - geodesic distances on WGS84 through PROJ's geodesic.h. */
#include "hypsolev/geo.h"

#include <geodesic.h>
#include <math.h>
#include <stddef.h>

double hyp_geo_distance_m(double lat1_deg, double lon1_deg,
                          double lat2_deg, double lon2_deg)
{
    if (!(fabs(lat1_deg) <= 90.0 && fabs(lat2_deg) <= 90.0 &&
          fabs(lon1_deg) <= 540.0 && fabs(lon2_deg) <= 540.0))
        return NAN;
    /* geod_init is cheap (a few dozen multiplications), and a local struct
     * keeps the library free of globals. */
    struct geod_geodesic g;
    geod_init(&g, 6378137.0, 1.0 / 298.257223563);
    double s12 = NAN;
    geod_inverse(&g, lat1_deg, lon1_deg, lat2_deg, lon2_deg, &s12, NULL, NULL);
    return s12;
}
