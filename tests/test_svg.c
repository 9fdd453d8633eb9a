/* test_svg.c - the SVG drawing layer: nice ticks against Heckbert's method
 * worked by hand, time ticks against GNU date, decimation against a brute
 * force oracle, text safety against the XML and Unicode rules, and whole
 * figures parsed back with libxml2 (well-formed, nothing unsafe, the data
 * recoverable from the drawing within half a pixel). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <locale.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <libxml/parser.h>
#include <libxml/xpath.h>
#include <libxml/xpathInternals.h>

#include "svg.h"

#define SVG_NS "http://www.w3.org/2000/svg"

/* ---- numbers and text ------------------------------------------------ */

static void test_number_format(void **state)
{
    (void)state;
    char s[HYP__SVG_NUM_MAX];
    /* decimal notation by hand (common practice, no source) */
    assert_int_equal(hyp__svg_fmt(s, 1234.5, 2, 0), 7);
    assert_string_equal(s, "1234.50");
    hyp__svg_fmt(s, 1234.5, 2, 1);
    assert_string_equal(s, "1234.5");
    hyp__svg_fmt(s, -0.001, 2, 1);   /* rounds to zero: no "-0" */
    assert_string_equal(s, "0");
    hyp__svg_fmt(s, -12.345678, 3, 0);
    assert_string_equal(s, "-12.346");
    hyp__svg_fmt(s, 999999.6, 1, 0);
    assert_string_equal(s, "999999.6");
    hyp__svg_fmt(s, 0.2, 1, 0);
    assert_string_equal(s, "0.2");
    hyp__svg_fmt(s, 1e300, 2, 0);    /* past 2^53: scientific */
    assert_string_equal(s, "1.00000e300");
    hyp__svg_fmt_sci(s, -2.5e-21, 1);
    assert_string_equal(s, "-2.5e-21");
    hyp__svg_fmt_sci(s, 9.996e7, 2);   /* 9.996 rounds up to 10.00: 1.00e8 */
    assert_string_equal(s, "1.00e8");
    hyp__svg_fmt_sci(s, 4.9406564584124654e-324, 2);   /* the smallest subnormal (IEEE 754 binary64) */
    assert_string_equal(s, "4.94e-324");
    /* never nan or inf: nothing is written */
    assert_int_equal(hyp__svg_fmt(s, NAN, 2, 0), 0);
    assert_string_equal(s, "");
    assert_int_equal(hyp__svg_fmt(s, -INFINITY, 2, 0), 0);
    assert_int_equal(hyp__svg_fmt_sci(s, INFINITY, 2), 0);
    /* a decimal comma locale must not change anything (the formatter uses
     * no printf); skipped where none is installed */
    const char *comma[] = {"de_DE.UTF-8", "de_DE.utf8", "fr_FR.UTF-8", "nl_NL.UTF-8"};
    int found = 0;
    for (size_t k = 0; k < sizeof comma / sizeof comma[0] && !found; k++)
        found = setlocale(LC_NUMERIC, comma[k]) != NULL;
    if (found) {
        hyp__svg_fmt(s, 1.5, 1, 0);
        assert_string_equal(s, "1.5");
        setlocale(LC_NUMERIC, "C");
    } else {
        print_message("no decimal-comma locale installed: that part of the check skipped\n");
    }
}

/* Escapes s into a fresh buffer and returns it (caller frees the buffer). */
static const char *escaped(hyp__buf *b, const char *s)
{
    hyp__buf_init(b, 0);
    assert_int_equal(hyp__svg_escape(b, s), 0);
    return b->data ? b->data : "";
}

static void test_escape(void **state)
{
    (void)state;
    hyp__buf b;
    /* XML 1.0 (5th ed.) section 2.4: & and < must be escaped; > " ' too
     * here so that the text is safe in attributes of either quote */
    assert_string_equal(escaped(&b, "</svg><script>&\"'"), "&lt;/svg&gt;&lt;script&gt;&amp;&quot;&#39;");
    hyp__buf_free(&b);
    /* The Unicode Standard, chapter 3, "U+FFFD substitution of maximal
     * subparts", table 3-8 (from memory): 61 F1 80 80 E1 80 C2 62 80 63 80
     * BF 64 becomes a FFFD FFFD FFFD b FFFD c FFFD FFFD d */
    assert_string_equal(escaped(&b, "\x61\xF1\x80\x80\xE1\x80\xC2\x62\x80\x63\x80\xBF\x64"),
                        "a\xEF\xBF\xBD\xEF\xBF\xBD\xEF\xBF\xBD"
                        "b\xEF\xBF\xBD"
                        "c\xEF\xBF\xBD\xEF\xBF\xBD"
                        "d");
    hyp__buf_free(&b);
    /* RFC 3629 section 3: overlong forms (C0 AF for '/') and surrogates
     * (ED A0 80 for U+D800) are not UTF-8: each ill-formed byte one FFFD */
    assert_string_equal(escaped(&b, "\xC0\xAF|\xED\xA0\x80|"), "\xEF\xBF\xBD\xEF\xBF\xBD|\xEF\xBF\xBD\xEF\xBF\xBD\xEF\xBF\xBD|");
    hyp__buf_free(&b);
    /* valid UTF-8 passes unchanged: e-acute, the euro sign, U+1F600 (RFC 3629 section 3 table) */
    assert_string_equal(escaped(&b, "\xC3\xA9\xE2\x82\xAC\xF0\x9F\x98\x80"), "\xC3\xA9\xE2\x82\xAC\xF0\x9F\x98\x80");
    hyp__buf_free(&b);
    /* XML 1.0 section 2.2 (Char) forbids most C0 controls; DEL, C1 and the
     * bidi override U+202E are replaced too; tab, CR and LF become spaces */
    assert_string_equal(escaped(&b, "a\x01" "b\x7F" "c\xC2\x85" "d\xE2\x80\xAE" "e\tf\ng"),
                        "a\xEF\xBF\xBD" "b\xEF\xBF\xBD" "c\xEF\xBF\xBD" "d\xEF\xBF\xBD" "e f g");
    hyp__buf_free(&b);
    assert_int_equal(hyp__svg_text_chars("h\xC3\xB6he [m]"), 8);
}

/* The cap refuses an append whole and stays refused (the behaviour buf.h
 * documents, after curl's dynbuf; common practice, no source). */
static void test_buffer_cap(void **state)
{
    (void)state;
    hyp__buf b;
    hyp__buf_init(&b, 10);
    assert_int_equal(hyp__buf_adds(&b, "0123456789"), 0);   /* exactly the cap */
    assert_int_equal(hyp__buf_addc(&b, 'x'), -1);           /* one past it: refused whole */
    assert_int_equal(b.fail, HYP__BUF_CAPPED);
    assert_int_equal(hyp__buf_adds(&b, ""), -1);            /* sticky */
    assert_string_equal(b.data, "0123456789");
    hyp__buf_truncate(&b, 4);
    assert_int_equal(hyp__buf_adds(&b, "ab"), 0);
    assert_string_equal(b.data, "0123ab");
    hyp__buf_free(&b);
}

/* ---- colours ---------------------------------------------------------- */

/* Relative luminance of an sRGB colour "#rrggbb": W3C WCAG 2.x definition
 * (sRGB transfer function of IEC 61966-2-1, Rec. 709 weights). */
static double luminance(const char *hex)
{
    double y = 0;
    const double w[3] = {0.2126, 0.7152, 0.0722};
    for (int c = 0; c < 3; c++) {
        char two[3] = {hex[1 + 2 * c], hex[2 + 2 * c], 0};
        double v = (double)strtol(two, NULL, 16) / 255.0;
        v = v <= 0.03928 ? v / 12.92 : pow((v + 0.055) / 1.055, 2.4);
        y += w[c] * v;
    }
    return y;
}

static void test_colours(void **state)
{
    (void)state;
    /* Okabe & Ito (2002) RGB values (from memory): blue 0,114,178;
     * vermillion 213,94,0; bluish green 0,158,115; yellow 240,228,66 */
    assert_string_equal(hyp__svg_colour(0), "#0072B2");
    assert_string_equal(hyp__svg_colour(1), "#D55E00");
    assert_string_equal(hyp__svg_colour(2), "#009E73");
    assert_string_equal(hyp__svg_colour(7), "#F0E442");
    assert_string_equal(hyp__svg_colour(8), hyp__svg_colour(0));
    /* the first four series differ in dash pattern too (not colour alone) */
    for (int a = 0; a < 4; a++)
        for (int b = a + 1; b < 4; b++)
            assert_string_not_equal(hyp__svg_dash(a), hyp__svg_dash(b));
    /* viridis ends: #440154 and #FDE725 (R viridisLite, from memory) */
    char c[8];
    hyp__svg_seq_colour(0, c);
    assert_string_equal(c, "#440154");
    hyp__svg_seq_colour(1, c);
    assert_string_equal(c, "#FDE725");
    hyp__svg_seq_colour(-3, c);
    assert_string_equal(c, "#440154");
    hyp__svg_seq_colour(NAN, c);
    assert_string_equal(c, "#999999");
    /* what makes it print in greyscale: luminance rises strictly along the
     * scale (viridis was designed with monotonic lightness, van der Walt &
     * Smith 2015), here in 100 steps */
    double prev = -1;
    for (int i = 0; i <= 100; i++) {
        hyp__svg_seq_colour(i / 100.0, c);
        double y = luminance(c);
        assert_true(y > prev);
        prev = y;
    }
}

/* ---- nice ticks -------------------------------------------------------- */

/* The properties every tick set must have (the brief's rules; labels
 * checked with strtod in the C locale). */
static void check_ticks(double lo, double hi, int target, const hyp__ticks *t, int strict_count)
{
    assert_true(t->mant == 1 || t->mant == 2 || t->mant == 5);
    assert_true(fabs(t->step - t->mant * pow(10.0, t->exp10)) <= 1e-12 * t->step);
    double first = hyp__ticks_value(t, 0), last = hyp__ticks_value(t, t->count - 1);
    assert_true(first <= lo + 1e-6 * t->step);
    assert_true(last >= hi - 1e-6 * t->step);
    if (strict_count)
        assert_true(abs(t->count - target) <= 2);
    char prev[HYP__SVG_NUM_MAX] = "";
    for (int i = 0; i < t->count; i++) {
        char label[HYP__SVG_NUM_MAX], date[16];
        hyp__ticks_label(t, i, label, date);
        assert_true(strlen(label) >= 1 && strlen(label) <= 16);
        assert_string_not_equal(label, prev);   /* ticks rise, so distinct neighbours mean all distinct */
        double v = strtod(label, NULL), tv = hyp__ticks_value(t, i);
        assert_true(fabs(v - tv) <= 0.5 * t->step * 1e-3 + 1e-12 * fabs(tv));
        strcpy(prev, label);
    }
}

static void test_ticks_heckbert(void **state)
{
    (void)state;
    hyp__ticks t;
    hyp_error err;
    /* Heckbert (1990), loose labelling, worked by hand for nticks = 5:
     * range = nicenum(hi - lo, false); d = nicenum(range / 4, true);
     * graphmin = floor(lo / d) d; graphmax = ceil(hi / d) d;
     * nfrac = max(-floor(log10 d), 0). */

    /* [0, 1]: range = nicenum(1) = 1; 1 / 4 = 0.25 = 2.5e-1, 2.5 < 3 -> 2,
     * d = 0.2; ticks 0 .. 1 (6, i.e. 5 intervals); nfrac = 1 */
    assert_int_equal(hyp__ticks_nice(0, 1, 5, &t, &err), HYP_OK);
    assert_int_equal(t.mant, 2);
    assert_int_equal(t.exp10, -1);
    assert_true(hyp__ticks_value(&t, 0) == 0.0);
    assert_int_equal(t.count, 6);
    assert_true(hyp__ticks_value(&t, 5) == 1.0);
    assert_int_equal(t.decimals, 1);
    check_ticks(0, 1, 5, &t, 1);

    /* [812.3, 1456.9]: span 644.6 = 6.446e2 > 5 -> range 1000; 1000 / 4 =
     * 250 = 2.5e2 -> d = 200; floor(812.3 / 200) = 4 -> 800, ceil(1456.9 /
     * 200) = ceil(7.2845) = 8 -> 1600: 800, 1000, .., 1600 (5); nfrac 0 */
    assert_int_equal(hyp__ticks_nice(812.3, 1456.9, 5, &t, &err), HYP_OK);
    assert_true(t.step == 200.0);
    assert_true(hyp__ticks_value(&t, 0) == 800.0);
    assert_int_equal(t.count, 5);
    assert_int_equal(t.decimals, 0);
    check_ticks(812.3, 1456.9, 5, &t, 1);

    /* [-3.2, 2.7]: span 5.9 > 5 -> range 10; 10 / 4 = 2.5 -> d = 2;
     * floor(-1.6) = -2 -> -4, ceil(1.35) = 2 -> 4: -4 .. 4 (5); nfrac 0 */
    assert_int_equal(hyp__ticks_nice(-3.2, 2.7, 5, &t, &err), HYP_OK);
    assert_true(t.step == 2.0);
    assert_true(hyp__ticks_value(&t, 0) == -4.0);
    assert_int_equal(t.count, 5);
    check_ticks(-3.2, 2.7, 5, &t, 1);

    /* [1e6 - 0.5, 1e6 + 0.5]: span 1 -> range 1, d = 0.2;
     * floor(999999.5 / 0.2) = floor(4999997.5) = 4999997 -> 999999.4,
     * ceil(1000000.5 / 0.2) = 5000003 -> 1000000.6: 7 ticks; nfrac 1 */
    assert_int_equal(hyp__ticks_nice(1e6 - 0.5, 1e6 + 0.5, 5, &t, &err), HYP_OK);
    assert_true(t.step == 0.2);
    assert_int_equal(t.count, 7);
    assert_int_equal(t.decimals, 1);
    char label[HYP__SVG_NUM_MAX], date[16];
    hyp__ticks_label(&t, 0, label, date);
    assert_string_equal(label, "999999.4");
    hyp__ticks_label(&t, 6, label, date);
    assert_string_equal(label, "1000000.6");
    check_ticks(1e6 - 0.5, 1e6 + 0.5, 5, &t, 1);

    /* [105, 543]: span 438 -> range 500; 500 / 4 = 125 = 1.25e2, < 1.5 ->
     * d = 100; 100 .. 600 (6) */
    assert_int_equal(hyp__ticks_nice(105, 543, 5, &t, &err), HYP_OK);
    assert_true(t.step == 100.0);
    assert_true(hyp__ticks_value(&t, 0) == 100.0);
    assert_int_equal(t.count, 6);
}

static void test_ticks_table(void **state)
{
    (void)state;
    /* spans from 0.01 to 1e6, negative ranges, offsets (the brief's
     * cases; a pressure range in Pa; a height range in m) */
    static const struct { double lo, hi; int target; } cases[] = {
        {0, 0.01, 5},           {0.003, 0.013, 5},     {-0.004, -0.001, 5}, {0, 1e6, 5},
        {-1e6, 1e6, 6},         {101075, 101405, 6},   {812.3, 1456.9, 4},  {-3.2, 2.7, 7},
        {1e6 - 0.5, 1e6 + 0.5, 3}, {2999.99, 3000.01, 5}, {-47.5, -12.25, 6}, {0.1, 0.35, 2},
        {1e12 - 3, 1e12 + 4, 5}, {123456.789, 654321.987, 5},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        hyp__ticks t;
        hyp_error err;
        assert_int_equal(hyp__ticks_nice(cases[k].lo, cases[k].hi, cases[k].target, &t, &err), HYP_OK);
        check_ticks(cases[k].lo, cases[k].hi, cases[k].target, &t, cases[k].target >= 3);
        /* labels are not over-long: no more decimals than the step needs */
        assert_int_equal(t.decimals, t.exp10 < 0 ? -t.exp10 : 0);
    }
}

static uint64_t rng_next(uint64_t *x)
{
    *x ^= *x << 13, *x ^= *x >> 7, *x ^= *x << 17;   /* xorshift64 (Marsaglia 2003) */
    return *x;
}

static double uniform(uint64_t *x)
{
    return (double)(rng_next(x) >> 11) / 9007199254740992.0;
}

/* Random spans over 10^-2 .. 10^6 at random offsets: within target +- 2
 * for targets 3..7; above, steps 2 to 2.5 apart cannot always reach that,
 * and the count must then be the nearest any 1-2-5 step gives. */
static void test_ticks_random(void **state)
{
    (void)state;
    uint64_t r = 12345;
    for (int k = 0; k < 20000; k++) {
        double span = pow(10.0, -2 + 8 * uniform(&r)), lo = (uniform(&r) - 0.5) * 2e3 * (k % 3 ? 1 : 1e3);
        int target = 3 + (int)(rng_next(&r) % 10);
        hyp__ticks t;
        hyp_error err;
        assert_int_equal(hyp__ticks_nice(lo, lo + span, target, &t, &err), HYP_OK);
        check_ticks(lo, lo + span, target, &t, target <= 7);
        if (target > 7 && abs(t.count - target) > 2) {
            for (int m = 1; m <= 5; m = m == 1 ? 2 : m + 3)   /* every nice step near it */
                for (int e = t.exp10 - 1; e <= t.exp10 + 1; e++) {
                    double s = m * pow(10.0, e);
                    int c = (int)(ceil((lo + span) / s - 1e-6) - floor(lo / s + 1e-6) + 1);
                    assert_true(abs(c - target) >= abs(t.count - target));
                }
        }
    }
}

static void test_ticks_degenerate(void **state)
{
    (void)state;
    hyp__ticks t;
    hyp_error err;
    /* zero spans are opened (common practice, no source): the value stays
     * inside, and the ticks keep their properties */
    const double flat[] = {0.0, 1013.25, -5.0, 1e6, 3e-7};
    for (size_t k = 0; k < sizeof flat / sizeof flat[0]; k++) {
        assert_int_equal(hyp__ticks_nice(flat[k], flat[k], 5, &t, &err), HYP_OK);
        assert_true(t.count >= 2);
        check_ticks(flat[k], flat[k], 5, &t, 1);
        assert_true(hyp__ticks_value(&t, 0) < flat[k] && hyp__ticks_value(&t, t.count - 1) > flat[k]);
    }
    /* a span below what labels could resolve next to 1e6 */
    assert_int_equal(hyp__ticks_nice(1e6, 1e6 + 1e-12, 5, &t, &err), HYP_OK);
    check_ticks(1e6, 1e6 + 1e-12, 5, &t, 1);
    /* tiny and huge values get scientific labels, still distinct */
    assert_int_equal(hyp__ticks_nice(1e-20, 3e-20, 5, &t, &err), HYP_OK);
    assert_true(t.sci);
    check_ticks(1e-20, 3e-20, 5, &t, 1);
    assert_int_equal(hyp__ticks_nice(2e17, 9e17, 5, &t, &err), HYP_OK);
    assert_true(t.sci);
    check_ticks(2e17, 9e17, 5, &t, 1);
    /* refused: non-finite, reversed, a span that overflows, a bad target */
    assert_int_equal(hyp__ticks_nice(NAN, 1, 5, &t, &err), HYP_ERR_VALUE);
    assert_null(strstr(err.message, "nan"));
    assert_int_equal(hyp__ticks_nice(0, INFINITY, 5, &t, &err), HYP_ERR_VALUE);
    assert_int_equal(hyp__ticks_nice(-1.5e308, 1.5e308, 5, &t, &err), HYP_ERR_VALUE);
    assert_int_equal(hyp__ticks_nice(2, 1, 5, &t, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "above the high end"));
    assert_int_equal(hyp__ticks_nice(0, 1, 40, &t, &err), HYP_ERR_USAGE);
}

/* ---- time ticks -------------------------------------------------------- */

static void expect_label(const hyp__ticks *t, int i, const char *label, const char *date)
{
    char l[HYP__SVG_NUM_MAX], d[16];
    hyp__ticks_label(t, i, l, d);
    assert_string_equal(l, label);
    assert_string_equal(d, date);
}

static void check_time_ticks(double t0, double t1, const hyp__ticks *t)
{
    /* the steps the brief allows: 1, 2, 5, 10, 15, 30 s or min, 1, 2, 3, 6,
     * 12 h, days; ticks on whole multiples of the step since 1970-01-01Z */
    static const double ok[] = {1, 2, 5, 10, 15, 30, 60, 120, 300, 600, 900, 1800, 3600, 7200, 10800, 21600, 43200};
    int allowed = fmod(t->step, 86400.0) == 0.0;
    for (size_t k = 0; k < sizeof ok / sizeof ok[0]; k++)
        allowed |= t->step == ok[k];
    assert_true(allowed);
    assert_true(hyp__ticks_value(t, 0) <= t0 && hyp__ticks_value(t, t->count - 1) >= t1);
    for (int i = 0; i < t->count; i++)
        assert_true(fmod(hyp__ticks_value(t, i), t->step) == 0.0);
}

static void test_time_ticks(void **state)
{
    (void)state;
    hyp__ticks t;
    hyp_error err;
    /* epoch seconds from GNU date: date -u -d 2024-06-21T08:13:20Z +%s */
    const double a0 = 1718957600, a1 = 1718968025;   /* 08:13:20 .. 11:07:05 */
    /* target 6: 30 min gives 08:00 .. 11:30 (8), 1 h 08:00 .. 12:00 (5),
     * 2 h 08:00 .. 12:00 (3): 1 h is nearest */
    assert_int_equal(hyp__ticks_time(a0, a1, 6, &t, &err), HYP_OK);
    check_time_ticks(a0, a1, &t);
    assert_true(t.step == 3600.0);
    assert_true(hyp__ticks_value(&t, 0) == 1718956800.0);   /* date -u -d 2024-06-21T08:00:00Z +%s */
    assert_int_equal(t.count, 5);
    expect_label(&t, 0, "08:00", "2024-06-21");
    expect_label(&t, 4, "12:00", "");

    /* across midnight into a new year: the date where the day changes */
    const double b0 = 1735683000, b1 = 1735696200;   /* 2024-12-31T22:10Z .. 2025-01-01T01:50Z (GNU date) */
    assert_int_equal(hyp__ticks_time(b0, b1, 6, &t, &err), HYP_OK);
    check_time_ticks(b0, b1, &t);
    assert_true(t.step == 3600.0);
    assert_int_equal(t.count, 5);
    expect_label(&t, 0, "22:00", "2024-12-31");
    expect_label(&t, 1, "23:00", "");
    expect_label(&t, 2, "00:00", "2025-01-01");
    expect_label(&t, 3, "01:00", "");

    /* 45 s: 10 s steps, 12:00:10 .. 12:01:00, labels with seconds */
    assert_int_equal(hyp__ticks_time(1718971210, 1718971255, 6, &t, &err), HYP_OK);
    check_time_ticks(1718971210, 1718971255, &t);
    assert_true(t.step == 10.0);
    assert_int_equal(t.count, 6);
    expect_label(&t, 0, "12:00:10", "2024-06-21");
    expect_label(&t, 5, "12:01:00", "");

    /* 2024-02-27T06:00Z .. 2024-03-08T18:00Z: 2-day steps on even days
     * since the epoch (19780 = 1708992000 / 86400 is even), through the
     * leap day: 02-27, 02-29, 03-02 .. 03-10 (7) */
    assert_int_equal(hyp__ticks_time(1709013600, 1709920800, 6, &t, &err), HYP_OK);
    check_time_ticks(1709013600, 1709920800, &t);
    assert_true(t.step == 2 * 86400.0);
    assert_int_equal(t.count, 7);
    expect_label(&t, 0, "2024-02-27", "");
    expect_label(&t, 1, "2024-02-29", "");
    expect_label(&t, 6, "2024-03-10", "");

    /* a zero span is opened, ticks stay round */
    assert_int_equal(hyp__ticks_time(1718971200, 1718971200, 6, &t, &err), HYP_OK);
    check_time_ticks(1718971200, 1718971200, &t);
    assert_true(abs(t.count - 6) <= 2);
    /* every span from seconds to years: the count near the target */
    for (double span = 3; span < 3e8; span *= 1.37) {
        assert_int_equal(hyp__ticks_time(1718957600, 1718957600 + span, 6, &t, &err), HYP_OK);
        check_time_ticks(1718957600, 1718957600 + span, &t);
        assert_true(abs(t.count - 6) <= 3);
    }
    assert_int_equal(hyp__ticks_time(-1e12, 0, 6, &t, &err), HYP_ERR_VALUE);
}

/* ---- decimation -------------------------------------------------------- */

static long column_of(double x, double lo, double hi, int w)
{
    /* the rule hyp__decimate documents */
    double c = floor((x - lo) * (w / (hi - lo)));
    return c < 0 ? 0 : c >= w ? w - 1 : (long)c;
}

static int finite_pt(const double *x, const double *y, size_t i)
{
    return isfinite(x[i]) && isfinite(y[i]);
}

/* Brute force oracle (common practice, no source): per maximal run of
 * finite points and per column, the kept points hold exactly the column's
 * min and max; runs and segments match one to one; no column keeps more
 * than 4; the global min and max survive exactly. */
static void check_decimation(const double *x, const double *y, size_t n, double lo, double hi, int w)
{
    hyp__decim d;
    hyp__decim_init(&d);
    hyp_error err;
    assert_int_equal(hyp__decimate(x, y, NULL, n, lo, hi, w, &d, &err), HYP_OK);
    double *cmin = malloc(w * sizeof *cmin), *cmax = malloc(w * sizeof *cmax);
    double *kmin = malloc(w * sizeof *kmin), *kmax = malloc(w * sizeof *kmax);
    int *kcount = malloc(w * sizeof *kcount);
    assert_non_null(cmin), assert_non_null(cmax), assert_non_null(kmin), assert_non_null(kmax), assert_non_null(kcount);
    size_t seg = 0, i = 0;
    double gmin = INFINITY, gmax = -INFINITY, kgmin = INFINITY, kgmax = -INFINITY;
    while (i < n) {
        if (!finite_pt(x, y, i)) {
            i++;
            continue;
        }
        size_t a = i;
        while (i < n && finite_pt(x, y, i))
            i++;   /* the run is [a, i) */
        assert_true(seg < d.n_seg);
        size_t s0 = seg ? d.seg_end[seg - 1] : 0, s1 = d.seg_end[seg];
        assert_true(d.idx[s0] == a && d.idx[s1 - 1] == i - 1);   /* the segment spans the run, no further */
        assert_true(s1 - s0 <= 4 * (size_t)w);
        for (int c = 0; c < w; c++)
            cmin[c] = kmin[c] = INFINITY, cmax[c] = kmax[c] = -INFINITY, kcount[c] = 0;
        for (size_t k = a; k < i; k++) {
            long c = column_of(x[k], lo, hi, w);
            cmin[c] = fmin(cmin[c], y[k]), cmax[c] = fmax(cmax[c], y[k]);
            gmin = fmin(gmin, y[k]), gmax = fmax(gmax, y[k]);
        }
        for (size_t k = s0; k < s1; k++) {
            size_t j = d.idx[k];
            assert_true(j >= a && j < i && (k == s0 || j > d.idx[k - 1]));
            long c = column_of(x[j], lo, hi, w);
            kmin[c] = fmin(kmin[c], y[j]), kmax[c] = fmax(kmax[c], y[j]), kcount[c]++;
            kgmin = fmin(kgmin, y[j]), kgmax = fmax(kgmax, y[j]);
        }
        for (int c = 0; c < w; c++) {
            assert_true(kmin[c] == cmin[c] && kmax[c] == cmax[c]);
            assert_true(kcount[c] <= 4);
        }
        seg++;
    }
    assert_int_equal(seg, d.n_seg);
    if (d.n_seg) {
        assert_true(kgmin == gmin);
        assert_true(kgmax == gmax);
    }
    free(cmin), free(cmax), free(kmin), free(kmax), free(kcount);
    hyp__decim_free(&d);
}

static void test_decimate(void **state)
{
    (void)state;
    enum { N = 200000 };
    double *x = malloc(N * sizeof *x), *y = malloc(N * sizeof *y);
    assert_non_null(x), assert_non_null(y);
    uint64_t r = 777;
    /* a random walk, uneven x with repeats */
    double t = 0, v = 0;
    for (size_t i = 0; i < N; i++) {
        t += (rng_next(&r) % 4) * 0.25;
        v += uniform(&r) - 0.5;
        x[i] = t, y[i] = v;
    }
    check_decimation(x, y, N, x[0], x[N - 1], 500);
    check_decimation(x, y, N, x[0], x[N - 1], 1);
    check_decimation(x, y, N, x[N / 3], x[N / 2], 300);   /* points outside the range: edge columns */
    /* single spikes up and down on a flat line */
    for (size_t i = 0; i < N; i++)
        x[i] = (double)i, y[i] = 0;
    y[123457] = 1e6, y[7] = -3.5, y[N - 1] = 2;
    check_decimation(x, y, N, 0, N - 1, 640);
    /* alternating */
    for (size_t i = 0; i < 10007; i++)
        y[i] = i % 2 ? 1 : -1;
    check_decimation(x, y, 10007, 0, 10006, 300);
    /* NaN gaps: long runs, single points alone between gaps, NaN in x */
    for (size_t i = 0; i < N; i++) {
        v += uniform(&r) - 0.5;
        y[i] = v;
        if (i % 37 == 0 || (i / 1000) % 7 == 3)
            y[i] = NAN;
        if (i % 37 == 2)
            y[i - 1] = NAN;   /* leaves i-2 alone between two gaps */
    }
    x[5000] = NAN;
    check_decimation(x, y, N, 0, N - 1, 640);
    /* n < W: every point kept when each has a column of its own */
    for (size_t i = 0; i < 50; i++)
        x[i] = (double)i, y[i] = sin((double)i);
    hyp__decim d;
    hyp__decim_init(&d);
    hyp_error err;
    assert_int_equal(hyp__decimate(x, y, NULL, 50, 0, 50, 600, &d, &err), HYP_OK);
    assert_int_equal(d.n_idx, 50);
    assert_int_equal(d.n_seg, 1);
    check_decimation(x, y, 50, 0, 50, 600);
    /* n = 1, n = 0, all gaps */
    assert_int_equal(hyp__decimate(x, y, NULL, 1, 0, 50, 600, &d, &err), HYP_OK);
    assert_int_equal(d.n_idx, 1);
    assert_int_equal(d.n_seg, 1);
    assert_int_equal(hyp__decimate(x, y, NULL, 0, 0, 50, 600, &d, &err), HYP_OK);
    assert_int_equal(d.n_seg, 0);
    y[0] = y[1] = NAN;
    assert_int_equal(hyp__decimate(x, y, NULL, 2, 0, 50, 600, &d, &err), HYP_OK);
    assert_int_equal(d.n_seg, 0);
    /* x going back is refused, naming the point */
    x[3] = 1.5;
    assert_int_equal(hyp__decimate(x, y, NULL, 50, 0, 50, 600, &d, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "series point 3"));
    hyp__decim_free(&d);
    free(x), free(y);
}

/* The streaming thinner against hyp__decimate itself (the oracle): for each
 * series, decimating the thinned points gives the very points, in the very
 * segments, that decimating the whole series gives. */
static void check_thin_series(const double *x, const double *y, size_t n, const hyp__thin *t, double lo, double hi,
                              int cols)
{
    hyp__decim full, part;
    hyp__decim_init(&full);
    hyp__decim_init(&part);
    hyp_error err;
    assert_int_equal(hyp__decimate(x, y, NULL, n, lo, hi, cols, &full, &err), HYP_OK);
    double *tx = malloc((t->n + 1) * sizeof *tx), *ty = malloc((t->n + 1) * sizeof *ty);
    assert_non_null(tx), assert_non_null(ty);
    for (size_t k = 0; k < t->n; k++) {
        tx[k] = t->pts[k].x, ty[k] = y[t->pts[k].i];
        assert_true(tx[k] == x[t->pts[k].i] || (isnan(tx[k]) && isnan(x[t->pts[k].i])));   /* x kept as given */
    }
    assert_int_equal(hyp__decimate(tx, ty, NULL, t->n, lo, hi, cols, &part, &err), HYP_OK);
    assert_int_equal(part.n_seg, full.n_seg);
    assert_int_equal(part.n_idx, full.n_idx);
    for (size_t k = 0; k < full.n_idx; k++)
        assert_int_equal(t->pts[part.idx[k]].i, full.idx[k]);
    for (size_t s = 0; s < full.n_seg; s++)
        assert_int_equal(part.seg_end[s], full.seg_end[s]);
    free(tx), free(ty);
    hyp__decim_free(&full);
    hyp__decim_free(&part);
}

static void test_thin(void **state)
{
    (void)state;
    enum { N = 100000, S = 3 };
    double *x = malloc(N * sizeof *x), *y[S];
    assert_non_null(x);
    uint64_t r = 4242;
    double t = 0, v[S] = {0, 0, 0};
    for (int k = 0; k < S; k++)
        assert_non_null(y[k] = malloc(N * sizeof *y[k]));
    for (size_t i = 0; i < N; i++) {
        t += (rng_next(&r) % 4) * 0.25;   /* uneven steps with repeats */
        x[i] = t;
        for (int k = 0; k < S; k++) {
            v[k] += uniform(&r) - 0.5;
            y[k][i] = v[k];
        }
        if (i % 997 == 5 || (i / 3000) % 9 == 4)
            y[0][i] = NAN;            /* gaps of series 0 alone */
        if (i % 53 == 0)
            y[1][i] = y[1][i] * 1e3;  /* spikes */
        if (i % 41 == 3)
            y[2][i] = NAN, y[2][i + 2 < N ? i + 2 : i] = NAN;   /* points alone between gaps */
    }
    x[777] = NAN;   /* a gap of every series */
    y[1][60000] = INFINITY;
    int cols_list[3] = {640, 1, 97};
    for (int c = 0; c < 3; c++) {
        double lo = c == 2 ? x[N / 4] : x[0], hi = c == 2 ? x[N / 2] : x[N - 1];   /* c = 2: points outside the range */
        hyp__thin th;
        hyp_error err;
        assert_int_equal(hyp__thin_begin(&th, S, lo, hi, cols_list[c], &err), HYP_OK);
        for (size_t i = 0; i < N; i++) {
            double yy[S] = {y[0][i], y[1][i], y[2][i]};
            assert_int_equal(hyp__thin_add(&th, i, x[i], yy, &err), HYP_OK);
        }
        assert_int_equal(hyp__thin_end(&th, &err), HYP_OK);
        for (size_t k = 1; k < th.n; k++)
            assert_true(th.pts[k].i > th.pts[k - 1].i);
        if (c == 0)   /* far fewer than the whole: at most 4 a column and series, and the gaps */
            assert_true(th.n < N / 4);
        for (int k = 0; k < S; k++)
            check_thin_series(x, y[k], N, &th, lo, hi, cols_list[c]);
        hyp__thin_free(&th);
    }
    /* refusals: x going back, too many series, an empty range */
    hyp__thin th;
    hyp_error err;
    double yy[1] = {0};
    assert_int_equal(hyp__thin_begin(&th, 1, 0, 10, 100, &err), HYP_OK);
    assert_int_equal(hyp__thin_add(&th, 0, 5, yy, &err), HYP_OK);
    assert_int_equal(hyp__thin_add(&th, 1, 4, yy, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "point 1"));
    hyp__thin_free(&th);
    assert_int_equal(hyp__thin_begin(&th, HYP__THIN_SERIES + 1, 0, 10, 100, &err), HYP_ERR_USAGE);
    assert_int_equal(hyp__thin_begin(&th, 1, 3, 3, 100, &err), HYP_ERR_USAGE);
    for (int k = 0; k < S; k++)
        free(y[k]);
    free(x);
}

/* ---- whole figures ----------------------------------------------------- */

static int xml_errors;

static void count_error(void *ctx, xmlErrorPtr e)
{
    (void)ctx;
    print_message("libxml2: %s", e->message ? e->message : "?\n");
    xml_errors++;
}

/* Parses with libxml2's XML parser, no network, no entity expansion. */
static xmlDocPtr parse_svg(const hyp__buf *b)
{
    xml_errors = 0;
    xmlSetStructuredErrorFunc(NULL, count_error);
    xmlDocPtr doc = xmlReadMemory(b->data, (int)b->len, "figure.svg", NULL, XML_PARSE_NONET);
    xmlSetStructuredErrorFunc(NULL, NULL);
    assert_non_null(doc);
    assert_int_equal(xml_errors, 0);
    xmlNodePtr root = xmlDocGetRootElement(doc);
    assert_string_equal((const char *)root->name, "svg");
    assert_non_null(root->ns);
    assert_string_equal((const char *)root->ns->href, SVG_NS);
    return doc;
}

static xmlXPathObjectPtr xpath(xmlDocPtr doc, const char *expr)
{
    xmlXPathContextPtr c = xmlXPathNewContext(doc);
    xmlXPathRegisterNs(c, (const xmlChar *)"s", (const xmlChar *)SVG_NS);
    xmlXPathObjectPtr o = xmlXPathEvalExpression((const xmlChar *)expr, c);
    xmlXPathFreeContext(c);
    assert_non_null(o);
    return o;
}

static int count_nodes(xmlDocPtr doc, const char *expr)
{
    xmlXPathObjectPtr o = xpath(doc, expr);
    int n = o->nodesetval ? o->nodesetval->nodeNr : 0;
    xmlXPathFreeObject(o);
    return n;
}

static int same_ci(const char *a, const char *b, size_t k)
{
    for (size_t i = 0; i < k; i++)
        if (!a[i] || (a[i] | 32) != (b[i] | 32))
            return 0;
    return 1;
}

/* Case-insensitive substring count. */
static int count_ci(const char *hay, const char *needle)
{
    int n = 0;
    size_t k = strlen(needle);
    for (const char *p = hay; *p; p++)
        if (same_ci(p, needle, k))
            n++;
    return n;
}

/* The brief's rules for any figure: no nan or inf, no reference outside
 * the document but the SVG namespace, no script, a viewBox. */
static void check_safe(const hyp__buf *b)
{
    assert_int_equal(count_ci(b->data, "nan"), 0);
    assert_int_equal(count_ci(b->data, "inf"), 0);
    assert_int_equal(count_ci(b->data, "http:"), 1);
    assert_non_null(strstr(b->data, "xmlns=\"" SVG_NS "\""));
    assert_int_equal(count_ci(b->data, "https:"), 0);
    assert_int_equal(count_ci(b->data, "<script"), 0);
    assert_int_equal(count_ci(b->data, "href"), 0);
    assert_int_equal(count_ci(b->data, "@import"), 0);
    assert_non_null(strstr(b->data, "viewBox=\"0 0 "));
}

#define HOSTILE "</svg><script>alert(1)</script> & \"q\" 'a' \xC3\x28 \x01 \xE2\x80\xAE end"
/* what libxml2 must read back: the markup as text, bad bytes as U+FFFD */
#define HOSTILE_READ "</svg><script>alert(1)</script> & \"q\" 'a' \xEF\xBF\xBD( \xEF\xBF\xBD \xEF\xBF\xBD end"

/* Draws one of each kind; with `strict` every call must succeed, else
 * only the end's status is reported (a figure past its cap). */
static void check_call(hyp_status st, int strict)
{
    if (strict)
        assert_int_equal(st, HYP_OK);
}

static hyp_status draw_everything(hyp__buf *b, int strict)
{
    enum { N = 3000 };
    static double t[N], h[N], lo[N], hi[N], h2[N];
    const double t0 = 1718957600;   /* 2024-06-21T08:13:20Z (GNU date) */
    for (int i = 0; i < N; i++) {
        t[i] = t0 + 3.0 * i;
        h[i] = 850 + 40 * sin(i / 300.0) + (i == 1234 ? 25 : 0);
        lo[i] = h[i] - 4 - 2 * cos(i / 100.0), hi[i] = h[i] + 4 + 2 * cos(i / 100.0);
        h2[i] = h[i] + 10;
        if (i >= 1500 && i < 1600)
            h[i] = lo[i] = hi[i] = NAN;   /* a gap */
        if (i % 500 == 7)
            h2[i] = INFINITY;
    }
    h2[3] = h2[5] = NAN;   /* with h2[7] infinite: points 4 and 6 alone between gaps, drawn as dots */
    hyp__svg_spec spec = {
        .id = "fig-all",
        .title = HOSTILE,
        .x = {.title = "time [UTC]", .lo = t[0], .hi = t[N - 1], .time_utc = 1},
        .y = {.title = "height [m] <&>", .lo = 790, .hi = 920},
        .colour_title = "sigma [m] \xFF",
    };
    hyp__svg f;
    hyp_error err;
    if (hyp__svg_begin(&f, b, &spec, &err)) {
        assert_false(strict);
        return hyp__svg_end(&f);
    }
    check_call(hyp__svg_band(&f, t, lo, hi, N, 0, "+-2 sigma"), strict);
    hyp__svg_style s0 = hyp__svg_style_nth(0, "height"), s1 = hyp__svg_style_nth(1, HOSTILE);
    check_call(hyp__svg_line(&f, t, h, N, &s0), strict);
    check_call(hyp__svg_line(&f, t, h2, N, &s1), strict);
    double mx[4], my[4], me[4] = {3, NAN, 0, 6};
    for (int m = 0; m < 4; m++) {
        mx[m] = t0 + 1000.0 * (m + 1), my[m] = 800 + 10 * m;
        hyp__svg_style sm = hyp__svg_style_nth(m + 2, "tie");
        sm.marker = (hyp__svg_marker)m;
        check_call(hyp__svg_markers(&f, &mx[m], &my[m], &me[m], 1, &sm), strict);
    }
    double nx[2] = {t0 + 100, NAN}, ny[2] = {NAN, 850};   /* no position: skipped, nothing written */
    check_call(hyp__svg_markers(&f, nx, ny, NULL, 2, NULL), strict);
    double cx[4] = {t0 + 500, t0 + 600, t0 + 700, NAN}, cy[4] = {900, 905, 910, 915}, cv[4] = {0.5, NAN, 2.5, 1};
    check_call(hyp__svg_points_coloured(&f, cx, cy, cv, 4, 0.5, 2.5, HYP__SVG_TRIANGLE), strict);
    double bx[2] = {t0 + 2000, t0 + 4000}, bv[6] = {5, 3, 2, 4, NAN, 1};
    const char *parts[3] = {"base", "rover", "model"};
    check_call(hyp__svg_bars(&f, bx, 2, bv, 3, 600, parts), strict);
    check_call(hyp__svg_text(&f, t0 + 3000, 880, HOSTILE, 0), strict);
    check_call(hyp__svg_text(&f, NAN, 880, "skipped", 0), strict);
    return hyp__svg_end(&f);
}

static void test_figure_well_formed(void **state)
{
    (void)state;
    hyp__buf b;
    hyp__buf_init(&b, 0);
    assert_int_equal(draw_everything(&b, 1), HYP_OK);
    check_safe(&b);
    xmlDocPtr doc = parse_svg(&b);
    /* every element kind is there */
    assert_int_equal(count_nodes(doc, "//s:g[@class='band']/s:polygon"), 2);   /* two sides of the gap */
    assert_true(count_nodes(doc, "//s:g[@class='line']/s:polyline") >= 2 + 6);
    assert_int_equal(count_nodes(doc, "//s:g[@class='line']/s:circle"), 2);     /* the lone points */
    assert_int_equal(count_nodes(doc, "//s:g[@class='markers']/s:circle"), 1);
    assert_int_equal(count_nodes(doc, "//s:g[@class='markers']/s:rect"), 1);
    assert_int_equal(count_nodes(doc, "//s:g[@class='markers']/s:polygon"), 1);
    assert_int_equal(count_nodes(doc, "//s:g[@class='markers']/s:path"), 1 + 2);   /* the cross and two error bars */
    assert_int_equal(count_nodes(doc, "//s:g[@class='coloured']/*[@fill='none']"), 1);   /* no value: hollow */
    assert_int_equal(count_nodes(doc, "//s:pattern"), 3);
    assert_int_equal(count_nodes(doc, "//s:g[@class='legend']/s:text"), 3 + 4 + 3);   /* band, 2 lines, 4 markers, 3 parts */
    assert_true(count_nodes(doc, "//s:g[@class='colourbar']/s:g[@class='ctick']") >= 2);
    assert_true(count_nodes(doc, "//s:g[@class='xtick']") >= 3);
    assert_int_equal(count_nodes(doc, "//s:text[@class='label']"), 1);
    /* hostile text came through as text */
    xmlXPathObjectPtr o = xpath(doc, "string(/s:svg/s:title)");
    assert_string_equal((const char *)o->stringval, HOSTILE_READ);
    xmlXPathFreeObject(o);
    o = xpath(doc, "string(//s:text[@class='ytitle'])");
    assert_string_equal((const char *)o->stringval, "height [m] <&>");
    xmlXPathFreeObject(o);
    /* ids carry the figure's prefix, so two figures can share a page */
    assert_int_equal(count_nodes(doc, "//*[@id and not(starts-with(@id, 'fig-all-'))]"), 0);
    xmlFreeDoc(doc);
    hyp__buf_free(&b);
}

/* A network plan: equal aspect, lines, markers, names. */
static void test_figure_plan(void **state)
{
    (void)state;
    double e[4] = {0, 850, 1200, 300}, n[4] = {0, 120, 900, 650};
    hyp__svg_spec spec = {
        .id = "plan", .width_px = 500, .height_px = 500,
        .x = {.title = "east [m]", .lo = 0, .hi = 1200},
        .y = {.title = "north [m]", .lo = 0, .hi = 900},
        .equal_aspect = 1,
    };
    hyp__buf b;
    hyp__buf_init(&b, 0);
    hyp__svg f;
    hyp_error err;
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_OK);
    double ex[2] = {0, 850}, ny[2] = {0, 120};
    assert_int_equal(hyp__svg_line(&f, ex, ny, 2, NULL), HYP_OK);
    hyp__svg_style st = hyp__svg_style_nth(1, "benchmark");
    assert_int_equal(hyp__svg_markers(&f, e, n, NULL, 4, &st), HYP_OK);
    assert_int_equal(hyp__svg_text(&f, e[2], n[2], "BM \xC3\xA9lan", 1), HYP_OK);
    assert_int_equal(hyp__svg_end(&f), HYP_OK);
    check_safe(&b);
    /* one metre as long across as up: px per unit alike on both axes (the
     * definition of equal aspect; common practice, no source) */
    double sx = (f.right_px - f.left_px) / (f.x_hi - f.x_lo), sy = (f.bottom_px - f.top_px) / (f.y_hi - f.y_lo);
    assert_true(fabs(sx - sy) < 1e-9 * sx);
    assert_true(f.x_lo <= 0 && f.x_hi >= 1200 && f.y_lo <= 0 && f.y_hi >= 900);
    xmlDocPtr doc = parse_svg(&b);
    assert_int_equal(count_nodes(doc, "//s:g[@class='legend']"), 0);   /* one labelled series: no legend */
    xmlFreeDoc(doc);
    hyp__buf_free(&b);
}

static double attr_num(xmlNodePtr n, const char *name)
{
    xmlChar *v = xmlGetProp(n, (const xmlChar *)name);
    assert_non_null(v);
    double d = strtod((const char *)v, NULL);
    xmlFree(v);
    return d;
}

/* Pixel = a + b value, fitted (least squares) to the tick marks of one
 * axis and their labels, as a reader of the figure would. */
static void axis_from_ticks(xmlDocPtr doc, const char *cls, const char *coord, double *a, double *b)
{
    char expr[64];
    snprintf(expr, sizeof expr, "//s:g[@class='%s']", cls);
    xmlXPathObjectPtr o = xpath(doc, expr);
    int n = o->nodesetval ? o->nodesetval->nodeNr : 0;
    assert_true(n >= 2);
    double sv = 0, sp = 0, svv = 0, svp = 0, px[32], val[32];
    assert_true(n <= 32);
    for (int i = 0; i < n; i++) {
        xmlNodePtr g = o->nodesetval->nodeTab[i], line = xmlFirstElementChild(g), text = xmlNextElementSibling(line);
        px[i] = attr_num(line, coord);
        xmlChar *s = xmlNodeGetContent(text);
        val[i] = strtod((const char *)s, NULL);
        xmlFree(s);
        sv += val[i], sp += px[i], svv += val[i] * val[i], svp += val[i] * px[i];
    }
    *b = (n * svp - sv * sp) / (n * svv - sv * sv);
    *a = (sp - *b * sv) / n;
    for (int i = 0; i < n; i++)   /* labels and positions agree: the ticks are linear */
        assert_true(fabs(*a + *b * val[i] - px[i]) < 0.01);
    xmlXPathFreeObject(o);
}

/* Draw known values, read the SVG back, invert the axes from their ticks
 * and labels, recover the data's extremes within half a pixel. */
static void test_figure_data_match(void **state)
{
    (void)state;
    enum { N = 20000 };
    static double x[N], y[N];
    double ymin = INFINITY, ymax = -INFINITY, x_at_max = 0;
    for (int i = 0; i < N; i++) {
        x[i] = 0.5 * i;
        y[i] = 101300 + 150 * sin(i / 900.0) + 8 * sin(i * 1.7);
        if (i == 12345)
            y[i] += 400;   /* a one-sample spike the decimation must keep */
        if (i == 777)
            y[i] -= 250;
        if (y[i] > ymax)
            ymax = y[i], x_at_max = x[i];
        ymin = fmin(ymin, y[i]);
    }
    double lo, hi;
    hyp__svg_range(y, N, &lo, &hi);
    assert_true(lo == ymin && hi == ymax);
    hyp__svg_spec spec = {
        .id = "match", .width_px = 640, .height_px = 360,
        .x = {.title = "distance [m]", .lo = x[0], .hi = x[N - 1]},
        .y = {.title = "pressure [Pa]", .lo = lo, .hi = hi},
    };
    hyp__buf b;
    hyp__buf_init(&b, 0);
    hyp__svg f;
    hyp_error err;
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_OK);
    assert_int_equal(hyp__svg_line(&f, x, y, N, NULL), HYP_OK);
    assert_int_equal(hyp__svg_end(&f), HYP_OK);
    xmlDocPtr doc = parse_svg(&b);
    double ay, by, ax, bx;
    axis_from_ticks(doc, "ytick", "y1", &ay, &by);
    axis_from_ticks(doc, "xtick", "x1", &ax, &bx);
    xmlXPathObjectPtr o = xpath(doc, "//s:g[@class='line']/s:polyline");
    assert_int_equal(o->nodesetval->nodeNr, 1);
    xmlChar *pts = xmlGetProp(o->nodesetval->nodeTab[0], (const xmlChar *)"points");
    double py_min = INFINITY, py_max = -INFINITY, px_at_top = 0;
    int count = 0;
    for (char *p = (char *)pts, *end; *p; p = end) {
        double px = strtod(p, &end);
        assert_true(*end == ',');
        double py = strtod(end + 1, &end);
        if (py < py_min)
            py_min = py, px_at_top = px;
        py_max = fmax(py_max, py);
        count++;
    }
    xmlFree(pts);
    xmlXPathFreeObject(o);
    print_message("%d of %d points drawn\n", count, N);
    assert_true(count <= 4 * 640);
    /* SVG y grows downwards: the top of the drawing is the maximum */
    double half_px_y = 0.5 / fabs(by), half_px_x = 0.5 / fabs(bx);
    assert_true(fabs((py_min - ay) / by - ymax) <= half_px_y);
    assert_true(fabs((py_max - ay) / by - ymin) <= half_px_y);
    assert_true(fabs((px_at_top - ax) / bx - x_at_max) <= half_px_x);
    xmlFreeDoc(doc);
    hyp__buf_free(&b);
}

/* The legend goes to the corner that hides the fewest drawn marks: data
 * filling the top right puts it top left; data along the top puts it at
 * the bottom (right, the first of the tied bottom corners). */
static void legend_at(const double *x, const double *y, size_t n, int want_left, int want_top)
{
    hyp__svg_spec spec = {
        .id = "leg", .width_px = 600, .height_px = 400,
        .x = {.title = "x [m]", .lo = 0, .hi = 100},
        .y = {.title = "y [m]", .lo = 0, .hi = 100},
    };
    hyp__buf b;
    hyp__buf_init(&b, 0);
    hyp__svg f;
    hyp_error err;
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_OK);
    hyp__svg_style s0 = hyp__svg_style_nth(0, "one"), s1 = hyp__svg_style_nth(1, "two");
    assert_int_equal(hyp__svg_line(&f, x, y, n, &s0), HYP_OK);
    assert_int_equal(hyp__svg_markers(&f, x, y, NULL, 1, &s1), HYP_OK);
    double left = f.left_px, right = f.right_px, top = f.top_px, bottom = f.bottom_px;
    assert_int_equal(hyp__svg_end(&f), HYP_OK);
    xmlDocPtr doc = parse_svg(&b);
    xmlXPathObjectPtr o = xpath(doc, "(//s:g[@class='legend']/s:rect)[1]");
    assert_int_equal(o->nodesetval->nodeNr, 1);
    xmlNodePtr r = o->nodesetval->nodeTab[0];
    double cx = attr_num(r, "x") + attr_num(r, "width") / 2, cy = attr_num(r, "y") + attr_num(r, "height") / 2;
    assert_int_equal(cx < (left + right) / 2, want_left);
    assert_int_equal(cy < (top + bottom) / 2, want_top);
    xmlXPathFreeObject(o);
    xmlFreeDoc(doc);
    hyp__buf_free(&b);
}

static void test_legend_place(void **state)
{
    (void)state;
    enum { N = 400 };
    double x[N], y[N];
    for (int i = 0; i < N; i++)   /* a zigzag over the top right quarter */
        x[i] = 50 + 50.0 * i / (N - 1), y[i] = i % 2 ? 100 : 50;
    legend_at(x, y, N, 1, 1);
    for (int i = 0; i < N; i++)   /* a zigzag along the top */
        x[i] = 100.0 * i / (N - 1), y[i] = i % 2 ? 100 : 70;
    legend_at(x, y, N, 0, 0);
    double ex[2] = {0, 100}, ey[2] = {0, 0};   /* nothing at the top: the default top right */
    legend_at(ex, ey, 2, 0, 1);
}

/* Failures leave nothing half-written: the buffer is cut back (the house
 * rule of STYLE.md and the preamble; curl's dynbuf refuses past its cap). */
static void test_figure_failures(void **state)
{
    (void)state;
    hyp__buf b;
    hyp__buf_init(&b, 4000);
    hyp__buf_adds(&b, "<p>before</p>");
    assert_int_equal(draw_everything(&b, 0), HYP_ERR_NOMEM);   /* far more than 4000 bytes */
    assert_string_equal(b.data, "<p>before</p>");
    assert_int_equal(b.fail, HYP__BUF_OK);
    /* a buffer that had already failed before the figure stays failed */
    hyp__buf_adds(&b, "0123456789012345678901234567890123456789012345678901234567890123456789");
    for (int k = 0; k < 100 && !b.fail; k++)
        hyp__buf_adds(&b, "0123456789012345678901234567890123456789012345678901234567890123456789");
    assert_int_equal(b.fail, HYP__BUF_CAPPED);
    size_t len = b.len;
    assert_int_equal(draw_everything(&b, 0), HYP_ERR_NOMEM);
    assert_int_equal(b.len, len);
    assert_int_equal(b.fail, HYP__BUF_CAPPED);
    hyp__buf_free(&b);

    hyp__buf_init(&b, 0);
    hyp__svg_spec spec = {.id = "bars", .x = {.lo = 0, .hi = 3}, .y = {.lo = 0, .hi = 10}};
    hyp__svg f;
    hyp_error err;
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_OK);
    double bx[2] = {1, 2}, bv[6] = {1, 2, 3, 4, 5, -6};
    assert_int_equal(hyp__svg_bars(&f, bx, 2, bv, 3, 0.5, NULL), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "stacked bar 2, part 3"));
    double lx[3] = {0, 2, 1}, ly[3] = {1, 2, 3};
    assert_int_equal(hyp__svg_line(&f, lx, ly, 3, NULL), HYP_ERR_USAGE);   /* later calls keep the first failure */
    assert_int_equal(hyp__svg_end(&f), HYP_ERR_USAGE);
    assert_int_equal(b.len, 0);
    hyp__svg_line(&f, lx, ly, 2, NULL);
    assert_int_equal(b.len, 0);

    spec.id = "1bad id";
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_ERR_USAGE);
    spec.id = "ok";
    spec.y.hi = NAN;
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_ERR_VALUE);
    assert_null(strstr(err.message, "nan"));
    assert_non_null(strstr(err.message, "figure ok, y axis: "));   /* the message says where */
    spec.y.hi = 10;
    /* two colour ranges in one figure would need two colour bars */
    double px[1] = {1}, py[1] = {1}, pv[1] = {1};
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_OK);
    assert_int_equal(hyp__svg_points_coloured(&f, px, py, pv, 1, 0, 2, HYP__SVG_CIRCLE), HYP_OK);
    assert_int_equal(hyp__svg_points_coloured(&f, px, py, pv, 1, 0, 3, HYP__SVG_CIRCLE), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "colour range differs"));
    assert_int_equal(hyp__svg_end(&f), HYP_ERR_USAGE);
    assert_int_equal(b.len, 0);
    spec.y.hi = NAN;
    spec.y.hi = 10;
    spec.width_px = 130;
    spec.height_px = 90;
    spec.y.title = "a very long axis title";
    spec.title = "a title";
    spec.x.title = "x";
    assert_int_equal(hyp__svg_begin(&f, &b, &spec, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "no room"));
    assert_int_equal(b.len, 0);
    hyp__buf_free(&b);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_number_format),
        cmocka_unit_test(test_escape),
        cmocka_unit_test(test_buffer_cap),
        cmocka_unit_test(test_colours),
        cmocka_unit_test(test_ticks_heckbert),
        cmocka_unit_test(test_ticks_table),
        cmocka_unit_test(test_ticks_random),
        cmocka_unit_test(test_ticks_degenerate),
        cmocka_unit_test(test_time_ticks),
        cmocka_unit_test(test_decimate),
        cmocka_unit_test(test_thin),
        cmocka_unit_test(test_figure_well_formed),
        cmocka_unit_test(test_figure_plan),
        cmocka_unit_test(test_figure_data_match),
        cmocka_unit_test(test_figure_failures),
        cmocka_unit_test(test_legend_place),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
