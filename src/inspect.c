/* inspect.c - quality checks of a pressure log. Thresholds are common
 * practice, no source, and options (docs/methods.md section 7). */
#include "hypsolev/inspect.h"
#include "stats.h"

#include <math.h>
#include <stdio.h>
#include "hypsolev/timeparse.h"
#include <stdlib.h>
#include <string.h>

const char *hyp_issue_kind_name(hyp_issue_kind k)
{
    static const char *n[HYP_ISSUE_KIND_COUNT] = {"gap", "spike", "step", "flat line", "clock jump", "rapid change"};
    return k < HYP_ISSUE_KIND_COUNT ? n[k] : "?";
}

void hyp_inspect_opts_init(hyp_inspect_opts *o)
{
    o->gap_factor = 5.0;
    o->min_gap_s = 60.0;
    o->spike_sigmas = 8.0;
    o->spike_min_pa = 30.0;
    o->step_min_pa = 30.0;
    o->flat_min_s = 600.0;
    o->rapid_pa_per_s = 100.0 / 3600.0;
}

void hyp_inspection_free(hyp_inspection *r)
{
    free(r->issues);
    memset(r, 0, sizeof *r);
}

static int add(hyp_inspection *r, hyp_issue_kind k, double t0, double t1, double size, unsigned line)
{
    if (r->n_issues >= 100000)
        return 0;   /* enough said */
    hyp_issue *p = realloc(r->issues, (r->n_issues + 1) * sizeof *p);
    if (!p)
        return -1;
    r->issues = p;
    r->issues[r->n_issues++] = (hyp_issue){k, t0, t1, size, line};
    r->n_kind[k]++;
    return 0;
}

/* Usable samples as plain arrays. */
typedef struct view { size_t n; double *t, *p; unsigned *line; } view;

static int cmpd(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double median_of(const double *v, size_t n, double *tmp)
{
    memcpy(tmp, v, n * sizeof *tmp);
    qsort(tmp, n, sizeof *tmp, cmpd);
    return n % 2 ? tmp[n / 2] : 0.5 * (tmp[n / 2 - 1] + tmp[n / 2]);
}

static void ranges(const hyp_series *s, hyp_inspection *r)
{
    r->p_min_pa = r->t_min_k = r->rh_min = INFINITY;
    r->p_max_pa = r->t_max_k = r->rh_max = -INFINITY;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        r->p_min_pa = fmin(r->p_min_pa, s->pressure_pa[i]);
        r->p_max_pa = fmax(r->p_max_pa, s->pressure_pa[i]);
        if (s->temp_k[i] == s->temp_k[i])
            r->t_min_k = fmin(r->t_min_k, s->temp_k[i]), r->t_max_k = fmax(r->t_max_k, s->temp_k[i]);
        if (s->rh_pct[i] == s->rh_pct[i])
            r->rh_min = fmin(r->rh_min, s->rh_pct[i]), r->rh_max = fmax(r->rh_max, s->rh_pct[i]);
    }
}

/* Spikes: a sample more than max(k sigma, min) from the median of its five
 * neighbours on each side, on both sides and the same way (a step's edge
 * matches one side), at most two in a row. */
static int spikes(const view *v, const hyp_inspect_opts *o, double sigma, hyp_inspection *r)
{
    double tmp[5];
    double thr = fmax(o->spike_sigmas * sigma, o->spike_min_pa);
    size_t run = 0;
    for (size_t i = 5; i + 5 < v->n; i++) {
        double dl = v->p[i] - median_of(v->p + i - 5, 5, tmp);
        double dr = v->p[i] - median_of(v->p + i + 1, 5, tmp);
        if (fabs(dl) > thr && fabs(dr) > thr && (dl > 0) == (dr > 0)) {
            double d = fabs(dl) < fabs(dr) ? dl : dr;
            if (++run <= 2 && add(r, HYP_ISSUE_SPIKE, v->t[i], v->t[i], d, v->line[i]))
                return -1;
        } else
            run = 0;
    }
    return 0;
}

/* Steps: the median of the next k samples against the previous k, less
 * what the local trend gives over the time between them; the trend is the
 * median rate of the same differences 2k to 4k samples either side (a step
 * there touches fewer than half of them). Reported at its largest. */
static int steps(const view *v, const hyp_inspect_opts *o, double sigma, hyp_inspection *r)
{
    const size_t k = 10;
    if (v->n < 10 * k)
        return 0;
    double *d = malloc(v->n * sizeof *d), *span = malloc(v->n * sizeof *span), a[10], b[10], tmp[10];
    double ref[4 * 10 + 2], tmp2[4 * 10 + 2];
    if (!d || !span) {
        free(d);
        free(span);
        return -1;
    }
    for (size_t i = k; i + k <= v->n; i++) {
        memcpy(a, v->p + i - k, k * sizeof *a);
        memcpy(b, v->p + i, k * sizeof *b);
        d[i] = median_of(b, k, tmp) - median_of(a, k, tmp);
        span[i] = 0.5 * (v->t[i] + v->t[i + k - 1]) - 0.5 * (v->t[i - k] + v->t[i - 1]);
    }
    double thr = fmax(10.0 * sigma, o->step_min_pa);
    int rc = 0;
    double prev = 0;
    for (size_t i = 5 * k; i + 5 * k <= v->n && !rc; i++) {
        size_t m = 0;
        for (size_t j = i - 4 * k; j <= i + 4 * k; j++)
            if (j + 2 * k <= i || j >= i + 2 * k)
                ref[m++] = d[j] / span[j];
        double rate = median_of(ref, m, tmp2);
        double e = d[i] - rate * span[i];
        if (fabs(e) > thr && fabs(e) >= fabs(prev)) {
            double en = d[i + 1] - rate * span[i + 1];
            if (fabs(e) >= fabs(en)) {
                rc = add(r, HYP_ISSUE_STEP, v->t[i - 1], v->t[i], e, v->line[i]);
                i += 2 * k;
                prev = 0;
                continue;
            }
        }
        prev = e;
    }
    free(d);
    free(span);
    return rc;
}

static int flats(const view *v, const hyp_inspect_opts *o, hyp_inspection *r)
{
    size_t i = 0;
    while (i < v->n) {
        size_t j = i;
        while (j + 1 < v->n && v->p[j + 1] == v->p[i])
            j++;
        if (v->t[j] - v->t[i] >= o->flat_min_s && add(r, HYP_ISSUE_FLAT, v->t[i], v->t[j], v->p[i], v->line[i]))
            return -1;
        i = j + 1;
    }
    return 0;
}

static int gaps_and_clock(const hyp_series *s, const view *v, const hyp_inspect_opts *o, hyp_inspection *r)
{
    double lim = fmax(o->gap_factor * r->interval_s, o->min_gap_s);
    for (size_t i = 1; i < v->n; i++)
        if (v->t[i] - v->t[i - 1] > lim && add(r, HYP_ISSUE_GAP, v->t[i - 1], v->t[i], v->t[i] - v->t[i - 1], v->line[i]))
            return -1;
    /* where the file's time went back, as the reader recorded it before
     * it put the samples in time order */
    size_t nb = s->n_time_back < HYP_TIME_BACK_KEEP ? s->n_time_back : HYP_TIME_BACK_KEEP;
    for (size_t k = 0; k < nb; k++) {
        const struct hyp_time_back *b = &s->time_back[k];
        if (add(r, HYP_ISSUE_CLOCK_JUMP, b->time_s, b->time_s, -b->back_s, b->line))
            return -1;
    }
    return 0;
}

/* Hourly tendency (least squares over +-30 min), rapid periods, and the
 * largest changes over 1 h and 3 h (the trend indicator of the field). */
static int tendency(const view *v, const hyp_inspect_opts *o, hyp_inspection *r)
{
    double mt = 0, mp = 0, sxy = 0, sxx = 0;
    for (size_t i = 0; i < v->n; i++)
        mt += v->t[i], mp += v->p[i];
    mt /= (double)v->n, mp /= (double)v->n;
    for (size_t i = 0; i < v->n; i++)
        sxy += (v->t[i] - mt) * (v->p[i] - mp), sxx += (v->t[i] - mt) * (v->t[i] - mt);
    r->trend_pa_per_s = sxx > 0 ? sxy / sxx : 0.0;
    size_t j1 = 0, j3 = 0;
    int in_rapid = 0;
    double rs = 0, rmax = 0;
    /* each end as the median of five samples, so a spike is no tendency */
    double *sm = malloc(v->n * sizeof *sm), tmp[5];
    if (!sm)
        return -1;
    for (size_t i = 0; i < v->n; i++)
        sm[i] = i >= 2 && i + 2 < v->n ? median_of(v->p + i - 2, 5, tmp) : v->p[i];
    for (size_t i = 0; i < v->n; i++) {
        while (j1 < v->n && v->t[j1] < v->t[i] + 3600.0)
            j1++;
        while (j3 < v->n && v->t[j3] < v->t[i] + 10800.0)
            j3++;
        if (j1 < v->n && fabs(sm[j1] - sm[i]) > fabs(r->max_change_1h_pa))
            r->max_change_1h_pa = sm[j1] - sm[i], r->max_change_1h_at_s = v->t[i];
        if (j3 < v->n && fabs(sm[j3] - sm[i]) > fabs(r->max_change_3h_pa))
            r->max_change_3h_pa = sm[j3] - sm[i], r->max_change_3h_at_s = v->t[i];
        double rate = j1 < v->n ? (sm[j1] - sm[i]) / (v->t[j1] - v->t[i]) : 0.0;
        if (fabs(rate) > o->rapid_pa_per_s) {
            if (!in_rapid)
                rs = v->t[i], rmax = 0, in_rapid = 1;
            rmax = fmax(rmax, fabs(rate));
        } else if (in_rapid) {
            in_rapid = 0;
            if (add(r, HYP_ISSUE_RAPID, rs, v->t[i] + 3600.0, rmax, v->line[i])) {
                free(sm);
                return -1;
            }
        }
    }
    free(sm);
    if (in_rapid && add(r, HYP_ISSUE_RAPID, rs, v->t[v->n - 1], rmax, v->line[v->n - 1]))
        return -1;
    return 0;
}

hyp_status hyp_inspect(const hyp_series *s, const hyp_inspect_opts *opts, hyp_inspection *r, hyp_error *err)
{
    hyp_inspect_opts dflt;
    if (!opts) {
        hyp_inspect_opts_init(&dflt);
        opts = &dflt;
    }
    memset(r, 0, sizeof *r);
    r->count = s->count;
    view v = {0};
    size_t n = s->count ? s->count : 1;
    v.t = malloc(n * sizeof *v.t);
    v.p = malloc(n * sizeof *v.p);
    v.line = malloc(n * sizeof *v.line);
    double *dt = malloc(n * sizeof *dt);
    hyp_status st = HYP_OK;
    if (!v.t || !v.p || !v.line || !dt) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    uint32_t line = 0;
    for (size_t i = 0; i < s->count; i++) {
        line = hyp_series_line_next(s, i, line);
        if (!s->flag[i]) {
            v.t[v.n] = s->time_s[i], v.p[v.n] = s->pressure_pa[i], v.line[v.n] = line;
            v.n++;
        }
    }
    r->usable = v.n;
    if (v.n < 3) {
        st = hyp_error_set(err, HYP_ERR_NODATA, "fewer than three usable samples");
        goto out;
    }
    r->t0_s = v.t[0], r->t1_s = v.t[v.n - 1];
    for (size_t i = 1; i < v.n; i++)
        dt[i - 1] = v.t[i] - v.t[i - 1];
    r->interval_s = hyp__median_inplace(dt, v.n - 1);
    ranges(s, r);
    double sigma;
    if (hyp__noise_second_diff(v.t, v.p, NULL, NULL, v.n, 1e12, &sigma)) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        goto out;
    }
    r->noise_pa = sigma == sigma ? fmax(sigma, 0.5) : 0.5;
    if (gaps_and_clock(s, &v, opts, r) || spikes(&v, opts, r->noise_pa, r) || steps(&v, opts, r->noise_pa, r) ||
        flats(&v, opts, r) || tendency(&v, opts, r))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
out:
    free(v.t);
    free(v.p);
    free(v.line);
    free(dt);
    if (st)
        hyp_inspection_free(r);
    return st;
}

void hyp_issue_format(const hyp_issue *is, char *buf, size_t n)
{
    char a[40], b[40];
    hyp_time_format(is->start_s, a, sizeof a);
    hyp_time_format(is->end_s, b, sizeof b);
    switch (is->kind) {
    case HYP_ISSUE_GAP:
        snprintf(buf, n, "gap          %s to %s (%.1f min without samples)", a, b, is->size / 60.0);
        return;
    case HYP_ISSUE_SPIKE:
        snprintf(buf, n, "spike        %s: %+.2f hPa off its neighbours", a, is->size / 100.0);
        return;
    case HYP_ISSUE_STEP:
        snprintf(buf, n, "step         %s: %+.2f hPa lasting jump", b, is->size / 100.0);
        return;
    case HYP_ISSUE_FLAT:
        snprintf(buf, n, "flat line    %s to %s at %.2f hPa (frozen sensor?)", a, b, is->size / 100.0);
        return;
    case HYP_ISSUE_CLOCK_JUMP:
        snprintf(buf, n, "clock jump   %s: time went back %.0f s", a, -is->size);
        return;
    case HYP_ISSUE_RAPID:
        snprintf(buf, n, "rapid change %s to %s, up to %.2f hPa/h", a, b, is->size * 36.0);
        return;
    case HYP_ISSUE_KIND_COUNT:
        break;
    }
    snprintf(buf, n, "unknown issue");
}

static void issue_line(FILE *f, const hyp_issue *is)
{
    char line[300];
    hyp_issue_format(is, line, sizeof line);
    if (is->kind == HYP_ISSUE_RAPID)
        fprintf(f, "    %s\n", line);
    else
        fprintf(f, "    %s, line %u\n", line, is->line);
}

void hyp_inspection_write(FILE *f, const char *path, hyp_unit unit, const hyp_inspection *r)
{
    const char *pu = hyp_unit_name(unit);
    char a[40], b[40];
    hyp_time_format(r->t0_s, a, sizeof a);
    hyp_time_format(r->t1_s, b, sizeof b);
    fprintf(f, "hypsolev inspect: %s\n", path);
    fprintf(f, "  span        %s to %s (%.2f h), %zu samples (%zu usable), interval %.1f s\n", a, b,
           (r->t1_s - r->t0_s) / 3600.0, r->count, r->usable, r->interval_s);
    fprintf(f, "  pressure    %.2f to %.2f hPa (file unit %s), white noise %.3f hPa\n", r->p_min_pa / 100.0, r->p_max_pa / 100.0,
           pu, r->noise_pa / 100.0);
    if (r->t_min_k <= r->t_max_k)
        fprintf(f, "  temperature %.2f to %.2f degC\n", r->t_min_k - 273.15, r->t_max_k - 273.15);
    if (r->rh_min <= r->rh_max)
        fprintf(f, "  humidity    %.0f to %.0f %%\n", r->rh_min, r->rh_max);
    fprintf(f, "  tendency    trend %+.3f hPa/h over the log", r->trend_pa_per_s * 36.0);
    if (r->max_change_1h_at_s > 0) {
        hyp_time_format(r->max_change_1h_at_s, a, sizeof a);
        fprintf(f, "; largest change %+.2f hPa in 1 h (from %s)", r->max_change_1h_pa / 100.0, a);
    }
    if (r->max_change_3h_at_s > 0) {
        hyp_time_format(r->max_change_3h_at_s, b, sizeof b);
        fprintf(f, ", %+.2f hPa in 3 h (from %s)", r->max_change_3h_pa / 100.0, b);
    }
    fputc('\n', f);
    fprintf(f, "  problems    %s\n", r->n_issues ? "" : "none found");
    for (size_t i = 0; i < r->n_issues; i++)
        issue_line(f, &r->issues[i]);
}
