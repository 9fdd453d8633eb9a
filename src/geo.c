/* geo.c - distances (PROJ's geodesic.h), the EGM96 geoid and projections
 * (PROJ), each hyp_geo with its own PROJ context, network off. */
#include "hypsolev/geo.h"

#include <geodesic.h>
#include <math.h>
#include <proj.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

struct hyp_geo {
    PJ_CONTEXT *ctx;
    PJ *geoid;    /* EPSG:4979 -> EPSG:4326+5773, lon/lat order */
    PJ *proj;     /* EPSG:4326 -> the CRS set, lon/lat order */
    char *proj_def;    /* the definition proj was made from (a UTM zone resolved) */
    char *proj_name;   /* and the name hyp_geo_set_crs gave it */
};

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

int hyp_geo_inverse(double lat1_deg, double lon1_deg, double lat2_deg, double lon2_deg,
                    double *dist_m, double *azimuth_deg)
{
    if (!(fabs(lat1_deg) <= 90.0 && fabs(lat2_deg) <= 90.0 && fabs(lon1_deg) <= 540.0 && fabs(lon2_deg) <= 540.0))
        return -1;
    struct geod_geodesic g;
    geod_init(&g, 6378137.0, 1.0 / 298.257223563);
    double az2;
    geod_inverse(&g, lat1_deg, lon1_deg, lat2_deg, lon2_deg, dist_m, azimuth_deg, &az2);
    return 0;
}

const char *hyp_vref_name(hyp_vref v)
{
    return v == HYP_VREF_ELLIPSOID ? "WGS84 ellipsoid (EPSG:4979)" : "EGM96 geoid (EPSG:5773)";
}

int hyp_vref_parse(const char *t)
{
    if (!t)
        return -1;
    if (!strcasecmp(t, "geoid") || !strcasecmp(t, "egm96") || !strcasecmp(t, "orthometric"))
        return HYP_VREF_GEOID;
    if (!strcasecmp(t, "ellipsoidal") || !strcasecmp(t, "ellipsoid") || !strcasecmp(t, "wgs84"))
        return HYP_VREF_ELLIPSOID;
    return -1;
}

hyp_status hyp_geo_open(hyp_geo **out, hyp_error *err)
{
    /* The PROJ context is made on first use: a run that needs no datum or
     * projection never starts PROJ (distances need only geodesic.h). */
    hyp_geo *g = calloc(1, sizeof *g);
    if (!g)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    *out = g;
    return HYP_OK;
}

static hyp_status ensure_ctx(hyp_geo *g, hyp_error *err)
{
    if (g->ctx)
        return HYP_OK;
    g->ctx = proj_context_create();
    if (!g->ctx)
        return hyp_error_set(err, HYP_ERR_NOMEM, "PROJ: cannot create a context");
    proj_context_set_enable_network(g->ctx, 0);
    proj_log_level(g->ctx, PJ_LOG_NONE);
    return HYP_OK;
}

void hyp_geo_close(hyp_geo *g)
{
    if (!g)
        return;
    proj_destroy(g->geoid);
    proj_destroy(g->proj);
    free(g->proj_def);
    free(g->proj_name);
    if (g->ctx)
        proj_context_destroy(g->ctx);
    free(g);
}

/* The grids the candidate operations need that are not installed. */
static void missing_grids(hyp_geo *g, PJ *src, PJ *dst, char *buf, size_t n)
{
    buf[0] = '\0';
    PJ_OPERATION_FACTORY_CONTEXT *f = proj_create_operation_factory_context(g->ctx, NULL);
    if (!f)
        return;
    proj_operation_factory_context_set_grid_availability_use(g->ctx, f, PROJ_GRID_AVAILABILITY_IGNORED);
    PJ_OBJ_LIST *ops = proj_create_operations(g->ctx, src, dst, f);
    for (int i = 0; ops && i < proj_list_get_count(ops); i++) {
        PJ *op = proj_list_get(g->ctx, ops, i);
        for (int k = 0; op && k < proj_coordoperation_get_grid_used_count(g->ctx, op); k++) {
            const char *sn = NULL, *fn = NULL, *pk = NULL, *url = NULL;
            int dd = 0, ol = 0, av = 0;
            proj_coordoperation_get_grid_used(g->ctx, op, k, &sn, &fn, &pk, &url, &dd, &ol, &av);
            if (!av && sn && !strstr(buf, sn)) {
                size_t l = strlen(buf);
                snprintf(buf + l, n - l, "%s%s", l ? ", " : "", sn);
            }
        }
        proj_destroy(op);
    }
    proj_list_destroy(ops);
    proj_operation_factory_context_destroy(f);
}

hyp_status hyp_geo_enable_geoid(hyp_geo *g, hyp_error *err)
{
    if (g->geoid)
        return HYP_OK;
    if (ensure_ctx(g, err))
        return err ? err->status : HYP_ERR_NOMEM;
    PJ *src = proj_create(g->ctx, "EPSG:4979"), *dst = proj_create(g->ctx, "EPSG:4326+5773");
    hyp_status st = HYP_OK;
    if (!src || !dst) {
        st = hyp_error_set(err, HYP_ERR_IO, "PROJ: cannot create EPSG:4979 / EPSG:5773 (is proj.db installed? package proj-data)");
        goto out;
    }
    const char *const opts[] = {"ALLOW_BALLPARK=NO", NULL};
    PJ *op = proj_create_crs_to_crs_from_pj(g->ctx, src, dst, NULL, opts);
    PJ *norm = op ? proj_normalize_for_visualization(g->ctx, op) : NULL;
    proj_destroy(op);
    if (norm) {
        /* an operation whose grid is missing fails here, not silently */
        PJ_COORD c = proj_coord(-90.220845, 38.628155, 0.0, 0.0);
        PJ_COORD r = proj_trans(norm, PJ_FWD, c);
        double n_m = -r.xyz.z;
        if (!(fabs(n_m - -31.628) < 0.1)) {
            proj_destroy(norm);
            norm = NULL;
            if (n_m == n_m && fabs(r.xyz.z) < 1e6) {
                st = hyp_error_set(err, HYP_ERR_INTERNAL,
                                   "geoid self-test failed: EGM96 undulation at 38.628155 N, 90.220845 W is %.3f m, expected -31.628 m; vertical conversions refused",
                                   n_m);
                goto out;
            }
        }
    }
    if (!norm) {
        char grids[256];
        missing_grids(g, src, dst, grids, sizeof grids);
        st = hyp_error_set(err, HYP_ERR_IO,
                           "PROJ: no usable WGS84-to-EGM96 transformation: grid %s not found (install Debian's proj-data, or set PROJ_DATA); vertical conversions refused",
                           grids[0] ? grids : "(unknown)");
        goto out;
    }
    g->geoid = norm;
out:
    proj_destroy(src);
    proj_destroy(dst);
    return st;
}

double hyp_geo_undulation_m(hyp_geo *g, double lat_deg, double lon_deg)
{
    if (!g || !g->geoid || !(fabs(lat_deg) <= 90.0 && fabs(lon_deg) <= 360.0))
        return NAN;
    PJ_COORD r = proj_trans(g->geoid, PJ_FWD, proj_coord(lon_deg, lat_deg, 0.0, 0.0));
    if (!(fabs(r.xyz.z) < 1000.0))
        return NAN;
    return -r.xyz.z;
}

hyp_status hyp_geo_set_crs(hyp_geo *g, const char *crs, double lat_deg, double lon_deg,
                           char *name, size_t n, hyp_error *err)
{
    char buf[64];
    const char *def = crs;
    if (ensure_ctx(g, err))
        return err ? err->status : HYP_ERR_NOMEM;
    if (strcasecmp(crs, "utm") == 0) {
        if (!(fabs(lat_deg) <= 84.0 && fabs(lon_deg) <= 180.0))
            return hyp_error_set(err, HYP_ERR_USAGE, "--crs utm: the track's position %g, %g is outside UTM (80 S to 84 N)", lat_deg, lon_deg);
        int zone = (int)floor((lon_deg + 180.0) / 6.0) + 1;
        if (zone > 60)
            zone = 60;
        /* the standard zone's exceptions for south-west Norway and Svalbard
         * (as GeographicLib's UTMUPS::StandardZone) */
        if (lat_deg >= 56.0 && lat_deg < 64.0 && lon_deg >= 3.0 && lon_deg < 12.0)
            zone = 32;
        if (lat_deg >= 72.0 && lon_deg >= 0.0 && lon_deg < 42.0)
            zone = lon_deg < 9.0 ? 31 : lon_deg < 21.0 ? 33 : lon_deg < 33.0 ? 35 : 37;
        snprintf(buf, sizeof buf, "EPSG:%d", (lat_deg >= 0 ? 32600 : 32700) + zone);
        def = buf;
    }
    if (g->proj && g->proj_def && strcmp(g->proj_def, def) == 0) {
        /* the same CRS again (a batch's next rover): PROJ's set-up, which
         * costs more than projecting a few thousand points, is kept */
        snprintf(name, n, "%s", g->proj_name);
        return HYP_OK;
    }
    PJ *dst = proj_create(g->ctx, def);
    char plus[1100];
    if (dst && def[0] == '+' && proj_get_type(dst) != PJ_TYPE_PROJECTED_CRS && !strstr(def, "type=crs") &&
        strlen(def) < 1000) {
        /* a PROJ string names an operation unless it says +type=crs */
        proj_destroy(dst);
        snprintf(plus, sizeof plus, "%s +type=crs", def);
        dst = proj_create(g->ctx, plus);
    }
    if (!dst)
        return hyp_error_set(err, HYP_ERR_USAGE, "--crs \"%s\": PROJ does not know it (expected EPSG:n, a PROJ string, WKT or utm)", crs);
    PJ_TYPE t = proj_get_type(dst);
    if (t != PJ_TYPE_PROJECTED_CRS) {
        proj_destroy(dst);
        return hyp_error_set(err, HYP_ERR_USAGE, "--crs \"%s\": not a projected CRS (easting and northing are needed)", crs);
    }
    PJ *src = proj_create(g->ctx, "EPSG:4326");
    const char *const opts[] = {"ALLOW_BALLPARK=NO", NULL};
    PJ *op = src ? proj_create_crs_to_crs_from_pj(g->ctx, src, dst, NULL, opts) : NULL;
    PJ *norm = op ? proj_normalize_for_visualization(g->ctx, op) : NULL;
    snprintf(name, n, "%s (%s)", proj_get_name(dst) ? proj_get_name(dst) : crs, def);
    proj_destroy(op);
    proj_destroy(src);
    proj_destroy(dst);
    if (!norm)
        return hyp_error_set(err, HYP_ERR_USAGE, "--crs \"%s\": no transformation from WGS84 without a ballpark step", crs);
    proj_destroy(g->proj);
    g->proj = norm;
    free(g->proj_def);
    free(g->proj_name);
    g->proj_def = strdup(def);
    g->proj_name = strdup(name);
    if (!g->proj_def || !g->proj_name) {   /* no cache then, the projection itself is set */
        free(g->proj_def);
        free(g->proj_name);
        g->proj_def = g->proj_name = NULL;
    }
    return HYP_OK;
}

int hyp_geo_project(hyp_geo *g, double lat_deg, double lon_deg, double *e, double *nn)
{
    if (!g || !g->proj || lat_deg != lat_deg)
        return -1;
    PJ_COORD r = proj_trans(g->proj, PJ_FWD, proj_coord(lon_deg, lat_deg, 0.0, 0.0));
    if (!(fabs(r.xy.x) < 1e9 && fabs(r.xy.y) < 1e9))
        return -1;
    *e = r.xy.x;
    *nn = r.xy.y;
    return 0;
}
