/* test_geo.c - geodesy and vertical references against published values
 * and reference programs (GeographicLib's GeodSolve and GeoConvert, from
 * Debian's geographiclib-tools 2.1.2; NGA's EGM96 test points). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hypsolev/hypsolev.h"

#define assert_near(a, b, tol) assert_true(fabs((a) - (b)) <= (tol))

/* GeodSolve -i -p 6 (GeographicLib 2.1.2): JFK to LHR, the GeodSolve
 * manual's example, 5551759.400319 m; a short pair in the Alps and one in
 * the southern hemisphere. */
static void test_geodesic(void **state)
{
    (void)state;
    assert_near(hyp_geo_distance_m(40.6, -73.8, 51.6, -0.5), 5551759.400319, 1e-5);
    assert_near(hyp_geo_distance_m(46.8, 9.9, 46.81, 9.92), 1888.506551, 1e-6);
    assert_near(hyp_geo_distance_m(-30, 140, -31, 141), 146647.199419, 1e-5);
    assert_true(isnan(hyp_geo_distance_m(91, 0, 0, 0)));
}

/* EGM96 undulations at the test points NGA distributed with the EGM96
 * interpolation software (INTPT.DAT / OUTINTPT.DAT; values from memory).
 * Tolerance 0.1 m for PROJ's bilinear interpolation of the 15' grid. */
static void test_egm96(void **state)
{
    (void)state;
    hyp_geo *g;
    hyp_error err;
    assert_int_equal(hyp_geo_open(&g, &err), HYP_OK);
    if (hyp_geo_enable_geoid(g, &err) != HYP_OK) {
        print_message("%s\n", err.message);
        fail();
    }
    static const struct { double lat, lon, n; } pts[] = {
        {38.6281550, 269.7791550, -31.628}, {-14.6212170, 305.0211140, -2.969},
        {46.8743190, 102.4487290, -43.575}, {-23.6174460, 133.8747120, 15.871},
        {38.6254730, 359.9995000, 50.066},  {-0.4667440, 0.0023000, 17.329},
    };
    for (size_t i = 0; i < sizeof pts / sizeof pts[0]; i++) {
        double lon = pts[i].lon > 180 ? pts[i].lon - 360 : pts[i].lon;
        double n = hyp_geo_undulation_m(g, pts[i].lat, lon);
        print_message("EGM96 at %.4f %.4f: %.3f m (NGA %.3f)\n", pts[i].lat, lon, n, pts[i].n);
        assert_near(n, pts[i].n, 0.1);
    }
    hyp_geo_close(g);
}

/* UTM against GeoConvert -u -s -p 3 (standard zones, GeographicLib 2.1.2). */
static void test_utm(void **state)
{
    (void)state;
    hyp_geo *g;
    hyp_error err;
    char name[256];
    double e, n;
    assert_int_equal(hyp_geo_open(&g, &err), HYP_OK);
    assert_int_equal(hyp_geo_set_crs(g, "utm", 45, 9, name, sizeof name, &err), HYP_OK);
    assert_non_null(strstr(name, "32N"));
    assert_int_equal(hyp_geo_project(g, 45, 9, &e, &n), 0);
    assert_near(e, 500000.000, 0.001);
    assert_near(n, 4982950.400, 0.001);
    assert_int_equal(hyp_geo_set_crs(g, "utm", -33.9, 18.4, name, sizeof name, &err), HYP_OK);
    assert_int_equal(hyp_geo_project(g, -33.9, 18.4, &e, &n), 0);
    assert_near(e, 259583.222, 0.001);
    assert_near(n, 6245888.045, 0.001);
    /* south-west Norway lies in zone 32 by the standard exception */
    assert_int_equal(hyp_geo_set_crs(g, "utm", 60.1, 5.3, name, sizeof name, &err), HYP_OK);
    assert_non_null(strstr(name, "32N"));
    assert_int_equal(hyp_geo_project(g, 60.1, 5.3, &e, &n), 0);
    assert_near(e, 294317.676, 0.001);
    assert_near(n, 6668308.278, 0.001);
    /* a PROJ string (without +type=crs) and WKT name the same CRS */
    assert_int_equal(hyp_geo_set_crs(g, "+proj=utm +zone=32 +datum=WGS84", 0, 0, name, sizeof name, &err), HYP_OK);
    assert_int_equal(hyp_geo_project(g, 45, 9, &e, &n), 0);
    assert_near(e, 500000.000, 0.001);
    assert_near(n, 4982950.400, 0.001);
    /* refusals */
    assert_int_equal(hyp_geo_set_crs(g, "EPSG:4326", 45, 9, name, sizeof name, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "not a projected CRS"));
    assert_int_equal(hyp_geo_set_crs(g, "EPSG:999999", 45, 9, name, sizeof name, &err), HYP_ERR_USAGE);
    hyp_geo_close(g);
}

/* Heights between references: h_ell = H + N; a point's own geoidheight
 * wins over EGM96. */
static void test_track_heights(void **state)
{
    (void)state;
    hyp_geo *g;
    hyp_error err;
    assert_int_equal(hyp_geo_open(&g, &err), HYP_OK);
    hyp_series s;
    hyp_series_init(&s);
    hyp_series_push(&s, 1.8e9, 90000, NAN, NAN, 38.6281550, -90.2208450, 100.0, 1, HYP_SAMPLE_OK);
    hyp_series_push(&s, 1.8e9 + 1, 90000, NAN, NAN, 38.6281550, -90.2208450, 100.0, 2, HYP_SAMPLE_OK);
    double gh[2] = {NAN, -30.0};
    float out[2];
    assert_int_equal(hyp_track_heights(g, &s, gh, HYP_VREF_GEOID, HYP_VREF_ELLIPSOID, out, &err), HYP_OK);
    assert_near(out[0], 100.0 - 31.628, 0.1);
    assert_near(out[1], 70.0, 1e-5);   /* stored as float */
    double h[2] = {100.0, NAN};
    assert_int_equal(hyp_heights_convert(g, &s, h, HYP_VREF_ELLIPSOID, HYP_VREF_GEOID, &err), HYP_OK);
    assert_near(h[0], 131.628, 0.1);
    assert_true(isnan(h[1]));
    hyp_series_free(&s);
    hyp_geo_close(g);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_geodesic),
        cmocka_unit_test(test_egm96),
        cmocka_unit_test(test_utm),
        cmocka_unit_test(test_track_heights),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
