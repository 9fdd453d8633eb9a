/* network_adjust.c - the station network as a linear adjustment: unknowns
 * are the heights of the occupied stations (m) and per track an offset at
 * its start (Pa) and a drift (Pa/h); an occupation of station s by track k
 * at dt hours after its start with mean sensitivity c (m/Pa) observes
 *     H_s - c a_k - c dt b_k = r        (r: mean height with no offset),
 * the same relation the single track's calibration uses (drift.c: H - r =
 * c offset); a co-location with the base observes -c a_k - c dt b_k =
 * r - H_base; a control station H_s = H_published; each track's drift has
 * a weak prior b_k = 0. Solved and tested by adjust_engine.c: the global
 * test of the variance factor and Baarda's w-test with data snooping. */
#include "network_int.h"
#include "adjust_engine.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Control observations for the occupied control stations, and the drift
 * priors of the usable tracks. */
static hyp_status add_constraints(hyp__net *N, const unsigned char *occupied, hyp_error *err)
{
    hyp_network_result *r = N->r;
    for (size_t s = 0; s < r->stations.count; s++) {
        if (!occupied[s] || !(r->stations.height_m[s] == r->stations.height_m[s]))
            continue;
        hyp_network_obs *o = hyp__net_push(N, HYP_OBS_CONTROL, 0.0, 0.0);
        if (!o)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        o->station = s;
        o->observed_m = r->stations.height_m[s];
        o->sigma_m = r->stations.sigma_m[s] > 0 ? r->stations.sigma_m[s] : N->o->control_sigma_m;
    }
    for (size_t k = 0; k < r->n_tracks; k++) {
        if (r->tracks[k].status || r->tracks[k].raw == 2)   /* a loop's weather takes its drift */
            continue;
        hyp_network_obs *o = hyp__net_push(N, HYP_OBS_DRIFT_PRIOR, 0.0, 0.0);
        if (!o)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        o->track = k;
        o->sigma_m = N->o->drift_prior_pa_per_h;
    }
    return HYP_OK;
}

static int usable(const hyp_network_obs *o)
{
    return !o->flag[0] && o->sigma_m > 0;
}

/* The engine's problem: unknown indices, names, rows. */
typedef struct layout {
    size_t *su, *ka;            /* station -> unknown, track -> offset unknown (drift: +1) */
    size_t w0;                  /* first loop weather node's unknown */
    char **names;
    hyp__adj_term *terms;
    hyp__adj_obs *rows;
    size_t *row_obs;            /* engine row -> result observation */
    size_t n_unknowns, n_rows;
} layout;

static void layout_free(layout *L, size_t n_names)
{
    for (size_t i = 0; L->names && i < n_names; i++)
        free(L->names[i]);
    free(L->names);
    free(L->su);
    free(L->ka);
    free(L->terms);
    free(L->rows);
    free(L->row_obs);
}

static int name_unknown(layout *L, size_t j, const char *a, const char *b)
{
    size_t n = strlen(a) + strlen(b) + 2;
    if (!(L->names[j] = malloc(n)))
        return -1;
    snprintf(L->names[j], n, "%s%s", a, b);
    return 0;
}

static hyp_status build(const hyp__net *N, const unsigned char *occupied, layout *L, hyp_error *err)
{
    const hyp_network_result *r = N->r;
    size_t S = r->stations.count, K = r->n_tracks, M = r->n_obs, j = 0;
    L->su = malloc((S ? S : 1) * sizeof *L->su);
    L->ka = malloc((K ? K : 1) * sizeof *L->ka);
    L->names = calloc(S + 2 * K + N->n_nodes + 1, sizeof *L->names);
    L->terms = malloc((6 * (M + K * K) + 1) * sizeof *L->terms);   /* K x K: index differences (below) */
    L->rows = malloc((M + K * K + 1) * sizeof *L->rows);
    L->row_obs = malloc((M + 1) * sizeof *L->row_obs);
    if (!L->su || !L->ka || !L->names || !L->terms || !L->rows || !L->row_obs)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t s = 0; s < S; s++) {
        L->su[s] = occupied[s] ? j : SIZE_MAX;
        if (occupied[s] && name_unknown(L, j++, r->stations.name[s], ""))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    for (size_t k = 0; k < K; k++) {
        int own = !r->tracks[k].status && r->tracks[k].raw != 2;   /* a loop has weather nodes instead */
        L->ka[k] = own ? j : SIZE_MAX;
        if (own && (name_unknown(L, j++, r->tracks[k].name, " offset") ||
                                     name_unknown(L, j++, r->tracks[k].name, " drift")))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    L->w0 = j;
    for (size_t i = 0; i < M; i++)   /* a loop occupation names its node */
        if (r->obs[i].kind == HYP_OBS_LOOP && N->node[i] != SIZE_MAX && !L->names[j + N->node[i]]) {
            char b[64];
            snprintf(b, sizeof b, " weather at %s", r->stations.name[r->obs[i].station]);
            if (name_unknown(L, j + N->node[i], r->tracks[r->obs[i].track].name, b))
                return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        }
    for (size_t q = 0; q < N->n_nodes; q++)
        if (!L->names[j + q] && name_unknown(L, j + q, "weather", " node"))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    j += N->n_nodes;
    L->n_unknowns = j;
    for (size_t i = 0; i < M; i++) {
        const hyp_network_obs *o = &r->obs[i];
        if (!usable(o))
            continue;
        hyp__adj_term *t = &L->terms[6 * L->n_rows];
        size_t nt = 0;
        double c = N->coef[i], dt = N->dt_h[i];
        if (o->kind == HYP_OBS_OCCUPATION || o->kind == HYP_OBS_CONTROL)
            t[nt++] = (hyp__adj_term){L->su[o->station], 1.0};
        if (o->kind == HYP_OBS_OCCUPATION || o->kind == HYP_OBS_COLOCATION) {
            t[nt++] = (hyp__adj_term){L->ka[o->track], -c};
            t[nt++] = (hyp__adj_term){L->ka[o->track] + 1, -c * dt};
        }
        if (o->kind == HYP_OBS_DRIFT_PRIOR)
            t[nt++] = (hyp__adj_term){L->ka[o->track] + 1, 1.0};
        /* leapfrog (network_raw.c): H_A - H_B - c_A (a_k + b_k dt_k) + c_B (a_m + b_m dt_m) = r;
         * side by side on one station: the same without the heights */
        if (o->kind == HYP_OBS_LEAPFROG || o->kind == HYP_OBS_SIDE_BY_SIDE) {
            if (o->station2 != o->station) {
                t[nt++] = (hyp__adj_term){L->su[o->station], 1.0};
                t[nt++] = (hyp__adj_term){L->su[o->station2], -1.0};
            }
            double c2 = N->coef2[i], dt2 = N->dt2_h[i];
            t[nt++] = (hyp__adj_term){L->ka[o->track], -c};
            t[nt++] = (hyp__adj_term){L->ka[o->track] + 1, -c * dt};
            t[nt++] = (hyp__adj_term){L->ka[o->track2], c2};
            t[nt++] = (hyp__adj_term){L->ka[o->track2] + 1, c2 * dt2};
        }
        if (o->kind == HYP_OBS_LOOP) {   /* H_s - c w_j = r */
            t[nt++] = (hyp__adj_term){L->su[o->station], 1.0};
            t[nt++] = (hyp__adj_term){L->w0 + N->node[i], -c};
        }
        if (o->kind == HYP_OBS_WEATHER_STEP) {   /* w_{j+1} - w_j = 0 */
            t[nt++] = (hyp__adj_term){L->w0 + N->node[i] + 1, 1.0};
            t[nt++] = (hyp__adj_term){L->w0 + N->node[i], -1.0};
        }
        if (o->kind == HYP_OBS_INDEX_PRIOR)
            t[nt++] = (hyp__adj_term){L->ka[o->track], 1.0};
        L->rows[L->n_rows] = (hyp__adj_obs){t, nt, o->observed_m, o->sigma_m, NULL, 1};
        L->row_obs[L->n_rows++] = i;
    }
    return HYP_OK;
}

/* Results back into the stations, tracks and observations. */
static void fill(hyp__net *N, const layout *L, const hyp__adj_result *a)
{
    hyp_network_result *r = N->r;
    r->n_unknowns = L->n_unknowns;
    r->n_used = a->n_used;
    r->dof = a->dof;
    r->vtpv = a->vtpv;
    r->s0_sq = a->s0_sq;
    r->chi2_lower = a->chi2_lower;
    r->chi2_upper = a->chi2_upper;
    r->w_crit = a->w_crit;
    r->global_pass = a->global == HYP_ADJ_GLOBAL_NONE ? -1 : a->global == HYP_ADJ_GLOBAL_PASS;
    /* a-posteriori sigmas when the data scatter more than their a-priori
     * sigmas say (the global test's upper side), else the a-priori ones */
    r->scaled = a->global == HYP_ADJ_GLOBAL_HIGH;
    const double *sx = r->scaled ? a->sigma_x : a->sigma_x_prior;
    for (size_t row = 0; row < L->n_rows; row++) {
        hyp_network_obs *o = &r->obs[L->row_obs[row]];
        o->residual_m = a->v[row];
        o->w = a->w[row];
        o->redundancy = a->r[row];
        o->used = (a->flag[row] & HYP_ADJ_USED) != 0;
        if (a->flag[row] & HYP_ADJ_REJECTED) {
            o->rejected = 1;
            for (size_t j = 0; j < a->n_rejections; j++)   /* its w and residual when it was rejected */
                if (a->rejections[j].obs == row)
                    o->w = a->rejections[j].w, o->residual_m = a->rejections[j].v;
            r->n_rejected++;
            snprintf(o->flag, sizeof o->flag, "rejected: |w| beyond %.2f (Baarda's w-test, alpha %g)", a->w_crit,
                     N->o->alpha_w);
        } else if ((a->flag[row] & HYP_ADJ_OUTLIER) && o->kind == HYP_OBS_WEATHER_STEP) {
            snprintf(o->flag, sizeof o->flag, "fails the w-test (|w| beyond %.2f): the weather changed faster "
                     "than --weather-walk allows (a prior of the model, not taken out)", a->w_crit);
            r->tests_failed = 1;
        } else if ((a->flag[row] & HYP_ADJ_OUTLIER) && (o->kind == HYP_OBS_DRIFT_PRIOR || o->kind == HYP_OBS_INDEX_PRIOR)) {
            snprintf(o->flag, sizeof o->flag, "fails the w-test (|w| beyond %.2f): the instrument drifted more "
                     "than its prior allows (a prior of the model, not taken out)", a->w_crit);
            r->tests_failed = 1;
        } else if (a->flag[row] & HYP_ADJ_OUTLIER) {
            snprintf(o->flag, sizeof o->flag, "fails the w-test (|w| beyond %.2f) but cannot be taken out: "
                     "nothing else determines what it observes", a->w_crit);
            r->tests_failed = 1;
        }
    }
    /* snooping stopped at two observations the data cannot tell apart (a
     * blunder in either moves both w-tests alike): neither is taken out and
     * both are flagged, so a wrong one is not traded for a good one */
    size_t pair[2] = {a->w_max_free_obs, a->insep_obs};
    for (int q = 0; q < 2 && a->snoop_stop == HYP_ADJ_SNOOP_INSEPARABLE; q++) {
        if (pair[q] >= L->n_rows)
            continue;
        hyp_network_obs *o = &r->obs[L->row_obs[pair[q]]];
        snprintf(o->flag, sizeof o->flag, "fails the w-test with another flagged so (their w-tests correlate %+.3f): "
                 "the data cannot tell which is wrong; neither taken out", a->insep_rho);
        r->tests_failed = 1;
    }
    for (size_t s = 0; s < r->stations.count; s++) {
        hyp_network_station *t = &r->st[s];
        t->control = r->stations.height_m[s] == r->stations.height_m[s];
        t->height_m = t->sigma_m = t->max_abs_w = NAN;
        if (L->su[s] == SIZE_MAX)
            continue;
        t->height_m = a->x[L->su[s]];
        t->sigma_m = sx[L->su[s]];
    }
    for (size_t k = 0; k < r->n_tracks; k++) {
        hyp_network_track *t = &r->tracks[k];
        if (L->ka[k] == SIZE_MAX)
            continue;
        t->has_drift = 1;
        t->offset_pa = a->x[L->ka[k]];
        t->offset_sigma_pa = sx[L->ka[k]];
        t->drift_pa_per_h = a->x[L->ka[k] + 1];
        t->drift_sigma_pa_per_h = sx[L->ka[k] + 1];
    }
    /* the lower side says the sigmas are pessimistic: reported, but a
     * deliverable is not wrong for it (with few degrees of freedom it is a
     * chance of alpha/2 anyway) */
    if (a->global == HYP_ADJ_GLOBAL_HIGH || r->n_rejected)
        r->tests_failed = 1;
}

/* Per station: occupations used and rejected, the largest |w|; a station
 * whose every occupation was rejected says so. */
static void station_counts(hyp__net *N)
{
    hyp_network_result *r = N->r;
    for (size_t i = 0; i < r->n_obs; i++) {
        const hyp_network_obs *o = &r->obs[i];
        if (o->kind != HYP_OBS_OCCUPATION && o->kind != HYP_OBS_LEAPFROG && o->kind != HYP_OBS_LOOP &&
            !(o->kind == HYP_OBS_SIDE_BY_SIDE && o->station2 != o->station))
            continue;
        for (int e = 0; e < 2; e++) {   /* a leapfrog leg counts at both its stations */
            size_t sx = e ? o->station2 : o->station;
            if (sx == SIZE_MAX)
                continue;
            hyp_network_station *t = &r->st[sx];
            t->rejected += o->rejected != 0;
            t->used += o->used != 0;
            if (o->w == o->w && !(fabs(o->w) <= t->max_abs_w))
                t->max_abs_w = fabs(o->w);
        }
    }
    for (size_t s = 0; s < r->stations.count; s++)
        if (r->st[s].rejected && !r->st[s].used && !r->st[s].control) {
            hyp_msgs_add(&r->msgs, HYP_WARNING, "station %s lost its only occupation to the w-test: not determined",
                         r->stations.name[s]);
            r->st[s].height_m = r->st[s].sigma_m = NAN;
        }
}

static size_t uf_find(size_t *up, size_t i)
{
    while (up[i] != i)
        i = up[i] = up[up[i]];
    return i;
}

/* Every group of unknowns linked by observations must hold a height that
 * is known: a control station or a co-location with a base (a drift prior
 * fixes no height). A group without one is named: its stations and
 * tracks, which nothing ties to the rest. */
static hyp_status check_tied(const hyp__net *N, const layout *L, hyp_error *err)
{
    const hyp_network_result *r = N->r;
    size_t n = L->n_unknowns;
    size_t *up = malloc((n ? n : 1) * sizeof *up);
    unsigned char *tied = calloc(n ? n : 1, 1);
    if (!up || !tied) {
        free(up);
        free(tied);
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    for (size_t j = 0; j < n; j++)
        up[j] = j;
    for (size_t row = 0; row < L->n_rows; row++)
        for (size_t t = 1; t < L->rows[row].n_terms; t++)
            up[uf_find(up, L->rows[row].terms[t].unknown)] = uf_find(up, L->rows[row].terms[0].unknown);
    for (size_t row = 0; row < L->n_rows; row++) {
        hyp_obs_kind k = r->obs[L->row_obs[row]].kind;
        if (k == HYP_OBS_CONTROL || k == HYP_OBS_COLOCATION)
            tied[uf_find(up, L->rows[row].terms[0].unknown)] = 1;
    }
    char list[700] = "";
    size_t named = 0, loose = 0;
    for (size_t j = 0; j < n; j++) {
        if (tied[uf_find(up, j)] || strstr(L->names[j], " drift"))
            continue;
        loose++;
        size_t l = strlen(list);
        if (named++ < 12 && l + 80 < sizeof list)
            snprintf(list + l, sizeof list - l, "%s%s", l ? ", " : "", L->names[j]);
    }
    free(up);
    free(tied);
    if (!loose)
        return HYP_OK;
    return hyp_error_set(err, HYP_ERR_NODATA,
                         "nothing ties these to a control station or a base: %s%s (no co-location on these tracks, no "
                         "control station and no station shared with a tied track among these); book or find an "
                         "occupation linking them, or a co-location", list, named > 12 ? " and more" : "");
}

hyp_status hyp__net_adjust(hyp__net *N, hyp_error *err)
{
    hyp_network_result *r = N->r;
    size_t S = r->stations.count;
    unsigned char *occupied = calloc(S ? S : 1, 1);
    if (!occupied)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < r->n_obs; i++)
        if ((r->obs[i].kind == HYP_OBS_OCCUPATION || r->obs[i].kind == HYP_OBS_LEAPFROG ||
             r->obs[i].kind == HYP_OBS_SIDE_BY_SIDE || r->obs[i].kind == HYP_OBS_LOOP) && usable(&r->obs[i])) {
            occupied[r->obs[i].station] = 1;
            if (r->obs[i].station2 != SIZE_MAX)
                occupied[r->obs[i].station2] = 1;
        }
    hyp_status st = add_constraints(N, occupied, err);
    layout L = {0};
    if (!st)
        st = build(N, occupied, &L, err);
    if (!st)
        st = check_tied(N, &L, err);
    hyp__adj_opts ao;
    hyp__adj_opts_default(&ao);
    ao.alpha_w = N->o->alpha_w;
    ao.alpha_global = N->o->alpha_global;
    ao.snoop = 1;
    /* rows left out of the adjustment, for their sigma only: the index
     * difference of two raw rovers never compared side by side */
    size_t K = r->n_tracks, extra = 0;
    for (size_t k = 0; !st && N->pair_link && k < K; k++)
        for (size_t m = k + 1; m < K; m++) {
            unsigned char l = N->pair_link[k * K + m];
            if (!(l & 1) || (l & 2) || L.ka[k] == SIZE_MAX || L.ka[m] == SIZE_MAX)
                continue;
            size_t row = L.n_rows + extra++;
            hyp__adj_term *t = &L.terms[6 * row];
            t[0] = (hyp__adj_term){L.ka[k], 1.0};
            t[1] = (hyp__adj_term){L.ka[m], -1.0};
            L.rows[row] = (hyp__adj_obs){t, 2, 0.0, 1.0, NULL, 0};
        }
    /* the model's priors (drift, the walk of the weather, the index) are no
     * candidate blunders: snooping never rejects one (taking a weather step
     * out leaves the stations after it free); one failing its w-test says
     * the model is too tight, and fails the tests */
    unsigned char *keep = st ? NULL : calloc(L.n_rows + extra + 1, 1);
    if (!st && !keep)
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t row = 0; keep && row < L.n_rows + extra; row++) {
        hyp_obs_kind kd = row < L.n_rows ? r->obs[L.row_obs[row]].kind : HYP_OBS_INDEX_PRIOR;
        keep[row] = kd == HYP_OBS_DRIFT_PRIOR || kd == HYP_OBS_WEATHER_STEP || kd == HYP_OBS_INDEX_PRIOR;
    }
    ao.keep = keep;
    ao.stop_at_kept = 1;
    /* our choice, no source: |rho| 0.99 between two w-tests leaves their
     * |w| within a few per cent of each other at any blunder size */
    ao.rho_inseparable = 0.99;
    hyp__adj_problem pb = {L.n_unknowns, (const char *const *)L.names, L.n_rows + extra, L.rows};
    hyp__adj_result a;
    hyp__adj_result_init(&a);
    hyp_error e;
    if (!st && (st = hyp__adj_solve(&pb, &ao, &a, &e)))
        st = hyp_error_set(err, st, "the network cannot be adjusted: %s", e.message);
    r->alpha_w = ao.alpha_w;
    r->alpha_global = ao.alpha_global;
    if (!st) {
        fill(N, &L, &a);
        station_counts(N);
        for (size_t q = 0; q < extra && N->pair_sigma; q++) {
            const hyp__adj_term *t = L.rows[L.n_rows + q].terms;
            size_t k = SIZE_MAX, m = SIZE_MAX;
            for (size_t j = 0; j < K; j++) {
                k = L.ka[j] == t[0].unknown ? j : k;
                m = L.ka[j] == t[1].unknown ? j : m;
            }
            double sg = a.sigma_adj[L.n_rows + q] * (r->scaled && a.s0_sq == a.s0_sq ? sqrt(a.s0_sq) : 1.0);
            if (k != SIZE_MAX && m != SIZE_MAX)
                N->pair_sigma[k * K + m] = N->pair_sigma[m * K + k] = sg;
        }
    }
    hyp__adj_result_free(&a);
    free(keep);
    layout_free(&L, S + 2 * r->n_tracks + N->n_nodes + 1);
    free(occupied);
    return st;
}
