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
} hyp__net;

hyp_network_obs *hyp__net_push(hyp__net *N, hyp_obs_kind kind, double c, double dt_h);
hyp_status hyp__net_occupation(hyp__net *N, size_t k, const hyp_rover_run *run, const hyp__window *win,
                               hyp_error *err);
/* The windows of track k (book, waypoints, found), merged, into *out. */
hyp_status hyp__net_windows(hyp__net *N, size_t k, const hyp_rover_run *run, hyp__window **out, size_t *n,
                            hyp_error *err);
/* Builds the adjustment from the observations, solves and tests it, and
 * fills the stations, tracks and observations of the result. */
hyp_status hyp__net_adjust(hyp__net *N, hyp_error *err);

#endif
