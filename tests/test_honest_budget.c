/* test_honest_budget.c - the budget's terms for honest uncertainty against
 * the sources they cite and hand calculations written out beside them:
 * Student's t quantile against the tables, the variance of a correlated
 * mean against the autoregressive formula, the moving pressure pattern
 * read off a base log with a pressure jump, the column term about the
 * level's height, and the upper base's offset from both bases'
 * thermometers. */
#define _DEFAULT_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hypsolev/hypsolev.h"
#include "serial_var.h"

#define T0 1781766000.0
#define assert_near(a, b, tol) assert_true(fabs((a) - (b)) <= (tol))

/* Student's t, 97.5 % (two-sided 95 %), against the table of critical
 * values in the NIST/SEMATECH e-Handbook of Statistical Methods, section
 * 1.3.6.7.2: nu = 1: 12.706, 2: 4.303, 3: 3.182, 4: 2.776, 5: 2.571,
 * 10: 2.228, 30: 2.042, 100: 1.984; infinity: 1.960. Exact formulas for 1
 * and 2; the expansion (Abramowitz and Stegun 26.7.5) within 0.001 from 3. */
static void test_t_quantile(void **state)
{
    (void)state;
    static const double nu[8] = {1, 2, 3, 4, 5, 10, 30, 100}, t[8] = {12.706, 4.303, 3.182, 2.776, 2.571, 2.228, 2.042, 1.984};
    for (int k = 0; k < 8; k++) {
        print_message("t(%.0f) = %.4f (table %.3f)\n", nu[k], hyp__t975(nu[k]), t[k]);
        assert_near(hyp__t975(nu[k]), t[k], 0.001);
    }
    assert_near(hyp__t975(1e9), 1.960, 0.0005);
    assert_near(hyp__t975(0.3), 12.706, 0.0006);   /* below 1: taken as 1 */
    assert_true(hyp__t975(2.5) < hyp__t975(2.0) && hyp__t975(2.5) > hyp__t975(3.0));
    assert_true(isnan(hyp__t975(NAN)));
}

static uint64_t rng = 0x9E3779B97F4A7C15ULL;
static double gauss(void)
{
    double u[2];
    for (int k = 0; k < 2; k++) {
        rng ^= rng >> 12, rng ^= rng << 25, rng ^= rng >> 27;
        u[k] = (double)((rng * 2685821657736338717ULL) >> 11) / 9007199254740992.0;
    }
    return sqrt(-2.0 * log(u[0] + 1e-300)) * cos(6.283185307179586 * u[1]);
}

/* The variance of a mean of correlated values over s^2 / n. White noise:
 * 1. An AR(1) series with lag-one correlation phi: (1 + phi) / (1 - phi)
 * for a long series (the variance of a mean of an AR(1) series, e.g.
 * Wilks, Statistical Methods in the Atmospheric Sciences, 3rd ed., eq.
 * 5.12, as docs/methods.md cites it for the windows' standard error),
 * 40.0 at phi = exp(-1/20); white noise of equal variance added halves the
 * AR part's share: (1 + 40.0) / 2 = 20.5. The estimate from one series of
 * 40 000 values (2000 correlation times) is within 20 %; the correlation
 * time it reports (20 samples; the series is judged in bins of 40) within
 * a factor of two. */
static void test_mean_var_factor(void **state)
{
    (void)state;
    enum { N = 40000 };
    double *x = malloc(N * sizeof *x), *y = malloc(N * sizeof *y), phi = exp(-1.0 / 20.0), a = 0.0, tau;
    assert_non_null(x);
    assert_non_null(y);
    for (int i = 0; i < N; i++) {
        a = phi * a + sqrt(1.0 - phi * phi) * gauss();
        x[i] = gauss();
        y[i] = a;
    }
    double fw = hyp__mean_var_factor(x, N, &tau);
    print_message("white: %.2f (1), correlation %.1f samples\n", fw, tau);
    assert_true(fw >= 1.0 && fw < 1.3);
    double want = (1.0 + phi) / (1.0 - phi), fa = hyp__mean_var_factor(y, N, &tau);
    print_message("AR(1): %.1f (%.1f), correlation %.1f samples (20)\n", fa, want, tau);
    assert_near(fa, want, 0.2 * want);
    assert_true(tau > 10.0 && tau < 40.0);
    for (int i = 0; i < N; i++)
        y[i] += x[i];
    double fm = hyp__mean_var_factor(y, N, &tau);
    print_message("AR(1) + white: %.1f (%.1f)\n", fm, 0.5 * (1.0 + want));
    assert_near(fm, 0.5 * (1.0 + want), 0.2 * 0.5 * (1.0 + want));
    assert_true(isnan(hyp__mean_var_factor(x, 11, NULL)));
    free(x);
    free(y);
}

static void push(hyp_series *s, double t, double p, double lat, double lon)
{
    assert_int_equal(hyp_series_push(s, t, p, 285.0, 0.0, lat, lon, NAN, 1, HYP_SAMPLE_OK), HYP_OK);
}

/* A pressure jump of +300 Pa at the base (between two samples 30 s apart)
 * and a rover 6000 m north of it at the same height, the offset given (no
 * calibration: nothing absorbed). A pattern moving at v = 20 km/h
 * (5.5556 m/s) crosses the 6000 m in 1080 s; over eight directions the
 * rover sees what the base saw at t + 1080 (-cos theta) s:
 * 1080 s, 764 s, 0, -764 s, -1080 s, .... With the jump 500 s after the
 * rover's time, three directions (135, 180, 225 degrees) put the rover
 * past it: mean square 3/8 x 300^2 = 33750 Pa^2, less 2 x 0.5^2 (the base
 * noise estimate's floor, in two pressures read): 33749.5; the static
 * gradient 1 hPa/100 km over 6000 m adds 6^2: horiz = c sqrt(33785.5) =
 * c x 183.81 Pa (c = Rd Tv / (g p), 0.0927 m/Pa here: 17.04 m). With the
 * jump 1500 s ahead, beyond every direction's reach: c x 6 Pa. */
static void test_moving_pattern(void **state)
{
    (void)state;
    hyp_series base, rover;
    hyp_series_init(&base);
    hyp_series_init(&rover);
    double jump = T0 + 3015.0;   /* between the base samples at T0 + 3000 and T0 + 3030 */
    for (int i = 0; i < 400; i++) {
        double t = T0 - 3000 + 30.0 * i;
        push(&base, t, 90000.0 + (t > jump ? 300.0 : 0.0), 45.0, 7.0);
    }
    double lat1 = 45.0 + 6000.0 / 111131.745;
    for (int i = 0; i < 400; i++)
        push(&rover, T0 + 10.0 * i, 90000.0, lat1, 7.0);   /* 90000 Pa throughout: a height change is not the point */
    double d = hyp_geo_distance_m(45.0, 7.0, lat1, 7.0);
    hyp_base b = {.log = &base, .name = "base", .height_m = 0.0, .lat_deg = 45.0, .lon_deg = 7.0};
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    o.offset_pa = 0.0;
    o.default_rh_pct = 0.0;
    o.lapse_k_per_m = 0.0;
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    hyp_status st = hyp_correct(&rover, &b, 1, &o, &r, NULL, &err);
    if (st)
        print_message("%s\n", err.message);
    assert_int_equal(st, HYP_OK);
    assert_near(r.base_noise_pa, 0.5, 1e-9);   /* a clean log: the estimate's floor */
    size_t near = (size_t)((jump - 500.0 - T0) / 10.0), far = (size_t)((jump - 1500.0 - T0) / 10.0);
    hyp_point_detail pn, pf;
    assert_int_equal(hyp_correct_point(&r, near, &pn), HYP_OK);
    assert_int_equal(hyp_correct_point(&r, far, &pf), HYP_OK);
    double c = HYP_RD_J_KG_K * pn.tcol_k / (hyp_gravity_at_height_m_s2(45.0, 0.0) * 90000.0);
    double g = 0.001 * d, want_near = c * sqrt(g * g + 3.0 / 8.0 * 300.0 * 300.0 - 0.5), want_far = c * g;
    print_message("d = %.1f m, c = %.5f m/Pa: horiz %.3f m (%.3f) 500 s before the jump, %.3f m (%.3f) 1500 s before\n", d,
                  c, pn.budget_m[HYP_B_HORIZ], want_near, pf.budget_m[HYP_B_HORIZ], want_far);
    assert_near(d, 6000.0, 1.0);
    assert_near(pn.budget_m[HYP_B_HORIZ], want_near, 1e-3 * want_near);
    assert_near(pn.budget_m[HYP_B_HORIZ], 17.04, 0.05);
    assert_near(pf.budget_m[HYP_B_HORIZ], want_far, 1e-3);
    /* the interpolation term grows with the ten-minute tendency across the
     * jump: 300 Pa / 600 s = 0.5 Pa/s (less noise 2 x 0.5^2 / 600^2: none to
     * speak of): c x 0.5 x 30 / sqrt(12) at a rover time 100 s after it */
    size_t after = (size_t)((jump + 100.0 - T0) / 10.0);
    hyp_point_detail pa;
    assert_int_equal(hyp_correct_point(&r, after, &pa), HYP_OK);
    assert_near(pa.budget_m[HYP_B_INTERP], c * 0.5 * 30.0 / sqrt(12.0), 2e-3);
    hyp_correct_result_free(&r);
    hyp_series_free(&base);
    hyp_series_free(&rover);
}

/* Isothermal dry column at 285 K: p = pb exp(-g dz / (Rd T)). */
static double p_at(double pb, double dz)
{
    return pb * exp(-hyp_gravity_at_height_m_s2(45.0, 0.5 * dz) * dz / (HYP_RD_J_KG_K * 285.0));
}

/* The column term about the level's height: one tie on a benchmark 500 m
 * above the base sets the level there (dz_ref = 500 m, its square
 * 250 000 m^2); 1000 m above the base, with the default priors (0.5 K,
 * 1 K/km):
 *   sqrt((0.5 x (1000 - 500))^2 + (0.001 x (1000^2 - 500^2) / 2)^2) / Tv
 *   = sqrt(250^2 + 375^2) / 285 = 450.69 / 285 = 1.581 m,
 * where the old form, (dz - dz_ref) sqrt(0.5^2 + (0.001 (dz - dz_ref) /
 * 2)^2) / Tv, gave 0.987 m: a lapse-rate error grows with the square of
 * the height, so a level set 500 m up leaves more above it than a level
 * set at the base over the same 500 m. */
static void test_column_about_level(void **state)
{
    (void)state;
    hyp_series base, rover;
    hyp_series_init(&base);
    hyp_series_init(&rover);
    for (int i = 0; i < 200; i++)
        push(&base, T0 - 600 + 30.0 * i, 90000.0, NAN, NAN);
    for (int i = 0; i < 120; i++)   /* 10 minutes on the benchmark, then 10 minutes 1000 m up */
        push(&rover, T0 + 10.0 * i, p_at(90000.0, i < 60 ? 500.0 : 1000.0), NAN, NAN);
    char *nm[1] = {"BM"}, *nt[1] = {""};
    double la[1] = {45.0}, lo[1] = {7.0}, hh[1] = {500.0}, sg[1] = {0.01};
    hyp_benchmarks bm;
    hyp_benchmarks_init(&bm);
    bm.count = 1, bm.name = nm, bm.note = nt, bm.lat_deg = la, bm.lon_deg = lo, bm.height_m = hh, bm.sigma_m = sg;
    hyp_tie_spec tie = {"BM", T0, T0 + 590.0, 1};
    hyp_base b = {.log = &base, .name = "base", .height_m = 0.0, .lat_deg = NAN, .lon_deg = NAN};
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    o.benchmarks = &bm;
    o.ties = &tie;
    o.n_ties = 1;
    o.default_rh_pct = 0.0;
    o.lapse_k_per_m = 0.0;
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    assert_int_equal(hyp_correct(&rover, &b, 1, &o, &r, NULL, &err), HYP_OK);
    assert_int_equal(r.n_calibs, 1);
    hyp_point_detail pd;
    assert_int_equal(hyp_correct_point(&r, 100, &pd), HYP_OK);
    double dz = pd.height_m, ref = 500.0;
    double want = hypot(0.5 * (dz - ref), 0.5 * 0.001 * (dz * dz - ref * ref)) / pd.tcol_k;
    print_message("height %.2f m, tcol %.3f m (%.3f; 1.581 at 1000 m and 285 K)\n", dz, pd.budget_m[HYP_B_TCOL], want);
    assert_near(dz, 1000.0, 0.3);
    assert_near(pd.budget_m[HYP_B_TCOL], want, 1e-6);
    assert_near(pd.budget_m[HYP_B_TCOL], 1.581, 0.01);
    hyp_correct_result_free(&r);
    hyp_series_free(&base);
    hyp_series_free(&rover);
}

/* Two bases 1000 m apart, never compared, the upper reading 50 Pa high;
 * dry isothermal air at 285 K, steady pressure (every hour calm), no
 * calibration and no GNSS heights: the thermometers and the prior are all
 * there is. Hypsometric expectation pU = pL exp(-g D / (Rd 285)) (gravity
 * at mid-layer, the library's normal gravity, so only the offset is left);
 * the constraint's sigma is hypot(1 K, 0.5 K) x pU g D / (Rd Tv^2) =
 * 1.1180 x 33.57 = 37.53 Pa, the prior 150 Pa: estimate 50 x (1/37.53^2) /
 * (1/37.53^2 + 1/150^2) = 47.06 Pa, sigma (1/37.53^2 + 1/150^2)^-1/2 =
 * 36.41 Pa; the thermometers carry 94 % of the weight. */
static void test_offset_from_thermometers(void **state)
{
    (void)state;
    hyp_series lo, hi, rover;
    hyp_series_init(&lo);
    hyp_series_init(&hi);
    hyp_series_init(&rover);
    double pu = p_at(90000.0, 1000.0);
    for (int i = 0; i < 400; i++) {
        double t = T0 - 3600 + 30.0 * i;
        assert_int_equal(hyp_series_push(&lo, t, 90000.0, 285.0, 0.0, NAN, NAN, NAN, 1, HYP_SAMPLE_OK), HYP_OK);
        assert_int_equal(hyp_series_push(&hi, t, pu + 50.0, 285.0, 0.0, NAN, NAN, NAN, 1, HYP_SAMPLE_OK), HYP_OK);
    }
    for (int i = 0; i < 300; i++)
        push(&rover, T0 + 10.0 * i, p_at(90000.0, 500.0), NAN, NAN);
    hyp_base b[2];
    hyp_base_init(&b[0], &lo, "low", 0.0);
    hyp_base_init(&b[1], &hi, "high", 1000.0);
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    o.default_rh_pct = 0.0;
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    hyp_error err;
    assert_int_equal(hyp_correct(&rover, b, 2, &o, &r, NULL, &err), HYP_OK);
    assert_int_equal(r.method_used, HYP_METHOD_TWO_BASE);
    double sens = pu * hyp_gravity_at_height_m_s2(45.0, 500.0) * 1000.0 / (HYP_RD_J_KG_K * 285.0 * 285.0);
    double st = hypot(1.0, 0.5) * sens, it = 1.0 / (st * st), ip = 1.0 / (150.0 * 150.0);
    print_message("sensitivity %.2f Pa/K, sigma %.2f Pa; offset %+.2f Pa +- %.2f Pa (%.2f +- %.2f); %s\n", sens, st,
                  r.base_offset_pa[1], r.base_offset_sigma_pa[1], 50.0 * it / (it + ip), 1.0 / sqrt(it + ip),
                  r.base_offset_how);
    assert_near(sens, 33.57, 0.05);
    assert_near(r.base_offset_pa[1], 50.0 * it / (it + ip), 0.05);
    assert_near(r.base_offset_pa[1], 47.06, 0.1);
    assert_near(r.base_offset_sigma_pa[1], 36.41, 0.1);
    assert_non_null(strstr(r.base_offset_how, "both bases' thermometers in calm hours (lower grade) (94 % of the weight)"));
    assert_non_null(strstr(r.base_offset_how, "the prior of an uncalibrated barometer 6 %"));
    hyp_correct_result_free(&r);
    hyp_series_free(&lo);
    hyp_series_free(&hi);
    hyp_series_free(&rover);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_t_quantile),
        cmocka_unit_test(test_mean_var_factor),
        cmocka_unit_test(test_moving_pattern),
        cmocka_unit_test(test_column_about_level),
        cmocka_unit_test(test_offset_from_thermometers),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
