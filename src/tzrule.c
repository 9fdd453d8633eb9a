/* tzrule.c - POSIX TZ rule strings (POSIX.1-2017 section 8.3, TZ; the
 * footer of TZif files, RFC 8536 section 3.3): parsing, and the UTC offset
 * a rule gives at an instant. */
#include "tzrule.h"

#include <string.h>

/* ASCII only: the C library's ctype functions follow the locale. */
static int is_digit(char c) { return c >= '0' && c <= '9'; }
static int is_alpha(char c) { return (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z'); }

/* Reads 1 to max_digits decimal digits at *pp; -1 when none or more. */
static long read_num(const char **pp, int max_digits)
{
    const char *p = *pp;
    long v = 0;
    int k = 0;
    for (; is_digit(p[k]); k++) {
        if (k == max_digits)
            return -1;
        v = v * 10 + (p[k] - '0');
    }
    if (k == 0)
        return -1;
    *pp = p + k;
    return v;
}

/* A zone abbreviation: 3 or more letters, or 3 or more letters, digits,
 * '+' and '-' between '<' and '>' (POSIX.1-2017 section 8.3). */
static const char *read_name(const char **pp)
{
    const char *p = *pp;
    size_t n = 0;
    if (*p == '<') {
        p++;
        while (is_alpha(p[n]) || is_digit(p[n]) || p[n] == '+' || p[n] == '-')
            n++;
        if (p[n] != '>') {
            *pp = p + n;
            return "expected '>' closing a quoted name (letters, digits, '+', '-')";
        }
        if (n < 3)
            return "expected a quoted name of at least 3 characters";
        *pp = p + n + 1;
        return NULL;
    }
    while (is_alpha(p[n]))
        n++;
    if (n < 3)
        return "expected a zone abbreviation of at least 3 letters, or one in <...>";
    *pp = p + n;
    return NULL;
}

/* [+|-]hh[:mm[:ss]] into seconds; a sign only where `sign_ok`, hours up to
 * max_h, minutes and seconds 0-59. */
static const char *read_hms(const char **pp, int sign_ok, long max_h, int32_t *out_s)
{
    const char *p = *pp;
    long sign = 1;
    if (*p == '+' || *p == '-') {
        if (!sign_ok)
            return "a signed rule time needs TZif version 3 or later (RFC 8536 section 3.3.1)";
        sign = *p == '-' ? -1 : 1;
        p++;
    }
    const char *at = p;
    long h = read_num(&p, 3), m = 0, s = 0;
    if (h < 0 || h > max_h) {
        *pp = at;
        if (h < 0)
            return "expected hours";
        if (max_h > 24)
            return "expected hours -167..167";
        return sign_ok ? "expected hours 0-24"
                       : "expected hours 0-24 (rule times beyond 24 h need TZif version 3 or later)";
    }
    for (int part = 0; part < 2 && *p == ':'; part++) {
        at = ++p;
        long v = read_num(&p, 2);
        if (v < 0 || v > 59) {
            *pp = at;
            return part == 0 ? "expected minutes 00-59" : "expected seconds 00-59";
        }
        if (part == 0)
            m = v;
        else
            s = v;
    }
    *out_s = (int32_t)(sign * (h * 3600 + m * 60 + s));
    *pp = p;
    return NULL;
}

/* Mm.w.d: month 1-12, week 1-5, weekday 0-6. */
static const char *read_mwd(const char **pp, hyp_tz_date *d)
{
    static const char *const why[3] = {"expected a month 1-12 after 'M'", "expected '.' and a week 1-5",
                                       "expected '.' and a weekday 0-6 (0 Sunday)"};
    static const long lo[3] = {1, 1, 0}, hi[3] = {12, 5, 6};
    long v[3];
    const char *p = *pp;
    for (int k = 0; k < 3; k++) {
        if (k > 0 && *p++ != '.') {
            *pp = p - 1;
            return why[k];
        }
        *pp = p;
        v[k] = read_num(&p, 2);
        if (v[k] < lo[k] || v[k] > hi[k])
            return why[k];
    }
    d->kind = 'M';
    d->month = (int8_t)v[0];
    d->week = (int8_t)v[1];
    d->wday = (int8_t)v[2];
    *pp = p;
    return NULL;
}

/* Jn, n or Mm.w.d, then an optional /time (POSIX's default 02:00:00). */
static const char *read_date(const char **pp, int v3, hyp_tz_date *d)
{
    const char *p = *pp, *why = NULL;
    memset(d, 0, sizeof *d);
    if (*p == 'M') {
        p++;
        why = read_mwd(&p, d);
    } else {
        int julian = *p == 'J';
        p += julian;
        const char *at = p;
        long v = read_num(&p, 3);
        if (v < julian || v > 365) {
            p = at;
            why = julian ? "expected a day J1-J365" : "expected a rule date: Jn, n (0-365) or Mm.w.d";
        }
        d->kind = julian ? 'J' : 'D';
        d->day = (int16_t)v;
    }
    d->time_s = 7200;
    if (!why && *p == '/') {
        p++;
        why = read_hms(&p, v3, v3 ? 167 : 24, &d->time_s);
    }
    *pp = p;
    return why;
}

/* ,start[/time],end[/time] and the end of the string. */
static const char *read_rule(const char **pp, int v3, hyp_tz_rule *r)
{
    const char *why;
    if (**pp != ',')
        return **pp ? "expected ',' and the rule's start date"
                    : "expected ',start,end' after the daylight-saving name (POSIX leaves the dates of a rule-less TZ to each system)";
    (*pp)++;
    if ((why = read_date(pp, v3, &r->start)) != NULL)
        return why;
    if (**pp != ',')
        return "expected ',' and the rule's end date";
    (*pp)++;
    if ((why = read_date(pp, v3, &r->end)) != NULL)
        return why;
    return **pp ? "expected the end of the TZ string" : NULL;
}

const char *hyp__tz_rule_parse(hyp_tz_rule *r, const char **pp, int v3)
{
    const char *why;
    int32_t west_s;
    memset(r, 0, sizeof *r);
    /* POSIX offsets are west of UTC with hours 0-24 (no v3 extension) */
    if ((why = read_name(pp)) != NULL || (why = read_hms(pp, 1, 24, &west_s)) != NULL)
        return why;
    r->std_off_s = -west_s;
    if (**pp == '\0')
        return NULL;
    if ((why = read_name(pp)) != NULL)
        return why;
    r->has_dst = 1;
    r->dst_off_s = r->std_off_s + 3600;   /* POSIX: one hour ahead by default */
    if (**pp && **pp != ',') {
        if ((why = read_hms(pp, 1, 24, &west_s)) != NULL)
            return why;
        r->dst_off_s = -west_s;
    }
    return read_rule(pp, v3, r);
}

static int is_leap(int64_t y)
{
    return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
}

/* Day (since 1970-01-01) of rule date d in year y (POSIX.1-2017 8.3). */
static int64_t rule_day(const hyp_tz_date *d, int64_t y)
{
    static const int dm[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    if (d->kind == 'J')   /* Feb 29 is never counted: J60 is always Mar 1 */
        return hyp_days_from_civil(y, 1, 1) + d->day - 1 + (is_leap(y) && d->day >= 60);
    if (d->kind == 'D')
        return hyp_days_from_civil(y, 1, 1) + d->day;
    int64_t first = hyp_days_from_civil(y, (unsigned)d->month, 1);
    int wd_first = (int)(((first + 4) % 7 + 7) % 7);   /* 1970-01-01 was a Thursday */
    int mday = (d->wday - wd_first + 7) % 7 + 7 * (d->week - 1);
    int len = dm[d->month - 1] + (d->month == 2 && is_leap(y));
    if (mday >= len)   /* week 5 is the last such weekday: four weeks on */
        mday -= 7;
    return first + mday;
}

/* Civil year (proleptic Gregorian) of the UTC instant t. */
static int64_t year_of(int64_t t)
{
    int64_t days = t / 86400 - (t % 86400 < 0);
    int64_t y = 1970 + days * 400 / 146097;   /* 146097 days in 400 years */
    if (hyp_days_from_civil(y + 1, 1, 1) <= days)
        y++;
    else if (hyp_days_from_civil(y, 1, 1) > days)
        y--;
    return y;
}

/* Far enough for any civil use and far from int64 overflow below. */
static int64_t clamp_s(int64_t t)
{
    const int64_t lim_s = (int64_t)1 << 50;
    return t < -lim_s ? -lim_s : t > lim_s ? lim_s : t;
}

/* The UTC instants of year y's changes, in order of occurrence: at_s[k]
 * is to DST when dst[k]. A change is stated in the local time in force
 * before it (POSIX.1-2017 section 8.3). */
static void year_changes(const hyp_tz_rule *r, int64_t y, int64_t at_s[2], int dst[2])
{
    int64_t on = rule_day(&r->start, y) * 86400 + r->start.time_s - r->std_off_s;
    int64_t off = rule_day(&r->end, y) * 86400 + r->end.time_s - r->dst_off_s;
    int on_first = on <= off;
    at_s[0] = on_first ? on : off;
    at_s[1] = on_first ? off : on;
    dst[0] = on_first;
    dst[1] = !on_first;
}

/* How far a change can fall outside its year: day 365 of a common year
 * is Jan 1 of the next (1 day), a rule time up to 167 h, offsets up to
 * 25 h. */
#define SPILL_S ((int64_t)9 * 86400)

int32_t hyp__tz_rule_offset(const hyp_tz_rule *r, int64_t utc_s)
{
    if (!r->has_dst)
        return r->std_off_s;
    /* The state at t is set by the latest change at or before t. Years
     * are taken from the last whose changes can reach t backwards, until
     * the changes of the years before must all be earlier than the one
     * found. Of two changes at one instant the later in the calendar
     * wins: with RFC 8536 3.3.1's all-year DST ("EST5EDT,0/0,J365/25")
     * next year's start falls on this year's end and DST stays. */
    int64_t t = clamp_s(utc_s), best_s = INT64_MIN, y_hi = year_of(t + SPILL_S);
    int dst = 0;
    for (int64_t y = y_hi; y >= y_hi - 3; y--) {
        int64_t at_s[2];
        int to_dst[2];
        year_changes(r, y, at_s, to_dst);
        for (int k = 1; k >= 0; k--)   /* backwards too: a tie goes to the later */
            if (at_s[k] <= t && at_s[k] > best_s) {
                best_s = at_s[k];
                dst = to_dst[k];
            }
        if (best_s >= hyp_days_from_civil(y, 1, 1) * 86400 + SPILL_S)
            break;   /* year y-1's changes are all at or before that */
    }
    return dst ? r->dst_off_s : r->std_off_s;
}

size_t hyp__tz_rule_changes(const hyp_tz_rule *r, int64_t after_s, int64_t upto_s, int64_t *at_s,
                            int32_t *off_s, size_t cap)
{
    size_t n = 0;
    if (!r->has_dst)
        return 0;
    after_s = clamp_s(after_s);
    upto_s = clamp_s(upto_s);
    for (int64_t y = year_of(after_s - SPILL_S), y1 = year_of(upto_s + SPILL_S); y <= y1; y++) {
        int64_t c[2];
        int to_dst[2];
        year_changes(r, y, c, to_dst);
        for (int k = 0; k < 2; k++)
            if (c[k] > after_s && c[k] <= upto_s && n < cap) {
                at_s[n] = c[k];
                off_s[n++] = to_dst[k] ? r->dst_off_s : r->std_off_s;
            }
    }
    /* Few: an insertion sort, stable so that of two changes at one
     * instant the later stays last, as in hyp__tz_rule_offset. */
    for (size_t i = 1; i < n; i++)
        for (size_t j = i; j > 0 && at_s[j - 1] > at_s[j]; j--) {
            int64_t a = at_s[j];
            int32_t o = off_s[j];
            at_s[j] = at_s[j - 1];
            off_s[j] = off_s[j - 1];
            at_s[j - 1] = a;
            off_s[j - 1] = o;
        }
    return n;
}
