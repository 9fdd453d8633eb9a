/* test_colocation.c - standing still decided robustly: a rover ten minutes
 * beside the base whose GNSS fixes scatter (white or correlated noise of
 * 3 m per axis, 17 m from the base) or jump 50 m for a single fix must
 * still give its co-locations, each about as long as the stand, with the
 * isolated jumps counted, and a walk away must not be taken for standing.
 * The simulator (tests/sim/hypsim.c, scenario "calm": 15 minutes beside
 * the base at the start and at the end, fixes every 5 s) makes the tracks;
 * everything runs through the survey API. */
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

#define T0 1781766000.0   /* the simulator's start */
#define STAND_S 900.0     /* the calm day's co-location at each end */
#define DT_S 5.0          /* its fix interval */

static hyp_rover_run *run_day(const char *tag, const char *args)
{
    char dir[4096], cmd[8800];
    snprintf(dir, sizeof dir, "%s/coloc-%s", HYP_BINARY_DIR, tag);
    snprintf(cmd, sizeof cmd, "mkdir -p '%s' && '%s' calm '%s' %s", dir, HYP_SIM_EXE, dir, args);
    assert_int_equal(system(cmd), 0);
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    hyp_survey *sv;
    hyp_error err;
    assert_int_equal(hyp_survey_new(&sv, &o, NULL, &err), HYP_OK);
    char base[4200], rover[4200];
    snprintf(base, sizeof base, "%s/base.csv", dir);
    snprintf(rover, sizeof rover, "%s/rover.gpx", dir);
    hyp_base_spec b;
    hyp_base_spec_init(&b, base, 812.4);
    b.lat_deg = 46.8, b.lon_deg = 9.9;
    assert_int_equal(hyp_survey_add_base(sv, &b, NULL, &err), HYP_OK);
    hyp_rover_run *run;
    assert_int_equal(hyp_survey_run(sv, rover, NULL, 1, &run, &err), HYP_OK);
    assert_int_equal(run->status, HYP_OK);
    hyp_survey_free(sv);
    return run;
}

/* The simulator's spikes: at fix k (from the start) with k % every ==
 * every / 2, every = spike_s / 5 s. How many fall in [a, b]. */
static size_t spikes_in(double a, double b, double spike_s)
{
    long every = lround(spike_s / DT_S);
    size_t n = 0;
    for (long k = 0; T0 + (double)k * DT_S <= b; k++)
        n += k % every == every / 2 && T0 + (double)k * DT_S >= a;
    return n;
}

/* Both co-locations found from positions, each covering at least 90 % of
 * the stand and reaching at most 20 s past it (a walker at 1 m/s is 15 m
 * off after 15 s: no walk taken for standing); the level comes from them,
 * not from GNSS. With spikes every spike_s, each window counts exactly
 * the spikes inside it, give or take `extra` outlying fixes. */
static void check_colocations(const hyp_rover_run *run, double spike_s, size_t extra)
{
    const hyp_correct_result *r = &run->result;
    size_t n = 0;
    double t_end = run->rover->time_s[run->rover->count - 1];
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        if (c->kind != HYP_CAL_BASE)
            continue;
        n++;
        double stand_a = n == 1 ? T0 : t_end - STAND_S, stand_b = n == 1 ? T0 + STAND_S : t_end;
        print_message("  co-location %s to %+.0f s of the stand, %zu fixes, %zu outlying fixes tolerated\n",
                      n == 1 ? "from the start" : "to the end", c->end_s - c->start_s - STAND_S, c->n, c->pos_outliers);
        assert_true(c->end_s - c->start_s >= 0.9 * STAND_S);
        assert_true(c->start_s >= stand_a - 20.0 && c->end_s <= stand_b + 20.0);
        if (spike_s > 0) {   /* each spike inside the window counted */
            size_t want = spikes_in(c->start_s, c->end_s, spike_s);
            assert_true(c->pos_outliers >= want && c->pos_outliers <= want + extra);
        }
    }
    assert_int_equal(n, 2);
    assert_int_not_equal(r->drift.kind, HYP_DRIFT_GNSS);
}

/* 2 m of white noise per axis (the simulator's usual fixes): the
 * reference. */
static void test_usual_fixes(void **state)
{
    (void)state;
    hyp_rover_run *run = run_day("usual", "");
    check_colocations(run, 0, 0);
    hyp_rover_run_free(run);
}

/* The case: 17 m from the base, 3 m of white noise per fix. Grown
 * from one reference fix, the stretch broke at the first fix over 15 m
 * from it and no co-location was found. */
static void test_white_scatter(void **state)
{
    (void)state;
    hyp_rover_run *run = run_day("white", "--coloc-offset 17 --pos-noise 3");
    check_colocations(run, 0, 0);
    hyp_rover_run_free(run);
}

/* The same scatter correlated over a minute (an AR(1) per axis): the
 * position wanders rather than jitters. */
static void test_correlated_scatter(void **state)
{
    (void)state;
    hyp_rover_run *run = run_day("correlated", "--coloc-offset 17 --pos-noise 3 --pos-tau 60");
    check_colocations(run, 0, 0);
    hyp_rover_run_free(run);
}

/* A single fix 50 m off every minute (multipath): each is tolerated and
 * counted, with and without the scatter. */
static void test_spikes(void **state)
{
    (void)state;
    hyp_rover_run *run = run_day("spikes", "--pos-spike-s 60");
    check_colocations(run, 60.0, 0);
    hyp_rover_run_free(run);
    run = run_day("spikes-white", "--coloc-offset 17 --pos-noise 3 --pos-spike-s 45");
    /* one more may be counted: standing 17 m off the trail, the first
     * fix of the walk away is back on the trail, 17 m from the stand, and
     * the next ones are within 15 m of it again */
    check_colocations(run, 45.0, 1);
    hyp_rover_run_free(run);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_usual_fixes),
        cmocka_unit_test(test_white_scatter),
        cmocka_unit_test(test_correlated_scatter),
        cmocka_unit_test(test_spikes),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
