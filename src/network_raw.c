/* network_raw.c - surveys without a base: rovers that no base log covers
 * are read raw, their occupations found as for the others, and then
 *   - leapfrog: two occupations by different instruments that overlap in
 *     time give the height difference of their stations from simultaneous
 *     pressures through the hypsometric equation (Wallace and Hobbs,
 *     Atmospheric Science, 2nd ed., 2006, eq. 3.29), with the instruments'
 *     index (offset, drift) as unknowns shared with the base path's; one on
 *     the same station (or within a few metres) is a side-by-side
 *     comparison and observes the index difference;
 *   - loop: a rover overlapping no other has the weather as an unknown
 *     piecewise-linear function of time, one node per occupation, tied by
 *     random-walk steps.
 * The equations and the sigma model are in docs/methods.md, "Surveys
 * without a base"; the adjustment in network_adjust.c. */
#define _GNU_SOURCE
#include "network_int.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define SBS_M 5.0        /* two stations this close are one for a side-by-side
                            comparison: a few metres is a height difference of
                            centimetres at most on a walkable slope (common
                            practice, no source) */
#define MAX_GAP_S 120.0  /* the other rover's samples are not interpolated
                            across a longer gap (as the windows, network_occupations.c) */
#define FLOOR_PA 1.0     /* unresolved micro-pressure changes per instrument, as
                            the co-locations' (network.c; common practice, no source) */
#define NO_THERMO_K 10.0 /* 1 sigma of the air temperature when a rover has no
                            thermometer and the standard lapse-rate model stands in:
                            surface temperatures 10-15 K off the standard atmosphere
                            are common in any season (from memory) */
#define MIN_SAMPLES 3

typedef struct hyp__rawocc {
    size_t track, station;
    hyp_occ_source source;
    unsigned line;
    double t0, t1;        /* the window */
    size_t n;             /* good samples in it */
    double p_pa, sd_pa;   /* their mean pressure and its scatter */
    double tm;            /* their mean time */
    double temp_k, rh_pct;/* means of the thermometer and hygrometer (NaN: none) */
    int paired;
} hyp__rawocc;

int hyp__net_covered(const hyp_survey *sv, const hyp_series *s)
{
    double t0 = NAN, t1 = NAN;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i]) {
            if (t0 != t0)
                t0 = s->time_s[i];
            t1 = s->time_s[i];
        }
    if (!(t0 == t0))
        return sv->n_pool > 0;   /* nothing to place in time: the base path says why */
    for (size_t k = 0; k < sv->n_pool; k++) {
        double cover = fmin(t1, sv->pool[k].t1_s) - fmax(t0, sv->pool[k].t0_s);
        /* as hyp__select_bases: a folder of bases must cover the track */
        if (sv->base_dir ? cover >= 0.95 * (t1 - t0) && cover >= 0 : cover > 0 || (t1 == t0 && cover >= 0))
            return 1;
    }
    return 0;
}

static hyp__rawocc *ro_push(hyp__net *N)
{
    if (N->n_ro == N->ro_alloc) {
        size_t na = N->ro_alloc ? 2 * N->ro_alloc : 64;
        hyp__rawocc *p = realloc(N->ro, na * sizeof *p);
        if (!p)
            return NULL;
        N->ro = p;
        N->ro_alloc = na;
    }
    hyp__rawocc *o = &N->ro[N->n_ro++];
    memset(o, 0, sizeof *o);
    return o;
}

hyp_status hyp__net_raw_track(hyp__net *N, size_t k, hyp_error *err)
{
    hyp_network_track *t = &N->r->tracks[k];
    const hyp__log *lg = &N->raw[k];
    const hyp_series *s = hyp__log_series(lg);
    t->raw = 1;
    hyp__net_track_span(t, s);
    if (!(t->t0_s == t->t0_s)) {
        t->status = HYP_ERR_NODATA;
        snprintf(t->error, sizeof t->error, "no sample with a time and a pressure");
        hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", t->path, 0, "not used: %s", t->error);
        return HYP_OK;
    }
    hyp__window *w = NULL;
    size_t nw = 0;
    hyp_status st = hyp__net_windows(N, k, s, lg->is_gpx ? &lg->doc.wpts : NULL, &w, &nw, err);
    for (size_t j = 0; !st && j < nw; j++) {
        double sp = 0, sp2 = 0, stt = 0, stk = 0, srh = 0;
        size_t n = 0, nt = 0, nrh = 0;
        for (size_t i = 0; i < s->count; i++) {
            if (s->flag[i] || s->time_s[i] < w[j].t0 || s->time_s[i] > w[j].t1)
                continue;
            double p = s->pressure_pa[i];
            sp += p, sp2 += p * p, stt += s->time_s[i], n++;
            if (s->has_temp && s->temp_k && s->temp_k[i] == s->temp_k[i])
                stk += s->temp_k[i], nt++;
            if (s->has_rh && s->rh_pct && s->rh_pct[i] == s->rh_pct[i])
                srh += s->rh_pct[i], nrh++;
        }
        if (n < MIN_SAMPLES) {
            hyp_msgs_add_at(&N->r->msgs, HYP_NOTE, "input", t->path, w[j].line,
                            "occupation of %s: %zu samples in the window (%d needed); not used",
                            N->r->stations.name[w[j].station], n, MIN_SAMPLES);
            continue;
        }
        hyp__rawocc *o = ro_push(N);
        if (!o) {
            st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
            break;
        }
        double nn = (double)n, var = sp2 / nn - (sp / nn) * (sp / nn);
        *o = (hyp__rawocc){k, w[j].station, w[j].source, w[j].line, w[j].t0, w[j].t1, n, sp / nn,
                           sqrt(var > 0 ? var : 0), stt / nn, nt ? stk / (double)nt : NAN, nrh ? srh / (double)nrh : NAN, 0};
    }
    free(w);
    return st;
}

/* The pressure of series s at time t, linear between the good samples
 * either side (NaN when there is none within MAX_GAP_S). */
static double interp_pa(const hyp_series *s, double t)
{
    size_t lo = 0, hi = s->count;
    while (lo < hi) {   /* first sample at or after t */
        size_t mid = lo + (hi - lo) / 2;
        if (s->time_s[mid] < t)
            lo = mid + 1;
        else
            hi = mid;
    }
    size_t r = lo;
    while (r < s->count && s->flag[r])
        r++;
    if (r < s->count && s->time_s[r] == t)
        return s->pressure_pa[r];
    long l = (long)lo - 1;
    while (l >= 0 && s->flag[l])
        l--;
    if (l < 0 || r >= s->count || s->time_s[r] - s->time_s[l] > MAX_GAP_S)
        return NAN;
    double f = (t - s->time_s[l]) / (s->time_s[r] - s->time_s[l]);
    return s->pressure_pa[l] + f * (s->pressure_pa[r] - s->pressure_pa[l]);
}

/* The air temperature at an occupation: its thermometer, else the
 * standard atmosphere's lapse-rate model at the pressure's standard height
 * (USSA 1976: T = 288.15 K + L h, L the survey's lapse rate). */
static double air_temp_k(const hyp__net *N, const hyp__rawocc *o, int *measured)
{
    *measured = o->temp_k == o->temp_k;
    if (*measured)
        return o->temp_k;
    return HYP_T0_K + N->sv->copts.lapse_k_per_m * hyp_isa_height_gp_m(o->p_pa);
}

/* The terms of one leg, computed from the simultaneous samples of u (the
 * first instrument, station A) and v (the second, station B) between t0
 * and t1: what hyp__net_leg returns. */
typedef struct hyp__leg {
    size_t n;
    double mean_ln, sd_ln;   /* of ln(p_B / p_A) over the common samples */
    double pa, pb, tm;       /* mean pressures (Pa) and time */
    double tv_k, g, k_m;     /* layer-mean virtual temperature, gravity, Rd Tv / g */
    double dh_m;             /* H_A - H_B */
    double ca, cb;           /* sensitivities Rd Tv / (g p), m/Pa */
    int thermo;              /* both temperatures measured */
} hyp__leg;

/* H_A - H_B = (Rd Tv / g) ln(p_B / p_A): the hypsometric equation
 * (Wallace and Hobbs 2006, eq. 3.29) with Tv the layer-mean virtual
 * temperature of the two stations' air (the logarithmic mean, exact for a
 * linear profile; eq. 3.59 for Tv) and g the normal gravity at the mean
 * latitude and height (NIMA TR8350.2 eq. 4-1, 4-3). */
static int leg(const hyp__net *N, const hyp__rawocc *u, const hyp__rawocc *v, double t0, double t1, hyp__leg *L)
{
    const hyp_series *su = hyp__log_series(&N->raw[u->track]), *sv = hyp__log_series(&N->raw[v->track]);
    double s1 = 0, s2 = 0, spa = 0, spb = 0, st = 0;
    size_t n = 0;
    for (size_t i = 0; i < su->count; i++) {
        if (su->flag[i] || su->time_s[i] < t0 || su->time_s[i] > t1)
            continue;
        double pb = interp_pa(sv, su->time_s[i]), pa = su->pressure_pa[i];
        if (!(pb > 0 && pa > 0))
            continue;
        double x = log(pb / pa);
        s1 += x, s2 += x * x, spa += pa, spb += pb, st += su->time_s[i], n++;
    }
    if (n < MIN_SAMPLES)
        return -1;
    double nn = (double)n, var = s2 / nn - (s1 / nn) * (s1 / nn);
    memset(L, 0, sizeof *L);
    L->n = n;
    L->mean_ln = s1 / nn;
    L->sd_ln = n > 1 ? sqrt((var > 0 ? var : 0) * nn / (nn - 1)) : 0;
    L->pa = spa / nn, L->pb = spb / nn, L->tm = st / nn;
    int ma, mb;
    double ta = air_temp_k(N, u, &ma), tb = air_temp_k(N, v, &mb);
    L->thermo = ma && mb;
    double rha = u->rh_pct == u->rh_pct ? u->rh_pct : N->sv->copts.default_rh_pct;
    double rhb = v->rh_pct == v->rh_pct ? v->rh_pct : N->sv->copts.default_rh_pct;
    double tva = hyp_virtual_temperature_k(ta, rha, L->pa), tvb = hyp_virtual_temperature_k(tb, rhb, L->pb);
    if (!(tva == tva))   /* outside the vapour formula's domain: dry air */
        tva = ta;
    if (!(tvb == tvb))
        tvb = tb;
    L->tv_k = hyp_layer_mean_temperature_k(tva, tvb);
    const hyp_benchmarks *bm = &N->r->stations;
    double lat = 0.5 * (bm->lat_deg[u->station] + bm->lat_deg[v->station]);
    double hmid = hyp_geometric_from_geopotential_m(hyp_isa_height_gp_m(0.5 * (L->pa + L->pb)));
    L->g = hyp_gravity_at_height_m_s2(lat, hmid == hmid ? hmid : 0.0);
    if (!(L->tv_k > 0) || !(L->g > 0))
        return -1;
    L->k_m = HYP_RD_J_KG_K * L->tv_k / L->g;
    L->dh_m = L->k_m * L->mean_ln;
    L->ca = L->k_m / L->pa;
    L->cb = L->k_m / L->pb;
    return 0;
}

static hyp_status legs(hyp__net *N, hyp_error *err)
{
    const hyp_network_opts *o = N->o;
    const hyp_correct_opts *co = &N->sv->copts;
    const hyp_benchmarks *bm = &N->r->stations;
    size_t K = N->r->n_tracks;
    for (size_t a = 0; a < N->n_ro; a++)
        for (size_t b = a + 1; b < N->n_ro; b++) {
            hyp__rawocc *u = &N->ro[a], *v = &N->ro[b];
            if (u->track == v->track)
                continue;
            double t0 = fmax(u->t0, v->t0), t1 = fmin(u->t1, v->t1);
            if (t1 - t0 < o->min_common_s)
                continue;
            hyp__leg L;
            if (leg(N, u, v, t0, t1, &L))
                continue;
            double d = u->station == v->station ? 0.0
                     : hyp_geo_distance_m(bm->lat_deg[u->station], bm->lon_deg[u->station], bm->lat_deg[v->station],
                                          bm->lon_deg[v->station]);
            int sbs = u->station == v->station || d <= SBS_M;
            double c = 0.5 * (L.ca + L.cb);
            /* sigma: the mean's standard error from the scatter of the
             * simultaneous log-ratios (both instruments' noise, averaged);
             * a floor per instrument; the horizontal pressure gradient over
             * the distance between the stations (the survey's gradient,
             * Holton, An Introduction to Dynamic Meteorology, as
             * docs/methods.md cites); the layer temperature's error as
             * dH sigma_T / Tv (differentiating eq. 3.29) */
            double se = L.k_m * L.sd_ln / sqrt((double)L.n), fl = c * FLOOR_PA * sqrt(2.0);
            double gr = c * co->gradient_sigma_pa_per_m * d;
            double sig_t = L.thermo ? co->tcol_sigma_k : NO_THERMO_K;
            double tt = fabs(L.dh_m) * sig_t / L.tv_k;
            hyp_network_obs *ob = hyp__net_push(N, sbs ? HYP_OBS_SIDE_BY_SIDE : HYP_OBS_LEAPFROG, L.ca,
                                                (L.tm - N->r->tracks[u->track].t0_s) / 3600.0);
            if (!ob)
                return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
            size_t i = N->r->n_obs - 1;
            N->coef2[i] = L.cb;
            N->dt2_h[i] = (L.tm - N->r->tracks[v->track].t0_s) / 3600.0;
            ob->source = u->source;
            ob->station = u->station;
            ob->station2 = v->station;
            ob->track = u->track;
            ob->track2 = v->track;
            ob->start_s = t0;
            ob->end_s = t1;
            ob->samples = L.n;
            ob->line = u->line ? u->line : v->line;
            ob->observed_m = L.dh_m;
            ob->sigma_m = sqrt(se * se + fl * fl + gr * gr + tt * tt);
            u->paired = v->paired = 1;
            size_t x = u->track * K + v->track, y = v->track * K + u->track;
            N->pair_link[x] |= 1 | (sbs ? 2 : 0);
            N->pair_link[y] = N->pair_link[x];
            N->pair_c_sum[x] += c, N->pair_c_n[x]++;
        }
    return HYP_OK;
}

/* A loop: H_s - c w_j = r_j per occupation, r_j the height of the mean
 * pressure above the level of 101325 Pa by the hypsometric equation
 * (Wallace and Hobbs eq. 3.29; the standard atmosphere's column, USSA
 * 1976, when the rover has no thermometer), c = Rd T / (g p) its
 * sensitivity (the hydrostatic equation); w_{j+1} - w_j = 0 with
 * sigma q sqrt(dt) (the weather as a random walk in pressure). */
static hyp_status loop(hyp__net *N, size_t k, hyp_error *err)
{
    hyp_network_track *t = &N->r->tracks[k];
    const hyp_benchmarks *bm = &N->r->stations;
    double q = N->o->weather_walk_hpa_sqrt_h * 100.0;   /* Pa per sqrt(h) */
    size_t prev = SIZE_MAX, nocc = 0, known = 0, repeat = 0;
    double prev_t = 0;
    unsigned char *seen = calloc(bm->count ? bm->count : 1, 1);
    if (!seen)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    t->raw = 2;
    for (size_t a = 0; a < N->n_ro; a++) {
        const hyp__rawocc *u = &N->ro[a];
        if (u->track != k)
            continue;
        double hgp = hyp_isa_height_gp_m(u->p_pa), r = hyp_geometric_from_geopotential_m(hgp);
        double c = HYP_RD_J_KG_K * hyp_isa_temperature_k(hgp) / (HYP_G0_M_S2 * u->p_pa);
        if (u->temp_k == u->temp_k && r == r) {
            /* with a thermometer: the column from 0 m up to the station at
             * its measured (virtual) temperature, the survey's lapse rate
             * below it, the logarithmic layer mean (section 3), normal
             * gravity at mid-column; else the temperature's departure from
             * the standard atmosphere would scale every height difference
             * and pass for weather */
            double rh = u->rh_pct == u->rh_pct ? u->rh_pct : N->sv->copts.default_rh_pct;
            double tv = hyp_virtual_temperature_k(u->temp_k, rh, u->p_pa);
            if (!(tv == tv))
                tv = u->temp_k;
            double tm = hyp_layer_mean_temperature_k(tv, tv - N->sv->copts.lapse_k_per_m * r);
            double g = hyp_gravity_at_height_m_s2(bm->lat_deg[u->station], 0.5 * r);
            if (tm > 0 && g > 0) {
                r = HYP_RD_J_KG_K * tm / g * log(HYP_P0_PA / u->p_pa);
                c = HYP_RD_J_KG_K * tv / (g * u->p_pa);
            }
        }
        if (!(r == r) || !(c > 0))
            continue;
        size_t node = N->n_nodes++;
        if (prev != SIZE_MAX) {
            hyp_network_obs *st = hyp__net_push(N, HYP_OBS_WEATHER_STEP, 0.0, 0.0);
            if (!st) {
                free(seen);
                return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
            }
            N->node[N->r->n_obs - 1] = prev;   /* rows: w(prev + 1) - w(prev) */
            st->track = k;
            st->start_s = prev_t;
            st->end_s = u->tm;
            double dt_h = (u->tm - prev_t) / 3600.0;
            st->sigma_m = q * sqrt(dt_h > 1.0 / 3600.0 ? dt_h : 1.0 / 3600.0);
        }
        hyp_network_obs *o = hyp__net_push(N, HYP_OBS_LOOP, c, (u->tm - t->t0_s) / 3600.0);
        if (!o) {
            free(seen);
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        }
        N->node[N->r->n_obs - 1] = node;
        o->source = u->source;
        o->station = u->station;
        o->track = k;
        o->start_s = u->t0;
        o->end_s = u->t1;
        o->samples = u->n;
        o->line = u->line;
        o->observed_m = r;
        double se = u->sd_pa / sqrt((double)u->n);   /* the window's scatter, averaged */
        o->sigma_m = c * sqrt(se * se + FLOOR_PA * FLOOR_PA);
        t->occupations++;
        nocc++;
        repeat += seen[u->station];
        if (!seen[u->station] && bm->height_m[u->station] == bm->height_m[u->station])
            known++;
        seen[u->station] = 1;
        prev = node, prev_t = u->tm;
    }
    free(seen);
    if (!nocc)
        hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "input", t->path, 0,
                        "loop %s: no occupation of a station found; the track adds nothing", t->name);
    else if (!repeat && known < 2)
        hyp_msgs_add_at(&N->r->msgs, HYP_WARNING, "design", t->path, 0,
                        "loop %s: no station occupied twice and %zu known mark%s: the weather cannot be told apart "
                        "from the heights, which rest on the weather model alone (a random walk of %g hPa per "
                        "sqrt(hour)); return to a station or occupy a second known mark", t->name, known,
                        known == 1 ? "" : "s", N->o->weather_walk_hpa_sqrt_h);
    return HYP_OK;
}

/* The legs' sigmas get both instruments' random-walk drift (the survey's
 * rate, default (2 Pa)^2 per hour), now that every comparison is known. */
static void legs_drift(hyp__net *N)
{
    for (size_t i = 0; i < N->r->n_obs; i++) {
        hyp_network_obs *o = &N->r->obs[i];
        if (o->kind != HYP_OBS_LEAPFROG)
            continue;
        double t = 0.5 * (o->start_s + o->end_s), ca = N->coef[i], cb = N->coef2[i];
        double v = N->q_pa2_per_s * (ca * ca * hyp__net_bridge_s(N, o->track, t, HYP_OBS_SIDE_BY_SIDE) + cb * cb * hyp__net_bridge_s(N, o->track2, t, HYP_OBS_SIDE_BY_SIDE));
        o->sigma_m = sqrt(o->sigma_m * o->sigma_m + v);
    }
}

hyp_status hyp__net_raw_observations(hyp__net *N, hyp_error *err)
{
    hyp_network_result *r = N->r;
    size_t K = r->n_tracks, n_raw = 0;
    for (size_t k = 0; k < K; k++)
        n_raw += r->tracks[k].raw && !r->tracks[k].status;
    if (!n_raw)
        return HYP_OK;
    N->pair_link = calloc(K * K, 1);
    N->pair_c_sum = calloc(K * K, sizeof *N->pair_c_sum);
    N->pair_c_n = calloc(K * K, sizeof *N->pair_c_n);
    N->pair_sigma = malloc(K * K * sizeof *N->pair_sigma);
    for (size_t i = 0; N->pair_sigma && i < K * K; i++)
        N->pair_sigma[i] = NAN;
    if (!N->pair_link || !N->pair_c_sum || !N->pair_c_n || !N->pair_sigma)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    hyp_status st = legs(N, err);
    if (!st)
        legs_drift(N);
    for (size_t k = 0; !st && k < K; k++) {
        hyp_network_track *t = &r->tracks[k];
        if (!t->raw || t->status)
            continue;
        int linked = 0;
        for (size_t m = 0; m < K; m++)
            linked |= N->pair_link[k * K + m] != 0;
        if (!linked) {
            if (n_raw > 1)
                hyp_msgs_add_at(&r->msgs, HYP_WARNING, "design", t->path, 0,
                                "rover %s never stood on a station while another rover without a base did (at least "
                                "%g s in common): no leapfrog leg; reduced as a loop on its own", t->name,
                                N->o->min_common_s);
            st = loop(N, k, err);
            continue;
        }
        /* the index: a wide prior, so that the datum comes from control
         * and only the otherwise unobservable common part of the indices
         * leans on it: 1 sigma = the survey's offset of an uncalibrated
         * barometer (default 150 Pa, the +-1.5 hPa absolute accuracy of
         * small digital barometers; common practice, no source) */
        hyp_network_obs *o = hyp__net_push(N, HYP_OBS_INDEX_PRIOR, 0.0, 0.0);
        if (!o)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        o->track = k;
        o->sigma_m = N->sv->copts.uncal_offset_sigma_pa > 0 ? N->sv->copts.uncal_offset_sigma_pa : 150.0;
        size_t alone = 0;
        for (size_t a = 0; a < N->n_ro; a++) {
            alone += N->ro[a].track == k && !N->ro[a].paired;
            t->occupations += N->ro[a].track == k && N->ro[a].paired;
        }
        if (alone)
            hyp_msgs_add_at(&r->msgs, HYP_NOTE, "design", t->path, 0,
                            "rover %s: %zu occupation%s overlapping no other rover's for %g s: not used (a leapfrog "
                            "leg needs both instruments at once)", t->name, alone, alone == 1 ? "" : "s",
                            N->o->min_common_s);
    }
    return st;
}

void hyp__net_raw_after(hyp__net *N)
{
    hyp_network_result *r = N->r;
    size_t K = r->n_tracks;
    for (size_t k = 0; N->pair_link && k < K; k++)
        for (size_t m = k + 1; m < K; m++) {
            unsigned char l = N->pair_link[k * K + m];
            if (!(l & 1) || (l & 2))
                continue;
            const hyp_network_track *a = &r->tracks[k], *b = &r->tracks[m];
            size_t cn = N->pair_c_n[k * K + m] + N->pair_c_n[m * K + k];
            double c = cn ? (N->pair_c_sum[k * K + m] + N->pair_c_sum[m * K + k]) / (double)cn : NAN;
            /* the index difference's sigma from the adjustment (what the
             * control and the legs' closure leave of it) */
            double s = N->pair_sigma ? N->pair_sigma[k * K + m] : NAN;
            if (s == s && c == c)
                hyp_msgs_add(&r->msgs, HYP_WARNING,
                             "rovers %s and %s were never side by side: their index difference rests on the control "
                             "alone (about %.1f Pa, %.2f m of height per leg, 1 sigma); compare them on one station "
                             "at the start and the end", a->name, b->name, s, s * c);
            else
                hyp_msgs_add(&r->msgs, HYP_WARNING,
                             "rovers %s and %s were never side by side: their index difference rests on the control "
                             "alone", a->name, b->name);
        }
    /* what gave each station's height */
    unsigned *bits = calloc(r->stations.count ? r->stations.count : 1, sizeof *bits);
    if (!bits)
        return;
    for (size_t i = 0; i < r->n_obs; i++) {
        const hyp_network_obs *o = &r->obs[i];
        unsigned b = o->kind == HYP_OBS_OCCUPATION ? 1u
                   : o->kind == HYP_OBS_LEAPFROG || (o->kind == HYP_OBS_SIDE_BY_SIDE && o->station2 != o->station) ? 2u
                   : o->kind == HYP_OBS_LOOP ? 4u : 0u;
        if (!b || !o->used)
            continue;
        bits[o->station] |= b;
        if (o->station2 != SIZE_MAX)
            bits[o->station2] |= b;
    }
    for (size_t s = 0; s < r->stations.count; s++) {
        hyp_network_station *t = &r->st[s];
        const char *m = !(t->height_m == t->height_m) ? ""
                      : t->control ? "control"
                      : bits[s] == 1 ? "base" : bits[s] == 2 ? "leapfrog" : bits[s] == 4 ? "loop" : bits[s] ? "mixed" : "";
        snprintf(t->method, sizeof t->method, "%s", m);
    }
    free(bits);
}

void hyp__net_raw_free(hyp__net *N)
{
    for (size_t k = 0; N->raw && k < N->r->n_tracks; k++)
        if (N->r->tracks[k].raw)   /* the others' logs were freed when they took the base path */
            hyp__log_free(&N->raw[k]);
    free(N->raw);
    free(N->ro);
    free(N->pair_link);
    free(N->pair_c_sum);
    free(N->pair_c_n);
    free(N->pair_sigma);
}
