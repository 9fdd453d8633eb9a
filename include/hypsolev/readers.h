/* readers.h - readers of rover and base logs: GPX 1.0/1.1 tracks and CSV
 * logs. They know formats, times and units, nothing of physics, and fill a
 * hyp_series plus, for GPX, the byte layout a splicing writer needs. */
#ifndef HYPSOLEV_READERS_H
#define HYPSOLEV_READERS_H

#include "hypsolev/export.h"

#include <stdint.h>
#include <stdio.h>
#include "hypsolev/error.h"
#include "hypsolev/samples.h"
#include "hypsolev/timeparse.h"
#include "hypsolev/units.h"
#include "hypsolev/marks.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct hyp_read_opts {
    /* GPX: local name of the extension element; CSV: column name.
     * NULL means "pressure", "temperature", "humidity". */
    const char *pressure_field;
    const char *temperature_field;
    const char *humidity_field;
    /* Units to use when the file does not say; HYP_UNIT_NONE: infer from
     * magnitude where unambiguous (with a note), else refuse. */
    hyp_unit pressure_unit;
    hyp_unit temperature_unit;
    /* Zone for time stamps without one; NULL: such stamps are refused. */
    const hyp_zone *zone;
    /* CSV only: a rover log needs lat and lon columns. */
    int need_position;
    /* GPX only: NULL, or where the track stores a barometric
     * (standard-atmosphere) altitude in place of a pressure: "ele" (the
     * point's own height, which then is no GNSS height) or the local name
     * of an extension element. Each value (m, geopotential, read with the
     * reference 1013.25 hPa: hyp_baro_altitude_to_pressure_pa) becomes the
     * sample's pressure; a value outside -500..9000 m is an error naming
     * the line. The unknown reference the recorder used, and its
     * re-settings, are the correction's business (docs/methods.md). */
    const char *baro_altitude_field;
    /* CSV only: the time column's format (hyp_time_parse_format in
     * timeparse.h); NULL: ISO 8601, epoch seconds or a numeric date whose
     * day/month order the file's dates decide (docs/formats.md). */
    const char *time_format;
} hyp_read_opts;

HYP_API void hyp_read_opts_init(hyp_read_opts *o);

/* Where in a GPX file each point's bytes are, for the splicing writer.
 * Offsets are byte offsets into the input file. */
typedef enum hyp_ext_kind {
    HYP_EXT_INSIDE = 0,   /* ext_ins is just before an existing </extensions> */
    HYP_EXT_WRAP = 1,     /* GPX 1.1, no <extensions>: ext_ins is before </trkpt> */
    HYP_EXT_BARE = 2      /* GPX 1.0: elements go bare before </trkpt> */
} hyp_ext_kind;

typedef struct hyp_gpx_layout {
    int version;            /* 10 or 11 */
    int has_namespace;      /* the root declares the GPX namespace */
    char prefix[64];        /* prefix of the GPX namespace ("" for default) */
    int64_t root_attr_ins;  /* where xmlns:hyp="..." goes in the root tag */
    int has_hyp_ns;         /* the root already declares our namespace */
    int64_t root_open_end;  /* just after the root start tag's '>' (-1: <gpx/>) */
    int64_t root_close;     /* start of </gpx> */
    int64_t meta_ins;       /* GPX 1.1: where document-level elements go */
    int meta_kind;          /* 0 no <metadata>, 1 inside its <extensions>,
                               2 before </metadata> (needs <extensions>),
                               3 <metadata/> (nowhere to add) */
    /* Per point in 12 bytes, read through hyp_gpx_point_next(). A point's
     * anchor is its open_end, or for <trkpt .../> the '/' of its tag. */
    uint32_t *pt_step;      /* anchor minus the previous point's (the first's: minus 0) */
    uint16_t *pt_ele_beg;   /* ele_beg - anchor; HYP_GPX_NONE16 without <ele>,
                               HYP_GPX_FAR16 when it does not fit (see ele_far) */
    uint16_t *pt_ele_len;   /* ele_end - ele_beg (HYP_GPX_FAR16: see ele_far) */
    uint32_t *pt_ext;       /* ext_ins - anchor in the low 30 bits, the
                               hyp_ext_kind in the top 2; HYP_GPX_NONE for <trkpt/> */
    /* The rare <ele> that does not fit 16 bits, by point index (ascending). */
    size_t n_far, far_alloc;
    struct hyp_gpx_far { size_t index; uint32_t beg, len; } *ele_far;
    int64_t file_size;
} hyp_gpx_layout;

#define HYP_GPX_NONE UINT32_MAX
#define HYP_GPX_NONE16 UINT16_MAX
#define HYP_GPX_FAR16 (UINT16_MAX - 1)

/* One point's byte positions in the input file, -1 where there is none. */
typedef struct hyp_gpx_point {
    int64_t open_end;       /* just after the '>' of the start tag; -1 for <trkpt/> */
    int64_t ele_beg;        /* start of <ele>'s text, -1 without <ele> */
    int64_t ele_end;        /* end of <ele>'s text (start of </ele>) */
    int64_t ext_ins;        /* where the added elements go; -1 for <trkpt/> */
    hyp_ext_kind ext_kind;
} hyp_gpx_point;

/* Point i's positions. Points are stored relative to the one before, so
 * they are read in order: *anchor is 0 before point 0, and each call
 * leaves it ready for point i + 1. */
HYP_API void hyp_gpx_point_next(const hyp_gpx_layout *L, size_t i, int64_t *anchor, hyp_gpx_point *p);


typedef struct hyp_gpx_doc {
    hyp_series pts;         /* one sample per trkpt/rtept: in file order, or
                               in time order where the file was not */
    uint32_t *pt_series;    /* NULL: pts is in file order; else the file's
                               point j (layout order) is pts sample
                               pt_series[j] */
    hyp_gpx_layout layout;
    hyp_waypoints wpts;
    hyp_unit pressure_unit, temperature_unit;  /* as found or inferred */
    double *geoidheight_m;  /* per sample of pts: <geoidheight> (m), NaN where absent;
                               NULL when no point has one */
    int has_geoidheight;
    /* Per waypoint of wpts (same index): its byte positions, for the
     * splicing writer (open_end -1 for <wpt .../>), and its <ele> (m, NaN
     * without one). */
    hyp_gpx_point *wpt_at;
    double *wpt_ele_m;
} hyp_gpx_doc;

HYP_API void hyp_gpx_doc_init(hyp_gpx_doc *d);
HYP_API void hyp_gpx_doc_free(hyp_gpx_doc *d);

/* Reads a GPX 1.0 or 1.1 file (or one without namespace) with a streaming
 * parser: never builds a tree, never expands external entities or reaches the
 * network. Refuses encodings other than UTF-8 / ASCII. */
HYP_API hyp_status hyp_gpx_read(const char *path, const hyp_read_opts *opts,
                        hyp_gpx_doc *doc, hyp_msgs *msgs, hyp_error *err);

/* Reads a CSV log: header row with columns time, pressure, and optional
 * temperature, humidity, lat, lon, ele (case-insensitive, a unit in
 * brackets "pressure [hPa]"), delimiter , ; or tab (detected), decimal
 * comma where the delimiter is not a comma, quoted fields, blank and '#'
 * lines skipped, UTF-8 byte-order mark accepted. */
HYP_API hyp_status hyp_csv_read(const char *path, const hyp_read_opts *opts,
                        hyp_series *out, hyp_unit *pressure_unit_found,
                        hyp_msgs *msgs, hyp_error *err);



/* Reads known points (see hyp_benchmarks in marks.h). */
HYP_API hyp_status hyp_benchmarks_read(const char *path, double default_sigma_m, hyp_benchmarks *out,
                               hyp_msgs *msgs, hyp_error *err);

/* Reads a tie list: CSV with columns name, start, end (times as in logs;
 * `zone` for times without one). Every name must be "base" or one of
 * `benchmarks` (which may be NULL). *out is allocated; free() it. */
HYP_API hyp_status hyp_ties_read(const char *path, const hyp_zone *zone, const hyp_benchmarks *benchmarks,
                         hyp_tie_spec **out, size_t *count, hyp_error *err);


HYP_API hyp_status hyp_base_index_read(const char *path, hyp_base_entry **out, size_t *count, hyp_error *err);

/* 1 when the file looks like XML (first non-blank byte after an optional
 * byte-order mark is '<'), 0 when not, -1 when it cannot be read. */
HYP_API int hyp_file_is_xml(const char *path);


/* Copies a stream (a rover on standard input) into a new private file
 * DIR/hypsolev-stdin.XXXXXX/stdin (DIR: NULL or "" for /tmp), whose name
 * goes into path (n bytes, PATH_MAX is enough): the readers need a
 * regular file and the GPX writer copies the input's bytes. Nothing is left
 * behind on failure. Remove it with hyp_spool_remove() after the run. */
HYP_API hyp_status hyp_spool_stream(FILE *in, const char *dir, char *path, size_t n, hyp_error *err);
/* Removes a file of hyp_spool_stream() and its folder; NULL or "": nothing. */
HYP_API void hyp_spool_remove(const char *path);

#ifdef __cplusplus
}
#endif
#endif
