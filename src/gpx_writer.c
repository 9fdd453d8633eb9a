/* gpx_writer.c - the corrected GPX: the input's bytes copied unchanged,
 * with the new <ele> values and this project's elements spliced in at the
 * offsets the reader recorded; and a new GPX 1.1 for rovers read from CSV. */
#define _GNU_SOURCE   /* fwrite_unlocked */
#include "hypsolev/writers.h"
#include "output_set.h"
#include "writers_int.h"
#include "text_safe.h"
#include "fmtnum.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <pthread.h>
#include <unistd.h>

int hyp_same_file(const char *a, const char *b)
{
    struct stat sa, sb;
    if (stat(a, &sa) != 0 || stat(b, &sb) != 0)
        return 0;
    return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}

/* A forward-only reader over the input that copies or skips up to an offset
 * and can peek at the next byte, to check each splice lands where the
 * reader said. */
typedef struct src {
    FILE *f;
    unsigned char buf[1 << 16];
    size_t len, pos;
    int64_t off;          /* file offset of buf[pos] */
    int last;             /* the last byte consumed, -1 at start */
} src;

/* Where the splice goes: a file, or (f NULL) nowhere, only counting the
 * bytes, which tells where the second half of a two-thread splice starts.
 * Each sink belongs to one thread: the unlocked stdio calls. */
typedef struct sink {
    FILE *f;
    int64_t n;            /* bytes put */
    int failed;
} sink;

static void put_bytes(sink *k, const void *p, size_t n)
{
    k->n += (int64_t)n;
    if (k->f && fwrite_unlocked(p, 1, n, k->f) != n)
        k->failed = 1;
}

static void put_str(sink *k, const char *str)
{
    put_bytes(k, str, strlen(str));
}

static void put_fmt(sink *k, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;

static void put_fmt(sink *k, const char *fmt, ...)
{
    char buf[1024];
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    if (n < 0 || (size_t)n >= sizeof buf) {
        k->failed = 1;   /* never: the callers' strings are short */
        return;
    }
    put_bytes(k, buf, (size_t)n);
}

/* v with prec decimals, exactly as printf's "%.*f" */
static void put_num(sink *k, double v, int prec)
{
    char b[40];
    put_bytes(k, b, (size_t)hyp__fmt_fixed(b, sizeof b, v, prec));
}

static int src_fill(src *s)
{
    if (s->pos < s->len)
        return 1;
    s->len = fread(s->buf, 1, sizeof s->buf, s->f);
    s->pos = 0;
    return s->len > 0;
}

/* Copies (out != NULL) or skips bytes up to file offset `to`. A source
 * without a file (counting) only moves on, putting the count to out. */
static int src_advance(src *s, int64_t to, sink *out)
{
    if (!s->f) {
        if (to > s->off) {
            if (out)
                out->n += to - s->off;
            s->off = to;
        }
        return 0;
    }
    while (s->off < to) {
        if (!src_fill(s))
            return -1;
        size_t n = s->len - s->pos;
        if ((int64_t)n > to - s->off)
            n = (size_t)(to - s->off);
        if (out && (put_bytes(out, s->buf + s->pos, n), out->failed))
            return -2;
        s->last = s->buf[s->pos + n - 1];
        s->pos += n;
        s->off += (int64_t)n;
    }
    return 0;
}

static int src_peek(src *s)
{
    return src_fill(s) ? s->buf[s->pos] : -1;
}

/* v with three decimals exactly as "%.3f" prints it (fmtnum.c), into a
 * buffer of 32 bytes. */
static int fmt3(char *buf, double v)
{
    return hyp__fmt_fixed(buf, 32, v, 3);
}

/* s escaped for XML into dst (text_safe.h: invalid UTF-8 and control
 * characters of a file name become U+FFFD), cut at a whole character. */
static void escape_into(char *dst, size_t n, const char *s)
{
    hyp__buf b;
    hyp__buf_init(&b, n - 1);
    dst[0] = '\0';
    char part[8];
    const unsigned char *p = (const unsigned char *)s;
    while (*p) {
        long cp;
        size_t len = hyp__utf8_next(p, &cp);
        memcpy(part, p, len);
        part[len] = '\0';
        size_t before = b.len;
        if (hyp__xml_escape(&b, part)) {
            hyp__buf_truncate(&b, before);
            break;
        }
        p += len;
    }
    if (b.data)
        snprintf(dst, n, "%.*s", (int)b.len, b.data);
    hyp__buf_free(&b);
}

/* The project's elements for point i, to go under its extensions. */
static void point_elements(char *buf, size_t n, const hyp_gpx_doc *doc, const hyp_correct_result *res, size_t i)
{
    const char *P = HYP_GPX_PREFIX;
    if (res->status[i] == HYP_PT_OK) {
        double e = doc->pts.ele_m[i];
        char a[32], b[32];
        fmt3(b, res->sigma_m[i]);
        const char *fl = res->extrapolated && res->extrapolated[i]
                             ? "<" HYP_GPX_PREFIX ":status>extrapolated outside the bases' heights</" HYP_GPX_PREFIX ":status>"
                             : "";
        /* built by hand: this runs once per point */
        char *w = buf, *end = buf + n - 1;
#define PUT(str) do { for (const char *q_ = (str); *q_ && w < end; ) *w++ = *q_++; } while (0)
        if (e == e) {
            fmt3(a, e);
            PUT("<" HYP_GPX_PREFIX ":ele_in>");
            PUT(a);
            PUT("</" HYP_GPX_PREFIX ":ele_in>");
        }
        PUT("<" HYP_GPX_PREFIX ":sigma>");
        PUT(b);
        PUT("</" HYP_GPX_PREFIX ":sigma>");
        PUT(fl);
#undef PUT
        *w = '\0';
    } else {
        char why[200];
        const char *reason = res->status[i] == HYP_PT_REFUSED
                                 ? hyp_sample_flag_text((hyp_sample_flag)doc->pts.flag[i])
                                 : hyp_point_status_text((hyp_point_status)res->status[i]);
        escape_into(why, sizeof why, reason);
        snprintf(buf, n, "<%s:status>not corrected: %s</%s:status>", P, why, P);
    }
}

/* What a failed src_advance means: -2 the output could not be written, -1
 * the input ended early; otherwise the byte found was not the one the
 * reader recorded. */
static hyp_status advance_error(hyp_error *err, const char *in, int rc, int64_t off);

static hyp_status layout_error(hyp_error *err, const char *in, int64_t off)
{
    return hyp_error_set(err, HYP_ERR_INTERNAL,
                         "%s: internal error: byte %lld is not where the GPX reader recorded it, so reader and writer "
                         "disagree (a bug: please report it with this file, unless the file was changed since it was read); "
                         "nothing written",
                         in, (long long)off);
}

static hyp_status advance_error(hyp_error *err, const char *in, int rc, int64_t off)
{
    if (rc == -2)
        return hyp_error_set(err, HYP_ERR_IO, "write error: %s; nothing written", strerror(errno));
    if (rc == -1)
        return hyp_error_set(err, HYP_ERR_IO, "%s: read error or the file was cut short at byte %lld; nothing written", in,
                             (long long)off);
    return layout_error(err, in, off);
}

/* Copies (or skips) to `to`, then checks the byte just consumed (want_last)
 * or the next one (want_next); 0 for no check. */
static hyp_status step(src *s, sink *out, int64_t to, int want_last, int want_next, const char *in, hyp_error *err)
{
    int rc = src_advance(s, to, out);
    if (rc)
        return advance_error(err, in, rc, to);
    if (!s->f)
        return HYP_OK;   /* counting: the writing pass checks the bytes */
    if ((want_last && s->last != want_last) || (want_next && src_peek(s) != want_next))
        return layout_error(err, in, to);
    return HYP_OK;
}

/* One point's or waypoint's splice: the corrected height into its <ele>
 * (or a new <ele> first, where the schema wants it) when `ok`, then `el`
 * under its extensions. */
static hyp_status splice_at(src *s, sink *out, const char *in, const hyp_gpx_layout *L, const hyp_gpx_point *P,
                            int ok, double height_m, const char *el, hyp_error *err)
{
    const char *gp = L->prefix, *colon = L->prefix[0] ? ":" : "";
    hyp_status st;
    if (ok && P->ele_beg >= 0) {
        if ((st = step(s, out, P->ele_beg, '>', 0, in, err)))
            return st;
        char h[32];
        put_bytes(out, h, (size_t)fmt3(h, height_m));
        if ((st = step(s, NULL, P->ele_end, 0, '<', in, err)))
            return st;
    } else if (ok) {
        if ((st = step(s, out, P->open_end, '>', 0, in, err)))
            return st;
        put_fmt(out, "<%s%sele>%.3f</%s%sele>", gp, colon, height_m, gp, colon);
    }
    if ((st = step(s, out, P->ext_ins, 0, '<', in, err)))
        return st;
    if (P->ext_kind == HYP_EXT_WRAP) {
        put_str(out, "<"), put_str(out, gp), put_str(out, colon), put_str(out, "extensions>");
        put_str(out, el);
        put_str(out, "</"), put_str(out, gp), put_str(out, colon), put_str(out, "extensions>");
    } else
        put_str(out, el);
    return HYP_OK;
}

static hyp_status splice_point(src *s, sink *out, const char *in, const hyp_gpx_doc *doc,
                               const hyp_correct_result *res, size_t i, const hyp_gpx_point *P, hyp_error *err)
{
    if (P->open_end < 0 || P->ext_ins < 0)
        return HYP_OK;     /* <trkpt .../> without content: nothing to splice */
    char el[512];
    point_elements(el, sizeof el, doc, res, i);
    return splice_at(s, out, in, &doc->layout, P, res->status[i] == HYP_PT_OK, res->height_m[i], el, err);
}

/* Waypoint k: corrected, its height and sigma as a track point's
 * (docs/formats.md); otherwise not a byte of it changes. */
static hyp_status splice_waypoint(src *s, sink *out, const char *in, const hyp_gpx_doc *doc,
                                  const hyp_waypoint_heights *wh, size_t k, hyp_error *err)
{
    const hyp_gpx_point *P = &doc->wpt_at[k];
    if (wh->status[k] != HYP_WPT_CORRECTED || P->open_end < 0 || P->ext_ins < 0)
        return HYP_OK;
    char el[160], a[32], b[32];
    const char *X = HYP_GPX_PREFIX;
    fmt3(b, wh->sigma_m[k]);
    if (doc->wpt_ele_m[k] == doc->wpt_ele_m[k]) {
        fmt3(a, doc->wpt_ele_m[k]);
        snprintf(el, sizeof el, "<%s:ele_in>%s</%s:ele_in><%s:sigma>%s</%s:sigma>", X, a, X, X, b, X);
    } else
        snprintf(el, sizeof el, "<%s:sigma>%s</%s:sigma>", X, b, X);
    return splice_at(s, out, in, &doc->layout, P, 1, wh->height_m[k], el, err);
}

/* The waypoints from *k on that start before file offset `before`. */
static hyp_status splice_waypoints(src *s, sink *out, const char *in, const hyp_gpx_doc *doc,
                                   const hyp_waypoint_heights *wh, size_t *k, int64_t before, hyp_error *err)
{
    hyp_status st = HYP_OK;
    if (!wh || !doc->wpt_at)
        return st;
    for (; !st && *k < wh->count && *k < doc->wpts.count && doc->wpt_at[*k].open_end < before; ++*k)
        st = splice_waypoint(s, out, in, doc, wh, *k, err);
    return st;
}

/* The document-level note of the vertical reference: GPX 1.1 in
 * <metadata><extensions> (metadata is the root's first child), GPX 1.0 as a
 * private element before </gpx>. */
static hyp_status splice_vref(src *s, sink *out, const char *in_path, const hyp_gpx_layout *L,
                              const char *vref, int at_end, hyp_error *err)
{
    const char *gp = L->prefix, *colon = L->prefix[0] ? ":" : "";
    char el[256], esc[160];
    escape_into(esc, sizeof esc, vref);
    snprintf(el, sizeof el, "<%s:vertical_ref>%s</%s:vertical_ref>", HYP_GPX_PREFIX, esc, HYP_GPX_PREFIX);
    if (L->version == 10) {
        if (!at_end || L->root_close < 0)
            return HYP_OK;
        hyp_status st = step(s, out, L->root_close, 0, '<', in_path, err);
        if (st)
            return st;
        put_str(out, el);
        return HYP_OK;
    }
    if (at_end || L->meta_kind == 3 || L->root_open_end < 0)
        return HYP_OK;
    int64_t at = L->meta_kind ? L->meta_ins : L->root_open_end;
    hyp_status st = step(s, out, at, L->meta_kind ? 0 : '>', L->meta_kind ? '<' : 0, in_path, err);
    if (st)
        return st;
    if (L->meta_kind == 1)
        put_str(out, el);
    else if (L->meta_kind == 2)
        put_fmt(out, "<%s%sextensions>%s</%s%sextensions>", gp, colon, el, gp, colon);
    else
        put_fmt(out, "<%s%smetadata><%s%sextensions>%s</%s%sextensions></%s%smetadata>", gp, colon, gp, colon, el, gp,
                colon, gp, colon);
    return HYP_OK;
}

/* Points [lo, hi) of the splice, from the anchor before point lo; the
 * document-level parts only where the range starts at the beginning
 * (lo == 0) or runs to the end (hi == count). */
static hyp_status splice_range(src *s, sink *out, const char *in_path, const hyp_gpx_doc *doc,
                               const hyp_correct_result *res, const hyp_waypoint_heights *wh, const char *vref,
                               size_t lo, size_t hi, int64_t anchor, int64_t stop, hyp_error *err)
{
    const hyp_gpx_layout *L = &doc->layout;
    hyp_status st;
    /* waypoints (in file order) are this range's from its first point on
     * (the first range's from the start) */
    size_t wk = 0;
    if (lo > 0 && wh && doc->wpt_at)
        while (wk < wh->count && doc->wpt_at[wk].open_end < anchor + (int64_t)L->pt_step[lo])
            wk++;
    if (lo == 0) {
        if (!L->has_hyp_ns) {
            int c, rc = src_advance(s, L->root_attr_ins, out);
            if (rc)
                return advance_error(err, in_path, rc, L->root_attr_ins);
            if (s->f && (c = src_peek(s)) != '>' && c != '/')
                return layout_error(err, in_path, L->root_attr_ins);
            put_fmt(out, " xmlns:%s=\"%s\"", HYP_GPX_PREFIX, HYP_GPX_NS);
        }
        if (vref && (st = splice_vref(s, out, in_path, L, vref, 0, err)))
            return st;
    }
    for (size_t i = lo; i < hi; i++) {
        hyp_gpx_point P;
        hyp_gpx_point_next(L, i, &anchor, &P);
        if ((st = splice_waypoints(s, out, in_path, doc, wh, &wk, anchor, err)))
            return st;
        /* the layout is in file order; the series may be in time order */
        st = splice_point(s, out, in_path, doc, res, doc->pt_series ? doc->pt_series[i] : i, &P, err);
        if (st)
            return st;
    }
    if ((st = splice_waypoints(s, out, in_path, doc, wh, &wk, hi < doc->pts.count ? stop : INT64_MAX, err)))
        return st;
    if (hi < doc->pts.count) {   /* the rest is another part's */
        int rc = src_advance(s, stop, out);
        return rc ? advance_error(err, in_path, rc, stop) : HYP_OK;
    }
    if (vref && (st = splice_vref(s, out, in_path, L, vref, 1, err)))
        return st;
    int rc = src_advance(s, L->file_size, out);
    if (rc)
        return advance_error(err, in_path, rc, L->file_size);
    if (src_fill(s))
        return hyp_error_set(err, HYP_ERR_IO, "%s: the file grew since it was read; nothing written", in_path);
    return HYP_OK;
}

static hyp_status open_src(src *s, const char *in_path, const hyp_gpx_doc *doc, hyp_error *err)
{
    s->last = -1;
    s->f = fopen(in_path, "rb");
    if (!s->f)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", in_path, strerror(errno));
    struct stat sb;
    if (fstat(fileno(s->f), &sb) != 0 || (int64_t)sb.st_size != doc->layout.file_size) {
        fclose(s->f);
        s->f = NULL;
        return hyp_error_set(err, HYP_ERR_IO, "%s: the file changed since it was read; nothing written", in_path);
    }
    return HYP_OK;
}

/* The second half of a two-part splice, in a thread of its own: it counts
 * the bytes the first half will write (the same splice into a counting
 * sink, the input not read), then writes points lo.. from the anchor of
 * point lo on, at that offset of the same temporary file. */
typedef struct half {
    const char *in_path, *tmp_path;
    const hyp_gpx_doc *doc;
    const hyp_correct_result *res;
    const hyp_waypoint_heights *wh;
    const char *vref;
    size_t lo;
    int64_t anchor_before, start;
    int64_t first_len;    /* bytes of the first half's output */
    hyp_error err;
    hyp_status st;
} half;

static void *second_half(void *arg)
{
    half *h = arg;
    src *s = calloc(1, sizeof *s);
    if (!s) {
        h->st = hyp_error_set(&h->err, HYP_ERR_NOMEM, "out of memory");
        return NULL;
    }
    sink count = {NULL, 0, 0};
    s->last = -1;
    h->st = splice_range(s, &count, h->in_path, h->doc, h->res, h->wh, h->vref, 0, h->lo, 0, h->start, &h->err);
    h->first_len = count.n;
    FILE *out = NULL;
    char *obuf = NULL;
    if (!h->st) {
        int fd = open(h->tmp_path, O_WRONLY);
        if (fd < 0 || !(out = fdopen(fd, "wb"))) {
            if (fd >= 0)
                close(fd);
            h->st = hyp_error_set(&h->err, HYP_ERR_IO, "%s: cannot write: %s", h->tmp_path, strerror(errno));
        } else {
            if ((obuf = malloc(HYP__OUT_BUF)))
                setvbuf(out, obuf, _IOFBF, HYP__OUT_BUF);
            if (fseeko(out, (off_t)h->first_len, SEEK_SET) != 0)
                h->st = hyp_error_set(&h->err, HYP_ERR_IO, "%s: cannot seek: %s", h->tmp_path, strerror(errno));
        }
    }
    if (!h->st)
        h->st = open_src(s, h->in_path, h->doc, &h->err);
    if (!h->st) {
        /* start one byte early so that the check of the byte before the
         * first splice sees it; that byte is the first half's */
        if (fseeko(s->f, (off_t)(h->start - 1), SEEK_SET) != 0) {
            h->st = hyp_error_set(&h->err, HYP_ERR_IO, "%s: cannot seek: %s", h->in_path, strerror(errno));
        } else {
            sink k = {out, 0, 0};
            s->off = h->start - 1;
            int rc = src_advance(s, h->start, NULL);
            h->st = rc ? advance_error(&h->err, h->in_path, rc, h->start)
                       : splice_range(s, &k, h->in_path, h->doc, h->res, h->wh, h->vref, h->lo, h->doc->pts.count,
                                      h->anchor_before, 0, &h->err);
            if (!h->st && k.failed)
                h->st = hyp_error_set(&h->err, HYP_ERR_IO, "write error: %s; nothing written", strerror(errno));
        }
        fclose(s->f);
    }
    if (out && fclose(out) != 0 && !h->st)
        h->st = hyp_error_set(&h->err, HYP_ERR_IO, "write error: %s; nothing written", strerror(errno));
    free(obuf);
    free(s);
    return NULL;
}

/* Below this many points one thread writes: a thread is not worth it. */
#define SPLIT_MIN_POINTS 20000

hyp_status hyp__gpx_splice_to(const char *in_path, const hyp_gpx_doc *doc, const hyp_correct_result *res,
                              const hyp_waypoint_heights *wh, const hyp_output_info *info, hyp__outfile *o,
                              hyp_error *err)
{
    const char *out_path = o->final[0] ? o->final : "standard output";
    if (res->count != doc->pts.count)
        return hyp_error_set(err, HYP_ERR_INTERNAL, "%s: result does not match the track", in_path);
    src *s = calloc(1, sizeof *s);
    if (!s)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    const char *vref = info ? info->vref : NULL;
    hyp_status st = open_src(s, in_path, doc, err);
    if (st) {
        free(s);
        return st;
    }
    size_t n = doc->pts.count, m = n / 2;
    int split = info && info->threads >= 2 && n >= SPLIT_MIN_POINTS && o->kind == HYP__OUT_STAGED;
    half h = {in_path, o->tmp, doc, res, wh, vref, m, 0, 0, 0, {0}, HYP_OK};
    pthread_t tid;
    if (split) {
        /* the anchor before point m, and point m's own: where the halves meet */
        for (size_t i = 0; i < m; i++)
            h.anchor_before += doc->layout.pt_step[i];
        h.start = h.anchor_before + doc->layout.pt_step[m];
        split = h.start > 0 && pthread_create(&tid, NULL, second_half, &h) == 0;
    }
    sink k = {o->f, 0, 0};
    if (split) {
        st = splice_range(s, &k, in_path, doc, res, wh, vref, 0, m, 0, h.start, err);
        pthread_join(tid, NULL);
        if (!st && h.st)
            st = hyp_error_set(err, h.st, "%s", h.err.message);
        if (!st && !k.failed && k.n != h.first_len)   /* the halves must meet exactly */
            st = hyp_error_set(err, HYP_ERR_INTERNAL, "%s: the two halves of the output do not meet (%lld, %lld bytes); nothing written",
                               out_path, (long long)k.n, (long long)h.first_len);
    } else
        st = splice_range(s, &k, in_path, doc, res, wh, vref, 0, n, 0, 0, err);
    if (!st && k.failed)
        st = hyp_error_set(err, HYP_ERR_IO, "write error: %s; nothing written", strerror(errno));
    fclose(s->f);
    free(s);
    return st;
}

hyp_status hyp_gpx_write_spliced(const char *in_path, const hyp_gpx_doc *doc,
                                 const hyp_correct_result *res, const hyp_output_info *info,
                                 const char *out_path, hyp_error *err)
{
    if (hyp_same_file(in_path, out_path))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: output would overwrite the input; choose another name", out_path);
    hyp__outfile o;
    hyp__stale_remove(out_path);
    hyp_status st = hyp__out_open(&o, out_path, err);
    if (!st)
        st = hyp__gpx_splice_to(in_path, doc, res, NULL, info, &o, err);
    if (!st)
        return hyp__out_commit(&o, err);
    hyp__out_abort(&o);
    return st;
}

hyp_status hyp__gpx_new_to(const hyp_series *s, const hyp_correct_result *res, const hyp_output_info *info,
                           const char *track_name, hyp__outfile *o, hyp_error *err)
{
    char name[256];
    escape_into(name, sizeof name, track_name ? track_name : "track");
    FILE *f = o->f;
    fprintf(f, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
               "<gpx version=\"1.1\" creator=\"hypsolev\" xmlns=\"http://www.topografix.com/GPX/1/1\" xmlns:%s=\"%s\">\n",
            HYP_GPX_PREFIX, HYP_GPX_NS);
    if (info && info->vref) {
        char v[160];
        escape_into(v, sizeof v, info->vref);
        fprintf(f, "  <metadata><extensions><%s:vertical_ref>%s</%s:vertical_ref></extensions></metadata>\n",
                HYP_GPX_PREFIX, v, HYP_GPX_PREFIX);
    }
    fprintf(f, "  <trk>\n    <name>%s</name>\n    <trkseg>\n", name);
    sink k = {f, 0, 0};
    const char *P = HYP_GPX_PREFIX;
    for (size_t i = 0; i < s->count && !k.failed; i++) {
        if (hyp_series_lat(s, i) != hyp_series_lat(s, i) || hyp_series_lon(s, i) != hyp_series_lon(s, i))
            continue;   /* GPX needs a position */
        int ok = res->status[i] == HYP_PT_OK;
        double ele = ok ? res->height_m[i] : s->ele_m[i];
        /* by hand, without printf: this runs once per point */
        put_str(&k, "      <trkpt lat=\"");
        put_num(&k, hyp_series_lat(s, i), 8);
        put_str(&k, "\" lon=\"");
        put_num(&k, hyp_series_lon(s, i), 8);
        put_str(&k, "\">");
        if (ele == ele)
            put_str(&k, "<ele>"), put_num(&k, ele, 3), put_str(&k, "</ele>");
        if (s->time_s[i] == s->time_s[i]) {
            char t[40];
            hyp_time_format(s->time_s[i], t, sizeof t);
            put_str(&k, "<time>"), put_str(&k, t), put_str(&k, "</time>");
        }
        put_str(&k, "<extensions>");
        if (ok) {
            if (s->ele_m[i] == s->ele_m[i])
                put_fmt(&k, "<%s:ele_in>", P), put_num(&k, s->ele_m[i], 3), put_fmt(&k, "</%s:ele_in>", P);
            put_fmt(&k, "<%s:sigma>", P), put_num(&k, res->sigma_m[i], 3), put_fmt(&k, "</%s:sigma>", P);
        } else {
            const char *reason = res->status[i] == HYP_PT_REFUSED ? hyp_sample_flag_text((hyp_sample_flag)s->flag[i])
                                                                   : hyp_point_status_text((hyp_point_status)res->status[i]);
            put_fmt(&k, "<%s:status>not corrected: %s</%s:status>", P, reason, P);
        }
        if (s->pressure_pa[i] == s->pressure_pa[i])
            put_fmt(&k, "<%s:pressure unit=\"hPa\">", P), put_num(&k, s->pressure_pa[i] / 100.0, 2), put_fmt(&k, "</%s:pressure>", P);
        put_str(&k, "</extensions></trkpt>\n");
    }
    fputs("    </trkseg>\n  </trk>\n</gpx>\n", f);
    if (k.failed)
        return hyp_error_set(err, HYP_ERR_IO, "%s: write error: %s; nothing written",
                             o->final[0] ? o->final : "standard output", strerror(errno));
    return HYP_OK;
}

hyp_status hyp_gpx_write_new(const hyp_series *s, const hyp_correct_result *res, const hyp_output_info *info,
                             const char *track_name, const char *out_path, hyp_error *err)
{
    hyp__outfile o;
    hyp__stale_remove(out_path);
    hyp_status st = hyp__out_open(&o, out_path, err);
    if (!st)
        st = hyp__gpx_new_to(s, res, info, track_name, &o, err);
    if (!st)
        return hyp__out_commit(&o, err);
    hyp__out_abort(&o);
    return st;
}
