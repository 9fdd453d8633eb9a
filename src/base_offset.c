/* base_offset.c - two bases never compared side by side: the upper base's
 * instrument offset relative to the lower, estimated by weighted least
 * squares from every constraint the survey holds (docs/methods.md,
 * section 6): the calibrations (co-locations with either base, ties at
 * different heights), the track's GNSS heights and both bases'
 * thermometers in calm hours (both lower grade), and the prior of an
 * uncalibrated barometer. A constraint that is absent weighs nothing, so
 * adding a correct tie can only add information. */
#include "base_offset.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"
#include "serial_var.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_CAL 64
#define GNSS_MAX 20000
#define FLOOR_PA 1.0   /* unresolved micro-pressure changes: as the drift fit weighs calibrations */

/* One constraint's normal equations in (d_r, d_U): the rover's offset at
 * the first calibration and the upper base's offset (Pa): the information
 * matrix j (j00, j01, j11) and right-hand side h. */
typedef struct source { double j[3], h[2]; const char *what; } source;

enum { SRC_CALIB, SRC_GNSS, SRC_THERMO, SRC_PRIOR, SRC_COUNT };

/* dh/dpU of the two-base proportion h = hL + D ln(pL/p) / ln(pL/pU) per
 * unit place x in the bracket: D / (pU ln(pL/pU)) (differentiating it). */
static double upper_sens(double dh, double pl, double pu)
{
    return dh / (pu * log(pl / pu));
}

/* Cholesky factor (lower, in place) of the n x n matrix a; 0 when not
 * positive definite (Golub and Van Loan, Matrix Computations, alg. 4.2.1). */
static int cholesky(double *a, size_t n)
{
    for (size_t j = 0; j < n; j++) {
        double d = a[j * n + j];
        for (size_t k = 0; k < j; k++)
            d -= a[j * n + k] * a[j * n + k];
        if (!(d > 0.0))
            return 0;
        a[j * n + j] = sqrt(d);
        for (size_t i = j + 1; i < n; i++) {
            double s = a[i * n + j];
            for (size_t k = 0; k < j; k++)
                s -= a[i * n + k] * a[j * n + k];
            a[i * n + j] = s / a[j * n + j];
        }
    }
    return 1;
}

/* Solves L L^T x = b in place. */
static void chol_solve(const double *l, size_t n, double *b)
{
    for (size_t i = 0; i < n; i++) {
        for (size_t k = 0; k < i; k++)
            b[i] -= l[i * n + k] * b[k];
        b[i] /= l[i * n + i];
    }
    for (size_t i = n; i-- > 0;) {
        for (size_t k = i + 1; k < n; k++)
            b[i] -= l[k * n + i] * b[k];
        b[i] /= l[i * n + i];
    }
}

/* Calibration k as an equation in the rover's offset at its time d_r
 * (Pa, the rover reads high) and the upper base's d_U:
 *   known - raw = c d_r(t) - x c_U d_U + e,
 * x its place in the bracket (0 at the lower base, 1 at the upper). */
static int calib_row(const hyp__work *w, const hyp_calib *c, double *a0, double *a1, double *y)
{
    double dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m, t = 0.5 * (c->start_s + c->end_s), pl, pu;
    if (hyp__base_at(&w->bvs[w->ref], w->bvs[w->ref].p, t, 1e9, &pl) ||
        hyp__base_at(&w->bvs[w->upper], w->bvs[w->upper].p, t, 1e9, &pu) || !(pl > pu))
        return 0;
    double x = (c->raw_m - w->bases[w->ref].height_m) / dh;
    *a0 = c->sens_m_per_pa;
    *a1 = -x * upper_sens(dh, pl, pu);
    *y = c->known_m - c->raw_m;
    return 1;
}

/* The calibrations' normal equations in (d_r at the first calibration,
 * d_U), generalised least squares: the rover's offset wanders between
 * calibrations as a random walk of drift_rw_pa2_per_s (as the budget
 * takes it), so calibrations share that part of their errors:
 *   Cov(e_k, e_l) = c_k c_l q (min(t_k, t_l) - t_1) + delta_kl s_k^2,
 * s_k^2 = se^2 + sigma_known^2 + (c 1 Pa)^2 as the drift fit weighs them. */
static int calib_source(const hyp__work *w, source *src)
{
    const hyp_correct_result *r = w->r;
    size_t m = 0;
    double a[MAX_CAL][2], y[MAX_CAL], t[MAX_CAL], s2[MAX_CAL];
    for (size_t k = 0; k < r->n_calibs && m < MAX_CAL; k++) {
        const hyp_calib *c = &r->calibs[k];
        if (!calib_row(w, c, &a[m][0], &a[m][1], &y[m]))
            continue;
        double f = FLOOR_PA * c->sens_m_per_pa;
        s2[m] = c->se_m * c->se_m + c->known_sigma_m * c->known_sigma_m + f * f;
        t[m] = 0.5 * (c->start_s + c->end_s);
        m++;
    }
    double *n_eq = src->j, *rhs = src->h;
    if (m == 0)
        return 0;
    double *cov = malloc(m * m * sizeof *cov), *b = malloc(3 * m * sizeof *b);
    if (!cov || !b) {
        free(cov);
        free(b);
        return -1;
    }
    double t1 = t[0], q = w->o->drift_rw_pa2_per_s;
    for (size_t k = 1; k < m; k++)
        t1 = fmin(t1, t[k]);
    for (size_t k = 0; k < m; k++)
        for (size_t l = 0; l < m; l++)
            cov[k * m + l] = a[k][0] * a[l][0] * q * (fmin(t[k], t[l]) - t1) + (k == l ? s2[k] : 0.0);
    int ok = cholesky(cov, m);
    for (int j = 0; ok && j < 3; j++) {   /* Sigma^-1 times the columns a0, a1 and y */
        for (size_t k = 0; k < m; k++)
            b[j * m + k] = j < 2 ? a[k][j] : y[k];
        chol_solve(cov, m, b + j * m);
    }
    for (size_t k = 0; ok && k < m; k++) {
        n_eq[0] += a[k][0] * b[k], n_eq[1] += a[k][0] * b[m + k], n_eq[2] += a[k][1] * b[m + k];
        rhs[0] += a[k][0] * b[2 * m + k], rhs[1] += a[k][1] * b[2 * m + k];
    }
    free(cov);
    free(b);
    return ok ? 1 : 0;
}

/* GNSS heights against the heights: each is an equation like a
 * calibration's, gnss - raw = c d_r - x c_U d_U + e, so the track's shape
 * tells d_U (the upper base's offset bends the heights in proportion to
 * x c_U, which GNSS heights do not share) and its mean tells d_r. Least
 * squares in (d_r, d_U), its covariance scaled by the GNSS errors'
 * correlation (serial_var.c) and widened by Student's t for the few
 * independent values it rests on: GNSS is weighed as GNSS anchoring weighs
 * it, lower grade than a calibration. */
static int gnss_rows(const hyp__work *w, double *c, double *u, double *y, size_t cap, double *xspan)
{
    const float *g = w->o->gnss_height_m;
    double dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m, xlo = INFINITY, xhi = -INFINITY;
    size_t avail = 0, n = 0, seen = 0;
    for (size_t i = 0; i < w->n; i++)
        avail += w->r->status[i] == HYP_PT_OK && g[i] == g[i];
    size_t stride = avail > GNSS_MAX ? (avail + GNSS_MAX - 1) / GNSS_MAX : 1;
    hyp__in in = {0};
    for (size_t i = 0; i < w->n && n < cap; i++) {
        if (!(w->r->status[i] == HYP_PT_OK && g[i] == g[i]) || seen++ % stride)
            continue;
        double sens, tv, raw = hyp__inputs(w, i, &in) ? NAN : hyp__raw_height(w, i, &in, &sens, &tv);
        if (raw != raw)
            continue;
        double x = (raw - w->bases[w->ref].height_m) / dh;
        c[n] = sens;
        u[n] = -x * upper_sens(dh, in.pb, in.pu);
        y[n++] = g[i] - raw;
        xlo = fmin(xlo, x), xhi = fmax(xhi, x);
    }
    *xspan = n ? xhi - xlo : 0.0;
    return (int)(n < (size_t)1 << 30 ? n : 0);
}

static int gnss_source(const hyp__work *w, source *s)
{
    if (!w->o->gnss_height_m)
        return 0;
    double *c = malloc(GNSS_MAX * sizeof *c), *u = malloc(GNSS_MAX * sizeof *u), *y = malloc(GNSS_MAX * sizeof *y);
    int got = 0;
    if (!c || !u || !y) {
        got = -1;
        goto out;
    }
    double span;
    size_t n = (size_t)gnss_rows(w, c, u, y, GNSS_MAX, &span);
    if (n < 100 || span < 0.3)   /* the track must span a good part of the bracket */
        goto out;
    double j[3] = {0}, h[2] = {0};
    for (size_t i = 0; i < n; i++) {
        j[0] += c[i] * c[i], j[1] += c[i] * u[i], j[2] += u[i] * u[i];
        h[0] += c[i] * y[i], h[1] += u[i] * y[i];
    }
    double det = j[0] * j[2] - j[1] * j[1];
    if (!(det > 0))
        goto out;
    double dr = (j[2] * h[0] - j[1] * h[1]) / det, du = (j[0] * h[1] - j[1] * h[0]) / det, ss = 0;
    for (size_t i = 0; i < n; i++) {
        y[i] -= c[i] * dr + u[i] * du;   /* residuals */
        ss += y[i] * y[i];
    }
    double f = hyp__mean_var_factor(y, n, NULL), ne = (double)n / f;
    double tz = hyp__t975(ne - 2.0) / 1.959963984540054, var = ss / (double)(n - 2) * f * tz * tz;
    if (var > 0) {
        *s = (source){{j[0] / var, j[1] / var, j[2] / var}, {h[0] / var, h[1] / var}, "GNSS heights (lower grade)"};
        got = 1;
    }
out:
    free(c);
    free(u);
    free(y);
    return got;
}

/* Both bases' thermometers: in hydrostatic balance the upper base's
 * pressure is pL exp(-g D / (Rd Tv)) (hypsometric equation, Wallace and
 * Hobbs, eq. 3.29), Tv the layer's mean virtual temperature, taken as the
 * logarithmic mean of the two ends' (exact for a linear profile); what the
 * upper logger reads beyond that is its offset. Only calm samples (both
 * tendencies under half the rapid threshold: no front between the bases).
 * Lower grade: a layer departing from linear (curvature_sigma_k) and
 * thermometers as measures of the air (tcol_sigma_k) move it by
 * dpU/dTv = pU g D / (Rd Tv^2) per kelvin, and a gradient between the
 * bases by G times their distance. */
static int thermo_source(const hyp__work *w, source *s)
{
    const hyp__base_view *l = &w->bvs[w->ref], *u = &w->bvs[w->upper];
    const hyp_base *bl = &w->bases[w->ref], *bu = &w->bases[w->upper];
    double dh = bu->height_m - bl->height_m, calm = 0.5 * w->o->rapid_pa_per_s;
    double lat = bl->lat_deg == bl->lat_deg ? bl->lat_deg : 45.0, g = hyp_gravity_at_height_m_s2(lat, bl->height_m + 0.5 * dh);
    double sum = 0, sens = 0;
    size_t n = 0;
    for (size_t i = 0; i < l->n; i++) {
        double pu, tu, ru, rhu;
        if (!(l->temp[i] == l->temp[i]) || fabs(l->rate[i]) > calm ||
            hyp__base_at(u, u->p, l->t[i], w->o->max_gap_s, &pu) || hyp__base_at(u, u->temp, l->t[i], w->o->max_gap_s, &tu) ||
            hyp__base_at(u, u->rate, l->t[i], w->o->max_gap_s, &ru) || tu != tu || fabs(ru) > calm)
            continue;
        hyp__base_at(u, u->rh, l->t[i], w->o->max_gap_s, &rhu);
        double rhl = l->rh[i] == l->rh[i] ? l->rh[i] : w->o->default_rh_pct;
        double tvl = hyp_virtual_temperature_k(l->temp[i], rhl, l->p[i]);
        double tvu = hyp_virtual_temperature_k(tu, rhu == rhu ? rhu : w->o->default_rh_pct, pu);
        double tv = hyp_layer_mean_temperature_k(tvl, tvu);
        if (!(tv > 0))
            continue;
        sum += pu - l->p[i] * exp(-g * dh / (HYP_RD_J_KG_K * tv));
        sens += pu * g * dh / (HYP_RD_J_KG_K * tv * tv);
        n++;
    }
    if (n < 30)
        return 0;
    double st = hypot(w->o->curvature_sigma_k, w->o->tcol_sigma_k) * sens / (double)n, sg = 0.0;
    if (bl->lat_deg == bl->lat_deg && bu->lat_deg == bu->lat_deg)
        sg = w->o->gradient_sigma_pa_per_m * hyp_geo_distance_m(bl->lat_deg, bl->lon_deg, bu->lat_deg, bu->lon_deg);
    double info = 1.0 / (st * st + sg * sg);
    *s = (source){{0, 0, info}, {0, info * sum / (double)n}, "both bases' thermometers in calm hours (lower grade)"};
    return 1;
}

/* What the calibrations that bear on the offset are, for the record. */
static const char *calib_kind(const hyp__work *w)
{
    int upper = 0, ties = 0;
    for (size_t k = 0; k < w->r->n_calibs; k++) {
        const hyp_calib *c = &w->r->calibs[k];
        upper |= c->kind == HYP_CAL_BASE && fabs(c->known_m - w->bases[w->upper].height_m) < 1e-6;
        ties |= c->kind == HYP_CAL_BENCHMARK;
    }
    return upper && ties ? "co-locations with both bases and ties"
           : upper       ? "co-locations with both bases"
           : ties        ? "ties at different heights"
                         : "co-locations";
}

/* Solves the summed normal equations of the sources not masked out:
 * d_U and its variance; 0 when d_U is not determined. */
static int solve(const source *src, unsigned skip, double *d_u, double *var)
{
    double j[3] = {0}, h[2] = {0};
    for (int k = 0; k < SRC_COUNT; k++)
        if (!(skip >> k & 1)) {
            for (int i = 0; i < 3; i++)
                j[i] += src[k].j[i];
            h[0] += src[k].h[0], h[1] += src[k].h[1];
        }
    double det = j[0] * j[2] - j[1] * j[1];
    if (j[0] > 0 && det > 0) {
        *d_u = (j[0] * h[1] - j[1] * h[0]) / det;
        *var = j[0] / det;
    } else if (j[2] > 0) {   /* nothing bears on d_r: d_U alone */
        *d_u = h[1] / j[2];
        *var = 1.0 / j[2];
    } else
        return 0;
    return 1;
}

/* The record: each constraint's share is the information on d_U lost
 * without it (of the sum of those losses), the largest first. */
static void describe(hyp_correct_result *r, const source *src, double var)
{
    double loss[SRC_COUNT], sum = 0, d, v;
    int best = 0;
    for (int k = 0; k < SRC_COUNT; k++) {
        loss[k] = solve(src, 1u << k, &d, &v) ? fmax(0.0, 1.0 / var - 1.0 / v) : 1.0 / var;
        sum += loss[k];
        if (loss[k] > loss[best])
            best = k;
    }
    size_t l = (size_t)snprintf(r->base_offset_how, sizeof r->base_offset_how, "%s (%.0f %% of the weight)",
                                src[best].what, 100.0 * loss[best] / sum);
    for (int k = 0; k < SRC_COUNT && l < sizeof r->base_offset_how; k++)
        if (k != best && loss[k] > 0.01 * sum)
            l += (size_t)snprintf(r->base_offset_how + l, sizeof r->base_offset_how - l, "; %s %.0f %%", src[k].what,
                                  100.0 * loss[k] / sum);
}

/* Removes d_U from the upper base's view and records it. */
static void apply(hyp__work *w, double d_pa, double sigma_pa)
{
    hyp_correct_result *r = w->r;
    hyp__base_view *u = &w->bvs[w->upper];
    for (size_t i = 0; i < u->n; i++)
        u->p[i] -= d_pa;
    r->base_offset_pa[w->upper] += d_pa;
    r->base_offset_sigma_pa[w->upper] = sigma_pa;
    r->base_offset_pa[w->ref] = w->bases[w->ref].offset_pa == w->bases[w->ref].offset_pa ? w->bases[w->ref].offset_pa : 0.0;
    r->base_offset_sigma_pa[w->ref] = 0.0;   /* the reference: the others are relative to it */
}

int hyp__estimate_base_offset(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    if (w->method != HYP_METHOD_TWO_BASE || r->bases_compared)
        return 0;
    double sp = w->o->uncal_offset_sigma_pa, d, var;
    source src[SRC_COUNT] = {{{0}, {0}, calib_kind(w)}, {{0}, {0}, ""}, {{0}, {0}, ""},
                             {{0, 0, 1.0 / (sp * sp)}, {0, 0}, "the prior of an uncalibrated barometer"}};
    if (calib_source(w, &src[SRC_CALIB]) < 0 || gnss_source(w, &src[SRC_GNSS]) < 0)
        return -1;
    thermo_source(w, &src[SRC_THERMO]);
    if (!solve(src, 0, &d, &var))
        return 0;
    describe(r, src, var);
    apply(w, d, sqrt(var));
    hyp_msgs_add_at(w->msgs, HYP_NOTE, "method", w->bases[w->upper].name, 0,
                    "never compared with %s side by side: its offset relative to it estimated at %+.1f Pa +- %.1f Pa from %s",
                    w->bases[w->ref].name, d, sqrt(var), r->base_offset_how);
    return 1;
}
