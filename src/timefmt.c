/* timefmt.c - time stamps as exports write them: a strftime-style format
 * (a documented subset, docs/formats.md "Time formats") and numeric dates
 * such as 18.06.2026 06:30:00 whose day/month order a reader decides. */
#include "hypsolev/timeparse.h"
#include "timefmt_int.h"

#include <ctype.h>
#include <stdio.h>
#include <string.h>
#include <strings.h>

/* English month abbreviations (%b), as the C locale's strftime writes them
 * (ISO/IEC 9899:2011 7.27.3.5, the "C" locale). */
static const char *const months[12] = {"Jan", "Feb", "Mar", "Apr", "May", "Jun",
                                       "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"};

int hyp_time_format_check(const char *fmt, char *why, size_t n)
{
    int month = 0, day = 0, seen_hour = 0, h12 = 0, ampm = 0, year = 0;
    if (!fmt || !fmt[0]) {
        snprintf(why, n, "is empty");
        return -1;
    }
    for (const char *p = fmt; *p; p++) {
        if (*p != '%')
            continue;
        char c = *++p;
        switch (c) {
        case 'Y': case 'y': year++; break;
        case 'm': case 'b': month++; break;
        case 'd': day++; break;
        case 'H': seen_hour++; break;
        case 'I': seen_hour++; h12 = 1; break;
        case 'p': ampm = 1; break;
        case 'M': case 'S': case 'z': case '%': break;
        case '\0':
            snprintf(why, n, "ends in a lone %%");
            return -1;
        default:
            snprintf(why, n, "has %%%c, which is not one of %%Y %%y %%m %%b %%d %%H %%I %%p %%M %%S %%z %%%%", c);
            return -1;
        }
    }
    if (year != 1 || month != 1 || day != 1 || seen_hour != 1) {
        snprintf(why, n, "needs one year (%%Y or %%y), a month (%%m or %%b), a day (%%d) and an hour (%%H, or %%I with %%p)");
        return -1;
    }
    if (h12 != ampm) {
        snprintf(why, n, "%s", h12 ? "has %I (12-hour clock) without %p (AM/PM)" : "has %p (AM/PM) without %I (12-hour clock)");
        return -1;
    }
    return 0;
}

/* 1 to `max` digits at *s (advanced); -1 when none. */
static int num(const char **s, int max)
{
    int v = 0, k = 0;
    while (k < max && isdigit((unsigned char)**s)) {
        v = v * 10 + (**s - '0');
        (*s)++;
        k++;
    }
    return k ? v : -1;
}

/* Exactly `n` digits at *s (advanced); -1 otherwise. */
static int num_exact(const char **s, int n)
{
    const char *p = *s;
    int v = num(&p, n);
    if (v < 0 || p - *s != n || isdigit((unsigned char)*p))
        return -1;
    *s = p;
    return v;
}

/* ".fff" or ",fff" at *s: the fraction of a second (advanced), 0 if none. */
static double fraction(const char **s)
{
    const char *p = *s;
    if ((*p != '.' && *p != ',') || !isdigit((unsigned char)p[1]))
        return 0.0;
    double f = 0.0, scale = 0.1;
    for (p++; isdigit((unsigned char)*p); p++, scale /= 10.0)
        f += (*p - '0') * scale;
    *s = p;
    return f;
}

/* "Z", "+hh:mm", "+hhmm" or "+hh" at *s; 0 when there is none. */
static int zone_at(const char **s, int32_t *off_s)
{
    const char *p = *s;
    if (*p == 'Z' || *p == 'z') {
        *off_s = 0;
        *s = p + 1;
        return 1;
    }
    if (*p != '+' && *p != '-')
        return 0;
    int sign = *p == '-' ? -1 : 1;
    p++;
    int hh = num_exact(&p, 2), mm = 0;
    if (hh < 0) {
        const char *q = p;   /* "+0100": four digits */
        if (!(isdigit((unsigned char)q[0]) && isdigit((unsigned char)q[1]) && isdigit((unsigned char)q[2]) &&
              isdigit((unsigned char)q[3])) || isdigit((unsigned char)q[4]))
            return 0;
        hh = (q[0] - '0') * 10 + (q[1] - '0');
        mm = (q[2] - '0') * 10 + (q[3] - '0');
        p = q + 4;
    } else if (*p == ':') {
        p++;
        if ((mm = num_exact(&p, 2)) < 0)
            return 0;
    }
    if (hh > 18 || mm > 59)
        return 0;
    *off_s = sign * (hh * 3600 + mm * 60);
    *s = p;
    return 1;
}

/* One conversion c of the format at *s into f; 0 when the text does not
 * match. Hours of a 12-hour clock go to *h12, AM/PM to *pm. */
static int convert(char c, const char **s, hyp__tfields *f, int *h12, int *pm)
{
    const char *p = *s;
    int v = 0;
    switch (c) {
    case 'Y': v = f->y = num_exact(&p, 4); break;
    case 'y':   /* POSIX strptime: 69-99 are 1969-1999, 00-68 2000-2068 */
        if ((v = num_exact(&p, 2)) >= 0)
            f->y = v + (v >= 69 ? 1900 : 2000);
        break;
    case 'm': v = f->mo = num(&p, 2); break;
    case 'd': v = f->d = num(&p, 2); break;
    case 'H': v = f->h = num(&p, 2); break;
    case 'I': v = *h12 = num(&p, 2); break;
    case 'M': v = f->mi = num(&p, 2); break;
    case 'S':
        if ((v = f->sec = num(&p, 2)) >= 0)
            f->frac = fraction(&p);
        break;
    case 'b':
        v = -1;
        for (int k = 0; k < 12; k++)
            if (strncasecmp(p, months[k], 3) == 0) {
                f->mo = k + 1;
                p += 3;
                v = 0;
                break;
            }
        break;
    case 'p':
        v = -1;
        if ((toupper((unsigned char)p[0]) == 'A' || toupper((unsigned char)p[0]) == 'P') &&
            toupper((unsigned char)p[1]) == 'M') {
            *pm = toupper((unsigned char)p[0]) == 'P';
            p += 2;
            v = 0;
        }
        break;
    case 'z':
        v = zone_at(&p, &f->off_s) ? 0 : -1;
        f->has_zone = v == 0;
        break;
    case '%': v = *p == '%' ? (p++, 0) : -1; break;
    default: v = -1;
    }
    if (v < 0)
        return 0;
    *s = p;
    return 1;
}

hyp_time_result hyp_time_parse_format(const char *text, const char *fmt, const hyp_zone *zone,
                                      double *time_s, hyp_time_local *how)
{
    char why[8];
    if (how)
        memset(how, 0, sizeof *how);
    if (!text || hyp_time_format_check(fmt, why, sizeof why))
        return HYP_TIME_SYNTAX;
    hyp__tfields f = {.y = -1, .mo = -1, .d = -1, .h = -1, .mi = 0, .sec = 0};
    int h12 = -1, pm = -1;
    const char *s = text, *p = fmt;
    while (*s == ' ' || *s == '\t')
        s++;
    for (; *p; p++) {
        if (*p == '%') {
            if (!convert(*++p, &s, &f, &h12, &pm))
                return HYP_TIME_SYNTAX;
        } else if (*p == ' ') {   /* a blank matches one or more blanks */
            if (*s != ' ' && *s != '\t')
                return HYP_TIME_SYNTAX;
            while (*s == ' ' || *s == '\t')
                s++;
        } else if (*s++ != *p)
            return HYP_TIME_SYNTAX;
    }
    while (*s == ' ' || *s == '\t')
        s++;
    if (*s)
        return HYP_TIME_SYNTAX;
    if (h12 >= 0) {   /* 12 AM is midnight, 12 PM noon (ISO/IEC 9899 7.27.3.5 %I, %p) */
        if (h12 < 1 || h12 > 12)
            return HYP_TIME_RANGE;
        f.h = h12 % 12 + (pm ? 12 : 0);
    }
    return hyp__time_from_fields(&f, zone, time_s, how);
}

/* "A.B.YYYY", "A/B/YYYY" or "A-B-YYYY" (A, B of 1-2 digits) at the start of
 * text, then the time: the separator and where the time starts. */
static int numeric_date(const char *text, int *a, int *b, int *y, const char **rest)
{
    const char *s = text;
    while (*s == ' ' || *s == '\t')
        s++;
    char sep;
    if ((*a = num(&s, 2)) < 0 || !strchr("./-", sep = *s) || !sep)
        return 0;
    s++;
    if ((*b = num(&s, 2)) < 0 || *s != sep)
        return 0;
    s++;
    const char *ys = s;
    *y = num(&s, 4);
    if (*y < 0 || isdigit((unsigned char)*s))
        return 0;
    *rest = s;
    return s - ys == 4 ? 1 : 2;   /* 2: a two-digit (or short) year */
}

int hyp_time_numeric_date(const char *text, int *first, int *second)
{
    int a, b, y;
    const char *rest;
    int r = numeric_date(text, &a, &b, &y, &rest);
    if (!r)
        return 0;
    *first = a;
    *second = b;
    return r;
}

hyp_time_result hyp_time_parse_numeric(const char *text, int day_first, const hyp_zone *zone,
                                       double *time_s, hyp_time_local *how)
{
    if (how)
        memset(how, 0, sizeof *how);
    int a, b, y;
    const char *s;
    if (numeric_date(text, &a, &b, &y, &s) != 1)
        return HYP_TIME_SYNTAX;
    hyp__tfields f = {.y = y, .mo = day_first ? b : a, .d = day_first ? a : b};
    if (*s != 'T' && *s != ' ' && *s != '\t')
        return HYP_TIME_SYNTAX;
    for (s++; *s == ' ' || *s == '\t'; s++)
        ;
    if ((f.h = num(&s, 2)) < 0 || *s++ != ':' || (f.mi = num_exact(&s, 2)) < 0)
        return HYP_TIME_SYNTAX;
    if (*s == ':') {
        s++;
        if ((f.sec = num_exact(&s, 2)) < 0)
            return HYP_TIME_SYNTAX;
        f.frac = fraction(&s);
    }
    while (*s == ' ')
        s++;
    f.has_zone = zone_at(&s, &f.off_s);
    while (*s == ' ' || *s == '\t')
        s++;
    if (*s)
        return HYP_TIME_SYNTAX;
    return hyp__time_from_fields(&f, zone, time_s, how);
}
