/* reader_common.h - what the CSV and GPX readers share: number parsing,
 * values refused one at a time as they are read, unit resolution, the
 * checks applied to a series once it is read, and (reader_times.c) local
 * wall-clock stamps and the file's time order. */
#ifndef HYP_READER_COMMON_H
#define HYP_READER_COMMON_H

#include "hypsolev/readers.h"

/* Parses a decimal number (no hex). decimal_comma: a ',' is the decimal
 * separator. Blanks around it (space, tab, CR, LF: XML's whitespace, which
 * xsd:decimal collapses) are ignored. Returns 1 and sets *v for a finite
 * number; 0 when the text is not a number; 2 for an empty (all-blank)
 * field, *v = NaN; 3 for text that names a number that is not finite
 * ("nan", "inf", "-Infinity", or 1e999, beyond a double), *v = NaN. */
int hyp__parse_number(const char *s, size_t len, int decimal_comma, double *v);

/* Copies len bytes of text into buf (n > 4 bytes) for a message, quoted
 * safely: control characters as \n, \r, \t or \xNN (also the C1 controls
 * U+0080..U+009F), '"' and '\' escaped, cut with "..." where buf is too
 * short. A message never holds a raw control character. Returns buf. */
const char *hyp__quote(char *buf, size_t n, const char *text, size_t len);

/* The quantities a reader checks value by value as it reads them. */
typedef enum hyp__field {
    HYP__F_PRESSURE,     /* in the file's unit, perhaps not yet known */
    HYP__F_TEMPERATURE,  /* likewise */
    HYP__F_HUMIDITY,     /* % */
    HYP__F_ELE,          /* m */
    HYP__F_GEOID,        /* m */
    HYP__F_POSITION,     /* degrees */
    HYP__F_COUNT
} hyp__field;

/* A reader's count of refused values per field, to cap the warnings. */
typedef struct hyp__screen {
    const char *path;
    hyp_msgs *msgs;
    size_t n[HYP__F_COUNT];
} hyp__screen;

/* Whether one value as read is kept: r is hyp__parse_number's result for
 * its text, v its value. Pressure and temperature must be finite and of a
 * magnitude some unit allows (their ranges are checked once the unit is
 * known); humidity 0..100 %; ele -1000..10000 m; geoid height -150..150
 * m; a position finite (its range is checked in hyp__check_series). Why
 * these ranges: reader_common.c. Inline: it runs for every value. */
static inline int hyp__value_ok(hyp__field f, int r, double v)
{
    if (r != 1)
        return 0;
    switch (f) {
    case HYP__F_PRESSURE: return v >= -1e6 && v <= 1e6;
    case HYP__F_TEMPERATURE: return v >= -1e4 && v <= 1e4;
    case HYP__F_HUMIDITY: return v >= 0.0 && v <= 100.0;
    case HYP__F_ELE: return v >= -1000.0 && v <= 10000.0;
    case HYP__F_GEOID: return v >= -150.0 && v <= 150.0;
    case HYP__F_POSITION: return v >= -1e3 && v <= 1e3;
    case HYP__F_COUNT: break;
    }
    return 0;
}
/* A value hyp__value_ok did not keep: NaN, with a warning naming file,
 * line, field (its name in the file), the text found (len bytes) and what
 * was expected (capped per field); an empty field (r == 2) is NaN without
 * a warning. */
double hyp__screen_refuse(hyp__screen *sc, hyp__field f, const char *name, unsigned line, int r,
                          const char *text, size_t len);
/* The totals of the warnings that went over the cap. */
void hyp__screen_totals(const hyp__screen *sc);

/* Resolves the unit of one quantity for a whole series whose raw values
 * are in `vals` (count n, NaN skipped): the file's own unit if given, else
 * the option, else inference (a note), else an error naming the file and
 * the field. Converts vals to SI in place. */
hyp_status hyp__resolve_unit(const char *path, const char *field, hyp_quantity q,
                             hyp_unit from_file, hyp_unit from_opt, float *vals,
                             size_t n, hyp_unit *used, hyp_msgs *msgs, hyp_error *err);

/* Range and order checks on a series in SI units: flags pressures outside
 * 300-1100 hPa, blanks temperatures outside -60..+60 degC and positions
 * outside -90..90 / -180..180 degrees, with a warning naming file, line
 * and value (capped, with a total); then the time order (reader_times.c).
 * order: NULL, or where the permutation goes when the samples had to be
 * put in time order (sample i is the file's order[i]; free() it), else
 * NULL. HYP_ERR_NOMEM only. */
hyp_status hyp__check_series(const char *path, hyp_series *s, uint32_t **order,
                             hyp_msgs *msgs, hyp_error *err);

/* Refuses a series that is not worth using: no sample usable, or more
 * than half of those with a time and a pressure refused. The message
 * counts them by reason and, where every pressure is out of range in
 * `pressure_unit` but all fit another unit, says so. */
hyp_status hyp__check_usable(const char *path, const hyp_series *s, hyp_unit pressure_unit,
                             hyp_error *err);

/* reader_times.c: time stamps as a log holds them, read in order. A stamp
 * without a zone is read in the zone of the options; where the wall clock
 * was set back it happens twice, and is read as its first occurrence
 * unless the log has already passed that (then as the second), so a log
 * kept in local time loses no hour. */
typedef struct hyp__clock {
    const hyp_zone *zone;
    double last_s;            /* the previous stamp, NaN before the first */
    int have_off;
    int32_t last_off_s;       /* the UTC offset of the previous zone-less stamp */
    size_t n_changes;         /* offset changes between stamps */
    unsigned change_line;     /* the first's line */
    int32_t change_from_s, change_to_s;
    size_t n_first, n_second; /* repeated wall-clock stamps read as each */
    unsigned second_line;     /* the first read as the second occurrence */
    size_t n_skipped;         /* stamps in an hour the clock skipped */
    unsigned skipped_line;
    const char *format;       /* hyp_time_parse_format's; NULL: ISO 8601 or epoch */
    int date_order;           /* numeric dates (18.06.2026): 0 not read,
                                 1 day first, 2 month first */
} hyp__clock;

void hyp__clock_init(hyp__clock *c, const hyp_zone *zone);
/* Reads one stamp (text as hyp_time_parse takes it) at `line`. */
hyp_time_result hyp__clock_read(hyp__clock *c, const char *text, unsigned line, double *time_s);
/* Notes on the clock changes the stamps crossed and how repeated or
 * skipped wall-clock times were read. */
void hyp__clock_notes(const hyp__clock *c, const char *path, hyp_msgs *msgs);

/* reader_times.c: the time order of the usable samples, in the file's
 * order: a sample whose time is far out of line with both neighbours is
 * refused (HYP_SAMPLE_TIME_OUTLIER, a warning); if others are still out of
 * order the series is sorted by time (stable; a note), *order set as in
 * hyp__check_series; then a time equal to the one before is refused
 * (HYP_SAMPLE_TIME_DUPLICATE, a note). Records where the file's time went
 * back in s->time_back. HYP_ERR_NOMEM only. */
hyp_status hyp__check_order(const char *path, hyp_series *s, uint32_t **order, hyp_msgs *msgs,
                            hyp_error *err);

#endif
