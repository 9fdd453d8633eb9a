/* test_atmosphere.c - physics kernels against published references. Each
 * check value names its source; "from memory" marks values recalled rather
 * than read from the publication while writing the test. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>

#include "hypsolev/atmosphere.h"

#define assert_near(a, b, tol) assert_true(fabs((a) - (b)) <= (tol))
#define assert_rel(a, b, rel) assert_true(fabs((a) - (b)) <= (rel) * fabs(b))

/* US Standard Atmosphere 1976 (NOAA-S/T 76-1562), Table I (geometric
 * altitude), values from memory, 5 significant digits as tabulated. */
static void test_ussa_geometric(void **state)
{
    (void)state;
    static const struct { double z_m, t_k, p_pa; } tab[] = {
        {0.0, 288.150, 101325.0},
        {1000.0, 281.651, 89876.0},
        {2000.0, 275.154, 79501.0},
        {3000.0, 268.659, 70121.0},
        {5000.0, 255.676, 54048.0},
        {10000.0, 223.252, 26500.0},
        {20000.0, 216.650, 5529.3},
    };
    for (size_t i = 0; i < sizeof tab / sizeof tab[0]; i++) {
        double h = hyp_geopotential_from_geometric_m(tab[i].z_m);
        assert_near(hyp_isa_temperature_k(h), tab[i].t_k, 0.0015);
        /* half a unit in the 5th digit: at most 0.5 / 26500 = 1.9e-5 */
        assert_rel(hyp_isa_pressure_pa(h), tab[i].p_pa, 2e-5);
    }
}

/* USSA 1976 Table 4: base pressures of the layers at 11, 20 and 32 km'
 * geopotential, from memory. */
static void test_ussa_layer_bases(void **state)
{
    (void)state;
    assert_near(hyp_isa_pressure_pa(11000.0), 22632.06, 0.01);
    assert_near(hyp_isa_pressure_pa(20000.0), 5474.889, 0.001);
    assert_near(hyp_isa_pressure_pa(32000.0), 868.0187, 0.0001);
    assert_near(hyp_isa_temperature_k(11000.0), 216.65, 1e-9);
    assert_near(hyp_isa_temperature_k(32000.0), 228.65, 1e-9);
    /* USSA 1976 eq. 18 with r0 = 6356766 m: z = 1000 m is H = 999.8427 m'. */
    assert_near(hyp_geopotential_from_geometric_m(1000.0), 999.8427, 1e-4);
    assert_near(hyp_geometric_from_geopotential_m(999.8427), 1000.0, 1e-3);
    /* outside the model: NaN */
    assert_true(isnan(hyp_isa_pressure_pa(90000.0)));
    assert_true(isnan(hyp_isa_height_gp_m(-1.0)));
}

/* The inverse must undo the forward law in every layer (a property, not a
 * published value). */
static void test_ussa_inverse(void **state)
{
    (void)state;
    for (double h = -4000.0; h <= 84000.0; h += 1234.5)
        assert_near(hyp_isa_height_gp_m(hyp_isa_pressure_pa(h)), h, 1e-6 * (1 + fabs(h)));
}

/* Barometric altitude against ICAO Doc 7488/3 (Manual of the ICAO Standard
 * Atmosphere), Table 1, indexed by GEOPOTENTIAL altitude (m'), pressures
 * to 6 significant digits, from memory: 1000 m' 898.746 hPa, 2000 m'
 * 794.952 hPa, 5000 m' 540.199 hPa, 11000 m' 226.321 hPa (the same law
 * as USSA 1976, NOAA-S/T 76-1562, whose Table I lists the same pressures
 * against geometric altitude). The tolerance is half a unit of the last
 * digit tabulated. */
static void test_baro_altitude_table(void **state)
{
    (void)state;
    static const struct { double h_m, p_pa; } tab[] = {
        {1000.0, 89874.6}, {2000.0, 79495.2}, {5000.0, 54019.9}, {11000.0, 22632.1},
    };
    for (size_t i = 0; i < sizeof tab / sizeof tab[0]; i++) {
        assert_near(hyp_baro_altitude_to_pressure_pa(tab[i].h_m, HYP_P0_PA), tab[i].p_pa, 0.05);
        /* 0.05 Pa is 0.014 m at 11 km' (air density 0.365 kg/m^3 there,
         * the same table: dh = dp / (rho g0)) */
        assert_near(hyp_baro_altitude_from_pressure_m(tab[i].p_pa, HYP_P0_PA), tab[i].h_m, 0.015);
    }
    /* A reference 10 hPa low scales every pressure by 1003.25 / 1013.25
     * (ICAO Doc 7488 altimeter law, see atmosphere.h): by hand, 1000 m'
     * set to 1003.25 hPa is 89874.57 * 100325 / 101325 = 88987.58 Pa. */
    assert_near(hyp_baro_altitude_to_pressure_pa(1000.0, 100325.0), 88987.58, 0.01);
    /* ... and hyp_station_from_qnh_pa, the same law written the other way
     * (its own formula, its own code), agrees in the troposphere. */
    for (double h = -400.0; h <= 9000.0; h += 731.0)
        assert_rel(hyp_baro_altitude_to_pressure_pa(h, 98765.0), hyp_station_from_qnh_pa(98765.0, h), 1e-12);
    /* outside its domain: NaN */
    assert_true(isnan(hyp_baro_altitude_to_pressure_pa(25000.0, HYP_P0_PA)));
    assert_true(isnan(hyp_baro_altitude_to_pressure_pa(1000.0, 5000.0)));
    assert_true(isnan(hyp_baro_altitude_from_pressure_m(1000.0, HYP_P0_PA)));   /* 31 km' */
    assert_true(isnan(hyp_baro_altitude_from_pressure_m(NAN, HYP_P0_PA)));
}

/* Round trips in both layers used (a property, not a published value). */
static void test_baro_altitude_round_trip(void **state)
{
    (void)state;
    for (double ref = 95000.0; ref <= 105000.0; ref += 2500.0)
        for (double h = -500.0; h <= 20000.0; h += 37.3) {
            double p = hyp_baro_altitude_to_pressure_pa(h, ref);
            assert_near(hyp_baro_altitude_from_pressure_m(p, ref), h, 1e-6);
        }
}

/* Common practice, no source: near sea level about 12 Pa per metre, and
 * 101325 Pa at sea level becomes about 100129 Pa at 100 m (1196 Pa less). */
static void test_rule_of_thumb(void **state)
{
    (void)state;
    double p100 = hyp_isa_pressure_pa(100.0);
    assert_near(p100, 100129.0, 2.0);
    assert_near((HYP_P0_PA - p100) / 100.0, 12.0, 0.1);
}

/* NIMA TR8350.2 (3rd ed.), Table 3.4: WGS84 normal gravity at the equator
 * 9.7803253359 and at the poles 9.8321849378 m/s^2. At 45 deg: a hand
 * calculation with eq. 4-1 and the Table 3.1/3.3 constants gives
 * 9.80619777 m/s^2; the GRS80 value 9.80619920 (Moritz 1980, from memory)
 * lies 1.4e-6 higher, the difference of the two ellipsoids' equatorial
 * gravity (9.7803267715 - 9.7803253359), which the check also covers. */
static void test_gravity(void **state)
{
    (void)state;
    assert_near(hyp_gravity_normal_m_s2(0.0), 9.7803253359, 1e-9);
    assert_near(hyp_gravity_normal_m_s2(90.0), 9.8321849378, 2e-9);
    assert_near(hyp_gravity_normal_m_s2(-90.0), 9.8321849378, 2e-9);
    assert_near(hyp_gravity_normal_m_s2(45.0), 9.80619777, 1e-8);
    assert_near(hyp_gravity_normal_m_s2(45.0) + (9.7803267715 - 9.7803253359), 9.80619920, 2e-7);
    /* Free-air gradient about -3.086e-6 s^-2 (Heiskanen and Moritz,
     * Physical Geodesy, 1967, eq. 2-124; common figure). */
    double grad = (hyp_gravity_at_height_m_s2(45.0, 1000.0) - hyp_gravity_at_height_m_s2(45.0, 0.0)) / 1000.0;
    assert_near(grad, -3.086e-6, 0.005e-6);
    assert_true(isnan(hyp_gravity_normal_m_s2(91.0)));
}

/* Saturation vapour pressure over water. Reference values: CRC Handbook of
 * Chemistry and Physics, "Vapor pressure of water from 0 to 370 degC"
 * (from memory): 0.6113 kPa at 0, 1.2282 at 10, 2.3393 at 20, 4.2470 at 30,
 * 7.3849 at 40 degC. The WMO Magnus form agrees within 0.4 % (WMO-No. 8
 * states it for meteorological use, not as an exact fit). */
static void test_svp(void **state)
{
    (void)state;
    static const struct { double t_c, e_pa; } tab[] = {
        {0, 611.3}, {10, 1228.2}, {20, 2339.3}, {30, 4247.0}, {40, 7384.9}};
    for (size_t i = 0; i < 5; i++)
        assert_rel(hyp_svp_water_pa(tab[i].t_c + 273.15), tab[i].e_pa, 0.004);
    /* WMO-No. 8 Annex 4.B: e_w(0 degC) = 6.112 hPa exactly by the formula */
    assert_near(hyp_svp_water_pa(273.15), 611.2, 1e-9);
    /* f(p) at 1000 hPa: 1.0016 + 0.00315 - 0.000074 (Annex 4.B) */
    assert_near(hyp_svp_enhancement(100000.0), 1.004676, 1e-9);
    assert_true(isnan(hyp_svp_water_pa(273.15 + 70.0)));
}

/* Virtual temperature at 20 degC, 50 %, 1000 hPa. Hand calculation with
 * WMO-No. 8 Annex 4.B: e = 0.5 * 1.004676 * 2332.5 Pa = 1171.7 Pa, mixing
 * ratio r = 0.62198 e / (p - e) = 0.0073738, Tv = 294.454 K. Cross-check
 * with the textbook approximation Tv = T (1 + 0.61 r) (Wallace and Hobbs,
 * 2nd ed., eq. 3.60): 294.469 K, agreeing within 0.03 K. */
static void test_virtual_temperature(void **state)
{
    (void)state;
    double tv = hyp_virtual_temperature_k(293.15, 50.0, 100000.0);
    assert_near(tv, 294.454, 0.002);
    assert_near(tv, 293.15 * (1 + 0.61 * 0.0073738), 0.03);
    assert_near(hyp_virtual_temperature_k(250.0, 0.0, 80000.0), 250.0, 1e-12);
    assert_true(isnan(hyp_virtual_temperature_k(293.15, 120.0, 100000.0)));
}

/* The hypsometric equation must reproduce the USSA 1976 table between two
 * levels: geopotential difference from the tabulated pressures and
 * temperatures (Table I, from memory) against the geopotential heights of
 * eq. 18. The table's 5-digit pressures limit this to about 4 cm. */
static void test_hypsometric_reproduces_table(void **state)
{
    (void)state;
    double tv = hyp_layer_mean_temperature_k(288.150, 281.651);
    double dh = hyp_hypsometric_dphi_j_kg(101325.0, 89876.0, tv) / HYP_G0_M_S2;
    assert_near(dh, hyp_geopotential_from_geometric_m(1000.0), 0.05);
    tv = hyp_layer_mean_temperature_k(281.651, 268.659);
    dh = hyp_hypsometric_dphi_j_kg(89876.0, 70121.0, tv) / HYP_G0_M_S2;
    assert_near(dh, hyp_geopotential_from_geometric_m(3000.0) - hyp_geopotential_from_geometric_m(1000.0), 0.08);
    /* The logarithmic mean is what makes a constant lapse rate exact: the
     * arithmetic mean is larger and makes the layer 2000 m * x^2 / 12 = 0.36 m
     * too thick (x = dT / T = 0.047), which the table resolves. */
    double ar = hyp_hypsometric_dphi_j_kg(89876.0, 70121.0, 0.5 * (281.651 + 268.659)) / HYP_G0_M_S2;
    assert_true(ar - dh > 0.25 && ar - dh < 0.45);
}

/* Geometric height difference from a geopotential difference with normal
 * gravity: 1000 m' of standard geopotential at 45 deg from sea level is
 * 9806.65 / g(45 deg, 500 m) = 9806.65 / (9.8061978 - 3.086e-6 * 500)
 * = 9806.65 / 9.8046548 = 1000.2035 m (hand calculation with the values of
 * test_gravity; the mid-layer gravity is exact for a linear g). */
static void test_height_difference(void **state)
{
    (void)state;
    double g_mid = hyp_gravity_at_height_m_s2(45.0, 500.0);
    double dz = hyp_height_difference_m(1000.0 * HYP_G0_M_S2, 0.0, 45.0);
    assert_near(dz, 1000.0 * HYP_G0_M_S2 / g_mid, 1e-3);
    assert_near(dz, 1000.2035, 0.002);
}

/* QNH: ICAO Doc 7488 - a station at 1000 m with QNH 1013.25 hPa reads the
 * standard atmosphere's pressure at 1000 m', 898.746 hPa (USSA 1976
 * geopotential table, from memory). Common practice, no source: near sea
 * level 1 hPa is about 27 ft (8.2 m). */
static void test_qnh(void **state)
{
    (void)state;
    assert_near(hyp_station_from_qnh_pa(101325.0, 1000.0), 89874.6, 0.5);
    assert_near(hyp_qnh_from_station_pa(hyp_station_from_qnh_pa(100500.0, 1234.0), 1234.0), 100500.0, 1e-6);
    double m_per_hpa = 10.0 / ((hyp_station_from_qnh_pa(101325.0, 0.0) - hyp_station_from_qnh_pa(101325.0, 10.0)) / 100.0);
    assert_near(m_per_hpa, 8.2, 0.15);
    assert_true(isnan(hyp_station_from_qnh_pa(101325.0, 20000.0)));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_ussa_geometric),
        cmocka_unit_test(test_ussa_layer_bases),
        cmocka_unit_test(test_ussa_inverse),
        cmocka_unit_test(test_rule_of_thumb),
        cmocka_unit_test(test_gravity),
        cmocka_unit_test(test_svp),
        cmocka_unit_test(test_virtual_temperature),
        cmocka_unit_test(test_hypsometric_reproduces_table),
        cmocka_unit_test(test_baro_altitude_table),
        cmocka_unit_test(test_baro_altitude_round_trip),
        cmocka_unit_test(test_height_difference),
        cmocka_unit_test(test_qnh),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
