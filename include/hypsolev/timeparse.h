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

/* A time zone for stamps without one: none (such stamps are refused), a
 * fixed offset, or a zone of the tz database with its transitions. */
typedef struct hyp_zone {
    int kind;              /* 0 none, 1 fixed offset, 2 tz database */
    int32_t offset_s;      /* kind 1: seconds east of UTC */
    char name[64];
    size_t count;          /* kind 2: transitions */
    int64_t *trans_s;      /* UTC instants of the transitions, ascending */
    int32_t *trans_off_s;  /* offset in force from each transition on */
    int32_t first_off_s;   /* offset before the first transition */
} hyp_zone;

HYP_API void hyp_zone_init(hyp_zone *z);
HYP_API void hyp_zone_free(hyp_zone *z);
/* Parses "+HH:MM", "-HHMM", "UTC", "Z" or a tz database name such as
 * "Europe/Vienna" (read from zoneinfo_dir, or /usr/share/zoneinfo when
 * NULL). HYP_ERR_VALUE with a message when it cannot. */
HYP_API hyp_status hyp_zone_parse(hyp_zone *z, const char *text,
                          const char *zoneinfo_dir, hyp_error *err);
/* UTC offset (s) in force for a local wall-clock time (seconds since the
 * epoch as if the wall clock were UTC). In a DST overlap the earlier
 * (summer) offset is taken; in a gap the offset before the gap. */
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
/* Formats time_s as "YYYY-MM-DDThh:mm:ss[.fff]Z" (milliseconds only when
 * not whole). buf needs 32 bytes. */
HYP_API void hyp_time_format(double time_s, char *buf, size_t n);
/* Days since 1970-01-01 of a proleptic Gregorian date (H. Hinnant's
 * days_from_civil algorithm, public domain). */
HYP_API int64_t hyp_days_from_civil(int64_t y, unsigned m, unsigned d);

#ifdef __cplusplus
}
#endif
#endif
