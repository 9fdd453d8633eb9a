/* writers.h - outputs: the corrected GPX (input bytes copied, values
 * spliced in), a new GPX 1.1 for rovers that were CSV logs, and the table.
 * Every writer writes a temporary file beside the target and renames it into
 * place, so a target is either the old file or the complete new one. */
#ifndef HYPSOLEV_WRITERS_H
#define HYPSOLEV_WRITERS_H

#include "hypsolev/export.h"

#include "hypsolev/error.h"
#include "hypsolev/readers.h"
#include "hypsolev/correct.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The namespace of the elements this project adds, and its fixed prefix. */
#define HYP_GPX_NS "urn:hypsolev:gpx:1"
#define HYP_GPX_PREFIX "hyp"

/* What the writers add beside the heights; any field may be NULL. */
typedef struct hyp_output_info {
    const char *vref;          /* vertical reference of the heights written */
    const float *gnss_m;       /* the track's GNSS height per sample, same reference */
    const double *easting_m, *northing_m;  /* projected position per sample */
    const char *crs_name;      /* of easting/northing */
    int threads;               /* spliced GPX: threads writing it (0 or 1: one);
                                  the bytes written do not depend on it */
} hyp_output_info;

/* Copies in_path to out_path replacing each corrected point's <ele> value
 * and adding hyp:ele_in, hyp:sigma (or hyp:status) under its extensions.
 * Refuses when out_path is in_path (same file). */
HYP_API hyp_status hyp_gpx_write_spliced(const char *in_path, const hyp_gpx_doc *doc,
                                 const hyp_correct_result *res, const hyp_output_info *info,
                                 const char *out_path, hyp_error *err);

/* Writes a new GPX 1.1 track from a series (a rover read from CSV). */
HYP_API hyp_status hyp_gpx_write_new(const hyp_series *s, const hyp_correct_result *res,
                             const hyp_output_info *info, const char *track_name,
                             const char *out_path, hyp_error *err);

/* Writes the table (CSV, one row per rover sample); "-" is stdout. */
HYP_API hyp_status hyp_table_write(const hyp_series *s, const hyp_correct_result *res,
                           const hyp_output_info *info, const char *out_path, hyp_error *err);

/* 1 when the two paths name the same existing file, else 0. */
HYP_API int hyp_same_file(const char *a, const char *b);

#ifdef __cplusplus
}
#endif
#endif
