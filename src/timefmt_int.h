/* timefmt_int.h - the fields of a wall-clock stamp as the parsers read them,
 * turned into an instant by one function (timeparse.c), so every syntax
 * checks ranges and zones alike (private). */
#ifndef HYP_TIMEFMT_INT_H
#define HYP_TIMEFMT_INT_H

#include "hypsolev/timeparse.h"

typedef struct hyp__tfields {
    int y, mo, d, h, mi, sec;   /* calendar date and wall-clock time */
    double frac;                /* fraction of a second, 0 <= frac < 1 */
    int has_zone;               /* the stamp carried its own offset */
    int32_t off_s;              /* that offset, s east of UTC */
} hyp__tfields;

/* Checks the ranges (years 1900-2200, real dates, 24:00 only on the hour)
 * and reads a stamp without its own offset in `zone` (NULL or kind 0:
 * HYP_TIME_NOZONE), filling *how as hyp_time_parse_zoned does. */
hyp_time_result hyp__time_from_fields(const hyp__tfields *f, const hyp_zone *zone, double *time_s,
                                      hyp_time_local *how);

#endif
