/* benchmark_reader.c - benchmark lists and explicit tie lists (CSV). */
#include "csv_lex.h"
#include "reader_common.h"
#include "hypsolev/network.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#define MAX_FIELDS 64

void hyp_benchmarks_init(hyp_benchmarks *b)
{
    memset(b, 0, sizeof *b);
}

void hyp_waypoints_init(hyp_waypoints *w)
{
    memset(w, 0, sizeof *w);
}

void hyp_waypoints_free(hyp_waypoints *w)
{
    for (size_t i = 0; i < w->count; i++)
        free(w->name[i]);
    free(w->name);
    free(w->time_s);
    free(w->lat_deg);
    free(w->lon_deg);
    hyp_waypoints_init(w);
}

void hyp_benchmarks_free(hyp_benchmarks *b)
{
    for (size_t i = 0; i < b->count; i++) {
        free(b->name[i]);
        free(b->note[i]);
    }
    free(b->name);
    free(b->note);
    free(b->lat_deg);
    free(b->lon_deg);
    free(b->height_m);
    free(b->sigma_m);
    hyp_benchmarks_init(b);
}

long hyp_benchmarks_find(const hyp_benchmarks *b, const char *name)
{
    for (size_t i = 0; b && i < b->count; i++)
        if (strcasecmp(b->name[i], name) == 0)
            return (long)i;
    return -1;
}

static hyp_status bm_push(hyp_benchmarks *b, const char *name, const char *note, double lat, double lon,
                          double h, double sig)
{
    if (b->count == b->alloc) {
        size_t a = b->alloc ? 2 * b->alloc : 32;
        if (a > 1000000)
            return HYP_ERR_NOMEM;
        void *p;
        if (!(p = realloc(b->name, a * sizeof(char *)))) return HYP_ERR_NOMEM;
        b->name = p;
        if (!(p = realloc(b->note, a * sizeof(char *)))) return HYP_ERR_NOMEM;
        b->note = p;
        if (!(p = realloc(b->lat_deg, a * sizeof(double)))) return HYP_ERR_NOMEM;
        b->lat_deg = p;
        if (!(p = realloc(b->lon_deg, a * sizeof(double)))) return HYP_ERR_NOMEM;
        b->lon_deg = p;
        if (!(p = realloc(b->height_m, a * sizeof(double)))) return HYP_ERR_NOMEM;
        b->height_m = p;
        if (!(p = realloc(b->sigma_m, a * sizeof(double)))) return HYP_ERR_NOMEM;
        b->sigma_m = p;
        b->alloc = a;
    }
    char *n = strdup(name), *t = strdup(note);
    if (!n || !t) {
        free(n);
        free(t);
        return HYP_ERR_NOMEM;
    }
    size_t i = b->count++;
    b->name[i] = n;
    b->note[i] = t;
    b->lat_deg[i] = lat;
    b->lon_deg[i] = lon;
    b->height_m[i] = h;
    b->sigma_m[i] = sig;
    return HYP_OK;
}

/* A small CSV table: header names to column indices. */
typedef struct table {
    const char *path;
    hyp__csv_lines lr;
    char delim;
    hyp__csv_field f[MAX_FIELDS];
    int nf;
} table;

static hyp_status table_open(table *t, const char *path, hyp_error *err)
{
    memset(t, 0, sizeof *t);
    t->path = path;
    struct stat st;
    if (stat(path, &st) != 0)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", path, strerror(errno));
    if (S_ISDIR(st.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected a CSV file", path);
    if (!S_ISREG(st.st_mode))   /* a pipe or device could block forever */
        return hyp_error_set(err, HYP_ERR_IO, "%s: not a regular file (a pipe or a device?), expected a CSV file", path);
    t->lr.f = fopen(path, "rb");
    if (!t->lr.f)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", path, strerror(errno));
    return HYP_OK;
}

static void table_close(table *t)
{
    if (t->lr.f)
        fclose(t->lr.f);
    free(t->lr.buf);
}

/* Next non-blank, non-comment line split into fields: 1, 0 at the end. */
static int table_next(table *t, hyp_error *err, hyp_status *st)
{
    int r;
    while ((r = hyp__csv_read_line(&t->lr)) == 1) {
        char *s = t->lr.buf;
        if (t->lr.lineno == 1 && (unsigned char)s[0] == 0xEF && (unsigned char)s[1] == 0xBB && (unsigned char)s[2] == 0xBF)
            s += 3;
        size_t lead = strspn(s, " \t");
        if (s[lead] == '\0' || s[lead] == '#')
            continue;
        if (!t->delim)
            t->delim = hyp__csv_detect_delimiter(s);
        t->nf = hyp__csv_split(s, t->delim, t->f, MAX_FIELDS);
        if (t->nf < 0) {
            *st = hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: %s", t->path, t->lr.lineno,
                                t->nf == -1 ? "unterminated quote" : "too many fields");
            return -1;
        }
        return 1;
    }
    if (r < 0) {
        *st = hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: %s", t->path, t->lr.lineno + 1,
                            r == -2 ? "NUL byte; not a text file" : r == -1 ? "line too long" : "read error");
        return -1;
    }
    return 0;
}

static int column(const table *t, const char *name)
{
    for (int i = 0; i < t->nf; i++) {
        char n[64], u[16];
        hyp__csv_header_name(&t->f[i], n, sizeof n, u, sizeof u);
        if (strcasecmp(n, name) == 0)
            return i;
    }
    return -1;
}

static void field_text(const table *t, int i, char *buf, size_t n)
{
    size_t len = i >= 0 && i < t->nf ? t->f[i].len : 0;
    if (len >= n)
        len = n - 1;
    if (len)
        memcpy(buf, t->f[i].s, len);
    buf[len] = '\0';
    while (len && (buf[len - 1] == ' ' || buf[len - 1] == '\r'))
        buf[--len] = '\0';
}

/* The length of field i as field_text gives it whole (trailing blanks and
 * \r dropped): field_text cuts a longer one at its buffer, which would
 * silently change a name, or leave a valid time from a longer field. */
static size_t field_len(const table *t, int i)
{
    size_t len = i >= 0 && i < t->nf ? t->f[i].len : 0;
    while (len && (t->f[i].s[len - 1] == ' ' || t->f[i].s[len - 1] == '\r'))
        len--;
    return len;
}

/* HYP_ERR_VALUE naming the field when it does not fit n bytes with its NUL. */
static hyp_status field_fits(const table *t, int i, const char *what, size_t n, hyp_error *err)
{
    size_t len = field_len(t, i);
    if (len < n)
        return HYP_OK;
    return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: %s \"%.24s...\" is %zu bytes long; expected at most %zu", t->path,
                         t->lr.lineno, what, t->f[i].s, len, n - 1);
}

static hyp_status field_number(const table *t, int i, const char *what, double lo, double hi, int required,
                               double *v, hyp_error *err)
{
    if (i < 0 || i >= t->nf || hyp__parse_number(t->f[i].s, t->f[i].len, t->delim != ',', v) == 2) {
        *v = NAN;
        if (!required)
            return HYP_OK;
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: %s is missing", t->path, t->lr.lineno, what);
    }
    char text[64];
    field_text(t, i, text, sizeof text);
    if (hyp__parse_number(t->f[i].s, t->f[i].len, t->delim != ',', v) != 1)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: %s \"%s\" is not a number", t->path, t->lr.lineno, what, text);
    if (!(*v >= lo && *v <= hi))
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: %s %s is outside %g to %g", t->path, t->lr.lineno, what, text, lo, hi);
    return HYP_OK;
}

/* The names read so far, case-insensitively (strcasecmp's equality), in
 * an open-addressing hash table of row indices + 1 (0: empty): a name
 * listed twice is found per row in constant time. A scan of the rows
 * before each row was quadratic: 10 000 benchmarks took 0.3 s of
 * strcasecmp (issue 15). */
typedef struct name_set {
    size_t *slot;
    size_t cap;   /* a power of two, at most half full */
} name_set;

static size_t name_hash(const char *s)
{
    size_t h = 14695981039346656037ULL & SIZE_MAX;   /* FNV-1a (Fowler, Noll, Vo) */
    for (; *s; s++) {
        h ^= (size_t)tolower((unsigned char)*s);
        h *= (size_t)1099511628211ULL;
    }
    return h;
}

/* The row of that name (-1 none). */
static long set_find(const name_set *h, const hyp_benchmarks *b, const char *name)
{
    for (size_t k = name_hash(name) & (h->cap - 1); h->cap && h->slot[k]; k = (k + 1) & (h->cap - 1))
        if (strcasecmp(b->name[h->slot[k] - 1], name) == 0)
            return (long)(h->slot[k] - 1);
    return -1;
}

static void set_put(name_set *h, const hyp_benchmarks *b, size_t row)
{
    size_t k = name_hash(b->name[row]) & (h->cap - 1);
    while (h->slot[k])
        k = (k + 1) & (h->cap - 1);
    h->slot[k] = row + 1;
}

/* Adds row (the last of b), growing the table; -1 out of memory. */
static int set_add(name_set *h, const hyp_benchmarks *b, size_t row)
{
    if (2 * (row + 1) > h->cap) {
        name_set g = {calloc(h->cap ? 2 * h->cap : 64, sizeof *g.slot), h->cap ? 2 * h->cap : 64};
        if (!g.slot)
            return -1;
        for (size_t i = 0; i < row; i++)
            set_put(&g, b, i);
        free(h->slot);
        *h = g;
    }
    set_put(h, b, row);
    return 0;
}

static hyp_status bm_row(table *t, const int *c, double default_sigma_m, int need_height, hyp_benchmarks *out,
                        name_set *seen, hyp_error *err)
{
    char name[64], note[256];
    field_text(t, c[0], name, sizeof name);
    field_text(t, c[5], note, sizeof note);
    hyp_status fs = field_fits(t, c[0], "name", sizeof name, err);   /* a note may be cut */
    if (fs)
        return fs;
    if (!name[0])
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: name is empty", t->path, t->lr.lineno);
    if (set_find(seen, out, name) >= 0)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: %s \"%s\" is listed twice", t->path, t->lr.lineno,
                             need_height ? "benchmark" : "station", name);
    double lat, lon, h, sig;
    hyp_status st = field_number(t, c[1], "lat", -90, 90, 1, &lat, err);
    if (!st) st = field_number(t, c[2], "lon", -180, 180, 1, &lon, err);
    if (!st) st = field_number(t, c[3], "height", -500, 9000, need_height, &h, err);
    if (!st) st = field_number(t, c[4], "sigma", 0, 100, 0, &sig, err);
    if (st)
        return st;
    /* a zero sigma would be an infinite weight: the adjustment replaced it
     * with the default without a word, the output showing a sigma nobody
     * gave; a published height always has one */
    if (sig == 0 && h == h)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: sigma of \"%s\" is 0 m: a known height is never exact; "
                             "give its published sigma (m), or leave the field empty for the default (%g m)",
                             t->path, t->lr.lineno, name, default_sigma_m);
    if (sig != sig)
        sig = default_sigma_m;
    if (h != h)
        sig = NAN;   /* a station to be determined has no sigma of its own */
    if (bm_push(out, name, note, lat, lon, h, sig) || set_add(seen, out, out->count - 1))
        return hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", t->path);
    return HYP_OK;
}

/* Benchmarks (height required) or stations (height optional). */
static hyp_status marks_read(const char *path, double default_sigma_m, int need_height, hyp_benchmarks *out,
                             hyp_error *err)
{
    hyp_benchmarks_free(out);
    table t;
    hyp_status st = table_open(&t, path, err);
    if (st)
        return st;
    int r = table_next(&t, err, &st);
    if (r == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: empty file: no header row", path);
    int c[6] = {-1, -1, -1, -1, -1, -1};
    static const char *names[6] = {"name", "lat", "lon", "height", "sigma", "note"};
    if (r == 1) {
        for (int k = 0; k < 6; k++)
            c[k] = column(&t, names[k]);
        for (int k = 0; k < (need_height ? 4 : 3) && !st; k++)
            if (c[k] < 0)
                st = hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: header: no \"%s\" column (expected name, lat, lon, %s)",
                                   path, t.lr.lineno, names[k], need_height ? "height[, sigma, note]" : "[height, sigma, note]");
    }
    name_set seen = {NULL, 0};
    while (!st && (r = table_next(&t, err, &st)) == 1)
        st = bm_row(&t, c, default_sigma_m, need_height, out, &seen, err);
    free(seen.slot);
    if (!st && out->count == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: no %s rows", path, need_height ? "benchmark" : "station");
    table_close(&t);
    if (st)
        hyp_benchmarks_free(out);
    return st;
}

hyp_status hyp_benchmarks_read(const char *path, double default_sigma_m, hyp_benchmarks *out,
                               hyp_msgs *msgs, hyp_error *err)
{
    (void)msgs;
    return marks_read(path, default_sigma_m, 1, out, err);
}

hyp_status hyp_stations_read(const char *path, double default_sigma_m, hyp_benchmarks *out, hyp_msgs *msgs,
                             hyp_error *err)
{
    (void)msgs;
    return marks_read(path, default_sigma_m, 0, out, err);
}

/* What a row reader needs besides the table: the zone of times without
 * one and the marks its names must be among. */
typedef struct rows_ctx {
    const hyp_zone *zone;
    const hyp_benchmarks *marks;
} rows_ctx;

typedef hyp_status (*row_fn)(table *t, const int *c, const rows_ctx *x, void *elem, hyp_error *err);

/* A CSV of rows of one kind: the header's columns found by name (those in
 * `optional` bits may be missing), each row read by fn into a growing
 * array of elem-byte elements (at most max); *out is allocated. */
static hyp_status read_rows(const char *path, const char *const *names, int n_names, unsigned optional,
                            const char *expected, size_t elem, size_t max, row_fn fn, const rows_ctx *x, void **out,
                            size_t *count, hyp_error *err)
{
    *out = NULL;
    *count = 0;
    table t;
    hyp_status st = table_open(&t, path, err);
    if (st)
        return st;
    int r = table_next(&t, err, &st);
    int c[8];
    if (r == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: empty file: no header row", path);
    for (int k = 0; r == 1 && k < n_names && !st; k++)
        if ((c[k] = column(&t, names[k])) < 0 && !(optional >> k & 1u))
            st = hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: header: no \"%s\" column (expected %s)", path, t.lr.lineno,
                               names[k], expected);
    size_t alloc = 0;
    while (!st && (r = table_next(&t, err, &st)) == 1) {
        if (*count == alloc) {
            alloc = alloc ? 2 * alloc : 64;
            void *p = alloc > max ? NULL : realloc(*out, alloc * elem);
            if (!p) {
                st = hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", path);
                break;
            }
            *out = p;
        }
        st = fn(&t, c, x, (char *)*out + *count * elem, err);
        if (!st)
            (*count)++;
    }
    table_close(&t);
    if (st) {
        free(*out);
        *out = NULL;
        *count = 0;
    }
    return st;
}

static hyp_status book_row(table *t, const int *c, const rows_ctx *x, void *elem, hyp_error *err)
{
    hyp_book_entry *e = elem;
    const hyp_zone *zone = x->zone;
    const hyp_benchmarks *st = x->marks;
    char a[96], b[96];
    memset(e, 0, sizeof *e);
    field_text(t, c[0], e->station, sizeof e->station);
    field_text(t, c[1], e->rover, sizeof e->rover);
    field_text(t, c[2], a, sizeof a);
    field_text(t, c[3], b, sizeof b);
    e->line = t->lr.lineno;
    hyp_status fs = field_fits(t, c[0], "station", sizeof e->station, err);
    if (!fs)
        fs = field_fits(t, c[1], "rover", sizeof e->rover, err);
    if (!fs)
        fs = field_fits(t, c[2], "start", sizeof a, err);
    if (!fs)
        fs = field_fits(t, c[3], "end", sizeof b, err);
    if (fs)
        return fs;
    if (!e->station[0])
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: station is empty", t->path, t->lr.lineno);
    if (hyp_benchmarks_find(st, e->station) < 0)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: station \"%s\" is not in the stations file", t->path,
                             t->lr.lineno, e->station);
    if (hyp_time_parse(a, zone, &e->start_s) != HYP_TIME_OK)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: start \"%s\" is not a time with zone (ISO 8601)", t->path, t->lr.lineno, a);
    if (hyp_time_parse(b, zone, &e->end_s) != HYP_TIME_OK)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: end \"%s\" is not a time with zone (ISO 8601)", t->path, t->lr.lineno, b);
    if (!(e->end_s > e->start_s))
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: end %s is not after start %s", t->path, t->lr.lineno, b, a);
    return HYP_OK;
}

hyp_status hyp_fieldbook_read(const char *path, const hyp_zone *zone, const hyp_benchmarks *stations,
                              hyp_book_entry **out, size_t *count, hyp_error *err)
{
    static const char *const names[4] = {"station", "rover", "start", "end"};
    rows_ctx x = {zone, stations};
    void *rows;
    hyp_status st = read_rows(path, names, 4, 1u << 1, "station, rover, start, end", sizeof **out, 1000000, book_row,
                              &x, &rows, count, err);
    *out = rows;
    return st;
}

static hyp_status tie_row(table *t, const int *c, const rows_ctx *x, void *elem, hyp_error *err)
{
    hyp_tie_spec *ts = elem;
    const hyp_zone *zone = x->zone;
    const hyp_benchmarks *bm = x->marks;
    char a[96], b[96];
    field_text(t, c[0], ts->name, sizeof ts->name);
    field_text(t, c[1], a, sizeof a);
    field_text(t, c[2], b, sizeof b);
    ts->line = t->lr.lineno;
    if (!ts->name[0])
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: name is empty", t->path, t->lr.lineno);
    if (strcmp(ts->name, "base") != 0 && hyp_benchmarks_find(bm, ts->name) < 0)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: name \"%s\" is not a benchmark%s (nor \"base\")", t->path,
                             t->lr.lineno, ts->name, bm ? " of --benchmarks" : " (no --benchmarks given)");
    if (hyp_time_parse(a, zone, &ts->start_s) != HYP_TIME_OK)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: start \"%s\" is not a time with zone (ISO 8601)", t->path, t->lr.lineno, a);
    if (hyp_time_parse(b, zone, &ts->end_s) != HYP_TIME_OK)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: end \"%s\" is not a time with zone (ISO 8601)", t->path, t->lr.lineno, b);
    if (!(ts->end_s > ts->start_s))
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: end %s is not after start %s", t->path, t->lr.lineno, b, a);
    return HYP_OK;
}

hyp_status hyp_ties_read(const char *path, const hyp_zone *zone, const hyp_benchmarks *benchmarks,
                         hyp_tie_spec **out, size_t *count, hyp_error *err)
{
    static const char *const names[3] = {"name", "start", "end"};
    rows_ctx x = {zone, benchmarks};
    void *rows;
    hyp_status st = read_rows(path, names, 3, 0, "name, start, end", sizeof **out, 100000, tie_row, &x, &rows, count,
                              err);
    *out = rows;
    return st;
}

hyp_status hyp_base_index_read(const char *path, hyp_base_entry **out, size_t *count, hyp_error *err)
{
    *out = NULL;
    *count = 0;
    table t;
    hyp_status st = table_open(&t, path, err);
    if (st)
        return st;
    int r = table_next(&t, err, &st);
    static const char *names[7] = {"file", "height", "lat", "lon", "clock_offset", "kind", "time_format"};
    int c[7];
    if (r == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: empty file: no header row", path);
    for (int k = 0; r == 1 && k < 7 && !st; k++)
        if ((c[k] = column(&t, names[k])) < 0 && k < 2)
            st = hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: header: no \"%s\" column (expected file, height[, lat, lon, clock_offset, kind])",
                               path, t.lr.lineno, names[k]);
    size_t alloc = 0;
    while (!st && (r = table_next(&t, err, &st)) == 1) {
        if (*count == alloc) {
            alloc = alloc ? 2 * alloc : 16;
            hyp_base_entry *p = alloc > 100000 ? NULL : realloc(*out, alloc * sizeof *p);
            if (!p) {
                st = hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", path);
                break;
            }
            *out = p;
        }
        hyp_base_entry *e = &(*out)[*count];
        memset(e, 0, sizeof *e);
        e->line = t.lr.lineno;
        field_text(&t, c[0], e->file, sizeof e->file);
        char kind[32];
        field_text(&t, c[5], kind, sizeof kind);
        if (!e->file[0] || strstr(e->file, "..") || e->file[0] == '/')
            st = hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: file \"%s\" must name a log in the folder", path, t.lr.lineno, e->file);
        if (!st) st = field_number(&t, c[1], "height", -500, 9000, 1, &e->height_m, err);
        if (!st) st = field_number(&t, c[2], "lat", -90, 90, 0, &e->lat_deg, err);
        if (!st) st = field_number(&t, c[3], "lon", -180, 180, 0, &e->lon_deg, err);
        if (!st) st = field_number(&t, c[4], "clock_offset", -86400, 86400, 0, &e->clock_offset_s, err);
        if (!st && e->clock_offset_s != e->clock_offset_s)
            e->clock_offset_s = 0.0;
        if (!st && kind[0] && strcasecmp(kind, "station") != 0 && strcasecmp(kind, "qnh") != 0)
            st = hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: kind \"%s\": expected station or qnh", path, t.lr.lineno, kind);
        e->qnh = strcasecmp(kind, "qnh") == 0;
        field_text(&t, c[6], e->time_format, sizeof e->time_format);
        char why[160];
        if (!st && e->time_format[0] && hyp_time_format_check(e->time_format, why, sizeof why))
            st = hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: time_format \"%s\" %s", path, t.lr.lineno, e->time_format, why);
        if (!st)
            (*count)++;
    }
    if (!st && *count == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: no base rows", path);
    table_close(&t);
    if (st) {
        free(*out);
        *out = NULL;
        *count = 0;
    }
    return st;
}
