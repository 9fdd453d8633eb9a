/* timeparse.c - ISO 8601 / RFC 3339 and epoch time stamps, fixed offsets and
 * tz database zones (TZif files, RFC 8536) for stamps without a zone. */
#include "hypsolev/timeparse.h"
#include "tzrule.h"
#include "timefmt_int.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* H. Hinnant, "chrono-Compatible Low-Level Date Algorithms" (public domain). */
static void civil_from_days(int64_t z, int *y, unsigned *m, unsigned *d)
{
    z += 719468;
    const int64_t era = (z >= 0 ? z : z - 146096) / 146097;
    const unsigned doe = (unsigned)(z - era * 146097);
    const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    const unsigned mp = (5 * doy + 2) / 153;
    *d = doy - (153 * mp + 2) / 5 + 1;
    *m = mp < 10 ? mp + 3 : mp - 9;
    *y = (int)((int64_t)yoe + era * 400 + (*m <= 2));
}

static int days_in_month(int y, unsigned m)
{
    static const int dm[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    int leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
    return m == 2 ? 28 + leap : dm[m - 1];
}

void hyp_zone_init(hyp_zone *z)
{
    memset(z, 0, sizeof *z);
}

void hyp_zone_free(hyp_zone *z)
{
    free(z->trans_s);
    free(z->trans_off_s);
    hyp_zone_init(z);
}

/* Reads "+HH:MM", "+HHMM" or "+HH" at s; returns characters used, 0 if none. */
static int parse_offset(const char *s, int32_t *off_s)
{
    if (s[0] != '+' && s[0] != '-')
        return 0;
    int sign = s[0] == '-' ? -1 : 1;
    if (!isdigit((unsigned char)s[1]) || !isdigit((unsigned char)s[2]))
        return 0;
    int hh = (s[1] - '0') * 10 + (s[2] - '0');
    int mm = 0, used = 3;
    const char *p = s + 3;
    if (*p == ':')
        p++;
    if (isdigit((unsigned char)p[0]) && isdigit((unsigned char)p[1])) {
        mm = (p[0] - '0') * 10 + (p[1] - '0');
        used = (int)(p + 2 - s);
    } else if (p != s + 3) {
        return 0;   /* "+01:" */
    }
    if (hh > 18 || mm > 59)
        return 0;
    *off_s = sign * (hh * 3600 + mm * 60);
    return used;
}

static uint32_t be32(const unsigned char *p)
{
    return (uint32_t)p[0] << 24 | (uint32_t)p[1] << 16 | (uint32_t)p[2] << 8 | p[3];
}

static int64_t be64(const unsigned char *p)
{
    return (int64_t)((uint64_t)be32(p) << 32 | be32(p + 4));
}

static hyp_status not_tzif(const hyp_zone *z, const char *path, hyp_error *err)
{
    return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": %s is not a TZif file", z->name, path);
}

/* Length of the data block after the header at h (RFC 8536 section 3.1),
 * with tsize-byte times; 0 when the counts are out of bounds or the block
 * runs past the n bytes at h. */
static size_t tzif_block_len(const unsigned char *h, size_t n, int tsize)
{
    if (n < 44)
        return 0;
    uint32_t isut = be32(h + 20), isstd = be32(h + 24), leap = be32(h + 28);
    uint32_t timecnt = be32(h + 32), typecnt = be32(h + 36), charcnt = be32(h + 40);
    if (typecnt == 0 || typecnt > 256 || timecnt > 4000 || charcnt > 4096 || leap > 1000 ||
        isut > typecnt || isstd > typecnt)
        return 0;
    size_t len = timecnt * (size_t)tsize + timecnt + typecnt * 6u + charcnt +
                 leap * (size_t)(tsize + 4) + isstd + isut;
    return 44 + len <= n ? len : 0;
}

/* The transitions and their offsets from the block at h. */
static hyp_status tzif_fill(hyp_zone *z, const char *path, const unsigned char *h, int tsize,
                            hyp_error *err)
{
    uint32_t timecnt = be32(h + 32), typecnt = be32(h + 36);
    const unsigned char *t = h + 44, *idx = t + timecnt * (size_t)tsize, *tt = idx + timecnt;
    z->trans_s = malloc((timecnt ? timecnt : 1) * sizeof *z->trans_s);
    z->trans_off_s = malloc((timecnt ? timecnt : 1) * sizeof *z->trans_off_s);
    if (!z->trans_s || !z->trans_off_s)
        return hyp_error_set(err, HYP_ERR_NOMEM, "time zone \"%s\": out of memory", z->name);
    for (uint32_t i = 0; i < timecnt; i++) {
        if (idx[i] >= typecnt)
            return not_tzif(z, path, err);
        z->trans_s[i] = tsize == 8 ? be64(t + 8 * i) : (int32_t)be32(t + 4 * i);
        z->trans_off_s[i] = (int32_t)be32(tt + 6 * idx[i]);
    }
    z->first_off_s = (int32_t)be32(tt);   /* RFC 8536 3.2: type 0 */
    z->count = timecnt;
    return HYP_OK;
}

/* The footer of a version 2+ file (RFC 8536 section 3.3): a POSIX TZ
 * string between newlines at buf + at, for instants after the last
 * transition. An empty one leaves the last offset in force. v3: version 3
 * or later, whose rule times may be signed and exceed 24 h. */
static hyp_status tzif_footer(hyp_zone *z, const char *path, const unsigned char *buf,
                              size_t n, size_t at, int v3, hyp_error *err)
{
    const unsigned char *nl = at + 1 < n ? memchr(buf + at + 1, '\n', n - at - 1) : NULL;
    if (!nl || buf[at] != '\n')
        return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": %s: no footer after the data "
                             "(expected a TZ string between newlines, RFC 8536 section 3.3)", z->name, path);
    size_t len = (size_t)(nl - (buf + at + 1));
    char tz[128];
    if (len >= sizeof tz)
        return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": %s: footer TZ string of %zu bytes "
                             "(expected at most %zu)", z->name, path, len, sizeof tz - 1);
    for (size_t i = 0; i < len; i++)   /* shown in a message: printable ASCII only */
        tz[i] = buf[at + 1 + i] >= 0x20 && buf[at + 1 + i] < 0x7f ? (char)buf[at + 1 + i] : '?';
    tz[len] = '\0';
    if (len == 0)
        return HYP_OK;
    const char *p = tz;
    const char *why = hyp__tz_rule_parse(&z->rule, &p, v3);
    if (why)
        return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": %s: footer TZ string \"%s\" at %s%s%s: %s",
                             z->name, path, tz, *p ? "\"" : "its end", p, *p ? "\"" : "", why);
    z->has_rule = 1;
    return HYP_OK;
}

/* Parses a TZif file (RFC 8536): the version 1 block, or for versions 2+
 * the 64-bit block after it and the footer. */
static hyp_status tzif_load(hyp_zone *z, const char *path, hyp_error *err)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": no such zone (%s not found)", z->name, path);
    unsigned char buf[1 << 16];
    size_t n = fread(buf, 1, sizeof buf, f);
    fclose(f);
    if (n < 44 || memcmp(buf, "TZif", 4) != 0)
        return not_tzif(z, path, err);
    /* a block holds at least one type, so a length of 0 means a bad one */
    size_t off = 0, len = tzif_block_len(buf, n, 4);
    int v2 = buf[4] >= '2', tsize = 4;
    if (len && v2) {   /* skip the 32-bit block: RFC 8536 section 3.2 */
        off = 44 + len;
        tsize = 8;
        len = tzif_block_len(buf + off, n - off, 8);
    }
    if (!len)
        return not_tzif(z, path, err);
    hyp_status st = tzif_fill(z, path, buf + off, tsize, err);
    if (st == HYP_OK && v2)
        st = tzif_footer(z, path, buf, n, off + 44 + len, buf[4] >= '3', err);
    if (st == HYP_OK) {
        z->kind = 2;
        hyp_error_clear(err);
    }
    return st;
}

hyp_status hyp_zone_parse(hyp_zone *z, const char *text, const char *zoneinfo_dir,
                          hyp_error *err)
{
    hyp_zone_free(z);
    snprintf(z->name, sizeof z->name, "%s", text ? text : "");
    if (!text || !*text)
        return hyp_error_set(err, HYP_ERR_VALUE, "time zone is empty; expected +HH:MM, UTC or a zone name such as Europe/Vienna");
    if (strcmp(text, "Z") == 0 || strcmp(text, "UTC") == 0 || strcmp(text, "utc") == 0) {
        z->kind = 1;
        z->offset_s = 0;
        return HYP_OK;
    }
    int32_t off;
    int used = parse_offset(text, &off);
    if (used) {
        if (text[used] != '\0')
            return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": expected +HH:MM", text);
        z->kind = 1;
        z->offset_s = off;
        return HYP_OK;
    }
    /* A tz name: letters, digits, '/', '_', '-', '+'; no "..", no leading '/'. */
    if (text[0] == '/' || strstr(text, "..") || strlen(text) > 60)
        return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": not a zone name", text);
    for (const char *p = text; *p; p++)
        if (!isalnum((unsigned char)*p) && !strchr("/_-+", *p))
            return hyp_error_set(err, HYP_ERR_VALUE, "time zone \"%s\": expected +HH:MM, UTC or a zone name such as Europe/Vienna", text);
    char path[512];
    snprintf(path, sizeof path, "%s/%s", zoneinfo_dir ? zoneinfo_dir : "/usr/share/zoneinfo", text);
    hyp_status st = tzif_load(z, path, err);
    if (st) {
        char name[64];
        memcpy(name, z->name, sizeof name);
        hyp_zone_free(z);
        memcpy(z->name, name, sizeof name);
    }
    return st;
}

/* How many transitions are at or before utc_s. */
static size_t trans_upto(const hyp_zone *z, int64_t utc_s)
{
    size_t lo = 0, hi = z->count;
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        if (z->trans_s[mid] <= utc_s)
            lo = mid + 1;
        else
            hi = mid;
    }
    return lo;
}

static int32_t offset_at_utc(const hyp_zone *z, int64_t utc_s)
{
    if (z->kind == 1)
        return z->offset_s;
    if (z->kind != 2)
        return 0;
    size_t k = trans_upto(z, utc_s);
    /* RFC 8536 section 3.3: the footer rule after the last transition, and
     * at all instants of a file without transitions */
    if (k == z->count && z->has_rule && (k == 0 || utc_s > z->trans_s[k - 1]))
        return hyp__tz_rule_offset(&z->rule, utc_s);
    return k == 0 ? z->first_off_s : z->trans_off_s[k - 1];
}

#define MAX_CHANGES 16

/* The changes of offset in (from_s, to_s]: the transitions, then the
 * footer rule's changes after the last of them; ascending, at most
 * MAX_CHANGES instants to at_s and the offsets from them on to off_s. */
static size_t zone_changes(const hyp_zone *z, int64_t from_s, int64_t to_s, int64_t *at_s, int32_t *off_s)
{
    size_t n = 0;
    for (size_t k = trans_upto(z, from_s); k < z->count && z->trans_s[k] <= to_s && n < MAX_CHANGES; k++) {
        at_s[n] = z->trans_s[k];
        off_s[n++] = z->trans_off_s[k];
    }
    if (z->has_rule) {
        int64_t after_s = z->count && z->trans_s[z->count - 1] > from_s ? z->trans_s[z->count - 1] : from_s;
        n += hyp__tz_rule_changes(&z->rule, after_s, to_s, at_s + n, off_s + n, MAX_CHANGES - n);
    }
    return n;
}

/* The offsets that read local_s: their count, 1 (ordinary), 2 or more
 * (a clock set back: off[0] the largest offset, the earliest instant;
 * off[1] the smallest, the latest) or 0 (a clock set forward skipped it:
 * off[0] = off[1], the offset in force before the gap). */
static int local_offsets(const hyp_zone *z, int64_t local_s, int32_t off2[2])
{
    if (!z || z->kind != 2) {
        off2[0] = off2[1] = z && z->kind == 1 ? z->offset_s : 0;
        return 1;
    }
    /* The instant is local_s - offset with |offset| < 26 h (RFC 8536
     * section 3.2 bounds utoff to -24:59:59..+25:59:59), so only the
     * stretches of constant offset within 26 h of local_s matter. A
     * stretch [at[i], at[i+1]) with offset off[i] reads local_s when
     * local_s - off[i] falls inside it. Transitions and the footer rule
     * are listed alike, so both get the same choice. */
    const int64_t w_s = 26 * 3600, lim_s = (int64_t)1 << 50;
    local_s = local_s < -lim_s ? -lim_s : local_s > lim_s ? lim_s : local_s;
    int64_t at[MAX_CHANGES + 2];
    int32_t off[MAX_CHANGES + 1];
    at[0] = local_s - w_s;
    off[0] = offset_at_utc(z, at[0]);
    size_t n = zone_changes(z, at[0], local_s + w_s, at + 1, off + 1), m = 0;
    for (size_t i = 1; i <= n; i++) {   /* of changes at one instant, the last holds */
        if (at[i] != at[m])
            m++;
        at[m] = at[i];
        off[m] = off[i];
    }
    n = m;
    at[n + 1] = local_s + w_s + 1;
    int found = 0;
    for (size_t i = 0; i <= n; i++) {
        int64_t u = local_s - off[i];
        if (u >= at[i] && u < at[i + 1]) {
            if (!found || off[i] > off2[0])
                off2[0] = off[i];
            if (!found || off[i] < off2[1])
                off2[1] = off[i];
            found++;
        }
    }
    if (found)
        return found == 1 || off2[0] == off2[1] ? 1 : found;
    off2[0] = off2[1] = off[0];
    for (size_t i = 1; i <= n; i++)   /* the change whose gap holds local_s */
        if (at[i] + off[i - 1] <= local_s && local_s < at[i] + off[i]) {
            off2[0] = off2[1] = off[i - 1];
            break;
        }
    return 0;
}

int32_t hyp_zone_offset_for_local(const hyp_zone *z, int64_t local_s)
{
    int32_t off[2];
    local_offsets(z, local_s, off);
    return off[0];   /* overlap: the earliest instant; gap: the offset before it */
}

static int digits(const char *s, int n, int *v)
{
    int x = 0;
    for (int i = 0; i < n; i++) {
        if (!isdigit((unsigned char)s[i]))
            return 0;
        x = x * 10 + (s[i] - '0');
    }
    *v = x;
    return 1;
}

static hyp_time_result parse_epoch(const char *s, double *time_s)
{
    const char *p = s;
    if (!isdigit((unsigned char)*p))
        return HYP_TIME_SYNTAX;
    while (isdigit((unsigned char)*p))
        p++;
    if (*p == '.') {
        p++;
        while (isdigit((unsigned char)*p))
            p++;
    }
    while (*p == ' ' || *p == '\t')
        p++;
    if (*p)
        return HYP_TIME_SYNTAX;
    errno = 0;
    double v = strtod(s, NULL);
    if (errno || !(v >= 1e8 && v <= 7.3e9))
        return HYP_TIME_RANGE;
    *time_s = v;
    return HYP_TIME_OK;
}

hyp_time_result hyp_time_parse(const char *text, const hyp_zone *zone, double *time_s)
{
    return hyp_time_parse_zoned(text, zone, time_s, NULL);
}

hyp_time_result hyp_time_parse_zoned(const char *text, const hyp_zone *zone, double *time_s,
                                     hyp_time_local *how)
{
    if (how)
        memset(how, 0, sizeof *how);
    const char *s = text;
    while (*s == ' ' || *s == '\t')
        s++;
    int y, mo, d, h, mi, sec = 0;
    if (!(digits(s, 4, &y) && s[4] == '-'))
        return parse_epoch(s, time_s);
    if (!(digits(s + 5, 2, &mo) && s[7] == '-' && digits(s + 8, 2, &d)))
        return HYP_TIME_SYNTAX;
    s += 10;
    if (!(*s == 'T' || *s == 't' || *s == ' '))
        return HYP_TIME_SYNTAX;
    s++;
    if (!(digits(s, 2, &h) && s[2] == ':' && digits(s + 3, 2, &mi)))
        return HYP_TIME_SYNTAX;
    s += 5;
    double frac = 0.0;
    if (*s == ':') {
        if (!digits(s + 1, 2, &sec))
            return HYP_TIME_SYNTAX;
        s += 3;
        if (*s == '.' || *s == ',') {
            s++;
            double scale = 0.1;
            if (!isdigit((unsigned char)*s))
                return HYP_TIME_SYNTAX;
            for (int k = 0; isdigit((unsigned char)*s); s++, k++)
                if (k < 9) {
                    frac += (*s - '0') * scale;
                    scale /= 10.0;
                }
        }
    }
    int has_zone = 0;
    int32_t off = 0;
    if (*s == 'Z' || *s == 'z') {
        has_zone = 1;
        s++;
    } else if (*s == '+' || *s == '-') {
        int used = parse_offset(s, &off);
        if (!used)
            return HYP_TIME_SYNTAX;
        has_zone = 1;
        s += used;
    }
    while (*s == ' ' || *s == '\t')
        s++;
    if (*s)
        return HYP_TIME_SYNTAX;
    hyp__tfields f = {y, mo, d, h, mi, sec, frac, has_zone, off};
    return hyp__time_from_fields(&f, zone, time_s, how);
}

hyp_time_result hyp__time_from_fields(const hyp__tfields *f, const hyp_zone *zone, double *time_s,
                                      hyp_time_local *how)
{
    int y = f->y, mo = f->mo, d = f->d, h = f->h, mi = f->mi, sec = f->sec, has_zone = f->has_zone;
    double frac = f->frac;
    int32_t off = f->off_s;
    if (how)
        memset(how, 0, sizeof *how);
    if (y < 1900 || y > 2200 || mo < 1 || mo > 12 || d < 1 || d > days_in_month(y, (unsigned)mo) ||
        h < 0 || h > 24 || mi < 0 || mi > 59 || sec < 0 || sec > 60 || (h == 24 && (mi || sec || frac > 0.0)))
        return HYP_TIME_RANGE;
    /* sec == 60 is a leap second: POSIX time has none, so it is the same
     * instant as the next second's start. */
    int64_t local = hyp_days_from_civil(y, (unsigned)mo, (unsigned)d) * 86400 +
                    h * 3600 + mi * 60 + sec;
    if (!has_zone) {
        if (!zone || zone->kind == 0)
            return HYP_TIME_NOZONE;
        int32_t cand[2];
        int n = local_offsets(zone, local, cand);
        off = cand[0];
        if (how) {
            how->zoned = 1;
            how->offset_s = off;
            how->repeated = n == 2;
            how->skipped = n == 0;
            how->second_offset_s = cand[1];
            how->second_s = (double)(local - cand[1]) + frac;
        }
    }
    *time_s = (double)(local - off) + frac;
    return HYP_TIME_OK;
}

void hyp_time_format(double time_s, char *buf, size_t n)
{
    if (time_s != time_s || fabs(time_s) > 1e12) {
        snprintf(buf, n, "invalid");
        return;
    }
    double whole = floor(time_s);
    int ms = (int)lround((time_s - whole) * 1000.0);
    if (ms == 1000) {
        whole += 1.0;
        ms = 0;
    }
    int64_t t = (int64_t)whole;
    int64_t days = t >= 0 ? t / 86400 : -((-t + 86399) / 86400);
    int64_t rem = t - days * 86400;
    int y;
    unsigned m, d;
    civil_from_days(days, &y, &m, &d);
    int hh = (int)(rem / 3600), mm = (int)(rem / 60 % 60), ss = (int)(rem % 60);
    if (y >= 0 && y <= 9999 && n >= 25) {
        /* by hand: the table writes one per row (same text as below) */
        static const char pat[] = "0000-00-00T00:00:00.000Z";
        int v[7] = {y, (int)m, (int)d, hh, mm, ss, ms}, at[7] = {3, 6, 9, 12, 15, 18, 22};
        memcpy(buf, pat, sizeof pat);
        for (int k = 0; k < 7; k++)
            for (int q = at[k], x = v[k]; x; x /= 10)
                buf[q--] = (char)('0' + x % 10);
        if (!ms)
            buf[19] = 'Z', buf[20] = '\0';
        return;
    }
    if (ms)
        snprintf(buf, n, "%04d-%02u-%02uT%02d:%02d:%02d.%03dZ", y, m, d, hh, mm, ss, ms);
    else
        snprintf(buf, n, "%04d-%02u-%02uT%02d:%02d:%02dZ", y, m, d, hh, mm, ss);
}
