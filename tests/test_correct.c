/* test_correct.c - the single-base correction: the standard atmosphere's
 * table reproduced end to end through the core, and the behaviour of clock
 * offsets, co-location drift and base gaps on constructed series. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <string.h>

#include "hypsolev/hypsolev.h"

#define T0 1781766000.0   /* 2026-06-18T07:00:00Z */

static void push(hyp_series *s, double t, double p, double tk, double lat, double lon)
{
    assert_int_equal(hyp_series_push(s, t, p, tk, 0.0, lat, lon, NAN, 1, HYP_SAMPLE_OK), HYP_OK);
}

/* US Standard Atmosphere 1976, Table I (geometric), from memory: 101325 Pa
 * at 0 m and 288.15 K; 89876 Pa at 1000 m, 79501 at 2000 m, 70121 at 3000 m.
 * A dry base at sea level with the standard 15 degC and lapse rate, and a
 * rover reading those pressures, must come out at those heights. USSA's
 * geopotential uses g0 = 9.80665 m/s^2, WGS84 normal gravity's value at
 * latitude 45.5425 deg (USSA 1976, section 1.2.2), where the two height
 * scales agree; the 5-digit pressures allow about 5 cm per 1000 m. */
static void test_reproduces_ussa(void **state)
{
    (void)state;
    const double lat = 45.5425, lon = 0.0;
    hyp_series base, rover;
    hyp_series_init(&base);
    hyp_series_init(&rover);
    for (int i = 0; i < 10; i++)
        push(&base, T0 + 60.0 * i, 101325.0, 288.15, lat, lon);
    static const double p[] = {89876.0, 79501.0, 70121.0}, z[] = {1000.0, 2000.0, 3000.0};
    for (int i = 0; i < 3; i++)
        push(&rover, T0 + 60.0 * (i + 1), p[i], NAN, lat, lon);
    hyp_base b = {.log = &base, .name = "base", .height_m = 0.0, .lat_deg = NAN, .lon_deg = NAN};
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    o.offset_pa = 0.0;
    o.default_rh_pct = 0.0;
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    assert_int_equal(hyp_correct(&rover, &b, 1, &o, &r, NULL, &err), HYP_OK);
    for (int i = 0; i < 3; i++) {
        print_message("USSA %.0f m: corrected %.3f m\n", z[i], r.height_m[i]);
        assert_true(fabs(r.height_m[i] - z[i]) < 0.06 * z[i] / 1000.0 + 0.02);
    }
    hyp_correct_result_free(&r);
    hyp_series_free(&base);
    hyp_series_free(&rover);
}

/* A base clock 90 s fast in weather changing 3 hPa/h: uncorrected, a rover
 * standing beside the base is off by 90 s * 0.0833 Pa/s = 7.5 Pa, about
 * 0.6 m; with --base-clock-offset 90 the error vanishes. */
static void test_base_clock_offset(void **state)
{
    (void)state;
    const double rate = -300.0 / 3600.0;   /* Pa/s */
    hyp_series base, rover;
    hyp_series_init(&base);
    hyp_series_init(&rover);
    for (int i = 0; i < 200; i++) {
        double true_t = T0 + 30.0 * i - 1800.0;
        push(&base, true_t + 90.0, 90000.0 + rate * (true_t - T0), 285.0, 46.8, 9.9);
    }
    for (int i = 0; i < 100; i++) {
        double t = T0 + 10.0 * i;
        push(&rover, t, 90000.0 + rate * (t - T0), 285.0, 46.8, 9.9);
    }
    hyp_base b = {.log = &base, .name = "base", .height_m = 1000.0, .lat_deg = NAN, .lon_deg = NAN};
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    o.offset_pa = 0.0;
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    assert_int_equal(hyp_correct(&rover, &b, 1, &o, &r, NULL, &err), HYP_OK);
    double dz = (90.0 * -rate) / (90000.0 * 9.806 / (287.05 * 285.0));   /* dp / (rho g) */
    assert_true(fabs(r.height_m[50] - 1000.0 - dz) < 0.02);
    b.clock_offset_s = 90.0;
    assert_int_equal(hyp_correct(&rover, &b, 1, &o, &r, NULL, &err), HYP_OK);
    assert_true(fabs(r.height_m[50] - 1000.0) < 0.005);
    hyp_correct_result_free(&r);
    hyp_series_free(&base);
    hyp_series_free(&rover);
}

/* Co-location at the start and the end: an offset drifting linearly from
 * +40 Pa to +70 Pa is recovered, so heights in between are unbiased; a base
 * gap longer than max_gap and times outside the base log get no height. */
static void test_drift_gap_outside(void **state)
{
    (void)state;
    hyp_series base, rover;
    hyp_series_init(&base);
    hyp_series_init(&rover);
    for (int i = 0; i < 500; i++) {
        double t = T0 - 600.0 + 30.0 * i;
        if (t > T0 + 5000.0 && t < T0 + 5400.0)
            continue;   /* a 420 s gap */
        push(&base, t, 90000.0, 285.0, 46.8, 9.9);
    }
    for (int i = 0; i < 1300; i++) {
        double t = T0 + 10.0 * i, frac = (t - T0) / 12990.0;
        int at_base = i < 60 || i >= 1240;
        double lat = at_base ? 46.8 : 46.81;
        push(&rover, t, 90000.0 + 40.0 + 30.0 * frac, 285.0, lat, 9.9);
    }
    push(&rover, T0 + 20000.0, 90000.0, 285.0, 46.81, 9.9);   /* after the base log */
    hyp_base b = {.log = &base, .name = "base", .height_m = 500.0, .lat_deg = 46.8, .lon_deg = 9.9};
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    hyp_msgs m;
    hyp_msgs_init(&m);
    assert_int_equal(hyp_correct(&rover, &b, 1, NULL, &r, &m, &err), HYP_OK);
    assert_int_equal(r.n_calibs, 2);
    assert_int_equal(r.drift.kind, HYP_DRIFT_LINEAR);
    for (size_t i = 0; i < rover.count - 1; i++) {
        double t = rover.time_s[i];
        if (t > T0 + 4980.0 && t < T0 + 5400.0) {
            assert_int_equal(r.status[i], HYP_PT_BASE_GAP);
            continue;
        }
        assert_int_equal(r.status[i], HYP_PT_OK);
        assert_true(fabs(r.height_m[i] - 500.0) < 0.01);
    }
    assert_int_equal(r.status[rover.count - 1], HYP_PT_OUTSIDE_BASE);
    hyp_correct_result_free(&r);
    hyp_series_free(&base);
    hyp_series_free(&rover);
    hyp_msgs_free(&m);
}

/* The two-base proportion h = hL + (hU - hL) ln(pL/p) / ln(pL/pU), by hand
 * for hL = 500 m at 95000 Pa, hU = 1500 m at 85000 Pa, p = 90000 Pa:
 * ln(95/90) = 0.0540672, ln(95/85) = 0.1112256, ratio 0.4861040, so
 * h = 500 + 486.104 = 986.104 m (hand calculation of the published
 * two-base relation). */
static void test_two_base_proportion(void **state)
{
    (void)state;
    hyp_series lo, hi, rover;
    hyp_series_init(&lo);
    hyp_series_init(&hi);
    hyp_series_init(&rover);
    for (int i = 0; i < 20; i++) {
        push(&lo, T0 - 300 + 60.0 * i, 95000.0, 288.0, 45.0, 7.0);
        push(&hi, T0 - 300 + 60.0 * i, 85000.0, 282.0, 45.01, 7.0);
    }
    for (int i = 0; i < 5; i++)
        push(&rover, T0 + 60.0 * i, 90000.0, NAN, 45.005, 7.0);
    hyp_base b[2];
    hyp_base_init(&b[0], &lo, "low", 500.0);
    hyp_base_init(&b[1], &hi, "high", 1500.0);
    b[0].offset_pa = b[1].offset_pa = 0.0;   /* compared beforehand */
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    o.offset_pa = 0.0;
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    assert_int_equal(hyp_correct(&rover, b, 2, &o, &r, NULL, &err), HYP_OK);
    assert_int_equal(r.method_used, HYP_METHOD_TWO_BASE);
    print_message("two-base: %.4f m (hand 986.1040)\n", r.height_m[2]);
    assert_true(fabs(r.height_m[2] - 986.1040) < 1e-3);
    assert_true(r.bases_compared);
    /* the column the bases imply: g dh / (Rd ln(pL/pU)) with g at 1000 m */
    double g = hyp_gravity_at_height_m_s2(45.005, 1000.0);
    assert_true(fabs(r.implied_tcol_k - g * 1000.0 / (HYP_RD_J_KG_K * log(95000.0 / 85000.0))) < 1e-6);
    hyp_correct_result_free(&r);
    hyp_series_free(&lo);
    hyp_series_free(&hi);
    hyp_series_free(&rover);
}

/* The compact sample storage gives back what was pushed: file lines
 * (small steps, steps of 255 and more, a line smaller than the one before,
 * every 64th sample stored in full), positions to 1e-7 degree, and the
 * markers for no position and for one beyond the storage's range. */
static void test_series_storage(void **state)
{
    (void)state;
    hyp_series s;
    hyp_series_init(&s);
    uint32_t lines[1000], line = 3;
    for (int i = 0; i < 1000; i++) {
        line += i % 97 == 5 ? 1000 : i % 131 == 7 ? 255 : i % 10 == 3 ? 254 : (uint32_t)(i % 3);
        if (i == 500)
            line -= 40;   /* not from a reader, but stored all the same */
        lines[i] = line;
        double lat = i == 10 ? NAN : i == 11 ? 300.0 : 46.1234567 + 1e-7 * i;
        assert_int_equal(hyp_series_push(&s, 1.8e9 + i, 90000, NAN, NAN, lat, -120.7654321, 800, line, HYP_SAMPLE_OK), HYP_OK);
    }
    uint32_t prev = 0;
    for (size_t i = 0; i < 1000; i++) {
        assert_int_equal(hyp_series_line(&s, i), lines[i]);
        prev = hyp_series_line_next(&s, i, prev);
        assert_int_equal(prev, lines[i]);
    }
    assert_true(fabs(hyp_series_lat(&s, 0) - 46.1234567) < 1e-12 && fabs(hyp_series_lon(&s, 0) + 120.7654321) < 1e-12);
    assert_true(fabs(hyp_series_lat(&s, 999) - (46.1234567 + 999e-7)) < 1e-12);
    assert_true(isnan(hyp_series_lat(&s, 10)) && s.lat_e7[10] == HYP_NO_POSITION);
    assert_true(isnan(hyp_series_lat(&s, 11)) && s.lat_e7[11] == HYP_BAD_POSITION);
    hyp_series_shrink(&s);
    assert_int_equal(hyp_series_line(&s, 999), lines[999]);
    hyp_series_free(&s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_reproduces_ussa),
        cmocka_unit_test(test_base_clock_offset),
        cmocka_unit_test(test_drift_gap_outside),
        cmocka_unit_test(test_two_base_proportion),
        cmocka_unit_test(test_series_storage),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
