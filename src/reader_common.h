/* reader_common.h - what the CSV and GPX readers share: number parsing,
 * unit resolution and the checks applied to a series once it is read. */
#ifndef HYP_READER_COMMON_H
#define HYP_READER_COMMON_H

#include "hypsolev/readers.h"

/* Parses a decimal number (no NaN, Inf, hex; finite). decimal_comma: a ','
 * is the decimal separator. Returns 1 and sets *v, 0 when not a number;
 * an empty (all-blank) field gives *v = NaN and returns 2. */
int hyp__parse_number(const char *s, size_t len, int decimal_comma, double *v);

/* Resolves the unit of one quantity for a whole series whose raw values
 * are in `vals` (count n, NaN skipped): the file's own unit if given, else
 * the option, else inference (a note), else an error naming the file and
 * the field. Converts vals to SI in place. */
hyp_status hyp__resolve_unit(const char *path, const char *field, hyp_quantity q,
                             hyp_unit from_file, hyp_unit from_opt, float *vals,
                             size_t n, hyp_unit *used, hyp_msgs *msgs, hyp_error *err);

/* Range and order checks on a series in SI units: flags pressures outside
 * 300-1100 hPa and times not after the previous kept sample, blanks
 * temperatures outside -60..+60 degC and humidities outside 0..100 %, with
 * a warning naming file, line and value (capped, with a total). */
void hyp__check_series(const char *path, hyp_series *s, hyp_msgs *msgs);

#endif
