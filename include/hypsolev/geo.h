/* geo.h - geodesy the core asks for: distances on the WGS84 ellipsoid
 * (through PROJ's geodesic routines, C. F. F. Karney, J. Geodesy 87, 2013). */
#ifndef HYPSOLEV_GEO_H
#define HYPSOLEV_GEO_H

#ifdef __cplusplus
extern "C" {
#endif

/* Geodesic distance (m) between two points given in degrees (WGS84).
 * NaN when a coordinate is NaN or out of range (|lat| > 90, |lon| > 540). */
double hyp_geo_distance_m(double lat1_deg, double lon1_deg,
                          double lat2_deg, double lon2_deg);

#ifdef __cplusplus
}
#endif
#endif
