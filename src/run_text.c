/* run_text.c - the texts of a run: a rover's messages and summary (what
 * the program prints and the report keeps), and the batch table and
 * summary files. Writers only: every number comes from the run result. */
#define _GNU_SOURCE
#include "survey_int.h"
#include "hypsolev/vertical.h"
#include "text_safe.h"
#include "baro_altitude.h"

#include <math.h>
#include <string.h>

/* The message's place as a prefix: "file:line: ", "file: " or "". */
static void msg_place(const hyp_msg *m, char *buf, size_t n)
{
    buf[0] = '\0';
    if (m->file && m->line)
        snprintf(buf, n, "%s:%u: ", m->file, m->line);
    else if (m->file)
        snprintf(buf, n, "%s: ", m->file);
}

void hyp_msgs_write(FILE *f, const hyp_msgs *m, hyp_level min)
{
    for (size_t i = 0; i < m->count; i++) {
        if (m->items[i].level < min)
            continue;
        char place[4200];
        msg_place(&m->items[i], place, sizeof place);
        fprintf(f, "hypsolev: %s: %s%s\n", m->items[i].level == HYP_WARNING ? "warning" : "note", place, m->items[i].text);
    }
    if (m->dropped)
        fprintf(f, "hypsolev: %zu more messages not shown\n", m->dropped);
}

static void span_text(const hyp_series *s, char *buf, size_t n)
{
    double t0 = NAN, t1 = NAN;
    size_t used = 0;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i]) {
            if (t0 != t0)
                t0 = s->time_s[i];
            t1 = s->time_s[i];
            used++;
        }
    if (!used) {
        snprintf(buf, n, "%zu samples (none usable)", s->count);
        return;
    }
    char a[40], b[40];
    hyp_time_format(t0, a, sizeof a);
    hyp_time_format(t1, b, sizeof b);
    snprintf(buf, n, "%zu samples (%zu usable), %s to %s (%.2f h)", s->count, used, a, b, (t1 - t0) / 3600.0);
}

static const char *how_text(hyp_calib_how h)
{
    return h == HYP_HOW_POSITION ? "found from positions" : h == HYP_HOW_WAYPOINT ? "waypoint" : "given";
}

/* A calibration's test: its w and redundancy, or why it has none. */
static void calib_test_text(const hyp_calib *c, const hyp_calib_test *ct, char *buf, size_t n)
{
    if (ct->state == HYP_CALTEST_NONE)
        buf[0] = '\0';
    else if (c->test_w == c->test_w)
        snprintf(buf, n, ", w %+.2f (redundancy %.3f)", c->test_w, c->test_redundancy);
    else
        snprintf(buf, n, ", not checked by the others");
}

/* The test's verdict and its global test. */
static void print_calib_test(FILE *f, const hyp_correct_result *r)
{
    const hyp_calib_test *ct = &r->calib_test;
    double c = 0;
    for (size_t k = 0; k < r->n_calibs && c == 0; k++)
        c = r->calibs[k].suspect ? r->calibs[k].sens_m_per_pa : 0;
    switch (ct->state) {
    case HYP_CALTEST_NONE:
        fprintf(f, "  test      not run: the offset is given, the calibrations are only reported\n");
        return;
    case HYP_CALTEST_UNTESTED:
        fprintf(f, "  test      the calibrations could not be tested: too few (%zu) for any to be checked by another\n",
                r->n_calibs);
        return;
    case HYP_CALTEST_PASSED:
        fprintf(f, "  test      every calibration agrees with the others (w-test, two-sided alpha %g: |w| at most %.2f)\n",
                ct->alpha_w, ct->w_crit);
        break;
    case HYP_CALTEST_REJECTED:
        fprintf(f, "  test      FAILED: %zu calibration(s) rejected (|w| beyond %.2f, two-sided alpha %g) and the offset fitted without them (exit status 3)\n",
                ct->n_rejected, ct->w_crit, ct->alpha_w);
        break;
    case HYP_CALTEST_UNRESOLVED:
        fprintf(f, "  test      FAILED: calibrations disagree (|w| beyond %.2f, two-sided alpha %g) and too few remain to tell which is wrong: all kept, the offset's sigma widened by %.2f hPa (about %.1f m) (exit status 3)\n",
                ct->w_crit, ct->alpha_w, ct->spread_pa / 100.0, ct->spread_pa * c);
        break;
    }
    if (ct->dof > 0 && ct->s0_sq == ct->s0_sq && ct->global != HYP_GLOBAL_NONE)
        fprintf(f, "            variance factor %.2f on %zu degree(s) of freedom (bounds %.2f to %.2f, two-sided alpha %g): %s\n",
                ct->s0_sq, ct->dof, ct->s0_sq_lower, ct->s0_sq_upper, ct->alpha_global,
                ct->global == HYP_GLOBAL_PASS  ? "passed"
                : ct->global == HYP_GLOBAL_LOW ? "below: the calibrations agree more closely than the test's generous priors require"
                                               : "above: the calibrations scatter more than their sigmas allow");
}

static void print_calibrations(FILE *f, const hyp_correct_result *r)
{
    if (!r->n_calibs)
        return;
    fprintf(f, "  ties      %zu calibration(s); misclosure = height before adjustment - known, residual = after\n", r->n_calibs);
    for (size_t k = 0; k < r->n_calibs; k++) {
        const hyp_calib *c = &r->calibs[k];
        char a[40], b[40], t[80];
        hyp_time_format(c->start_s, a, sizeof a);
        hyp_time_format(c->end_s, b, sizeof b);
        calib_test_text(c, &r->calib_test, t, sizeof t);
        fprintf(f, "            %-10s %s to %s, %zu samples (%s): known %.3f m +- %.3f m, misclosure %+.3f m, residual %+.3f m, offset %+.3f hPa%s\n",
                c->name, a, b + 11, c->n, how_text(c->how), c->known_m, c->known_sigma_m, c->misclosure_m,
                c->residual_m, c->offset_pa / 100.0, t);
        if (c->rejected || c->suspect)
            fprintf(f, "                       %s: %s\n", c->rejected ? "rejected" : "suspect", c->test_note);
    }
    print_calib_test(f, r);
}

static void print_drift(FILE *f, const hyp_correct_result *r)
{
    const hyp_drift *d = &r->drift;
    fprintf(f, "  offset    %s\n", d->note);
    if (d->kind == HYP_DRIFT_NONE)
        return;
    for (size_t j = 0; j < d->n_knots; j++) {
        char t[40];
        hyp_time_format(d->knot_s[j], t, sizeof t);
        fprintf(f, "            %s %+.3f hPa +- %.3f hPa\n", d->kind == HYP_DRIFT_EXPLICIT ? "(all times)" : t,
                d->knot_pa[j] / 100.0, sqrt(d->cov[j * d->p + j]) / 100.0);
    }
    if (d->n_knots >= 2)
        fprintf(f, "            drift %+.3f hPa/h between the first and last knot\n", d->rate_pa_per_s * 36.0);
    if (d->has_scale)
        fprintf(f, "            column scale %+.3f %% +- %.3f %% (about %+.2f K on the column temperature)\n",
                100.0 * d->scale, 100.0 * d->scale_sigma, d->scale_tcol_k);
    if (d->kind >= HYP_DRIFT_CONSTANT)
        fprintf(f, "            fit: chi-square %.2f on %zu degree(s) of freedom, condition %.1e%s\n", d->chi2, d->dof,
                d->condition, d->inflation > 1.0 ? ", covariance inflated to match the misfit" : "");
}

static void budget_row(FILE *f, const hyp_correct_result *r, size_t i, const char *label)
{
    hyp_point_detail d;
    if (hyp_correct_point(r, i, &d) != HYP_OK)
        return;
    fprintf(f, "            %-7s", label);
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(f, " %6.2f", d.budget_m[k]);
    fprintf(f, "  %6.2f\n", d.sigma_m);
}

static void print_budget(FILE *f, const hyp_series *s, const hyp_correct_result *r)
{
    if (!r->n_ok || r->median_index == SIZE_MAX)
        return;
    size_t med = r->median_index, worst = r->worst_index;
    fprintf(f, "  sigma     median %.2f m, largest %.2f m (1 sigma)\n", r->median_sigma_m, (double)r->sigma_m[worst]);
    fprintf(f, "  budget    1 sigma, m:");
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(f, " %6s", hyp_budget_term_name((hyp_budget_term)k));
    fprintf(f, "   total\n");
    budget_row(f, r, med, "median");
    budget_row(f, r, worst, "worst");
    char t[40];
    hyp_time_format(s->time_s[worst], t, sizeof t);
    fprintf(f, "            (worst point: line %u, %s)\n", (unsigned)hyp_series_line(s, worst), t);
    fprintf(f, "            noise: sensors; fit: offset, drift and scale model; tcol: column temperature;\n"
               "            rh: humidity; interp: base interpolation; clock: base clock; horiz: pressure gradient\n");
}

static void print_weather(FILE *f, const hyp_correct_result *r, double rapid_pa_s)
{
    fprintf(f, "  weather   base pressure trend %+.3f hPa/h over the log; largest hourly tendency %.2f hPa/h\n",
            r->base_tendency_pa_s * 36.0, r->max_rate_pa_s * 36.0);
    for (size_t k = 0; k < r->n_rapid; k++) {
        char a[40], b[40];
        hyp_time_format(r->rapid[k].start_s, a, sizeof a);
        hyp_time_format(r->rapid[k].end_s, b, sizeof b);
        fprintf(f, "            rapid change (over %.1f hPa/h): %s to %s, up to %.2f hPa/h\n", rapid_pa_s * 36.0, a, b,
                r->rapid[k].max_rate_pa_s * 36.0);
    }
}

static void print_bases(FILE *f, const hyp_rover_run *run)
{
    const hyp_correct_result *r = &run->result;
    char span[200];
    for (size_t k = 0; k < run->n_bases; k++) {
        const hyp_base_used *b = &run->bases[k];
        span_text(b->log, span, sizeof span);
        fprintf(f, "  base      %s: %s; %s in %s\n", b->path, span, b->kind == HYP_BASE_QNH ? "QNH" : "pressure",
                hyp_unit_name(b->pressure_unit));
        fprintf(f, "            height %.3f m", b->height_m);
        if (b->lat_deg == b->lat_deg)
            fprintf(f, ", at %.6f, %.6f deg", b->lat_deg, b->lon_deg);
        fprintf(f, ", clock offset %+.1f s applied", run->n_bases == 1 ? r->clock_applied_s : b->clock_offset_s);
        if (run->n_bases > 1)
            fprintf(f, ", instrument offset %+.3f hPa +- %.3f hPa", r->base_offset_pa[k] / 100.0, r->base_offset_sigma_pa[k] / 100.0);
        fputc('\n', f);
    }
    const hyp_base_used *b0 = &run->bases[0];
    if (r->clock_est_ok)
        fprintf(f, "            clock offset estimated from the co-locations: %+.1f s +- %.1f s%s\n", r->clock_est_s,
                r->clock_est_sigma_s,
                b0->clock_offset_s == r->clock_applied_s && !(r->clock_est_s == r->clock_applied_s)
                    ? " (not applied; --base-clock-offset auto applies it)" : "");
}

static void print_method(FILE *f, const hyp_rover_run *run)
{
    const hyp_correct_result *r = &run->result;
    fprintf(f, "  method    %s\n", r->method);
    if (r->method_why[0])
        fprintf(f, "            chosen: %s%s\n", r->method_why,
                run->n_bases > 1 && !r->bases_compared ? "; the bases were never compared" : "");
    if (r->base_offset_how[0])
        fprintf(f, "            base offset fixed by: %s\n", r->base_offset_how);
    if (r->method_used == HYP_METHOD_TWO_BASE) {
        fprintf(f, "            column mean virtual temperature the bases imply %.2f degC", r->implied_tcol_k - 273.15);
        if (r->thermo_tcol_k == r->thermo_tcol_k)
            fprintf(f, ", the thermometers %.2f degC (difference %+.2f K)", r->thermo_tcol_k - 273.15,
                    r->implied_tcol_k - r->thermo_tcol_k);
        fprintf(f, "\n            %zu points extrapolated outside the bases' heights (flagged in the table)\n", r->n_extrapolated);
    }
}

static void print_heights(FILE *f, const hyp_rover_run *run)
{
    const hyp_correct_result *r = &run->result;
    fprintf(f, "  heights   %zu of %zu corrected", r->n_ok, r->count);
    for (int s = 1; s < HYP_PT_STATUS_COUNT; s++)
        if (r->n_status[s])
            fprintf(f, "; %zu %s", r->n_status[s], hyp_point_status_text((hyp_point_status)s));
    fputc('\n', f);
    for (int fl = 1; fl < HYP_SAMPLE_FLAG_COUNT; fl++)
        if (r->n_flag[fl])
            fprintf(f, "            %zu dropped by the reader: %s\n", r->n_flag[fl], hyp_sample_flag_text((hyp_sample_flag)fl));
    const hyp_waypoint_heights *w = &run->waypoints;
    if (w->count)
        fprintf(f, "  waypoints: %zu corrected, %zu outside the span, %zu without time\n", w->n_corrected, w->n_outside,
                w->n_no_time);
}

static void print_references(FILE *f, const hyp_rover_run *run)
{
    fprintf(f, "  heights   in %s; known heights in %s; the track's own heights taken as %s\n", hyp_vref_name(run->out_ref),
            hyp_vref_name(run->known_ref), hyp_vref_name(run->gnss_ref));
    double m, sd;
    size_t k;
    hyp_diff_stats(run->gnss_out_m, run->result.height_m, run->result.count, &m, &sd, &k);
    if (k >= 2)
        fprintf(f, "  gnss      GNSS - corrected height: mean %+.2f m, standard deviation %.2f m over %zu points\n", m, sd, k);
    else if (k == 1)
        fprintf(f, "  gnss      GNSS - corrected height: %+.2f m at the one point with both\n", m);
    if (run->easting_m)
        fprintf(f, "  crs       easting/northing in %s\n", run->crs_name);
}

/* A barometric-altitude rover: its quantisation, the reference found and
 * each re-setting with its time and size (baro_altitude.c). */
static void print_baro(FILE *f, const char *span, const hyp__baro *b)
{
    fprintf(f, "  rover     %s; pressure from barometric altitudes\n", span);
    if (b->quant_m > 0)
        fprintf(f, "  altitude  in steps of %g m: quantisation %.2f m (%.2f Pa), 1 sigma\n", b->quant_m,
                b->quant_m / sqrt(12.0), b->quant_pa);
    if (b->ref_pa == b->ref_pa)
        fprintf(f, "            the recorder's reference%s: %.2f hPa (from the calibrated offset)\n",
                b->n_steps ? " before its first re-setting" : "", b->ref_pa / 100.0);
    else
        fprintf(f, "            the recorder's reference: not calibrated, 1013.25 hPa taken (its error scales the height "
                   "above the base: docs/methods.md)\n");
    for (size_t k = 0; k < b->n_steps; k++) {
        char t[32];
        hyp_time_format(b->steps[k].time_s, t, sizeof t);
        fprintf(f, "            re-set at %s (line %u): %+.1f m +- %.2f m, joined\n", t, (unsigned)b->steps[k].line,
                b->steps[k].size_m, b->steps[k].sigma_m);
    }
}

static void print_summary(FILE *f, const hyp_rover_run *run)
{
    const hyp_correct_result *r = &run->result;
    char span[200];
    fprintf(f, "hypsolev correct: %s\n", run->path);
    span_text(run->rover, span, sizeof span);
    if (run->priv && run->priv->baro)
        print_baro(f, span, run->priv->baro);
    else
        fprintf(f, "  rover     %s; pressure in %s\n", span, hyp_unit_name(run->rover_pressure_unit));
    print_bases(f, run);
    print_method(f, run);
    print_calibrations(f, r);
    print_drift(f, r);
    fprintf(f, "  noise     rover %.3f hPa, base %.3f hPa (1 sigma, estimated from the data)\n", r->rover_noise_pa / 100.0,
            r->base_noise_pa / 100.0);
    if (r->n_ok)
        fprintf(f, "  column    mean virtual temperature %.2f to %.2f degC\n", r->tcol_min_k - 273.15, r->tcol_max_k - 273.15);
    print_weather(f, r, run->rapid_pa_per_s);
    print_heights(f, run);
    print_budget(f, run->rover, r);
    print_references(f, run);
    fprintf(f, "  wrote     ");
    for (size_t k = 0; k < run->n_written; k++)
        fprintf(f, "%s%s", k ? ", " : "", strcmp(run->written[k], "-") ? run->written[k] : "(table on standard output)");
    fprintf(f, "\n  (not for aviation or navigation; survey deliverables defer to local codes and licensed surveyors)\n");
}

void hyp_rover_run_write_text(FILE *f, const hyp_rover_run *r, unsigned parts)
{
    if (r->skipped) {
        fprintf(f, "hypsolev: %s: skipped: %s\n", r->path, r->error.message);
        return;
    }
    if (parts & (HYP_TEXT_WARNINGS | HYP_TEXT_NOTES))
        hyp_msgs_write(f, &r->msgs, parts & HYP_TEXT_NOTES ? HYP_NOTE : HYP_WARNING);
    if (r->status) {
        int named = strstr(r->error.message, r->path) != NULL;
        if (parts & HYP_TEXT_WARNINGS)
            fprintf(f, "hypsolev: error: %s%s%s\n", named ? "" : r->path, named ? "" : ": ", r->error.message);
        return;
    }
    if (parts & HYP_TEXT_SUMMARY)
        print_summary(f, r);
}

/* ---- the batch's table and summary --------------------------------- */

static const char *info_method(const hyp_run_info *r)
{
    return r->method[0] ? r->method : "-";
}

void hyp_batch_table_write(FILE *f, const hyp_run_info *r, size_t n)
{
    fprintf(f, "hypsolev correct: %zu files\n  %-40s %9s %9s  %-14s %4s %8s  %s\n", n, "file", "points", "corrected",
            "method", "ties", "sigma", "status");
    for (size_t i = 0; i < n; i++) {
        char sig[32] = "       -";
        if (r[i].median_sigma_m == r[i].median_sigma_m)
            snprintf(sig, sizeof sig, "%6.2f m", r[i].median_sigma_m);
        fprintf(f, "  %-40s %9zu %9zu  %-14s %4zu %s  %.80s\n", r[i].path, r[i].points, r[i].corrected, info_method(&r[i]),
                r[i].ties, sig, r[i].message);
    }
}

static void csv_field(FILE *f, const char *s)
{
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"')
            fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

/* A JSON string (RFC 8259, section 7): quotes, backslashes and control
 * characters escaped, ill-formed UTF-8 replaced by U+FFFD (JSON text is
 * Unicode, section 8.1). */
static void json_string(FILE *f, const char *s)
{
    fputc('"', f);
    const unsigned char *p = (const unsigned char *)s;
    while (*p) {
        long cp;
        size_t len = hyp__utf8_next(p, &cp);
        if (cp < 0)
            fputs("\\ufffd", f);
        else if (cp == '"' || cp == '\\')
            fprintf(f, "\\%c", (char)cp);
        else if (cp < 0x20)
            fprintf(f, "\\u%04lx", (unsigned long)cp);
        else
            fwrite(p, 1, len, f);
        p += len;
    }
    fputc('"', f);
}

void hyp_batch_summary_write(FILE *f, const hyp_run_info *r, size_t n, hyp_summary_format fmt)
{
    int json = fmt == HYP_SUMMARY_JSON;
    fputs(json ? "[\n" : "file,points,corrected,method,ties,median_sigma_m,exit_status,status\n", f);
    for (size_t i = 0; i < n; i++) {
        int rc = hyp_run_exit_status(&r[i]);
        int has_sigma = r[i].median_sigma_m == r[i].median_sigma_m;
        if (json) {
            fputs("  {\"file\": ", f);
            json_string(f, r[i].path);
            fprintf(f, ", \"points\": %zu, \"corrected\": %zu, \"method\": ", r[i].points, r[i].corrected);
            json_string(f, r[i].method);
            fprintf(f, ", \"ties\": %zu, \"median_sigma_m\": ", r[i].ties);
            if (has_sigma)
                fprintf(f, "%.3f", r[i].median_sigma_m);
            else
                fputs("null", f);
            fprintf(f, ", \"exit_status\": %d, \"status\": ", rc);
            json_string(f, r[i].message);
            fprintf(f, "}%s\n", i + 1 < n ? "," : "");
        } else {
            csv_field(f, r[i].path);
            fprintf(f, ",%zu,%zu,%s,%zu,", r[i].points, r[i].corrected, r[i].method, r[i].ties);
            if (has_sigma)
                fprintf(f, "%.3f", r[i].median_sigma_m);
            fprintf(f, ",%d,", rc);
            csv_field(f, r[i].message);
            fputc('\n', f);
        }
    }
    if (json)
        fputs("]\n", f);
}
