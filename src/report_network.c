/* report_network.c - the HTML report of a station network (hypsolev
 * adjust): the network in plan, the stations' sigmas, the standardized
 * residuals against time per track with the critical value, the repeat
 * occupations of each station, and each track's offset and drift; tables
 * of the tests, the stations, the tracks and the flagged observations.
 * Everything drawn comes from the result; nothing is recomputed. */
#include "network_int.h"
#include "report_page.h"
#include "svg.h"
#include "hypsolev/hypsolev.h"

#include <stdio.h>

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define DEG (3.14159265358979323846 / 180.0)
#define EARTH_R_M 6371008.8   /* mean radius (IUGG): only for the plan's km */

/* Local east/north (km) of a station from the stations' centre: an
 * equirectangular plan, true to scale near the centre's parallel (a
 * survey's few km; no CRS is asked of a network report). */
static void plan_xy(const hyp_network_result *r, size_t s, double lat0, double lon0, double *x, double *y)
{
    *x = (r->stations.lon_deg[s] - lon0) * DEG * cos(lat0 * DEG) * EARTH_R_M / 1000.0;
    *y = (r->stations.lat_deg[s] - lat0) * DEG * EARTH_R_M / 1000.0;
}

typedef struct figbuf {
    double *x, *y, *e;
    size_t n;
} figbuf;

static int fb_alloc(figbuf *b, size_t n)
{
    b->x = malloc((n ? n : 1) * sizeof(double));
    b->y = malloc((n ? n : 1) * sizeof(double));
    b->e = malloc((n ? n : 1) * sizeof(double));
    b->n = 0;
    return b->x && b->y && b->e ? 0 : -1;
}

static void fb_free(figbuf *b)
{
    free(b->x);
    free(b->y);
    free(b->e);
}

static hyp_status fig_plan(hyp__page *p, const hyp_network_result *r, hyp_error *err)
{
    size_t S = r->stations.count;
    double lat0 = 0, lon0 = 0, xl = INFINITY, xh = -INFINITY, yl = INFINITY, yh = -INFINITY;
    for (size_t s = 0; s < S; s++)
        lat0 += r->stations.lat_deg[s] / (double)S, lon0 += r->stations.lon_deg[s] / (double)S;
    figbuf c, o, rej;
    if (fb_alloc(&c, S) || fb_alloc(&o, S) || fb_alloc(&rej, r->n_obs))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t s = 0; s < S; s++) {
        double x, y;
        plan_xy(r, s, lat0, lon0, &x, &y);
        xl = fmin(xl, x), xh = fmax(xh, x), yl = fmin(yl, y), yh = fmax(yh, y);
        figbuf *b = r->st[s].control ? &c : &o;
        b->x[b->n] = x, b->y[b->n++] = y;
    }
    hyp__svg_spec spec = {.id = "net-plan", .title = "The network in plan", .width_px = 720, .height_px = 560,
                          .equal_aspect = 1, .x = {.title = "east of the stations' centre [km]", .lo = xl, .hi = xh},
                          .y = {.title = "north of the stations' centre [km]", .lo = yl, .hi = yh}};
    hyp__svg f;
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    /* each track's occupations in time order, as links between stations */
    int labelled = 0;
    for (size_t k = 0; !st && k < r->n_tracks; k++) {
        long prev = -1;
        for (size_t i = 0; !st && i < r->n_obs; i++) {
            const hyp_network_obs *ob = &r->obs[i];
            if (ob->kind != HYP_OBS_OCCUPATION || ob->track != k || !ob->used)
                continue;
            if (prev >= 0 && (size_t)prev != ob->station) {
                double x[2], y[2];
                plan_xy(r, (size_t)prev, lat0, lon0, &x[0], &y[0]);
                plan_xy(r, ob->station, lat0, lon0, &x[1], &y[1]);
                if (x[1] < x[0]) {   /* a line is drawn in increasing x */
                    double t = x[0]; x[0] = x[1], x[1] = t;
                    t = y[0]; y[0] = y[1], y[1] = t;
                }
                hyp__svg_style ls = {.colour = 7, .dash = 1, .width_px = 0.8,
                                     .label = labelled++ ? NULL : "a track between stations"};
                st = hyp__svg_line(&f, x, y, 2, &ls);
            }
            prev = (long)ob->station;
        }
    }
    for (size_t i = 0; i < r->n_obs; i++)
        if (r->obs[i].rejected && r->obs[i].kind == HYP_OBS_OCCUPATION) {
            plan_xy(r, r->obs[i].station, lat0, lon0, &rej.x[rej.n], &rej.y[rej.n]);
            rej.n++;
        }
    hyp__svg_style so = {.colour = 0, .marker = HYP__SVG_CIRCLE, .label = "station determined"};
    hyp__svg_style sc = {.colour = 1, .marker = HYP__SVG_SQUARE, .label = "control station"};
    hyp__svg_style sr = {.colour = 5, .marker = HYP__SVG_CROSS, .width_px = 2, .label = "rejected occupation"};
    if (!st && o.n)
        st = hyp__svg_markers(&f, o.x, o.y, NULL, o.n, &so);
    if (!st && c.n)
        st = hyp__svg_markers(&f, c.x, c.y, NULL, c.n, &sc);
    if (!st && rej.n)
        st = hyp__svg_markers(&f, rej.x, rej.y, NULL, rej.n, &sr);
    for (size_t s = 0; !st && s < S; s++) {
        double x, y;
        plan_xy(r, s, lat0, lon0, &x, &y);
        st = hyp__svg_text(&f, x, y, r->stations.name[s], -1);
    }
    st = st ? (hyp__svg_discard(&f), st) : hyp__svg_end(&f);
    fb_free(&c), fb_free(&o), fb_free(&rej);
    return st;
}

/* Markers with error bars over an index axis (stations or tracks). */
static hyp_status fig_index(hyp__page *p, const char *id, const char *title, const char *xt, const char *yt,
                            const figbuf *a, const hyp__svg_style *sa, const figbuf *b, const hyp__svg_style *sb,
                            const double *hline, hyp_error *err)
{
    double lo, hi, l2, h2;
    hyp__svg_range(a->y, a->n, &lo, &hi);
    for (size_t i = 0; i < a->n; i++)
        if (a->e[i] == a->e[i])
            lo = fmin(lo, a->y[i] - a->e[i]), hi = fmax(hi, a->y[i] + a->e[i]);
    if (b && b->n) {
        hyp__svg_range(b->y, b->n, &l2, &h2);
        lo = fmin(lo, l2), hi = fmax(hi, h2);
    }
    if (hline)
        lo = fmin(lo, -*hline), hi = fmax(hi, *hline);
    if (!(lo == lo))
        return HYP_OK;   /* nothing to draw */
    double n = (double)a->n + (b ? (double)b->n : 0.0);
    hyp__svg_spec spec = {.id = id, .title = title, .width_px = 720, .height_px = 320,
                          .x = {.title = xt, .lo = 0, .hi = n + 1, .ticks = 8}, .y = {.title = yt, .lo = lo, .hi = hi}};
    if (a->n && a->x[0] > 1e8)   /* times */
        spec.x = (hyp__svg_axis){.title = xt, .lo = a->x[0], .hi = a->x[a->n - 1], .time_utc = 1, .ticks = 8};
    hyp__svg f;
    hyp_status st = hyp__svg_begin(&f, &p->b, &spec, err);
    if (!st && hline) {
        double x[2] = {f.x_lo, f.x_hi}, y1[2] = {*hline, *hline}, y2[2] = {-*hline, -*hline};
        hyp__svg_style ls = {.colour = 5, .dash = 2, .label = "critical value"}, l2s = ls;
        l2s.label = NULL;
        st = hyp__svg_line(&f, x, y1, 2, &ls);
        if (!st)
            st = hyp__svg_line(&f, x, y2, 2, &l2s);
    }
    if (!st && a->n)
        st = hyp__svg_markers(&f, a->x, a->y, a->e, a->n, sa);
    if (!st && b && b->n)
        st = hyp__svg_markers(&f, b->x, b->y, b->e, b->n, sb);
    return st ? (hyp__svg_discard(&f), st) : hyp__svg_end(&f);
}

static hyp_status fig_sigmas(hyp__page *p, const hyp_network_result *r, hyp_error *err)
{
    figbuf o, c;
    size_t S = r->stations.count;
    if (fb_alloc(&o, S) || fb_alloc(&c, S))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t s = 0; s < S; s++) {
        if (!(r->st[s].sigma_m == r->st[s].sigma_m))
            continue;
        figbuf *b = r->st[s].control ? &c : &o;
        b->x[b->n] = (double)(s + 1), b->y[b->n] = 2.0 * r->st[s].sigma_m, b->e[b->n++] = NAN;
    }
    hyp__svg_style so = {.colour = 0, .marker = HYP__SVG_CIRCLE, .label = "station determined"};
    hyp__svg_style sc = {.colour = 1, .marker = HYP__SVG_SQUARE, .label = "control station"};
    hyp_status st = fig_index(p, "net-sigma", "Two sigma of each station's height", "station (number in the table)",
                              "2 sigma [m]", &o, &so, &c, &sc, NULL, err);
    fb_free(&o), fb_free(&c);
    return st;
}

static hyp_status fig_residuals(hyp__page *p, const hyp_network_result *r, hyp_error *err)
{
    hyp_status st = HYP_OK;
    figbuf b;
    if (fb_alloc(&b, r->n_obs))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    double crit = r->w_crit;
    for (size_t k = 0; !st && k < r->n_tracks; k++) {
        b.n = 0;
        for (size_t i = 0; i < r->n_obs; i++) {
            const hyp_network_obs *o = &r->obs[i];
            if ((o->kind == HYP_OBS_OCCUPATION || o->kind == HYP_OBS_COLOCATION) && o->track == k && o->w == o->w)
                b.x[b.n] = 0.5 * (o->start_s + o->end_s), b.y[b.n] = o->w, b.e[b.n++] = NAN;
        }
        if (!b.n)
            continue;
        char title[400], id[32];
        snprintf(title, sizeof title, "Standardized residuals: %s", r->tracks[k].name);
        snprintf(id, sizeof id, "net-w%zu", k);
        hyp__svg_style sw = {.colour = 0, .marker = HYP__SVG_CIRCLE, .label = "occupation or co-location"};
        st = fig_index(p, id, title, "time [UTC]", "w (standardized residual)", &b, &sw, NULL, NULL, &crit, err);
    }
    fb_free(&b);
    return st;
}

static hyp_status fig_tracks(hyp__page *p, const hyp_network_result *r, hyp_error *err)
{
    figbuf a, d;
    if (fb_alloc(&a, r->n_tracks) || fb_alloc(&d, r->n_tracks))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t k = 0; k < r->n_tracks; k++) {
        if (r->tracks[k].status || r->tracks[k].raw == 2)   /* a loop has no offset of its own */
            continue;
        a.x[a.n] = (double)(k + 1), a.y[a.n] = r->tracks[k].offset_pa / 100.0, a.e[a.n++] = 0.02 * r->tracks[k].offset_sigma_pa;
        d.x[d.n] = (double)(k + 1), d.y[d.n] = r->tracks[k].drift_pa_per_h / 100.0, d.e[d.n++] = 0.02 * r->tracks[k].drift_sigma_pa_per_h;
    }
    hyp__svg_style s0 = {.colour = 0, .marker = HYP__SVG_CIRCLE, .label = NULL};
    hyp_status st = fig_index(p, "net-offset", "Each track's offset at its start (+-2 sigma)", "track (number in the table)",
                              "rover minus base [hPa]", &a, &s0, NULL, NULL, NULL, err);
    if (!st)
        st = fig_index(p, "net-drift", "Each track's drift (+-2 sigma)", "track (number in the table)", "drift [hPa/h]", &d,
                       &s0, NULL, NULL, NULL, err);
    fb_free(&a), fb_free(&d);
    return st;
}

static hyp_status fig_repeats(hyp__page *p, const hyp_network_result *r, hyp_error *err)
{
    figbuf b;
    if (fb_alloc(&b, r->n_obs))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t s = 0; s < r->stations.count; s++) {
        if (r->st[s].used < 2)
            continue;
        for (size_t i = 0; i < r->n_obs; i++) {
            const hyp_network_obs *o = &r->obs[i];
            if (o->kind == HYP_OBS_OCCUPATION && o->station == s && o->used && o->residual_m == o->residual_m)
                b.x[b.n] = (double)(s + 1), b.y[b.n] = -o->residual_m, b.e[b.n++] = 2.0 * o->sigma_m;
        }
    }
    hyp__svg_style so = {.colour = 2, .marker = HYP__SVG_TRIANGLE, .label = NULL};
    hyp_status st = b.n ? fig_index(p, "net-repeat", "Repeat occupations: each one's height minus the adjusted (+-2 sigma)",
                                    "station (number in the table)", "difference [m]", &b, &so, NULL, NULL, NULL, err)
                        : HYP_OK;
    fb_free(&b);
    return st;
}

static void tables(hyp__page *p, const hyp_network_result *r)
{
    hyp__page_section(p, "tests", "Adjustment and tests");
    hyp__page_table(p, NULL, NULL, 0);
    hyp__page_kv(p, "observations used", "%z", r->n_used);
    hyp__page_kv(p, "unknowns", "%z", r->n_unknowns);
    hyp__page_kv(p, "degrees of freedom", "%z", r->dof);
    hyp__page_kv(p, "variance factor", "%.3f (two-sided chi-square test at alpha 0.05: %.2f to %.2f for the sum %.2f)",
                 r->s0_sq, r->chi2_lower, r->chi2_upper, r->vtpv);
    hyp__page_kv(p, "global test", "%s", r->global_pass < 0 ? "no test (no redundancy)" : r->global_pass ? "passed"
                                   : r->vtpv > r->chi2_upper ? "failed: the observations scatter more than their sigmas say"
                                                             : "below the lower bound: the sigmas are cautious");
    hyp__page_kv(p, "sigmas", "%s", r->scaled ? "a-posteriori (scaled by the variance factor)" : "a-priori (from the error budgets)");
    hyp__page_kv(p, "w-test", "Baarda's, critical |w| %.2f; %z observation(s) rejected", r->w_crit, r->n_rejected);
    hyp__page_kv(p, "result", "%s", r->tests_failed ? "a test failed (exit status 3)" : "every test passed");
    hyp__page_table_end(p);
    static const char *const sh[] = {"#", "station", "height [m]", "sigma [m]", "used", "rejected", "control", "max |w|",
                                     "free-air [mGal]", "Bouguer [mGal]", "method"};
    hyp__page_section(p, "stations", "Stations");
    hyp__page_table(p, NULL, sh, 11);
    for (size_t s = 0; s < r->stations.count; s++) {
        const hyp_network_station *t = &r->st[s];
        hyp__page_out(p, "<tr><td>%z</td><td>%t</td><td>%.3f</td><td>%.3f</td><td>%z</td><td>%z</td><td>%s</td><td>%.2f</td>"
                         "<td>%.3f</td><td>%.3f</td><td>%t</td></tr>\n", s + 1, r->stations.name[s], t->height_m, t->sigma_m,
                      t->used, t->rejected, t->control ? "yes" : "no", t->max_abs_w, t->free_air_mgal, t->bouguer_mgal,
                      t->method);
    }
    hyp__page_table_end(p);
    static const char *const th[] = {"#", "track", "occupations", "co-locations", "offset [hPa]", "sigma [hPa]",
                                     "drift [hPa/h]", "sigma [hPa/h]"};
    hyp__page_section(p, "tracks", "Tracks");
    hyp__page_table(p, NULL, th, 8);
    for (size_t k = 0; k < r->n_tracks; k++) {
        const hyp_network_track *t = &r->tracks[k];
        if (t->raw == 2) {   /* a loop: the weather nodes take its index */
            hyp__page_out(p, "<tr><td>%z</td><td>%t</td><td>%z</td><td>%z</td><td colspan=\"4\">loop without a base: "
                             "the weather (with the index) solved at each occupation</td></tr>\n", k + 1, t->name,
                          t->occupations, t->colocations);
            continue;
        }
        hyp__page_out(p, "<tr><td>%z</td><td>%t</td><td>%z</td><td>%z</td><td>%+.3f</td><td>%.3f</td><td>%+.3f</td>"
                         "<td>%.3f</td></tr>\n", k + 1, t->name, t->occupations, t->colocations, t->offset_pa / 100.0,
                      t->offset_sigma_pa / 100.0, t->drift_pa_per_h / 100.0, t->drift_sigma_pa_per_h / 100.0);
    }
    hyp__page_table_end(p);
    static const char *const oh[] = {"station", "track", "start", "w", "residual [m]", "why"};
    hyp__page_section(p, "flagged", "Rejected and failing observations");
    hyp__page_table(p, NULL, oh, 6);
    for (size_t i = 0; i < r->n_obs; i++) {
        const hyp_network_obs *o = &r->obs[i];
        if (!o->rejected && !(o->used && o->flag[0]))
            continue;
        hyp__page_out(p, "<tr><td>%t</td><td>%t</td><td>%T</td><td>%+.2f</td><td>%+.3f</td><td>%t</td></tr>\n",
                      o->kind == HYP_OBS_OCCUPATION || o->kind == HYP_OBS_CONTROL || o->kind == HYP_OBS_LEAPFROG ||
                      o->kind == HYP_OBS_SIDE_BY_SIDE || o->kind == HYP_OBS_LOOP ? r->stations.name[o->station] : "",
                      o->kind != HYP_OBS_CONTROL ? r->tracks[o->track].name : "", o->start_s, o->w, o->residual_m, o->flag);
    }
    hyp__page_table_end(p);
    hyp__page_section(p, "warnings", "Warnings and notes");
    for (size_t i = 0; i < r->msgs.count; i++)
        hyp__page_out(p, "<p>%t%s%t</p>\n", r->msgs.items[i].file ? r->msgs.items[i].file : "",
                      r->msgs.items[i].file ? ": " : "", r->msgs.items[i].text);
}

hyp_status hyp_network_write_html(FILE *f, const hyp_network_result *r, const hyp_report_info *info, hyp_error *err)
{
    hyp__page p;
    hyp__page_init(&p, 0);
    hyp__page_begin(&p, "Station network");
    hyp__page_out(&p, "<h1>Station heights: %z stations, %z tracks</h1>\n<p>Heights in %t, adjusted as one network.</p>\n",
                  r->stations.count, r->n_tracks, hyp_vref_name(r->out_ref));
    hyp__page_section(&p, "figures", "The network");
    hyp_status st = HYP_OK;
    hyp__page_figure(&p);
    st = fig_plan(&p, r, err);
    hyp__page_figure_end(&p, "Stations in plan (an equirectangular plan from the stations' centre); dashed lines: each "
                             "track's path between the stations it occupied; crosses: occupations rejected by the w-test.");
    if (!st) {
        hyp__page_figure(&p);
        st = fig_sigmas(&p, r, err);
        hyp__page_figure_end(&p, "Two sigma of each adjusted height (circles: determined; squares: control).");
    }
    if (!st)
        st = fig_residuals(&p, r, err);
    if (!st) {
        hyp__page_figure(&p);
        st = fig_repeats(&p, r, err);
        hyp__page_figure_end(&p, "Stations occupied more than once: each occupation's own height minus the adjusted one.");
    }
    if (!st) {
        hyp__page_figure(&p);
        st = fig_tracks(&p, r, err);
        hyp__page_figure_end(&p, "Each track's offset (rover minus base at its start) and drift, as adjusted.");
    }
    if (!st) {
        tables(&p, r);
        char tool[64];
        snprintf(tool, sizeof tool, "hypsolev %s (library)", HYPSOLEV_VERSION);
        hyp__page_colophon(&p, info && info->tool ? info->tool : tool, info ? info->command_line : NULL);
        hyp__page_end(&p);
        st = hyp__page_status(&p, err);
    }
    if (!st)
        st = hyp__page_write(&p, f, err);
    hyp__page_free(&p);
    return st;
}
