/* reader_common.c - number parsing, values refused as they are read, unit
 * resolution and series checks shared by the readers. */
#include "reader_common.h"

#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

static int is_blank(char c)
{
    return c == ' ' || c == '\t' || c == '\r' || c == '\n';
}

/* "nan", "inf", "infinity" in any case, with an optional sign: what a
 * logger prints for a failed reading. */
static int names_non_finite(const char *s, size_t len)
{
    if (len && (*s == '-' || *s == '+'))
        s++, len--;
    return (len == 3 && (strncasecmp(s, "nan", 3) == 0 || strncasecmp(s, "inf", 3) == 0)) ||
           (len == 8 && strncasecmp(s, "infinity", 8) == 0);
}

int hyp__parse_number(const char *s, size_t len, int decimal_comma, double *v)
{
    while (len && is_blank(*s)) {
        s++;
        len--;
    }
    while (len && is_blank(s[len - 1]))
        len--;
    if (len == 0) {
        *v = NAN;
        return 2;
    }
    /* Fast path, without a copy: [+-]digits[.digits] of up to 15 digits in
     * all (what logs hold), the digits as an exact integer divided by an
     * exact power of ten: correctly rounded, as strtod is (IEEE 754
     * division). Anything else takes the general path below. */
    {
        static const double p10[16] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
        size_t i = 0;
        int neg = s[0] == '-';
        if (s[0] == '-' || s[0] == '+')
            i++;
        uint64_t m = 0;
        int nd = 0, frac = -1;
        for (; i < len; i++) {
            char c = s[i];
            if (c >= '0' && c <= '9') {
                m = m * 10 + (uint64_t)(c - '0');
                nd++;
                if (frac >= 0)
                    frac++;
            } else if (c == '.' && frac < 0)
                frac = 0;
            else
                break;
        }
        if (i == len && nd > 0 && nd <= 15) {
            double x = (double)m / p10[frac > 0 ? frac : 0];
            *v = neg ? -x : x;
            return 1;
        }
    }
    if (names_non_finite(s, len)) {
        *v = NAN;
        return 3;
    }
    char buf[64];
    if (len >= sizeof buf)
        return 0;
    int seen_digit = 0;
    for (size_t i = 0; i < len; i++) {
        char c = s[i];
        if (c == ',' && decimal_comma)
            c = '.';
        if (c >= '0' && c <= '9')
            seen_digit = 1;
        else if (!(c == '.' || c == '-' || c == '+' || c == 'e' || c == 'E'))
            return 0;
        buf[i] = c;
    }
    buf[len] = '\0';
    if (!seen_digit)
        return 0;
    /* Fast path for plain decimals of up to 15 digits (what logs hold): the
     * digits as an exact integer divided by an exact power of ten is
     * correctly rounded, as strtod is (IEEE 754 division). */
    {
        const char *q = buf;
        int neg = *q == '-';
        if (*q == '-' || *q == '+')
            q++;
        uint64_t m = 0;
        int nd = 0, frac = -1, ok = *q != '\0';
        for (; *q && ok; q++) {
            if (*q >= '0' && *q <= '9') {
                m = m * 10 + (uint64_t)(*q - '0');
                if (++nd > 15)
                    ok = 0;
                if (frac >= 0)
                    frac++;
            } else if (*q == '.' && frac < 0)
                frac = 0;
            else
                ok = 0;
        }
        if (ok && nd > 0) {
            static const double p10[16] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
            double x = (double)m / p10[frac > 0 ? frac : 0];
            *v = neg ? -x : x;
            return 1;
        }
    }
    char *end;
    errno = 0;
    double x = strtod(buf, &end);
    if (*end != '\0')
        return 0;
    if (!isfinite(x) || (errno == ERANGE && fabs(x) > 1.0)) {
        *v = NAN;   /* beyond a double: 1e999 */
        return 3;
    }
    *v = x;         /* an underflow (1e-999) is as near zero as a double gets */
    return 1;
}

/* The length of buf[0..k) without a UTF-8 character cut off at its end. */
static size_t whole_chars(const char *buf, size_t k)
{
    size_t j = k;
    while (j && ((unsigned char)buf[j - 1] & 0xc0) == 0x80)
        j--;
    if (!j || (unsigned char)buf[j - 1] < 0xc0)
        return k;
    unsigned char lead = (unsigned char)buf[j - 1];
    size_t need = lead >= 0xf0 ? 4 : lead >= 0xe0 ? 3 : 2;
    return k - (j - 1) < need ? j - 1 : k;
}

const char *hyp__quote(char *buf, size_t n, const char *text, size_t len)
{
    static const char hex[] = "0123456789abcdef";
    size_t k = 0;
    for (size_t i = 0; i < len; i++) {
        unsigned char c = (unsigned char)text[i];
        char e[8];
        size_t el = 0;
        if (c == '\n' || c == '\r' || c == '\t' || c == '"' || c == '\\') {
            e[el++] = '\\';
            e[el++] = c == '\n' ? 'n' : c == '\r' ? 'r' : c == '\t' ? 't' : (char)c;
        } else if (c < 0x20 || c == 0x7f) {
            e[el++] = '\\', e[el++] = 'x', e[el++] = hex[c >> 4], e[el++] = hex[c & 15];
        } else if (c == 0xc2 && i + 1 < len && (unsigned char)text[i + 1] >= 0x80 &&
                   (unsigned char)text[i + 1] <= 0x9f) {
            unsigned char d = (unsigned char)text[++i];   /* a C1 control in UTF-8 */
            e[el++] = '\\', e[el++] = 'u', e[el++] = '0', e[el++] = '0';
            e[el++] = hex[d >> 4], e[el++] = hex[d & 15];
        } else
            e[el++] = (char)c;
        if (k + el + 4 > n) {   /* room for "..." and the NUL */
            k = whole_chars(buf, k);
            memcpy(buf + k, "...", 3);
            k += 3;
            break;
        }
        memcpy(buf + k, e, el);
        k += el;
    }
    buf[k] = '\0';
    return buf;
}

hyp_status hyp__resolve_unit(const char *path, const char *field, hyp_quantity q,
                             hyp_unit from_file, hyp_unit from_opt, float *vals,
                             size_t n, hyp_unit *used, hyp_msgs *msgs, hyp_error *err)
{
    double vmin = INFINITY, vmax = -INFINITY;
    for (size_t i = 0; i < n; i++)
        if (vals[i] == vals[i]) {
            if (vals[i] < vmin) vmin = vals[i];
            if (vals[i] > vmax) vmax = vals[i];
        }
    hyp_unit u = from_file ? from_file : from_opt;
    if (!u && vmin > vmax) {      /* no values at all: nothing to convert */
        *used = HYP_UNIT_NONE;
        return HYP_OK;
    }
    if (!u) {
        char cand[128];
        u = hyp_unit_infer(q, vmin, vmax, cand, sizeof cand);
        const char *opt = q == HYP_Q_PRESSURE ? "--pressure-unit" : "--temperature-unit";
        if (!u) {
            if (cand[0])
                return hyp_error_set(err, HYP_ERR_UNIT,
                    "%s: %s: no unit given and values %g to %g fit %s; give the unit with %s (one of %s)",
                    path, field, vmin, vmax, cand, opt, hyp_unit_choices(q));
            return hyp_error_set(err, HYP_ERR_UNIT,
                "%s: %s: no unit given and values %g to %g fit no unit (%s); give the unit with %s",
                path, field, vmin, vmax, hyp_unit_choices(q), opt);
        }
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0, "%s: no unit given; values %g to %g taken as %s (the only unit they fit; %s sets it)", field, vmin, vmax, hyp_unit_name(u), opt);
    }
    for (size_t i = 0; i < n; i++)
        if (vals[i] == vals[i])
            vals[i] = (float)hyp_unit_to_si(u, vals[i]);
    *used = u;
    return HYP_OK;
}

/* At most this many warnings per kind and file; the rest only counted. */
#define WARN_CAP 10

/* What each field allows as it is read. Pressure and temperature are in
 * the file's unit, maybe not yet known: only magnitudes no unit allows are
 * refused here (1e6 is ten times the highest plausible pressure in Pa,
 * 1e4 far beyond any temperature in K or degF); their physical ranges are
 * checked in SI in hyp__check_series. Heights: the lowest land surface is
 * the Dead Sea shore near -430 m, the highest summit 8849 m (both from
 * memory), so -1000..10000 m holds every height on foot with a margin;
 * the geoid lies within about -107..+86 m of the WGS84 ellipsoid (EGM96,
 * from memory), so -150..150 m. */
static const struct {
    const char *expected, *then;
} field_rule[HYP__F_COUNT] = {   /* the ranges themselves: hyp__value_ok */
    [HYP__F_PRESSURE] = {"a pressure (at most 1e6 in any unit)", "sample dropped"},
    [HYP__F_TEMPERATURE] = {"a temperature (at most 1e4 in any unit)", "temperature ignored"},
    [HYP__F_HUMIDITY] = {"a humidity of 0-100 %", "humidity ignored"},
    [HYP__F_ELE] = {"a height of -1000..10000 m", "the point's own height is ignored (its pressure is still used)"},
    [HYP__F_GEOID] = {"a geoid height of -150..150 m", "the geoid height is ignored"},
    [HYP__F_POSITION] = {"degrees", "position ignored"},
};

double hyp__screen_refuse(hyp__screen *sc, hyp__field f, const char *name, unsigned line, int r,
                          const char *text, size_t len)
{
    if (r == 2 || sc->n[f]++ >= WARN_CAP)
        return NAN;
    char q[64];
    hyp__quote(q, sizeof q, text, len);
    hyp_msgs_add_at(sc->msgs, HYP_WARNING, "sample", sc->path, line, "%s \"%s\" is %s; expected %s; %s", name, q,
                 r == 3 ? "not a finite number" : "out of range", field_rule[f].expected, field_rule[f].then);
    return NAN;
}

void hyp__screen_totals(const hyp__screen *sc)
{
    static const char *what[HYP__F_COUNT] = {"samples dropped for a pressure that is not a number in any unit's range",
                                             "temperatures ignored as not finite or far out of range",
                                             "humidities ignored as outside 0-100 %",
                                             "heights (ele) ignored as outside -1000..10000 m",
                                             "geoid heights ignored as outside -150..150 m",
                                             "positions ignored as not finite"};
    for (int f = 0; f < HYP__F_COUNT; f++)
        if (sc->n[f] > WARN_CAP)
            hyp_msgs_add_at(sc->msgs, HYP_WARNING, "sample", sc->path, 0, "%zu %s in all", sc->n[f], what[f]);
}

/* Counts of what hyp__check_series changed, for the totals. */
typedef struct checks {
    size_t p, t, pos;
    int p_quiet;   /* every pressure out of range: hyp__check_usable says it once */
} checks;

static void check_pressure(const char *path, hyp_series *s, size_t i, uint32_t line, checks *c, hyp_msgs *msgs)
{
    double p = s->pressure_pa[i];
    if (p >= 30000.0 && p <= 110000.0)
        return;
    s->flag[i] = HYP_SAMPLE_PRESSURE_RANGE;
    if (c->p++ < WARN_CAP && !c->p_quiet)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, line, "pressure %.2f hPa is outside 300-1100 hPa; sample dropped", p / 100.0);
}

static void check_temperature(const char *path, hyp_series *s, size_t i, uint32_t line, checks *c, hyp_msgs *msgs)
{
    double t = s->temp_k[i];
    if (t != t || (t >= 213.15 && t <= 333.15))
        return;
    s->temp_k[i] = NAN;
    if (c->t++ < WARN_CAP)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, line, "temperature %.2f degC is outside -60..+60 degC; temperature ignored", t - 273.15);
}

static void check_position(const char *path, hyp_series *s, size_t i, uint32_t line, checks *c, hyp_msgs *msgs)
{
    int beyond = s->lat_e7[i] == HYP_BAD_POSITION || s->lon_e7[i] == HYP_BAD_POSITION;
    int some = s->lat_e7[i] != HYP_NO_POSITION || s->lon_e7[i] != HYP_NO_POSITION;
    double la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
    if (!some || (!beyond && fabs(la) <= 90.0 && fabs(lo) <= 180.0))
        return;
    s->lat_e7[i] = s->lon_e7[i] = HYP_NO_POSITION;
    if (c->pos++ >= WARN_CAP)
        return;
    if (beyond)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, line, "position beyond +-214 degrees is not a latitude in -90..90 and longitude in -180..180 degrees; position ignored");
    else if (la != la || lo != lo)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, line, "%s without %s; position ignored",
                     la == la ? "latitude" : "longitude", la == la ? "longitude" : "latitude");
    else
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, line, "position %g, %g is not a latitude in -90..90 and longitude in -180..180 degrees; position ignored", la, lo);
}

/* 1 when no sample that has a pressure has one in 300-1100 hPa. */
static int no_pressure_in_range(const hyp_series *s)
{
    size_t with = 0;
    for (size_t i = 0; i < s->count; i++) {
        double p = s->pressure_pa[i];
        if (s->flag[i] == HYP_SAMPLE_OK && p == p) {
            if (p >= 30000.0 && p <= 110000.0)
                return 0;
            with++;
        }
    }
    return with > 0;
}

hyp_status hyp__check_series(const char *path, hyp_series *s, uint32_t **order,
                             hyp_msgs *msgs, hyp_error *err)
{
    checks c = {0, 0, 0, no_pressure_in_range(s)};
    uint32_t line = 0;
    for (size_t i = 0; i < s->count; i++) {
        line = hyp_series_line_next(s, i, line);
        check_position(path, s, i, line, &c, msgs);
        if (s->flag[i])
            continue;
        check_pressure(path, s, i, line, &c, msgs);
        check_temperature(path, s, i, line, &c, msgs);
    }
    if (c.p > WARN_CAP && !c.p_quiet)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, 0, "%zu samples in all dropped for pressure out of range", c.p);
    if (c.t > WARN_CAP)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, 0, "%zu temperatures in all ignored as out of range", c.t);
    if (c.pos > WARN_CAP)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, 0, "%zu positions in all ignored as out of range", c.pos);
    hyp_status st = hyp__check_order(path, s, order, msgs, err);
    s->has_temp = s->has_rh = s->has_position = 0;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        s->has_temp |= s->temp_k[i] == s->temp_k[i];
        s->has_rh |= s->rh_pct[i] == s->rh_pct[i];
        s->has_position |= s->lat_e7[i] > HYP_BAD_POSITION && s->lon_e7[i] > HYP_BAD_POSITION;
    }
    return st;
}

/* "; the values 92270 to 92280 fit Pa, not hPa: is the unit label wrong?"
 * when every out-of-range pressure, taken back to the unit it was read
 * in, fits exactly one other unit; else "". */
static void unit_hint(const hyp_series *s, hyp_unit u, char *buf, size_t n)
{
    buf[0] = '\0';
    double f = hyp_unit_to_si(u, 1.0), lo = INFINITY, hi = -INFINITY;
    if (!u || !(f > 0.0))
        return;
    for (size_t i = 0; i < s->count; i++)
        if (s->flag[i] == HYP_SAMPLE_PRESSURE_RANGE) {
            double v = s->pressure_pa[i] / f;
            lo = fmin(lo, v), hi = fmax(hi, v);
        }
    hyp_unit other = lo <= hi ? hyp_unit_infer(HYP_Q_PRESSURE, lo, hi, NULL, 0) : HYP_UNIT_NONE;
    if (other && other != u && !(u == HYP_UNIT_MBAR && other == HYP_UNIT_HPA))
        snprintf(buf, n, "; the values %.6g to %.6g read as %s are out of range but fit %s: is the unit label wrong?",
                 lo, hi, hyp_unit_name(u), hyp_unit_name(other));
}

hyp_status hyp__check_usable(const char *path, const hyp_series *s, hyp_unit pressure_unit, hyp_error *err)
{
    size_t n[HYP_SAMPLE_FLAG_COUNT] = {0};
    for (size_t i = 0; i < s->count; i++)
        n[s->flag[i] < HYP_SAMPLE_FLAG_COUNT ? s->flag[i] : HYP_SAMPLE_BAD_VALUE]++;
    /* Missing fields are the format's business (a log may hold pressure
     * in every other record), repeated times a log written faster than its
     * stamps resolve: neither says the file is broken, so neither counts. */
    size_t have = s->count - n[HYP_SAMPLE_NO_TIME] - n[HYP_SAMPLE_NO_PRESSURE] - n[HYP_SAMPLE_TIME_DUPLICATE];
    size_t refused = have - n[HYP_SAMPLE_OK];
    if (have == 0)
        return hyp_error_set(err, HYP_ERR_NODATA, "%s: no usable sample: every record lacks a time or a pressure", path);
    if (n[HYP_SAMPLE_OK] > 0 && 2 * refused <= have)
        return HYP_OK;
    char why[400] = "", hint[200];
    for (int f = HYP_SAMPLE_NO_PRESSURE + 1; f < HYP_SAMPLE_FLAG_COUNT; f++) {
        size_t l = strlen(why);
        if (n[f] && f != HYP_SAMPLE_TIME_DUPLICATE && l < sizeof why - 80)
            snprintf(why + l, sizeof why - l, "%s%zu %s", l ? ", " : "", n[f], hyp_sample_flag_text((hyp_sample_flag)f));
    }
    unit_hint(s, pressure_unit, hint, sizeof hint);
    return hyp_error_set(err, HYP_ERR_NODATA,
                         "%s: %zu of %zu samples with a time and a pressure refused (%.0f %%): %s; %s%s",
                         path, refused, have, 100.0 * (double)refused / (double)have, why,
                         n[HYP_SAMPLE_OK] ? "more than half of the log is unusable, so none of it is used"
                                          : "no sample is usable", hint);
}

void hyp_read_opts_init(hyp_read_opts *o)
{
    memset(o, 0, sizeof *o);
}
