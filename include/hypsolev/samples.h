/* samples.h - a time series of barometer samples as plain arrays (struct of
 * arrays), the unit of data that passes from readers to the core. */
#ifndef HYPSOLEV_SAMPLES_H
#define HYPSOLEV_SAMPLES_H

#include "hypsolev/export.h"

#include <stddef.h>
#include <math.h>
#include <stdint.h>
#include "hypsolev/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* One array per quantity, all of length `count`, stored compactly (a
 * large track is millions of samples; see docs/performance.md). A missing
 * value is NaN, a missing position HYP_NO_POSITION.
 * time_s: seconds since 1970-01-01T00:00:00Z (UTC, leap seconds ignored as
 * POSIX does); pressure_pa: Pa (float: 0.008 Pa steps at 1000 hPa); temp_k:
 * K; rh_pct: relative humidity, %; lat_e7, lon_e7: degrees (WGS84) times
 * 10^7, rounded (1.1 cm steps; read them with hyp_series_lat/lon); ele_m:
 * the file's own height, m (float: 1 mm steps below 8 km). The file line
 * each sample came from (1-based, for messages) is read with
 * hyp_series_line(): it is kept as a byte of difference from the line
 * before, the full number every 64 samples. */
#define HYP_NO_POSITION INT32_MIN
#define HYP_BAD_POSITION (INT32_MIN + 1)   /* given, but beyond +-214 degrees */
#define HYP_TIME_BACK_KEEP 8

typedef struct hyp_series {
    size_t count;
    size_t alloc;
    double *time_s;
    float *pressure_pa;
    float *temp_k;
    float *rh_pct;
    int32_t *lat_e7;
    int32_t *lon_e7;
    float *ele_m;
    uint8_t *line_step;     /* line minus the previous sample's; 255: in line_far */
    uint32_t *line_block;   /* the line of samples 0, 64, 128, ... */
    size_t n_line_far, line_far_alloc;
    struct hyp_line_far { size_t index; uint32_t line; } *line_far;  /* by index */
    uint32_t last_line;
    uint8_t *flag;     /* hyp_sample_flag: why a reader refused the sample */
    /* Where the file's times went back (each run of steps back counted
     * once, in file order, before the reader put the samples in time
     * order): the first HYP_TIME_BACK_KEEP, and how many in all. */
    size_t n_time_back;
    struct hyp_time_back { double time_s, back_s; uint32_t line; } time_back[8];
    int time_sorted;   /* 1: the reader reordered the samples by time */
    /* flags for the whole series */
    int has_temp;      /* at least one sample has a temperature */
    int has_rh;
    int has_position;  /* lat/lon present */
} hyp_series;

/* A reader keeps every record (so that a GPX writer can map outputs back to
 * points) and marks those it refused; the core uses only HYP_SAMPLE_OK,
 * and those are in strictly increasing time order (the reader sorts a
 * file that is not; docs/formats.md). */
typedef enum hyp_sample_flag {
    HYP_SAMPLE_OK = 0,
    HYP_SAMPLE_NO_TIME,          /* no time stamp */
    HYP_SAMPLE_NO_PRESSURE,      /* no pressure value */
    HYP_SAMPLE_PRESSURE_RANGE,   /* pressure outside 300-1100 hPa */
    HYP_SAMPLE_TIME_OUTLIER,     /* time far out of line with the samples
                                    before and after it in the file */
    HYP_SAMPLE_BAD_VALUE,        /* pressure not a finite number in any
                                    unit's range (nan, inf, 1e39) */
    HYP_SAMPLE_TIME_DUPLICATE,   /* time the same as another sample's */
    HYP_SAMPLE_FLAG_COUNT
} hyp_sample_flag;

/* Latitude and longitude of sample i in degrees, NaN when it has none. */
static inline double hyp_series_lat(const hyp_series *s, size_t i)
{
    return s->lat_e7[i] <= HYP_BAD_POSITION ? (double)NAN : (double)s->lat_e7[i] * 1e-7;
}
static inline double hyp_series_lon(const hyp_series *s, size_t i)
{
    return s->lon_e7[i] <= HYP_BAD_POSITION ? (double)NAN : (double)s->lon_e7[i] * 1e-7;
}
/* Degrees as stored: HYP_NO_POSITION for NaN, HYP_BAD_POSITION beyond
 * +-214 degrees (the range of the storage; readers refuse anything beyond
 * +-90 / +-180 anyway, with a message). */
HYP_API int32_t hyp_deg_e7(double deg);

/* The file line of sample i; hyp_series_line_next gives that of sample i
 * from that of sample i - 1 (prev) at once, for walks in order. */
HYP_API uint32_t hyp_series_line(const hyp_series *s, size_t i);
HYP_API uint32_t hyp_series_line_next(const hyp_series *s, size_t i, uint32_t prev);

/* Short English reason for a flag ("pressure outside 300-1100 hPa"). */
HYP_API const char *hyp_sample_flag_text(hyp_sample_flag f);

HYP_API void hyp_series_init(hyp_series *s);
HYP_API void hyp_series_free(hyp_series *s);
/* Appends one sample (NaN for what is missing), rounded to the storage
 * above. HYP_ERR_NOMEM on failure. */
HYP_API hyp_status hyp_series_push(hyp_series *s, double time_s, double pressure_pa,
                           double temp_k, double rh_pct, double lat_deg,
                           double lon_deg, double ele_m, uint32_t line, hyp_sample_flag flag);
/* Reorders the samples: sample i becomes the old sample order[i] (order
 * is a permutation of 0..count-1); lines and flags go along. Allocates
 * one array at a time; after HYP_ERR_NOMEM the series is in no defined
 * order and is only fit to be freed. */
HYP_API hyp_status hyp_series_permute(hyp_series *s, const uint32_t *order);
/* Gives back the growth slack of the arrays (count becomes the capacity). */
HYP_API void hyp_series_shrink(hyp_series *s);
/* Number of samples with flag f. */
HYP_API size_t hyp_series_count_flag(const hyp_series *s, hyp_sample_flag f);

#ifdef __cplusplus
}
#endif
#endif
