/* reader_common.c - number parsing, unit resolution and series checks shared
 * by the readers. */
#include "reader_common.h"

#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int hyp__parse_number(const char *s, size_t len, int decimal_comma, double *v)
{
    while (len && (*s == ' ' || *s == '\t')) {
        s++;
        len--;
    }
    while (len && (s[len - 1] == ' ' || s[len - 1] == '\t' || s[len - 1] == '\r'))
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
    if (*end != '\0' || errno == ERANGE || !isfinite(x))
        return 0;
    *v = x;
    return 1;
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
        hyp_msgs_add(msgs, HYP_NOTE, "%s: %s: no unit given; values %g to %g taken as %s (the only unit they fit; %s sets it)",
                     path, field, vmin, vmax, hyp_unit_name(u), opt);
    }
    for (size_t i = 0; i < n; i++)
        if (vals[i] == vals[i])
            vals[i] = (float)hyp_unit_to_si(u, vals[i]);
    *used = u;
    return HYP_OK;
}

/* At most this many warnings per kind and file; the rest only counted. */
#define WARN_CAP 10

void hyp__check_series(const char *path, hyp_series *s, hyp_msgs *msgs)
{
    size_t nbad_p = 0, nbad_t = 0, nbad_rh = 0, nbad_order = 0, nbad_pos = 0;
    double last_t = -INFINITY;
    uint32_t line = 0;
    for (size_t i = 0; i < s->count; i++) {
        line = hyp_series_line_next(s, i, line);
        if (s->flag[i])
            continue;
        double p = s->pressure_pa[i];
        if (!(p >= 30000.0 && p <= 110000.0)) {
            s->flag[i] = HYP_SAMPLE_PRESSURE_RANGE;
            if (nbad_p++ < WARN_CAP)
                hyp_msgs_add(msgs, HYP_WARNING, "%s:%u: pressure %.2f hPa is outside 300-1100 hPa; sample dropped",
                             path, line, p / 100.0);
            continue;
        }
        double t = s->temp_k[i];
        if (t == t && !(t >= 213.15 && t <= 333.15)) {
            s->temp_k[i] = NAN;
            if (nbad_t++ < WARN_CAP)
                hyp_msgs_add(msgs, HYP_WARNING, "%s:%u: temperature %.2f degC is outside -60..+60 degC; temperature ignored",
                             path, line, t - 273.15);
        }
        double rh = s->rh_pct[i];
        if (rh == rh && !(rh >= 0.0 && rh <= 100.0)) {
            s->rh_pct[i] = NAN;
            if (nbad_rh++ < WARN_CAP)
                hyp_msgs_add(msgs, HYP_WARNING, "%s:%u: humidity %.1f %% is outside 0-100 %%; humidity ignored",
                             path, line, rh);
        }
        double la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
        int beyond = s->lat_e7[i] == HYP_BAD_POSITION || s->lon_e7[i] == HYP_BAD_POSITION;
        if (beyond || ((la == la || lo == lo) && !(fabs(la) <= 90.0 && fabs(lo) <= 180.0))) {
            s->lat_e7[i] = s->lon_e7[i] = HYP_NO_POSITION;
            if (nbad_pos++ < WARN_CAP && beyond)
                hyp_msgs_add(msgs, HYP_WARNING, "%s:%u: position beyond +-214 degrees is not a latitude in -90..90 and longitude in -180..180 degrees; position ignored",
                             path, line);
            else if (nbad_pos <= WARN_CAP)
                hyp_msgs_add(msgs, HYP_WARNING, "%s:%u: position %g, %g is not a latitude in -90..90 and longitude in -180..180 degrees; position ignored",
                             path, line, la, lo);
        }
        if (!(s->time_s[i] > last_t)) {
            s->flag[i] = HYP_SAMPLE_TIME_ORDER;
            if (nbad_order++ < WARN_CAP)
                hyp_msgs_add(msgs, HYP_WARNING, "%s:%u: time is %s the previous sample's; sample dropped",
                             path, line, s->time_s[i] == last_t ? "the same as" : "earlier than");
            continue;
        }
        last_t = s->time_s[i];
    }
    if (nbad_p > WARN_CAP)
        hyp_msgs_add(msgs, HYP_WARNING, "%s: %zu samples in all dropped for pressure out of range", path, nbad_p);
    if (nbad_t > WARN_CAP)
        hyp_msgs_add(msgs, HYP_WARNING, "%s: %zu temperatures in all ignored as out of range", path, nbad_t);
    if (nbad_rh > WARN_CAP)
        hyp_msgs_add(msgs, HYP_WARNING, "%s: %zu humidities in all ignored as out of range", path, nbad_rh);
    if (nbad_pos > WARN_CAP)
        hyp_msgs_add(msgs, HYP_WARNING, "%s: %zu positions in all ignored as out of range", path, nbad_pos);
    if (nbad_order > WARN_CAP)
        hyp_msgs_add(msgs, HYP_WARNING, "%s: %zu samples in all dropped for times out of order or repeated", path, nbad_order);
    s->has_temp = s->has_rh = s->has_position = 0;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        s->has_temp |= s->temp_k[i] == s->temp_k[i];
        s->has_rh |= s->rh_pct[i] == s->rh_pct[i];
        s->has_position |= hyp_series_lat(s, i) == hyp_series_lat(s, i);
    }
}

void hyp_read_opts_init(hyp_read_opts *o)
{
    memset(o, 0, sizeof *o);
}
