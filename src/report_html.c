/* report_html.c - a rover's run as one self-contained HTML page: the
 * entry point, the page's order, and its tables (the figures are in
 * report_figures.c, report_calib.c and report_plan.c). Every number
 * comes from the run result, with its unit. */
#define _GNU_SOURCE
#include "report_html.h"
#include "hypsolev/hypsolev.h"
#include "svg.h"

#include <math.h>
#include <string.h>

static const char *how_text(hyp_calib_how h)
{
    return h == HYP_HOW_POSITION ? "found from positions" : h == HYP_HOW_WAYPOINT ? "GPX waypoint" : "given";
}

static const char *tcol_text(int source)
{
    static const char *const t[4] = {"base thermometer and lapse rate", "base and rover thermometers",
                                     "mean of both estimates", "standard atmosphere (no thermometer)"};
    return source >= 0 && source < 4 ? t[source] : "unknown";
}

/* ---- the head and the key figures ------------------------------------- */

static void nav(hyp__page *p)
{
    static const char *const s[][2] = {
        {"heights", "Heights"}, {"plan", "Plan"}, {"weather", "Base pressure"}, {"calibration", "Calibration and fit"},
        {"budget", "Error budget"}, {"inputs", "Inputs"}, {"method", "Method"}, {"reference", "Vertical reference"},
        {"messages", "Warnings and notes"}, {"about", "Tool, command and cautions"},
    };
    hyp__page_out(p, "<div class=\"nav\"><ol>");
    for (size_t k = 0; k < sizeof s / sizeof s[0]; k++)
        hyp__page_out(p, "<li><a href=\"#%s\">%s</a></li>", s[k][0], s[k][1]);
    hyp__page_out(p, "</ol></div>\n");
}

static void key_figures(hyp__page *p, const hyp_rover_run *r)
{
    const hyp_correct_result *res = &r->result;
    double lo, hi;
    hyp__svg_range(res->height_m, res->count, &lo, &hi);
    hyp__page_table(p, "Key figures", NULL, 0);
    hyp__page_kv(p, "points corrected", "%z of %z", res->n_ok, res->count);
    hyp__page_kv(p, "method", "%t", res->method);
    hyp__page_kv(p, "median sigma", "%.2f m (1 sigma)", res->median_sigma_m);
    if (res->worst_index != SIZE_MAX)
        hyp__page_kv(p, "largest sigma", "%.2f m at %T (line %d)", (double)res->sigma_m[res->worst_index],
                     r->rover->time_s[res->worst_index], (int)hyp_series_line(r->rover, res->worst_index));
    hyp__page_out(p, "<tr><th scope=\"row\">corrected heights</th><td id=\"height-range\">lowest <span class=\"lo\">%.3f</span> m, "
                     "highest <span class=\"hi\">%.3f</span> m (%t)</td></tr>\n",
                  lo, hi, hyp_vref_name(r->out_ref));
    hyp__page_kv(p, "tendency", "base pressure trend %+.3f hPa/h; largest hourly tendency %.2f hPa/h",
                 res->base_tendency_pa_s * 36.0, res->max_rate_pa_s * 36.0);
    hyp__page_table_end(p);
}

/* ---- inputs ------------------------------------------------------------ */

static void series_row(hyp__page *p, const char *role, const char *path, const hyp_series *s, hyp_unit unit)
{
    double t0 = NAN, t1 = NAN;
    size_t used = 0;
    for (size_t i = 0; s && i < s->count; i++)
        if (!s->flag[i]) {
            t0 = t0 == t0 ? t0 : s->time_s[i];
            t1 = s->time_s[i];
            used++;
        }
    hyp__page_out(p, "<tr><td>%t</td><td><code>%t</code></td><td class=\"n\">%z</td><td class=\"n\">%z</td>"
                     "<td class=\"t\">%T</td><td class=\"t\">%T</td><td class=\"n\">%.2f h</td><td>%t</td></tr>\n",
                  role, path, s ? s->count : 0, used, t0, t1, (t1 - t0) / 3600.0, s ? hyp_unit_name(unit) : "");
}

static void inputs(hyp__page *p, const hyp_rover_run *r)
{
    static const char *const heads[] = {"role", "file", "records", "used", "first (UTC)", "last (UTC)", "span", "pressure unit"};
    hyp__page_section(p, "inputs", "Inputs");
    hyp__page_table(p, "Logs", heads, 8);
    series_row(p, "rover", r->path, r->rover, r->rover_pressure_unit);
    for (size_t k = 0; k < r->n_bases; k++)
        series_row(p, r->bases[k].kind == HYP_BASE_QNH ? "base (QNH)" : "base", r->bases[k].path, r->bases[k].log,
                   r->bases[k].pressure_unit);
    hyp__page_table_end(p);
    const hyp_survey *sv = r->priv ? r->priv->sv : NULL;
    if (sv && (sv->o.benchmarks_path || sv->o.ties_path)) {
        hyp__page_table(p, "Known points", NULL, 0);
        if (sv->o.benchmarks_path)
            hyp__page_kv(p, "benchmarks", "<code>%t</code>: %z points", sv->o.benchmarks_path, sv->bms.count);
        if (sv->o.ties_path)
            hyp__page_kv(p, "ties", "<code>%t</code>: %z windows", sv->o.ties_path, sv->n_ties);
        hyp__page_table_end(p);
    }
    static const char *const bh[] = {"base", "height", "position", "clock offset applied", "instrument offset"};
    hyp__page_table(p, "Bases as used", bh, 5);
    for (size_t k = 0; k < r->n_bases; k++) {
        const hyp_base_used *b = &r->bases[k];
        double clk = r->n_bases == 1 ? r->result.clock_applied_s : b->clock_offset_s;
        hyp__page_out(p, "<tr><td><code>%t</code></td><td class=\"n\">%.3f m</td>", b->path, b->height_m);
        if (b->lat_deg == b->lat_deg)
            hyp__page_out(p, "<td>%.6f&#176;, %.6f&#176;</td>", b->lat_deg, b->lon_deg);
        else
            hyp__page_out(p, "<td>not given</td>");
        hyp__page_out(p, "<td class=\"n\">%+.1f s</td>", clk);
        if (r->n_bases > 1)   /* estimated or given for several bases; one base's is in the rover's offset */
            hyp__page_out(p, "<td class=\"n\">%+.3f hPa &#177; %.3f hPa</td></tr>\n", r->result.base_offset_pa[k] / 100.0,
                          r->result.base_offset_sigma_pa[k] / 100.0);
        else
            hyp__page_out(p, "<td>in the rover's offset (one base)</td></tr>\n");
    }
    hyp__page_table_end(p);
}

static void counts(hyp__page *p, const hyp_correct_result *res)
{
    hyp__page_table(p, "Points", NULL, 0);
    hyp__page_kv(p, "corrected", "%z of %z", res->n_ok, res->count);
    for (int s = 1; s < HYP_PT_STATUS_COUNT; s++)
        if (res->n_status[s])
            hyp__page_kv(p, "not corrected", "%z: %t", res->n_status[s], hyp_point_status_text((hyp_point_status)s));
    for (int fl = 1; fl < HYP_SAMPLE_FLAG_COUNT; fl++)
        if (res->n_flag[fl])
            hyp__page_kv(p, "refused by the reader", "%z: %t", res->n_flag[fl], hyp_sample_flag_text((hyp_sample_flag)fl));
    if (res->base_refused)
        hyp__page_kv(p, "base samples refused", "%z", res->base_refused);
    hyp__page_table_end(p);
}

/* ---- method ------------------------------------------------------------ */

static void method(hyp__page *p, const hyp_rover_run *r)
{
    const hyp_correct_result *res = &r->result;
    hyp__page_section(p, "method", "Method");
    hyp__page_table(p, NULL, NULL, 0);
    hyp__page_kv(p, "method", "%t", res->method);
    if (res->method_why[0])
        hyp__page_kv(p, "why", "%t%s", res->method_why,
                     r->n_bases > 1 && !res->bases_compared ? "; the bases were never compared" : "");
    hyp__page_kv(p, "column temperature", "%t; column mean virtual temperature %.2f &#176;C to %.2f &#176;C",
                 tcol_text(res->tcol_source), res->tcol_min_k - 273.15, res->tcol_max_k - 273.15);
    if (res->method_used == HYP_METHOD_TWO_BASE)
        hyp__page_kv(p, "two bases", "the bases imply a column of %.2f &#176;C, the thermometers %.2f &#176;C; "
                                     "%z points extrapolated outside the bases' heights",
                     res->implied_tcol_k - 273.15, res->thermo_tcol_k - 273.15, res->n_extrapolated);
    hyp__page_kv(p, "noise", "rover %.3f hPa, base %.3f hPa (1 sigma, estimated from the data)", res->rover_noise_pa / 100.0,
                 res->base_noise_pa / 100.0);
    if (res->clock_est_ok)
        hyp__page_kv(p, "base clock", "estimated from the co-locations: %+.1f s &#177; %.1f s; applied %+.1f s",
                     res->clock_est_s, res->clock_est_sigma_s, res->clock_applied_s);
    hyp__page_table_end(p);
    counts(p, res);
}

/* ---- calibrations and fit ---------------------------------------------- */

/* A calibration's part in the test: w and redundancy, and its verdict. */
static void calib_test_cells(hyp__page *p, const hyp_calib *c, const hyp_calib_test *ct)
{
    if (ct->state == HYP_CALTEST_NONE)
        hyp__page_out(p, "<td>not tested</td><td></td>");
    else if (c->test_w == c->test_w)
        hyp__page_out(p, "<td class=\"n\">%+.2f (r %.3f)</td>", c->test_w, c->test_redundancy);
    else
        hyp__page_out(p, "<td>not checked by the others</td>");
    if (ct->state != HYP_CALTEST_NONE)
        hyp__page_out(p, "<td%s>%s%t</td>", c->rejected || c->suspect ? " class=\"warning\"" : "",
                      c->rejected ? "rejected: " : c->suspect ? "suspect: " : "agrees", c->test_note);
}

static void calib_table(hyp__page *p, const hyp_correct_result *res)
{
    static const char *const h[] = {"name", "kind", "window (UTC)", "samples", "known height", "misclosure",
                                    "residual", "offset", "w-test", "verdict"};
    if (!res->n_calibs)
        return;
    hyp__page_table(p, "Calibrations (misclosure: height before the fit minus known; residual: after)", h, 10);
    for (size_t k = 0; k < res->n_calibs; k++) {
        const hyp_calib *c = &res->calibs[k];
        char end[48];
        hyp_time_format(c->end_s, end, sizeof end);
        hyp__page_out(p, "<tr><td>%t</td><td>%s, %s</td><td>%T to %t</td><td class=\"n\">%z</td>"
                         "<td class=\"n\">%.3f m &#177; %.3f m</td><td class=\"n\">%+.3f m</td><td class=\"n\">%+.3f m</td>"
                         "<td class=\"n\">%+.3f hPa</td>",
                      c->name, c->kind == HYP_CAL_BASE ? "co-location" : "tie", how_text(c->how), c->start_s,
                      strlen(end) > 11 ? end + 11 : end, c->n, c->known_m, c->known_sigma_m, c->misclosure_m, c->residual_m,
                      c->offset_pa / 100.0);
        calib_test_cells(p, c, &res->calib_test);
        hyp__page_out(p, "</tr>\n");
    }
    hyp__page_table_end(p);
}

static const char *global_text(hyp_global_test g)
{
    return g == HYP_GLOBAL_PASS  ? "passed"
           : g == HYP_GLOBAL_LOW ? "below: the calibrations agree more closely than the test's priors require"
                                 : "above: the calibrations scatter more than their sigmas allow";
}

/* The calibrations tested against each other: the verdict, the global test. */
static void calib_test_table(hyp__page *p, const hyp_correct_result *res)
{
    const hyp_calib_test *ct = &res->calib_test;
    hyp__page_table(p, "Calibration test (the calibrations against each other: w-test and data snooping)", NULL, 0);
    switch (ct->state) {
    case HYP_CALTEST_NONE: hyp__page_kv(p, "verdict", "not run: no calibration, or the offset is given"); break;
    case HYP_CALTEST_UNTESTED:
        hyp__page_kv(p, "verdict", "not tested: too few calibrations (%z) for any to be checked by another", res->n_calibs);
        break;
    case HYP_CALTEST_PASSED:
        hyp__page_kv(p, "verdict", "every calibration agrees with the others (two-sided alpha %.4f: |w| at most %.2f)",
                     ct->alpha_w, ct->w_crit);
        break;
    case HYP_CALTEST_REJECTED:
        hyp__page_kv(p, "verdict", "<span class=\"warning\">FAILED: %z calibration(s) rejected (|w| beyond %.2f, two-sided "
                                   "alpha %.4f) and the offset fitted without them (exit status 3)</span>",
                     ct->n_rejected, ct->w_crit, ct->alpha_w);
        break;
    case HYP_CALTEST_UNRESOLVED:
        hyp__page_kv(p, "verdict", "<span class=\"warning\">FAILED: calibrations disagree (|w| beyond %.2f, two-sided alpha "
                                   "%.4f) and too few remain to tell which is wrong: all kept, the offset's sigma widened by "
                                   "%.2f hPa (exit status 3)</span>",
                     ct->w_crit, ct->alpha_w, ct->spread_pa / 100.0);
        break;
    }
    if (ct->dof > 0 && ct->s0_sq == ct->s0_sq && ct->global != HYP_GLOBAL_NONE)
        hyp__page_kv(p, "global test", "variance factor %.2f on %z degree(s) of freedom (bounds %.2f to %.2f, two-sided "
                                       "alpha %.4f): %s",
                     ct->s0_sq, ct->dof, ct->s0_sq_lower, ct->s0_sq_upper, ct->alpha_global, global_text(ct->global));
    hyp__page_table_end(p);
}

static void fit_table(hyp__page *p, const hyp_drift *d)
{
    hyp__page_table(p, "The fit", NULL, 0);
    hyp__page_kv(p, "model", "%t", d->note);
    for (size_t j = 0; d->kind != HYP_DRIFT_NONE && d->kind != HYP_DRIFT_GNSS && j < d->n_knots; j++) {
        char key[40];
        snprintf(key, sizeof key, "knot %zu", j + 1);
        if (d->kind == HYP_DRIFT_EXPLICIT)
            hyp__page_kv(p, "offset", "%+.3f hPa &#177; %.3f hPa (all times)", d->knot_pa[j] / 100.0,
                         sqrt(fmax(d->cov[j * d->p + j], 0)) / 100.0);
        else
            hyp__page_kv(p, key, "%T: %+.3f hPa &#177; %.3f hPa", d->knot_s[j], d->knot_pa[j] / 100.0,
                         sqrt(fmax(d->cov[j * d->p + j], 0)) / 100.0);
    }
    if (d->n_knots >= 2 && d->kind >= HYP_DRIFT_CONSTANT && d->kind != HYP_DRIFT_GNSS)
        hyp__page_kv(p, "drift", "%+.3f hPa/h between the first and last knot", d->rate_pa_per_s * 36.0);
    if (d->has_scale)
        hyp__page_kv(p, "column scale", "%+.3f %% &#177; %.3f %% (about %+.2f K on the column temperature)",
                     100.0 * d->scale, 100.0 * d->scale_sigma, d->scale_tcol_k);
    if (d->kind >= HYP_DRIFT_CONSTANT && d->kind != HYP_DRIFT_GNSS)
        hyp__page_kv(p, "fit", "chi-square %.2f on %z degree(s) of freedom; condition number %.1f; covariance %s",
                     d->chi2, d->dof, d->condition, d->inflation > 1.0 ? "inflated to match the misfit" : "as fitted");
    if (d->kind == HYP_DRIFT_GNSS)
        hyp__page_kv(p, "GNSS levelling", "%+.3f m %+.4f m/h from %T; %z samples, about %.0f independent; bias floor %.2f m",
                     d->gnss_a_m, d->gnss_b_m_per_s * 3600.0, d->gnss_t0_s, d->gnss_n, d->gnss_neff, d->gnss_floor_m);
    hyp__page_table_end(p);
}

static void weather_table(hyp__page *p, const hyp_rover_run *r)
{
    const hyp_correct_result *res = &r->result;
    hyp__page_table(p, "Weather at the base", NULL, 0);
    hyp__page_kv(p, "trend", "%+.3f hPa/h over the log (least squares)", res->base_tendency_pa_s * 36.0);
    hyp__page_kv(p, "largest hourly tendency", "%.2f hPa/h", res->max_rate_pa_s * 36.0);
    for (size_t k = 0; k < res->n_rapid; k++)
        hyp__page_kv(p, "rapid change", "%T to %T, up to %.2f hPa/h (over %.2f hPa/h)", res->rapid[k].start_s,
                     res->rapid[k].end_s, res->rapid[k].max_rate_pa_s * 36.0, r->rapid_pa_per_s * 36.0);
    if (!res->n_rapid)
        hyp__page_kv(p, "rapid change", "none (over %.2f hPa/h)", r->rapid_pa_per_s * 36.0);
    hyp__page_table_end(p);
}

/* ---- budget, reference, messages, outputs ------------------------------ */

static void budget_row(hyp__page *p, const hyp_rover_run *r, size_t i, const char *label)
{
    hyp_point_detail d;
    if (i == SIZE_MAX || hyp_correct_point(&r->result, i, &d) != HYP_OK)
        return;
    hyp__page_out(p, "<tr><th scope=\"row\">%s, %T</th>", label, r->rover->time_s[i]);
    for (int k = 0; k < HYP_B_COUNT; k++)
        hyp__page_out(p, "<td class=\"n\">%.2f m</td>", d.budget_m[k]);
    hyp__page_out(p, "<td class=\"n\"><strong>%.2f m</strong></td></tr>\n", d.sigma_m);
}

static void budget_table(hyp__page *p, const hyp_rover_run *r)
{
    const char *h[HYP_B_COUNT + 2] = {"point"};
    for (int k = 0; k < HYP_B_COUNT; k++)
        h[k + 1] = hyp_budget_term_name((hyp_budget_term)k);
    h[HYP_B_COUNT + 1] = "total";
    hyp__page_table(p, "Budget of the median and the worst point (1 sigma)", h, HYP_B_COUNT + 2);
    budget_row(p, r, r->result.median_index, "median");
    budget_row(p, r, r->result.worst_index, "worst");
    hyp__page_table_end(p);
    hyp__page_out(p, "<p>noise: sensors; fit: offset, drift and scale model; tcol: column temperature; rh: humidity; "
                     "interp: base interpolation in time; clock: base clock; horiz: horizontal pressure gradient over the "
                     "distance from the base.</p>\n");
}

static void reference(hyp__page *p, const hyp_rover_run *r)
{
    hyp__page_section(p, "reference", "Vertical reference");
    hyp__page_table(p, NULL, NULL, 0);
    hyp__page_kv(p, "heights written in", "%t", hyp_vref_name(r->out_ref));
    hyp__page_kv(p, "known heights in", "%t (bases and benchmarks)", hyp_vref_name(r->known_ref));
    hyp__page_kv(p, "the track's own heights taken as", "%t", hyp_vref_name(r->gnss_ref));
    double m, sd;
    size_t k;
    hyp_diff_stats(r->gnss_out_m, r->result.height_m, r->result.count, &m, &sd, &k);
    if (k >= 2)
        hyp__page_kv(p, "GNSS minus corrected height", "mean %+.2f m, standard deviation %.2f m over %z points", m, sd, k);
    if (r->easting_m)
        hyp__page_kv(p, "easting and northing", "%t", r->crs_name);
    hyp__page_table_end(p);
}

static void messages(hyp__page *p, const hyp_rover_run *r)
{
    static const char *const h[] = {"level", "kind", "where", "message"};
    hyp__page_section(p, "messages", "Warnings and notes");
    if (!r->msgs.count) {
        hyp__page_out(p, "<p>None.</p>\n");
        return;
    }
    hyp__page_table(p, NULL, h, 4);
    for (size_t i = 0; i < r->msgs.count; i++) {
        const hyp_msg *m = &r->msgs.items[i];
        char line[24] = "";
        if (m->line)
            snprintf(line, sizeof line, ":%u", m->line);
        hyp__page_out(p, "<tr%s><td>%s</td><td>%t</td><td><code>%t%s</code></td><td>%t</td></tr>\n",
                      m->level == HYP_WARNING ? " class=\"warning\"" : "", m->level == HYP_WARNING ? "warning" : "note",
                      m->code, m->file ? m->file : "", line, m->text);
    }
    hyp__page_table_end(p);
    if (r->msgs.dropped)
        hyp__page_out(p, "<p>%z more messages not kept.</p>\n", r->msgs.dropped);
}

static void outputs(hyp__page *p, const hyp_rover_run *r)
{
    hyp__page_table(p, "Written with this report", NULL, 0);
    for (size_t k = 0; k < r->n_written; k++)
        hyp__page_kv(p, "output", "<code>%t</code>", strcmp(r->written[k], "-") ? r->written[k] : "(table on standard output)");
    if (!r->n_written)
        hyp__page_kv(p, "output", "none");
    hyp__page_table_end(p);
}

/* ---- the page ------------------------------------------------------------ */

static hyp_status body(hyp__page *p, const hyp_rover_run *r, hyp_error *err)
{
    hyp_status st;
    key_figures(p, r);
    nav(p);
    hyp__page_section(p, "heights", "Heights");
    if ((st = hyp__fig_heights(p, r, err)))
        return st;
    hyp__page_section(p, "plan", "Plan");
    if ((st = hyp__fig_plan(p, r, err)))
        return st;
    hyp__page_section(p, "weather", "Base pressure");
    if ((st = hyp__fig_base_pressure(p, r, err)) || (st = hyp__fig_tendency(p, r, err)))
        return st;
    weather_table(p, r);
    hyp__page_section(p, "calibration", "Calibration and fit");
    if ((st = hyp__fig_offset(p, r, err)) || (st = hyp__fig_ties(p, r, err)))
        return st;
    calib_table(p, &r->result);
    calib_test_table(p, &r->result);
    fit_table(p, &r->result.drift);
    hyp__page_section(p, "budget", "Error budget");
    if ((st = hyp__fig_budget(p, r, err)))
        return st;
    budget_table(p, r);
    inputs(p, r);
    outputs(p, r);
    method(p, r);
    reference(p, r);
    return HYP_OK;
}

static void failed(hyp__page *p, const hyp_rover_run *r)
{
    hyp__page_out(p, "<p class=\"warning\"><strong>%s</strong> %t</p>\n", r->skipped ? "Skipped:" : "The run failed:",
                  r->error.message);
}

hyp_status hyp__rover_html_build(hyp__page *p, const hyp_rover_run *r, const hyp_report_info *info, hyp_error *err)
{
    char title[600], tool[64];
    snprintf(title, sizeof title, "hypsolev report: %s", r->name[0] ? r->name : "run");
    snprintf(tool, sizeof tool, "hypsolev %s (library)", HYPSOLEV_VERSION);
    hyp__page_begin(p, title);
    hyp__page_out(p, "<h1>Barometric heights: %t</h1>\n<p>Rover <code>%t</code>, corrected by <code>hypsolev correct</code>.</p>\n",
                  r->name, r->path ? r->path : "");
    hyp_status st = HYP_OK;
    if (r->status || r->skipped || !r->rover)
        failed(p, r);
    else
        st = body(p, r, err);
    if (!st)
        messages(p, r);
    if (!st) {
        hyp__page_colophon(p, info && info->tool ? info->tool : tool, info ? info->command_line : NULL);
        hyp__page_end(p);
        st = hyp__page_status(p, err);
    }
    return st;
}

hyp_status hyp_rover_run_write_html(FILE *f, const hyp_rover_run *r, const hyp_report_info *info, hyp_error *err)
{
    hyp__page p;
    hyp__page_init(&p, 0);
    hyp_status st = hyp__rover_html_build(&p, r, info, err);
    if (!st)
        st = hyp__page_write(&p, f, err);
    hyp__page_free(&p);
    return st;
}
