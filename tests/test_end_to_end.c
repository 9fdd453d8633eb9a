/* test_end_to_end.c - corrections of simulated surveys scored against the
 * simulator's truth: RMSE, the noise floor the sensors allow, and the
 * fraction of points whose truth lies within two sigmas. The simulator
 * (tests/sim/hypsim.c) integrates the hydrostatic equation itself, so this
 * checks the library against an independent model of the atmosphere. */
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

typedef struct truth { size_t n; double *t, *h; } truth;

static void read_truth(const char *path, truth *tr)
{
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    char line[512];
    size_t cap = 1024;
    tr->n = 0;
    tr->t = malloc(cap * sizeof(double));
    tr->h = malloc(cap * sizeof(double));
    assert_non_null(fgets(line, sizeof line, f));   /* header */
    while (fgets(line, sizeof line, f)) {
        char *c1 = strchr(line, ','), *c2 = c1 ? strchr(c1 + 1, ',') : NULL, *c3 = c2 ? strchr(c2 + 1, ',') : NULL;
        assert_non_null(c3);
        *c1 = '\0';
        if (tr->n == cap) {
            cap *= 2;
            tr->t = realloc(tr->t, cap * sizeof(double));
            tr->h = realloc(tr->h, cap * sizeof(double));
        }
        assert_int_equal(hyp_time_parse(line, NULL, &tr->t[tr->n]), HYP_TIME_OK);
        tr->h[tr->n] = strtod(c3 + 1, NULL);
        tr->n++;
    }
    fclose(f);
}

static double scenario_value(const char *dir, const char *key)
{
    char path[4096], k[64], line[256];
    snprintf(path, sizeof path, "%s/scenario.txt", dir);
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    double v, found = NAN;
    while (fgets(line, sizeof line, f))
        if (sscanf(line, "%63s %lf", k, &v) == 2 && strcmp(k, key) == 0)
            found = v;
    fclose(f);
    assert_false(isnan(found));
    return found;
}

typedef struct score { double rmse, bias, coverage, median_sigma, floor; size_t n; } score;

static int cmp(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static void run_survey(const char *dir, double base_h, double lat, double lon, score *sc)
{
    char rover[4096], base[4096], tpath[4096];
    snprintf(rover, sizeof rover, "%s/rover.gpx", dir);
    snprintf(base, sizeof base, "%s/base.csv", dir);
    snprintf(tpath, sizeof tpath, "%s/truth.csv", dir);
    hyp_gpx_doc d;
    hyp_gpx_doc_init(&d);
    hyp_series b;
    hyp_series_init(&b);
    hyp_error err;
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    assert_int_equal(hyp_gpx_read(rover, NULL, &d, &msgs, &err), HYP_OK);
    assert_int_equal(hyp_csv_read(base, NULL, &b, NULL, &msgs, &err), HYP_OK);
    hyp_base hb = {.log = &b, .name = base, .height_m = base_h, .lat_deg = lat, .lon_deg = lon};
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    assert_int_equal(hyp_correct_single_base(&d.pts, &hb, NULL, &r, &msgs, &err), HYP_OK);
    truth tr;
    read_truth(tpath, &tr);
    assert_int_equal(tr.n, d.pts.count);
    double ss = 0, sum = 0, inside = 0;
    double *sig = malloc(tr.n * sizeof *sig);
    size_t n = 0;
    for (size_t i = 0; i < tr.n; i++) {
        assert_true(fabs(tr.t[i] - d.pts.time_s[i]) < 1e-6);
        if (r.status[i] != HYP_PT_OK)
            continue;
        double e = r.height_m[i] - tr.h[i];
        ss += e * e;
        sum += e;
        inside += fabs(e) <= 2.0 * r.sigma_m[i];
        sig[n++] = r.sigma_m[i];
    }
    qsort(sig, n, sizeof *sig, cmp);
    sc->n = n;
    sc->rmse = sqrt(ss / (double)n);
    sc->bias = sum / (double)n;
    sc->coverage = inside / (double)n;
    sc->median_sigma = sig[n / 2];
    /* The floor: the simulator's white sensor noise and quantisation alone
     * (its scenario.txt), propagated through dz/dp = Rd Tv / (g p) at the
     * survey's mean pressure: no method beats it on single samples. */
    double p = 0, tv = 0;
    for (size_t i = 0; i < d.pts.count; i++)
        if (r.status[i] == HYP_PT_OK) {
            p += d.pts.pressure_pa[i];
            tv += r.tcol_k[i];
        }
    p /= (double)n;
    tv /= (double)n;
    double nr = scenario_value(dir, "rover_noise_pa"), qr = scenario_value(dir, "rover_quantum_pa");
    double nb = scenario_value(dir, "base_noise_pa"), qb = scenario_value(dir, "base_quantum_pa");
    sc->floor = HYP_RD_J_KG_K * tv / (9.80 * p) * sqrt(nr * nr + qr * qr / 12.0 + nb * nb + qb * qb / 12.0);
    print_message("%s: %zu points, RMSE %.3f m, bias %+.3f m, noise floor %.3f m, median sigma %.3f m, "
                  "2-sigma coverage %.3f\n", dir, n, sc->rmse, sc->bias, sc->floor, sc->median_sigma, sc->coverage);
    free(sig);
    free(tr.t);
    free(tr.h);
    hyp_correct_result_free(&r);
    hyp_gpx_doc_free(&d);
    hyp_series_free(&b);
    hyp_msgs_free(&msgs);
}

/* Simulated "calm" day (seed 7): co-location at both ends, weak weather.
 * Bounds: RMSE within 3x the sensor noise floor (the rest is the assumed
 * lapse rate against the model's, and rover thermometer warming, which the
 * default column mode ignores) and sigmas not over-confident. */
static void test_sim_calm(void **state)
{
    (void)state;
    score s;
    run_survey(HYP_BINARY_DIR "/sim-calm", 812.4, 46.80, 9.90, &s);
    assert_true(s.rmse < 2.5 * s.floor);
    assert_true(s.rmse < 0.6);
    assert_true(s.coverage >= 0.85);
}

/* The demo survey in surveys/, as committed. */
static void test_demo_survey(void **state)
{
    (void)state;
    score s;
    run_survey(HYP_SOURCE_DIR "/surveys/quenwick-tor", 812.4, 46.80, 9.90, &s);
    assert_true(s.rmse < 3.0 * s.floor);
    assert_true(s.rmse < 0.7);
    assert_true(fabs(s.bias) < 0.4);
    assert_true(s.coverage >= 0.85);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_sim_calm),
        cmocka_unit_test(test_demo_survey),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
