/* survey_rover.c - one rover's run: read, choose its bases, prepare the
 * heights and positions the outputs need, correct, convert, and write
 * every output through one all-or-nothing output set. */
#define _GNU_SOURCE
#include "survey_int.h"
#include "hypsolev/vertical.h"
#include "hypsolev/writers.h"
#include "output_set.h"
#include "writers_int.h"
#include "report_html.h"
#include "report_page.h"
#include "baro_altitude.h"
#include "waypoint_heights.h"

#include <math.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

typedef struct hyp__rover_priv priv_t;

void hyp_rover_run_free(hyp_rover_run *r)
{
    if (!r)
        return;
    hyp_correct_result_free(&r->result);
    hyp__waypoint_heights_free(&r->waypoints);
    hyp_msgs_free(&r->msgs);
    priv_t *p = r->priv;
    if (p) {
        hyp__log_free(&p->rv);
        hyp_geo_close(p->geo);
        free(p->own_known);
        free(p->own_out);
        free(p->east);
        free(p->north);
        free(p->baro);
        for (int k = 0; k < 4; k++)
            free(p->paths[k]);
        free(p);
    }
    free(r);
}

static hyp_rover_run *run_new(const char *path)
{
    hyp_rover_run *r = calloc(1, sizeof *r);
    if (!r || !(r->priv = calloc(1, sizeof *r->priv))) {
        free(r);
        return NULL;
    }
    r->path = path;
    hyp__stem(path, r->name, sizeof r->name);
    hyp_msgs_init(&r->msgs);
    hyp_error_clear(&r->error);
    hyp_correct_result_init(&r->result);
    hyp_gpx_doc_init(&r->priv->rv.doc);
    hyp_series_init(&r->priv->rv.csv);
    return r;
}

/* The track's heights in reference `to`: the series' own array when they
 * are in it already (no copy), else a converted copy in *own. */
static hyp_status track_heights(const hyp_survey *sv, priv_t *p, hyp_vref to, const float **out, float **own,
                                hyp_error *err)
{
    const hyp_series *s = hyp__log_series(&p->rv);
    if (to == sv->o.gnss_ref) {
        *out = s->ele_m;
        return HYP_OK;
    }
    if (!(*own = malloc((s->count ? s->count : 1) * sizeof(float))))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    *out = *own;
    const double *gh = p->rv.is_gpx && p->rv.doc.has_geoidheight ? p->rv.doc.geoidheight_m : NULL;
    return hyp_track_heights(p->geo, s, gh, sv->o.gnss_ref, to, *own, err);
}

/* GNSS heights in the known and the output reference, and projected
 * positions when a CRS is asked for. */
static hyp_status prepare_extras(const hyp_survey *sv, hyp_rover_run *r, const float **gnss_known, hyp_error *err)
{
    priv_t *p = r->priv;
    const hyp_series *s = hyp__log_series(&p->rv);
    hyp_status st = track_heights(sv, p, sv->o.known_ref, gnss_known, &p->own_known, err);
    if (!st && sv->o.out_ref == sv->o.known_ref)
        r->gnss_out_m = *gnss_known;   /* the same heights: one array */
    else if (!st)
        st = track_heights(sv, p, sv->o.out_ref, &r->gnss_out_m, &p->own_out, err);
    if (st || !sv->o.crs)
        return st;
    double la = NAN, lo = NAN;
    for (size_t i = 0; i < s->count && la != la; i++)
        if (hyp_series_lat(s, i) == hyp_series_lat(s, i))
            la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
    st = hyp_geo_set_crs(p->geo, sv->o.crs, la, lo, r->crs_name, sizeof r->crs_name, err);
    if (st)
        return st;
    size_t n = s->count ? s->count : 1;
    p->east = malloc(n * sizeof(double));
    p->north = malloc(n * sizeof(double));
    if (!p->east || !p->north)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < s->count; i++)
        if (hyp_geo_project(p->geo, hyp_series_lat(s, i), hyp_series_lon(s, i), &p->east[i], &p->north[i]))
            p->east[i] = p->north[i] = NAN;
    r->easting_m = p->east;
    r->northing_m = p->north;
    return HYP_OK;
}

void hyp__rover_read_opts(const hyp_survey *sv, const char *rover, hyp_read_opts *ro)
{
    const hyp__rover_own *own = hyp__rover_own_find(sv, rover);
    *ro = sv->o.read;
    ro->zone = &sv->rover_zone;
    ro->need_position = 1;
    if (!own)
        return;
    /* the rover's own settings where it has them, else the survey's */
    const hyp_rover_spec *r = &own->spec;
    if (r->pressure_unit)
        ro->pressure_unit = r->pressure_unit;
    if (r->temperature_unit)
        ro->temperature_unit = r->temperature_unit;
    if (r->pressure_field)
        ro->pressure_field = r->pressure_field;
    if (r->temperature_field)
        ro->temperature_field = r->temperature_field;
    if (r->humidity_field)
        ro->humidity_field = r->humidity_field;
    if (r->time_zone)
        ro->zone = &own->zone;
}

/* A rover of barometric altitudes (read as pressures with the reference
 * 1013.25 hPa): its quantisation and re-settings, kept for the budget. */
static hyp_status join_altitudes(hyp_rover_run *r, hyp_error *err)
{
    priv_t *p = r->priv;
    if (!p->rv.is_gpx)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: --baro-altitude reads GPX tracks only (this is a CSV log)", r->path);
    if (!(p->baro = calloc(1, sizeof *p->baro)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    return hyp__baro_join(&p->rv.doc.pts, r->path, p->baro, &r->msgs, err);
}

/* A barometric-altitude rover's pressures are the true ones times P0 / ref
 * (ref the recorder's unknown reference): a first correction calibrates
 * the offset in Pa, which gives ref; the pressures rescaled by it leave
 * the second correction only the sensor's own offset to calibrate, so the
 * offset no longer varies with height as p / ref (docs/methods.md). Its
 * messages are the second's; the first's are dropped. */
static hyp_status baro_reference(const hyp_survey *sv, hyp_rover_run *r, const hyp_base *bases, size_t nb,
                                 hyp_correct_opts *co, hyp_error *err)
{
    priv_t *p = r->priv;
    hyp_msgs first;
    hyp_msgs_init(&first);
    /* the survey's own offset: the network holds it at 0 in *co to solve
     * it, but the reference is the recorder's and is found as in correct */
    hyp_correct_opts c1 = *co;
    c1.offset_pa = sv->copts.offset_pa;
    c1.offset_sigma_pa = sv->copts.offset_sigma_pa;
    hyp_status st = hyp_correct(r->rover, bases, nb, &c1, &r->result, &first, err);
    hyp_msgs_free(&first);
    if (st)
        return st;
    hyp_drift_kind k = r->result.drift.kind;   /* calibrated, not given (--offset, or the network's 0) */
    if (k == HYP_DRIFT_CONSTANT || k == HYP_DRIFT_LINEAR || k == HYP_DRIFT_PIECEWISE || k == HYP_DRIFT_GNSS)
        hyp__baro_rescale(&p->rv.doc.pts, &r->result, p->baro, r->path, &r->msgs);
    /* rescaled: the sensor's own offset is left as a scale; not: the
     * reference's departure from 1013.25 hPa itself */
    co->baro_offset_sigma_pa = p->baro->ref_pa == p->baro->ref_pa ? HYP__BARO_SENSOR_SIGMA_PA : HYP__BARO_REF_SIGMA_PA;
    hyp_correct_result_free(&r->result);
    hyp_correct_result_init(&r->result);
    return HYP_OK;
}

/* Read the rover, choose its bases, correct it, convert its heights. */
static hyp_status correct_rover(hyp_survey *sv, const hyp_correct_opts *copts, hyp_rover_run *r, int threads,
                                hyp_error *err)
{
    priv_t *p = r->priv;
    hyp_read_opts ro;
    hyp__rover_read_opts(sv, r->path, &ro);
    hyp_status st = p->geo ? HYP_OK : hyp_geo_open(&p->geo, err);   /* a batch lends its worker's */
    if (!st)
        st = hyp__log_read(r->path, &ro, &p->rv, &r->msgs, err);
    if (st)
        return st;
    hyp__rover_clock_apply(hyp__rover_own_find(sv, r->path), &p->rv);
    if (ro.baro_altitude_field && (st = join_altitudes(r, err)))
        return st;
    r->rover = hyp__log_series(&p->rv);
    r->rover_pressure_unit = p->rv.punit;
    size_t sel[HYP_MAX_BASES], nb = 0;
    hyp_base bases[HYP_MAX_BASES];
    if ((st = hyp__select_bases(sv, r->rover, sel, &nb, err)))
        return st;
    for (size_t k = 0; k < nb; k++) {
        const hyp__pool_base *pb = &sv->pool[sel[k]];
        hyp_base_used *u = &r->bases[k];
        u->path = pb->path;
        u->log = hyp__log_series(&pb->log);
        u->pressure_unit = pb->log.punit;
        u->height_m = pb->spec.height_m;
        u->lat_deg = pb->spec.lat_deg;
        u->lon_deg = pb->spec.lon_deg;
        u->clock_offset_s = pb->spec.clock_offset_s;
        u->kind = pb->spec.kind;
        hyp_base_init(&bases[k], u->log, u->path, u->height_m);
        bases[k].lat_deg = u->lat_deg;
        bases[k].lon_deg = u->lon_deg;
        bases[k].clock_offset_s = u->clock_offset_s;
        bases[k].offset_pa = pb->spec.offset_pa;
        bases[k].offset_sigma_pa = pb->spec.offset_sigma_pa;
        bases[k].kind = u->kind;
    }
    r->n_bases = nb;
    const float *gnss_known = NULL;
    if ((st = prepare_extras(sv, r, &gnss_known, err)))
        return st;
    hyp_correct_opts co = *copts;
    co.waypoints = p->rv.is_gpx ? &p->rv.doc.wpts : NULL;
    co.gnss_height_m = gnss_known;
    co.threads = threads;
    if (p->baro) {
        co.rover_quant_pa = p->baro->quant_pa;
        co.baro_steps = p->baro->steps;
        co.n_baro_steps = p->baro->n_steps;
    }
    if (p->baro && (st = baro_reference(sv, r, bases, nb, &co, err)))
        return st;
    st = hyp_correct(r->rover, bases, nb, &co, &r->result, &r->msgs, err);
    if (!st)
        st = hyp_heights_convert(p->geo, r->rover, r->result.height_m, sv->o.known_ref, sv->o.out_ref, err);
    if (!st && p->rv.is_gpx)   /* in the output reference, as the track */
        st = hyp__waypoint_heights(&p->rv.doc.wpts, r->rover, &r->result, &r->waypoints, err);
    return st;
}

/* Outputs that exist already: with a folder of outputs and no overwrite,
 * the rover is skipped (reported, not an error). */
static int outputs_exist(const hyp__rover_paths *ps, char *which, size_t n)
{
    const char *p[3] = {ps->gpx, ps->table, ps->report};
    for (int k = 0; k < 3; k++) {
        struct stat sb;
        if (p[k][0] && strcmp(p[k], "-") != 0 && stat(p[k], &sb) == 0) {
            snprintf(which, n, "%s exists (--overwrite replaces it)", p[k]);
            return 1;
        }
    }
    return 0;
}

static hyp_status check_dir(const char *path, hyp_error *err)
{
    if (!path[0] || strcmp(path, "-") == 0)
        return HYP_OK;
    struct stat sb;
    char dir[4096];
    snprintf(dir, sizeof dir, "%s", path);
    char *slash = strrchr(dir, '/');
    if (slash)
        *slash = '\0';
    if (stat(path, &sb) == 0 && S_ISDIR(sb.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected an output file name", path);
    if (stat(slash ? (dir[0] ? dir : "/") : ".", &sb) != 0 || !S_ISDIR(sb.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot write: the directory does not exist", path);
    return HYP_OK;
}

static void note_written(hyp_rover_run *r, const char *path)
{
    char *c = strdup(path);
    if (c && r->n_written < 4) {
        r->priv->paths[r->n_written] = c;
        r->written[r->n_written++] = c;
    } else
        free(c);
}

/* The report: HTML when its name ends in .html, else the rover's whole
 * text, as the summary prints it. */
static hyp_status stage_report(hyp__outset *set, const hyp_rover_run *r, const char *path, hyp_error *err)
{
    hyp__outfile *o = hyp__outset_add(set, path, err);
    if (!o)
        return err->status;
    size_t n = strlen(path);
    if (n >= 5 && strcasecmp(path + n - 5, ".html") == 0)
        return hyp_rover_run_write_html(o->f, r, r->priv->report_info, err);
    hyp_rover_run_write_text(o->f, r, HYP_TEXT_ALL);
    return HYP_OK;
}

/* An HTML report drawn in a thread of its own while the GPX and the table
 * are written (its figures walk the whole track: on a long one that is
 * most of its cost); into memory, then copied into its staging file. */
typedef struct html_job {
    const hyp_rover_run *r;
    hyp__page page;
    hyp_status st;
    hyp_error err;
} html_job;

static void *html_thread(void *arg)
{
    html_job *j = arg;
    j->st = hyp__rover_html_build(&j->page, j->r, j->r->priv->report_info, &j->err);
    return NULL;
}

static int is_html(const char *path)
{
    size_t n = strlen(path);
    return n >= 5 && strcasecmp(path + n - 5, ".html") == 0;
}

/* The GPX and the table, staged; the report beside them; one commit, or
 * (keep) the staged set handed to the caller's group commit. */
static hyp_status write_outputs(hyp_survey *sv, hyp_rover_run *r, const hyp__rover_paths *ps, int threads,
                                hyp__outset *keep, hyp_error *err)
{
    priv_t *p = r->priv;
    hyp_output_info info = {.vref = hyp_vref_name(sv->o.out_ref), .gnss_m = r->gnss_out_m, .easting_m = r->easting_m,
                            .northing_m = r->northing_m, .crs_name = r->crs_name, .threads = threads};
    hyp__outset set;
    hyp__outset_init(&set);
    hyp_status st = HYP_OK;
    /* the report lists what is written: named before it is drawn */
    if (ps->gpx[0])
        note_written(r, ps->gpx);
    if (ps->table[0])
        note_written(r, ps->table);
    html_job job = {.r = r};
    hyp__page_init(&job.page, 0);
    pthread_t tid;
    int threaded = ps->report[0] && is_html(ps->report) && threads >= 2 &&
                   pthread_create(&tid, NULL, html_thread, &job) == 0;
    if (ps->gpx[0]) {
        hyp__outfile *o = hyp__outset_add(&set, ps->gpx, err);
        st = !o ? err->status
             : p->rv.is_gpx ? hyp__gpx_splice_to(r->path, &p->rv.doc, &r->result, &r->waypoints, &info, o, err)
                            : hyp__gpx_new_to(&p->rv.csv, &r->result, &info, r->name, o, err);
    }
    if (!st && ps->table[0]) {
        hyp__outfile *o = hyp__outset_add(&set, ps->table, err);
        st = !o ? err->status
             : hyp__table_to(r->rover, &r->result, &info, p->rv.is_gpx ? &p->rv.doc : NULL, &r->waypoints, o, err);
    }
    if (threaded) {
        pthread_join(tid, NULL);
        hyp__outfile *o = st ? NULL : hyp__outset_add(&set, ps->report, err);
        if (!st && !o)
            st = err->status;
        if (!st && job.st)
            st = hyp_error_set(err, job.st, "%s", job.err.message);
        if (!st)
            st = hyp__page_write(&job.page, o->f, err);
    } else if (!st && ps->report[0])
        st = stage_report(&set, r, ps->report, err);
    hyp__page_free(&job.page);
    if (!st && keep) {
        if (!(st = hyp__outset_stage(&set, err)))
            *keep = set;
    } else if (!st)
        st = hyp__outset_commit(&set, sv->o.cancelled, sv->o.cancel_ctx, err);
    else
        hyp__outset_abort(&set);
    if (st) {
        for (size_t k = 0; k < r->n_written; k++)
            r->written[k] = NULL;
        r->n_written = 0;
    }
    return st;
}

/* A failed rover still gets its report (what went wrong), on its own, but
 * never over an existing file: that may be the report of an earlier run
 * whose outputs this failure leaves in place. */
static void failure_report(hyp_survey *sv, hyp_rover_run *r, const char *path)
{
    struct stat sb;
    if (stat(path, &sb) == 0)
        return;
    hyp__outset set;
    hyp__outset_init(&set);
    hyp_error e;
    hyp_status st = stage_report(&set, r, path, &e);
    if (st)
        hyp__outset_abort(&set);
    if (st || hyp__outset_commit(&set, sv->o.cancelled, sv->o.cancel_ctx, &e))
        hyp_msgs_add_at(&r->msgs, HYP_WARNING, "output", path, 0, "the report of the failed run could not be written: %s",
                        e.message);
}

hyp_status hyp_survey_run(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                          hyp_rover_run **run, hyp_error *err)
{
    return hyp__survey_run_with(sv, rover, out, threads, &sv->copts, run, err);
}

static hyp_status run_rover(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                            const hyp_correct_opts *copts, hyp_rover_run **run, hyp__outset *keep, hyp_geo **lent,
                            hyp_error *err);

hyp_status hyp__survey_run_with(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                const hyp_correct_opts *copts, hyp_rover_run **run, hyp_error *err)
{
    return run_rover(sv, rover, out, threads, copts, run, NULL, NULL, err);
}

hyp_status hyp__survey_run_staged(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                  hyp_rover_run **run, struct hyp__outset *staged, hyp_error *err)
{
    hyp__outset_init(staged);
    return run_rover(sv, rover, out, threads, &sv->copts, run, staged, NULL, err);
}

hyp_status hyp__survey_run_lent(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                                hyp_geo **geo, hyp_rover_run **run, struct hyp__outset *staged, hyp_error *err)
{
    hyp__outset_init(staged);
    hyp_status st = run_rover(sv, rover, out, threads, &sv->copts, run, staged, geo, err);
    if (*run && (*run)->priv && !*geo) {   /* taken back: the outputs are staged */
        *geo = (*run)->priv->geo;
        (*run)->priv->geo = NULL;
    }
    return st;
}

hyp_status hyp__rover_geo_reopen(const hyp_rover_run *r, hyp_error *err)
{
    priv_t *p = r->priv;
    if (!p || p->geo || !r->easting_m || !p->sv || !p->sv->o.crs)
        return HYP_OK;
    const hyp_series *s = r->rover;
    double la = NAN, lo = NAN;
    for (size_t i = 0; s && i < s->count && la != la; i++)   /* as prepare_extras chose the zone */
        if (hyp_series_lat(s, i) == hyp_series_lat(s, i))
            la = hyp_series_lat(s, i), lo = hyp_series_lon(s, i);
    char name[sizeof r->crs_name];
    hyp_status st = hyp_geo_open(&p->geo, err);
    if (!st)
        st = hyp_geo_set_crs(p->geo, p->sv->o.crs, la, lo, name, sizeof name, err);
    if (st) {
        hyp_geo_close(p->geo);
        p->geo = NULL;
    }
    return st;
}

void hyp__rover_run_unwritten(hyp_rover_run *r, const hyp_error *why)
{
    r->status = why->status;
    r->error = *why;
    r->test_failed = 0;
    for (size_t k = 0; k < r->n_written; k++)
        r->written[k] = NULL;
    r->n_written = 0;
}

static hyp_status run_rover(hyp_survey *sv, const char *rover, const hyp_outputs *out, int threads,
                            const hyp_correct_opts *copts, hyp_rover_run **run, hyp__outset *keep, hyp_geo **lent,
                            hyp_error *err)
{
    hyp_outputs none = {0};
    if (!out)
        out = &none;
    hyp_rover_run *r = *run = run_new(rover);
    if (!r)
        return hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", rover);
    if (lent && *lent) {   /* its PROJ set-up (geoid, last CRS) made by an earlier rover */
        r->priv->geo = *lent;
        *lent = NULL;
    }
    r->gnss_ref = sv->o.gnss_ref;
    r->known_ref = sv->o.known_ref;
    r->out_ref = sv->o.out_ref;
    r->rapid_pa_per_s = sv->copts.rapid_pa_per_s;
    r->priv->sv = sv;
    r->priv->report_info = out->report_info;
    hyp__rover_paths ps;
    hyp__rover_paths_make(out, rover, &ps);
    const char *targets[3] = {ps.gpx, ps.table, ps.report};
    for (int k = 0; k < 3; k++)
        if (targets[k][0] && strcmp(targets[k], "-") != 0)
            hyp__survey_clean_dir(sv, targets[k]);
    if (threads <= 0)
        threads = sv->o.threads > 0 ? sv->o.threads : 1;
    hyp_status st = HYP_OK;
    for (int k = 0; k < 3 && !st; k++)
        if (targets[k][0] && strcmp(targets[k], "-") != 0 && hyp__survey_is_input(sv, targets[k], &rover, 1))
            st = hyp_error_set(&r->error, HYP_ERR_USAGE, "%s: output would overwrite an input; choose another name", targets[k]);
    if (!st)
        st = correct_rover(sv, copts, r, threads, &r->error);
    r->test_failed = !st && r->result.calib_test.failed;
    for (int k = 0; !st && k < 3; k++)
        st = check_dir(targets[k], &r->error);
    if (!st && out->dir && !out->overwrite && outputs_exist(&ps, r->error.message, sizeof r->error.message)) {
        r->skipped = 1;
        hyp__rover_display_apply(sv, r);
        return HYP_OK;
    }
    if (!st)
        st = write_outputs(sv, r, &ps, threads, keep, &r->error);
    r->status = st;
    if (st) {
        r->test_failed = 0;
        r->error.status = st;
        if (ps.report[0] && !(sv->o.cancelled && sv->o.cancelled(sv->o.cancel_ctx)))
            failure_report(sv, r, ps.report);
    }
    hyp__rover_display_apply(sv, r);
    (void)err;
    return HYP_OK;
}
