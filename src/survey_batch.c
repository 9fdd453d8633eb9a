/* survey_batch.c - many rovers: a pool of worker threads, each rover's
 * end reported one at a time, progress ticks for the caller; the checks of
 * a batch's outputs before anything runs; the batch summary file. */
#define _GNU_SOURCE
#include "survey_int.h"
#include "output_set.h"
#include "hypsolev/writers.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <libxml/parser.h>

/* ---- outputs checked before anything runs -------------------------- */

/* Two names of one output file; a device or pipe (/dev/null) may take
 * several outputs. */
static int same_target(const char *a, const char *b)
{
    struct stat st;
    if (!a[0] || !b[0] || (stat(a, &st) == 0 && !S_ISREG(st.st_mode)))
        return 0;
    return strcmp(a, b) == 0 || hyp_same_file(a, b);
}

static const char *target_opt(int k)
{
    return k == 0 ? "-o" : k == 1 ? "--table" : "--report";
}

/* A file by device and inode: the inputs are stat()ed once, so checking a
 * batch's outputs costs one stat() per output, not one per output and
 * input (300 rovers: 540 000 calls before, most of a small track's time). */
typedef struct fid {
    dev_t dev;
    ino_t ino;
    size_t idx;
} fid;

static int fid_cmp(const void *a, const void *b)
{
    const fid *x = a, *y = b;
    if (x->dev != y->dev)
        return x->dev < y->dev ? -1 : 1;
    if (x->ino != y->ino)
        return x->ino < y->ino ? -1 : 1;
    return 0;
}

static int fid_cmp_idx(const void *a, const void *b)
{
    int c = fid_cmp(a, b);
    const fid *x = a, *y = b;
    return c ? c : x->idx < y->idx ? -1 : x->idx > y->idx;
}

static int fid_of(const char *path, fid *f)
{
    struct stat st;
    if (!path || stat(path, &st) != 0)
        return 0;
    f->dev = st.st_dev;
    f->ino = st.st_ino;
    return 1;
}

/* The inputs' identities, sorted: the rovers, the bases, the other files. */
typedef struct idset {
    fid *id;
    size_t n;
} idset;

static hyp_status inputs_ids(const hyp_survey *sv, const char *const *rovers, size_t n, idset *out, hyp_error *err)
{
    out->n = 0;
    out->id = malloc((n + sv->n_pool + 3) * sizeof *out->id);
    if (!out->id)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < n; i++)
        out->n += (size_t)fid_of(rovers[i], &out->id[out->n]);
    for (size_t k = 0; k < sv->n_pool; k++)
        out->n += (size_t)fid_of(sv->pool[k].path, &out->id[out->n]);
    for (int k = 0; k < 3; k++)
        out->n += (size_t)fid_of(sv->inputs[k], &out->id[out->n]);
    for (size_t i = 0; i < out->n; i++)
        out->id[i].idx = 0;
    qsort(out->id, out->n, sizeof *out->id, fid_cmp);
    return HYP_OK;
}

/* hyp__survey_is_input against the inputs' identities */
static int is_input(const idset *in, const char *path)
{
    fid f = {0, 0, 0};
    return fid_of(path, &f) && bsearch(&f, in->id, in->n, sizeof f, fid_cmp) != NULL;
}

/* One rover's outputs: each distinct, none an input. */
static hyp_status check_rover_targets(const idset *in, const hyp__rover_paths *p, hyp_error *err)
{
    const char *t[3] = {p->gpx, p->table, p->report};
    for (int k = 0; k < 3; k++) {
        if (!t[k][0] || strcmp(t[k], "-") == 0)
            continue;
        if (is_input(in, t[k]))
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: %s would overwrite an input; choose another name", t[k], target_opt(k));
        for (int j = 0; j < k; j++)
            if (same_target(t[j], t[k]))
                return hyp_error_set(err, HYP_ERR_USAGE, "%s: named by both %s and %s; give each output its own name", t[k],
                                     target_opt(j), target_opt(k));
    }
    if (!strcmp(p->gpx, "-") && !strcmp(p->table, "-"))
        return hyp_error_set(err, HYP_ERR_USAGE, "-o - and --table - both go to standard output; give one a file name");
    return HYP_OK;
}

static hyp_status check_names(const hyp_outputs *out, const char *summary, size_t n, hyp_error *err)
{
    const char *named[4] = {out->gpx, out->table, out->report, summary};
    static const char *opt[4] = {"-o", "--table", "--report", "--summary"};
    for (int k = 0; k < 4; k++)
        if (named[k] && !named[k][0])
            return hyp_error_set(err, HYP_ERR_USAGE, "%s \"\": an output needs a file name", opt[k]);
    if (out->dir && !out->dir[0])
        return hyp_error_set(err, HYP_ERR_USAGE, "--out-dir \"\": an output folder needs a name");
    if (!out->gpx && !out->dir && !out->table)
        return hyp_error_set(err, HYP_ERR_USAGE, "no output: give -o FILE.gpx, --out-dir DIR or --table FILE");
    if (out->gpx && out->dir)
        return hyp_error_set(err, HYP_ERR_USAGE, "-o and --out-dir both given; choose one");
    if (out->report_html && !out->dir)
        return hyp_error_set(err, HYP_ERR_USAGE, "--report-html names the reports of --out-dir (DIR/NAME.report.html); for one rover give --report FILE.html");
    if (out->report_html && out->report)
        return hyp_error_set(err, HYP_ERR_USAGE, "--report-html and --report both given; --report FILE.html alone chooses HTML");
    if (n > 1 && out->gpx)
        return hyp_error_set(err, HYP_ERR_USAGE, "-o names one output but several rovers are given; use --out-dir");
    if (n > 1 && out->report)
        return hyp_error_set(err, HYP_ERR_USAGE, "--report names one file but several rovers are given; --out-dir writes one report per rover");
    if (n > 1 && out->table && strcmp(out->table, "-") != 0)
        return hyp_error_set(err, HYP_ERR_USAGE, "--table names one file but several rovers are given; use --out-dir (it writes one table per rover)");
    return HYP_OK;
}

/* Two rovers of one name (in/walk.gpx and in/walk.csv, a/x.gpx and b/x.gpx,
 * or one given twice) would write the same outputs: their GPX targets are
 * one name, or (existing) one file. Sorted, not compared pair by pair; the
 * pair reported is the one the pairwise loop finds first (the smallest
 * later rover, then its earliest partner). */
typedef struct gkey {
    char *path;
    size_t idx;
} gkey;

static int gkey_cmp(const void *a, const void *b)
{
    const gkey *x = a, *y = b;
    int c = strcmp(x->path, y->path);
    return c ? c : x->idx < y->idx ? -1 : x->idx > y->idx;
}

static void first_pair(size_t a, size_t b, size_t *pi, size_t *pj)
{
    if (b < *pi || (b == *pi && a < *pj))
        *pi = b, *pj = a;
}

static hyp_status check_same_names(const hyp_outputs *out, const char *const *rovers, size_t n, hyp_error *err)
{
    if (!out->dir || n < 2)
        return HYP_OK;
    gkey *g = calloc(n, sizeof *g);
    fid *f = malloc(n * sizeof *f);
    hyp__rover_paths *p = malloc(sizeof *p);
    hyp_status st = HYP_OK;
    size_t nf = 0, pi = SIZE_MAX, pj = SIZE_MAX;
    for (size_t i = 0; g && f && p && i < n && !st; i++) {
        hyp__rover_paths_make(out, rovers[i], p);
        g[i].idx = i;
        if (!(g[i].path = strdup(p->gpx)))
            st = HYP_ERR_NOMEM;
        struct stat sb;
        /* same_target: a device or pipe may take several outputs */
        if (!st && stat(p->gpx, &sb) == 0 && S_ISREG(sb.st_mode))
            f[nf++] = (fid){sb.st_dev, sb.st_ino, i};
    }
    if (!g || !f || !p || st)
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    if (!st) {
        qsort(g, n, sizeof *g, gkey_cmp);
        for (size_t k = 1; k < n; k++)
            if (strcmp(g[k].path, g[k - 1].path) == 0) {
                size_t s0 = k - 1;
                while (s0 > 0 && strcmp(g[s0 - 1].path, g[k].path) == 0)
                    s0--;
                first_pair(g[s0].idx, g[k].idx, &pi, &pj);
            }
        qsort(f, nf, sizeof *f, fid_cmp_idx);
        for (size_t k = 1; k < nf; k++)
            if (fid_cmp(&f[k], &f[k - 1]) == 0) {
                size_t s0 = k - 1;
                while (s0 > 0 && fid_cmp(&f[s0 - 1], &f[k]) == 0)
                    s0--;
                first_pair(f[s0].idx, f[k].idx, &pi, &pj);
            }
        if (pi != SIZE_MAX) {
            hyp__rover_paths_make(out, rovers[pi], p);
            st = hyp_error_set(err, HYP_ERR_USAGE, "%s and %s would both write %s; rename one, or run them separately",
                               rovers[pj], rovers[pi], p->gpx);
        }
    }
    for (size_t i = 0; g && i < n; i++)
        free(g[i].path);
    free(g);
    free(f);
    free(p);
    return st;
}

hyp_status hyp_survey_check_outputs(const hyp_survey *sv, const char *const *rovers, size_t n, const hyp_outputs *out,
                                    const char *summary_path, hyp_error *err)
{
    hyp_status st = check_names(out, summary_path, n, err);
    if (st)
        return st;
    idset in = {NULL, 0};
    if ((st = inputs_ids(sv, rovers, n, &in, err)))
        return st;
    if (summary_path && strcmp(summary_path, "-") != 0 && is_input(&in, summary_path))
        st = hyp_error_set(err, HYP_ERR_USAGE, "%s: --summary would overwrite an input; choose another name", summary_path);
    hyp__rover_paths *p = st ? NULL : malloc(sizeof *p);
    if (!st && !p)
        st = hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    for (size_t i = 0; i < n && !st; i++) {
        hyp__rover_paths_make(out, rovers[i], p);
        st = check_rover_targets(&in, p, err);
        const char *t[3] = {p->gpx, p->table, p->report};
        for (int k = 0; k < 3 && !st; k++)
            if (summary_path && same_target(t[k], summary_path))
                st = hyp_error_set(err, HYP_ERR_USAGE, "%s: named by both %s and --summary; give each output its own name",
                                   summary_path, target_opt(k));
    }
    free(p);
    free(in.id);
    if (!st)
        st = check_same_names(out, rovers, n, err);
    return st;
}

/* ---- many rovers on worker threads --------------------------------- */

#define GROUP_ROVERS 64   /* the largest group of a commit (see flush_group) */

typedef struct batch {
    hyp_survey *sv;
    const char *const *rovers;
    size_t n, next, done;
    double points_done;
    const hyp_outputs *out;
    int rover_threads;
    hyp_rover_done_fn done_fn;
    void *ctx;
    hyp_run_info *infos;
    pthread_mutex_t lock, report_lock;
    pthread_cond_t ended;
    /* the group gathered for the next commit (under lock); commit_lock
     * keeps one group's commit and reports at a time */
    struct pending *pend[GROUP_ROVERS];
    size_t n_pend;
    double pend_points, pend_t0;
    pthread_mutex_t commit_lock;
} batch;

static int batch_cancelled(const batch *b)
{
    return b->sv->o.cancelled && b->sv->o.cancelled(b->sv->o.cancel_ctx);
}

static void fill_info(hyp_run_info *in, const hyp_rover_run *r, hyp_status st, const hyp_error *err)
{
    in->started = 1;
    in->median_sigma_m = NAN;
    if (!r) {
        in->status = st;
        snprintf(in->message, sizeof in->message, "%s", err->message);
        return;
    }
    in->status = r->status;
    in->skipped = r->skipped;
    in->points = r->rover ? r->rover->count : 0;
    if (!r->status && r->rover) {
        const hyp_correct_result *res = &r->result;
        in->corrected = res->n_ok;
        in->ties = res->n_calibs;
        in->median_sigma_m = res->median_sigma_m;
        snprintf(in->method, sizeof in->method, "%s", hyp_method_name(res->method_used ? res->method_used : HYP_METHOD_SINGLE));
    }
    in->test_failed = !r->status && !r->skipped && r->test_failed;
    if (r->skipped)
        snprintf(in->message, sizeof in->message, "skipped: %s", r->error.message);
    else if (in->test_failed)
        snprintf(in->message, sizeof in->message, "written; calibration test failed: %s",
                 r->result.calib_test.state == HYP_CALTEST_REJECTED ? "calibration rejected"
                                                                     : "calibrations disagree, cannot tell which");
    else
        snprintf(in->message, sizeof in->message, "%s", r->status ? r->error.message : "ok");
}

/* Group commit: a worker's rovers are staged and their outputs put on
 * disk and into place together, once this many rovers or points have
 * gathered or this long after the first (and when the workers run out of
 * rovers); a rover is reported only after its group's commit. One sync of
 * the file system per group instead of three fsyncs and a directory sync
 * per rover: a batch of small tracks spent most of its time outside its
 * own computation in them. A long track (GROUP_POINTS or more) makes a
 * group of its own, committed as hyp_survey_run commits. */
#define GROUP_POINTS 250000.0
#define GROUP_WAIT_S 2.0

typedef struct pending {
    size_t i;
    hyp_rover_run *r;     /* NULL: out of memory */
    hyp_status st;
    hyp_error err;
    hyp__outset set;
} pending;

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static void report_index(batch *b, pending *p)
{
    size_t i = p->i;
    hyp_rover_run *r = p->r;
    fill_info(&b->infos[i], r, p->st, &p->err);
    if (b->done_fn) {
        hyp_rover_run bare;   /* out of memory: the rover's error alone */
        if (!r) {
            memset(&bare, 0, sizeof bare);
            bare.path = b->rovers[i];
            bare.status = p->st;
            bare.error = p->err;
        }
        pthread_mutex_lock(&b->report_lock);   /* one report at a time */
        b->done_fn(b->ctx, i, r ? r : &bare);
        pthread_mutex_unlock(&b->report_lock);
    }
    pthread_mutex_lock(&b->lock);
    b->done++;
    b->points_done += (double)b->infos[i].points;
    pthread_cond_signal(&b->ended);
    pthread_mutex_unlock(&b->lock);
    hyp_rover_run_free(r);
}

/* Commits the gathered group (whichever worker calls it), then reports
 * its rovers in the order they ended. */
static void flush_group(batch *b)
{
    pthread_mutex_lock(&b->commit_lock);
    pthread_mutex_lock(&b->lock);
    size_t n = b->n_pend;
    pending *g[GROUP_ROVERS];
    memcpy(g, b->pend, n * sizeof *g);
    b->n_pend = 0;
    b->pend_points = 0;
    pthread_mutex_unlock(&b->lock);
    hyp__outset *sets[GROUP_ROVERS];
    hyp_status st[GROUP_ROVERS];
    hyp_error *errs = n ? calloc(n, sizeof *errs) : NULL;
    for (size_t k = 0; k < n; k++)
        sets[k] = &g[k]->set;
    if (n && !errs) {   /* nothing can be said to be written */
        for (size_t k = 0; k < n; k++)
            hyp__outset_abort(sets[k]);
        for (size_t k = 0; k < n; k++)
            st[k] = g[k]->set.n ? HYP_ERR_NOMEM : HYP_OK;
    } else if (n)
        hyp__outset_commit_group(sets, n, b->sv->o.cancelled, b->sv->o.cancel_ctx, st, errs);
    for (size_t k = 0; k < n; k++) {
        if (st[k] && g[k]->r) {
            hyp_error e;
            hyp_error_clear(&e);
            if (errs)
                e = errs[k];
            else
                hyp_error_set(&e, HYP_ERR_NOMEM, "out of memory: nothing written");
            hyp__rover_run_unwritten(g[k]->r, &e);
        }
        report_index(b, g[k]);
        free(g[k]);
    }
    free(errs);
    pthread_mutex_unlock(&b->commit_lock);
}

static void run_index(batch *b, size_t i, hyp_geo **geo)
{
    pending *p = calloc(1, sizeof *p);
    if (!p) {   /* not even room to keep it: run and commit it alone */
        pending one = {.i = i};
        hyp_error_clear(&one.err);
        one.st = hyp_survey_run(b->sv, b->rovers[i], b->out, b->rover_threads, &one.r, &one.err);
        report_index(b, &one);
        return;
    }
    p->i = i;
    hyp_error_clear(&p->err);
    p->st = hyp__survey_run_lent(b->sv, b->rovers[i], b->out, b->rover_threads, geo, &p->r, &p->set, &p->err);
    double pts = p->r && p->r->rover ? (double)p->r->rover->count : 0.0;
    pthread_mutex_lock(&b->lock);
    while (b->n_pend == GROUP_ROVERS) {   /* another worker filled it and has yet to take it */
        pthread_mutex_unlock(&b->lock);
        flush_group(b);
        pthread_mutex_lock(&b->lock);
    }
    if (!b->n_pend)
        b->pend_t0 = now_s();
    b->pend[b->n_pend++] = p;
    b->pend_points += pts;
    int full = b->n_pend == GROUP_ROVERS || b->pend_points >= GROUP_POINTS || now_s() - b->pend_t0 >= GROUP_WAIT_S;
    pthread_mutex_unlock(&b->lock);
    if (full)
        flush_group(b);
}

static void *worker(void *arg)
{
    batch *b = arg;
    hyp_geo *geo = NULL;   /* this thread's PROJ context, lent to each of its rovers in turn */
    for (;;) {
        pthread_mutex_lock(&b->lock);
        size_t i = b->next < b->n && !batch_cancelled(b) ? b->next++ : SIZE_MAX;
        pthread_mutex_unlock(&b->lock);
        if (i == SIZE_MAX) {
            flush_group(b);   /* what this worker (or another) left gathered */
            hyp_geo_close(geo);
            return NULL;
        }
        run_index(b, i, &geo);
    }
}

/* Waits for the workers, ticking the progress callback about twice a
 * second; all workers idle and nothing left to start is the end. */
static void wait_workers(batch *b, hyp_progress_fn progress)
{
    pthread_mutex_lock(&b->lock);
    while (b->done < b->next || (b->next < b->n && !batch_cancelled(b))) {
        struct timespec to;
        clock_gettime(CLOCK_REALTIME, &to);
        to.tv_nsec += 500 * 1000 * 1000;
        if (to.tv_nsec >= 1000000000L)
            to.tv_sec++, to.tv_nsec -= 1000000000L;
        pthread_cond_timedwait(&b->ended, &b->lock, &to);
        size_t done = b->done;
        double pts = b->points_done;
        pthread_mutex_unlock(&b->lock);
        if (progress) {
            pthread_mutex_lock(&b->report_lock);   /* never beside a done call */
            progress(b->ctx, done, b->n, pts);
            pthread_mutex_unlock(&b->report_lock);
        }
        pthread_mutex_lock(&b->lock);
    }
    pthread_mutex_unlock(&b->lock);
}

hyp_status hyp_survey_run_many(hyp_survey *sv, const char *const *rovers, size_t n, const hyp_outputs *out, int jobs,
                               hyp_rover_done_fn done, hyp_progress_fn progress, void *ctx, hyp_run_info *infos,
                               hyp_error *err)
{
    for (size_t i = 0; i < n; i++) {
        memset(&infos[i], 0, sizeof infos[i]);
        infos[i].path = rovers[i];
        infos[i].median_sigma_m = NAN;
        snprintf(infos[i].message, sizeof infos[i].message, "not started (interrupted)");
    }
    if (jobs <= 0) {
        long cores = sysconf(_SC_NPROCESSORS_ONLN);
        jobs = sv->o.threads > 0 ? sv->o.threads : (int)(cores > 0 ? cores : 1);
    }
    /* jobs is the number of threads in all: those the workers leave idle
     * (fewer rovers than jobs) go to each rover's own passes */
    size_t busy = (size_t)jobs < n ? (size_t)jobs : n;
    batch b = {.sv = sv, .rovers = rovers, .n = n, .out = out, .done_fn = done, .ctx = ctx, .infos = infos};
    b.rover_threads = busy && (size_t)jobs > busy ? (int)((size_t)jobs / busy) : 1;
    pthread_mutex_init(&b.lock, NULL);
    pthread_mutex_init(&b.report_lock, NULL);
    pthread_mutex_init(&b.commit_lock, NULL);
    pthread_cond_init(&b.ended, NULL);
    xmlInitParser();   /* libxml2 wants its one-time set-up before threads */
    pthread_t *th = busy > 1 ? calloc(busy, sizeof *th) : NULL;
    size_t started = 0;
    for (size_t k = 0; th && k < busy; k++)
        if (pthread_create(&th[k], NULL, worker, &b) == 0)
            started++;
    if (!started)
        worker(&b);   /* one worker, or no threads to be had: here */
    else
        wait_workers(&b, progress);
    for (size_t k = 0; k < started; k++)
        pthread_join(th[k], NULL);
    if (progress)
        progress(ctx, b.done, n, b.points_done);
    free(th);
    pthread_cond_destroy(&b.ended);
    pthread_mutex_destroy(&b.report_lock);
    pthread_mutex_destroy(&b.commit_lock);
    pthread_mutex_destroy(&b.lock);
    (void)err;
    return HYP_OK;
}

/* ---- the batch summary file ---------------------------------------- */

hyp_status hyp_survey_write_summary(const hyp_survey *sv, const char *path, const hyp_run_info *infos, size_t n,
                                    hyp_error *err)
{
    if (strcmp(path, "-") != 0 && hyp__survey_is_input(sv, path, NULL, 0))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: --summary would overwrite an input; choose another name", path);
    for (size_t i = 0; i < n; i++)
        if (hyp_same_file(infos[i].path, path))
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: --summary would overwrite an input; choose another name", path);
    size_t len = strlen(path);
    hyp_summary_format fmt = len >= 5 && strcasecmp(path + len - 5, ".json") == 0 ? HYP_SUMMARY_JSON : HYP_SUMMARY_CSV;
    hyp__outset set;
    hyp__outset_init(&set);
    hyp__outfile *o = hyp__outset_add(&set, path, err);
    if (!o)
        return err->status;
    hyp_batch_summary_write(o->f, infos, n, fmt);
    return hyp__outset_commit(&set, NULL, NULL, err);
}
