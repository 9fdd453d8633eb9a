/* test_inspect.c - inspect finds planted problems in a constructed base log
 * (a trend with white noise): a spike, a step, a gap, a flat line and a
 * clock jump, each at the time it was planted, and nothing on the clean log. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>

#include "hypsolev/hypsolev.h"

#define T0 1781766000.0

static double noise(uint64_t *x)
{
    /* sum of 4 uniforms: roughly normal, deterministic */
    double s = 0;
    for (int k = 0; k < 4; k++) {
        *x ^= *x << 13, *x ^= *x >> 7, *x ^= *x << 17;
        s += (double)(*x % 100000) / 100000.0 - 0.5;
    }
    return s * 1.7;   /* about 1 Pa */
}

static void make(hyp_series *s, int planted)
{
    hyp_series_init(s);
    uint64_t x = 99;
    for (int i = 0; i < 1200; i++) {
        double t = T0 + 30.0 * i;
        if (planted && i >= 700 && i < 760)
            continue;                                       /* a 30-minute gap */
        double p = 92000.0 - 0.02 * (t - T0) + noise(&x);   /* -0.72 hPa/h */
        if (planted && i == 200)
            p += 150.0;                                     /* a spike */
        if (planted && i >= 500)
            p += 80.0;                                      /* a step: the logger moved */
        if (planted && i >= 900 && i < 950)
            p = 91700.0;                                    /* frozen for 25 minutes */
        hyp_sample_flag f = HYP_SAMPLE_OK;
        if (planted && i == 1100) {                         /* the clock jumped back, */
            t -= 3600.0, f = HYP_SAMPLE_TIME_OUTLIER;       /* as a reader records it */
            s->time_back[s->n_time_back++] = (struct hyp_time_back){t, 3630.0, (uint32_t)i + 2};
        }
        hyp_series_push(s, t, p, 285.0, NAN, NAN, NAN, NAN, (uint32_t)i + 2, f);
    }
}

static const hyp_issue *find(const hyp_inspection *r, hyp_issue_kind k, double t, double tol)
{
    for (size_t i = 0; i < r->n_issues; i++)
        if (r->issues[i].kind == k && fabs(r->issues[i].start_s - t) <= tol)
            return &r->issues[i];
    return NULL;
}

static void test_planted(void **state)
{
    (void)state;
    hyp_series s;
    make(&s, 1);
    hyp_inspection r;
    hyp_error err;
    assert_int_equal(hyp_inspect(&s, NULL, &r, &err), HYP_OK);
    for (size_t i = 0; i < r.n_issues; i++)
        print_message("%s at +%.0f s (%.1f)\n", hyp_issue_kind_name(r.issues[i].kind), r.issues[i].start_s - T0,
                      r.issues[i].size);
    assert_true(fabs(r.interval_s - 30.0) < 1e-9);
    const hyp_issue *sp = find(&r, HYP_ISSUE_SPIKE, T0 + 6000, 0.5);
    assert_non_null(sp);
    assert_true(fabs(sp->size - 150.0) < 10.0);
    const hyp_issue *st = find(&r, HYP_ISSUE_STEP, T0 + 14970, 31);
    assert_non_null(st);
    assert_true(fabs(st->size - 80.0) < 10.0);
    const hyp_issue *gp = find(&r, HYP_ISSUE_GAP, T0 + 20970, 0.5);
    assert_non_null(gp);
    assert_true(fabs(gp->size - 1830.0) < 1e-9);
    const hyp_issue *fl = find(&r, HYP_ISSUE_FLAT, T0 + 27000, 0.5);
    assert_non_null(fl);
    assert_non_null(find(&r, HYP_ISSUE_CLOCK_JUMP, T0 + 33000 - 3600, 0.5));
    /* one spike; the flat line's ends may count as steps of their own */
    assert_int_equal(r.n_kind[HYP_ISSUE_SPIKE], 1);
    assert_true(r.n_kind[HYP_ISSUE_STEP] >= 1 && r.n_kind[HYP_ISSUE_STEP] <= 3);
    hyp_inspection_free(&r);
    hyp_series_free(&s);
}

static void test_clean(void **state)
{
    (void)state;
    hyp_series s;
    make(&s, 0);
    hyp_inspection r;
    hyp_error err;
    hyp_inspect_opts o;
    hyp_inspect_opts_init(&o);
    assert_int_equal(hyp_inspect(&s, &o, &r, &err), HYP_OK);
    for (int k = 0; k < HYP_ISSUE_KIND_COUNT; k++)
        assert_int_equal(r.n_kind[k], 0);
    assert_true(fabs(r.trend_pa_per_s - -0.02) < 1e-4);
    assert_true(fabs(r.max_change_1h_pa - -72.0) < 5.0);
    hyp_inspection_free(&r);
    hyp_series_free(&s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_planted),
        cmocka_unit_test(test_clean),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
