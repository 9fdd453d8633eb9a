/* test_marks_sigma.c - a control mark or benchmark with a sigma of 0:
 * refused at its line (it was replaced by the default sigma without a
 * word, the output showing 0.020 m for a height the file gave as exact);
 * an empty sigma still takes the default, and a station to be determined
 * keeps none. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "hypsolev/hypsolev.h"

static const char *write_file(const char *name, const char *text)
{
    static char path[512];
    snprintf(path, sizeof path, "%s/%s", HYP_BINARY_DIR, name);
    FILE *f = fopen(path, "w");
    assert_non_null(f);
    fputs(text, f);
    assert_int_equal(fclose(f), 0);
    return path;
}

static void test_zero_sigma_refused(void **state)
{
    (void)state;
    const char *p = write_file("marks_sigma0.csv", "name,lat,lon,height,sigma\n"
                                                   "BM-A,46.95,10.40,640.000,0.010\n"
                                                   "BM-B,46.96,10.42,746.141,0\n");   /* line 3 */
    hyp_benchmarks b;
    hyp_benchmarks_init(&b);
    hyp_error err;
    assert_int_equal(hyp_stations_read(p, 0.02, &b, NULL, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, "marks_sigma0.csv:3: sigma of \"BM-B\" is 0 m"));
    assert_int_equal(hyp_benchmarks_read(p, 0.01, &b, NULL, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, "marks_sigma0.csv:3:"));
    remove(p);
}

static void test_empty_sigma_default(void **state)
{
    (void)state;
    const char *p = write_file("marks_sigma_empty.csv", "name,lat,lon,height,sigma\n"
                                                        "BM-A,46.95,10.40,640.000,\n"
                                                        "GR01,46.94,10.36,,\n");
    hyp_benchmarks b;
    hyp_benchmarks_init(&b);
    hyp_error err;
    assert_int_equal(hyp_stations_read(p, 0.02, &b, NULL, &err), HYP_OK);
    assert_int_equal(b.count, 2);
    assert_true(b.sigma_m[0] == 0.02);   /* the default passed in above */
    assert_true(isnan(b.sigma_m[1]));    /* to be determined: no sigma */
    hyp_benchmarks_free(&b);
    remove(p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_zero_sigma_refused),
        cmocka_unit_test(test_empty_sigma_default),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
