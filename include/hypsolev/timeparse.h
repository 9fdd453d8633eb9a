/* timeparse.h - time stamps: ISO 8601 / RFC 3339 and Unix epoch seconds to
 * seconds since the epoch (UTC), with zones for stamps that carry none. */
#ifndef HYPSOLEV_TIMEPARSE_H
#define HYPSOLEV_TIMEPARSE_H

#include "hypsolev/export.h"

#include <stddef.h>
#include <stdint.h>
#include "hypsolev/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The day (and local time) of one change of a POSIX TZ rule
 * (POSIX.1-2017 section 8.3, TZ). */
typedef struct hyp_tz_date {
    char kind;         /* 'J': day 1-365, Feb 29 never counted ("J60" is
                          Mar 1); 'D': day 0-365 counting Feb 29 (POSIX's
                          plain "n"); 'M': weekday of a week of a month */
    int8_t month;      /* 'M': 1-12 */
    int8_t week;       /* 'M': 1-5, 5 being the last such weekday */
    int8_t wday;       /* 'M': 0 Sunday to 6 Saturday */
    int16_t day;       /* 'J': 1-365, 'D': 0-365 */
    int32_t time_s;    /* local time of the change after that day's 00:00 (s):
                          0-24 h, or -167..167 h in TZif version 3+ (RFC 8536
                          section 3.3.1); POSIX's default 02:00 */
} hyp_tz_date;

/* A POSIX TZ rule such as "CET-1CEST,M3.5.0,M10.5.0/3": the footer of a
 * TZif file version 2+ (RFC 8536 section 3.3). Offsets are stored east of
 * UTC, the opposite of POSIX's sign ("CET-1" is +3600 s). */
typedef struct hyp_tz_rule {
    int32_t std_off_s;  /* standard time, s east of UTC */
    int32_t dst_off_s;  /* daylight-saving time, s east of UTC */
    int has_dst;        /* 0: std_off_s all year */
    hyp_tz_date start;  /* change to DST, in standard local time */
    hyp_tz_date end;    /* change back, in daylight-saving local time */
} hyp_tz_rule;

/* A time zone for stamps without one: none (such stamps are refused), a
 * fixed offset, or a zone of the tz database with its transitions and, for
 * instants after the last one, the rule of the file's footer. */
typedef struct hyp_zone {
    int kind;              /* 0 none, 1 fixed offset, 2 tz database */
    int32_t offset_s;      /* kind 1: seconds east of UTC */
    char name[64];
    size_t count;          /* kind 2: transitions */
    int64_t *trans_s;      /* UTC instants of the transitions, ascending */
    int32_t *trans_off_s;  /* offset in force from each transition on */
    int32_t first_off_s;   /* offset before the first transition */
    int has_rule;          /* kind 2: a version 2+ file with a non-empty
                              footer; 0: the last offset stays in force */
    hyp_tz_rule rule;      /* offsets after the last transition (at all
                              instants when count is 0) */
} hyp_zone;

HYP_API void hyp_zone_init(hyp_zone *z);
HYP_API void hyp_zone_free(hyp_zone *z);
/* Parses "+HH:MM", "-HHMM", "UTC", "Z" or a tz database name such as
 * "Europe/Vienna" (a TZif file, RFC 8536, read from zoneinfo_dir, or
 * /usr/share/zoneinfo when NULL; versions 2+ with their footer rule).
 * HYP_ERR_VALUE with a message naming the file and what was wrong when it
 * cannot (no such zone, not TZif, a malformed footer). */
HYP_API hyp_status hyp_zone_parse(hyp_zone *z, const char *text,
                          const char *zoneinfo_dir, hyp_error *err);
/* UTC offset (s) in force for a local wall-clock time (seconds since the
 * epoch as if the wall clock were UTC), from the transitions or, after the
 * last one, the footer rule alike. A local time that occurs twice (an
 * overlap, when clocks go back) takes the earlier instant, the larger
 * offset (usually summer time); one that does not occur (a gap, when clocks go
 * forward) takes the offset in force before the gap, so 02:30 in a gap
 * from 02:00 to 03:00 reads as 03:30 after it. */
HYP_API int32_t hyp_zone_offset_for_local(const hyp_zone *z, int64_t local_s);

typedef enum hyp_time_result {
    HYP_TIME_OK = 0,
    HYP_TIME_SYNTAX,     /* not a time stamp */
    HYP_TIME_RANGE,      /* a field out of range (month 13, Feb 30, ...) */
    HYP_TIME_NOZONE      /* no zone in the stamp and none given */
} hyp_time_result;

/* Parses text into seconds since the epoch (UTC). Accepts
 * YYYY-MM-DD[T| ]hh:mm[:ss[.fff]][Z|+hh:mm|+hhmm|+hh] for years 1900-2200,
 * and a plain decimal number of Unix epoch seconds (between 1e8 and 7.3e9,
 * i.e. 1973 to 2200). A stamp without zone uses `zone` (NULL or kind 0:
 * refused). Leading and trailing blanks are ignored. */
HYP_API hyp_time_result hyp_time_parse(const char *text, const hyp_zone *zone,
                               double *time_s);
/* How a stamp without a zone of its own was read in the zone given. */
typedef struct hyp_time_local {
    int zoned;               /* 1: the stamp had no zone and was read in `zone` */
    int32_t offset_s;        /* the UTC offset used (s east of UTC) */
    int repeated;            /* 1: a wall-clock time that happens twice (the
                                clock was set back): *time_s is the first
                                occurrence, second_s the second */
    int skipped;             /* 1: a wall-clock time that never happened (the
                                clock was set forward over it): read with the
                                offset before the change */
    double second_s;         /* repeated: the second occurrence (s since the epoch) */
    int32_t second_offset_s; /* repeated: its UTC offset */
} hyp_time_local;

/* As hyp_time_parse, and fills *how (may be NULL) for a stamp read in
 * `zone`, so that a reader can place repeated wall-clock times by the
 * stamps around them. */
HYP_API hyp_time_result hyp_time_parse_zoned(const char *text, const hyp_zone *zone,
                                     double *time_s, hyp_time_local *how);
/* Formats time_s as "YYYY-MM-DDThh:mm:ss[.fff]Z" (milliseconds only when
 * not whole). buf needs 32 bytes. */
HYP_API void hyp_time_format(double time_s, char *buf, size_t n);
/* Days since 1970-01-01 of a proleptic Gregorian date (H. Hinnant's
 * days_from_civil algorithm, public domain). */
HYP_API int64_t hyp_days_from_civil(int64_t y, unsigned m, unsigned d);


/* Time stamps as exports write them (docs/formats.md, "Time formats").
 * A format is a strftime-style subset: %Y (four-digit year), %y (two
 * digits: 69-99 are 1969-1999, 00-68 2000-2068, as POSIX strptime), %m
 * (month 1-12, one or two digits), %b (English month abbreviation, any
 * case), %d (day), %H (hour 0-24), %I (hour 1-12) with %p (AM or PM, any
 * case), %M, %S (optionally followed in the text by a fraction ".fff" or
 * ",fff"), %z (Z, +hh:mm, +hhmm or +hh), %% (a percent sign); a blank
 * matches one or more blanks, any other character itself. A format needs
 * one year, month, day and hour. Returns 0 when fmt is usable, else -1
 * with the reason in why (n bytes, e.g. "has %Q, which is not one of ..."). */
HYP_API int hyp_time_format_check(const char *fmt, char *why, size_t n);
/* Reads text by fmt into seconds since the epoch (UTC): HYP_TIME_SYNTAX
 * when it does not match (or fmt is not usable), HYP_TIME_RANGE for a field
 * out of range, HYP_TIME_NOZONE without %z and without a zone. *how as in
 * hyp_time_parse_zoned (may be NULL). */
HYP_API hyp_time_result hyp_time_parse_format(const char *text, const char *fmt, const hyp_zone *zone,
                                              double *time_s, hyp_time_local *how);
/* Whether text starts as a numeric date "A.B.YYYY" (or with / or -
 * between, A and B of one or two digits): 0 when not, 1 with A and B in
 * *first and *second, 2 when the year has fewer than four digits (never
 * read without a format that has %y). */
HYP_API int hyp_time_numeric_date(const char *text, int *first, int *second);
/* Reads "A.B.YYYY[T| ]hh:mm[:ss[.fff]][ zone]" as day.month (day_first 1)
 * or month.day (0), otherwise as hyp_time_parse_zoned. */
HYP_API hyp_time_result hyp_time_parse_numeric(const char *text, int day_first, const hyp_zone *zone,
                                               double *time_s, hyp_time_local *how);

#ifdef __cplusplus
}
#endif
#endif
