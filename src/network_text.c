/* network_text.c - what a network run writes: the summary (counts, the
 * tests, rejections, per track the offset and drift, repeat differences,
 * the cautions), the stations table, the stations as GPX waypoints, the
 * observations table; all of a run's outputs in one output set. */
#define _GNU_SOURCE
#include "network_int.h"
#include "output_set.h"
#include "text_safe.h"
#include "hypsolev/writers.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

static const char *kind_name(hyp_obs_kind k)
{
    return k == HYP_OBS_OCCUPATION ? "occupation" : k == HYP_OBS_COLOCATION ? "co-location"
         : k == HYP_OBS_CONTROL ? "control" : k == HYP_OBS_DRIFT_PRIOR ? "drift prior"
         : k == HYP_OBS_LEAPFROG ? "leapfrog" : k == HYP_OBS_SIDE_BY_SIDE ? "side by side"
         : k == HYP_OBS_LOOP ? "loop" : k == HYP_OBS_WEATHER_STEP ? "weather step" : "index prior";
}

/* The unit of an observation's value, sigma and residual. */
static const char *kind_unit(hyp_obs_kind k)
{
    return k == HYP_OBS_DRIFT_PRIOR ? "Pa/h" : k == HYP_OBS_WEATHER_STEP || k == HYP_OBS_INDEX_PRIOR ? "Pa" : "m";
}

/* Observations with a station and a window (the others: control, priors). */
static int has_station(hyp_obs_kind k)
{
    return k == HYP_OBS_OCCUPATION || k == HYP_OBS_CONTROL || k == HYP_OBS_LEAPFROG || k == HYP_OBS_SIDE_BY_SIDE ||
           k == HYP_OBS_LOOP;
}

static const char *source_name(hyp_occ_source s)
{
    return s == HYP_OCC_BOOK ? "field book" : s == HYP_OCC_FOUND ? "found" : "waypoint";
}

/* A number with its decimals, or "" where there is none (never "nan"). */
static void num(FILE *f, double v, int prec)
{
    if (v == v && isfinite(v))
        fprintf(f, "%.*f", prec, v);
}

static void csv_text(FILE *f, const char *s)
{
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"')
            fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

static void write_stations_csv(FILE *f, const hyp_network_result *r)
{
    fputs("name,lat,lon,height,sigma,occupations_used,occupations_rejected,control,max_abs_w,"
          "free_air_sigma_mgal,bouguer_sigma_mgal,vertical_ref,method\n", f);
    for (size_t s = 0; s < r->stations.count; s++) {
        const hyp_network_station *t = &r->st[s];
        csv_text(f, r->stations.name[s]);
        fprintf(f, ",%.8f,%.8f,", r->stations.lat_deg[s], r->stations.lon_deg[s]);
        num(f, t->height_m, 3);
        fputc(',', f);
        num(f, t->sigma_m, 3);
        fprintf(f, ",%zu,%zu,%s,", t->used, t->rejected, t->control ? "yes" : "no");
        num(f, t->max_abs_w, 2);
        fputc(',', f);
        num(f, t->free_air_mgal, 3);
        fputc(',', f);
        num(f, t->bouguer_mgal, 3);
        fprintf(f, ",%s,%s\n", hyp_vref_name(r->out_ref), t->method);
    }
}

static void write_obs_csv(FILE *f, const hyp_network_result *r)
{
    fputs("kind,station,rover,start,end,samples,source,observed,sigma,residual,standardized_residual,redundancy,"
          "fieldbook_line,flag,station2,rover2\n", f);
    for (size_t i = 0; i < r->n_obs; i++) {
        const hyp_network_obs *o = &r->obs[i];
        char a[40] = "", b[40] = "";
        if (o->kind != HYP_OBS_CONTROL && o->kind != HYP_OBS_DRIFT_PRIOR && o->kind != HYP_OBS_INDEX_PRIOR) {
            hyp_time_format(o->start_s, a, sizeof a);
            hyp_time_format(o->end_s, b, sizeof b);
        }
        fprintf(f, "%s,", kind_name(o->kind));
        if (has_station(o->kind))
            csv_text(f, r->stations.name[o->station]);
        fputc(',', f);
        if (o->kind != HYP_OBS_CONTROL)
            csv_text(f, r->tracks[o->track].name);
        fprintf(f, ",%s,%s,%zu,%s,", a, b, o->samples,
                o->kind == HYP_OBS_OCCUPATION || o->kind == HYP_OBS_LEAPFROG || o->kind == HYP_OBS_SIDE_BY_SIDE ||
                o->kind == HYP_OBS_LOOP ? source_name(o->source) : "");
        num(f, o->observed_m, 3);
        fputc(',', f);
        num(f, o->sigma_m, 3);
        fputc(',', f);
        num(f, o->residual_m, 3);
        fputc(',', f);
        num(f, o->w, 2);
        fputc(',', f);
        num(f, o->redundancy, 3);
        fputc(',', f);
        if (o->line)
            fprintf(f, "%u", o->line);
        fputc(',', f);
        csv_text(f, o->flag);
        fputc(',', f);
        if ((o->kind == HYP_OBS_LEAPFROG || o->kind == HYP_OBS_SIDE_BY_SIDE) && o->station2 != SIZE_MAX) {
            csv_text(f, r->stations.name[o->station2]);
            fputc(',', f);
            csv_text(f, r->tracks[o->track2].name);
        } else
            fputc(',', f);
        fputc('\n', f);
    }
}

/* GPX 1.1 waypoints (ele, name, then extensions: the schema's order). */
static void write_gpx(FILE *f, const hyp_network_result *r)
{
    fprintf(f, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
               "<gpx version=\"1.1\" creator=\"hypsolev\" xmlns=\"http://www.topografix.com/GPX/1/1\" xmlns:%s=\"%s\">\n"
               "  <metadata><extensions><%s:vertical_ref>%s</%s:vertical_ref></extensions></metadata>\n",
            HYP_GPX_PREFIX, HYP_GPX_NS, HYP_GPX_PREFIX, hyp_vref_name(r->out_ref), HYP_GPX_PREFIX);
    hyp__buf name;
    for (size_t s = 0; s < r->stations.count; s++) {
        const hyp_network_station *t = &r->st[s];
        if (!(t->height_m == t->height_m))
            continue;
        hyp__buf_init(&name, 1024);
        hyp__xml_escape(&name, r->stations.name[s]);
        fprintf(f, "  <wpt lat=\"%.8f\" lon=\"%.8f\"><ele>%.3f</ele><name>%s</name><extensions>", r->stations.lat_deg[s],
                r->stations.lon_deg[s], t->height_m, name.data ? name.data : "");
        if (t->sigma_m == t->sigma_m)
            fprintf(f, "<%s:sigma>%.3f</%s:sigma>", HYP_GPX_PREFIX, t->sigma_m, HYP_GPX_PREFIX);
        fprintf(f, "<%s:control>%s</%s:control></extensions></wpt>\n", HYP_GPX_PREFIX, t->control ? "yes" : "no",
                HYP_GPX_PREFIX);
        hyp__buf_free(&name);
    }
    fputs("</gpx>\n", f);
}

static void text_tests(FILE *f, const hyp_network_result *r)
{
    fprintf(f, "  network   %zu observations used, %zu unknowns, %zu degrees of freedom\n", r->n_used, r->n_unknowns, r->dof);
    if (r->global_pass < 0)
        fprintf(f, "  global    no test: no redundancy (every observation is needed)\n");
    else
        fprintf(f, "  global    variance factor %.3f (sum of weighted squared residuals %.2f, two-sided chi-square test at "
                   "alpha %g: %.2f to %.2f): %s\n", r->s0_sq, r->vtpv, r->alpha_global, r->chi2_lower, r->chi2_upper,
                r->global_pass ? "passed" : r->vtpv > r->chi2_upper ? "FAILED (the observations scatter more than their sigmas say)"
                                                                   : "below the lower bound: the sigmas are larger than the "
                                                                     "scatter (cautious; reported, not failed)");
    fprintf(f, "  sigmas    %s\n", r->scaled ? "a-posteriori: scaled by the variance factor (the global test's upper side failed)"
                                             : "a-priori (from the error budgets; not scaled)");
    fprintf(f, "  w-test    Baarda's, alpha %g, critical |w| %.2f; data snooping: %zu observation(s) rejected\n", r->alpha_w,
            r->w_crit, r->n_rejected);
    size_t beside = 0;
    for (size_t i = 0; i < r->n_obs; i++) {
        const hyp_network_obs *o = &r->obs[i];
        if (!o->rejected && !(o->used && o->flag[0])) {
            beside += o->flag[0] != 0;   /* not used: listed in --residuals */
            continue;
        }
        char a[40];
        hyp_time_format(o->start_s, a, sizeof a);
        if (o->kind == HYP_OBS_OCCUPATION)
            fprintf(f, "            %s by %s from %s (%s", r->stations.name[o->station], r->tracks[o->track].name, a,
                    source_name(o->source));
        else if (o->kind == HYP_OBS_CONTROL)
            fprintf(f, "            control height of %s (%.3f m", r->stations.name[o->station], o->observed_m);
        else if (o->kind == HYP_OBS_COLOCATION)
            fprintf(f, "            co-location of %s from %s (with the base", r->tracks[o->track].name, a);
        else if (o->kind == HYP_OBS_LEAPFROG || o->kind == HYP_OBS_SIDE_BY_SIDE)
            fprintf(f, "            %s %s by %s - %s by %s from %s (%s", kind_name(o->kind), r->stations.name[o->station],
                    r->tracks[o->track].name, o->station2 != SIZE_MAX ? r->stations.name[o->station2] : "",
                    r->tracks[o->track2].name, a, source_name(o->source));
        else if (o->kind == HYP_OBS_LOOP)
            fprintf(f, "            loop: %s by %s from %s (%s", r->stations.name[o->station], r->tracks[o->track].name, a,
                    source_name(o->source));
        else if (o->kind == HYP_OBS_WEATHER_STEP)
            fprintf(f, "            weather step of %s from %s (%.0f Pa", r->tracks[o->track].name, a, o->sigma_m);
        else if (o->kind == HYP_OBS_INDEX_PRIOR)
            fprintf(f, "            index prior of %s (%.0f Pa", r->tracks[o->track].name, o->sigma_m);
        else
            fprintf(f, "            drift prior of %s (%.0f Pa/h", r->tracks[o->track].name, o->sigma_m);
        if (o->line)
            fprintf(f, ", line %u", o->line);
        fprintf(f, "): ");
        if (o->w == o->w)
            fprintf(f, "w %+.2f, residual %+.3f %s; ", o->w, o->residual_m, kind_unit(o->kind));
        fprintf(f, "%s\n", o->flag);
    }
    if (beside)
        fprintf(f, "            %zu booked or found occupation(s) not used (beside the base, or too few samples: "
                   "--residuals lists them)\n", beside);
}

static void text_tracks(FILE *f, const hyp_network_result *r)
{
    for (size_t k = 0; k < r->n_tracks; k++) {
        const hyp_network_track *t = &r->tracks[k];
        if (t->status) {
            fprintf(f, "  track     %s: not used: %s\n", t->name, t->error);
            continue;
        }
        char a[40];
        hyp_time_format(t->t0_s, a, sizeof a);
        if (t->raw == 2) {
            fprintf(f, "  track     %s: loop without a base, %zu occupations; the weather (with the index) solved at "
                       "each\n", t->name, t->occupations);
            continue;
        }
        if (t->raw == 1)
            fprintf(f, "  track     %s: leapfrog without a base, %zu occupations in legs; index at %s %+.3f hPa +- "
                       "%.3f hPa, drift %+.3f hPa/h +- %.3f hPa/h\n", t->name, t->occupations, a, t->offset_pa / 100.0,
                    t->offset_sigma_pa / 100.0, t->drift_pa_per_h / 100.0, t->drift_sigma_pa_per_h / 100.0);
        if (t->raw)
            continue;
        fprintf(f, "  track     %s: %zu occupations, %zu co-locations; offset at %s %+.3f hPa +- %.3f hPa, "
                   "drift %+.3f hPa/h +- %.3f hPa/h\n", t->name, t->occupations, t->colocations, a, t->offset_pa / 100.0,
                t->offset_sigma_pa / 100.0, t->drift_pa_per_h / 100.0, t->drift_sigma_pa_per_h / 100.0);
    }
}

/* Repeat differences: the spread of a station's occupations, each its
 * adjusted height minus its residual (the occupation's own estimate). */
static void text_repeats(FILE *f, const hyp_network_result *r)
{
    int any = 0;
    for (size_t s = 0; s < r->stations.count; s++) {
        double lo = INFINITY, hi = -INFINITY;
        size_t n = 0;
        for (size_t i = 0; i < r->n_obs; i++) {
            const hyp_network_obs *o = &r->obs[i];
            if (o->kind != HYP_OBS_OCCUPATION || o->station != s || !o->used || !(o->residual_m == o->residual_m))
                continue;
            double e = -o->residual_m;   /* relative to the adjusted height */
            lo = e < lo ? e : lo, hi = e > hi ? e : hi, n++;
        }
        if (n < 2)
            continue;
        if (!any++)
            fprintf(f, "  repeats   stations occupied more than once: spread of the occupations' own heights\n");
        fprintf(f, "            %-12s %zu occupations, spread %.3f m\n", r->stations.name[s], n, hi - lo);
    }
}

void hyp_network_write_text(FILE *f, const hyp_network_result *r)
{
    size_t solved = 0, control = 0;
    for (size_t s = 0; s < r->stations.count; s++) {
        solved += r->st[s].height_m == r->st[s].height_m && !r->st[s].control;
        control += r->st[s].control && r->st[s].used;
    }
    fprintf(f, "hypsolev adjust: %zu stations in the file, %zu solved, %zu occupied control marks; heights in %s\n",
            r->stations.count, solved, control, hyp_vref_name(r->out_ref));
    text_tests(f, r);
    text_tracks(f, r);
    text_repeats(f, r);
    fprintf(f, "  stations  %-12s %10s %8s %5s %5s %7s %9s %9s  %s\n", "name", "height m", "sigma m", "used", "rej.",
            "max |w|", "FA mGal", "BG mGal", "method");
    for (size_t s = 0; s < r->stations.count; s++) {
        const hyp_network_station *t = &r->st[s];
        if (!(t->height_m == t->height_m))
            continue;
        fprintf(f, "            %-12s %10.3f %8.3f %5zu %5zu", r->stations.name[s], t->height_m, t->sigma_m, t->used,
                t->rejected);
        if (t->max_abs_w == t->max_abs_w)
            fprintf(f, " %7.2f", t->max_abs_w);
        else
            fprintf(f, " %7s", "-");
        fprintf(f, " %9.3f %9.3f  %s\n", t->free_air_mgal, t->bouguer_mgal, t->method);
    }
    fprintf(f, "            FA, BG: the sigma as a free-air (0.3086 mGal/m) and a Bouguer slab (0.1119 mGal/m at\n"
               "            2670 kg/m3) reduction error\n");
    fprintf(f, "  result    %s\n", r->tests_failed ? "a test failed: check the flagged observations (exit status 3)"
                                                   : "every test passed");
    fprintf(f, "  (not for aviation or navigation; survey deliverables defer to local codes and licensed surveyors)\n");
}

static const char *out_opts[4] = {"-o", "--gpx", "--residuals", "--report"};

hyp_status hyp_network_check_outputs(const hyp_survey *sv, const hyp_network_opts *o, const char *const *rovers,
                                     size_t n, const hyp_network_outputs *out, hyp_error *err)
{
    const char *paths[4] = {out->stations_csv, out->gpx, out->residuals_csv, out->report};
    for (int k = 0; k < 4; k++) {
        if (!paths[k])
            continue;
        if (!paths[k][0])
            return hyp_error_set(err, HYP_ERR_USAGE, "%s \"\": an output needs a file name", out_opts[k]);
        int dash = strcmp(paths[k], "-") == 0;
        for (int j = 0; j < k; j++)
            if (paths[j] && !dash && (strcmp(paths[j], paths[k]) == 0 || hyp_same_file(paths[j], paths[k])))
                return hyp_error_set(err, HYP_ERR_USAGE, "%s: named by both %s and %s; give each output its own name",
                                     paths[k], out_opts[j], out_opts[k]);
        if (!dash && (hyp__survey_is_input(sv, paths[k], rovers, n) ||
                      (o && o->stations_path && hyp_same_file(o->stations_path, paths[k])) ||
                      (o && o->fieldbook_path && hyp_same_file(o->fieldbook_path, paths[k]))))
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: %s would overwrite an input; choose another name", paths[k],
                                 out_opts[k]);
    }
    return HYP_OK;
}

hyp_status hyp_network_write(const hyp_survey *sv, const hyp_network_result *r, const hyp_network_outputs *out,
                             hyp_error *err)
{
    const char *paths[4] = {out->stations_csv, out->gpx, out->residuals_csv, out->report};
    hyp_network_opts no;
    hyp_network_opts_init(&no);
    no.stations_path = r->stations_path;
    no.fieldbook_path = r->fieldbook_path;
    const char **rovers = calloc(r->n_tracks + 1, sizeof *rovers);
    if (!rovers)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t k = 0; k < r->n_tracks; k++)
        rovers[k] = r->tracks[k].path;
    hyp_status st = hyp_network_check_outputs(sv, &no, rovers, r->n_tracks, out, err);
    free(rovers);
    if (st)
        return st;
    hyp__outset set;
    hyp__outset_init(&set);
    for (int k = 0; k < 4; k++) {
        if (!paths[k])
            continue;
        hyp__outfile *o = hyp__outset_add(&set, paths[k], err);
        if (!o) {
            hyp__outset_abort(&set);
            return err->status;
        }
        if (k == 0)
            write_stations_csv(o->f, r);
        else if (k == 1)
            write_gpx(o->f, r);
        else if (k == 2)
            write_obs_csv(o->f, r);
        else if (strlen(paths[k]) > 5 && !strcasecmp(paths[k] + strlen(paths[k]) - 5, ".html")) {
            hyp_status hs = hyp_network_write_html(o->f, r, out->report_info, err);
            if (hs) {
                hyp__outset_abort(&set);
                return hs;
            }
        } else {
            hyp_msgs_write(o->f, &r->msgs, HYP_NOTE);
            hyp_network_write_text(o->f, r);
        }
    }
    return hyp__outset_commit(&set, sv->o.cancelled, sv->o.cancel_ctx, err);
}
