/* marks.h - what a survey knows besides its logs: benchmarks (points of
 * known height), explicit ties, GPX waypoints and the index of a folder of
 * base logs. Plain structs filled by the readers (readers.h). */
#ifndef HYPSOLEV_MARKS_H
#define HYPSOLEV_MARKS_H

#include <stddef.h>
#include "hypsolev/export.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Named GPX waypoints (<wpt>): time (s, UTC; NaN when none) and place. */
typedef struct hyp_waypoints {
    size_t count, alloc;
    char **name;
    double *time_s, *lat_deg, *lon_deg;
} hyp_waypoints;

HYP_API void hyp_waypoints_init(hyp_waypoints *w);
HYP_API void hyp_waypoints_free(hyp_waypoints *w);

/* Known points: a CSV with a header and columns name, lat, lon (degrees),
 * height (m), optional sigma (m, the known height's 1-sigma; default
 * `default_sigma_m`) and optional note. */
typedef struct hyp_benchmarks {
    size_t count, alloc;
    char **name;
    char **note;
    double *lat_deg, *lon_deg, *height_m, *sigma_m;
} hyp_benchmarks;

HYP_API void hyp_benchmarks_init(hyp_benchmarks *b);
HYP_API void hyp_benchmarks_free(hyp_benchmarks *b);
/* Index of the benchmark called name (case-insensitive), or -1. */
HYP_API long hyp_benchmarks_find(const hyp_benchmarks *b, const char *name);

/* An explicit tie: the rover stood on benchmark `name` from start to end
 * (true time). The name "base" means the (first) base station. */
typedef struct hyp_tie_spec {
    char name[64];
    double start_s, end_s;
    unsigned line;
} hyp_tie_spec;

/* An index of base logs in a folder (--base-dir): a CSV named bases.csv
 * with columns file (relative to the folder), height (m), optional lat,
 * lon (degrees), clock_offset (s), kind ("station" or "qnh") and
 * time_format (a CSV log's time format, as --base-time-format). */
typedef struct hyp_base_entry {
    char file[256];
    double height_m, lat_deg, lon_deg, clock_offset_s;
    int qnh;
    unsigned line;
    char time_format[64];   /* optional column time_format: the log's CSV
                               time format (timeparse.h); "" for none */
} hyp_base_entry;

/* A rover's GPX waypoints after the correction (hyp_rover_run.waypoints):
 * per waypoint of its hyp_waypoints (same index), the corrected height
 * (m, in the run's output reference) interpolated from the corrected track
 * at the waypoint's time and its 1-sigma (m), NaN where not corrected;
 * status says why (hyp_wpt_status). */
typedef enum hyp_wpt_status {
    HYP_WPT_CORRECTED = 0,
    HYP_WPT_OUTSIDE = 1,   /* its time is outside the corrected span, or in a
                              gap of the corrected track longer than 300 s */
    HYP_WPT_NO_TIME = 2    /* no <time>: left as it is */
} hyp_wpt_status;

typedef struct hyp_waypoint_heights {
    size_t count;
    double *height_m;
    double *sigma_m;
    unsigned char *status;   /* hyp_wpt_status */
    size_t n_corrected, n_outside, n_no_time;
} hyp_waypoint_heights;

#ifdef __cplusplus
}
#endif
#endif
