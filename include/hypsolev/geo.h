/* geo.h - geodesy the library needs: distances on the WGS84 ellipsoid
 * (PROJ's geodesic routines, C. F. F. Karney, J. Geodesy 87, 2013), the
 * EGM96 geoid and map projections through PROJ, used safely: one PROJ
 * context per hyp_geo (so one per thread), network access off, and no
 * "ballpark" transformation that would silently skip a missing grid. */
#ifndef HYPSOLEV_GEO_H
#define HYPSOLEV_GEO_H

#include "hypsolev/export.h"

#include <stddef.h>
#include "hypsolev/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Geodesic distance (m) between two points given in degrees (WGS84).
 * NaN when a coordinate is NaN or out of range (|lat| > 90, |lon| > 540). */
HYP_API double hyp_geo_distance_m(double lat1_deg, double lon1_deg,
                          double lat2_deg, double lon2_deg);

/* Distance (m) and azimuth (degrees clockwise from north, at point 1) of
 * the geodesic from point 1 to point 2 (WGS84); returns 0, or -1 for
 * coordinates out of range. */
HYP_API int hyp_geo_inverse(double lat1_deg, double lon1_deg, double lat2_deg, double lon2_deg,
                    double *dist_m, double *azimuth_deg);

/* Vertical references of heights. */
typedef enum hyp_vref {
    HYP_VREF_GEOID = 0,       /* orthometric, EGM96 geoid (EPSG:5773) */
    HYP_VREF_ELLIPSOID = 1    /* above the WGS84 ellipsoid (EPSG:4979) */
} hyp_vref;

HYP_API const char *hyp_vref_name(hyp_vref v);   /* "EGM96 geoid", "WGS84 ellipsoid" */
/* Parses "geoid" / "egm96" / "ellipsoidal" / "ellipsoid"; -1 when unknown. */
HYP_API int hyp_vref_parse(const char *text);

typedef struct hyp_geo hyp_geo;

/* A PROJ context of its own, network off. */
HYP_API hyp_status hyp_geo_open(hyp_geo **g, hyp_error *err);
HYP_API void hyp_geo_close(hyp_geo *g);

/* Prepares WGS84 ellipsoidal <-> EGM96 heights: refuses a missing grid with
 * a message naming it (never a ballpark no-op), then checks one published
 * undulation (NGA's EGM96 test point 38.628155 N, 90.220845 W:
 * -31.628 m, from memory) to within 0.1 m before anything is trusted. */
HYP_API hyp_status hyp_geo_enable_geoid(hyp_geo *g, hyp_error *err);
/* Geoid undulation N (m, ellipsoidal height = orthometric + N) at a point;
 * NaN when not enabled or outside the grid. */
HYP_API double hyp_geo_undulation_m(hyp_geo *g, double lat_deg, double lon_deg);

/* A projected CRS for easting/northing: anything PROJ accepts ("EPSG:n",
 * a PROJ string, WKT), or "utm" for the UTM zone (WGS84, EPSG:326zz/327zz)
 * holding (lat_deg, lon_deg). name gets the CRS's name. */
HYP_API hyp_status hyp_geo_set_crs(hyp_geo *g, const char *crs, double lat_deg, double lon_deg,
                           char *name, size_t n, hyp_error *err);
/* Projects a point to the CRS set: 0 on success. */
HYP_API int hyp_geo_project(hyp_geo *g, double lat_deg, double lon_deg, double *easting_m,
                    double *northing_m);

#ifdef __cplusplus
}
#endif
#endif
