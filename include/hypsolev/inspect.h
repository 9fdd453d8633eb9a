/* inspect.h - quality checks of a pressure log: span, sampling, gaps,
 * ranges, spikes, steps, flat lines, clock jumps and the pressure tendency. */
#ifndef HYPSOLEV_INSPECT_H
#define HYPSOLEV_INSPECT_H

#include "hypsolev/export.h"

#include <stddef.h>
#include <stdio.h>
#include "hypsolev/error.h"
#include "hypsolev/units.h"
#include "hypsolev/samples.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum hyp_issue_kind {
    HYP_ISSUE_GAP = 0,      /* no sample for much longer than the interval */
    HYP_ISSUE_SPIKE,        /* one or two samples far off their neighbours */
    HYP_ISSUE_STEP,         /* a lasting jump: moved, re-powered or swapped */
    HYP_ISSUE_FLAT,         /* the same value for too long: a frozen sensor */
    HYP_ISSUE_CLOCK_JUMP,   /* time went backwards or repeated */
    HYP_ISSUE_RAPID,        /* a period of rapid pressure change */
    HYP_ISSUE_KIND_COUNT
} hyp_issue_kind;

HYP_API const char *hyp_issue_kind_name(hyp_issue_kind k);

typedef struct hyp_issue {
    hyp_issue_kind kind;
    double start_s, end_s;  /* UTC */
    double size;            /* Pa for spikes and steps (signed), s for gaps, Pa/s for rapid */
    unsigned line;          /* first line involved */
} hyp_issue;

/* One line describing an issue, without its file line (is->line):
 * "gap          2026-06-18T07:00:00Z to ... (12.0 min without samples)". */
HYP_API void hyp_issue_format(const hyp_issue *is, char *buf, size_t n);

typedef struct hyp_inspect_opts {
    double gap_factor;      /* a gap is longer than this many intervals, default 5 */
    double min_gap_s;       /* ... and than this, default 60 s */
    double spike_sigmas;    /* default 8 robust sigmas */
    double spike_min_pa;    /* ... and at least 30 Pa */
    double step_min_pa;     /* default 30 Pa */
    double flat_min_s;      /* identical values for this long, default 600 s */
    double rapid_pa_per_s;  /* default 1 hPa/h */
} hyp_inspect_opts;

HYP_API void hyp_inspect_opts_init(hyp_inspect_opts *o);

typedef struct hyp_inspection {
    size_t count, usable;
    double t0_s, t1_s, interval_s;
    double p_min_pa, p_max_pa, t_min_k, t_max_k, rh_min, rh_max;
    double noise_pa;                /* white-noise level (second differences) */
    double trend_pa_per_s;          /* least squares over the whole log */
    double max_change_1h_pa, max_change_1h_at_s;   /* largest change over 1 h */
    double max_change_3h_pa, max_change_3h_at_s;   /* and over 3 h */
    hyp_issue *issues;
    size_t n_issues;
    size_t n_kind[HYP_ISSUE_KIND_COUNT];
} hyp_inspection;

HYP_API void hyp_inspection_free(hyp_inspection *r);
/* The inspection of the log at path (its pressure unit as found) as text:
 * span, interval, ranges, tendency and one line per problem, units on
 * every number. */
HYP_API void hyp_inspection_write(FILE *f, const char *path, hyp_unit unit, const hyp_inspection *r);
struct hyp_read_opts;
/* Reads a log (GPX or CSV, chosen by its content), inspects it and writes
 * the inspection to out; the reader's messages go to msgs. */
HYP_API hyp_status hyp_inspect_file(const char *path, const struct hyp_read_opts *ro, FILE *out, hyp_msgs *msgs,
                                    hyp_error *err);
HYP_API hyp_status hyp_inspect(const hyp_series *s, const hyp_inspect_opts *o, hyp_inspection *out,
                       hyp_error *err);

#ifdef __cplusplus
}
#endif
#endif
