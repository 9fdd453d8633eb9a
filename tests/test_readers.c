/* test_readers.c - readers that never let a bad sample poison a run: values
 * refused one at a time, the time-order rules, local times across a clock
 * change, the root's own points only, whitespace around values, and
 * messages without raw control characters. Fixtures in tests/data/bad/
 * (docs/formats.md gives the rules checked here). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "hypsolev/hypsolev.h"
#include "reader_common.h"

#define BAD HYP_SOURCE_DIR "/tests/data/bad/"
/* 2026-06-18T06:50:00Z, the first time of the generated tracks (GNU date:
 * date -u -d 2026-06-18T06:50:00Z +%s) */
#define T0 1781765400.0

/* Messages of a level whose printed form ("file:line: text", as
 * hyp_msgs_write composes it from the structured fields) holds needle. */
static size_t count_msgs(const hyp_msgs *m, hyp_level level, const char *needle)
{
    size_t n = 0;
    for (size_t i = 0; i < m->count; i++) {
        const hyp_msg *it = &m->items[i];
        char full[2400];
        if (it->file && it->line)
            snprintf(full, sizeof full, "%s:%u: %s", it->file, it->line, it->text);
        else if (it->file)
            snprintf(full, sizeof full, "%s: %s", it->file, it->text);
        else
            snprintf(full, sizeof full, "%s", it->text);
        n += it->level == level && (!needle || strstr(full, needle));
    }
    return n;
}

/* No message holds a raw control character. */
static void assert_clean_msgs(const hyp_msgs *m, const hyp_error *err)
{
    for (size_t i = 0; i < m->count; i++)
        for (const char *p = m->items[i].text; *p; p++)
            assert_true((unsigned char)*p >= 0x20 && *p != 0x7f);
    if (err)
        for (const char *p = err->message; *p; p++)
            assert_true((unsigned char)*p >= 0x20 && *p != 0x7f);
}

static hyp_status read_gpx(const char *path, hyp_gpx_doc *d, hyp_msgs *m, hyp_error *err)
{
    hyp_read_opts o;
    hyp_read_opts_init(&o);
    hyp_gpx_doc_init(d);
    hyp_msgs_init(m);
    hyp_status st = hyp_gpx_read(path, &o, d, m, err);
    assert_clean_msgs(m, st ? err : NULL);
    return st;
}

/* One time three hours ahead in 120 points: that point alone is refused,
 * with one warning naming its line; the rest stay in file order. */
static void test_time_outlier(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "time_outlier.gpx", &d, &m, &err), HYP_OK);
    assert_int_equal(d.pts.count, 120);
    assert_null(d.pt_series);
    assert_int_equal(hyp_series_count_flag(&d.pts, HYP_SAMPLE_OK), 119);
    assert_int_equal(d.pts.flag[40], HYP_SAMPLE_TIME_OUTLIER);
    assert_int_equal(hyp_series_line(&d.pts, 40), 44);
    assert_int_equal(count_msgs(&m, HYP_WARNING, NULL), 1);
    assert_int_equal(count_msgs(&m, HYP_WARNING, "time_outlier.gpx:44: time 2026-06-18T10:10:00Z is far out of line"), 1);
    /* the file's time went back once, after the outlier: kept for inspection */
    assert_int_equal(d.pts.n_time_back, 1);
    assert_int_equal(d.pts.time_back[0].line, 45);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
}

/* A reversed track: every point kept, in time order, one note; the map
 * back to file order is the reversal. */
static void test_reversed(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "reversed_track.gpx", &d, &m, &err), HYP_OK);
    assert_int_equal(d.pts.count, 120);
    assert_int_equal(hyp_series_count_flag(&d.pts, HYP_SAMPLE_OK), 120);
    assert_int_equal(d.pts.time_sorted, 1);
    assert_non_null(d.pt_series);
    for (size_t i = 0; i < 120; i++) {
        assert_true(d.pts.time_s[i] == T0 + 30.0 * (double)i);
        assert_int_equal(hyp_series_line(&d.pts, i), 4 + 119 - i);   /* the file's lines, kept */
        assert_int_equal(d.pt_series[i], 119 - i);
    }
    assert_int_equal(count_msgs(&m, HYP_WARNING, NULL), 0);
    assert_int_equal(count_msgs(&m, HYP_NOTE, "119 times go back in the file"), 1);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
}

/* A time repeated is a duplicate: the later one in the file is refused
 * with a note; a swapped pair is sorted, both kept. */
static void test_duplicates_and_swaps(void **state)
{
    (void)state;
    hyp_series s;
    hyp_series_init(&s);
    double t[8] = {0, 60, 120, 120, 240, 180, 300, 360};
    for (int i = 0; i < 8; i++)
        hyp_series_push(&s, T0 + t[i], 92000.0, NAN, NAN, NAN, NAN, NAN, (uint32_t)i + 2, HYP_SAMPLE_OK);
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    uint32_t *order;
    assert_int_equal(hyp__check_order("x.csv", &s, &order, &m, &err), HYP_OK);
    assert_non_null(order);
    /* the swapped 240/180 (lines 6, 7) sorted; line 5 (120 again) refused */
    uint32_t want_line[8] = {2, 3, 4, 5, 7, 6, 8, 9};
    for (size_t i = 0; i < 8; i++)
        assert_int_equal(hyp_series_line(&s, i), want_line[i]);
    assert_int_equal(s.flag[3], HYP_SAMPLE_TIME_DUPLICATE);
    assert_int_equal(hyp_series_count_flag(&s, HYP_SAMPLE_OK), 7);
    assert_int_equal(count_msgs(&m, HYP_NOTE, "x.csv:5: time 2026-06-18T06:52:00Z is the same as line 4's"), 1);
    assert_int_equal(count_msgs(&m, HYP_NOTE, "1 time goes back in the file (the first at line 7"), 1);
    free(order);
    hyp_series_free(&s);
    hyp_msgs_free(&m);
}

/* A shuffled log has no "outliers": its median step is large, so it is
 * sorted whole and every sample kept. */
static void test_shuffled(void **state)
{
    (void)state;
    hyp_series s;
    hyp_series_init(&s);
    size_t n = 200;
    for (size_t i = 0; i < n; i++) {
        size_t k = (i * 73) % n;   /* 73 is prime to 200: a permutation */
        hyp_series_push(&s, T0 + 10.0 * (double)k, 92000.0, NAN, NAN, NAN, NAN, NAN, (uint32_t)i + 2, HYP_SAMPLE_OK);
    }
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    assert_int_equal(hyp__check_order("x.csv", &s, NULL, &m, &err), HYP_OK);
    assert_int_equal(hyp_series_count_flag(&s, HYP_SAMPLE_OK), n);
    for (size_t i = 0; i < n; i++)
        assert_true(s.time_s[i] == T0 + 10.0 * (double)i);
    hyp_series_free(&s);
    hyp_msgs_free(&m);
}

/* <ele>1e39</ele> overflows float: the height is refused (NaN, a warning
 * with the line), the point and its pressure kept. */
static void test_ele_refused(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "ele_1e39.gpx", &d, &m, &err), HYP_OK);
    assert_int_equal(hyp_series_count_flag(&d.pts, HYP_SAMPLE_OK), 120);
    assert_true(isnan(d.pts.ele_m[50]));
    assert_true(isfinite(d.pts.pressure_pa[50]));
    for (size_t i = 0; i < d.pts.count; i++)
        assert_true(i == 50 || isfinite(d.pts.ele_m[i]));
    assert_int_equal(count_msgs(&m, HYP_WARNING, "ele_1e39.gpx:54: ele \"1e39\" is out of range"), 1);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
}

/* Pressures in Pa among hPa and "nan": 84 of 120 refused, the read fails
 * and counts them by reason; the Pa values are named. */
static void test_most_refused(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "refused_70.gpx", &d, &m, &err), HYP_ERR_NODATA);
    assert_non_null(strstr(err.message, "84 of 120 samples with a time and a pressure refused (70 %)"));
    assert_non_null(strstr(err.message, "60 pressure outside 300-1100 hPa, 24 pressure not a finite number"));
    assert_non_null(strstr(err.message, "fit Pa: is the unit label wrong?"));
    hyp_msgs_free(&m);
}

/* The points of a <gpx> nested inside <metadata><time> are not the track's. */
static void test_nested_document(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "nested_gpx.gpx", &d, &m, &err), HYP_OK);
    assert_int_equal(d.pts.count, 20);
    assert_true(d.pts.time_s[0] == T0);
    assert_int_equal(d.layout.meta_kind, 2);
    assert_int_equal(count_msgs(&m, HYP_NOTE, "1 <trkpt> or <rtept> elements outside gpx/trk/trkseg and gpx/rte"), 1);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
}

/* Whitespace around numbers and times (xsd:decimal and xsd:dateTime
 * collapse it) is read as the value. */
static void test_whitespace(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "whitespace.gpx", &d, &m, &err), HYP_OK);
    assert_int_equal(d.pts.count, 3);
    assert_true(fabs(hyp_series_lat(&d.pts, 0) - 46.8) < 1e-9);
    assert_true(fabs(hyp_series_lon(&d.pts, 0) - 9.9) < 1e-9);
    assert_true(d.pts.ele_m[0] == 812.5f);
    assert_true(d.pts.ele_m[1] == 812.0f);
    assert_true(d.pts.time_s[0] == T0 + 600.0);
    assert_true(d.pts.time_s[1] == T0 + 630.0);
    assert_true(d.pts.pressure_pa[0] == 92305.0f && d.pts.pressure_pa[1] == 92305.0f);
    assert_int_equal(m.count, 0);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
}

/* A found value with a newline is shown escaped. */
static void test_escaped_message(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_msgs m;
    hyp_error err;
    assert_int_equal(read_gpx(BAD "newline_in_time.gpx", &d, &m, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, "<time> \"2026-06-18\\n07:00:00Z\" is not an ISO 8601 time"));
    hyp_msgs_free(&m);
    char q[32];
    assert_string_equal(hyp__quote(q, sizeof q, "a\tb\x01\"\\", 6), "a\\tb\\x01\\\"\\\\");
    assert_string_equal(hyp__quote(q, sizeof q, "\xc2\x85x", 3), "\\u0085x");   /* U+0085, a C1 control */
    assert_string_equal(hyp__quote(q, 8, "abcdefghij", 10), "abcd...");
    assert_string_equal(hyp__quote(q, 8, "ab\xc3\xa9\xc3\xa9xyz", 9), "ab\xc3\xa9...");   /* never half a character */
}

/* The number parser: blanks of XML around a number, and names of
 * non-finite numbers told apart from text that is no number. */
static void test_parse_number(void **state)
{
    (void)state;
    double v;
    assert_int_equal(hyp__parse_number("\n 812.5 \r\n", 10, 0, &v), 1);
    assert_true(v == 812.5);
    assert_int_equal(hyp__parse_number("nan", 3, 0, &v), 3);
    assert_int_equal(hyp__parse_number("-Infinity", 9, 0, &v), 3);
    assert_int_equal(hyp__parse_number("1e999", 5, 0, &v), 3);
    assert_true(isnan(v));
    assert_int_equal(hyp__parse_number("1e39", 4, 0, &v), 1);   /* a double; float overflows */
    assert_int_equal(hyp__parse_number("1e-999", 6, 0, &v), 1);
    assert_true(v == 0.0);
    assert_int_equal(hyp__parse_number("nano", 4, 0, &v), 0);
    assert_int_equal(hyp__parse_number("81x2", 4, 0, &v), 0);
    assert_int_equal(hyp__parse_number(" \t", 2, 0, &v), 2);
}

/* A base kept in local time (Europe/Vienna) across the autumn clock change
 * of 2026-10-25 (Directive 2000/84/EC: 01:00 UTC, 03:00 CEST becomes 02:00
 * CET): 181 rows a minute apart, 23:30Z to 02:30Z, none lost, with notes. */
static void test_dst_fallback(void **state)
{
    (void)state;
    struct stat st;
    if (stat("/usr/share/zoneinfo/Europe/Vienna", &st) != 0) {
        print_message("skipped: /usr/share/zoneinfo/Europe/Vienna absent (install tzdata)\n");
        skip();
    }
    hyp_zone z;
    hyp_zone_init(&z);
    hyp_error err;
    assert_int_equal(hyp_zone_parse(&z, "Europe/Vienna", NULL, &err), HYP_OK);
    hyp_read_opts o;
    hyp_read_opts_init(&o);
    o.zone = &z;
    hyp_series s;
    hyp_series_init(&s);
    hyp_msgs m;
    hyp_msgs_init(&m);
    assert_int_equal(hyp_csv_read(BAD "dst_fallback_base.csv", &o, &s, NULL, &m, &err), HYP_OK);
    assert_int_equal(s.count, 181);
    assert_int_equal(hyp_series_count_flag(&s, HYP_SAMPLE_OK), 181);
    /* 2026-10-24T23:30:00Z: GNU date -u -d 2026-10-24T23:30:00Z +%s */
    for (size_t i = 0; i < s.count; i++)
        assert_true(s.time_s[i] == 1792884600.0 + 60.0 * (double)i);
    assert_int_equal(count_msgs(&m, HYP_NOTE, "dst_fallback_base.csv:93: the local times (read in Europe/Vienna) cross a clock change here, UTC+02:00 to UTC+01:00"), 1);
    assert_int_equal(count_msgs(&m, HYP_NOTE, "60 stamps from here on"), 1);
    assert_int_equal(count_msgs(&m, HYP_WARNING, NULL), 0);
    hyp_series_free(&s);
    hyp_msgs_free(&m);
    hyp_zone_free(&z);
}

/* hyp_series_permute moves every array and the lines. */
static void test_permute(void **state)
{
    (void)state;
    hyp_series s;
    hyp_series_init(&s);
    size_t n = 300;   /* past several 64-sample line blocks */
    for (size_t i = 0; i < n; i++)
        hyp_series_push(&s, (double)i, 90000.0 + (double)i, 280.0, 50.0, 46.0 + 1e-4 * (double)i, 9.0, (double)i,
                        (uint32_t)(10 + 3 * i), (hyp_sample_flag)(i % 3));
    uint32_t *order = malloc(n * sizeof *order);
    assert_non_null(order);
    for (size_t i = 0; i < n; i++)
        order[i] = (uint32_t)(n - 1 - i);
    assert_int_equal(hyp_series_permute(&s, order), HYP_OK);
    for (size_t i = 0; i < n; i++) {
        size_t k = n - 1 - i;
        assert_true(s.time_s[i] == (double)k);
        assert_true(s.pressure_pa[i] == (float)(90000.0 + (double)k));
        assert_true(s.ele_m[i] == (float)k);
        assert_true(fabs(hyp_series_lat(&s, i) - (46.0 + 1e-4 * (double)k)) < 1e-7);
        assert_int_equal(s.flag[i], k % 3);
        assert_int_equal(hyp_series_line(&s, i), 10 + 3 * k);
    }
    free(order);
    hyp_series_free(&s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_time_outlier),
        cmocka_unit_test(test_reversed),
        cmocka_unit_test(test_duplicates_and_swaps),
        cmocka_unit_test(test_shuffled),
        cmocka_unit_test(test_ele_refused),
        cmocka_unit_test(test_most_refused),
        cmocka_unit_test(test_nested_document),
        cmocka_unit_test(test_whitespace),
        cmocka_unit_test(test_escaped_message),
        cmocka_unit_test(test_parse_number),
        cmocka_unit_test(test_dst_fallback),
        cmocka_unit_test(test_permute),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
