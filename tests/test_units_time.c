/* test_units_time.c - unit conversion and time stamps against published
 * definitions and an independent implementation (GNU date). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <string.h>
#include <sys/stat.h>

#include "hypsolev/timeparse.h"
#include "hypsolev/units.h"
#include "fmtnum.h"

#include <stdio.h>
#include <stdlib.h>

#define assert_near(a, b, tol) assert_true(fabs((a) - (b)) <= (tol))

/* NIST SP 811 (2008), Appendix B.8: 1 inHg (conventional) = 3.386389e3 Pa,
 * 1 mmHg (conventional) = 1.333224e2 Pa, 1 mbar = 100 Pa; the kelvin and
 * degree Fahrenheit relations of section B.9. */
static void test_units_convert(void **state)
{
    (void)state;
    assert_near(hyp_unit_to_si(HYP_UNIT_INHG, 1.0), 3386.389, 1e-3);
    assert_near(hyp_unit_to_si(HYP_UNIT_MMHG, 1.0), 133.3224, 1e-4);
    assert_near(hyp_unit_to_si(HYP_UNIT_MBAR, 1013.25), 101325.0, 1e-9);
    assert_near(hyp_unit_to_si(HYP_UNIT_HPA, 1013.25), 101325.0, 1e-9);
    assert_near(hyp_unit_to_si(HYP_UNIT_KPA, 101.325), 101325.0, 1e-9);
    /* 29.92 inHg is the aviation standard setting, 1013.2 hPa (ICAO Annex 5,
     * from memory) */
    assert_near(hyp_unit_to_si(HYP_UNIT_INHG, 29.92) / 100.0, 1013.2, 0.05);
    /* 760 torr is one standard atmosphere, 101325 Pa (CGPM 1954); the
     * conventional mmHg is 1.5e-7 larger than the torr (NIST SP 811 B.8), so
     * 760 mmHg = 101325.015 Pa. */
    assert_near(hyp_unit_to_si(HYP_UNIT_MMHG, 760.0), 101325.015, 0.001);
    assert_near(hyp_unit_to_si(HYP_UNIT_DEGF, 32.0), 273.15, 1e-9);
    assert_near(hyp_unit_to_si(HYP_UNIT_DEGF, 212.0), 373.15, 1e-9);
    assert_near(hyp_unit_to_si(HYP_UNIT_DEGC, -40.0), hyp_unit_to_si(HYP_UNIT_DEGF, -40.0), 1e-9);
}

static void test_units_parse(void **state)
{
    (void)state;
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "hpa"), HYP_UNIT_HPA);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "mb"), HYP_UNIT_MBAR);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "inHg"), HYP_UNIT_INHG);
    assert_int_equal(hyp_unit_parse(HYP_Q_TEMPERATURE, "\xC2\xB0" "C"), HYP_UNIT_DEGC);
    assert_int_equal(hyp_unit_parse(HYP_Q_TEMPERATURE, "K"), HYP_UNIT_K);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "K"), HYP_UNIT_NONE);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "psi"), HYP_UNIT_NONE);
}

/* Inference only where one unit fits (ranges 300-1100 hPa, -60..60 degC:
 * the readers' range checks). */
static void test_units_infer(void **state)
{
    (void)state;
    char c[128];
    assert_int_equal(hyp_unit_infer(HYP_Q_PRESSURE, 85000, 101000, c, sizeof c), HYP_UNIT_PA);
    assert_int_equal(hyp_unit_infer(HYP_Q_PRESSURE, 850, 1010, c, sizeof c), HYP_UNIT_HPA);
    assert_int_equal(hyp_unit_infer(HYP_Q_PRESSURE, 85, 101, c, sizeof c), HYP_UNIT_KPA);
    /* 700 hPa or 700 mmHg: ambiguous */
    assert_int_equal(hyp_unit_infer(HYP_Q_PRESSURE, 690, 760, c, sizeof c), HYP_UNIT_NONE);
    assert_non_null(strstr(c, "hPa"));
    assert_non_null(strstr(c, "mmHg"));
    assert_int_equal(hyp_unit_infer(HYP_Q_PRESSURE, 28.5, 30.1, c, sizeof c), HYP_UNIT_INHG);
    assert_int_equal(hyp_unit_infer(HYP_Q_TEMPERATURE, 270, 300, c, sizeof c), HYP_UNIT_K);
    assert_int_equal(hyp_unit_infer(HYP_Q_TEMPERATURE, 5, 25, c, sizeof c), HYP_UNIT_NONE);
}

/* RFC 3339 section 5.8 examples; the expected epoch seconds are GNU date's
 * (coreutils 9.1, `date -u -d STAMP +%s.%N`). */
static void test_time_rfc3339(void **state)
{
    (void)state;
    double t;
    assert_int_equal(hyp_time_parse("1985-04-12T23:20:50.52Z", NULL, &t), HYP_TIME_OK);
    assert_near(t, 482196050.52, 1e-6);
    assert_int_equal(hyp_time_parse("1996-12-19T16:39:57-08:00", NULL, &t), HYP_TIME_OK);
    assert_near(t, 851042397.0, 1e-9);
    /* a leap second is the same POSIX instant as the next second */
    assert_int_equal(hyp_time_parse("1990-12-31T23:59:60Z", NULL, &t), HYP_TIME_OK);
    assert_near(t, 662688000.0, 1e-9);
    assert_int_equal(hyp_time_parse("1937-01-01T12:00:27.87+00:20", NULL, &t), HYP_TIME_OK);
    /* GNU date prints %s.%N of a negative time as floor seconds plus a
     * positive fraction: -1041337173.87 there is -1041337173 + 0.87. */
    assert_near(t, -1041337172.13, 1e-6);
    /* ISO 8601 variants: space separator, +hhmm, +hh, no seconds */
    assert_int_equal(hyp_time_parse("1996-12-19 16:39:57-0800", NULL, &t), HYP_TIME_OK);
    assert_near(t, 851042397.0, 1e-9);
    assert_int_equal(hyp_time_parse("1996-12-20T00:39Z", NULL, &t), HYP_TIME_OK);
    assert_near(t, 851042340.0, 1e-9);
    /* Unix epoch seconds */
    assert_int_equal(hyp_time_parse("851042397.25", NULL, &t), HYP_TIME_OK);
    assert_near(t, 851042397.25, 1e-9);
}

static void test_time_bad(void **state)
{
    (void)state;
    double t;
    assert_int_equal(hyp_time_parse("2026-02-30T10:00:00Z", NULL, &t), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse("2026-13-01T10:00:00Z", NULL, &t), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse("2025-02-29T10:00:00Z", NULL, &t), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse("2024-02-29T10:00:00Z", NULL, &t), HYP_TIME_OK);
    assert_int_equal(hyp_time_parse("9999-01-01T00:00:00Z", NULL, &t), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse("2026-06-14T25:00:00Z", NULL, &t), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse("2026-06-14T10:00:00", NULL, &t), HYP_TIME_NOZONE);
    assert_int_equal(hyp_time_parse("2026-06-14T10:00:00+1", NULL, &t), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse("yesterday", NULL, &t), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse("", NULL, &t), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse("12", NULL, &t), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse("1e9", NULL, &t), HYP_TIME_SYNTAX);
}

static void test_time_fixed_zone(void **state)
{
    (void)state;
    hyp_zone z;
    hyp_zone_init(&z);
    hyp_error err;
    assert_int_equal(hyp_zone_parse(&z, "+05:30", NULL, &err), HYP_OK);
    double t;
    assert_int_equal(hyp_time_parse("1996-12-20T06:09:57", &z, &t), HYP_TIME_OK);
    assert_near(t, 851042397.0, 1e-9);
    assert_int_equal(hyp_zone_parse(&z, "+25:00", NULL, &err), HYP_ERR_VALUE);
    assert_int_equal(hyp_zone_parse(&z, "../etc/passwd", NULL, &err), HYP_ERR_VALUE);
    assert_int_equal(hyp_zone_parse(&z, "Nowhere/Atlantis", NULL, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, "Nowhere/Atlantis"));
    hyp_zone_free(&z);
}

/* Central European time per Directive 2000/84/EC: +01:00, and +02:00 from
 * the last Sunday of March to the last Sunday of October, switching at
 * 01:00 UTC (2026-03-29 and 2026-10-25). Read from Debian's tzdata. */
static void test_time_tz_database(void **state)
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
    double t;
    assert_int_equal(hyp_time_parse("2026-07-01T12:00:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 1782900000.0, 1e-9);   /* GNU date: TZ=Europe/Vienna */
    assert_int_equal(hyp_time_parse("2026-01-15T12:00:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 1768474800.0, 1e-9);
    /* 02:30 on 2026-03-29 does not exist: the offset before the gap (+01) */
    assert_int_equal(hyp_time_parse("2026-03-29T02:30:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 1774747800.0, 1e-9);   /* 01:30Z */
    /* 02:30 on 2026-10-25 happens twice: the earlier, summer time (+02) */
    assert_int_equal(hyp_time_parse("2026-10-25T02:30:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 1792888200.0, 1e-9);   /* 00:30Z */
    hyp_zone_free(&z);
}

/* After the file's last transition (2037 in Debian's tzdata) the footer
 * rule "CET-1CEST,M3.5.0,M10.5.0/3" gives the offset. Expected values from
 * `zdump -v -c 2040,2041 Europe/Vienna` (Debian libc-bin): CEST from
 * 2040-03-25 01:00 UT, CET from 2040-10-28 01:00 UT; the epoch seconds
 * from GNU date -u. */
static void test_time_tz_footer_vienna(void **state)
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
    double t;
    /* the regression: read as CET (11:00Z) before the footer was used */
    assert_int_equal(hyp_time_parse("2040-07-15T12:00:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 2225959200.0, 1e-9);   /* 2040-07-15T10:00:00Z, CEST */
    assert_int_equal(hyp_time_parse("2040-01-15T12:00:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 2210238000.0, 1e-9);   /* 11:00Z, CET */
    /* the rule's gap and overlap read as the transitions' are (timeparse.h):
     * 02:30 on 2040-03-25 does not exist: the offset before the gap (+01) */
    assert_int_equal(hyp_time_parse("2040-03-25T02:30:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 2216251800.0, 1e-9);   /* 01:30Z */
    /* 02:30 on 2040-10-28 happens twice: the earlier, summer time (+02) */
    assert_int_equal(hyp_time_parse("2040-10-28T02:30:00", &z, &t), HYP_TIME_OK);
    assert_near(t, 2234997000.0, 1e-9);   /* 00:30Z */
    hyp_zone_free(&z);
}

/* The zoned parser gives both instants of a repeated wall-clock time
 * (Europe/Vienna, Directive 2000/84/EC: 2026-10-25 01:00 UTC, 03:00 CEST
 * becomes 02:00 CET; instants from GNU date), and tells a skipped one. */
static void test_time_parse_zoned(void **state)
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
    double t;
    hyp_time_local how;
    assert_int_equal(hyp_time_parse_zoned("2026-10-25T02:30:00", &z, &t, &how), HYP_TIME_OK);
    assert_true(how.zoned && how.repeated && !how.skipped);
    assert_true(t == 1792888200.0);                /* 00:30Z (GNU date) */
    assert_true(how.second_s == 1792891800.0);     /* 01:30Z */
    assert_int_equal(how.offset_s, 7200);
    assert_int_equal(how.second_offset_s, 3600);
    assert_int_equal(hyp_time_parse_zoned("2026-03-29T02:30:00", &z, &t, &how), HYP_TIME_OK);
    assert_true(how.skipped && !how.repeated);
    assert_int_equal(hyp_time_parse_zoned("2026-06-18T07:00:00Z", &z, &t, &how), HYP_TIME_OK);
    assert_false(how.zoned);
    /* past the file's last transition, from the footer rule alike (zdump,
     * as in test_time_tz_footer_vienna): 2040-10-28 02:30 is 00:30Z, then 01:30Z */
    assert_int_equal(hyp_time_parse_zoned("2040-10-28T02:30:00", &z, &t, &how), HYP_TIME_OK);
    assert_true(how.repeated && t == 2234997000.0 && how.second_s == 2235000600.0);
    hyp_zone_free(&z);
}

static void test_time_format(void **state)
{
    (void)state;
    char b[40];
    hyp_time_format(482196050.52, b, sizeof b);
    assert_string_equal(b, "1985-04-12T23:20:50.520Z");
    hyp_time_format(1782900000.0, b, sizeof b);
    assert_string_equal(b, "2026-07-01T10:00:00Z");
    hyp_time_format(-1.0, b, sizeof b);
    assert_string_equal(b, "1969-12-31T23:59:59Z");
}

/* The writers' fixed-point formatter prints exactly what the C library's
 * printf("%.*f") prints (glibc, the reference here): exact halves in
 * binary (0.125, 2.5), values a hair either side of a half-thousandth,
 * negatives that round to zero, large values, NaN, infinities, and a
 * million pseudo-random values over twelve decades at every precision. */
static void test_fmt_fixed(void **state)
{
    (void)state;
    char a[64], b[64];
    const double fixed[] = {0.0, -0.0, 0.125, -0.125, 2.5, 0.0005, 1.0005, -1.0005, 812.4005, 0.00049999999,
                            -0.0001, 999.9995, 4294967.2955, 4294967296.5, 1e20, -3.75e-7, 179.999999995,
                            -179.123456785, 343.59738367, NAN, INFINITY, -INFINITY};
    for (size_t k = 0; k < sizeof fixed / sizeof *fixed; k++)
        for (int p = 0; p <= 9; p++) {
            hyp__fmt_fixed(a, sizeof a, fixed[k], p);
            snprintf(b, sizeof b, "%.*f", p, fixed[k]);
            if (strcmp(a, b) != 0)
                print_message("%.17g at %d: \"%s\", printf \"%s\"\n", fixed[k], p, a, b);
            assert_string_equal(a, b);
        }
    uint64_t x = 88172645463325252ull;
    for (int i = 0; i < 1000000; i++) {
        x ^= x << 13, x ^= x >> 7, x ^= x << 17;   /* xorshift64 (Marsaglia 2003) */
        double v = ((double)(x >> 11) / 9007199254740992.0 - 0.5) * pow(10.0, (double)(x % 13) - 4.0);
        int p = (int)(x >> 60) % 10;
        int n = hyp__fmt_fixed(a, sizeof a, v, p);
        snprintf(b, sizeof b, "%.*f", p, v);
        if (strcmp(a, b) != 0)
            print_message("%.17g at %d: \"%s\", printf \"%s\"\n", v, p, a, b);
        assert_string_equal(a, b);
        assert_int_equal(n, (int)strlen(b));
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_units_convert),
        cmocka_unit_test(test_units_parse),
        cmocka_unit_test(test_units_infer),
        cmocka_unit_test(test_time_rfc3339),
        cmocka_unit_test(test_time_bad),
        cmocka_unit_test(test_time_fixed_zone),
        cmocka_unit_test(test_time_tz_database),
        cmocka_unit_test(test_time_tz_footer_vienna),
        cmocka_unit_test(test_time_parse_zoned),
        cmocka_unit_test(test_time_format),
        cmocka_unit_test(test_fmt_fixed),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
