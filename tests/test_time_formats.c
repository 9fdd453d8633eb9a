/* test_time_formats.c - time stamps as exports write them (timefmt.c): a
 * table of inputs and their UTC instants, each checked against GNU date or
 * zdump (the command beside the value), the refusals, numeric dates whose
 * day/month order is decided, and the unit spellings users write. */
#define _GNU_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <math.h>
#include <string.h>
#include <sys/stat.h>

#include "hypsolev/readers.h"
#include "hypsolev/timeparse.h"
#include "hypsolev/units.h"

#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>

struct fmt_case {
    const char *zone;   /* NULL: no zone given */
    const char *fmt;
    const char *text;
    double expect_s;    /* seconds since the epoch, UTC */
};

/* Every expected value: the command that gave it, run with GNU coreutils
 * date 9.1 (Debian 12) and tzdata 2026f; zdump -v -c 2026,2027 Europe/Berlin
 * shows the changes: "Sun Mar 29 00:59:59 2026 UT = 01:59:59 CET",
 * "Sun Mar 29 01:00:00 2026 UT = 03:00:00 CEST", "Sun Oct 25 00:59:59
 * 2026 UT = 02:59:59 CEST", "Sun Oct 25 01:00:00 2026 UT = 02:00:00 CET". */
static const struct fmt_case cases[] = {
    /* date -u -d "2026-06-18 06:30:00 UTC" +%s */
    {"UTC", "%d.%m.%Y %H:%M:%S", "18.06.2026 06:30:00", 1781764200},
    /* the same instant, day and month of one digit allowed: same command */
    {"UTC", "%d.%m.%Y %H:%M", " 18.6.2026   06:30 ", 1781764200},
    /* date -u -d "2026-06-18 06:30:00.250 UTC" +%s.%N -> 1781764200.250000000 */
    {"UTC", "%d.%m.%Y %H:%M:%S", "18.06.2026 06:30:00.250", 1781764200.25},
    {"UTC", "%d.%m.%Y %H:%M:%S", "18.06.2026 06:30:00,250", 1781764200.25},
    /* date -u -d "2026-06-18 08:30:00 +0200" +%s (%z wins over the zone) */
    {"Europe/Berlin", "%Y/%m/%d %H:%M:%S %z", "2026/06/18 08:30:00 +0200", 1781764200},
    {NULL, "%Y/%m/%d %H:%M:%S%z", "2026/06/18 06:30:00Z", 1781764200},
    {NULL, "%Y/%m/%d %H:%M:%S%z", "2026/06/18 04:30:00-02:00", 1781764200},
    /* %b, any case: date -u -d "2026-06-18 06:30 UTC" +%s */
    {"UTC", "%d-%b-%Y %H:%M", "18-jun-2026 06:30", 1781764200},
    {"UTC", "%b %d %Y %H:%M", "JUN 18 2026 06:30", 1781764200},
    /* %y: date -u -d "2026-06-18 06:30:00 UTC" +%s and
     * date -u -d "1999-06-18 06:30:00 UTC" +%s -> 929687400 */
    {"UTC", "%d.%m.%y %H:%M", "18.06.26 06:30", 1781764200},
    {"UTC", "%d.%m.%y %H:%M", "18.06.99 06:30", 929687400},
    /* 12-hour clocks: date -u -d "2026-06-18 12:15 am UTC" +%s */
    {"UTC", "%m/%d/%Y %I:%M %p", "06/18/2026 12:15 AM", 1781741700},
    /* date -u -d "2026-06-18 12:15 pm UTC" +%s */
    {"UTC", "%m/%d/%Y %I:%M %p", "06/18/2026 12:15 pm", 1781784900},
    /* date -u -d "2026-06-18 01:05:07 pm UTC" +%s */
    {"UTC", "%m/%d/%Y %I:%M:%S %p", "06/18/2026 01:05:07 PM", 1781787907},
    /* date -u -d "2026-12-31 11:00:00 pm UTC" +%s */
    {"UTC", "%m/%d/%Y %I:%M:%S%p", "12/31/2026 11:00:00PM", 1798758000},
    /* daylight saving, Europe/Berlin, spring:
     * date -u -d 'TZ="Europe/Berlin" 2026-03-29 01:59:59' +%s */
    {"Europe/Berlin", "%d.%m.%Y %H:%M:%S", "29.03.2026 01:59:59", 1774745999},
    /* date -u -d 'TZ="Europe/Berlin" 2026-03-29 03:00:00' +%s */
    {"Europe/Berlin", "%d.%m.%Y %H:%M:%S", "29.03.2026 03:00:00", 1774746000},
    /* 02:30 never happened: read with the offset before the change (CET,
     * timeparse.h): date -u -d "2026-03-29 02:30:00 +0100" +%s */
    {"Europe/Berlin", "%d.%m.%Y %H:%M:%S", "29.03.2026 02:30:00", 1774747800},
    /* autumn: 02:30 happened twice, the first (CEST) is taken:
     * date -u -d 'TZ="Europe/Berlin" 2026-10-25 02:30:00 CEST' +%s */
    {"Europe/Berlin", "%d.%m.%Y %I:%M:%S %p", "25.10.2026 02:30:00 AM", 1792888200},
    /* date -u -d 'TZ="Europe/Berlin" 2026-10-25 03:00:00' +%s */
    {"Europe/Berlin", "%d.%m.%Y %H:%M:%S", "25.10.2026 03:00:00", 1792893600},
    /* a literal percent sign: same command as the first */
    {"UTC", "%%%Y-%m-%dT%H:%M", "%2026-06-18T06:30", 1781764200},
};

static void zone_of(const char *name, hyp_zone *z)
{
    hyp_error err;
    hyp_zone_init(z);
    if (name)
        assert_int_equal(hyp_zone_parse(z, name, NULL, &err), HYP_OK);
}

static int have_zoneinfo(void)
{
    struct stat st;
    return stat("/usr/share/zoneinfo/Europe/Berlin", &st) == 0;
}

static void test_format_table(void **state)
{
    (void)state;
    if (!have_zoneinfo())
        skip();
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        hyp_zone z;
        zone_of(cases[k].zone, &z);
        double t = 0.0;
        hyp_time_result r = hyp_time_parse_format(cases[k].text, cases[k].fmt, &z, &t, NULL);
        if (r != HYP_TIME_OK || fabs(t - cases[k].expect_s) > 1e-6)
            fail_msg("case %zu \"%s\" by \"%s\": result %d, %.3f s, expected %.3f s", k, cases[k].text,
                     cases[k].fmt, (int)r, t, cases[k].expect_s);
        hyp_zone_free(&z);
    }
}

/* The repeated autumn hour says so, with its second occurrence (CET):
 * date -u -d 'TZ="Europe/Berlin" 2026-10-25 02:30:00 CET' +%s -> 1792891800 */
static void test_repeated_hour(void **state)
{
    (void)state;
    if (!have_zoneinfo())
        skip();
    hyp_zone z;
    zone_of("Europe/Berlin", &z);
    hyp_time_local how;
    double t;
    assert_int_equal(hyp_time_parse_format("25.10.2026 02:30", "%d.%m.%Y %H:%M", &z, &t, &how), HYP_TIME_OK);
    assert_true(how.zoned && how.repeated && !how.skipped);
    assert_true(t == 1792888200.0);
    assert_true(how.second_s == 1792891800.0);
    assert_int_equal(how.offset_s, 7200);         /* zdump: gmtoff=7200 (CEST) */
    assert_int_equal(how.second_offset_s, 3600);  /* zdump: gmtoff=3600 (CET) */
    assert_int_equal(hyp_time_parse_format("29.03.2026 02:30", "%d.%m.%Y %H:%M", &z, &t, &how), HYP_TIME_OK);
    assert_true(how.skipped && !how.repeated);
    hyp_zone_free(&z);
}

static void test_format_refusals(void **state)
{
    (void)state;
    hyp_zone utc;
    zone_of("UTC", &utc);
    double t;
    const char *f = "%d.%m.%Y %H:%M:%S";
    /* does not match: ISO text, trailing text, a two-digit year for %Y */
    assert_int_equal(hyp_time_parse_format("2026-06-18 06:30:00", f, &utc, &t, NULL), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse_format("18.06.2026 06:30:00 x", f, &utc, &t, NULL), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse_format("18.06.26 06:30:00", f, &utc, &t, NULL), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse_format("18.06.2026", f, &utc, &t, NULL), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse_format("18-Jux-2026 06:30", "%d-%b-%Y %H:%M", &utc, &t, NULL), HYP_TIME_SYNTAX);
    assert_int_equal(hyp_time_parse_format("06/18/2026 01:05 XM", "%m/%d/%Y %I:%M %p", &utc, &t, NULL), HYP_TIME_SYNTAX);
    /* out of range: June 31 (Gregorian calendar), hour 13 on a 12-hour clock,
     * 0 o'clock on a 12-hour clock, minute 60 */
    assert_int_equal(hyp_time_parse_format("31.06.2026 06:30:00", f, &utc, &t, NULL), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse_format("06/18/2026 13:05 PM", "%m/%d/%Y %I:%M %p", &utc, &t, NULL), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse_format("06/18/2026 00:05 AM", "%m/%d/%Y %I:%M %p", &utc, &t, NULL), HYP_TIME_RANGE);
    assert_int_equal(hyp_time_parse_format("18.06.2026 06:60:00", f, &utc, &t, NULL), HYP_TIME_RANGE);
    /* no zone in the text and none given */
    assert_int_equal(hyp_time_parse_format("18.06.2026 06:30:00", f, NULL, &t, NULL), HYP_TIME_NOZONE);
    hyp_zone_free(&utc);
}

static void test_format_check(void **state)
{
    (void)state;
    char why[160];
    assert_int_equal(hyp_time_format_check("%d.%m.%Y %H:%M:%S", why, sizeof why), 0);
    assert_int_equal(hyp_time_format_check("%m/%d/%y %I:%M %p", why, sizeof why), 0);
    assert_int_equal(hyp_time_format_check("%Y-%m-%d %Q", why, sizeof why), -1);
    assert_non_null(strstr(why, "%Q"));
    assert_int_equal(hyp_time_format_check("%d.%m.%Y %I:%M", why, sizeof why), -1);
    assert_non_null(strstr(why, "without %p"));
    assert_int_equal(hyp_time_format_check("%d.%m %H:%M", why, sizeof why), -1);   /* no year */
    assert_int_equal(hyp_time_format_check("%d.%m.%Y %H:%M%", why, sizeof why), -1);
    assert_int_equal(hyp_time_format_check("", why, sizeof why), -1);
}

/* Numeric dates: which fields could be a day, and both readings. */
static void test_numeric_dates(void **state)
{
    (void)state;
    hyp_zone utc;
    zone_of("UTC", &utc);
    int a, b;
    double t;
    assert_int_equal(hyp_time_numeric_date("03.04.2026 06:30", &a, &b), 1);
    assert_int_equal(a, 3);
    assert_int_equal(b, 4);
    assert_int_equal(hyp_time_numeric_date("6/18/2026 6:30", &a, &b), 1);
    assert_int_equal(hyp_time_numeric_date("18.06.26 06:30", &a, &b), 2);   /* two-digit year */
    assert_int_equal(hyp_time_numeric_date("2026-06-18 06:30", &a, &b), 0);  /* ISO: not numeric-first */
    assert_int_equal(hyp_time_numeric_date("18.06-2026 06:30", &a, &b), 0);
    /* date -u -d "2026-06-18 06:30 UTC" +%s */
    assert_int_equal(hyp_time_parse_numeric("18.06.2026 06:30", 1, &utc, &t, NULL), HYP_TIME_OK);
    assert_true(t == 1781764200.0);
    assert_int_equal(hyp_time_parse_numeric("06/18/2026T06:30:00Z", 0, NULL, &t, NULL), HYP_TIME_OK);
    assert_true(t == 1781764200.0);
    assert_int_equal(hyp_time_parse_numeric("18.06.2026 06:30", 0, &utc, &t, NULL), HYP_TIME_RANGE);  /* month 18 */
    assert_int_equal(hyp_time_parse_numeric("18.06.2026", 1, &utc, &t, NULL), HYP_TIME_SYNTAX);
    hyp_zone_free(&utc);
}

/* Unit spellings users write: mbar, mb, millibar, blanks, any case
 * (1 mbar = 100 Pa, NIST SP 811 B.8). */
static void test_unit_spellings(void **state)
{
    (void)state;
    const char *mbar[] = {"mbar", "mb", "MB", " mb ", "millibar", "Millibars", "\tmBar "};
    for (size_t k = 0; k < sizeof mbar / sizeof mbar[0]; k++)
        assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, mbar[k]), HYP_UNIT_MBAR);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, " hPa"), HYP_UNIT_HPA);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "m b"), HYP_UNIT_NONE);
    assert_int_equal(hyp_unit_parse(HYP_Q_PRESSURE, "  "), HYP_UNIT_NONE);
    assert_int_equal(hyp_unit_parse(HYP_Q_TEMPERATURE, "mb"), HYP_UNIT_NONE);
}


/* A CSV log of the rows given, read as a rover log in UTC; the status, and
 * the error's message in err. */
static hyp_status read_csv(const char *rows, const char *fmt, hyp_series *s, hyp_msgs *m, hyp_error *err)
{
    char path[] = "/tmp/test_time_formats.XXXXXX";
    int fd = mkstemp(path);
    assert_true(fd >= 0);
    FILE *f = fdopen(fd, "w");
    assert_non_null(f);
    fputs(rows, f);
    fclose(f);
    hyp_zone utc;
    zone_of("UTC", &utc);
    hyp_read_opts o;
    hyp_read_opts_init(&o);
    o.zone = &utc;
    o.time_format = fmt;
    hyp_series_init(s);
    hyp_msgs_init(m);
    hyp_status st = hyp_csv_read(path, &o, s, NULL, m, err);
    unlink(path);
    hyp_zone_free(&utc);
    return st;
}

/* The CSV reader: numeric dates decided by the file, refused where they
 * disagree or have a short year, a date column joined to a clock time only. */
static void test_csv_dates(void **state)
{
    (void)state;
    hyp_series s;
    hyp_msgs m;
    hyp_error err;
    const char *hdr = "time,pressure [hPa],lat,lon\n";
    char rows[1024];
    /* month first, decided by line 4 (second field 18):
     * date -u -d "2026-06-03 06:30 UTC" +%s -> 1780468200 */
    snprintf(rows, sizeof rows, "%s06/03/2026 06:30,923,46.8,9.9\n06/03/2026 06:31,923,46.8,9.9\n"
             "06/18/2026 06:32,923,46.8,9.9\n", hdr);
    assert_int_equal(read_csv(rows, NULL, &s, &m, &err), HYP_OK);
    assert_true(s.time_s[0] == 1780468200.0);
    assert_true(m.count >= 1 && m.items[0].line == 4 && strstr(m.items[0].text, "month first"));
    hyp_series_free(&s);
    hyp_msgs_free(&m);
    /* one date only day first (line 2), one only month first (line 3) */
    snprintf(rows, sizeof rows, "%s18.06.2026 06:30,923,46.8,9.9\n06.18.2026 06:31,923,46.8,9.9\n"
             "05.06.2026 06:32,923,46.8,9.9\n", hdr);
    assert_int_equal(read_csv(rows, NULL, &s, &m, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, ":2: time \"18.06.2026 06:30\" is day first, but line 3's \"06.18.2026 06:31\" is month first"));
    hyp_msgs_free(&m);
    /* a two-digit year without a format */
    snprintf(rows, sizeof rows, "%s18.06.26 06:30,923,46.8,9.9\n", hdr);
    assert_int_equal(read_csv(rows, NULL, &s, &m, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, ":2: time \"18.06.26 06:30\": a year of fewer than four digits"));
    hyp_msgs_free(&m);
    /* a date column joined to a clock time; a full stamp read alone:
     * date -u -d "2026-06-18 06:30 UTC" +%s -> 1781764200 */
    snprintf(rows, sizeof rows, "date,time,pressure [hPa],lat,lon\n18.06.2026,06:30,923,46.8,9.9\n"
             "18.06.2026,2026-06-18T06:31:00Z,923,46.8,9.9\n18.06.2026,6:32,923,46.8,9.9\n");
    assert_int_equal(read_csv(rows, NULL, &s, &m, &err), HYP_OK);
    assert_true(s.count == 3 && s.time_s[0] == 1781764200.0 && s.time_s[1] == 1781764260.0 &&
                s.time_s[2] == 1781764320.0);
    hyp_series_free(&s);
    hyp_msgs_free(&m);
    /* the format names the line, the text and the format */
    snprintf(rows, sizeof rows, "%s18.06.2026 06:30,923,46.8,9.9\n2026-06-18 06:31,923,46.8,9.9\n", hdr);
    assert_int_equal(read_csv(rows, "%d.%m.%Y %H:%M", &s, &m, &err), HYP_ERR_VALUE);
    assert_non_null(strstr(err.message, ":3: time \"2026-06-18 06:31\" does not match the time format \"%d.%m.%Y %H:%M\""));
    hyp_msgs_free(&m);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_format_table),
        cmocka_unit_test(test_repeated_hour),
        cmocka_unit_test(test_format_refusals),
        cmocka_unit_test(test_format_check),
        cmocka_unit_test(test_numeric_dates),
        cmocka_unit_test(test_unit_spellings),
        cmocka_unit_test(test_csv_dates),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
