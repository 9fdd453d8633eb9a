/* network.c - station heights from a whole survey: each rover's track is
 * corrected with its offset held at zero, every occupation of a station
 * becomes an observation of the station's height (the mean barometric
 * height over the window, its variance from the error budget), the rovers'
 * offsets and drifts become unknowns (observed by the co-locations with a
 * base), control stations enter as weighted observations, and the
 * adjustment engine solves and tests the whole (adjust_engine.h). */
#define _GNU_SOURCE
#include "network_int.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <stdio.h>
#include <sys/stat.h>

#define FLOOR_PA 1.0   /* unresolved micro-pressure changes in a co-location, as
                          the drift fit's (drift.c); common practice, no source */

void hyp_network_opts_init(hyp_network_opts *o)
{
    memset(o, 0, sizeof *o);
    o->control_sigma_m = 0.02;
    o->auto_occupations = 1;
    o->occ_radius_m = 15.0;
    o->occ_min_s = 180.0;
    o->waypoint_window_s = 120.0;
    o->alpha_w = 0.001;
    o->alpha_global = 0.05;
    o->drift_prior_pa_per_h = 10.0;
    o->min_common_s = 120.0;
    o->weather_walk_hpa_sqrt_h = 0.6;
}

void hyp_network_result_free(hyp_network_result *r)
{
    if (!r)
        return;
    hyp_benchmarks_free(&r->stations);
    free(r->st);
    free(r->tracks);
    free(r->obs);
    hyp_msgs_free(&r->msgs);
    free(r);
}

/* ---- observations --------------------------------------------------- */

/* The co-locations of a track with its base: observations of its offset. */
static hyp_status colocations(hyp__net *N, size_t k, const hyp_rover_run *run, hyp_error *err)
{
    hyp_network_track *t = &N->r->tracks[k];
    for (size_t j = 0; j < run->result.n_calibs; j++) {
        const hyp_calib *c = &run->result.calibs[j];
        if (c->kind != HYP_CAL_BASE)
            continue;
        double mid = 0.5 * (c->start_s + c->end_s), f = FLOOR_PA * c->sens_m_per_pa;
        hyp_network_obs *o = hyp__net_push(N, HYP_OBS_COLOCATION, c->sens_m_per_pa, (mid - t->t0_s) / 3600.0);
        if (!o)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        o->track = k;
        o->start_s = c->start_s;
        o->end_s = c->end_s;
        o->samples = c->n;
        o->observed_m = c->raw_m - c->known_m;
        o->sigma_m = sqrt(c->se_m * c->se_m + c->known_sigma_m * c->known_sigma_m + f * f);
        t->colocations++;
    }
    return HYP_OK;
}

/* Seconds of random-walk drift not captured by the track's linear model at
 * time t: a Brownian bridge between the comparisons that pin it
 * (co-locations with a base; side-by-side ones with another rover), or the
 * distance from the nearest (Karatzas and Shreve, Brownian Motion and
 * Stochastic Calculus, section 5.6.B, as the drift fit uses). With none the
 * track's start stands in. */
double hyp__net_bridge_s(const hyp__net *N, size_t k, double t, hyp_obs_kind kind)
{
    double lo = -INFINITY, hi = INFINITY;
    int any = 0;
    for (size_t i = 0; i < N->r->n_obs; i++) {
        const hyp_network_obs *o = &N->r->obs[i];
        if (o->kind != kind || o->flag[0] || (o->track != k && (kind != HYP_OBS_SIDE_BY_SIDE || o->track2 != k)))
            continue;
        double m = 0.5 * (o->start_s + o->end_s);
        any = 1;
        if (m <= t && m > lo)
            lo = m;
        if (m >= t && m < hi)
            hi = m;
    }
    if (!any)
        return fabs(t - N->r->tracks[k].t0_s);
    if (isinf(lo))
        return hi - t;
    if (isinf(hi))
        return t - lo;
    return hi > lo ? (t - lo) * (hi - t) / (hi - lo) : 0.0;
}

/* A field-book window on a station too far from where the track's positions
 * put the rover beside the base: the positions (a frozen or stale fix) and
 * the book disagree. The book is used, as where the found standing disagrees
 * with it (network_occupations.c), and the co-location it contradicts is
 * left out: otherwise every booking inside it would be dropped as "beside
 * the base" and hours of walking averaged into one co-location. Farther
 * than the tie radius (how far from the base a co-location is found) plus
 * the occupation radius, the booked station cannot be the base's mark
 * (geometry of the two radii; no source needed). */
static void book_over_colocation(hyp__net *N, size_t k, const hyp_rover_run *run, const hyp__window *win)
{
    const hyp_benchmarks *st = &N->r->stations;
    double lim = N->sv->copts.tie_radius_m + N->o->occ_radius_m;
    for (size_t j = 0; j < run->result.n_calibs; j++) {
        const hyp_calib *c = &run->result.calibs[j];
        if (c->kind != HYP_CAL_BASE || !(c->start_s < win->t1 && win->t0 < c->end_s))
            continue;
        double d = hyp_geo_distance_m(st->lat_deg[win->station], st->lon_deg[win->station], c->lat_deg, c->lon_deg);
        if (!(d > lim))
            continue;
        for (size_t i = 0; i < N->r->n_obs; i++) {
            hyp_network_obs *co = &N->r->obs[i];
            if (co->kind != HYP_OBS_COLOCATION || co->track != k || co->flag[0] || co->start_s != c->start_s ||
                co->end_s != c->end_s)
                continue;
            char a[32], b[32];
            hyp_time_format(co->start_s, a, sizeof a);
            hyp_time_format(co->end_s, b, sizeof b);
            hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", N->o->fieldbook_path, win->line,
                            "%s: the book has %s, %.0f m from where the track's positions put the rover beside the "
                            "base from %s to %s; the book is used and that co-location is not",
                            N->r->tracks[k].name, st->name[win->station], d, a, b);
            snprintf(co->flag, sizeof co->flag, "not used: the field book (line %u) puts the rover on %s, %.0f m "
                     "away, within this window", win->line, st->name[win->station], d);
            if (N->r->tracks[k].colocations)
                N->r->tracks[k].colocations--;
        }
    }
}

/* One occupation's observation from the corrected samples in its window:
 * the mean height with no offset; its variance: the sensor noise averaged
 * over the samples, every other part of the budget kept whole (they do not
 * average out within minutes), and the drift the linear model misses. */
hyp_status hyp__net_occupation(hyp__net *N, size_t k, const hyp_rover_run *run, const hyp__window *win,
                               hyp_error *err)
{
    const hyp_series *s = run->rover;
    double sum_h = 0, sum_c = 0, sum_t = 0, noise2 = 0, other2 = 0;
    size_t n = 0;
    for (size_t i = 0; i < s->count; i++) {
        if (s->time_s[i] < win->t0 || s->time_s[i] > win->t1 || run->result.status[i] != HYP_PT_OK)
            continue;
        hyp_point_detail d;
        if (hyp_correct_point(&run->result, i, &d) != HYP_OK)
            continue;
        sum_h += d.height_m, sum_c += d.sens_m_per_pa, sum_t += s->time_s[i];
        noise2 += d.budget_m[HYP_B_NOISE] * d.budget_m[HYP_B_NOISE];
        for (int b = 0; b < HYP_B_COUNT; b++)
            if (b != HYP_B_NOISE && b != HYP_B_FIT)
                other2 += d.budget_m[b] * d.budget_m[b];
        n++;
    }
    hyp_network_track *t = &N->r->tracks[k];
    double tm = n ? sum_t / (double)n : 0.5 * (win->t0 + win->t1), c = n ? sum_c / (double)n : 0.0;
    hyp_network_obs *o = hyp__net_push(N, HYP_OBS_OCCUPATION, c, (tm - t->t0_s) / 3600.0);
    if (!o)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    o->source = win->source;
    o->station = win->station;
    o->track = k;
    o->start_s = win->t0;
    o->end_s = win->t1;
    o->samples = n;
    o->line = win->line;
    if (n < 3) {
        snprintf(o->flag, sizeof o->flag, "not used: %zu corrected samples in the window (3 needed)", n);
        return HYP_OK;
    }
    if (win->source == HYP_OCC_BOOK)
        book_over_colocation(N, k, run, win);
    /* beside the base the samples already observe the offset (a
     * co-location): used twice they would count as independent evidence */
    for (size_t j = 0; j + 1 < N->r->n_obs; j++) {
        const hyp_network_obs *co = &N->r->obs[j];
        if (co->kind == HYP_OBS_COLOCATION && !co->flag[0] && co->track == k && co->start_s < win->t1 && win->t0 < co->end_s) {
            snprintf(o->flag, sizeof o->flag, "not used: the rover stood beside the base then (a co-location uses "
                     "these samples)");
            return HYP_OK;
        }
    }
    double nn = (double)n, rw = c * sqrt(N->q_pa2_per_s * hyp__net_bridge_s(N, k, tm, HYP_OBS_COLOCATION));
    o->observed_m = sum_h / nn;
    o->sigma_m = sqrt(noise2 / nn / nn + other2 / nn + rw * rw);
    t->occupations++;
    return HYP_OK;
}

/* ---- the run ---------------------------------------------------------- */

/* One track: corrected with its offset held at zero (the network solves
 * it), its co-locations and occupations turned into observations. */
static hyp_status run_track(hyp__net *N, size_t k, int threads, hyp_error *err)
{
    hyp_network_track *t = &N->r->tracks[k];
    /* read first: a rover no base covers is read raw (network_raw.c); a
     * covered one is read again by the correction, which reports what the
     * reader says, so this reading's messages are kept only for a raw one */
    hyp_read_opts rdo;
    hyp__rover_read_opts(N->sv, t->path, &rdo);
    hyp_msgs rm;
    hyp_msgs_init(&rm);
    hyp_error re;
    hyp_status rst = hyp__log_read(t->path, &rdo, &N->raw[k], &rm, &re);
    if (!rst && !hyp__net_covered(N->sv, hyp__log_series(&N->raw[k]))) {
        for (size_t i = 0; i < rm.count; i++)
            hyp_msgs_add_at(&N->r->msgs, rm.items[i].level, rm.items[i].code, rm.items[i].file, rm.items[i].line, "%s",
                            rm.items[i].text);
        hyp_msgs_free(&rm);
        return hyp__net_raw_track(N, k, err);
    }
    hyp_msgs_free(&rm);
    hyp__log_free(&N->raw[k]);
    memset(&N->raw[k], 0, sizeof N->raw[k]);
    if (rst && !N->sv->n_pool) {   /* no base to try: the reader's error is the track's */
        t->status = rst;
        snprintf(t->error, sizeof t->error, "%s", re.message);
        hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", t->path, 0, "not used: %s", re.message);
        return HYP_OK;
    }
    hyp_correct_opts co = N->sv->copts;
    co.offset_pa = 0.0;
    co.offset_sigma_pa = 0.0;
    co.benchmarks = NULL;   /* control stations enter the network, not the track */
    co.ties = NULL;
    co.n_ties = 0;
    hyp_rover_run *run = NULL;
    hyp_status st = hyp__survey_run_with(N->sv, t->path, NULL, threads, &co, &run, err);
    if (st)
        return st;
    hyp_msgs *m = &run->msgs;
    for (size_t i = 0; i < m->count; i++)
        hyp_msgs_add_at(&N->r->msgs, m->items[i].level, m->items[i].code, m->items[i].file, m->items[i].line, "%s",
                        m->items[i].text);
    if (run->status) {
        t->status = run->status;
        snprintf(t->error, sizeof t->error, "%s", run->error.message);
        hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", t->path, 0, "not used: %s", run->error.message);
        hyp_rover_run_free(run);
        return HYP_OK;
    }
    const hyp_series *s = run->rover;
    hyp__net_track_span(t, s);
    hyp__window *w = NULL;
    size_t nw = 0;
    st = colocations(N, k, run, err);
    if (!st)
        st = hyp__net_windows(N, k, s, ((const struct hyp__rover_priv *)run->priv)->rv.is_gpx
                                           ? &((const struct hyp__rover_priv *)run->priv)->rv.doc.wpts : NULL,
                              &w, &nw, err);
    for (size_t j = 0; !st && j < nw; j++)
        st = hyp__net_occupation(N, k, run, &w[j], err);
    free(w);
    hyp_rover_run_free(run);
    return st;
}

/* 1 when the files at a and b hold the same bytes, 0 when not or when one
 * cannot be read (its reader says why later). */
static int same_bytes(const char *a, const char *b)
{
    FILE *fa = fopen(a, "rb"), *fb = fopen(b, "rb");
    int same = fa && fb;
    char ba[8192], bb[8192];
    while (same) {
        size_t na = fread(ba, 1, sizeof ba, fa), nb = fread(bb, 1, sizeof bb, fb);
        if (na != nb || memcmp(ba, bb, na))
            same = 0;
        else if (na < sizeof ba)
            break;
    }
    if (fa)
        fclose(fa);
    if (fb)
        fclose(fb);
    return same;
}

/* One logger's file given twice under two names: its readings would enter
 * as two instruments' (side by side, legs, occupations twice) and every
 * sigma shrink by about 1/sqrt(2) on no new evidence. Files of different
 * sizes are told apart without reading them. */
static hyp_status same_files(const char *const *rovers, size_t n, hyp_error *err)
{
    for (size_t k = 0; k < n; k++) {
        struct stat sk;
        if (stat(rovers[k], &sk))
            continue;
        for (size_t j = 0; j < k; j++) {
            struct stat sj;
            if (!stat(rovers[j], &sj) && sj.st_size == sk.st_size && same_bytes(rovers[j], rovers[k]))
                return hyp_error_set(err, HYP_ERR_USAGE, "%s and %s hold the same data byte for byte: one logger's "
                                     "file given twice would count its readings as two instruments' and shrink the "
                                     "sigmas; give it once", rovers[j], rovers[k]);
        }
    }
    return HYP_OK;
}

static hyp_status open_result(hyp__net *N, const char *const *rovers, size_t n, hyp_error *err)
{
    hyp_network_result *r = N->r;
    hyp_msgs_init(&r->msgs);
    hyp_benchmarks_init(&r->stations);
    r->out_ref = N->sv->o.out_ref;
    r->stations_path = N->o->stations_path;
    r->fieldbook_path = N->o->fieldbook_path;
    if (!N->o->stations_path)
        return hyp_error_set(err, HYP_ERR_USAGE, "no stations file given (--stations)");
    hyp_status st = hyp_stations_read(N->o->stations_path, N->o->control_sigma_m, &r->stations, &r->msgs, err);
    if (st)
        return st;
    if (!(r->st = calloc(r->stations.count, sizeof *r->st)) || !(r->tracks = calloc(n ? n : 1, sizeof *r->tracks)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    r->n_tracks = n;
    if (!(N->raw = calloc(n ? n : 1, sizeof *N->raw)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t k = 0; k < n; k++) {
        r->tracks[k].path = rovers[k];
        hyp__stem(rovers[k], r->tracks[k].name, sizeof r->tracks[k].name);
        for (size_t j = 0; j < k; j++)
            if (!strcmp(r->tracks[j].name, r->tracks[k].name))
                return hyp_error_set(err, HYP_ERR_USAGE, "%s and %s have one name (%s): the field book could not tell "
                                     "them apart; rename one", rovers[j], rovers[k], r->tracks[k].name);
    }
    st = same_files(rovers, n, err);
    if (!st && N->o->fieldbook_path) {
        st = hyp_fieldbook_read(N->o->fieldbook_path, &N->sv->rover_zone, &r->stations, &N->book, &N->n_book, err);
        if (!st && !(N->book_matched = calloc(N->n_book ? N->n_book : 1, 1)))
            st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    return st;
}

/* What the run found worth saying before the adjustment. */
static hyp_status check_inputs(hyp__net *N, hyp_error *err)
{
    hyp_network_result *r = N->r;
    for (size_t e = 0; e < N->n_book; e++)
        if (!N->book_matched[e])
            hyp_msgs_add_at(&r->msgs, HYP_WARNING, "input", N->o->fieldbook_path, N->book[e].line,
                            "rover \"%s\" is none of the tracks given; entry not used", N->book[e].rover);
    size_t usable_tracks = 0, control = 0, colocs = 0;
    for (size_t k = 0; k < r->n_tracks; k++)
        usable_tracks += r->tracks[k].status == HYP_OK;
    if (!usable_tracks)
        return hyp_error_set(err, HYP_ERR_NODATA, "no track could be used (their messages say why)");
    unsigned char *occ = calloc(r->stations.count ? r->stations.count : 1, 1);
    if (!occ)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < r->n_obs; i++) {
        const hyp_network_obs *o = &r->obs[i];
        if ((o->kind == HYP_OBS_OCCUPATION || o->kind == HYP_OBS_LEAPFROG || o->kind == HYP_OBS_SIDE_BY_SIDE ||
             o->kind == HYP_OBS_LOOP) && !o->flag[0]) {
            occ[o->station] = 1;
            if (o->station2 != SIZE_MAX)
                occ[o->station2] = 1;
        }
        colocs += o->kind == HYP_OBS_COLOCATION && !o->flag[0];
    }
    for (size_t s = 0; s < r->stations.count; s++) {
        if (!occ[s])
            hyp_msgs_add_at(&r->msgs, HYP_NOTE, "input", N->o->stations_path, 0, "station %s: occupied by no rover",
                            r->stations.name[s]);
        control += occ[s] && r->stations.height_m[s] == r->stations.height_m[s];
    }
    free(occ);
    size_t loops = 0;
    for (size_t k = 0; k < r->n_tracks; k++)
        loops += r->tracks[k].raw == 2;
    if (!control && !colocs && loops)
        return hyp_error_set(err, HYP_ERR_NODATA, "a loop without a base needs a known mark: none of the stations the "
                             "rovers occupied has a height in %s, so the weather and the heights cannot be told apart "
                             "(give a control height for at least one occupied station, better two, or a base)",
                             N->o->stations_path);
    if (!control && !colocs)
        return hyp_error_set(err, HYP_ERR_NODATA, "no occupied control station and no co-location with a base: "
                             "nothing fixes the heights (give control heights in %s, or --base-at for co-locations)",
                             N->o->stations_path);
    return HYP_OK;
}

/* Heights from the known heights' reference into the output's: at each
 * station, ellipsoidal = orthometric + N (EGM96 through PROJ). */
static hyp_status convert_heights(hyp__net *N, hyp_error *err)
{
    hyp_vref from = N->sv->o.known_ref, to = N->sv->o.out_ref;
    if (from == to)
        return HYP_OK;
    hyp_geo *g = NULL;
    hyp_status st = hyp_geo_open(&g, err);
    if (!st)
        st = hyp_geo_enable_geoid(g, err);
    hyp_network_result *r = N->r;
    for (size_t s = 0; !st && s < r->stations.count; s++) {
        if (!(r->st[s].height_m == r->st[s].height_m))
            continue;
        double und = hyp_geo_undulation_m(g, r->stations.lat_deg[s], r->stations.lon_deg[s]);
        if (!(und == und))
            st = hyp_error_set(err, HYP_ERR_VALUE, "station %s: no geoid undulation at %.6f, %.6f", r->stations.name[s],
                               r->stations.lat_deg[s], r->stations.lon_deg[s]);
        else
            r->st[s].height_m += to == HYP_VREF_ELLIPSOID ? und : -und;
    }
    hyp_geo_close(g);
    return st;
}

/* What each sigma means for a gravity reduction: the free-air gradient
 * 0.3086 mGal/m and the Bouguer slab 2 pi G rho = 0.1119 mGal/m at 2670
 * kg/m^3 (Hinze et al., "New standards for reducing gravity data: the North
 * American gravity database", Geophysics 70(4), 2005, J25-J32). */
#define FREE_AIR_MGAL_PER_M 0.3086
#define BOUGUER_MGAL_PER_M 0.1119

hyp_status hyp_network_run(hyp_survey *sv, const hyp_network_opts *o, const char *const *rovers, size_t n,
                           hyp_network_result **res, hyp_error *err)
{
    hyp_network_opts dflt;
    if (!o) {
        hyp_network_opts_init(&dflt);
        o = &dflt;
    }
    *res = NULL;
    hyp__net N = {.o = o, .sv = sv, .q_pa2_per_s = sv->copts.drift_rw_pa2_per_s};
    if (!(N.r = calloc(1, sizeof *N.r)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    hyp_status st = open_result(&N, rovers, n, err);
    int threads = sv->o.threads > 0 ? sv->o.threads : 1;
    for (size_t k = 0; !st && k < n; k++)
        st = run_track(&N, k, threads, err);
    if (!st)
        st = hyp__net_raw_observations(&N, err);
    if (!st)
        st = check_inputs(&N, err);
    if (!st)
        st = hyp__net_adjust(&N, err);
    if (!st)
        hyp__net_raw_after(&N);
    if (!st)
        st = convert_heights(&N, err);
    for (size_t s = 0; !st && s < N.r->stations.count; s++) {
        N.r->st[s].free_air_mgal = N.r->st[s].sigma_m * FREE_AIR_MGAL_PER_M;
        N.r->st[s].bouguer_mgal = N.r->st[s].sigma_m * BOUGUER_MGAL_PER_M;
    }
    free(N.book);
    free(N.book_matched);
    free(N.coef);
    free(N.dt_h);
    free(N.coef2);
    free(N.dt2_h);
    free(N.node);
    hyp__net_raw_free(&N);
    *res = N.r;   /* on an error too: its messages say what came before */
    return st;
}
