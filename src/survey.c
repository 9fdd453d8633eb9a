/* survey.c - a survey run: the options and bases of a survey, and one
 * rover's run from its file to its committed outputs. The orchestration
 * every client needs lives here; the science stays in the core. */
#define _GNU_SOURCE
#include "survey_int.h"
#include "hypsolev/inspect.h"
#include "hypsolev/vertical.h"
#include "hypsolev/writers.h"
#include "output_set.h"
#include "writers_int.h"

#include <errno.h>
#include <libgen.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

void hyp_base_spec_init(hyp_base_spec *b, const char *path, double height_m)
{
    memset(b, 0, sizeof *b);
    b->path = path;
    b->height_m = height_m;
    b->lat_deg = b->lon_deg = NAN;
    b->kind = HYP_BASE_STATION;
    b->offset_pa = NAN;
}

void hyp_survey_opts_init(hyp_survey_opts *o)
{
    memset(o, 0, sizeof *o);
    hyp_correct_opts_init(&o->correct);
    hyp_read_opts_init(&o->read);
    o->benchmark_sigma_m = 0.01;
    o->gnss_ref = o->known_ref = o->out_ref = HYP_VREF_GEOID;
    o->check_bases = 1;
}

void hyp_outputs_init(hyp_outputs *o)
{
    memset(o, 0, sizeof *o);
}

int hyp_exit_status(hyp_status s)
{
    return s == HYP_OK ? 0 : s == HYP_ERR_USAGE ? 2 : 1;
}

int hyp_run_exit_status(const hyp_run_info *r)
{
    if (!r->started)
        return 1;
    if (r->status)
        return hyp_exit_status(r->status);
    return r->test_failed ? HYP_EXIT_TEST_FAILED : 0;
}

int hyp_batch_exit_status(const hyp_run_info *infos, size_t n)
{
    static const int rank[4] = {0, 2, 3, 1};   /* by status 0, 1, 2, 3 */
    int worst = 0;
    for (size_t i = 0; i < n; i++) {
        int rc = hyp_run_exit_status(&infos[i]);
        if ((rc >= 0 && rc <= 3 ? rank[rc] : 3) > rank[worst])
            worst = rc >= 0 && rc <= 3 ? rc : 1;
    }
    return worst;
}

/* ---- logs ---------------------------------------------------------- */

const hyp_series *hyp__log_series(const hyp__log *l)
{
    return l->is_gpx ? &l->doc.pts : &l->csv;
}

hyp_status hyp__log_read(const char *path, const hyp_read_opts *ro, hyp__log *l, hyp_msgs *msgs, hyp_error *err)
{
    hyp_gpx_doc_init(&l->doc);
    hyp_series_init(&l->csv);
    l->punit = HYP_UNIT_NONE;
    l->is_gpx = hyp_file_is_xml(path) == 1;
    if (l->is_gpx) {
        hyp_status st = hyp_gpx_read(path, ro, &l->doc, msgs, err);
        l->punit = l->doc.pressure_unit;
        return st;
    }
    return hyp_csv_read(path, ro, &l->csv, &l->punit, msgs, err);
}

void hyp__log_free(hyp__log *l)
{
    hyp_gpx_doc_free(&l->doc);
    hyp_series_free(&l->csv);
}

/* First and last valid sample times, on true time (clock_s removed). */
static void span_of(const hyp_series *s, double clock_s, double *t0, double *t1)
{
    *t0 = *t1 = NAN;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i]) {
            if (*t0 != *t0)
                *t0 = s->time_s[i] - clock_s;
            *t1 = s->time_s[i] - clock_s;
        }
}

/* ---- opening a survey ---------------------------------------------- */

static hyp_status parse_window(const char *text, const hyp_zone *z, const char *opt, hyp_window *w, hyp_error *err)
{
    char buf[128];
    snprintf(buf, sizeof buf, "%s", text);
    char *slash = strchr(buf, '/');
    if (slash)
        *slash = '\0';
    if (!slash || hyp_time_parse(buf, z, &w->start_s) || hyp_time_parse(slash + 1, z, &w->end_s) ||
        !(w->end_s > w->start_s))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s\"%s\": expected START/END, two ISO 8601 times with zone, END after START",
                             opt, text);
    return HYP_OK;
}

static hyp_status zone_from(const char *text, const char *opt, hyp_zone *z, hyp_error *err)
{
    hyp_zone_init(z);
    if (!text)
        return HYP_OK;
    hyp_error e;
    if (hyp_zone_parse(z, text, NULL, &e))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: %s", opt, e.message);
    return HYP_OK;
}

static hyp_status survey_marks(hyp_survey *sv, hyp_msgs *msgs, hyp_error *err)
{
    const hyp_survey_opts *o = &sv->o;
    hyp_status st = HYP_OK;
    if (o->benchmarks_path) {
        st = hyp_benchmarks_read(o->benchmarks_path, o->benchmark_sigma_m, &sv->bms, msgs, err);
        if (st)
            return st;
        sv->copts.benchmarks = &sv->bms;
        if (!(sv->inputs[1] = strdup(o->benchmarks_path)))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    if (o->ties_path) {
        st = hyp_ties_read(o->ties_path, &sv->rover_zone, sv->copts.benchmarks, &sv->ties, &sv->n_ties, err);
        if (st)
            return st;
        sv->copts.ties = sv->ties;
        sv->copts.n_ties = sv->n_ties;
        if (!(sv->inputs[2] = strdup(o->ties_path)))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    return HYP_OK;
}

static hyp_status survey_windows(hyp_survey *sv, hyp_error *err)
{
    const hyp_survey_opts *o = &sv->o;
    if (o->n_colocate) {
        if (!(sv->windows = calloc(o->n_colocate, sizeof *sv->windows)))
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        for (size_t k = 0; k < o->n_colocate; k++)
            if (parse_window(o->colocate[k], &sv->rover_zone, "--colocate ", &sv->windows[k], err))
                return HYP_ERR_USAGE;
        sv->copts.colocate = sv->windows;
        sv->copts.n_colocate = o->n_colocate;
    }
    if (o->bases_colocated &&
        parse_window(o->bases_colocated, &sv->rover_zone, "--bases-colocated: --colocate ", &sv->copts.base_colocate, err))
        return HYP_ERR_USAGE;
    return HYP_OK;
}

hyp_status hyp_survey_new(hyp_survey **out, const hyp_survey_opts *o, hyp_msgs *msgs, hyp_error *err)
{
    *out = NULL;
    hyp_survey *sv = calloc(1, sizeof *sv);
    if (!sv)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    if (o)
        sv->o = *o;
    else
        hyp_survey_opts_init(&sv->o);
    if (!sv->o.out_ref_set)
        sv->o.out_ref = sv->o.known_ref;
    sv->copts = sv->o.correct;
    hyp_benchmarks_init(&sv->bms);
    hyp_zone_init(&sv->rover_zone);
    pthread_mutex_init(&sv->lock, NULL);
    *out = sv;
    hyp_status st = zone_from(sv->o.rover_time_zone, "--time-zone", &sv->rover_zone, err);
    if (!st)
        st = survey_windows(sv, err);
    if (!st)
        st = survey_marks(sv, msgs, err);
    if (st) {
        hyp_survey_free(sv);
        *out = NULL;
    }
    return st;
}

void hyp_survey_free(hyp_survey *sv)
{
    if (!sv)
        return;
    for (size_t k = 0; k < sv->n_pool; k++) {
        hyp__log_free(&sv->pool[k].log);
        free(sv->pool[k].path);
    }
    free(sv->pool);
    free(sv->windows);
    free(sv->ties);
    hyp_benchmarks_free(&sv->bms);
    hyp_zone_free(&sv->rover_zone);
    free(sv->base_dir);
    for (int k = 0; k < 3; k++)
        free(sv->inputs[k]);
    for (size_t k = 0; k < sv->n_cleaned; k++)
        free(sv->cleaned[k]);
    free(sv->cleaned);
    hyp__rover_own_free(sv);
    pthread_mutex_destroy(&sv->lock);
    free(sv);
}

/* ---- bases --------------------------------------------------------- */

/* The checks of "inspect" on a base log; its problems become warnings. */
static void warn_base_quality(const char *path, const hyp_series *s, hyp_msgs *msgs)
{
    hyp_inspection r;
    hyp_error err;
    if (hyp_inspect(s, NULL, &r, &err))
        return;
    size_t shown = 0;
    for (size_t i = 0; i < r.n_issues; i++) {
        if (r.issues[i].kind == HYP_ISSUE_RAPID)
            continue;   /* the summary's weather line reports those */
        if (shown++ < 10) {
            char line[300];
            hyp_issue_format(&r.issues[i], line, sizeof line);
            hyp_msgs_add_at(msgs, HYP_WARNING, "base-quality", path, r.issues[i].line, "%s", line);
        }
    }
    if (shown > 10)
        hyp_msgs_add_at(msgs, HYP_WARNING, "base-quality", path, 0, "%zu problems in all (hypsolev inspect lists them)", shown);
    hyp_inspection_free(&r);
}

static hyp_status pool_push(hyp_survey *sv, const hyp_base_spec *b, hyp_msgs *msgs, hyp_error *err)
{
    if (sv->n_pool == sv->pool_alloc) {
        size_t na = sv->pool_alloc ? 2 * sv->pool_alloc : 4;
        hyp__pool_base *p = realloc(sv->pool, na * sizeof *p);
        if (!p)
            return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
        sv->pool = p;
        sv->pool_alloc = na;
    }
    hyp__pool_base *pb = &sv->pool[sv->n_pool];
    memset(pb, 0, sizeof *pb);
    pb->spec = *b;
    if (!(pb->path = strdup(b->path)))
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    pb->spec.path = pb->path;
    pb->spec.time_zone = NULL;
    pb->spec.time_format = NULL;   /* the caller's text: used below only */
    hyp_gpx_doc_init(&pb->log.doc);
    hyp_series_init(&pb->log.csv);
    sv->n_pool++;   /* owned from here on: freed with the survey */
    hyp_zone z;
    hyp_status st = zone_from(b->time_zone, "--base-time-zone", &z, err);
    if (st)
        return st;
    hyp_read_opts ro = sv->o.read;
    ro.zone = &z;
    ro.need_position = 0;
    ro.baro_altitude_field = NULL;   /* the rovers' */
    ro.time_format = b->time_format;
    if (b->pressure_unit)
        ro.pressure_unit = b->pressure_unit;
    if (b->temperature_unit)
        ro.temperature_unit = b->temperature_unit;
    if (b->pressure_field)
        ro.pressure_field = b->pressure_field;
    if (b->temperature_field)
        ro.temperature_field = b->temperature_field;
    if (b->humidity_field)
        ro.humidity_field = b->humidity_field;
    if (b->kind == HYP_BASE_QNH && !ro.pressure_unit)
        ro.pressure_unit = HYP_UNIT_HPA;   /* QNH is reported in hPa */
    st = hyp__log_read(pb->path, &ro, &pb->log, msgs, err);
    hyp_zone_free(&z);
    if (st)
        return st;
    span_of(hyp__log_series(&pb->log), b->clock_offset_s, &pb->t0_s, &pb->t1_s);
    if (sv->o.check_bases)
        warn_base_quality(pb->path, hyp__log_series(&pb->log), msgs);
    return HYP_OK;
}

hyp_status hyp_survey_add_base(hyp_survey *sv, const hyp_base_spec *b, hyp_msgs *msgs, hyp_error *err)
{
    if (!b->path || !b->path[0])
        return hyp_error_set(err, HYP_ERR_USAGE, "a base has no file name");
    if (!(b->height_m == b->height_m))
        return hyp_error_set(err, HYP_ERR_USAGE, "--base %s has no --base-height", b->path);
    if (sv->base_dir)
        return hyp_error_set(err, HYP_ERR_USAGE, "--base and --base-dir both given; choose one");
    if (sv->n_pool == HYP_MAX_BASES)
        return hyp_error_set(err, HYP_ERR_USAGE, "more than %d bases", HYP_MAX_BASES);
    return pool_push(sv, b, msgs, err);
}

hyp_status hyp_survey_add_base_dir(hyp_survey *sv, const char *dir, hyp_msgs *msgs, hyp_error *err)
{
    if (sv->n_pool)
        return hyp_error_set(err, HYP_ERR_USAGE, "--base and --base-dir both given; choose one");
    char path[4096];
    snprintf(path, sizeof path, "%s/bases.csv", dir);
    hyp_base_entry *e = NULL;
    size_t cnt = 0;
    hyp_status st = hyp_base_index_read(path, &e, &cnt, err);
    if (st)
        return st;
    if (!(sv->base_dir = strdup(dir)) || !(sv->inputs[0] = strdup(path)))
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t k = 0; !st && k < cnt; k++) {
        snprintf(path, sizeof path, "%s/%s", dir, e[k].file);
        hyp_base_spec b;
        hyp_base_spec_init(&b, path, e[k].height_m);
        b.lat_deg = e[k].lat_deg;
        b.lon_deg = e[k].lon_deg;
        b.clock_offset_s = e[k].clock_offset_s;
        b.kind = e[k].qnh ? HYP_BASE_QNH : HYP_BASE_STATION;
        b.time_format = e[k].time_format[0] ? e[k].time_format : NULL;   /* read before e is freed */
        st = pool_push(sv, &b, msgs, err);
    }
    free(e);
    return st;
}

/* The bases a rover uses. From a base folder: the logs that cover at
 * least 95 % of the rover's time span (common practice, no source: a base
 * that misses a few minutes at either end still serves; the points outside
 * it are flagged). Bases given one by one: all of them, but a log that does
 * not overlap the rover's span at all (another day's) is left out, so each
 * day's base serves the rovers of its day. */
hyp_status hyp__select_bases(const hyp_survey *sv, const hyp_series *rv, size_t *sel, size_t *n, hyp_error *err)
{
    *n = 0;
    double t0, t1;
    span_of(rv, 0.0, &t0, &t1);
    for (size_t k = 0; k < sv->n_pool && *n < HYP_MAX_BASES; k++) {
        const hyp__pool_base *b = &sv->pool[k];
        double cover = fmin(t1, b->t1_s) - fmax(t0, b->t0_s);
        int keep = sv->base_dir ? (t1 > t0 ? cover >= 0.95 * (t1 - t0) : (t0 >= b->t0_s && t0 <= b->t1_s))
                                : !(cover < 0) || !(t0 == t0);
        if (keep)
            sel[(*n)++] = k;
    }
    if (!sv->base_dir && !*n)   /* none overlaps: all, and the correction says what is outside */
        for (size_t k = 0; k < sv->n_pool && *n < HYP_MAX_BASES; k++)
            sel[(*n)++] = k;
    if (*n)
        return HYP_OK;
    if (!sv->n_pool)
        return hyp_error_set(err, HYP_ERR_USAGE, "no base station given");
    char x[40], y[40];
    hyp_time_format(t0, x, sizeof x);
    hyp_time_format(t1, y, sizeof y);
    return hyp_error_set(err, HYP_ERR_NODATA, "no base log in %s covers the track's %s to %s", sv->base_dir, x, y);
}

/* ---- names and collisions ------------------------------------------ */

void hyp__stem(const char *path, char *out, size_t n)
{
    char tmp[4096];
    snprintf(tmp, sizeof tmp, "%s", path);
    snprintf(out, n, "%s", basename(tmp));
    char *dot = strrchr(out, '.');
    if (dot && dot != out)
        *dot = '\0';
}

void hyp__rover_paths_make(const hyp_outputs *out, const char *rover, hyp__rover_paths *p)
{
    p->gpx[0] = p->table[0] = p->report[0] = '\0';
    char stem[1024];
    hyp__stem(rover, stem, sizeof stem);
    if (out->gpx)
        snprintf(p->gpx, sizeof p->gpx, "%s", out->gpx);
    if (out->table)
        snprintf(p->table, sizeof p->table, "%s", out->table);
    if (out->report)
        snprintf(p->report, sizeof p->report, "%s", out->report);
    if (out->dir) {
        snprintf(p->gpx, sizeof p->gpx, "%s/%s.gpx", out->dir, stem);
        if (!out->table)
            snprintf(p->table, sizeof p->table, "%s/%s.csv", out->dir, stem);
        if (!out->report)
            snprintf(p->report, sizeof p->report, "%s/%s.report.%s", out->dir, stem, out->report_html ? "html" : "txt");
    }
}

int hyp__survey_is_input(const hyp_survey *sv, const char *path, const char *const *rovers, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (hyp_same_file(rovers[i], path))
            return 1;
    for (size_t k = 0; k < sv->n_pool; k++)
        if (hyp_same_file(sv->pool[k].path, path))
            return 1;
    for (int k = 0; k < 3; k++)
        if (sv->inputs[k] && hyp_same_file(sv->inputs[k], path))
            return 1;
    return 0;
}

void hyp__survey_clean_dir(hyp_survey *sv, const char *target)
{
    char dir[4096];
    snprintf(dir, sizeof dir, "%s", target);
    char *slash = strrchr(dir, '/');
    if (slash)
        *slash = '\0';
    else
        snprintf(dir, sizeof dir, ".");
    pthread_mutex_lock(&sv->lock);
    int seen = 0;
    for (size_t k = 0; k < sv->n_cleaned && !seen; k++)
        seen = strcmp(sv->cleaned[k], dir) == 0;
    char **p = seen ? NULL : realloc(sv->cleaned, (sv->n_cleaned + 1) * sizeof *p);
    if (p) {
        sv->cleaned = p;
        if ((p[sv->n_cleaned] = strdup(dir)))
            sv->n_cleaned++;
    }
    pthread_mutex_unlock(&sv->lock);
    if (!seen)
        hyp__stale_dir_remove(dir);
}

hyp_status hyp_inspect_file(const char *path, const hyp_read_opts *ro, FILE *out, hyp_msgs *msgs, hyp_error *err)
{
    hyp__log l;
    hyp_status st = hyp__log_read(path, ro, &l, msgs, err);
    hyp_inspection r;
    if (!st && !(st = hyp_inspect(hyp__log_series(&l), NULL, &r, err))) {
        hyp_inspection_write(out, path, l.punit, &r);
        hyp_inspection_free(&r);
    }
    hyp__log_free(&l);
    return st;
}
