/* adjust_engine.c - weighted least-squares adjustment of a linear network by
 * the normal equations (Cholesky, LAPACK dpotrf/dpotrs/dpotri), with the
 * global test of the variance factor, redundancy numbers, Baarda's w-test,
 * data snooping and a datum check. Equations and sources: docs/methods.md,
 * "Network adjustment engine". */
#include "adjust_engine.h"

#include <lapacke.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "distrib.h"

#define MAX_NAMED 10   /* undetermined unknowns named in a message */

/* The work space of one solve: the normal matrix (column-major, upper
 * triangle used), which dpotrf turns into its Cholesky factor and dpotri
 * into the inverse; the right-hand side; the column scales; union-find
 * arrays for the datum check; dpocon's work arrays. */
typedef struct work {
    size_t n;
    double *nmat;
    double *rhs;
    double *scale;
    double *pocon;        /* 3 n */
    lapack_int *ipocon;   /* n */
    size_t *parent;
    unsigned char *datum;
} work;

void hyp__adj_opts_default(hyp__adj_opts *opts)
{
    opts->alpha_global = 0.05;
    opts->alpha_w = 0.001;
    opts->snoop = 0;
    opts->max_reject = 0;
    opts->r_min = 1e-6;
    opts->min_rcond = 1e-13;
    opts->max_work_bytes = (size_t)512 << 20;
    opts->keep = NULL;
    opts->stop_at_kept = 0;
    opts->rho_inseparable = 0;
}

void hyp__adj_result_init(hyp__adj_result *res)
{
    memset(res, 0, sizeof *res);
}

void hyp__adj_result_free(hyp__adj_result *res)
{
    free(res->x);
    free(res->sigma_x);
    free(res->sigma_x_prior);
    free(res->v);
    free(res->sigma_adj);
    free(res->r);
    free(res->w);
    free(res->flag);
    free(res->rejections);
    hyp__adj_result_init(res);
}

/* ---- names for messages ---- */

static const char *unknown_name(const hyp__adj_problem *pb, size_t j, char *buf, size_t len)
{
    if (pb->names && pb->names[j])
        return pb->names[j];
    snprintf(buf, len, "#%zu", j + 1);
    return buf;
}

/* "observation "B->C" (#4)" or "observation #4": numbers are 1-based. */
static const char *obs_name(const hyp__adj_problem *pb, size_t i, char *buf, size_t len)
{
    const char *label = pb->obs[i].label;
    if (label)
        snprintf(buf, len, "observation \"%s\" (#%zu)", label, i + 1);
    else
        snprintf(buf, len, "observation #%zu", i + 1);
    return buf;
}

/* Appends to a fixed buffer; past its end the text is cut, never overrun. */
static void append(char *buf, size_t cap, size_t *len, const char *fmt, ...)
{
    if (*len + 1 >= cap)
        return;
    va_list ap;
    va_start(ap, fmt);
    int k = vsnprintf(buf + *len, cap - *len, fmt, ap);
    va_end(ap);
    if (k > 0)
        *len = (size_t)k >= cap - *len ? cap - 1 : *len + (size_t)k;
}

/* ---- input checks ---- */

static hyp_status check_opts(const hyp__adj_opts *o, hyp_error *err)
{
    if (!(o->alpha_global > 0 && o->alpha_global < 1) || !(o->alpha_w > 0 && o->alpha_w < 1))
        return hyp_error_set(err, HYP_ERR_USAGE, "adjustment: significance levels %g (global) and %g (w-test): "
                             "expected each strictly between 0 and 1", o->alpha_global, o->alpha_w);
    if (!(o->r_min >= 0 && o->r_min < 1) || !(o->min_rcond >= 0 && o->min_rcond < 1))
        return hyp_error_set(err, HYP_ERR_USAGE, "adjustment: r_min %g, min_rcond %g: expected each in [0, 1)",
                             o->r_min, o->min_rcond);
    return HYP_OK;
}

/* One observation's row: every term names an unknown and has a finite
 * coefficient, at least one nonzero (a zero row carries no information but
 * would still count in the degrees of freedom). */
static hyp_status check_row(const hyp__adj_problem *pb, size_t i, hyp_error *err)
{
    const hyp__adj_obs *o = &pb->obs[i];
    char nb[320];
    if (o->n_terms == 0 || !o->terms)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s: no terms: expected at least one (unknown, coefficient)",
                             obs_name(pb, i, nb, sizeof nb));
    int nonzero = 0;
    for (size_t k = 0; k < o->n_terms; k++) {
        if (o->terms[k].unknown >= pb->n_unknowns)
            return hyp_error_set(err, HYP_ERR_VALUE, "%s: term %zu: unknown index %zu: expected below %zu",
                                 obs_name(pb, i, nb, sizeof nb), k + 1, o->terms[k].unknown, pb->n_unknowns);
        if (!isfinite(o->terms[k].coef))
            return hyp_error_set(err, HYP_ERR_VALUE, "%s: term %zu: coefficient is not a finite number",
                                 obs_name(pb, i, nb, sizeof nb), k + 1);
        nonzero |= o->terms[k].coef != 0;
    }
    if (!nonzero)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s: every coefficient is 0: expected at least one nonzero",
                             obs_name(pb, i, nb, sizeof nb));
    return HYP_OK;
}

static hyp_status check_problem(const hyp__adj_problem *pb, hyp_error *err)
{
    char nb[320];
    if (pb->n_unknowns == 0)
        return hyp_error_set(err, HYP_ERR_USAGE, "adjustment: no unknowns");
    if (pb->n_obs > 0 && !pb->obs)
        return hyp_error_set(err, HYP_ERR_USAGE, "adjustment: %zu observations but no array", pb->n_obs);
    for (size_t i = 0; i < pb->n_obs; i++) {
        const hyp__adj_obs *o = &pb->obs[i];
        hyp_status st = check_row(pb, i, err);
        if (st)
            return st;
        if (!isfinite(o->value))
            return hyp_error_set(err, HYP_ERR_VALUE, "%s: observed value is not a finite number",
                                 obs_name(pb, i, nb, sizeof nb));
        if (!(o->sigma > 0) || !isfinite(o->sigma))
            return hyp_error_set(err, HYP_ERR_VALUE, "%s: sigma %g: expected a finite standard deviation > 0",
                                 obs_name(pb, i, nb, sizeof nb), o->sigma);
    }
    return HYP_OK;
}

/* ---- work space ---- */

static void work_free(work *ws)
{
    free(ws->nmat);
    free(ws->rhs);
    free(ws->scale);
    free(ws->pocon);
    free(ws->ipocon);
    free(ws->parent);
    free(ws->datum);
    memset(ws, 0, sizeof *ws);
}

/* Allocates the work space for n unknowns, refusing above cap_bytes (the
 * n^2 normal matrix is nearly all of it: 32 MB at 2000 unknowns). */
static hyp_status work_alloc(work *ws, size_t n, size_t cap_bytes, hyp_error *err)
{
    memset(ws, 0, sizeof *ws);
    size_t per_n = 5 * sizeof(double) + sizeof(lapack_int) + sizeof(size_t) + 1;
    if (n > (size_t)INT_MAX || n > SIZE_MAX / sizeof(double) / n ||
        n * n * sizeof(double) > SIZE_MAX - n * per_n || n * n * sizeof(double) + n * per_n > cap_bytes)
        return hyp_error_set(err, HYP_ERR_NOMEM, "adjustment: %zu unknowns: the normal matrix needs %.0f MiB, "
                             "above the cap of %.0f MiB", n, (double)n * (double)n * 8.0 / 1048576.0,
                             (double)cap_bytes / 1048576.0);
    ws->n = n;
    ws->nmat = malloc(n * n * sizeof *ws->nmat);
    ws->rhs = malloc(n * sizeof *ws->rhs);
    ws->scale = malloc(n * sizeof *ws->scale);
    ws->pocon = malloc(3 * n * sizeof *ws->pocon);
    ws->ipocon = malloc(n * sizeof *ws->ipocon);
    ws->parent = malloc(n * sizeof *ws->parent);
    ws->datum = malloc(n);
    if (!ws->nmat || !ws->rhs || !ws->scale || !ws->pocon || !ws->ipocon || !ws->parent || !ws->datum) {
        work_free(ws);
        return hyp_error_set(err, HYP_ERR_NOMEM, "adjustment: out of memory for %zu unknowns", n);
    }
    return HYP_OK;
}

static hyp_status result_alloc(hyp__adj_result *res, size_t n, size_t m)
{
    hyp__adj_result_free(res);
    res->n_unknowns = n;
    res->n_obs = m;
    res->x = malloc(n * sizeof *res->x);
    res->sigma_x = malloc(n * sizeof *res->sigma_x);
    res->sigma_x_prior = malloc(n * sizeof *res->sigma_x_prior);
    size_t mm = m ? m : 1;
    res->v = malloc(mm * sizeof *res->v);
    res->sigma_adj = malloc(mm * sizeof *res->sigma_adj);
    res->r = malloc(mm * sizeof *res->r);
    res->w = malloc(mm * sizeof *res->w);
    res->flag = calloc(mm, 1);
    if (!res->x || !res->sigma_x || !res->sigma_x_prior || !res->v || !res->sigma_adj || !res->r || !res->w ||
        !res->flag)
        return HYP_ERR_NOMEM;
    return HYP_OK;
}

/* ---- datum check ---- */

static size_t uf_find(size_t *parent, size_t j)
{
    while (parent[j] != j) {
        parent[j] = parent[parent[j]];   /* path halving */
        j = parent[j];
    }
    return j;
}

/* A row whose coefficients do not sum to zero fixes the level of its
 * component. Conversely, if every row of a connected component sums to zero
 * (height differences, offset minus height, ...), adding one constant to
 * all its unknowns changes no observation: the vector of ones on the
 * component is in the null space of A, the datum defect of a free levelling
 * network (Caspary, Concepts of Network and Deformation Analysis). A
 * one-unknown row (a control mark) is the usual datum. */
static int row_fixes_level(const hyp__adj_obs *o)
{
    double sum = 0, abs_sum = 0;
    for (size_t k = 0; k < o->n_terms; k++) {
        sum += o->terms[k].coef;
        abs_sum += fabs(o->terms[k].coef);
    }
    return fabs(sum) > 1e-9 * abs_sum;
}

/* Joins the unknowns of every used row (union-find) and marks the
 * components that hold a row fixing their level. */
static void components(const hyp__adj_problem *pb, const unsigned char *flag, work *ws)
{
    for (size_t j = 0; j < ws->n; j++) {
        ws->parent[j] = j;
        ws->datum[j] = 0;
    }
    for (size_t i = 0; i < pb->n_obs; i++) {
        if (!(flag[i] & HYP_ADJ_USED))
            continue;
        const hyp__adj_obs *o = &pb->obs[i];
        size_t first = SIZE_MAX;
        for (size_t k = 0; k < o->n_terms; k++) {
            if (o->terms[k].coef == 0)
                continue;
            size_t root = uf_find(ws->parent, o->terms[k].unknown);
            if (first == SIZE_MAX)
                first = root;
            else if (root != uf_find(ws->parent, first))
                ws->parent[root] = uf_find(ws->parent, first);
        }
    }
    for (size_t i = 0; i < pb->n_obs; i++) {
        const hyp__adj_obs *o = &pb->obs[i];
        if ((flag[i] & HYP_ADJ_USED) && row_fixes_level(o))
            for (size_t k = 0; k < o->n_terms; k++)
                if (o->terms[k].coef != 0)
                    ws->datum[uf_find(ws->parent, o->terms[k].unknown)] = 1;
    }
}

/* HYP_ERR_NODATA naming the unknowns of components without a datum (the
 * first MAX_NAMED, then how many more). */
static hyp_status check_datum(const hyp__adj_problem *pb, const unsigned char *flag, work *ws, hyp_error *err)
{
    components(pb, flag, ws);
    size_t count = 0, len = 0;
    char list[640] = "", nb[32];
    for (size_t j = 0; j < ws->n; j++) {
        if (ws->datum[uf_find(ws->parent, j)])
            continue;
        if (count < MAX_NAMED)
            append(list, sizeof list, &len, "%s%s", count ? ", " : "", unknown_name(pb, j, nb, sizeof nb));
        count++;
    }
    if (count == 0)
        return HYP_OK;
    if (count > MAX_NAMED)
        append(list, sizeof list, &len, " and %zu more", count - MAX_NAMED);
    return hyp_error_set(err, HYP_ERR_NODATA, "adjustment: %zu of %zu unknowns are not determined: no observation "
                         "ties them to a control mark (their block of the network has no datum): %s", count,
                         ws->n, list);
}

/* ---- normal equations ---- */

/* N = A^T P A (upper triangle, column-major) and A^T P l from the sparse
 * rows of the used observations, p_i = 1 / sigma_i^2: the weighted normal
 * equations N x = A^T P l (Ghilani & Wolf, Adjustment Computations, 4th
 * ed., least squares in matrix form), without forming A. Terms naming one
 * unknown twice add up: on the diagonal every ordered pair of terms
 * counts, above it each unordered pair once. */
static void build_normal(const hyp__adj_problem *pb, const unsigned char *flag, work *ws)
{
    size_t n = ws->n;
    memset(ws->nmat, 0, n * n * sizeof *ws->nmat);
    memset(ws->rhs, 0, n * sizeof *ws->rhs);
    for (size_t i = 0; i < pb->n_obs; i++) {
        if (!(flag[i] & HYP_ADJ_USED))
            continue;
        const hyp__adj_obs *o = &pb->obs[i];
        double p = 1.0 / (o->sigma * o->sigma);
        for (size_t a = 0; a < o->n_terms; a++) {
            size_t ja = o->terms[a].unknown;
            double pca = p * o->terms[a].coef;
            ws->rhs[ja] += pca * o->value;
            for (size_t b = 0; b < o->n_terms; b++) {
                size_t jb = o->terms[b].unknown;
                if (ja <= jb)
                    ws->nmat[jb * n + ja] += pca * o->terms[b].coef;
            }
        }
    }
}

/* Scales N to unit diagonal, D N D with D = diag(1 / sqrt(N_jj)) (Jacobi
 * or diagonal scaling of a symmetric positive definite system: Golub & Van
 * Loan, Matrix Computations, the section on scaling), so that a control
 * mark with a tiny sigma or unknowns in different units do not spoil the
 * condition; returns the 1-norm of the scaled matrix for dpocon, 0 when a
 * diagonal element is not positive. */
static double scale_normal(work *ws)
{
    size_t n = ws->n;
    for (size_t j = 0; j < n; j++) {
        double d = ws->nmat[j * n + j];
        if (!(d > 0))
            return 0;
        ws->scale[j] = 1.0 / sqrt(d);
    }
    double norm1 = 0;
    for (size_t k = 0; k < n; k++) {
        ws->rhs[k] *= ws->scale[k];
        for (size_t j = 0; j <= k; j++)
            ws->nmat[k * n + j] *= ws->scale[j] * ws->scale[k];
    }
    for (size_t k = 0; k < n; k++) {   /* column sums of the symmetric matrix */
        double s = 0;
        for (size_t j = 0; j < n; j++)
            s += fabs(j <= k ? ws->nmat[k * n + j] : ws->nmat[j * n + k]);
        norm1 = s > norm1 ? s : norm1;
    }
    return norm1;
}

static hyp_status singular(const hyp__adj_problem *pb, size_t j, hyp_error *err)
{
    char nb[32];
    return hyp_error_set(err, HYP_ERR_NODATA, "adjustment: the normal equations are singular at unknown %s: the "
                         "observations do not determine it apart from the unknowns before it (for example an "
                         "offset that only ever appears with the same height)", unknown_name(pb, j, nb, sizeof nb));
}

/* Cholesky factor of the scaled N (dpotrf), its condition (dpocon) and
 * the solution x = D y of (D N D) y = D A^T P l (dpotrs). */
static hyp_status factor_solve(const hyp__adj_problem *pb, const hyp__adj_opts *opts, work *ws,
                               hyp__adj_result *res, hyp_error *err)
{
    lapack_int n = (lapack_int)ws->n;
    double anorm = scale_normal(ws), rcond = 0;
    if (anorm == 0) {
        for (size_t j = 0; j < ws->n; j++)
            if (!(ws->nmat[j * ws->n + j] > 0))
                return singular(pb, j, err);
    }
    lapack_int info = LAPACKE_dpotrf(LAPACK_COL_MAJOR, 'U', n, ws->nmat, n);
    if (info > 0)
        return singular(pb, (size_t)info - 1, err);
    if (info == 0)
        info = LAPACKE_dpocon_work(LAPACK_COL_MAJOR, 'U', n, ws->nmat, n, anorm, &rcond, ws->pocon, ws->ipocon);
    if (info == 0 && rcond < opts->min_rcond)
        return hyp_error_set(err, HYP_ERR_NODATA, "adjustment: the normal equations are numerically singular "
                             "(reciprocal condition number %.1e after scaling, below %.1e): some unknowns are "
                             "nearly undetermined", rcond, opts->min_rcond);
    if (info == 0)
        info = LAPACKE_dpotrs(LAPACK_COL_MAJOR, 'U', n, 1, ws->nmat, n, ws->rhs, n);
    if (info != 0)
        return hyp_error_set(err, HYP_ERR_INTERNAL, "adjustment: LAPACK failed (info %d)", (int)info);
    for (size_t j = 0; j < ws->n; j++)
        res->x[j] = ws->rhs[j] * ws->scale[j];
    res->rcond = rcond;
    return HYP_OK;
}

/* Qxx = N^-1 = D (D N D)^-1 D from the Cholesky factor (dpotri): only the
 * upper triangle is formed and read. */
static hyp_status invert(work *ws, hyp_error *err)
{
    lapack_int n = (lapack_int)ws->n;
    lapack_int info = LAPACKE_dpotri(LAPACK_COL_MAJOR, 'U', n, ws->nmat, n);
    if (info != 0)
        return hyp_error_set(err, HYP_ERR_INTERNAL, "adjustment: LAPACK dpotri failed (info %d)", (int)info);
    return HYP_OK;
}

static double qxx(const work *ws, size_t j, size_t k)
{
    size_t lo = j < k ? j : k, hi = j < k ? k : j;
    return ws->nmat[hi * ws->n + lo] * ws->scale[lo] * ws->scale[hi];
}

/* ---- statistics of one adjustment ---- */

/* Residual v = a . x - l and a Qxx a^T, the a-priori variance of the
 * adjusted observation a . x by the law of propagation of variances
 * (Ghilani & Wolf: Q_ll^ = A Qxx A^T). */
static void row_stats(const hyp__adj_obs *o, const work *ws, const double *x, double *v, double *q)
{
    double ax = 0, aqa = 0;
    for (size_t a = 0; a < o->n_terms; a++) {
        size_t ja = o->terms[a].unknown;
        ax += o->terms[a].coef * x[ja];
        for (size_t b = 0; b < o->n_terms; b++)
            aqa += o->terms[a].coef * o->terms[b].coef * qxx(ws, ja, o->terms[b].unknown);
    }
    *v = ax - o->value;
    *q = aqa;
}

/* Redundancy r_i = 1 - p_i a_i Qxx a_i^T, the diagonal of Qvv P with
 * Qvv = P^-1 - A Qxx A^T (Caspary, Concepts of Network and Deformation
 * Analysis; sum r_i = dof), and Baarda's standardized residual
 * w_i = v_i / (sigma_i sqrt(r_i)) (Baarda 1968), N(0, 1) without a blunder.
 * r_i ~ 0: nothing else checks this observation; it has no w. */
static void obs_stats(const hyp__adj_problem *pb, const hyp__adj_opts *opts, const work *ws, hyp__adj_result *res)
{
    res->vtpv = 0;
    res->n_used = 0;
    res->w_max = res->w_max_free = NAN;
    for (size_t i = 0; i < pb->n_obs; i++) {
        const hyp__adj_obs *o = &pb->obs[i];
        double q;
        row_stats(o, ws, res->x, &res->v[i], &q);
        res->sigma_adj[i] = sqrt(q > 0 ? q : 0);
        res->r[i] = res->w[i] = NAN;
        res->flag[i] &= (unsigned char)~(HYP_ADJ_UNCONTROLLED | HYP_ADJ_OUTLIER);
        if (!(res->flag[i] & HYP_ADJ_USED))
            continue;
        double r = 1.0 - q / (o->sigma * o->sigma);
        r = r < 0 ? 0 : r > 1 ? 1 : r;
        res->r[i] = r;
        res->n_used++;
        res->vtpv += (res->v[i] / o->sigma) * (res->v[i] / o->sigma);
        if (r < opts->r_min) {
            res->flag[i] |= HYP_ADJ_UNCONTROLLED;
            continue;
        }
        res->w[i] = res->v[i] / (o->sigma * sqrt(r));
        if (fabs(res->w[i]) > res->w_crit)
            res->flag[i] |= HYP_ADJ_OUTLIER;
        if (!(fabs(res->w[i]) <= res->w_max)) {
            res->w_max = fabs(res->w[i]);
            res->w_max_obs = i;
        }
        if (!(opts->keep && opts->keep[i]) && !(fabs(res->w[i]) <= res->w_max_free)) {
            res->w_max_free = fabs(res->w[i]);
            res->w_max_free_obs = i;
        }
    }
}

/* Global test of the variance factor: v^T P v ~ chi-square(dof) when the
 * model and the a-priori sigmas are right; two-sided at alpha, the bounds
 * are the alpha/2 and 1 - alpha/2 quantiles (Ghilani & Wolf, the chi-square
 * test of the reference variance; Caspary, the global test). */
static void global_test(hyp__adj_result *res)
{
    res->s0_sq = res->chi2_lower = res->chi2_upper = res->s0_sq_lower = res->s0_sq_upper = NAN;
    res->global = HYP_ADJ_GLOBAL_NONE;
    if (res->dof == 0)
        return;
    double dof = (double)res->dof;
    res->s0_sq = res->vtpv / dof;
    res->chi2_lower = hyp__chi2_quantile(res->alpha_global / 2, dof);
    res->chi2_upper = hyp__chi2_quantile(1.0 - res->alpha_global / 2, dof);
    res->s0_sq_lower = res->chi2_lower / dof;
    res->s0_sq_upper = res->chi2_upper / dof;
    if (!(res->chi2_lower >= 0) || !(res->chi2_upper > 0))
        return;
    res->global = res->vtpv < res->chi2_lower ? HYP_ADJ_GLOBAL_LOW
                : res->vtpv > res->chi2_upper ? HYP_ADJ_GLOBAL_HIGH : HYP_ADJ_GLOBAL_PASS;
}

static void unknown_sigmas(const work *ws, hyp__adj_result *res)
{
    for (size_t j = 0; j < ws->n; j++) {
        double q = qxx(ws, j, j);
        res->sigma_x_prior[j] = sqrt(q);
        res->sigma_x[j] = res->dof ? sqrt(res->s0_sq * q) : NAN;
    }
}

/* Everything that follows from x and Qxx. */
static void statistics(const hyp__adj_problem *pb, const hyp__adj_opts *opts, const work *ws,
                       hyp__adj_result *res)
{
    obs_stats(pb, opts, ws, res);
    res->dof = res->n_used - ws->n;
    global_test(res);
    unknown_sigmas(ws, res);
}

/* One adjustment from scratch with the observations flagged HYP_ADJ_USED
 * (the caller counts it in n_adjustments). */
static hyp_status adjust_once(const hyp__adj_problem *pb, const hyp__adj_opts *opts, work *ws,
                              hyp__adj_result *res, hyp_error *err)
{
    hyp_status st = check_datum(pb, res->flag, ws, err);
    if (st)
        return st;
    size_t used = 0;
    for (size_t i = 0; i < pb->n_obs; i++)
        used += (res->flag[i] & HYP_ADJ_USED) != 0;
    if (used < ws->n)
        return hyp_error_set(err, HYP_ERR_NODATA, "adjustment: %zu observations for %zu unknowns: expected at "
                             "least as many observations as unknowns", used, ws->n);
    build_normal(pb, res->flag, ws);
    st = factor_solve(pb, opts, ws, res, err);
    if (!st)
        st = invert(ws, err);
    if (st)
        return st;
    statistics(pb, opts, ws, res);
    return HYP_OK;
}

/* ---- data snooping ---- */

/* Below this redundancy a rejection is re-adjusted from scratch rather than
 * downdated: the downdate divides by r_i, and 1 / r_i amplifies rounding. */
#define R_DOWNDATE_MIN 1e-3

/* Takes observation i (redundancy r_i > 0) out of a solved adjustment
 * without a new factorization, by the Sherman-Morrison formula for
 * N' = N - p a^T a (J. Sherman and W. J. Morrison, "Adjustment of an
 * inverse matrix corresponding to a change in one element of a given
 * matrix", Ann. Math. Statist. 21, 1950): with g = p Qxx a^T,
 * Qxx' = Qxx + g g^T / (p r_i) and x' = x + g v_i / r_i; O(n^2) instead
 * of O(n^3). g lives in ws->rhs, free once x is solved. */
static void downdate(const hyp__adj_problem *pb, work *ws, hyp__adj_result *res, size_t i)
{
    const hyp__adj_obs *o = &pb->obs[i];
    size_t n = ws->n;
    double p = 1.0 / (o->sigma * o->sigma), r = res->r[i], v = res->v[i], *g = ws->rhs;
    for (size_t j = 0; j < n; j++) {
        double s = 0;
        for (size_t t = 0; t < o->n_terms; t++)
            s += o->terms[t].coef * qxx(ws, j, o->terms[t].unknown);
        g[j] = p * s;
    }
    for (size_t j = 0; j < n; j++)
        res->x[j] += g[j] * v / r;
    for (size_t k = 0; k < n; k++) {   /* the stored matrix is the scaled inverse */
        double gk = g[k] / ws->scale[k] / (p * r);
        for (size_t j = 0; j <= k; j++)
            ws->nmat[k * n + j] += g[j] / ws->scale[j] * gk;
    }
}

static hyp_status push_rejection(hyp__adj_result *res, size_t i, size_t *alloc)
{
    if (res->n_rejections == *alloc) {   /* grows by doubling, never past n_obs */
        size_t n = *alloc ? 2 * *alloc : 8;
        n = n > res->n_obs ? res->n_obs : n;
        hyp__adj_rejection *p = realloc(res->rejections, n * sizeof *p);
        if (!p)
            return HYP_ERR_NOMEM;
        res->rejections = p;
        *alloc = n;
    }
    hyp__adj_rejection *rj = &res->rejections[res->n_rejections++];
    rj->obs = i;
    rj->iteration = res->n_adjustments;
    rj->w = res->w[i];
    rj->v = res->v[i];
    return HYP_OK;
}

/* The correlation of the w-tests of observations i and j (both used and
 * controlled): rho_ij = Qvv_ij / sqrt(Qvv_ii Qvv_jj), with Qvv = P^-1 -
 * A Qxx A^T (uncorrelated observations: Qvv_ij = -a_i Qxx a_j^T for i != j,
 * Qvv_ii = sigma_i^2 r_i). |rho| near 1: a blunder in either moves both w
 * alike, so the larger |w| does not say which is wrong (Foerstner 1983,
 * "Reliability and discernability of extended Gauss-Markov models";
 * Caspary, Concepts of Network and Deformation Analysis, the correlation
 * of test statistics). In a single loop every pair has |rho| = 1. */
static double w_correlation(const hyp__adj_problem *pb, const work *ws, const hyp__adj_result *res, size_t i,
                            size_t j)
{
    const hyp__adj_obs *oi = &pb->obs[i], *oj = &pb->obs[j];
    double aqa = 0;
    for (size_t a = 0; a < oi->n_terms; a++)
        for (size_t b = 0; b < oj->n_terms; b++)
            aqa += oi->terms[a].coef * oj->terms[b].coef * qxx(ws, oi->terms[a].unknown, oj->terms[b].unknown);
    double d = oi->sigma * oj->sigma * sqrt(res->r[i] * res->r[j]);
    return d > 0 ? -aqa / d : 0.0;
}

/* With opts->rho_inseparable: the used, controlled observation whose
 * w-test correlates most with candidate i's beyond the bound, recorded in
 * res; 1 when there is one. */
static int inseparable(const hyp__adj_problem *pb, const hyp__adj_opts *opts, const work *ws,
                       hyp__adj_result *res, size_t i)
{
    if (!(opts->rho_inseparable > 0))
        return 0;
    double best = 0;
    for (size_t j = 0; j < pb->n_obs; j++) {
        if (j == i || !(res->flag[j] & HYP_ADJ_USED) || res->w[j] != res->w[j])
            continue;
        double rho = w_correlation(pb, ws, res, i, j);
        if (fabs(rho) >= opts->rho_inseparable && fabs(rho) > fabs(best)) {
            best = rho;
            res->insep_obs = j;
        }
    }
    res->insep_rho = best;
    return best != 0;
}

/* Why snooping stops before rejecting the observation with the largest |w|
 * (among those it may reject), or HYP_ADJ_SNOOP_OFF to go on. */
static hyp__adj_snoop_stop snoop_stop_reason(const hyp__adj_opts *opts, const hyp__adj_result *res)
{
    if (!(res->w_max_free > res->w_crit))
        return HYP_ADJ_SNOOP_CLEAN;
    if (opts->stop_at_kept && opts->keep && res->w_max_obs != SIZE_MAX && opts->keep[res->w_max_obs] &&
        res->w_max > res->w_max_free)
        return HYP_ADJ_SNOOP_MODEL;
    if (opts->max_reject && res->n_rejections >= opts->max_reject)
        return HYP_ADJ_SNOOP_LIMIT;
    if (res->dof <= 1)
        return HYP_ADJ_SNOOP_DOF;
    return HYP_ADJ_SNOOP_OFF;
}

static void set_used(hyp__adj_result *res, size_t i, int used)
{
    res->flag[i] = (unsigned char)(used ? (res->flag[i] & ~HYP_ADJ_REJECTED) | HYP_ADJ_USED
                                        : (res->flag[i] & ~HYP_ADJ_USED) | HYP_ADJ_REJECTED);
}

/* Re-adjusts from scratch without observation i; when that network is
 * singular, puts i back, re-adjusts with it and reports the stop.
 * HYP_ERR_NODATA only when even that fails. */
static hyp_status reject_exact(const hyp__adj_problem *pb, const hyp__adj_opts *opts, work *ws,
                               hyp__adj_result *res, size_t i, hyp_error *err)
{
    hyp_error scratch;
    hyp_status st = adjust_once(pb, opts, ws, res, &scratch);
    if (st == HYP_ERR_NODATA) {
        res->n_rejections--;
        set_used(res, i, 1);
        st = adjust_once(pb, opts, ws, res, err);
        res->snoop_stop = HYP_ADJ_SNOOP_SINGULAR;
    } else if (st) {
        hyp_error_set(err, st, "%s", scratch.message);
    }
    if (!st)
        res->n_adjustments++;
    return st;
}

/* One pass of Baarda's data snooping: reject the observation with the
 * largest |w| above the critical value (never one opts->keep marks: a model's
 * prior is not a candidate blunder), re-adjust, repeat (Baarda 1968;
 * Caspary). Rejecting an observation with r_i > 0 cannot make N singular
 * in exact arithmetic (N - p a^T a is singular only when p a Qxx a^T = 1,
 * i.e. r_i = 0). With `fast` the re-adjustments are downdates, and when no
 * rejection is left the set reached is adjusted once more from scratch
 * (fresh numbers, the condition checked; snooping goes on should they
 * differ); HYP_ERR_NODATA from there means: redo without `fast`. */
static hyp_status snoop_pass(const hyp__adj_problem *pb, const hyp__adj_opts *opts, work *ws,
                             hyp__adj_result *res, int fast, size_t *alloc, hyp_error *err)
{
    int stale = 0;
    for (;;) {
        res->snoop_stop = snoop_stop_reason(opts, res);
        if (res->snoop_stop != HYP_ADJ_SNOOP_OFF && !stale)
            return HYP_OK;
        if (res->snoop_stop != HYP_ADJ_SNOOP_OFF) {
            hyp_error scratch;
            hyp_status st = adjust_once(pb, opts, ws, res, &scratch);
            if (st)
                return st == HYP_ERR_NODATA ? st : hyp_error_set(err, st, "%s", scratch.message);
            stale = 0;
            continue;
        }
        size_t i = res->w_max_free_obs;
        if (inseparable(pb, opts, ws, res, i)) {
            res->snoop_stop = HYP_ADJ_SNOOP_INSEPARABLE;
            if (!stale)
                return HYP_OK;
            hyp_error scratch;   /* fresh numbers for the set reached, as above */
            hyp_status st = adjust_once(pb, opts, ws, res, &scratch);
            if (st)
                return st == HYP_ERR_NODATA ? st : hyp_error_set(err, st, "%s", scratch.message);
            stale = 0;
            continue;
        }
        if (push_rejection(res, i, alloc))
            return hyp_error_set(err, HYP_ERR_NOMEM, "adjustment: out of memory recording a rejection");
        set_used(res, i, 0);
        if (fast && res->r[i] >= R_DOWNDATE_MIN) {
            downdate(pb, ws, res, i);
            statistics(pb, opts, ws, res);
            res->n_adjustments++;
            stale = 1;
            continue;
        }
        hyp_status st = reject_exact(pb, opts, ws, res, i, err);
        if (st || res->snoop_stop == HYP_ADJ_SNOOP_SINGULAR)
            return st;
        stale = 0;
    }
}

/* Snooping by downdates; should the final fresh adjustment find the
 * network singular, snooping is redone from the start with a fresh
 * adjustment after every rejection. */
static hyp_status snoop(const hyp__adj_problem *pb, const hyp__adj_opts *opts, work *ws, hyp__adj_result *res,
                        hyp_error *err)
{
    size_t alloc = 0;
    hyp_status st = snoop_pass(pb, opts, ws, res, 1, &alloc, err);
    if (st != HYP_ERR_NODATA)
        return st;
    hyp_error_clear(err);
    for (size_t i = 0; i < pb->n_obs; i++)
        res->flag[i] = pb->obs[i].active ? HYP_ADJ_USED : 0;
    res->n_rejections = 0;
    res->n_adjustments = 0;
    st = adjust_once(pb, opts, ws, res, err);
    if (st)
        return st;
    res->n_adjustments = 1;
    return snoop_pass(pb, opts, ws, res, 0, &alloc, err);
}

hyp_status hyp__adj_solve(const hyp__adj_problem *pb, const hyp__adj_opts *opts, hyp__adj_result *res,
                          hyp_error *err)
{
    hyp__adj_opts def;
    if (!opts) {
        hyp__adj_opts_default(&def);
        opts = &def;
    }
    work ws;
    memset(&ws, 0, sizeof ws);
    hyp_status st = check_opts(opts, err);
    if (!st)
        st = check_problem(pb, err);
    if (!st)
        st = work_alloc(&ws, pb->n_unknowns, opts->max_work_bytes, err);
    if (!st && result_alloc(res, pb->n_unknowns, pb->n_obs))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "adjustment: out of memory for %zu observations", pb->n_obs);
    if (st)
        goto out;
    res->alpha_global = opts->alpha_global;
    res->w_crit = hyp__normal_quantile(1.0 - opts->alpha_w / 2);   /* two-sided */
    res->insep_obs = SIZE_MAX;
    res->insep_rho = 0;
    for (size_t i = 0; i < pb->n_obs; i++)
        res->flag[i] = pb->obs[i].active ? HYP_ADJ_USED : 0;
    st = adjust_once(pb, opts, &ws, res, err);
    res->n_adjustments = 1;
    if (!st && opts->snoop)
        st = snoop(pb, opts, &ws, res, err);
out:
    work_free(&ws);
    if (st)
        hyp__adj_result_free(res);
    return st;
}
