/* report_calib.c - the figures of a rover's HTML report about its
 * calibration and error model: the offset (drift) model with the
 * calibrations, the ties' misclosures and residuals, and the error budget
 * along the track. */
#include "report_html.h"
#include "svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define BUDGET_BINS 100      /* bars along the track */
#define BUDGET_SAMPLES 64    /* points evaluated per bar at most */

static double mid_time(const hyp_calib *c)
{
    return 0.5 * (c->start_s + c->end_s);
}

/* A calibration's offset uncertainty, Pa (1 sigma): the standard error of
 * its mean height and the known height's sigma, through dh/dp there. */
static double calib_offset_sigma_pa(const hyp_calib *c)
{
    double s = fabs(c->sens_m_per_pa);
    return s > 0 ? sqrt(c->se_m * c->se_m + c->known_sigma_m * c->known_sigma_m) / s : NAN;
}

/* offset(t) of the model: linear between knots, constant beyond them
 * (the definition of hyp_drift in correct.h), sampled at the span's ends
 * and every knot. */
static size_t model_points(const hyp_drift *d, double t0, double t1, double *x, double *y)
{
    size_t n = 0;
    x[n] = fmin(t0, d->knot_s[0]), y[n++] = d->knot_pa[0] / 100.0;
    for (size_t j = 0; j < d->n_knots; j++)
        x[n] = d->knot_s[j], y[n++] = d->knot_pa[j] / 100.0;
    x[n] = fmax(t1, d->knot_s[d->n_knots - 1]), y[n++] = d->knot_pa[d->n_knots - 1] / 100.0;
    return n;
}

/* The GNSS levelling a + b (t - t0) in m with its +-2 sigma from the
 * covariance of a and b (var = caa + 2 dt cab + dt^2 cbb, the variance of
 * a linear combination). */
static hyp_status gnss_figure(hyp__page *p, const hyp_rover_run *r, double t0, double t1, hyp_error *err)
{
    const hyp_drift *d = &r->result.drift;
    enum { N = 64 };
    double x[N], y[N], lo[N], hi[N];
    for (int k = 0; k < N; k++) {
        double t = t0 + (t1 - t0) * k / (N - 1), dt = t - d->gnss_t0_s;
        double v = d->gnss_cov[0] + 2 * dt * d->gnss_cov[1] + dt * dt * d->gnss_cov[3];
        x[k] = t, y[k] = d->gnss_a_m + d->gnss_b_m_per_s * dt;
        lo[k] = y[k] - 2 * sqrt(fmax(v, 0)), hi[k] = y[k] + 2 * sqrt(fmax(v, 0));
    }
    double ylo, yhi, dummy;
    hyp__svg_range(lo, N, &ylo, &dummy);
    hyp__svg_range(hi, N, &dummy, &yhi);
    hyp__svg_spec spec = {
        .id = "offset-model", .title = "Levelling on the track's GNSS heights",
        .width_px = HYP__FIG_W, .height_px = 320,
        .x = {.title = "time [UTC]", .lo = t0, .hi = t1, .time_utc = 1, .ticks = 8},
        .y = {.title = "correction added to the heights [m]", .lo = ylo, .hi = yhi},
    };
    hyp__svg f;
    hyp__page_figure(p);
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st) {
        hyp__svg_band(&f, x, lo, hi, N, 0, "+-2 sigma of the fit");
        hyp__svg_style s = hyp__svg_style_nth(0, "a + b (t - t0)");
        hyp__svg_line(&f, x, y, N, &s);
        st = hyp__svg_end(&f);
    }
    if (!st)
        hyp__page_figure_end(p, "No calibration and no given offset: the heights were levelled on the track's own GNSS "
                                "heights by a robust straight-line fit over %z samples (about %.0f independent ones: GNSS "
                                "errors are correlated for minutes). The band is the fit's &#177;2 sigma; a GNSS bias "
                                "of %.2f m that no averaging removes comes on top of it.",
                             d->gnss_n, d->gnss_neff, d->gnss_floor_m);
    return st;
}

static void offset_marks(hyp__svg *f, const hyp_rover_run *r)
{
    const hyp_correct_result *res = &r->result;
    const hyp_drift *d = &res->drift;
    double kx[HYP_MAX_KNOTS], ky[HYP_MAX_KNOTS], ke[HYP_MAX_KNOTS];
    for (size_t j = 0; j < d->n_knots; j++)
        kx[j] = d->knot_s[j], ky[j] = d->knot_pa[j] / 100.0, ke[j] = 2.0 * sqrt(fmax(d->cov[j * d->p + j], 0)) / 100.0;
    hyp__svg_style ks = hyp__svg_style_nth(0, "knot, +-2 sigma");
    ks.marker = HYP__SVG_SQUARE;
    if (d->kind != HYP_DRIFT_EXPLICIT)
        hyp__svg_markers(f, kx, ky, ke, d->n_knots, &ks);
    for (size_t k = 0; k < res->n_calibs; k++) {
        const hyp_calib *c = &res->calibs[k];
        double x = mid_time(c), y = c->offset_pa / 100.0, e = 2.0 * calib_offset_sigma_pa(c) / 100.0;
        int base = c->kind == HYP_CAL_BASE, kind = c->rejected ? 2 : base;
        hyp__svg_style cs = hyp__svg_style_nth(c->rejected ? 6 : base ? 1 : 2, NULL);
        cs.marker = c->rejected ? HYP__SVG_CROSS : base ? HYP__SVG_CIRCLE : HYP__SVG_TRIANGLE;
        cs.label = c->rejected ? "rejected by the calibration test" : base ? "co-location with the base, +-2 sigma"
                                                                         : "tie to a benchmark, +-2 sigma";
        for (size_t j = 0; j < k; j++) {   /* one legend entry a kind */
            const hyp_calib *o = &res->calibs[j];
            if ((o->rejected ? 2 : o->kind == HYP_CAL_BASE) == kind)
                cs.label = NULL;
        }
        hyp__svg_markers(f, &x, &y, &e, 1, &cs);
    }
}

static hyp_status pa_model_figure(hyp__page *p, const hyp_rover_run *r, double t0, double t1, hyp_error *err)
{
    const hyp_correct_result *res = &r->result;
    const hyp_drift *d = &res->drift;
    double mx[HYP_MAX_KNOTS + 2], my[HYP_MAX_KNOTS + 2];
    size_t nm = model_points(d, t0, t1, mx, my);
    double lo = INFINITY, hi = -INFINITY, xlo = mx[0], xhi = mx[nm - 1];
    for (size_t j = 0; j < d->n_knots; j++) {
        double e = 2.0 * sqrt(fmax(d->cov[j * d->p + j], 0)) / 100.0;
        lo = fmin(lo, my[j + 1] - e), hi = fmax(hi, my[j + 1] + e);
    }
    for (size_t k = 0; k < res->n_calibs; k++) {
        const hyp_calib *c = &res->calibs[k];
        double y = c->offset_pa / 100.0, e = 2.0 * calib_offset_sigma_pa(c) / 100.0;
        if (isfinite(y))
            lo = fmin(lo, y - (isfinite(e) ? e : 0)), hi = fmax(hi, y + (isfinite(e) ? e : 0));
        xlo = fmin(xlo, mid_time(c)), xhi = fmax(xhi, mid_time(c));
    }
    hyp__svg_spec spec = {
        .id = "offset-model", .title = "Rover offset model",
        .width_px = HYP__FIG_W, .height_px = 320,
        .x = {.title = "time [UTC]", .lo = xlo, .hi = xhi, .time_utc = 1, .ticks = 8},
        .y = {.title = "rover minus base offset [hPa]", .lo = lo, .hi = hi},
    };
    hyp__svg f;
    hyp__page_figure(p);
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st) {
        hyp__svg_style s = hyp__svg_style_nth(0, "offset model");
        hyp__svg_line(&f, mx, my, nm, &s);
        offset_marks(&f, r);
        st = hyp__svg_end(&f);
    }
    if (!st && d->kind == HYP_DRIFT_EXPLICIT)
        hyp__page_figure_end(p, "The offset given on the command line (%+.3f hPa), constant; calibrations found are shown "
                                "for comparison, with &#177;2 sigma from their mean height's standard error and the known "
                                "height's sigma.",
                             d->knot_pa[0] / 100.0);
    else if (!st)
        hyp__page_figure_end(p, "The offset the rover reads above the base, as fitted: linear between the knots (squares, "
                                "&#177;2 sigma from the fit's covariance), constant before the first and after the last. "
                                "Circles and triangles are the calibrations it was fitted to, at their mid time, "
                                "&#177;2 sigma from their mean height's standard error and the known height's sigma "
                                "through the sensitivity dh/dp there; crosses, any the calibration test rejected.");
    return st;
}

hyp_status hyp__fig_offset(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    const hyp_drift *d = &r->result.drift;
    double t0, t1;
    hyp__rover_span(r->rover, &t0, &t1);
    if (d->kind == HYP_DRIFT_GNSS && t1 > t0)
        return gnss_figure(p, r, t0, t1, err);
    if (d->kind == HYP_DRIFT_NONE || !d->n_knots || !(t1 >= t0)) {
        hyp__page_out(p, "<p class=\"note\">No offset model: the rover was not calibrated against the base, so the "
                         "offset is taken as 0 with the uncertainty of two uncalibrated barometers.</p>\n");
        return HYP_OK;
    }
    return pa_model_figure(p, r, t0, t1, err);
}

/* ---- ties ------------------------------------------------------------ */

hyp_status hyp__fig_ties(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    const hyp_correct_result *res = &r->result;
    size_t n = res->n_calibs;
    if (!n) {
        hyp__page_out(p, "<p class=\"note\">No ties or co-locations: nothing closes the heights on a known value.</p>\n");
        return HYP_OK;
    }
    double *x = malloc(n * sizeof *x), *mis = malloc(n * sizeof *mis), *res_m = malloc(n * sizeof *res_m),
           *e = malloc(n * sizeof *e);
    hyp_status st = !x || !mis || !res_m || !e ? hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: out of memory") : HYP_OK;
    double lo = 0, hi = 0, xlo = INFINITY, xhi = -INFINITY;
    for (size_t k = 0; !st && k < n; k++) {
        const hyp_calib *c = &res->calibs[k];
        x[k] = mid_time(c), mis[k] = c->misclosure_m, res_m[k] = c->residual_m;
        e[k] = 2.0 * sqrt(c->se_m * c->se_m + c->known_sigma_m * c->known_sigma_m);
        if (isfinite(mis[k]))
            lo = fmin(lo, mis[k] - (isfinite(e[k]) ? e[k] : 0)), hi = fmax(hi, mis[k] + (isfinite(e[k]) ? e[k] : 0));
        if (isfinite(res_m[k]))
            lo = fmin(lo, res_m[k]), hi = fmax(hi, res_m[k]);
        xlo = fmin(xlo, x[k]), xhi = fmax(xhi, x[k]);
    }
    hyp__svg_spec spec = {
        .id = "ties", .title = "Misclosures before and residuals after the fit",
        .width_px = HYP__FIG_W, .height_px = 320,
        .x = {.title = "time [UTC]", .lo = xlo - 600, .hi = xhi + 600, .time_utc = 1, .ticks = 8},
        .y = {.title = "height minus known height [m]", .lo = lo, .hi = hi},
    };
    hyp__svg f;
    if (!st) {
        hyp__page_figure(p);
        st = hyp__svg_begin(&f, &p->b, &spec, err);
    }
    if (!st) {
        double zx[2] = {f.x_lo, f.x_hi}, zy[2] = {0, 0};
        hyp__svg_style z = {.colour = 6, .dash = 0, .width_px = 0.8, .label = NULL};
        hyp__svg_line(&f, zx, zy, 2, &z);
        hyp__svg_style a = hyp__svg_style_nth(1, "misclosure (before), +-2 sigma"), b = hyp__svg_style_nth(0, "residual (after)");
        a.marker = HYP__SVG_CIRCLE, b.marker = HYP__SVG_SQUARE;
        hyp__svg_markers(&f, x, mis, e, n, &a);
        hyp__svg_markers(&f, x, res_m, NULL, n, &b);
        st = hyp__svg_end(&f);
    }
    if (!st)
        hyp__page_figure_end(p, "Each calibration's mean height with no offset applied minus its known height "
                                "(misclosure, circles; &#177;2 sigma from the mean's standard error and the known "
                                "height's sigma) and the corrected height minus the known height after the offset model "
                                "was fitted (residual, squares), at the calibration's mid time.");
    free(x), free(mis), free(res_m), free(e);
    return st;
}

/* ---- the error budget ------------------------------------------------ */

static const char *const part_names[HYP_B_COUNT] = {
    "sensor noise", "offset and drift model", "column temperature", "humidity",
    "base interpolation", "base clock", "horizontal gradient",
};

/* First and last accepted index of each time bin. */
static void bin_ranges(const hyp_series *s, double t0, double t1, size_t *first, size_t *last)
{
    for (int b = 0; b < BUDGET_BINS; b++)
        first[b] = SIZE_MAX, last[b] = 0;
    double scale = BUDGET_BINS / (t1 - t0);
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        double cd = floor((s->time_s[i] - t0) * scale);
        int b = cd < 0 ? 0 : cd >= BUDGET_BINS ? BUDGET_BINS - 1 : (int)cd;
        if (first[b] == SIZE_MAX)
            first[b] = i;
        last[b] = i;
    }
}

/* Bar b: the RMS 1-sigma of up to BUDGET_SAMPLES points spread evenly over
 * the bin, split in proportion to each component's mean variance. */
static int budget_bar(const hyp_rover_run *r, size_t a, size_t z, double *parts)
{
    double var[HYP_B_COUNT] = {0}, total = 0;
    size_t used = 0, span = z - a, m = span + 1 < BUDGET_SAMPLES ? span + 1 : BUDGET_SAMPLES;
    for (size_t j = 0; j < m; j++) {
        size_t i = a + (m > 1 ? j * span / (m - 1) : 0);
        hyp_point_detail d;
        if (hyp_correct_point(&r->result, i, &d) != HYP_OK)
            continue;
        for (int k = 0; k < HYP_B_COUNT; k++)
            var[k] += d.budget_m[k] * d.budget_m[k];
        used++;
    }
    if (!used)
        return 0;
    for (int k = 0; k < HYP_B_COUNT; k++)
        total += var[k] / (double)used;
    double rms = sqrt(total);
    for (int k = 0; k < HYP_B_COUNT; k++)
        parts[k] = total > 0 ? rms * (var[k] / (double)used) / total : 0;
    return 1;
}

hyp_status hyp__fig_budget(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    double t0, t1;
    hyp__rover_span(r->rover, &t0, &t1);
    if (!r->result.n_ok || !(t1 > t0)) {
        hyp__page_out(p, "<p class=\"note\">No error budget to draw: no corrected points over a time span.</p>\n");
        return HYP_OK;
    }
    size_t first[BUDGET_BINS], last[BUDGET_BINS], nb = 0;
    double x[BUDGET_BINS], v[BUDGET_BINS * HYP_B_COUNT], top = 0, w = (t1 - t0) / BUDGET_BINS;
    bin_ranges(r->rover, t0, t1, first, last);
    for (int b = 0; b < BUDGET_BINS; b++) {
        if (first[b] == SIZE_MAX || !budget_bar(r, first[b], last[b], v + nb * HYP_B_COUNT))
            continue;
        double sum = 0;
        for (int k = 0; k < HYP_B_COUNT; k++)
            sum += v[nb * HYP_B_COUNT + k];
        top = fmax(top, sum);
        x[nb++] = t0 + (b + 0.5) * w;
    }
    hyp__svg_spec spec = {
        .id = "budget", .title = "Error budget along the track",
        .width_px = HYP__FIG_W, .height_px = HYP__FIG_H,
        .x = {.title = "time [UTC]", .lo = t0, .hi = t1, .time_utc = 1, .ticks = 8},
        .y = {.title = "1 sigma [m]", .lo = 0, .hi = top > 0 ? top : 1},
    };
    hyp__svg f;
    hyp__page_figure(p);
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st) {
        hyp__svg_bars(&f, x, nb, v, HYP_B_COUNT, 0.9 * w, part_names);
        st = hyp__svg_end(&f);
    }
    if (!st)
        hyp__page_figure_end(p, "The track's time cut into %d equal bins; in each, up to %d corrected points spread evenly "
                                "over the bin are evaluated in full (hyp_correct_point). A bar's height is the root mean "
                                "square 1-sigma of those points, m; its parts are the components' shares of their mean "
                                "variance (variances add, sigmas do not), so the largest part is the error that dominates "
                                "there. Bins with no corrected point are left empty.",
                             BUDGET_BINS, BUDGET_SAMPLES);
    return st;
}
