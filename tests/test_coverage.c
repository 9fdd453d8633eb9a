/* test_coverage.c - is the stated 1-sigma true whatever the day? Many
 * simulated days per situation (calm, a cold front, a distant base, two
 * bases compared and never compared, GNSS-anchored tracks of several
 * lengths and error correlations), each run through the survey API as any
 * client runs it and scored against the simulator's truth: the fraction of
 * heights within two sigmas, pooled over the situation's days, must lie in
 * 0.90-0.99 (about 95 %, "whatever the day"), and the RMSE must be no worse
 * than before these checks existed (figures recorded beside each case).
 *
 * Before (main at 135f3e1, this file and the simulator of this branch),
 * pooled RMSE / 2-sigma coverage: calm 0.895 m / 0.984; front 2.571 m /
 * 0.971 (worst day 0.919); far base 1.460 m / 0.973; two bases compared
 * 1.302 m / 0.987; two bases never compared 6.461 m / 0.981 (co-located
 * with the lower base only 8.457 m, with both 1.309 m, ties at three
 * heights 5.804 m, a tie beside the lower base 8.457 m, GNSS only
 * 5.541 m: the tie made it worse); GNSS-anchored 1.678 m / 0.996;
 * GNSS-anchored level (column as assumed) 0.822 m / 0.998.
 * After: calm 0.895 / 0.983; front 2.571 / 0.985 (worst day 0.949); far
 * base 1.460 / 0.975; compared 1.302 / 0.987; never compared 1.278 / 0.980
 * (1.269, 1.295, 1.056, 1.269, 1.476); GNSS-anchored 1.678 / 0.985; level
 * 0.822 / 0.925. About 30 s on one core (66 days).
 *
 * The days differ in what the correction cannot know: the lapse rate and
 * the base thermometer's error as a measure of the air are drawn at
 * stratified quantiles of the correction's own priors (1 K/km, from
 * memory; 0.5 K, common practice, no source), so this checks that the
 * budget propagates its priors honestly through every method, not the
 * priors themselves. Quantiles of the standard normal distribution at
 * (k + 0.5) / 8: +-0.157, +-0.489, +-0.887, +-1.534 (NIST/SEMATECH
 * e-Handbook of Statistical Methods, table of the normal distribution). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include "sim_files.h"
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hypsolev/hypsolev.h"

#define T0 1781766000.0   /* the simulator's start, 2026-06-18T07:00Z */

static const double z8[8] = {-1.534, -0.887, -0.489, -0.157, 0.157, 0.489, 0.887, 1.534};
/* a second order of the same quantiles, so the two draws of a day are not
 * paired extreme with extreme */
static const int perm8[8] = {5, 2, 7, 0, 3, 6, 1, 4};

/* One simulated day and how the survey is run on it. */
typedef struct day {
    const char *scenario;
    char args[400];          /* the simulator's options */
    int n_bases;             /* 1, or 2: base.csv and base2.csv */
    int benchmarks;          /* read benchmarks.csv */
    int no_colocate;         /* no automatic co-location */
    int bases_colocated;     /* the loggers' side-by-side window */
    double clock_s;          /* the main base's known clock offset */
    int column_exact;        /* the day's column is as the correction assumes:
                                judge the sigma without its column term */
} day;

/* What a situation's days add up to. */
typedef struct tally {
    double n, inside, ss;
    size_t days;
    char how[200];           /* the last day's base offset constraint, if any */
} tally;


/* The true heights of DIR/truth.csv, one per rover point (n of them). */
static double *truth_heights(const char *dir, size_t n)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/truth.csv", dir);
    truth tr;
    read_truth(path, &tr);
    assert_int_equal(tr.n, n);
    free(tr.t);
    return tr.h;
}

static void add_base(hyp_survey *sv, const char *dir, const char *file, const char *prefix, double clock_s)
{
    char path[4200], key[64];
    snprintf(path, sizeof path, "%s/%s", dir, file);
    snprintf(key, sizeof key, "%s_height_m", prefix);
    hyp_base_spec b;
    hyp_base_spec_init(&b, path, scenario_value(dir, key));
    snprintf(key, sizeof key, "%s_lat", prefix);
    b.lat_deg = scenario_value(dir, key);
    snprintf(key, sizeof key, "%s_lon", prefix);
    b.lon_deg = scenario_value(dir, key);
    b.clock_offset_s = clock_s;
    hyp_error err;
    assert_int_equal(hyp_survey_add_base(sv, &b, NULL, &err), HYP_OK);
}

/* Simulates the day into DIR and runs it; adds its points to t. */
static void run_day(const char *tag, int k, const day *d, tally *t)
{
    char dir[4096], cmd[9000];
    snprintf(dir, sizeof dir, "%s/cov-%s-%d", HYP_BINARY_DIR, tag, k);
    snprintf(cmd, sizeof cmd, "mkdir -p '%s' && '%s' %s '%s' %s", dir, HYP_SIM_EXE, d->scenario, dir, d->args);
    assert_int_equal(system(cmd), 0);
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    char bpath[4200], window[100];
    snprintf(bpath, sizeof bpath, "%s/benchmarks.csv", dir);
    if (d->benchmarks)
        o.benchmarks_path = bpath;
    if (d->no_colocate)
        o.correct.auto_colocate = 0;
    if (d->bases_colocated) {   /* the simulator's loggers stand together 2 h to 1.5 h before the start */
        char a[40], b[40];
        hyp_time_format(T0 - 7200.0, a, sizeof a);
        hyp_time_format(T0 - 5460.0, b, sizeof b);
        snprintf(window, sizeof window, "%s/%s", a, b);
        o.bases_colocated = window;
    }
    hyp_survey *sv;
    hyp_error err;
    assert_int_equal(hyp_survey_new(&sv, &o, NULL, &err), HYP_OK);
    add_base(sv, dir, "base.csv", "base", d->clock_s);
    if (d->n_bases > 1)
        add_base(sv, dir, "base2.csv", "base2", 0.0);
    char rover[4200];
    snprintf(rover, sizeof rover, "%s/rover.gpx", dir);
    hyp_rover_run *run;
    assert_int_equal(hyp_survey_run(sv, rover, NULL, 1, &run, &err), HYP_OK);
    if (run->status)
        print_message("%s\n", run->error.message);
    assert_int_equal(run->status, HYP_OK);
    const hyp_correct_result *r = &run->result;
    double *h = truth_heights(dir, r->count);
    double n = 0, in = 0, ss = 0;
    for (size_t i = 0; i < r->count; i++)
        if (r->status[i] == HYP_PT_OK) {
            double e = r->height_m[i] - h[i], sig = r->sigma_m[i];
            hyp_point_detail pd;
            if (d->column_exact) {
                assert_int_equal(hyp_correct_point(r, i, &pd), HYP_OK);
                sig = sqrt(pd.sigma_m * pd.sigma_m - pd.budget_m[HYP_B_TCOL] * pd.budget_m[HYP_B_TCOL]);
            }
            n++, ss += e * e, in += fabs(e) <= 2.0 * sig;
        }
    assert_true(n > 0.9 * (double)r->count);
    print_message("  %s-%d (%s, %zu calibrations): RMSE %.3f m, median sigma %.3f m, 2-sigma coverage %.3f\n", tag, k,
                  hyp_method_name(r->method_used), r->n_calibs, sqrt(ss / n), r->median_sigma_m, in / n);
    if (r->base_offset_how[0])
        print_message("    upper base offset %+.1f Pa +- %.1f Pa (true %+.1f Pa), fixed by %s\n", r->base_offset_pa[1],
                      r->base_offset_sigma_pa[1], scenario_value(dir, "base2_offset_pa"), r->base_offset_how);
    t->n += n, t->inside += in, t->ss += ss, t->days++;
    free(h);
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
}

/* The pooled figures of a situation against its bounds: coverage in
 * [0.90, 0.99], RMSE at most rmse_max (the figure before the change, see
 * each case). */
static void judge(const char *tag, const tally *t, double rmse_max)
{
    double cov = t->inside / t->n, rmse = sqrt(t->ss / t->n);
    print_message("%s: %zu days, %.0f points, RMSE %.3f m (at most %.3f), 2-sigma coverage %.3f\n", tag, t->days, t->n,
                  rmse, rmse_max, cov);
    if (!getenv("HYP_COVERAGE_RECORD")) {   /* set: print the figures only (to record them) */
        assert_true(cov >= 0.90 && cov <= 0.99);
        assert_true(rmse <= rmse_max + 0.0005);   /* recorded to the millimetre */
    }
}

/* The lapse rate and base thermometer error of day k (of 8). */
static int weather(char *buf, size_t n, int k, double lapse_k_km)
{
    return snprintf(buf, n, "--seed %d --lapse %.3f --base-temp-bias %.3f", 11 + k, lapse_k_km + 1.0 * z8[k],
                    0.5 * z8[perm8[k]]);
}

/* Calm days (the simulator's "calm": co-location at both ends, no weather
 * change, a 650 m climb over 4 km). */
static void test_calm(void **state)
{
    (void)state;
    tally t = {0};
    for (int k = 0; k < 8; k++) {
        day d = {.scenario = "calm", .n_bases = 1};
        weather(d.args, sizeof d.args, k, -6.5);
        run_day("calm", k, &d, &t);
    }
    judge("calm", &t, 0.895);
}

/* A cold front (the simulator's "coldfront": falling 1 hPa/h ahead of it,
 * a 3 hPa rise across its 10 km, rising 1 hPa/h behind) crossing the area
 * while the rover is away, at 15, 30 and 50 km/h, from eight directions,
 * on walks of 3, 6 and 10 km from the base. */
static void test_front(void **state)
{
    (void)state;
    static const double kmh[3] = {15.0, 30.0, 50.0}, route[3] = {3.0, 6.0, 10.0};
    tally t = {0};
    double worst = 1.0;
    for (int k = 0; k < 9; k++) {
        day d = {.scenario = "coldfront", .n_bases = 1};
        int n = weather(d.args, sizeof d.args, k % 8, -6.5);
        double walk_s = route[k / 3] * 1000.0;   /* at 1 m/s */
        double when = 900.0 + walk_s * (0.5 + 0.25 * (k % 3));   /* going up, near the top, coming down */
        snprintf(d.args + n, sizeof d.args - (size_t)n,
                 " --front-kmh %.0f --front-trough %.1f --route-km %.0f --front-dir %d --front-time %.0f", kmh[k % 3],
                 1.5 * kmh[k % 3], route[k / 3], 45 * k, when);
        double in0 = t.inside, n0 = t.n;
        run_day("front", k, &d, &t);
        worst = fmin(worst, (t.inside - in0) / (t.n - n0));
    }
    judge("front", &t, 2.571);
    /* The days the front stands between base and rover for half an hour:
     * before, the worst (15 km/h, the walk's far end ahead of the base)
     * had 0.919 within two sigmas; now a sigma that reads the base's log
     * over the pattern's crossing time must keep every day above 0.93. */
    print_message("front: worst day's 2-sigma coverage %.3f\n", worst);
    assert_true(worst >= 0.93);
}

/* The simulator's "faraway" day: the base 35 km from the trailhead, a
 * 3 hPa/100 km gradient, pressure falling 1 hPa/h, the base clock 90 s
 * fast (given), tied to the trailhead benchmark at both ends. */
static void test_far_base(void **state)
{
    (void)state;
    tally t = {0};
    for (int k = 0; k < 6; k++) {
        day d = {.scenario = "faraway", .n_bases = 1, .benchmarks = 1, .clock_s = 90.0};
        weather(d.args, sizeof d.args, k + 1, -6.5);
        run_day("far", k, &d, &t);
    }
    judge("far base", &t, 1.460);
}

/* Two bases bracketing the walk (the simulator's "twobase": a morning
 * inversion, a rover with no thermometer), compared side by side before
 * the start. */
static void test_two_bases_compared(void **state)
{
    (void)state;
    tally t = {0};
    for (int k = 0; k < 6; k++) {
        day d = {.scenario = "twobase", .n_bases = 2, .bases_colocated = 1};
        weather(d.args, sizeof d.args, k + 1, -6.5);
        run_day("twobase-compared", k, &d, &t);
    }
    judge("two bases compared", &t, 1.302);
}

/* Two bases never compared: the upper logger's offset is drawn at
 * quantiles of the 150 Pa prior of an uncalibrated barometer. What the
 * survey observes instead: (lower) co-locations with the lower base only;
 * (both) with each base; (ties) benchmarks at three heights; (tie) only a
 * tie at the trailhead beside the lower base, no co-location; (gnss) no
 * co-location and no tie, the same days as (tie). */
typedef struct nc_case { const char *tag, *extra; int benchmarks, no_colocate; double rmse_max; } nc_case;

/* Each case on its own: RMSE no worse than before; coverage printed (a
 * case of four days is one draw of the upper logger's offset per day). */
static void judge_case(const char *tag, const tally *t, double rmse_max)
{
    double rmse = sqrt(t->ss / t->n);
    print_message("%s: %zu days, RMSE %.3f m (at most %.3f), 2-sigma coverage %.3f\n", tag, t->days, rmse, rmse_max,
                  t->inside / t->n);
    if (!getenv("HYP_COVERAGE_RECORD"))
        assert_true(rmse <= rmse_max + 0.0005);   /* recorded to the millimetre */
}

static void run_nc(const nc_case *c, tally *t)
{
    for (int k = 0; k < 4; k++) {
        day d = {.scenario = "twobase", .n_bases = 2, .benchmarks = c->benchmarks, .no_colocate = c->no_colocate};
        int n = weather(d.args, sizeof d.args, 2 * k + 1, -6.5);
        snprintf(d.args + n, sizeof d.args - (size_t)n, " --xbase-coloc 0 --xbase-off %.0f %s", 150.0 * z8[perm8[2 * k]],
                 c->extra);
        run_day(c->tag, k, &d, t);
    }
    judge_case(c->tag, t, c->rmse_max);
}

/* The pooled situation must lie in 0.90-0.99. On their own, two cases
 * are more cautious: GNSS only (0.999: the level and the upper offset are
 * both taken from the GNSS heights, and the budget adds their sigmas as if
 * independent, while their errors partly cancel) and ties at three heights
 * (1.000: the calibration test, whose model has no two-base column, finds
 * the mid-height tie off by the morning inversion and widens the offset's
 * sigma by about 2 m). */
static void test_two_bases_not_compared(void **state)
{
    (void)state;
    static const nc_case cases[] = {
        {"nc-lower", "", 0, 0, 8.457},
        {"nc-both", "--xbase-at-top 1", 0, 0, 1.309},
        {"nc-ties", "--stops 3", 1, 0, 5.804},
        {"nc-tie", "--th-benchmark 1", 1, 1, 8.457},
        {"nc-gnss", "", 0, 1, 5.541},
    };
    tally all = {0}, each[5];
    for (int k = 0; k < 5; k++) {
        memset(&each[k], 0, sizeof each[k]);
        run_nc(&cases[k], &each[k]);
        all.n += each[k].n, all.inside += each[k].inside, all.ss += each[k].ss, all.days += each[k].days;
    }
    judge("two bases never compared", &all, 6.461);
    /* a correct tie never makes it worse: the tie beside the lower base
     * against the same days levelled on GNSS alone (before: 8.457 m
     * against 5.541 m), and ties at three heights against co-location
     * with the lower base only */
    double tie = sqrt(each[3].ss / each[3].n), gnss = sqrt(each[4].ss / each[4].n);
    double ties = sqrt(each[2].ss / each[2].n), lower = sqrt(each[0].ss / each[0].n);
    print_message("tie beside the lower base %.3f m, GNSS only %.3f m; ties at three heights %.3f m, lower base only %.3f m\n",
                  tie, gnss, ties, lower);
    assert_true(tie <= gnss);
    assert_true(ties <= lower);
}

/* Tracks levelled on their own GNSS heights (no co-location, no tie), of
 * 2.5, 5 and 7.5 km (with rests of 10 min, 50 min and 2 h at the top:
 * about 2300, 3800 and 5300 points), GNSS height errors of 1, 2 and 3 m
 * correlated for 1, 5, 15 and 30 minutes (and 1 m of white noise per fix). */
static void test_gnss_anchored(void **state)
{
    (void)state;
    static const double route[3] = {2.5, 5.0, 7.5}, rest[3] = {600, 3000, 7200}, sd[3] = {1.0, 2.0, 3.0};
    static const double tau[4] = {60, 300, 900, 1800};
    tally t = {0};
    for (int k = 0; k < 9; k++) {
        day d = {.scenario = "demo", .n_bases = 1, .no_colocate = 1};
        int n = weather(d.args, sizeof d.args, k % 8, -6.5);
        snprintf(d.args + n, sizeof d.args - (size_t)n, " --route-km %.1f --rest-s %.0f --gnss-sd %.1f --gnss-tau %.0f",
                 route[k / 3], rest[k / 3], sd[k % 3], tau[k % 4]);
        run_day("gnss", k, &d, &t);
    }
    judge("GNSS-anchored", &t, 1.678);
}

/* The level alone: the same tracks on days whose column is as assumed
 * (lapse rate -6.5 K/km, no thermometer error), judged against the sigma
 * without its column term, so the GNSS level's own sigma carries the
 * heights' errors: 12 tracks, GNSS errors of 1 to 3 m correlated for 1 to
 * 30 minutes. */
static void test_gnss_level(void **state)
{
    (void)state;
    static const double route[3] = {2.5, 5.0, 7.5}, rest[3] = {600, 3000, 7200}, sd[4] = {1.0, 2.0, 3.0, 1.5};
    static const double tau[4] = {60, 300, 900, 1800};
    tally t = {0};
    for (int k = 0; k < 12; k++) {
        day d = {.scenario = "demo", .n_bases = 1, .no_colocate = 1, .column_exact = 1};
        snprintf(d.args, sizeof d.args, "--seed %d --lapse -6.5 --route-km %.1f --rest-s %.0f --gnss-sd %.1f --gnss-tau %.0f",
                 31 + k, route[k % 3], rest[k % 3], sd[k / 3], tau[k % 4]);
        run_day("gnss-level", k, &d, &t);
    }
    judge("GNSS-anchored level", &t, 0.822);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_calm),
        cmocka_unit_test(test_front),
        cmocka_unit_test(test_far_base),
        cmocka_unit_test(test_two_bases_compared),
        cmocka_unit_test(test_two_bases_not_compared),
        cmocka_unit_test(test_gnss_anchored),
        cmocka_unit_test(test_gnss_level),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
