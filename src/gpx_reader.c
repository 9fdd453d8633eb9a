/* gpx_reader.c - GPX 1.0 / 1.1 tracks and routes through libxml2's SAX2
 * parser, which pulls the file: points into a hyp_series, byte offsets into
 * a layout for the splicing writer, waypoints for ties. No tree is ever
 * built. */
#include "reader_common.h"
#include "rare_values.h"
#include "hypsolev/writers.h"
#include "hypsolev/atmosphere.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#include <libxml/parser.h>
#include <libxml/parserInternals.h>

#define NS_GPX10 "http://www.topografix.com/GPX/1/0"
#define NS_GPX11 "http://www.topografix.com/GPX/1/1"
#define TEXT_MAX 255
#define CHUNK 65536
#define MAX_DEPTH 256

enum capture { CAP_NONE, CAP_ELE, CAP_TIME, CAP_PRES, CAP_TEMP, CAP_RH, CAP_NAME, CAP_GEOID };

/* The element names the reader looks for, looked up once in the parser's
 * dictionary: libxml2 hands element names (and namespace names) over from
 * that dictionary, so a name matches when the pointer does. */
enum name { N_METADATA, N_EXTENSIONS, N_TRKPT, N_RTEPT, N_WPT, N_ELE, N_TIME, N_NAME, N_GEOID,
            N_PRES, N_TEMP, N_RH, N_HYP_NS, N_TRK, N_TRKSEG, N_RTE, N_COUNT };

typedef struct gpx_ctx {
    const char *path;
    const hyp_read_opts *opts;
    xmlParserCtxtPtr ctxt;
    hyp_gpx_doc *doc;
    hyp_msgs *msgs;
    hyp_error *err;
    hyp_status status;         /* first fatal problem, parsing stops */
    size_t lay_alloc;
    uint8_t *p_raw, *t_raw;    /* 1: value still in the file's unit */
    size_t raw_alloc;
    hyp_unit p_attr_unit, t_attr_unit; /* units seen in unit attributes */
    char unit_text[2][32];     /* the last unit attribute of pressure, temperature */
    hyp_unit unit_parsed[2];
    int unit_seen[2];
    int depth;
    int terminating;           /* the last, closing call of the parser */
    int root_seen;
    xmlChar *gpx_uri;          /* the root's namespace, NULL for none */
    const xmlChar *names[N_COUNT];
    int interned;              /* names come from the dictionary: compare pointers */
    const xmlChar *gpx_uri_d;  /* gpx_uri as the dictionary holds it */
    /* the point or waypoint being read */
    int in_pt, in_wpt, pt_depth, ext_depth, pt_selfclosed;
    unsigned pt_line;
    double lat, lon, ele, time_s, pres, temp, rh, geoid;
    int meta_depth, meta_ext_depth;
    /* the open <trk> (depth 2), its <trkseg> (3), or <rte> (2): points are
     * only the root's own, never elements of that name nested elsewhere */
    int in_trk, in_seg, in_rte;
    size_t n_misplaced;        /* trkpt/rtept elsewhere: not points */
    hyp__clock clock;
    hyp__screen screen;
    int pres_bad;
    int pres_raw, temp_raw, got_pres, got_temp, got_rh, got_time;
    int64_t open_end, ele_beg, ele_end, ext_ins, anchor, prev_anchor;
    char name[TEXT_MAX + 1];
    /* text being captured */
    int cap, cap_depth;
    hyp_unit cap_unit;
    char text[TEXT_MAX + 1];
    size_t text_len;
    int text_overflow;
} gpx_ctx;

/* With a barometric altitude in an extension element, that element is
 * read where the pressure would be. */
static int alt_in_ele(const hyp_read_opts *o)
{
    return o->baro_altitude_field && strcmp(o->baro_altitude_field, "ele") == 0;
}

static const char *pres_name(const hyp_read_opts *o)
{
    if (o->baro_altitude_field && !alt_in_ele(o))
        return o->baro_altitude_field;
    return o->pressure_field && o->pressure_field[0] ? o->pressure_field : "pressure";
}

static const char *field_name(const char *opt, const char *dflt)
{
    return opt ? opt : dflt;
}

/* "baro@value": the value is the attribute after the '@' of the element
 * before it (docs/formats.md); NULL: the element's text. */
static const char *field_attr(const char *opt)
{
    const char *at = opt ? strchr(opt, '@') : NULL;
    return at ? at + 1 : NULL;
}

static unsigned cur_line(gpx_ctx *g)
{
    return (unsigned)xmlSAX2GetLineNumber(g->ctxt);
}

static void fail(gpx_ctx *g, hyp_status st, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

static void fail(gpx_ctx *g, hyp_status st, const char *fmt, ...)
{
    if (g->status)
        return;
    char buf[900];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    hyp_error_set(g->err, st, "%s:%u: %s", g->path, cur_line(g), buf);
    g->status = st;
    xmlStopParser(g->ctxt);
}

/* Byte offset of the parser's current position in the input file. */
static int64_t offset_now(gpx_ctx *g)
{
    return (int64_t)xmlByteConsumed(g->ctxt);
}

/* In an end-element callback the parser stands just after the end tag's
 * '>': the tag itself is still in the buffer, so walk back to its '<'. */
static int64_t end_tag_start(gpx_ctx *g)
{
    xmlParserInputPtr in = g->ctxt->input;
    const xmlChar *p = in->cur > in->base ? in->cur - 1 : in->cur;
    while (p > in->base && *p != '<')
        p--;
    return (int64_t)in->consumed + (p - in->base);
}

static int is_gpx_ns(gpx_ctx *g, const xmlChar *uri)
{
    if (!g->gpx_uri || !uri)
        return !g->gpx_uri && !uri;
    if (g->interned)
        return uri == g->gpx_uri_d;
    return xmlStrEqual(uri, g->gpx_uri);
}

static int is_name(const gpx_ctx *g, const xmlChar *s, enum name k)
{
    if (g->interned)
        return s == g->names[k];
    return xmlStrEqual(s, g->names[k]);
}

/* Looks up the names; the pointer comparison is used only when the
 * parser's own names (root element and namespace) are in the dictionary. */
static hyp_status intern_names(gpx_ctx *g)
{
    static const char *fixed[N_COUNT] = {"metadata", "extensions", "trkpt", "rtept", "wpt", "ele", "time",
                                         "name", "geoidheight", NULL, NULL, NULL, HYP_GPX_NS,
                                         "trk", "trkseg", "rte"};
    xmlDictPtr d = g->ctxt->dict;
    for (int k = 0; k < N_COUNT; k++) {
        const char *n = fixed[k] ? fixed[k]
                        : k == N_PRES ? pres_name(g->opts)
                        : k == N_TEMP ? field_name(g->opts->temperature_field, "temperature")
                                      : field_name(g->opts->humidity_field, "humidity");
        if (!d || !(g->names[k] = xmlDictLookup(d, BAD_CAST n, (int)strcspn(n, "@"))))
            return HYP_ERR_NOMEM;
    }
    return HYP_OK;
}

static const char *attr_value(const xmlChar **attrs, int n, const char *name, char *buf, size_t bn)
{
    for (int i = 0; i < n; i++) {
        const xmlChar **a = attrs + 5 * i;
        if (a[2] == NULL && strcmp((const char *)a[0], name) == 0) {
            size_t len = (size_t)(a[4] - a[3]);
            if (len >= bn)
                len = bn - 1;
            memcpy(buf, a[3], len);
            buf[len] = '\0';
            return buf;
        }
    }
    return NULL;
}

static void start_root(gpx_ctx *g, const xmlChar *local, const xmlChar *prefix, const xmlChar *uri,
                       int nb_ns, const xmlChar **ns, int nb_attr, const xmlChar **attrs)
{
    hyp_gpx_layout *L = &g->doc->layout;
    g->root_seen = 1;
    if (!xmlStrEqual(local, BAD_CAST "gpx")) {
        fail(g, HYP_ERR_FORMAT, "root element is <%s>, expected <gpx>: not a GPX file", (const char *)local);
        return;
    }
    char ver[16];
    const char *v = attr_value(attrs, nb_attr, "version", ver, sizeof ver);
    if (uri && xmlStrEqual(uri, BAD_CAST NS_GPX10))
        L->version = 10;
    else if (uri && xmlStrEqual(uri, BAD_CAST NS_GPX11))
        L->version = 11;
    else if (uri) {
        fail(g, HYP_ERR_FORMAT, "<gpx> namespace is \"%s\", expected %s or %s", (const char *)uri, NS_GPX11, NS_GPX10);
        return;
    } else
        L->version = v && strcmp(v, "1.0") == 0 ? 10 : 11;
    if (!uri && !v)
        hyp_msgs_add_at(g->msgs, HYP_NOTE, "sample", g->path, 0, "<gpx> has neither namespace nor version; read as GPX 1.1");
    L->has_namespace = uri != NULL;
    if (uri && !(g->gpx_uri = xmlStrdup(uri))) {
        fail(g, HYP_ERR_NOMEM, "out of memory");
        return;
    }
    xmlDictPtr dict = g->ctxt->dict;
    g->interned = dict && xmlDictOwns(dict, local) == 1 && (!uri || xmlDictOwns(dict, uri) == 1);
    g->gpx_uri_d = uri;
    snprintf(L->prefix, sizeof L->prefix, "%s", prefix ? (const char *)prefix : "");
    for (int i = 0; i < nb_ns; i++) {
        const xmlChar *p = ns[2 * i], *u = ns[2 * i + 1];
        if (p && xmlStrEqual(p, BAD_CAST HYP_GPX_PREFIX)) {
            if (!xmlStrEqual(u, BAD_CAST HYP_GPX_NS)) {
                fail(g, HYP_ERR_FORMAT, "<gpx> already uses the prefix \"%s\" for \"%s\"; cannot add this tool's elements",
                     HYP_GPX_PREFIX, (const char *)u);
                return;
            }
            L->has_hyp_ns = 1;
        }
    }
    /* The parser stands on the '>' (or "/>") closing the start tag. */
    L->root_attr_ins = offset_now(g);
    L->root_open_end = g->ctxt->input->cur[0] == '/' ? -1 : L->root_attr_ins + 1;
}

static hyp_status grow_points(gpx_ctx *g)
{
    hyp_gpx_layout *L = &g->doc->layout;
    size_t n = g->doc->pts.count;
    if (n < g->lay_alloc)
        return HYP_OK;
    size_t a = g->lay_alloc ? 2 * g->lay_alloc : 1024;
    void *p;
#define GROW(field, type) \
    do { \
        if (!(p = realloc(L->field, a * sizeof(type)))) \
            return HYP_ERR_NOMEM; \
        L->field = p; \
    } while (0)
    GROW(pt_step, uint32_t);
    GROW(pt_ele_beg, uint16_t);
    GROW(pt_ele_len, uint16_t);
    GROW(pt_ext, uint32_t);
#undef GROW
    if (g->doc->geoidheight_m) {   /* only once a point has one */
        if (!(p = realloc(g->doc->geoidheight_m, a * sizeof(double))))
            return HYP_ERR_NOMEM;
        g->doc->geoidheight_m = p;
    }
    if (!(p = realloc(g->p_raw, a))) return HYP_ERR_NOMEM;
    g->p_raw = p;
    if (!(p = realloc(g->t_raw, a))) return HYP_ERR_NOMEM;
    g->t_raw = p;
    g->lay_alloc = a;
    return HYP_OK;
}

/* A coordinate attribute; NaN (with a warning) when not finite. */
static double parse_coord(gpx_ctx *g, const xmlChar **attrs, int nb_attr, const char *name, const char *elem)
{
    char buf[64];
    const char *v = attr_value(attrs, nb_attr, name, buf, sizeof buf);
    double x;
    if (!v) {
        fail(g, HYP_ERR_FORMAT, "<%s> has no %s attribute", elem, name);
        return NAN;
    }
    size_t len = strlen(v);
    int r = hyp__parse_number(v, len, 0, &x);
    if (hyp__value_ok(HYP__F_POSITION, r, x))
        return x;
    if (r == 3 || r == 1)
        return hyp__screen_refuse(&g->screen, HYP__F_POSITION, name, cur_line(g), r, v, len);
    char q[80];
    fail(g, HYP_ERR_VALUE, "<%s> %s \"%s\" is not a number", elem, name, hyp__quote(q, sizeof q, v, len));
    return NAN;
}

static void start_point(gpx_ctx *g, const xmlChar *local, int nb_attr, const xmlChar **attrs, int wpt)
{
    const char *elem = (const char *)local;
    g->in_pt = !wpt;
    g->in_wpt = wpt;
    g->pt_depth = g->depth;
    g->pt_line = cur_line(g);
    g->ext_depth = 0;
    /* After a failure the parser is halted and has freed its input, attrs
     * included: touch nothing more. */
    g->lat = parse_coord(g, attrs, nb_attr, "lat", elem);
    if (g->status)
        return;
    g->lon = parse_coord(g, attrs, nb_attr, "lon", elem);
    if (g->status)
        return;
    if (g->lat != g->lat || g->lon != g->lon)
        g->lat = g->lon = NAN;   /* half a position is none (the warning is given) */
    g->ele = g->time_s = g->pres = g->temp = g->rh = g->geoid = NAN;
    g->got_pres = g->got_temp = g->got_rh = g->got_time = g->pres_bad = 0;
    g->ele_beg = g->ele_end = g->ext_ins = -1;
    g->name[0] = '\0';
    g->pt_selfclosed = g->ctxt->input->cur[0] == '/';
    g->anchor = offset_now(g) + (g->pt_selfclosed ? 0 : 1);
    g->open_end = g->pt_selfclosed ? -1 : g->anchor;
}

/* A barometric altitude in an extension element is in metres: a unit
 * attribute that says otherwise (hPa: a pressure named by mistake) is an
 * error. */
static void altitude_unit(gpx_ctx *g, int nb_attr, const xmlChar **attrs)
{
    char buf[32], uq[80];
    const char *u = attr_value(attrs, nb_attr, "unit", buf, sizeof buf);
    if (!u)
        u = attr_value(attrs, nb_attr, "units", buf, sizeof buf);
    static const char *const m[] = {"m", "metre", "metres", "meter", "meters"};
    for (size_t k = 0; u && k < sizeof m / sizeof m[0]; k++)
        if (!strcasecmp(u, m[k]))
            return;
    if (u)
        fail(g, HYP_ERR_UNIT, "unit=\"%s\" on <%s>: a barometric altitude (--baro-altitude) is expected in m",
             hyp__quote(uq, sizeof uq, u, strlen(u)), pres_name(g->opts));
}

static void start_capture(gpx_ctx *g, int what, int nb_attr, const xmlChar **attrs)
{
    g->cap = what;
    g->cap_depth = g->depth;
    g->text_len = 0;
    g->text_overflow = 0;
    g->cap_unit = HYP_UNIT_NONE;
    if (what == CAP_PRES && g->opts->baro_altitude_field) {
        altitude_unit(g, nb_attr, attrs);
        return;
    }
    if (what == CAP_PRES || what == CAP_TEMP) {
        char buf[32];
        const char *u = attr_value(attrs, nb_attr, "unit", buf, sizeof buf);
        if (!u)
            u = attr_value(attrs, nb_attr, "units", buf, sizeof buf);
        if (u) {
            hyp_quantity q = what == CAP_PRES ? HYP_Q_PRESSURE : HYP_Q_TEMPERATURE;
            /* every point repeats the same unit: parse it once */
            int c = what == CAP_PRES ? 0 : 1;
            if (g->unit_seen[c] && strcmp(u, g->unit_text[c]) == 0)
                g->cap_unit = g->unit_parsed[c];
            else {
                g->cap_unit = hyp_unit_parse(q, u);
                snprintf(g->unit_text[c], sizeof g->unit_text[c], "%s", u);
                g->unit_parsed[c] = g->cap_unit;
                g->unit_seen[c] = 1;
            }
            char uq[80];
            if (!g->cap_unit)
                fail(g, HYP_ERR_UNIT, "unit=\"%s\" on <%s> is unknown; expected one of %s", hyp__quote(uq, sizeof uq, u, strlen(u)),
                     what == CAP_PRES ? field_name(g->opts->pressure_field, "pressure")
                                      : field_name(g->opts->temperature_field, "temperature"),
                     hyp_unit_choices(q));
        }
    }
}

/* The root's own track, route and waypoint structure, at its depth:
 * gpx/trk/trkseg/trkpt, gpx/rte/rtept and gpx/wpt (GPX 1.0 and 1.1 alike). */
static void start_structure(gpx_ctx *g, const xmlChar *local, int nb_attr, const xmlChar **attrs)
{
    if (g->depth == 2) {
        if (is_name(g, local, N_TRK))
            g->in_trk = 1;
        else if (is_name(g, local, N_RTE))
            g->in_rte = 1;
        else if (is_name(g, local, N_WPT))
            start_point(g, local, nb_attr, attrs, 1);
    } else if (g->depth == 3) {
        if (g->in_trk && is_name(g, local, N_TRKSEG))
            g->in_seg = 1;
        else if (g->in_rte && is_name(g, local, N_RTEPT))
            start_point(g, local, nb_attr, attrs, 0);
    } else if (g->depth == 4 && g->in_seg && is_name(g, local, N_TRKPT)) {
        start_point(g, local, nb_attr, attrs, 0);
        return;
    }
    if (!g->in_pt && !g->in_wpt && (is_name(g, local, N_TRKPT) || is_name(g, local, N_RTEPT)))
        g->n_misplaced++;
}

static void capture_attr(gpx_ctx *g, const char *attr, int nb_attr, const xmlChar **attrs);

static void on_start(void *ctx, const xmlChar *local, const xmlChar *prefix, const xmlChar *uri,
                     int nb_ns, const xmlChar **ns, int nb_attr, int nb_def, const xmlChar **attrs)
{
    gpx_ctx *g = ctx;
    (void)nb_def;
    g->depth++;
    if (g->status)
        return;
    /* Without a tree libxml2 sets no depth limit; GPX needs about six. */
    if (g->depth > MAX_DEPTH) {
        fail(g, HYP_ERR_FORMAT, "elements nested deeper than %d levels; not a GPX track", MAX_DEPTH);
        return;
    }
    if (!g->root_seen) {
        start_root(g, local, prefix, uri, nb_ns, ns, nb_attr, attrs);
        return;
    }
    if (uri && is_name(g, uri, N_HYP_NS)) {
        fail(g, HYP_ERR_FORMAT, "<%s:%s> is this tool's own output; correct the original file instead",
             prefix ? (const char *)prefix : "", (const char *)local);
        return;
    }
    int gpx = is_gpx_ns(g, uri);
    if (gpx && g->depth == 2 && is_name(g, local, N_METADATA)) {
        g->meta_depth = 2;
        /* metadata belongs first; one after points (invalid GPX) or a
         * second one is no place for what is added at the document level,
         * which is spliced in before the points */
        if (g->ctxt->input->cur[0] == '/' || g->doc->pts.count || g->doc->wpts.count || g->doc->layout.meta_kind)
            g->doc->layout.meta_kind = 3;
    } else if (gpx && g->meta_depth && g->depth == 3 && is_name(g, local, N_EXTENSIONS))
        g->meta_ext_depth = 3;
    if (!g->in_pt && !g->in_wpt) {
        if (gpx)
            start_structure(g, local, nb_attr, attrs);
        return;
    }
    if (g->cap)
        return;   /* markup inside a captured value: its text is ignored */
    int child = g->depth == g->pt_depth + 1;
    if (gpx && child) {
        if (is_name(g, local, N_ELE)) {
            if (g->ctxt->input->cur[0] == '/') {
                fail(g, HYP_ERR_VALUE, "<ele/> is empty; expected a number (m)");
                return;
            }
            g->ele_beg = offset_now(g) + 1;
            start_capture(g, CAP_ELE, nb_attr, attrs);
        } else if (is_name(g, local, N_TIME))
            start_capture(g, CAP_TIME, nb_attr, attrs);
        else if (g->in_wpt && is_name(g, local, N_NAME))
            start_capture(g, CAP_NAME, nb_attr, attrs);
        else if (!g->in_wpt && is_name(g, local, N_GEOID))
            start_capture(g, CAP_GEOID, nb_attr, attrs);
        else if (is_name(g, local, N_EXTENSIONS))
            g->ext_depth = g->depth;
        return;
    }
    int in_ext = g->ext_depth ? g->depth > g->ext_depth : !gpx;
    if (!in_ext || g->in_wpt)
        return;
    const char *opt = NULL;
    if (!g->got_pres && is_name(g, local, N_PRES))
        start_capture(g, CAP_PRES, nb_attr, attrs), opt = g->opts->pressure_field;
    else if (!g->got_temp && is_name(g, local, N_TEMP))
        start_capture(g, CAP_TEMP, nb_attr, attrs), opt = g->opts->temperature_field;
    else if (!g->got_rh && is_name(g, local, N_RH))
        start_capture(g, CAP_RH, nb_attr, attrs), opt = g->opts->humidity_field;
    const char *attr = field_attr(opt);
    if (attr && g->cap && !g->status)
        capture_attr(g, attr, nb_attr, attrs);
}

static void on_chars(void *ctx, const xmlChar *ch, int len)
{
    gpx_ctx *g = ctx;
    if (!g->cap || g->depth != g->cap_depth || g->status)
        return;
    if (g->text_len + (size_t)len > TEXT_MAX) {
        g->text_overflow = 1;
        return;
    }
    memcpy(g->text + g->text_len, ch, (size_t)len);
    g->text_len += (size_t)len;
}

static const char *cap_label(gpx_ctx *g, int cap)
{
    switch (cap) {
    case CAP_ELE: return "ele";
    case CAP_TIME: return "time";
    case CAP_PRES: return pres_name(g->opts);
    case CAP_TEMP: return field_name(g->opts->temperature_field, "temperature");
    case CAP_RH: return field_name(g->opts->humidity_field, "humidity");
    case CAP_NAME: return "name";
    case CAP_GEOID: return "geoidheight";
    }
    return "?";
}

static int xml_blank(char c)
{
    return c == ' ' || c == '\t' || c == '\r' || c == '\n';
}

/* The captured time: XML whitespace around it is not part of it
 * (xsd:dateTime collapses whitespace). */
static void end_time(gpx_ctx *g)
{
    char *t = g->text;
    size_t n = g->text_len;
    while (n && xml_blank(t[n - 1]))
        t[--n] = '\0';
    while (*t && xml_blank(*t))
        t++;
    hyp_time_result r = hyp__clock_read(&g->clock, t, cur_line(g), &g->time_s);
    char q[160];
    if (r)
        hyp__quote(q, sizeof q, t, strlen(t));
    if (r == HYP_TIME_NOZONE)
        fail(g, HYP_ERR_VALUE, "<time> \"%s\" has no time zone; add Z or give the zone with --time-zone or --rover-time-zone", q);
    else if (r == HYP_TIME_RANGE)
        fail(g, HYP_ERR_VALUE, "<time> \"%s\" is out of range (a date that does not exist, or before 1900 or after 2200)", q);
    else if (r)
        fail(g, HYP_ERR_VALUE, "<time> \"%s\" is not an ISO 8601 time (expected 2026-06-14T09:30:00Z)", q);
    g->got_time = 1;
}

/* A number read from a field: in the file's unit where the element has no
 * unit attribute (resolved for the whole file later), else in SI. */
static double unit_value(gpx_ctx *g, double v, int *raw, hyp_unit *attr_unit)
{
    *raw = !g->cap_unit;
    if (!g->cap_unit)
        return v;
    *attr_unit = g->cap_unit;
    return v == v ? hyp_unit_to_si(g->cap_unit, v) : v;
}

/* A barometric altitude (hyp_read_opts.baro_altitude_field): the pressure
 * the standard atmosphere has there with the reference 1013.25 hPa
 * (hyp_baro_altitude_to_pressure_pa). -500..9000 m: the lowest land
 * surface is near -430 m, the highest summit 8849 m (both from memory);
 * a value beyond says the field is not such an altitude. */
static void end_altitude(gpx_ctx *g, int cap, int r, double v)
{
    char q[64];
    if (r != 1 || !(v >= -500.0 && v <= 9000.0)) {
        fail(g, HYP_ERR_VALUE, "barometric altitude <%s> \"%s\" m is %s; expected a standard-atmosphere height of -500..9000 m (is --baro-altitude %s the right field?)",
             cap_label(g, cap), hyp__quote(q, sizeof q, g->text, g->text_len), r == 1 ? "out of range" : "not a finite number",
             g->opts->baro_altitude_field);
        return;
    }
    if (cap == CAP_ELE) {
        g->ele = NAN;   /* not a GNSS height; the splice writer still replaces it */
        g->ele_end = end_tag_start(g);
    }
    g->got_pres = 1;
    g->pres_bad = 0;
    g->pres_raw = 0;
    g->pres = hyp_baro_altitude_to_pressure_pa(v, HYP_P0_PA);
}

static void end_capture(gpx_ctx *g)
{
    int cap = g->cap;
    g->cap = 0;
    g->text[g->text_len] = '\0';
    if (g->text_overflow) {
        fail(g, HYP_ERR_VALUE, "<%s> text is longer than %d bytes", cap_label(g, cap), TEXT_MAX);
        return;
    }
    if (cap == CAP_NAME) {
        memcpy(g->name, g->text, g->text_len + 1);
        return;
    }
    if (cap == CAP_TIME) {
        end_time(g);
        return;
    }
    double v;
    int r = hyp__parse_number(g->text, g->text_len, 0, &v);
    if (r == 0 || r == 2) {
        char q[64];
        fail(g, HYP_ERR_VALUE, "<%s> \"%s\" is %s; expected a number", cap_label(g, cap),
             hyp__quote(q, sizeof q, g->text, g->text_len), r == 2 ? "empty" : "not a number");
        return;
    }
    if (g->opts->baro_altitude_field && cap == (alt_in_ele(g->opts) ? CAP_ELE : CAP_PRES)) {
        end_altitude(g, cap, r, v);
        return;
    }
    static const hyp__field field[] = {[CAP_ELE] = HYP__F_ELE, [CAP_PRES] = HYP__F_PRESSURE,
                                       [CAP_TEMP] = HYP__F_TEMPERATURE, [CAP_RH] = HYP__F_HUMIDITY,
                                       [CAP_GEOID] = HYP__F_GEOID};
    if (!hyp__value_ok(field[cap], r, v))
        v = hyp__screen_refuse(&g->screen, field[cap], cap_label(g, cap), cur_line(g), r, g->text, g->text_len);
    switch (cap) {
    case CAP_ELE:
        g->ele = v;   /* NaN when refused: the splice writer still replaces it */
        g->ele_end = end_tag_start(g);
        break;
    case CAP_PRES:
        g->got_pres = 1;
        g->pres_bad = v != v;
        g->pres = unit_value(g, v, &g->pres_raw, &g->p_attr_unit);
        break;
    case CAP_TEMP:
        g->got_temp = 1;
        g->temp = unit_value(g, v, &g->temp_raw, &g->t_attr_unit);
        break;
    case CAP_RH:
        g->got_rh = 1;
        g->rh = v;
        break;
    case CAP_GEOID:
        g->geoid = v;
        break;
    }
}

/* A value held in an attribute (<ext:baro value="1013.2"/>): read now, the
 * element's text is not. */
static void capture_attr(gpx_ctx *g, const char *attr, int nb_attr, const xmlChar **attrs)
{
    const char *label = cap_label(g, g->cap);
    if (!attr_value(attrs, nb_attr, attr, g->text, sizeof g->text)) {
        g->cap = 0;
        fail(g, HYP_ERR_VALUE, "<%.*s> has no %s attribute; expected the value there (field \"%s\")",
             (int)strcspn(label, "@"), label, attr, label);
        return;
    }
    g->text_len = strlen(g->text);
    end_capture(g);
}

static hyp_status push_waypoint(hyp_waypoints *w, const char *name, double t, double lat, double lon)
{
    if (w->count == w->alloc) {
        size_t a = w->alloc ? 2 * w->alloc : 16;
        if (a > 1000000)
            return HYP_ERR_NOMEM;
        void *p;
        if (!(p = realloc(w->name, a * sizeof *w->name))) return HYP_ERR_NOMEM;
        w->name = p;
        if (!(p = realloc(w->time_s, a * sizeof(double)))) return HYP_ERR_NOMEM;
        w->time_s = p;
        if (!(p = realloc(w->lat_deg, a * sizeof(double)))) return HYP_ERR_NOMEM;
        w->lat_deg = p;
        if (!(p = realloc(w->lon_deg, a * sizeof(double)))) return HYP_ERR_NOMEM;
        w->lon_deg = p;
        w->alloc = a;
    }
    char *n = strdup(name);
    if (!n)
        return HYP_ERR_NOMEM;
    w->name[w->count] = n;
    w->time_s[w->count] = t;
    w->lat_deg[w->count] = lat;
    w->lon_deg[w->count] = lon;
    w->count++;
    return HYP_OK;
}

/* A waypoint's byte positions and <ele>, beside wpts (grown with it). */
static hyp_status push_waypoint_at(gpx_ctx *g)
{
    hyp_gpx_doc *d = g->doc;
    size_t i = d->wpts.count - 1;
    void *p;
    if (!(p = realloc(d->wpt_at, d->wpts.alloc * sizeof *d->wpt_at)))
        return HYP_ERR_NOMEM;
    d->wpt_at = p;
    if (!(p = realloc(d->wpt_ele_m, d->wpts.alloc * sizeof(double))))
        return HYP_ERR_NOMEM;
    d->wpt_ele_m = p;
    hyp_gpx_point *P = &d->wpt_at[i];
    P->open_end = g->open_end;
    P->ele_beg = g->ele_end >= 0 ? g->ele_beg : -1;
    P->ele_end = g->ele_end;
    P->ext_ins = g->ext_ins >= 0 ? g->ext_ins : g->pt_selfclosed ? -1 : end_tag_start(g);
    P->ext_kind = g->ext_ins >= 0 ? HYP_EXT_INSIDE : d->layout.version == 10 ? HYP_EXT_BARE : HYP_EXT_WRAP;
    d->wpt_ele_m[i] = g->ele;
    return HYP_OK;
}

static void end_point(gpx_ctx *g)
{
    hyp_gpx_doc *d = g->doc;
    if (g->in_wpt) {
        g->in_wpt = 0;
        if (g->lat == g->lat &&
            (push_waypoint(&d->wpts, g->name, g->got_time ? g->time_s : NAN, g->lat, g->lon) || push_waypoint_at(g)))
            fail(g, HYP_ERR_NOMEM, "out of memory");
        return;
    }
    g->in_pt = 0;
    if (grow_points(g)) {
        fail(g, HYP_ERR_NOMEM, "out of memory");
        return;
    }
    size_t i = d->pts.count;
    hyp_gpx_layout *L = &d->layout;
    int64_t ext = g->ext_ins >= 0 ? g->ext_ins : g->pt_selfclosed ? -1 : end_tag_start(g);
    hyp_ext_kind kind = g->ext_ins >= 0 ? HYP_EXT_INSIDE : L->version == 10 ? HYP_EXT_BARE : HYP_EXT_WRAP;
    int64_t step = g->anchor - g->prev_anchor, lim = (int64_t)1 << 30;
    if (step < 0 || step >= (int64_t)HYP_GPX_NONE || (ext >= 0 && ext - g->anchor >= lim) ||
        (g->ele_end >= 0 && g->ele_end - g->anchor >= lim)) {
        fail(g, HYP_ERR_FORMAT, "a point more than 4 GiB after the previous one, or longer than 1 GiB, is not supported");
        return;
    }
    L->pt_step[i] = (uint32_t)step;
    g->prev_anchor = g->anchor;
    if (g->ele_end < 0)
        L->pt_ele_beg[i] = L->pt_ele_len[i] = HYP_GPX_NONE16;
    else if (g->ele_beg - g->anchor < HYP_GPX_FAR16 && g->ele_end - g->ele_beg < HYP_GPX_FAR16) {
        L->pt_ele_beg[i] = (uint16_t)(g->ele_beg - g->anchor);
        L->pt_ele_len[i] = (uint16_t)(g->ele_end - g->ele_beg);
    } else {
        if (L->n_far == L->far_alloc) {
            size_t a = L->far_alloc ? 2 * L->far_alloc : 16;
            void *p = realloc(L->ele_far, a * sizeof *L->ele_far);
            if (!p) {
                fail(g, HYP_ERR_NOMEM, "out of memory");
                return;
            }
            L->ele_far = p;
            L->far_alloc = a;
        }
        L->ele_far[L->n_far++] = (struct hyp_gpx_far){i, (uint32_t)(g->ele_beg - g->anchor), (uint32_t)(g->ele_end - g->ele_beg)};
        L->pt_ele_beg[i] = L->pt_ele_len[i] = HYP_GPX_FAR16;
    }
    L->pt_ext[i] = ext < 0 ? HYP_GPX_NONE : (uint32_t)(ext - g->anchor) | (uint32_t)kind << 30;
    if (g->geoid == g->geoid && !d->geoidheight_m) {   /* the first: NaN before it */
        if (!(d->geoidheight_m = malloc(g->lay_alloc * sizeof(double)))) {
            fail(g, HYP_ERR_NOMEM, "out of memory");
            return;
        }
        for (size_t k = 0; k < i; k++)
            d->geoidheight_m[k] = NAN;
    }
    if (d->geoidheight_m)
        d->geoidheight_m[i] = g->geoid;
    d->has_geoidheight |= g->geoid == g->geoid;
    g->p_raw[i] = (uint8_t)(g->got_pres && g->pres_raw);
    g->t_raw[i] = (uint8_t)(g->got_temp && g->temp_raw);
    hyp_sample_flag flag = !g->got_time ? HYP_SAMPLE_NO_TIME
                         : g->pres_bad ? HYP_SAMPLE_BAD_VALUE
                         : !g->got_pres ? HYP_SAMPLE_NO_PRESSURE : HYP_SAMPLE_OK;
    if (hyp_series_push(&d->pts, g->time_s, g->pres, g->temp, g->rh, g->lat, g->lon, g->ele,
                        g->pt_line, flag))
        fail(g, HYP_ERR_NOMEM, "out of memory (or more points than a track may hold)");
}

static void on_end(void *ctx, const xmlChar *local, const xmlChar *prefix, const xmlChar *uri)
{
    gpx_ctx *g = ctx;
    (void)local;
    (void)prefix;
    (void)uri;
    if (!g->status) {
        if (g->cap && g->depth == g->cap_depth)
            end_capture(g);
        else if (g->ext_depth && g->depth == g->ext_depth) {
            g->ext_ins = end_tag_start(g);
            g->ext_depth = 0;
        } else if ((g->in_pt || g->in_wpt) && g->depth == g->pt_depth)
            end_point(g);
        else if (g->meta_ext_depth && g->depth == g->meta_ext_depth) {
            if (g->doc->layout.meta_kind == 0) {
                g->doc->layout.meta_ins = end_tag_start(g);
                g->doc->layout.meta_kind = 1;
            }
            g->meta_ext_depth = 0;
        } else if (g->meta_depth && g->depth == g->meta_depth) {
            if (g->doc->layout.meta_kind == 0) {
                g->doc->layout.meta_ins = end_tag_start(g);
                g->doc->layout.meta_kind = 2;
            }
            g->meta_depth = 0;
        } else if (g->depth == 1)
            g->doc->layout.root_close = end_tag_start(g);
        if (g->depth == 2)
            g->in_trk = g->in_rte = 0;
        else if (g->depth == 3)
            g->in_seg = 0;
    }
    g->depth--;
}

static void on_error(void *ctx, xmlErrorPtr e)
{
    gpx_ctx *g = ctx;
    if (!e || e->level < XML_ERR_ERROR || g->status)
        return;
    char msg[512];
    snprintf(msg, sizeof msg, "%s", e->message ? e->message : "XML error");
    size_t n = strlen(msg);
    while (n && (msg[n - 1] == '\n' || msg[n - 1] == ' '))
        msg[--n] = '\0';
    for (char *p = msg; *p; p++)
        if (*p == '\n')
            *p = ' ';
    /* "extra content" and "premature end" at the last chunk: cut off */
    int cut = e->code == XML_ERR_DOCUMENT_END || e->code == XML_ERR_TAG_NOT_FINISHED;
    if (g->terminating && g->depth > 0 && cut)
        hyp_error_set(g->err, HYP_ERR_FORMAT,
                      "%s:%d: the file ends with %d element(s) still open: cut off while being written? (parser: %s)",
                      g->path, e->line, g->depth, msg);
    else
        hyp_error_set(g->err, HYP_ERR_FORMAT, "%s:%d: not well-formed XML: %s", g->path, e->line, msg);
    g->status = HYP_ERR_FORMAT;
    xmlStopParser(g->ctxt);
}

static void on_dtd(void *ctx, const xmlChar *name, const xmlChar *ext, const xmlChar *sys)
{
    gpx_ctx *g = ctx;
    (void)name;
    (void)ext;
    (void)sys;
    fail(g, HYP_ERR_FORMAT, "document type declaration (DOCTYPE) refused: GPX needs none, and its entities are never expanded");
}

/* Offsets are only meaningful when the parser reads the bytes unconverted:
 * accept UTF-8 and ASCII, refuse UTF-16/32 and declared other encodings. */
static hyp_status check_encoding(const char *path, const unsigned char *b, size_t n, hyp_error *err)
{
    if (n >= 2 && ((b[0] == 0xFE && b[1] == 0xFF) || (b[0] == 0xFF && b[1] == 0xFE)))
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s: UTF-16 encoded; only UTF-8 GPX is read (convert with iconv -f UTF-16 -t UTF-8)", path);
    if (n >= 4 && ((b[0] == 0 && b[1] == 0) || (b[0] == '<' && b[1] == 0) || (b[0] == 0 && b[1] == '<')))
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s: UTF-16 or UTF-32 encoded; only UTF-8 GPX is read", path);
    size_t skip = n >= 3 && b[0] == 0xEF && b[1] == 0xBB && b[2] == 0xBF ? 3 : 0;
    if (n - skip < 5 || memcmp(b + skip, "<?xml", 5) != 0)
        return HYP_OK;
    const unsigned char *end = memchr(b + skip, '>', n - skip);
    size_t decl_len = end ? (size_t)(end - b - skip) : n - skip;
    char decl[512];
    if (decl_len >= sizeof decl)
        decl_len = sizeof decl - 1;
    memcpy(decl, b + skip, decl_len);
    decl[decl_len] = '\0';
    char *e = strstr(decl, "encoding");
    if (!e)
        return HYP_OK;
    e += 8;
    while (*e == ' ' || *e == '=' || *e == '\t')
        e++;
    char q = *e;
    if (q != '"' && q != '\'')
        return HYP_OK;
    char enc[64];
    size_t k = 0;
    for (e++; *e && *e != q && k < sizeof enc - 1; e++)
        enc[k++] = *e;
    enc[k] = '\0';
    if (strcasecmp(enc, "UTF-8") == 0 || strcasecmp(enc, "UTF8") == 0 || strcasecmp(enc, "US-ASCII") == 0 ||
        strcasecmp(enc, "ASCII") == 0)
        return HYP_OK;
    return hyp_error_set(err, HYP_ERR_FORMAT, "%s:1: encoding \"%s\" is not supported; only UTF-8 GPX is read (convert with iconv -f %s -t UTF-8 and fix the declaration)",
                         path, enc, enc);
}

static hyp_status resolve_units(gpx_ctx *g)
{
    hyp_series *s = &g->doc->pts;
    /* Values without a unit attribute take the option's unit, else the unit
     * the file names elsewhere, else one inferred from their magnitude. */
    struct { uint8_t *raw; float *v; hyp_quantity q; hyp_unit opt, attr; hyp_unit *out; const char *name; } q[2] = {
        {g->p_raw, s->pressure_pa, HYP_Q_PRESSURE, g->opts->pressure_unit, g->p_attr_unit, &g->doc->pressure_unit,
         field_name(g->opts->pressure_field, "pressure")},
        {g->t_raw, s->temp_k, HYP_Q_TEMPERATURE, g->opts->temperature_unit, g->t_attr_unit, &g->doc->temperature_unit,
         field_name(g->opts->temperature_field, "temperature")},
    };
    for (int k = 0; k < 2; k++) {
        size_t nraw = 0;
        for (size_t i = 0; i < s->count; i++)
            nraw += q[k].raw[i];
        *q[k].out = q[k].attr;
        if (!nraw)
            continue;
        float *tmp = malloc(nraw * sizeof *tmp);
        if (!tmp)
            return hyp_error_set(g->err, HYP_ERR_NOMEM, "%s: out of memory", g->path);
        size_t j = 0;
        for (size_t i = 0; i < s->count; i++)
            if (q[k].raw[i])
                tmp[j++] = q[k].v[i];
        hyp_unit used;
        hyp_status st = hyp__resolve_unit(g->path, q[k].name, q[k].q, HYP_UNIT_NONE, q[k].opt ? q[k].opt : q[k].attr,
                                          tmp, nraw, &used, g->msgs, g->err);
        j = 0;
        for (size_t i = 0; i < s->count && !st; i++)
            if (q[k].raw[i])
                q[k].v[i] = tmp[j++];
        free(tmp);
        if (st)
            return st;
        *q[k].out = used;
    }
    return HYP_OK;
}

/* The series checks; where the points had to be put in time order, the
 * geoid heights follow them and the layout keeps its file order through
 * doc->pt_series. */
static hyp_status check_points(gpx_ctx *g)
{
    hyp_gpx_doc *d = g->doc;
    uint32_t *order = NULL;
    hyp_status st = hyp__check_series(g->path, &d->pts, &order, g->msgs, g->err);
    if (st || !order)
        return st;
    size_t n = d->pts.count;
    double *gh = d->geoidheight_m ? malloc(n * sizeof *gh) : NULL;
    uint32_t *inv = malloc(n * sizeof *inv);
    if (!inv || (d->geoidheight_m && !gh)) {
        free(order);
        free(gh);
        free(inv);
        return hyp_error_set(g->err, HYP_ERR_NOMEM, "%s: out of memory", g->path);
    }
    for (size_t i = 0; i < n; i++) {
        inv[order[i]] = (uint32_t)i;
        if (gh)
            gh[i] = d->geoidheight_m[order[i]];
    }
    if (gh) {
        free(d->geoidheight_m);
        d->geoidheight_m = gh;
    }
    d->pt_series = inv;
    free(order);
    return HYP_OK;
}

/* The parser's source: the first block already read, then the file. */
typedef struct pull {
    gpx_ctx *g;
    FILE *f;
    const unsigned char *first;
    size_t first_n, first_pos;
    int64_t total;
    int failed;
} pull;

static int read_more(void *ctx, char *out, int len)
{
    pull *p = ctx;
    gpx_ctx *g = p->g;
    if (g->status || len <= 0)
        return g->status ? -1 : 0;
    size_t n;
    if (p->first_pos < p->first_n) {
        n = p->first_n - p->first_pos;
        if (n > (size_t)len)
            n = (size_t)len;
        memcpy(out, p->first + p->first_pos, n);
        p->first_pos += n;
    } else {
        n = fread(out, 1, (size_t)len, p->f);
        if (n == 0) {
            if (ferror(p->f)) {
                p->failed = 1;
                return -1;
            }
            g->terminating = 1;   /* what the parser reports now is at the end */
            return 0;
        }
        if (memchr(out, '\0', n)) {
            fail(g, HYP_ERR_FORMAT, "NUL byte; not a text file");
            return -1;
        }
    }
    p->total += (int64_t)n;
    return (int)n;
}

static int close_none(void *ctx)
{
    (void)ctx;   /* the caller closes the file */
    return 0;
}

static hyp_status parse_file(gpx_ctx *g, FILE *f)
{
    unsigned char buf[CHUNK];
    size_t n = fread(buf, 1, sizeof buf, f);
    if (n == 0)
        return hyp_error_set(g->err, ferror(f) ? HYP_ERR_IO : HYP_ERR_NODATA, "%s: %s", g->path,
                             ferror(f) ? "read error" : "empty file");
    if (memchr(buf, '\0', n) && !(n >= 2 && (buf[0] == 0xFE || buf[0] == 0xFF || buf[0] == 0 || buf[1] == 0)))
        return hyp_error_set(g->err, HYP_ERR_FORMAT, "%s: NUL byte; not a text file", g->path);
    hyp_status st = check_encoding(g->path, buf, n, g->err);
    if (st)
        return st;
    xmlSAXHandler sax;
    memset(&sax, 0, sizeof sax);
    sax.initialized = XML_SAX2_MAGIC;
    sax.startElementNs = on_start;
    sax.endElementNs = on_end;
    sax.characters = on_chars;
    sax.cdataBlock = on_chars;
    sax.serror = on_error;
    sax.internalSubset = on_dtd;
    /* libxml2 pulls the bytes through read_more (its pull parser does
     * about a tenth less work than its push parser), the first block being
     * the one just checked */
    pull in = {g, f, buf, n, 0, 0, 0};
    g->ctxt = xmlCreateIOParserCtxt(&sax, g, read_more, close_none, &in, XML_CHAR_ENCODING_NONE);
    if (!g->ctxt || intern_names(g)) {
        if (g->ctxt)
            xmlFreeParserCtxt(g->ctxt);
        g->ctxt = NULL;
        return hyp_error_set(g->err, HYP_ERR_NOMEM, "%s: out of memory", g->path);
    }
    /* The declared encoding was checked above to be UTF-8 or ASCII (a subset
     * of UTF-8): ignoring it keeps libxml2 from installing a converter,
     * under which byte offsets would no longer be the file's. */
    xmlCtxtUseOptions(g->ctxt, XML_PARSE_NONET | XML_PARSE_NOWARNING | XML_PARSE_IGNORE_ENC);
    xmlParseDocument(g->ctxt);
    int64_t total = in.total;
    if (!g->status && in.failed)
        hyp_error_set(g->err, g->status = HYP_ERR_IO, "%s: read error", g->path);
    if (!g->status && !g->ctxt->wellFormed)
        hyp_error_set(g->err, g->status = HYP_ERR_FORMAT, "%s: not well-formed XML", g->path);
    if (!g->status && !g->root_seen)
        hyp_error_set(g->err, g->status = HYP_ERR_FORMAT, "%s: no root element; not a GPX file", g->path);
    g->doc->layout.file_size = total;
    xmlFreeParserCtxt(g->ctxt);
    g->ctxt = NULL;
    return g->status;
}

hyp_status hyp_gpx_read(const char *path, const hyp_read_opts *opts, hyp_gpx_doc *doc,
                        hyp_msgs *msgs, hyp_error *err)
{
    hyp_read_opts defaults;
    if (!opts) {
        hyp_read_opts_init(&defaults);
        opts = &defaults;
    }
    hyp_gpx_doc_free(doc);
    struct stat sb;
    if (stat(path, &sb) != 0)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", path, strerror(errno));
    if (S_ISDIR(sb.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected a GPX file", path);
    if (!S_ISREG(sb.st_mode))   /* a pipe or device could block forever */
        return hyp_error_set(err, HYP_ERR_IO, "%s: not a regular file (a pipe or a device?), expected a GPX file", path);
    FILE *f = fopen(path, "rb");
    if (!f)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", path, strerror(errno));
    /* libxml2 asks for about 4 KB at a time: a large stdio buffer saves a
     * read call for each (glibc uses the size only with the buffer given) */
    enum { IN_BUF = 1 << 18 };
    char *ibuf = malloc(IN_BUF);
    if (ibuf)
        setvbuf(f, ibuf, _IOFBF, IN_BUF);
    gpx_ctx g = {.path = path, .opts = opts, .doc = doc, .msgs = msgs, .err = err,
                 .screen = {.path = path, .msgs = msgs}};
    hyp__clock_init(&g.clock, opts->zone);
    hyp_status st = parse_file(&g, f);
    fclose(f);
    free(ibuf);
    if (!st) {
        hyp__screen_totals(&g.screen);
        hyp__clock_notes(&g.clock, path, msgs);
    }
    if (!st && doc->pts.count == 0)
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: no <trkpt> in gpx/trk/trkseg or <rtept> in gpx/rte%s", path,
                           g.n_misplaced ? " (there are some elsewhere, which are not the track's points)" : "");
    else if (!st && g.n_misplaced)
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0, "%zu <trkpt> or <rtept> elements outside gpx/trk/trkseg and gpx/rte are not read as points", g.n_misplaced);
    if (!st)
        st = resolve_units(&g);
    if (!st && opts->baro_altitude_field)
        doc->pressure_unit = HYP_UNIT_PA;   /* made from the altitudes, in Pa */
    if (!st)
        st = check_points(&g);
    if (!st) {
        if (!doc->pts.has_temp)
            doc->temperature_unit = HYP_UNIT_NONE;
        size_t no_p = hyp_series_count_flag(&doc->pts, HYP_SAMPLE_NO_PRESSURE);
        size_t no_t = hyp_series_count_flag(&doc->pts, HYP_SAMPLE_NO_TIME);
        if (no_t == doc->pts.count)
            st = hyp_error_set(err, HYP_ERR_NODATA, "%s: no point has a <time>; a barometric track needs times", path);
        else if (no_p + no_t >= doc->pts.count)
            st = opts->baro_altitude_field
                 ? hyp_error_set(err, HYP_ERR_NODATA, "%s: no point has a barometric altitude (looked for <%s>%s, as --baro-altitude says)", path,
                                 opts->baro_altitude_field, alt_in_ele(opts) ? "" : " in each point's extensions")
                 : hyp_error_set(err, HYP_ERR_NODATA,
                               "%s: no point has a pressure (looked for an element named \"%s\" in each point's extensions; --pressure-field, or --rover-pressure-field for one rover, sets the name)",
                               path, field_name(opts->pressure_field, "pressure"));
        else if (no_p)
            hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, 0, "%zu of %zu points have no pressure and get no corrected height", no_p,
                         doc->pts.count);
        if (!st && no_t)
            hyp_msgs_add_at(msgs, HYP_WARNING, "sample", path, 0, "%zu of %zu points have no time and get no corrected height", no_t,
                         doc->pts.count);
        if (!st)
            st = hyp__check_usable(path, &doc->pts, doc->pressure_unit, err);
    }
    free(g.p_raw);
    free(g.t_raw);
    xmlFree(g.gpx_uri);
    if (!st) {
        /* give back the doubling slack: at a million points it is most of
         * the reader's memory */
        hyp_series_shrink(&doc->pts);
        hyp_gpx_layout *L = &doc->layout;
        size_t n = doc->pts.count ? doc->pts.count : 1;
        void *q;
        if ((q = realloc(L->pt_step, n * sizeof(uint32_t)))) L->pt_step = q;
        if ((q = realloc(L->pt_ele_beg, n * sizeof(uint16_t)))) L->pt_ele_beg = q;
        if ((q = realloc(L->pt_ele_len, n * sizeof(uint16_t)))) L->pt_ele_len = q;
        if ((q = realloc(L->pt_ext, n * sizeof(uint32_t)))) L->pt_ext = q;
        if (doc->geoidheight_m && !doc->pt_series && (q = realloc(doc->geoidheight_m, n * sizeof(double))))
            doc->geoidheight_m = q;
    }
    if (st)
        hyp_gpx_doc_free(doc);
    return st;
}

_Static_assert(offsetof(struct hyp_gpx_far, index) == 0, "hyp__sparse_find reads the index first");

void hyp_gpx_point_next(const hyp_gpx_layout *L, size_t i, int64_t *anchor, hyp_gpx_point *p)
{
    int64_t a = *anchor + L->pt_step[i];
    *anchor = a;
    uint32_t x = L->pt_ext[i];
    p->ext_ins = x == HYP_GPX_NONE ? -1 : a + (int64_t)(x & 0x3fffffffu);
    p->ext_kind = x == HYP_GPX_NONE ? HYP_EXT_INSIDE : (hyp_ext_kind)(x >> 30);
    p->open_end = x == HYP_GPX_NONE ? -1 : a;
    uint16_t b = L->pt_ele_beg[i];
    if (b == HYP_GPX_NONE16) {
        p->ele_beg = p->ele_end = -1;
    } else if (b == HYP_GPX_FAR16) {
        size_t lo = hyp__sparse_find(L->ele_far, L->n_far, sizeof *L->ele_far, i);
        p->ele_beg = a + L->ele_far[lo].beg;
        p->ele_end = p->ele_beg + L->ele_far[lo].len;
    } else {
        p->ele_beg = a + b;
        p->ele_end = p->ele_beg + L->pt_ele_len[i];
    }
}

void hyp_gpx_doc_init(hyp_gpx_doc *d)
{
    memset(d, 0, sizeof *d);
    hyp_series_init(&d->pts);
}

void hyp_gpx_doc_free(hyp_gpx_doc *d)
{
    hyp_series_free(&d->pts);
    hyp_gpx_layout *L = &d->layout;
    free(L->pt_step);
    free(L->pt_ele_beg);
    free(L->pt_ele_len);
    free(L->ele_far);
    free(L->pt_ext);
    free(d->geoidheight_m);
    free(d->pt_series);
    for (size_t i = 0; i < d->wpts.count; i++)
        free(d->wpts.name[i]);
    free(d->wpts.name);
    free(d->wpts.time_s);
    free(d->wpts.lat_deg);
    free(d->wpts.lon_deg);
    free(d->wpt_at);
    free(d->wpt_ele_m);
    hyp_gpx_doc_init(d);
}

int hyp_file_is_xml(const char *path)
{
    struct stat st;
    if (stat(path, &st) != 0 || !S_ISREG(st.st_mode))
        return -1;   /* never open a pipe here: it could block */
    FILE *f = fopen(path, "rb");
    if (!f)
        return -1;
    unsigned char b[512];
    size_t n = fread(b, 1, sizeof b, f);
    fclose(f);
    size_t i = n >= 3 && b[0] == 0xEF && b[1] == 0xBB && b[2] == 0xBF ? 3 : 0;
    if (n >= 2 && ((b[0] == 0xFE && b[1] == 0xFF) || (b[0] == 0xFF && b[1] == 0xFE)))
        return 1;
    while (i < n && isspace(b[i]))
        i++;
    return i < n && b[i] == '<';
}
