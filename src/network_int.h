/* network_int.h - the station network's private parts shared by
 * network.c (observations and the run), network_occupations.c (windows),
 * network_adjust.c (the adjustment) and network_text.c (outputs). */
#ifndef HYP_NETWORK_INT_H
#define HYP_NETWORK_INT_H

#include "survey_int.h"
#include "hypsolev/network.h"

/* A window in which a rover stood on a station. */
typedef struct hyp__window {
    size_t station;
    hyp_occ_source source;
    double t0, t1;
    unsigned line;          /* field book line, 0 otherwise */
} hyp__window;

/* The network being built. */
typedef struct hyp__net {
    const hyp_network_opts *o;
    hyp_survey *sv;
    hyp_network_result *r;
    hyp_book_entry *book;
    size_t n_book;
    unsigned char *book_matched;   /* per book entry: some track took it */
    size_t obs_alloc;
    double *coef;          /* per observation: the sensitivity c (m/Pa) */
    double *dt_h;          /* per observation: hours since its track's start */
    double q_pa2_per_s;    /* random-walk drift, Pa^2/s */
    /* surveys without a base (network_raw.c) */
    double *coef2;         /* per observation: the second instrument's c (m/Pa) */
    double *dt2_h;         /* ... and its hours since its track's start */
    size_t *node;          /* per observation: loop weather node (SIZE_MAX: none) */
    hyp__log *raw;         /* per track: the log read without a base */
    struct hyp__rawocc *ro;/* occupations of the raw tracks */
    size_t n_ro, ro_alloc;
    size_t n_nodes;        /* loop weather nodes */
    unsigned char *pair_link;  /* per pair of tracks (K x K): 1 a leg, 2 side by side too */
    double *pair_c_sum;        /* ... the sum of their legs' sensitivities (m/Pa) */
    size_t *pair_c_n;
    double *pair_sigma;        /* ... the adjusted index difference's sigma (Pa) when
                                  they were never side by side (NaN: none) */
} hyp__net;

/* Seconds of random-walk drift track k has at time t between its
 * comparisons of that kind (network.c). */
double hyp__net_bridge_s(const hyp__net *N, size_t k, double t, hyp_obs_kind kind);
hyp_network_obs *hyp__net_push(hyp__net *N, hyp_obs_kind kind, double c, double dt_h);
/* The track's first and last time (t0_s, t1_s) over the samples of s that
 * are not flagged; both NaN when every sample is (network_obs.c). */
void hyp__net_track_span(hyp_network_track *t, const hyp_series *s);
hyp_status hyp__net_occupation(hyp__net *N, size_t k, const hyp_rover_run *run, const hyp__window *win,
                               hyp_error *err);
/* The windows of track k (book, waypoints, found), merged, into *out:
 * from its samples s and its GPX waypoints wp (NULL: none). */
hyp_status hyp__net_windows(hyp__net *N, size_t k, const hyp_series *s, const hyp_waypoints *wp, hyp__window **out,
                            size_t *n, hyp_error *err);

/* Surveys without a base (network_raw.c). */
/* 1 when a base log of the survey covers part of the rover's time. */
int hyp__net_covered(const hyp_survey *sv, const hyp_series *s);
/* Track k read without a base (N->raw[k] holds its log): its occupations. */
hyp_status hyp__net_raw_track(hyp__net *N, size_t k, hyp_error *err);
/* After all tracks: leapfrog and side-by-side observations between the
 * raw tracks' occupations, loops for raw tracks overlapping none, the index
 * priors, and the warnings about the design. */
hyp_status hyp__net_raw_observations(hyp__net *N, hyp_error *err);
/* After the adjustment: the warnings that need its sigmas, and each
 * station's method. */
void hyp__net_raw_after(hyp__net *N);
void hyp__net_raw_free(hyp__net *N);
/* Builds the adjustment from the observations, solves and tests it, and
 * fills the stations, tracks and observations of the result. */
hyp_status hyp__net_adjust(hyp__net *N, hyp_error *err);

#endif
