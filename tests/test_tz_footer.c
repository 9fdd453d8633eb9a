/* test_tz_footer.c - TZif files made here (RFC 8536 layout) read by
 * hyp_zone_parse: the footer's POSIX TZ rule against glibc's reading of
 * the same TZ string, hand-worked rule dates, version 1 files without a
 * footer, and malformed footers refused with a message. */
#define _DEFAULT_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>

#include "hypsolev/timeparse.h"

#define DIR HYP_BINARY_DIR "/tzfooter"

static void put32(FILE *f, uint32_t v)
{
    unsigned char b[4] = {(unsigned char)(v >> 24), (unsigned char)(v >> 16), (unsigned char)(v >> 8),
                          (unsigned char)v};
    fwrite(b, 1, 4, f);
}

/* A header and data block (RFC 8536 sections 3.1, 3.2) with n transitions
 * at at_s to offsets off_s, type 0 = first_off_s, times of tsize bytes. */
static void put_block(FILE *f, char version, int tsize, size_t n, const int64_t *at_s,
                      const int32_t *off_s, int32_t first_off_s)
{
    fwrite("TZif", 1, 4, f);
    fputc(version, f);
    for (int i = 0; i < 15; i++)
        fputc(0, f);
    const uint32_t counts[6] = {0, 0, 0, (uint32_t)n, (uint32_t)n + 1, 4};   /* isut isstd leap time type char */
    for (int i = 0; i < 6; i++)
        put32(f, counts[i]);
    for (size_t i = 0; i < n; i++) {
        if (tsize == 8)
            put32(f, (uint32_t)((uint64_t)at_s[i] >> 32));
        put32(f, (uint32_t)at_s[i]);
    }
    for (size_t i = 0; i < n; i++)
        fputc((int)i + 1, f);
    for (size_t i = 0; i <= n; i++) {   /* utoff, isdst, abbreviation index */
        put32(f, (uint32_t)(i ? off_s[i - 1] : first_off_s));
        fputc(0, f);
        fputc(0, f);
    }
    fwrite("ZZZ", 1, 4, f);
}

/* Writes DIR/name: version '\0' (1, no footer) or '2', '3'...; footer
 * NULL for none at all, else written between newlines (raw_footer: as
 * given, newlines included). */
static void write_tzif(const char *name, char version, size_t n, const int64_t *at_s, const int32_t *off_s,
                       int32_t first_off_s, const char *footer, const char *raw_footer)
{
    char path[512];
    mkdir(DIR, 0777);
    snprintf(path, sizeof path, "%s/%s", DIR, name);
    FILE *f = fopen(path, "wb");
    assert_non_null(f);
    put_block(f, version, 4, n, at_s, off_s, first_off_s);
    if (version >= '2') {
        put_block(f, version, 8, n, at_s, off_s, first_off_s);
        if (raw_footer)
            fputs(raw_footer, f);
        else if (footer)
            fprintf(f, "\n%s\n", footer);
    }
    assert_int_equal(fclose(f), 0);
}

static double parse_in(const hyp_zone *z, const char *stamp)
{
    double t = -1.0;
    assert_int_equal(hyp_time_parse(stamp, z, &t), HYP_TIME_OK);
    return t;
}

/* glibc's offset (s east) at UTC instant u for the TZ in the environment. */
static int32_t glibc_off(int64_t u)
{
    time_t tt = (time_t)u;
    struct tm tm;
    assert_non_null(localtime_r(&tt, &tm));
    return (int32_t)tm.tm_gmtoff;
}

/* Footers of every shape the rule parser knows, each read from a version 3
 * file without transitions (so the footer rules all instants) and checked
 * against glibc, which reads the same string from TZ (POSIX.1-2017 8.3):
 * at every 1799 s from mid-2038 to mid-2042, the local time glibc gives
 * must be read back as that instant, or (where it occurs twice) as an
 * earlier instant glibc also gives that local time. Not here: a rule with
 * DST all year, since glibc looks only at the UTC year's changes and drops
 * DST from 00:00 UTC to the first change each New Year (test_footer_hand). */
static void test_footer_vs_glibc(void **state)
{
    (void)state;
    static const char *const footers[] = {
        "CET-1CEST,M3.5.0,M10.5.0/3",                    /* Europe/Vienna */
        "<-02>2<-01>,M3.5.0/-1,M10.5.0/0",               /* America/Nuuk: v3 negative time */
        "EET-2EEST,M3.4.4/50,M10.4.4/50",                /* Asia/Gaza: v3 hours past 24 */
        "IST-1GMT0,M10.5.0,M3.5.0/1",                    /* Europe/Dublin: DST an hour behind */
        "<+1245>-12:45<+1345>,M9.5.0/2:45,M4.1.0/3:45",  /* Pacific/Chatham: minutes, +13:45 */
        "<+1030>-10:30<+11>-11,M10.1.0,M4.1.0",          /* Australia/Lord_Howe: half-hour DST */
        "NST3:30NDT,M3.2.0,M11.1.0",                     /* America/St_Johns */
        "XXX3YYY,J60/0,59/0",                            /* made up: Jn and n around Feb 29 */
        "AAA+4:30:15BBB+3,M2.5.4/23:59:59,J300/1:02:03", /* made up: seconds, week 5 of February */
        "<+0330>-3:30",                                  /* Asia/Tehran: no DST, quoted */
    };
    const int64_t from_s = 2158963200, to_s = 2285193600;   /* 2038-06-01, 2042-06-01 (GNU date) */
    char *old_tz = getenv("TZ") ? strdup(getenv("TZ")) : NULL;
    long checks = 0, bad = 0;
    for (size_t k = 0; k < sizeof footers / sizeof *footers; k++) {
        char name[32];
        snprintf(name, sizeof name, "rule%zu", k);
        write_tzif(name, '3', 0, NULL, NULL, 0, footers[k], NULL);
        hyp_zone z;
        hyp_error err;
        hyp_zone_init(&z);
        assert_int_equal(hyp_zone_parse(&z, name, DIR, &err), HYP_OK);
        assert_true(z.has_rule);
        setenv("TZ", footers[k], 1);
        tzset();
        for (int64_t u = from_s; u < to_s; u += 1799) {
            int64_t local = u + glibc_off(u);
            time_t lt = (time_t)local;
            struct tm tm;
            char stamp[32];
            gmtime_r(&lt, &tm);
            strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%S", &tm);
            int64_t got = (int64_t)parse_in(&z, stamp);
            checks++;
            if (got == u || (got < u && got + glibc_off(got) == local))
                continue;
            if (bad++ < 10)
                print_message("TZ=%s: local %s read as %lld, glibc: %lld\n", footers[k], stamp, (long long)got,
                              (long long)u);
        }
        hyp_zone_free(&z);
    }
    if (old_tz)
        setenv("TZ", old_tz, 1);
    else
        unsetenv("TZ");
    tzset();
    free(old_tz);
    print_message("%ld instants, %ld disagree with glibc\n", checks, bad);
    assert_int_equal(bad, 0);
}

/* Worked by hand from POSIX.1-2017 section 8.3 (dates, default 02:00,
 * the time of a change in the local time before it) and RFC 8536 section
 * 3.3.1 (from memory: "EST5EDT,0/0,J365/25" is its example of DST all
 * year); epoch seconds from GNU date -u. */
static void test_footer_hand(void **state)
{
    (void)state;
    hyp_zone z;
    hyp_error err;
    hyp_zone_init(&z);
    /* DST all year: -04:00 in winter, summer and across New Year */
    write_tzif("alldst", '3', 0, NULL, NULL, -18000, "EST5EDT,0/0,J365/25", NULL);
    assert_int_equal(hyp_zone_parse(&z, "alldst", DIR, &err), HYP_OK);
    assert_true(parse_in(&z, "2040-01-15T12:00:00") == 2210256000.0);   /* 16:00Z */
    assert_true(parse_in(&z, "2040-07-15T12:00:00") == 2225980800.0);   /* 16:00Z */
    assert_true(parse_in(&z, "2040-12-31T23:30:00") == 2240623800.0);   /* 2041-01-01T03:30Z */
    assert_true(parse_in(&z, "2041-01-01T00:30:00") == 2240627400.0);   /* 04:30Z */
    /* J60 is Mar 1 in every year, n = 59 is Feb 29 in a leap year (Jan 1
     * is day 0): standard time (-03) only from 2040-02-29 00:00 (-02) to
     * 2040-03-01 00:00 (-03) */
    write_tzif("julian", '3', 0, NULL, NULL, -10800, "XXX3YYY,J60/0,59/0", NULL);
    assert_int_equal(hyp_zone_parse(&z, "julian", DIR, &err), HYP_OK);
    assert_true(parse_in(&z, "2040-02-28T12:00:00") == 2214050400.0);   /* 14:00Z, -02 */
    assert_true(parse_in(&z, "2040-02-29T12:00:00") == 2214140400.0);   /* 15:00Z, -03 */
    assert_true(parse_in(&z, "2040-03-01T12:00:00") == 2214223200.0);   /* 14:00Z, -02 */
    /* one transition (2000-01-01T00:00Z, +01 -> +02) then the footer:
     * the table before it, the footer's +03 only after it */
    const int64_t at_s[1] = {946684800};
    const int32_t off_s[1] = {7200};
    write_tzif("table_then_rule", '2', 1, at_s, off_s, 3600, "<+03>-3", NULL);
    assert_int_equal(hyp_zone_parse(&z, "table_then_rule", DIR, &err), HYP_OK);
    assert_true(parse_in(&z, "1999-06-01T12:00:00") == 928234800.0);    /* 11:00Z, +01 */
    assert_true(parse_in(&z, "2040-07-15T12:00:00") == 2225955600.0);   /* 09:00Z, +03 */
    hyp_zone_free(&z);
}

/* Version 1 files have no footer, and a version 2 file may have an empty
 * one (RFC 8536 section 3.3): the last transition's offset stays. */
static void test_footer_none(void **state)
{
    (void)state;
    const int64_t at_s[1] = {946684800};   /* 2000-01-01T00:00Z, +01 -> +02 */
    const int32_t off_s[1] = {7200};
    const char *const names[2] = {"v1", "v2_empty"};
    write_tzif("v1", '\0', 1, at_s, off_s, 3600, NULL, NULL);
    write_tzif("v2_empty", '2', 1, at_s, off_s, 3600, "", NULL);
    for (int k = 0; k < 2; k++) {
        hyp_zone z;
        hyp_error err;
        hyp_zone_init(&z);
        assert_int_equal(hyp_zone_parse(&z, names[k], DIR, &err), HYP_OK);
        assert_false(z.has_rule);
        assert_true(parse_in(&z, "1999-06-01T12:00:00") == 928234800.0);    /* 11:00Z, +01 */
        assert_true(parse_in(&z, "2040-07-15T12:00:00") == 2225959200.0);   /* 10:00Z, +02 */
        hyp_zone_free(&z);
    }
}

/* A malformed footer: HYP_ERR_VALUE, a message naming the zone file and
 * saying what was wrong, and no zone left half set. */
static void test_footer_malformed(void **state)
{
    (void)state;
    static const struct {
        char version;
        const char *footer, *raw, *says;
    } cases[] = {
        {'3', "CET-1CEST", NULL, "at its end: expected ',start,end'"},
        {'3', "CET-1CEST,M13.5.0,M10.5.0/3", NULL, "at \"13.5.0,M10.5.0/3\": expected a month 1-12"},
        {'3', "CET-1CEST,M3.6.0,M10.5.0/3", NULL, "expected '.' and a week 1-5"},
        {'3', "CET-1CEST,M3.5.7,M10.5.0/3", NULL, "weekday 0-6"},
        {'3', "CET-1CEST,J0,J300", NULL, "expected a day J1-J365"},
        {'3', "CET-1CEST,366,J300", NULL, "expected a rule date"},
        {'3', "CET-1CEST,M3.5.0/168,M10.5.0", NULL, "expected hours -167..167"},
        {'3', "CET-1CEST,M3.5.0/2:60,M10.5.0", NULL, "expected minutes 00-59"},
        {'3', "CET-1CEST,M3.5.0,M10.5.0/3x", NULL, "at \"x\": expected the end of the TZ string"},
        {'3', "<+03-3", NULL, "expected '>' closing a quoted name"},
        {'3', "<+3>-3", NULL, "at least 3 characters"},
        {'3', "CE-1", NULL, "at least 3 letters"},
        {'3', "CET-25", NULL, "expected hours 0-24"},
        {'3', "CET", NULL, "at its end: expected hours"},
        {'2', "EET-2EEST,M3.4.4/50,M10.4.4/50", NULL, "at \"50,M10.4.4/50\": expected hours 0-24"},
        {'2', "<-02>2<-01>,M3.5.0/-1,M10.5.0/0", NULL, "signed rule time needs TZif version 3"},
        {'3', NULL, "\nCET-1\tCEST\n", "footer TZ string \"CET-1?CEST\""},
        {'3', NULL, "\nCET-1", "no footer after the data"},
        {'3', NULL, "", "no footer after the data"},
    };
    for (size_t k = 0; k < sizeof cases / sizeof *cases; k++) {
        char name[32], path[512];
        snprintf(name, sizeof name, "bad%zu", k);
        snprintf(path, sizeof path, "%s/%s: ", DIR, name);
        write_tzif(name, cases[k].version, 0, NULL, NULL, 3600, cases[k].footer, cases[k].raw);
        hyp_zone z;
        hyp_error err;
        hyp_zone_init(&z);
        hyp_status st = hyp_zone_parse(&z, name, DIR, &err);
        if (st != HYP_ERR_VALUE || !strstr(err.message, path) || !strstr(err.message, cases[k].says))
            print_message("footer %zu: status %d, \"%s\"; expected \"%s\"\n", k, (int)st, err.message,
                          cases[k].says);
        assert_int_equal(st, HYP_ERR_VALUE);
        assert_non_null(strstr(err.message, path));
        assert_non_null(strstr(err.message, cases[k].says));
        assert_int_equal(z.kind, 0);
        assert_null(z.trans_s);
        hyp_zone_free(&z);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_footer_vs_glibc),
        cmocka_unit_test(test_footer_hand),
        cmocka_unit_test(test_footer_none),
        cmocka_unit_test(test_footer_malformed),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
