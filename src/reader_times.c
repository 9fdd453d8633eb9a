/* reader_times.c - times as a log holds them: wall-clock stamps read
 * across clock changes, and the file's time order (outliers, sorting,
 * duplicates), shared by the readers. Rules in docs/formats.md. */
#include "reader_common.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* At most this many messages per kind and file; the rest only counted. */
#define WARN_CAP 10

void hyp__clock_init(hyp__clock *c, const hyp_zone *zone)
{
    memset(c, 0, sizeof *c);
    c->zone = zone;
    c->last_s = NAN;
}

hyp_time_result hyp__clock_read(hyp__clock *c, const char *text, unsigned line, double *time_s)
{
    hyp_time_local how;
    hyp_time_result r = c->format ? hyp_time_parse_format(text, c->format, c->zone, time_s, &how)
                      : hyp_time_parse_zoned(text, c->zone, time_s, &how);
    if (r == HYP_TIME_SYNTAX && !c->format && c->date_order)
        r = hyp_time_parse_numeric(text, c->date_order == 1, c->zone, time_s, &how);
    if (r)
        return r;
    if (how.zoned) {
        int32_t off = how.offset_s;
        if (how.repeated) {
            /* the first occurrence unless the log is already past it */
            if (c->last_s == c->last_s && !(*time_s > c->last_s) && how.second_s > c->last_s) {
                *time_s = how.second_s;
                off = how.second_offset_s;
                if (!c->n_second++)
                    c->second_line = line;
            } else
                c->n_first++;
        }
        if (how.skipped && !c->n_skipped++)
            c->skipped_line = line;
        if (c->have_off && off != c->last_off_s && !c->n_changes++) {
            c->change_line = line;
            c->change_from_s = c->last_off_s;
            c->change_to_s = off;
        }
        c->have_off = 1;
        c->last_off_s = off;
    }
    c->last_s = *time_s;
    return HYP_TIME_OK;
}

static void fmt_offset(char *buf, size_t n, int32_t off_s)
{
    int32_t a = off_s < 0 ? -off_s : off_s;
    snprintf(buf, n, "UTC%c%02d:%02d", off_s < 0 ? '-' : '+', (int)(a / 3600), (int)(a / 60 % 60));
}

void hyp__clock_notes(const hyp__clock *c, const char *path, hyp_msgs *msgs)
{
    const char *zone = c->zone && c->zone->name[0] ? c->zone->name : "the given zone";
    if (c->n_changes) {
        char a[16], b[16];
        fmt_offset(a, sizeof a, c->change_from_s);
        fmt_offset(b, sizeof b, c->change_to_s);
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, c->change_line, "the local times (read in %s) cross a clock change here, %s to %s%s", zone, a, b,
                     c->n_changes > 1 ? " (and later ones)" : "");
    }
    if (c->n_second)
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, c->second_line, "the clock was set back, so this wall-clock hour happened twice: %zu stamps from here on, "
                     "after the log had passed their first occurrence, are read as the second (%zu as the first); no hour is lost", c->n_second, c->n_first);
    else if (c->n_first)
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0, "%zu stamps fall in an hour that happened twice in %s (the clock was set back); "
                     "read as its first occurrence, as the log had not passed it", c->n_first, zone);
    if (c->n_skipped)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, c->skipped_line, "%zu stamps fall in an hour that never happened in %s (the clock was set forward over it); "
                     "read with the offset before the change: was the logger's clock not set forward?", c->n_skipped, zone);
}

/* --- time order --------------------------------------------------------- */

/* Counts the steps between consecutive usable samples (file order) that
 * go back and that repeat a time; records the first HYP_TIME_BACK_KEEP
 * runs of steps back in runs[] and counts them all in *n_runs. */
static void count_steps(const hyp_series *s, size_t *n_back, size_t *n_equal, struct hyp_time_back *runs,
                        size_t *n_runs)
{
    double last = NAN;
    int in_run = 0;
    *n_back = *n_equal = *n_runs = 0;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        double t = s->time_s[i];
        int back = t < last;
        if (back && !in_run && (*n_runs)++ < HYP_TIME_BACK_KEEP)
            runs[*n_runs - 1] = (struct hyp_time_back){t, last - t, hyp_series_line(s, i)};
        *n_back += back;
        *n_equal += t == last;
        in_run = back;
        last = t;
    }
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* How far out of line a time must be to be an outlier: ten typical steps
 * (the median step between consecutive usable samples), at least 60 s
 * (common practice, no source: a logger's clock is not that wrong by
 * chance, and a shuffled file's median step is large, so it has none). */
static hyp_status far_limit(const hyp_series *s, const uint32_t *ok, size_t m, double *far_s)
{
    double *d = malloc((m ? m : 1) * sizeof *d);
    if (!d)
        return HYP_ERR_NOMEM;
    size_t k = 0;
    for (size_t j = 1; j < m; j++) {
        double step = fabs(s->time_s[ok[j]] - s->time_s[ok[j - 1]]);
        if (step > 0.0)
            d[k++] = step;
    }
    double med = 0.0;
    if (k) {
        qsort(d, k, sizeof *d, cmp_double);
        med = d[k / 2];
    }
    free(d);
    *far_s = fmax(10.0 * med, 60.0);
    return HYP_OK;
}

/* Whether t is far out of line with a before and b after it (a < b, the
 * two close together): outside [a - far, b + far]. */
static int out_of_line(double t, double a, double b, double far_s)
{
    return b > a && b - a <= far_s && (t < a - far_s || t > b + far_s);
}

static void warn_outlier(const char *path, const hyp_series *s, size_t i, double a, double b, size_t nth, hyp_msgs *msgs)
{
    if (nth >= WARN_CAP)
        return;
    char t[40], ta[40], tb[40];
    hyp_time_format(s->time_s[i], t, sizeof t);
    hyp_time_format(a, ta, sizeof ta);
    hyp_time_format(b, tb, sizeof tb);
    hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, hyp_series_line(s, i), "time %s is far out of line with the samples around it (%s and %s); sample dropped", t, ta, tb);
}

/* Flags the isolated outliers among the m usable samples ok[] (file
 * order): a sample whose neighbours are in order and close together, and
 * whose own time is far outside them. The first and the last sample have
 * one side: they must be out of order with the two next to them. */
static size_t flag_outliers(const char *path, hyp_series *s, const uint32_t *ok, size_t m, double far_s,
                            hyp_msgs *msgs)
{
    size_t n = 0, prev = SIZE_MAX, prev2 = SIZE_MAX;
    const double *T = s->time_s;
    for (size_t k = 0; k < m; k++) {
        double t = T[ok[k]], a = NAN, b = NAN;
        int out = 0;
        if (prev != SIZE_MAX && k + 1 < m)
            a = T[ok[prev]], b = T[ok[k + 1]], out = out_of_line(t, a, b, far_s);
        else if (k == 0 && m >= 3)
            a = T[ok[1]], b = T[ok[2]], out = out_of_line(t, a, b, far_s) && t > b;
        else if (k + 1 == m && prev2 != SIZE_MAX)
            a = T[ok[prev2]], b = T[ok[prev]], out = out_of_line(t, a, b, far_s) && t < a;
        if (out) {
            s->flag[ok[k]] = HYP_SAMPLE_TIME_OUTLIER;
            warn_outlier(path, s, ok[k], a, b, n++, msgs);
        } else {
            prev2 = prev;
            prev = k;
        }
    }
    if (n > WARN_CAP)
        hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, 0, "%zu samples in all dropped for a time far out of line", n);
    return n;
}

/* A stable merge sort of idx[0..n) by key[idx]. */
static void merge_sort(uint32_t *idx, uint32_t *tmp, size_t n, const double *key)
{
    for (size_t w = 1; w < n; w *= 2) {
        for (size_t lo = 0; lo < n; lo += 2 * w) {
            size_t mid = lo + w < n ? lo + w : n, hi = lo + 2 * w < n ? lo + 2 * w : n;
            size_t i = lo, j = mid, k = lo;
            while (i < mid && j < hi)
                tmp[k++] = key[idx[j]] < key[idx[i]] ? idx[j++] : idx[i++];
            while (i < mid)
                tmp[k++] = idx[i++];
            while (j < hi)
                tmp[k++] = idx[j++];
        }
        memcpy(idx, tmp, n * sizeof *idx);
    }
}

/* Puts the series in time order. The key of a sample without a usable
 * time (none, or an outlier's) is the key before it, so it stays beside
 * the sample it follows in the file. */
static hyp_status sort_series(hyp_series *s, uint32_t **order)
{
    size_t n = s->count;
    double *key = malloc(n * sizeof *key);
    uint32_t *idx = malloc(n * sizeof *idx), *tmp = malloc(n * sizeof *tmp);
    hyp_status st = HYP_ERR_NOMEM;
    if (key && idx && tmp) {
        double last = -INFINITY;
        for (size_t i = 0; i < n; i++) {
            double t = s->time_s[i];
            if (t == t && s->flag[i] != HYP_SAMPLE_TIME_OUTLIER)
                last = t;
            key[i] = last;
            idx[i] = (uint32_t)i;
        }
        merge_sort(idx, tmp, n, key);
        st = hyp_series_permute(s, idx);
    }
    free(key);
    free(tmp);
    if (!st && order) {
        *order = idx;
        idx = NULL;
    }
    free(idx);
    s->time_sorted = !st;
    return st;
}

static void note_sorted(const char *path, const struct hyp_time_back *b, size_t n_back, hyp_msgs *msgs)
{
    char t[40];
    hyp_time_format(b->time_s, t, sizeof t);
    hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0, "%zu time%s back in the file (the first at line %u: %s, %.0f s before the sample above it); "
                 "the samples are put in time order", n_back, n_back == 1 ? " goes" : "s go", b->line, t, b->back_s);
}

/* Refuses a usable sample whose time equals the usable one before it (in
 * time order): the later one in the file. */
static void flag_duplicates(const char *path, hyp_series *s, hyp_msgs *msgs)
{
    size_t n = 0, prev = SIZE_MAX;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        if (prev != SIZE_MAX && s->time_s[i] == s->time_s[prev]) {
            s->flag[i] = HYP_SAMPLE_TIME_DUPLICATE;
            if (n++ < WARN_CAP) {
                char t[40];
                hyp_time_format(s->time_s[i], t, sizeof t);
                hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, hyp_series_line(s, i), "time %s is the same as line %u's; sample dropped as a duplicate", t, hyp_series_line(s, prev));
            }
            continue;
        }
        prev = i;
    }
    if (n > WARN_CAP)
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0, "%zu samples in all dropped as duplicates of the time before", n);
}

/* Flags the outliers among the usable samples. */
static hyp_status outliers(const char *path, hyp_series *s, hyp_msgs *msgs)
{
    size_t m = 0;
    uint32_t *ok = malloc(s->count * sizeof *ok);
    if (!ok)
        return HYP_ERR_NOMEM;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i])
            ok[m++] = (uint32_t)i;
    double far_s;
    hyp_status st = far_limit(s, ok, m, &far_s);
    if (!st)
        flag_outliers(path, s, ok, m, far_s, msgs);
    free(ok);
    return st;
}

hyp_status hyp__check_order(const char *path, hyp_series *s, uint32_t **order, hyp_msgs *msgs, hyp_error *err)
{
    if (order)
        *order = NULL;
    size_t n_back, n_equal;
    /* what went back in the file is kept for inspection, outliers and all */
    count_steps(s, &n_back, &n_equal, s->time_back, &s->n_time_back);
    if (!n_back && !n_equal)
        return HYP_OK;   /* the usual case: nothing allocated */
    if (n_back) {
        if (outliers(path, s, msgs))
            return hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", path);
        struct hyp_time_back left[HYP_TIME_BACK_KEEP];
        size_t n_runs;
        count_steps(s, &n_back, &n_equal, left, &n_runs);
        if (n_back) {
            if (sort_series(s, order))
                return hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory while putting the samples in time order", path);
            note_sorted(path, &left[0], n_back, msgs);
        }
    }
    flag_duplicates(path, s, msgs);
    return HYP_OK;
}
