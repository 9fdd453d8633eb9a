/* calib_test.c - the calibrations tested against each other before the
 * offset fit, by the adjustment engine (adjust_engine.h) the station
 * network uses: a model of everything that may legitimately make them
 * disagree, Baarda's w-test with data snooping, the global test of the
 * variance factor. Model, priors and sources: docs/methods.md, "Testing
 * the calibrations".
 *
 * The model, in the unknowns offset knots k_j (Pa), drift rate b (Pa/s),
 * column scale s, lapse-rate error g (K/m) and gradient (g_e, g_n) (Pa/m),
 * with dz_i = raw_i - h_base:
 *   calibration i:  known_i - raw_i = c_i k_j(i) + s dz_i + g dz_i^2 / (2 Tv)
 *                                     + c_i (g_e de_i + g_n dn_i)   +- sigma_i
 *   random walk:    k_j+1 - k_j - b (t_j+1 - t_j) = 0   +- sqrt(q (t_j+1 - t_j))
 *   priors:         b = 0, s = 0, g = 0, g_e = 0, g_n = 0   +- their sigmas
 * A column mean temperature error dT_b + g dz / 2 moves a height by
 * dz (dT_b + g dz / 2) / Tv (the hypsometric equation, docs/methods.md
 * section 3): s holds the part linear in dz, g the quadratic one, which a
 * scale alone cannot follow over ties at several heights.
 * The pseudo-observations (random walk, priors) are never rejected: a
 * blunder is looked for among the calibrations only. With the rate free
 * the random walk is the budget's drift "the model cannot see"; the rate
 * prior is what lets two calibrations test each other. */
#include "calib_test.h"
#include "adjust_engine.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/timeparse.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Unresolved micro-pressure changes in every calibration (common practice,
 * no source); the offset fit uses the same sigma. */
#define FLOOR_PA 1.0
/* Calibrations whose middles lie within this of the first of a group share
 * one offset knot: the random walk over a minute, (2 Pa)^2/h x 60 s =
 * (0.26 Pa)^2, is small beside the 1 Pa floor above. */
#define KNOT_MERGE_S 60.0
/* Prior of the drift rate, 1 hPa/h: a design choice, no source, and
 * deliberately generous (the simulated rovers drift 0-5 Pa/h; a small
 * barometer's offset changes by a few Pa per kelvin, from memory). It
 * matters only when two calibrations are all there is, and then flags a
 * gross disagreement (a tie of the wrong point or time), not a drift. */
#define RATE_SIGMA_PA_S (100.0 / 3600.0)
/* A random walk of zero still needs a finite weight, Pa. */
#define RW_FLOOR_PA 0.01
/* Nominal column virtual temperature of the scale, K (as drift.c). */
#define TV_NOMINAL_K 285.0
/* Mean Earth radius, m (IUGG, from memory): offsets from the calibrations'
 * mean position by the equirectangular approximation, ample for the
 * coefficients of a gradient prior over tens of kilometres. */
#define EARTH_R_M 6371000.0

double hyp__calib_sigma_m(const hyp_calib *c)
{
    double f = FLOOR_PA * c->sens_m_per_pa;
    return sqrt(c->se_m * c->se_m + c->known_sigma_m * c->known_sigma_m + f * f);
}

static double mid(const hyp_calib *c)
{
    return 0.5 * (c->start_s + c->end_s);
}

/* ---- priors -------------------------------------------------------- */

/* Uncertainty (K) of the column's virtual temperature at the base end,
 * as the error budget takes it (docs/methods.md section 4): the base
 * thermometer's sigma_T and the humidity term at the base's conditions at
 * time t. */
static double column_sigma_k(const hyp__work *w, double t)
{
    const hyp_correct_opts *o = w->o;
    double st = w->tsig_k;
    if (w->bv.n < 2)
        return st;
    double tk, p, rh;
    hyp__base_at(&w->bv, w->bv.temp, t, o->max_gap_s, &tk);
    hyp__base_at(&w->bv, w->bv.p, t, o->max_gap_s, &p);
    hyp__base_at(&w->bv, w->bv.rh, t, o->max_gap_s, &rh);
    double sig = rh == rh ? o->rh_sigma_pct : o->default_rh_sigma_pct;
    if (rh != rh)
        rh = o->default_rh_pct;
    if (tk != tk)
        tk = TV_NOMINAL_K;
    double hi = rh + sig > 100.0 ? 100.0 : rh + sig;
    double t1 = hyp_virtual_temperature_k(tk, rh, p), t2 = hyp_virtual_temperature_k(tk, hi, p);
    if (!(t1 == t1 && t2 == t2 && hi > rh))
        return st;
    return hypot(st, (t2 - t1) * sig / (hi - rh));
}

void hyp__calib_test_priors(const hyp__work *w, hyp__caltest_priors *p)
{
    const hyp_correct_result *r = w->r;
    double worst = 0;
    for (size_t k = 0; k < r->n_calibs; k++)
        worst = fmax(worst, column_sigma_k(w, mid(&r->calibs[k])));
    p->rw_pa2_per_s = w->o->drift_rw_pa2_per_s;
    p->rate_sigma_pa_s = RATE_SIGMA_PA_S;
    p->scale_sigma = worst / TV_NOMINAL_K;
    p->lapse_sigma_k_per_m = w->o->lapse_sigma_k_per_m;
    p->gradient_sigma_pa_m = w->o->gradient_sigma_pa_per_m;
    p->extra_sigma_pa = w->base->kind == HYP_BASE_QNH ? w->o->qnh_sigma_pa : 0.0;
}

/* ---- the model ----------------------------------------------------- */

enum { OBS_CALIB, OBS_LINK, OBS_RATE, OBS_SCALE, OBS_LAPSE, OBS_GRAD };
#define NONE SIZE_MAX
#define MAX_TERMS 5   /* a calibration's row: knot, scale, lapse, gradient east and north */

typedef struct model {
    size_t m, nk;              /* calibrations, knots */
    size_t *knot_of;           /* per calibration */
    double *knot_t;            /* per knot: mean time of its calibrations */
    double *de, *dn;           /* per calibration: east, north of the mean position, m */
    size_t u_rate, u_scale, u_lapse, u_ge, u_gn, n_unknowns;   /* NONE: not in the model */
    hyp__adj_obs *obs;
    hyp__adj_term *terms;      /* MAX_TERMS per observation */
    int *kind;                 /* OBS_* per observation */
    unsigned char *keep;       /* per observation: never rejected (all but the calibrations) */
    size_t *aux;               /* OBS_LINK: the knot before */
    size_t n_obs;
} model;

static void model_free(model *md)
{
    free(md->knot_of);
    free(md->knot_t);
    free(md->de);
    free(md->dn);
    free(md->obs);
    free(md->terms);
    free(md->kind);
    free(md->keep);
    free(md->aux);
}

static int model_alloc(model *md, size_t m)
{
    memset(md, 0, sizeof *md);
    size_t cap = 2 * m + 5;    /* calibrations, links, five priors */
    md->m = m;
    md->knot_of = malloc(m * sizeof *md->knot_of);
    md->knot_t = malloc(m * sizeof *md->knot_t);
    md->de = calloc(m, sizeof *md->de);
    md->dn = calloc(m, sizeof *md->dn);
    md->obs = calloc(cap, sizeof *md->obs);
    md->terms = calloc(MAX_TERMS * cap, sizeof *md->terms);
    md->kind = calloc(cap, sizeof *md->kind);
    md->keep = calloc(cap, 1);
    md->aux = calloc(cap, sizeof *md->aux);
    return md->knot_of && md->knot_t && md->de && md->dn && md->obs && md->terms && md->kind && md->keep && md->aux
               ? 0 : -1;
}

/* Knots: calibrations in order of their middles, a new knot when a middle
 * is more than KNOT_MERGE_S after the first of the current group. */
static int make_knots(model *md, const hyp_calib *cal)
{
    size_t m = md->m, *ord = malloc(m * sizeof *ord);
    if (!ord)
        return -1;
    for (size_t k = 0; k < m; k++) {   /* insertion sort: a few dozen at most */
        size_t j = k;
        for (; j > 0 && mid(&cal[ord[j - 1]]) > mid(&cal[k]); j--)
            ord[j] = ord[j - 1];
        ord[j] = k;
    }
    double first = 0, sum = 0;
    size_t cnt = 0;
    md->nk = 0;
    for (size_t q = 0; q < m; q++) {
        double t = mid(&cal[ord[q]]);
        if (cnt && t - first > KNOT_MERGE_S) {
            md->knot_t[md->nk++] = sum / (double)cnt;
            cnt = 0, sum = 0;
        }
        if (!cnt)
            first = t;
        sum += t, cnt++;
        md->knot_of[ord[q]] = md->nk;
    }
    md->knot_t[md->nk++] = sum / (double)cnt;
    free(ord);
    return 0;
}

/* East and north of each calibration from their mean position; 1 when
 * any two differ by more than a metre (a gradient can then show). */
static int positions(model *md, const hyp_calib *cal)
{
    double la = 0, lo = 0;
    size_t n = 0;
    for (size_t k = 0; k < md->m; k++)
        if (cal[k].lat_deg == cal[k].lat_deg && cal[k].lon_deg == cal[k].lon_deg)
            la += cal[k].lat_deg, lo += cal[k].lon_deg, n++;
    if (n < 2)
        return 0;
    la /= (double)n, lo /= (double)n;
    double rad = 3.14159265358979323846 / 180.0, lo_min = INFINITY, lo_max = -INFINITY, la_min = INFINITY,
           la_max = -INFINITY;
    for (size_t k = 0; k < md->m; k++) {
        if (!(cal[k].lat_deg == cal[k].lat_deg && cal[k].lon_deg == cal[k].lon_deg))
            continue;
        md->dn[k] = (cal[k].lat_deg - la) * rad * EARTH_R_M;
        md->de[k] = (cal[k].lon_deg - lo) * rad * EARTH_R_M * cos(la * rad);
        la_min = fmin(la_min, md->dn[k]), la_max = fmax(la_max, md->dn[k]);
        lo_min = fmin(lo_min, md->de[k]), lo_max = fmax(lo_max, md->de[k]);
    }
    return la_max - la_min > 1.0 || lo_max - lo_min > 1.0;
}

/* Appends an observation; its terms follow with add_term. */
static size_t add_obs(model *md, int kind, double value, double sigma, const char *label)
{
    size_t i = md->n_obs++;
    hyp__adj_obs *o = &md->obs[i];
    o->terms = &md->terms[MAX_TERMS * i];
    o->value = value;
    o->sigma = sigma;
    o->label = label;
    o->active = 1;
    md->keep[i] = kind != OBS_CALIB;
    md->kind[i] = kind;
    return i;
}

/* A term of observation i; absent unknowns and zero coefficients are left
 * out (every row keeps its first, nonzero term). */
static void add_term(model *md, size_t i, size_t unknown, double coef)
{
    if (unknown == NONE || coef == 0)
        return;
    hyp__adj_obs *o = &md->obs[i];
    md->terms[MAX_TERMS * i + o->n_terms++] = (hyp__adj_term){unknown, coef};
}

/* One row per calibration (observation k is calibration k). */
static void calib_rows(model *md, const hyp_calib *cal, double h_base, const hyp__caltest_priors *p)
{
    for (size_t k = 0; k < md->m; k++) {
        const hyp_calib *c = &cal[k];
        double extra = c->sens_m_per_pa * p->extra_sigma_pa;
        double sigma = hypot(hyp__calib_sigma_m(c), extra);
        size_t i = add_obs(md, OBS_CALIB, c->known_m - c->raw_m, sigma, c->name);
        add_term(md, i, md->knot_of[k], c->sens_m_per_pa);
        double dz = c->raw_m - h_base;
        add_term(md, i, md->u_scale, dz);
        add_term(md, i, md->u_lapse, dz * dz / (2.0 * TV_NOMINAL_K));
        add_term(md, i, md->u_ge, c->sens_m_per_pa * md->de[k]);
        add_term(md, i, md->u_gn, c->sens_m_per_pa * md->dn[k]);
    }
}

/* The random walk between knots and the priors. */
static void model_rows(model *md, const hyp__caltest_priors *p)
{
    for (size_t j = 0; j + 1 < md->nk; j++) {
        double dt = md->knot_t[j + 1] - md->knot_t[j];
        double s = sqrt(fmax(p->rw_pa2_per_s * dt, RW_FLOOR_PA * RW_FLOOR_PA));
        size_t i = add_obs(md, OBS_LINK, 0.0, s, "random walk of the offset");
        add_term(md, i, j, -1.0);
        add_term(md, i, j + 1, 1.0);
        add_term(md, i, md->u_rate, -dt);
        md->aux[i] = j;
    }
    if (md->u_rate != NONE)
        add_term(md, add_obs(md, OBS_RATE, 0.0, p->rate_sigma_pa_s, "drift rate prior"), md->u_rate, 1.0);
    if (md->u_scale != NONE)
        add_term(md, add_obs(md, OBS_SCALE, 0.0, p->scale_sigma, "column scale prior"), md->u_scale, 1.0);
    if (md->u_lapse != NONE)
        add_term(md, add_obs(md, OBS_LAPSE, 0.0, p->lapse_sigma_k_per_m, "lapse-rate prior"), md->u_lapse, 1.0);
    if (md->u_ge != NONE) {
        add_term(md, add_obs(md, OBS_GRAD, 0.0, p->gradient_sigma_pa_m, "gradient prior (east)"), md->u_ge, 1.0);
        add_term(md, add_obs(md, OBS_GRAD, 0.0, p->gradient_sigma_pa_m, "gradient prior (north)"), md->u_gn, 1.0);
    }
}

static int model_build(model *md, const hyp_correct_result *r, double h_base, const hyp__caltest_priors *p)
{
    if (model_alloc(md, r->n_calibs) || make_knots(md, r->calibs))
        return -1;
    int grad = p->gradient_sigma_pa_m > 0 && positions(md, r->calibs);
    size_t u = md->nk;
    md->u_rate = md->nk >= 2 ? u++ : NONE;
    md->u_scale = p->scale_sigma > 0 ? u++ : NONE;
    md->u_lapse = p->lapse_sigma_k_per_m > 0 ? u++ : NONE;
    md->u_ge = grad ? u++ : NONE;
    md->u_gn = grad ? u++ : NONE;
    md->n_unknowns = u;
    calib_rows(md, r->calibs, h_base, p);
    model_rows(md, p);
    return 0;
}

/* ---- the test ----------------------------------------------------- */

/* One adjustment with calibration k in where active[k] (the model's
 * pseudo-observations always), with data snooping or without. */
static hyp_status solve(model *md, const unsigned char *active, int snoop, hyp__adj_result *res, hyp_error *err)
{
    for (size_t k = 0; k < md->m; k++)
        md->obs[k].active = active[k];
    hyp__adj_opts opts;
    hyp__adj_opts_default(&opts);
    opts.snoop = snoop;
    opts.keep = md->keep;
    hyp__adj_problem pb = {md->n_unknowns, NULL, md->n_obs, md->obs};
    return hyp__adj_solve(&pb, &opts, res, err);
}

static void calib_text(const hyp_calib *c, char *buf, size_t n)
{
    char a[40];
    hyp_time_format(c->start_s, a, sizeof a);
    snprintf(buf, n, "%.63s at %.20s", c->name, a);   /* a name, an ISO 8601 UTC time */
}

/* Each calibration's w and redundancy from an adjustment: a rejected one
 * from the adjustment that rejected it (its w recorded then; r from
 * w = v / (sigma sqrt(r))), and whether snooping rejected it; a kept one
 * from the final adjustment, suspect when its |w| is beyond the critical
 * value there (snooping could not go on). */
static void read_calibs(hyp_correct_result *r, const model *md, const hyp__adj_result *res)
{
    for (size_t k = 0; k < md->m; k++) {
        hyp_calib *c = &r->calibs[k];
        if (res->flag[k] & HYP_ADJ_REJECTED) {
            for (size_t j = 0; j < res->n_rejections; j++)
                if (res->rejections[j].obs == k) {
                    c->test_w = res->rejections[j].w;
                    double q = res->rejections[j].v / (md->obs[k].sigma * c->test_w);
                    c->test_redundancy = q * q;
                }
            c->rejected = 1;
            snprintf(c->test_note, sizeof c->test_note, "w %+.1f beyond %.2f: disagrees with the other calibrations",
                     c->test_w, res->w_crit);
        } else if (res->flag[k] & HYP_ADJ_USED) {
            c->test_w = res->w[k];
            c->test_redundancy = res->r[k];
            if ((res->flag[k] & HYP_ADJ_OUTLIER) && !c->suspect) {
                c->suspect = 1;
                snprintf(c->test_note, sizeof c->test_note,
                         "w %+.1f beyond %.2f, but too few calibrations to tell whether this one or another is wrong",
                         c->test_w, res->w_crit);
            }
        }
    }
}

/* Whether the calibrations agree (no |w| beyond the critical value) with
 * j left out in place of the rejected i, the other rejections still out:
 * then the data cannot tell i from j. */
static int agrees_without(model *md, const hyp_correct_result *r, size_t i, size_t j, unsigned char *active,
                          hyp__adj_result *tmp, int *nomem)
{
    for (size_t k = 0; k < md->m; k++)
        active[k] = !r->calibs[k].rejected || k == i;
    active[j] = 0;
    hyp_error e;
    hyp_status st = solve(md, active, 0, tmp, &e);
    *nomem |= st == HYP_ERR_NOMEM;
    return st == HYP_OK && !(tmp->w_max_free > tmp->w_crit);
}

static void mark_pair(hyp_calib *c, const hyp_calib *other)
{
    char t[100];
    calib_text(other, t, sizeof t);
    c->suspect = 1;
    snprintf(c->test_note, sizeof c->test_note,
             "disagrees, but the rest agree without %s as well: the test cannot tell which is wrong", t);
}

/* Snooping names the calibration with the largest |w|; it is the wrong
 * one only if leaving out any other instead leaves a disagreement. Where
 * another would do as well, both become suspects and the rejection is
 * undone (docs/methods.md: identifiable blunders). Returns 1 when any
 * was undone, -1 out of memory. */
static int check_alternatives(model *md, hyp_correct_result *r, hyp__adj_result *tmp)
{
    size_t m = md->m;
    unsigned char *active = malloc(m), *undo = calloc(m, 1);
    size_t *partner = malloc(m * sizeof *partner);
    int nomem = !active || !undo || !partner, any = 0;
    for (size_t i = 0; i < m && !nomem; i++)
        for (size_t j = 0; j < m && r->calibs[i].rejected && !undo[i] && !nomem; j++)
            if (!r->calibs[j].rejected && agrees_without(md, r, i, j, active, tmp, &nomem))
                undo[i] = 1, partner[i] = j;
    for (size_t i = 0; i < m && !nomem; i++)
        if (undo[i]) {
            r->calibs[i].rejected = 0;
            mark_pair(&r->calibs[i], &r->calibs[partner[i]]);
            mark_pair(&r->calibs[partner[i]], &r->calibs[i]);
            any = 1;
        }
    free(active);
    free(undo);
    free(partner);
    return nomem ? -1 : any;
}

static void read_global(hyp_calib_test *ct, const hyp__adj_result *res)
{
    hyp__adj_opts opts;
    hyp__adj_opts_default(&opts);
    ct->alpha_w = opts.alpha_w;
    ct->w_crit = res->w_crit;
    ct->alpha_global = res->alpha_global;
    ct->dof = res->dof;
    ct->vtpv = res->vtpv;
    ct->s0_sq = res->s0_sq;
    ct->s0_sq_lower = res->s0_sq_lower;
    ct->s0_sq_upper = res->s0_sq_upper;
    ct->global = res->global == HYP_ADJ_GLOBAL_PASS ? HYP_GLOBAL_PASS
               : res->global == HYP_ADJ_GLOBAL_LOW  ? HYP_GLOBAL_LOW
               : res->global == HYP_ADJ_GLOBAL_HIGH ? HYP_GLOBAL_HIGH : HYP_GLOBAL_NONE;
}

/* The widening when the test cannot tell which calibration is wrong, Pa:
 * the range D of the suspects' offsets (of every kept calibration when
 * fewer than two are suspect) over sqrt(2). The fit passes through the
 * suspects, so at a suspect's time the error is 0 if it is right and D if
 * it is the wrong one: D / sqrt(2) is the root mean square over the two
 * cases, and two sigmas cover D. */
static double suspect_spread(const hyp_correct_result *r)
{
    double lo = INFINITY, hi = -INFINITY;
    int all = r->calib_test.n_suspect < 2;
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        if (c->rejected || !(all || c->suspect))
            continue;
        lo = fmin(lo, c->offset_pa), hi = fmax(hi, c->offset_pa);
    }
    return hi > lo ? (hi - lo) / sqrt(2.0) : 0.0;
}

static void set_state(hyp_correct_result *r)
{
    hyp_calib_test *ct = &r->calib_test;
    ct->n_tested = ct->n_rejected = ct->n_suspect = 0;
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        ct->n_tested += c->test_w == c->test_w;
        ct->n_rejected += c->rejected != 0;
        ct->n_suspect += c->suspect != 0;
    }
    if (ct->n_suspect)
        ct->state = HYP_CALTEST_UNRESOLVED;
    else if (ct->n_rejected)
        ct->state = HYP_CALTEST_REJECTED;
    else if (ct->n_tested && ct->dof > 0)
        ct->state = HYP_CALTEST_PASSED;
    else
        ct->state = HYP_CALTEST_UNTESTED;
    ct->failed = ct->state == HYP_CALTEST_REJECTED || ct->state == HYP_CALTEST_UNRESOLVED;
    if (ct->state == HYP_CALTEST_UNRESOLVED)
        ct->spread_pa = suspect_spread(r);
}

/* ---- messages ------------------------------------------------------ */

/* A prior the calibrations contradict although none of them is suspect
 * (a drift faster than the prior, a jump, a column or gradient beyond its
 * sigma, shown by calibrations that agree on it): said, not a failure. */
static void warn_priors(hyp__work *w, const model *md, const hyp__adj_result *res)
{
    for (size_t i = md->m; i < md->n_obs; i++) {
        if (!(res->flag[i] & HYP_ADJ_OUTLIER))
            continue;
        char a[40] = "", b[40] = "";
        if (md->kind[i] == OBS_LINK) {
            hyp_time_format(md->knot_t[md->aux[i]], a, sizeof a);
            hyp_time_format(md->knot_t[md->aux[i] + 1], b, sizeof b);
        }
        hyp_msgs_add_at(w->msgs, HYP_WARNING, "calibration-test", NULL, 0,
                        "the calibrations agree with each other but not with the %s%s%s%s%s (w %+.1f beyond %.2f): %s",
                        md->obs[i].label, a[0] ? " between " : "", a, a[0] ? " and " : "", b, res->w[i], res->w_crit,
                        md->kind[i] == OBS_LINK ? "the offset jumped; check the instrument"
                        : md->kind[i] == OBS_RATE ? "an unusually fast drift; check the instrument and the tie list"
                                                  : "check the column temperature and the base's position");
    }
}

static void warn_calibs(hyp__work *w)
{
    const hyp_correct_result *r = w->r;
    const hyp_calib_test *ct = &r->calib_test;
    char t[100];
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        if (!c->rejected && !c->suspect)
            continue;
        calib_text(c, t, sizeof t);
        if (c->rejected)
            hyp_msgs_add_at(w->msgs, HYP_WARNING, "calibration-test", NULL, 0,
                            "calibration %s: misclosure %+.3f m disagrees with the other calibrations (w %+.1f, critical %.2f): rejected, the offset is fitted without it; check the tie list and the benchmark",
                            t, c->misclosure_m, c->test_w, ct->w_crit);
        else
            hyp_msgs_add_at(w->msgs, HYP_WARNING, "calibration-test", NULL, 0,
                            "calibration %s: misclosure %+.3f m: %s; all kept, the offset's sigma widened by %.2f hPa; check the tie list",
                            t, c->misclosure_m, c->test_note, ct->spread_pa / 100.0);
    }
}

static void untested(hyp__work *w, const char *why)
{
    w->r->calib_test.state = HYP_CALTEST_UNTESTED;
    hyp_msgs_add_at(w->msgs, HYP_WARNING, "calibration-test", NULL, 0,
                    "the calibrations could not be tested against each other: %s", why);
}

/* The snooped adjustment, then the check that each rejection is the only
 * explanation; where one was undone, the kept set adjusted once more for
 * the figures reported. */
static hyp_status run_test(hyp__work *w, model *md, hyp__adj_result *res, hyp__adj_result *tmp, hyp_error *err)
{
    hyp_correct_result *r = w->r;
    unsigned char *active = malloc(md->m);
    if (!active)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    memset(active, 1, md->m);
    hyp_error aerr;
    hyp_error_clear(&aerr);
    hyp_status st = solve(md, active, 1, res, &aerr);
    int undone = 0;
    if (!st) {
        read_calibs(r, md, res);
        undone = check_alternatives(md, r, tmp);
    }
    if (!st && undone > 0) {
        for (size_t k = 0; k < md->m; k++)
            active[k] = !r->calibs[k].rejected;
        if (!(st = solve(md, active, 0, res, &aerr)))
            read_calibs(r, md, res);
    }
    free(active);
    if (st == HYP_ERR_NOMEM || undone < 0)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    if (st) {
        untested(w, aerr.message);
        return HYP_OK;
    }
    read_global(&r->calib_test, res);
    set_state(r);
    warn_calibs(w);
    if (!r->calib_test.n_suspect)   /* else the suspects are the news */
        warn_priors(w, md, res);
    return HYP_OK;
}

hyp_status hyp__calib_test_run(hyp__work *w, const hyp__caltest_priors *p, hyp_error *err)
{
    model md;
    hyp__adj_result res, tmp;
    hyp__adj_result_init(&res);
    hyp__adj_result_init(&tmp);
    hyp_status st = model_build(&md, w->r, w->base->height_m, p)
                        ? hyp_error_set(err, HYP_ERR_NOMEM, "out of memory")
                        : run_test(w, &md, &res, &tmp, err);
    hyp__adj_result_free(&res);
    hyp__adj_result_free(&tmp);
    model_free(&md);
    return st;
}

hyp_status hyp__calib_test(hyp__work *w, hyp_error *err)
{
    hyp__caltest_priors p;
    hyp__calib_test_priors(w, &p);
    return hyp__calib_test_run(w, &p, err);
}
