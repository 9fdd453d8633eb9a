/* test_near_index.c - the benchmark matcher's index (near_index.c) finds
 * exactly the samples an exhaustive scan with the same geodesic finds, on
 * random sets about ordinary places, the poles and the antimeridian
 * (issue 15: matching 10 000 benchmarks took 31 s); and a long benchmark
 * list is read with its names checked for duplicates per row. */
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
#include "near_index.h"

/* xorshift64* (Vigna 2016): reproducible sets per seed. */
static uint64_t rng_next(uint64_t *s)
{
    *s ^= *s >> 12;
    *s ^= *s << 25;
    *s ^= *s >> 27;
    return *s * 2685821657736338717ULL;
}

static double uniform(uint64_t *s)
{
    return (double)(rng_next(s) >> 11) / 9007199254740992.0;
}

/* Places where bounds in latitude and longitude are easy to get wrong:
 * the poles (every longitude near), the antimeridian (longitudes of both
 * signs near), and an ordinary place. */
static const double centres[][2] = {
    {46.8, 9.9}, {90.0, 0.0}, {-90.0, 45.0}, {89.9999, -120.0}, {-89.99, 179.0},
    {0.0, 180.0}, {0.0, -180.0}, {65.0, 179.9999}, {-45.0, -179.9995}, {89.0, 180.0},
};
#define N_CENTRES (sizeof centres / sizeof centres[0])

static int32_t e7(double deg)
{
    return (int32_t)lround(deg * 1e7);
}

/* One point about a random centre, spread up to about 50 km. */
static void random_point(uint64_t *s, double *lat, double *lon)
{
    const double spread[] = {1e-6, 1e-4, 3e-3, 0.05, 0.5};
    const double *c = centres[rng_next(s) % N_CENTRES];
    double d = spread[rng_next(s) % 5];
    *lat = c[0] + (2 * uniform(s) - 1) * d;
    *lon = c[1] + (2 * uniform(s) - 1) * d * 3;
    if (*lat > 90.0)
        *lat = 180.0 - *lat;   /* over the pole */
    if (*lat < -90.0)
        *lat = -180.0 - *lat;
}

static void compare_seed(uint64_t seed, size_t *hits, size_t *wrapped, size_t *polar)
{
    uint64_t s = seed * 0x9E3779B97F4A7C15ULL + 1;
    size_t n = 1500;
    int32_t *la = malloc(n * sizeof *la), *lo = malloc(n * sizeof *lo);
    assert_non_null(la);
    assert_non_null(lo);
    for (size_t i = 0; i < n; i++) {
        double a, b;
        random_point(&s, &a, &b);
        la[i] = e7(a);
        lo[i] = e7(b);   /* up to 181.5 degrees: stored as read, beyond 180 */
        if (i % 97 == 0)
            la[i] = HYP_NO_POSITION;
        if (i % 89 == 0)
            la[i] = e7(90.5);   /* a stored latitude beyond the pole: no distance */
    }
    const double radii[] = {0.5, 5.0, 30.0, 500.0, 20000.0};
    hyp__near_index ix;
    assert_int_equal(hyp__near_index_build(&ix, la, lo, n, 30.0), HYP_OK);
    size_t *a = NULL, *b = NULL, na, nb, ca = 0, cb = 0;
    for (int q = 0; q < 300; q++) {
        double lat, lon, r = radii[rng_next(&s) % 5];
        random_point(&s, &lat, &lon);
        if (q % 10 == 0) {   /* a query on a sample itself */
            size_t k = rng_next(&s) % n;
            if (la[k] > HYP_BAD_POSITION && abs(la[k]) <= 900000000)
                lat = la[k] * 1e-7, lon = lo[k] * 1e-7;
        }
        assert_int_equal(hyp__near_index_query(&ix, lat, lon, r, &a, &na, &ca), HYP_OK);
        assert_int_equal(hyp__near_exhaustive(la, lo, n, lat, lon, r, &b, &nb, &cb), HYP_OK);
        if (na != nb)
            print_message("seed %llu query %d at %.7f %.7f r %g m: index %zu, exhaustive %zu\n",
                          (unsigned long long)seed, q, lat, lon, r, na, nb);
        assert_int_equal(na, nb);
        if (na)
            assert_memory_equal(a, b, na * sizeof *a);
        *hits += na;
        int pos = 0, neg = 0;
        for (size_t k = 0; k < na; k++) {
            pos |= lo[a[k]] > 1790000000 || lo[a[k]] < -1800000000;
            neg |= lo[a[k]] < -1790000000 || lo[a[k]] > 1800000000;
            *polar += fabs(lat) > 89.99 && fabs(la[a[k]] * 1e-7) > 89.99;
        }
        *wrapped += pos && neg;
    }
    free(a);
    free(b);
    hyp__near_index_free(&ix);
    free(la);
    free(lo);
}

static void test_same_as_exhaustive(void **state)
{
    (void)state;
    size_t hits = 0, wrapped = 0, polar = 0;
    for (uint64_t seed = 1; seed <= 6; seed++)
        compare_seed(seed, &hits, &wrapped, &polar);
    print_message("%zu matches in all; %zu queries matched across the antimeridian; %zu polar matches\n", hits,
                  wrapped, polar);
    /* the sets must exercise what they are for, or the comparison proves
     * nothing */
    assert_true(hits > 1000);
    assert_true(wrapped > 0);
    assert_true(polar > 0);
}

/* Two samples at a known distance: GeodSolve -i -p 6 (GeographicLib 2.1.2)
 * gives 1888.506551 m for 46.8 9.9 to 46.81 9.92 (the pair of test_geo.c);
 * just inside and just outside that radius, across the antimeridian too. */
static void test_known_pair(void **state)
{
    (void)state;
    int32_t la[] = {e7(46.81), e7(0.0), e7(0.0)}, lo[] = {e7(9.92), e7(179.9999), e7(-179.9999)};
    hyp__near_index ix;
    size_t *out = NULL, n, cap = 0;
    assert_int_equal(hyp__near_index_build(&ix, la, lo, 3, 50.0), HYP_OK);
    assert_int_equal(hyp__near_index_query(&ix, 46.8, 9.9, 1888.5066, &out, &n, &cap), HYP_OK);
    assert_int_equal(n, 1);
    assert_int_equal(out[0], 0);
    assert_int_equal(hyp__near_index_query(&ix, 46.8, 9.9, 1888.5065, &out, &n, &cap), HYP_OK);
    assert_int_equal(n, 0);
    /* 0.0002 degrees of longitude on the equator: 22.26 m (a * 0.0002 *
     * pi / 180 with a = 6378137 m, the equator being a geodesic) */
    assert_int_equal(hyp__near_index_query(&ix, 0.0, 180.0, 12.0, &out, &n, &cap), HYP_OK);
    assert_int_equal(n, 2);
    assert_int_equal(hyp__near_index_query(&ix, 0.0, 179.9999, 22.3, &out, &n, &cap), HYP_OK);
    assert_int_equal(n, 2);
    assert_int_equal(hyp__near_index_query(&ix, 0.0, 179.9999, 22.2, &out, &n, &cap), HYP_OK);
    assert_int_equal(n, 1);
    free(out);
    hyp__near_index_free(&ix);
}

/* 20 000 benchmarks: every name found again, and a name repeated in
 * another case refused at its own line, as bench_duplicate.csv's is
 * (cli_bench_duplicate). */
static void test_many_benchmarks(void **state)
{
    (void)state;
    const char *path = HYP_BINARY_DIR "/near_index_bm.csv";
    for (int dup = 0; dup < 2; dup++) {
        FILE *f = fopen(path, "w");
        assert_non_null(f);
        fputs("name,lat,lon,height\n", f);
        for (int k = 0; k < 20000; k++)
            fprintf(f, "BM-%d,46.%04d,9.9,%d\n", k, k % 10000, 800 + k % 500);
        if (dup)
            fputs("bm-12345,46.8,9.9,800\n", f);   /* line 20002 */
        assert_int_equal(fclose(f), 0);
        hyp_benchmarks b;
        hyp_benchmarks_init(&b);
        hyp_error err;
        hyp_status st = hyp_benchmarks_read(path, 0.01, &b, NULL, &err);
        if (dup) {
            assert_int_equal(st, HYP_ERR_VALUE);
            assert_non_null(strstr(err.message, "near_index_bm.csv:20002: benchmark \"bm-12345\" is listed twice"));
            continue;
        }
        assert_int_equal(st, HYP_OK);
        assert_int_equal(b.count, 20000);
        assert_int_equal(hyp_benchmarks_find(&b, "bm-19999"), 19999);
        assert_int_equal(hyp_benchmarks_find(&b, "BM-0"), 0);
        hyp_benchmarks_free(&b);
    }
    remove(path);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_same_as_exhaustive),
        cmocka_unit_test(test_known_pair),
        cmocka_unit_test(test_many_benchmarks),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
