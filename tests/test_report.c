/* test_report.c - the HTML report of a rover's run: the demo survey's page
 * parsed by libxml2's HTML and XML parsers (no errors, nothing outside the
 * file), its profile read back from the SVG against the run's heights and
 * the page's own table, the track distance against PROJ's geodesic
 * solver, a failed run's page, the page writer's number formats, and a
 * long track with a one-sample spike (size, and the spike drawn), and a
 * batch's page written from its done callback (the plan still in the CRS). */
#define _GNU_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include "test_files.h"
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#include <libxml/HTMLparser.h>
#include <libxml/parser.h>
#include <libxml/xpath.h>
#include <libxml/xpathInternals.h>

#include "hypsolev/hypsolev.h"
#include "report_html.h"
#include "report_page.h"
#include "svg.h"

#define DEMO HYP_SOURCE_DIR "/surveys/quenwick-tor"
#define SVG_NS "http://www.w3.org/2000/svg"

static char work[512];

static void make_work(void)
{
    snprintf(work, sizeof work, "%s/report-work", HYP_BINARY_DIR);
    mkdir(work, 0777);
}

/* The demo survey as its README runs it, with an HTML report. */
static hyp_rover_run *run_demo(hyp_survey **sv, const char *report)
{
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    o.threads = 1;
    hyp_error err;
    assert_int_equal(hyp_survey_new(sv, &o, NULL, &err), HYP_OK);
    hyp_base_spec b;
    hyp_base_spec_init(&b, DEMO "/base.csv", 812.4);
    assert_int_equal(hyp_base_spec_set(&b, "base-at", "46.80,9.90", &err), HYP_OK);
    assert_int_equal(hyp_survey_add_base(*sv, &b, NULL, &err), HYP_OK);
    char gpx[700];
    snprintf(gpx, sizeof gpx, "%s/demo.gpx", work);
    hyp_report_info info = {"hypsolev-test", "hypsolev correct 'a b' <&>"};
    hyp_outputs out;
    hyp_outputs_init(&out);
    out.gpx = gpx, out.report = report, out.overwrite = 1, out.report_info = &info;
    hyp_rover_run *run = NULL;
    assert_int_equal(hyp_survey_run(*sv, DEMO "/rover.gpx", &out, 1, &run, &err), HYP_OK);
    if (run->status)
        print_message("%s\n", run->error.message);
    assert_int_equal(run->status, HYP_OK);
    return run;
}

/* ---- parsing ---------------------------------------------------------- */

static int html_errors, svg_tags;

/* libxml2 2.9's HTML parser knows HTML 4.01 only: the inline SVG's
 * elements are "unknown tags" to it (HTML 5 takes them as foreign
 * content, section 13.2.6.5). Those and nothing else are allowed; the
 * page uses no HTML 5 element of its own. */
static void count_html_error(void *ctx, xmlErrorPtr e)
{
    static const char *const svg[] = {"svg", "g", "defs", "clippath", "rect", "line", "polyline", "polygon",
                                      "path", "circle", "text", "pattern", "title"};
    (void)ctx;
    if (e->code == XML_HTML_UNKNOWN_TAG && e->str1)
        for (size_t k = 0; k < sizeof svg / sizeof svg[0]; k++)
            if (!strcasecmp(e->str1, svg[k])) {
                svg_tags++;
                return;
            }
    print_message("libxml2 (HTML): line %d: %s", e->line, e->message ? e->message : "?\n");
    html_errors++;
}

static int xml_errors;

static void count_xml_error(void *ctx, xmlErrorPtr e)
{
    (void)ctx;
    print_message("libxml2 (XML): line %d: %s", e->line, e->message ? e->message : "?\n");
    xml_errors++;
}

static void check_html_parser(const char *page, size_t n, int has_svg)
{
    html_errors = svg_tags = 0;
    xmlSetStructuredErrorFunc(NULL, count_html_error);
    htmlDocPtr doc = htmlReadMemory(page, (int)n, "report.html", "UTF-8", HTML_PARSE_NONET);
    xmlSetStructuredErrorFunc(NULL, NULL);
    assert_non_null(doc);
    assert_int_equal(html_errors, 0);
    assert_int_equal(svg_tags > 0, has_svg);
    xmlFreeDoc(doc);
}

/* The page is also well-formed XML (void elements closed, no named
 * entities), so the strict parser checks every tag's nesting. */
static xmlDocPtr parse_xml(const char *page, size_t n)
{
    xml_errors = 0;
    xmlSetStructuredErrorFunc(NULL, count_xml_error);
    xmlDocPtr doc = xmlReadMemory(page, (int)n, "report.html", "UTF-8", XML_PARSE_NONET);
    xmlSetStructuredErrorFunc(NULL, NULL);
    assert_non_null(doc);
    assert_int_equal(xml_errors, 0);
    return doc;
}

static int count_ci(const char *hay, const char *needle)
{
    int n = 0;
    for (const char *p = hay; (p = strcasestr(p, needle)); p++)
        n++;
    return n;
}

/* Words "nan", "inf", "infinity" anywhere (numbers never show them). */
static int bad_words(const char *s)
{
    int n = 0;
    for (const char *p = s; *p;) {
        size_t len = 0;
        while (((p[len] | 32) >= 'a' && (p[len] | 32) <= 'z'))
            len++;
        if ((len == 3 && (!strncasecmp(p, "nan", 3) || !strncasecmp(p, "inf", 3))) || (len == 8 && !strncasecmp(p, "infinity", 8)))
            n++;
        p += len ? len : 1;
    }
    return n;
}

/* Nothing outside the file: no URL but the SVG namespace, no src, links
 * and url() only to '#' anchors in the page, no script, style sheet,
 * frame, image, object or font from elsewhere. */
static void check_self_contained(const char *page)
{
    assert_int_equal(count_ci(page, "http:"), count_ci(page, "xmlns=\"" SVG_NS "\""));
    static const char *const never[] = {"https:", "src=", "<script", "<link", "@import", "<img", "<iframe", "<object",
                                        "<embed", "file:", "data:", "@font-face", "ftp:", "//www"};
    for (size_t k = 0; k < sizeof never / sizeof never[0]; k++) {
        if (count_ci(page, never[k]) != (k == 13 ? count_ci(page, "xmlns=\"" SVG_NS "\"") : 0))
            print_message("found %s\n", never[k]);
        assert_int_equal(count_ci(page, never[k]), k == 13 ? count_ci(page, "xmlns=\"" SVG_NS "\"") : 0);
    }
    for (const char *p = page; (p = strcasestr(p, "href=")); p++)
        assert_true(p[5] == '"' && p[6] == '#');
    for (const char *p = page; (p = strcasestr(p, "url(")); p++)
        assert_true(p[4] == '#');
    assert_int_equal(bad_words(page), 0);
}

static void test_page_well_formed(void **state)
{
    (void)state;
    char path[700];
    snprintf(path, sizeof path, "%s/demo.report.html", work);
    hyp_survey *sv;
    hyp_rover_run *run = run_demo(&sv, path);
    size_t n;
    char *page = slurp(path, &n);
    check_html_parser(page, n, 1);
    xmlDocPtr doc = parse_xml(page, n);
    check_self_contained(page);
    /* every figure of the correct report */
    static const char *const ids[] = {"height-time", "height-distance", "plan", "base-pressure", "base-tendency",
                                      "offset-model", "ties", "budget"};
    for (size_t k = 0; k < sizeof ids / sizeof ids[0]; k++) {
        char want[64];
        snprintf(want, sizeof want, "id=\"%s-plot\"", ids[k]);
        assert_non_null(strstr(page, want));
    }
    /* the command line and tool as given, escaped; the cautions */
    assert_non_null(strstr(page, "hypsolev correct &#39;a b&#39; &lt;&amp;&gt;"));
    assert_non_null(strstr(page, "hypsolev-test"));
    assert_non_null(strstr(page, "Not for aviation or navigation"));
    assert_non_null(strstr(page, "licensed surveyors"));
    /* the worst point is on the plan: the top of the colour scale is
     * viridis at 1, #FDE725 (svg_colour.c's table) */
    assert_non_null(strstr(page, "fill=\"#FDE725\""));
    print_message("demo report: %zu bytes\n", n);
    xmlFreeDoc(doc);
    free(page);
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
}

/* ---- the profile read back --------------------------------------------- */

static xmlXPathObjectPtr xpath_at(xmlDocPtr doc, xmlNodePtr at, const char *expr)
{
    xmlXPathContextPtr c = xmlXPathNewContext(doc);
    xmlXPathRegisterNs(c, (const xmlChar *)"s", (const xmlChar *)SVG_NS);
    xmlXPathObjectPtr o = at ? xmlXPathNodeEval(at, (const xmlChar *)expr, c) : xmlXPathEvalExpression((const xmlChar *)expr, c);
    xmlXPathFreeContext(c);
    assert_non_null(o);
    return o;
}

static double attr_num(xmlNodePtr n, const char *name)
{
    xmlChar *v = xmlGetProp(n, (const xmlChar *)name);
    assert_non_null(v);
    double d = strtod((const char *)v, NULL);
    xmlFree(v);
    return d;
}

/* px = a + b value, fitted to the tick marks and their labels (numbers),
 * as a reader of the figure would. */
static void axis_from_ticks(xmlDocPtr doc, xmlNodePtr svg, const char *cls, const char *coord, double *a, double *b)
{
    char expr[64];
    snprintf(expr, sizeof expr, ".//s:g[@class='%s']", cls);
    xmlXPathObjectPtr o = xpath_at(doc, svg, expr);
    int n = o->nodesetval ? o->nodesetval->nodeNr : 0;
    assert_true(n >= 2);
    double sv = 0, sp = 0, svv = 0, svp = 0;
    for (int i = 0; i < n; i++) {
        xmlNodePtr g = o->nodesetval->nodeTab[i], line = xmlFirstElementChild(g), text = xmlNextElementSibling(line);
        double px = attr_num(line, coord);
        xmlChar *s = xmlNodeGetContent(text);
        double val = strtod((const char *)s, NULL);
        xmlFree(s);
        sv += val, sp += px, svv += val * val, svp += val * px;
    }
    *b = (n * svp - sv * sp) / (n * svv - sv * sv);
    *a = (sp - *b * sv) / n;
    xmlXPathFreeObject(o);
}

/* The corrected-height line of figure `id` (drawn in series colour 0) as
 * pixel extremes: lowest and highest y, and the largest x. */
static xmlNodePtr line_extremes(xmlDocPtr doc, const char *id, double *py_min, double *py_max, double *px_max)
{
    char expr[160];
    snprintf(expr, sizeof expr, "//s:svg[s:defs/s:clipPath[@id='%s-plot']]", id);
    xmlXPathObjectPtr o = xpath_at(doc, NULL, expr);
    assert_int_equal(o->nodesetval->nodeNr, 1);
    xmlNodePtr svg = o->nodesetval->nodeTab[0];
    xmlXPathFreeObject(o);
    snprintf(expr, sizeof expr, ".//s:g[@class='line'][@stroke='%s']/s:polyline", hyp__svg_colour(0));
    o = xpath_at(doc, svg, expr);
    assert_true(o->nodesetval && o->nodesetval->nodeNr >= 1);
    *py_min = *px_max = -INFINITY, *py_max = -INFINITY;
    *py_min = INFINITY;
    for (int k = 0; k < o->nodesetval->nodeNr; k++) {
        xmlChar *pts = xmlGetProp(o->nodesetval->nodeTab[k], (const xmlChar *)"points");
        for (char *p = (char *)pts, *end; *p; p = end) {
            double px = strtod(p, &end);
            assert_true(*end == ',');
            double py = strtod(end + 1, &end);
            *py_min = fmin(*py_min, py), *py_max = fmax(*py_max, py), *px_max = fmax(*px_max, px);
        }
        xmlFree(pts);
    }
    xmlXPathFreeObject(o);
    return svg;
}

static double table_value(xmlDocPtr doc, const char *cls)
{
    char expr[96];
    snprintf(expr, sizeof expr, "string(//*[@id='height-range']/*[@class='%s'])", cls);
    xmlXPathObjectPtr o = xpath_at(doc, NULL, expr);
    double v = strtod((const char *)o->stringval, NULL);
    xmlXPathFreeObject(o);
    return v;
}

static void test_profile_matches_run(void **state)
{
    (void)state;
    char path[700];
    snprintf(path, sizeof path, "%s/profile.report.html", work);
    hyp_survey *sv;
    hyp_rover_run *run = run_demo(&sv, path);
    const hyp_correct_result *res = &run->result;
    double lo = INFINITY, hi = -INFINITY;
    size_t last_ok = 0;
    for (size_t i = 0; i < res->count; i++)
        if (isfinite(res->height_m[i]))
            lo = fmin(lo, res->height_m[i]), hi = fmax(hi, res->height_m[i]), last_ok = i;
    size_t n;
    char *page = slurp(path, &n);
    xmlDocPtr doc = parse_xml(page, n);
    /* the table's lowest and highest, written with 3 decimals */
    double t_lo = table_value(doc, "lo"), t_hi = table_value(doc, "hi");
    assert_true(fabs(t_lo - lo) <= 0.0005 && fabs(t_hi - hi) <= 0.0005);
    const char *figs[2] = {"height-time", "height-distance"};
    for (int k = 0; k < 2; k++) {
        double py_min, py_max, px_max, ay, by;
        xmlNodePtr svg = line_extremes(doc, figs[k], &py_min, &py_max, &px_max);
        axis_from_ticks(doc, svg, "ytick", "y1", &ay, &by);
        double half = 0.5 / fabs(by);   /* half a pixel in metres */
        double top = (py_min - ay) / by, bottom = (py_max - ay) / by;   /* SVG y grows downwards */
        print_message("%s: drawn %.3f to %.3f m, run %.3f to %.3f m, table %.3f to %.3f m (half a pixel %.3f m)\n", figs[k],
                      bottom, top, lo, hi, t_lo, t_hi, half);
        assert_true(fabs(top - hi) <= half && fabs(bottom - lo) <= half);
        assert_true(fabs(top - t_hi) <= half + 0.0005 && fabs(bottom - t_lo) <= half + 0.0005);
        if (k == 1) {
            /* the distance of the last corrected point, summed with PROJ's
             * geodesic solver (GeographicLib's algorithm) step by step */
            double ax, bx, d = 0, la0 = NAN, lo0 = NAN;
            axis_from_ticks(doc, svg, "xtick", "x1", &ax, &bx);
            for (size_t i = 0; i <= last_ok; i++) {
                double la = hyp_series_lat(run->rover, i), lon = hyp_series_lon(run->rover, i);
                if (run->rover->flag[i] || !(la == la))
                    continue;
                if (la0 == la0)
                    d += hyp_geo_distance_m(la0, lo0, la, lon);
                la0 = la, lo0 = lon;
            }
            double drawn_km = (px_max - ax) / bx;
            print_message("distance: drawn %.4f km, geodesic %.4f km\n", drawn_km, d / 1000);
            assert_true(fabs(drawn_km - d / 1000) <= 0.5 / fabs(bx));
        }
    }
    xmlFreeDoc(doc);
    free(page);
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
}

/* ---- pieces ------------------------------------------------------------ */

/* Steps up to 1 km against PROJ's geodesic solver, which test_geo checks
 * against GeographicLib's GeodSolve: within a millionth (1 mm a km). */
static void test_track_step(void **state)
{
    (void)state;
    const double lats[] = {0, 23.5, 46.8, 60, 70, -45};
    const double dists[] = {0.3, 5, 40, 250, 999};
    for (size_t a = 0; a < sizeof lats / sizeof lats[0]; a++)
        for (size_t k = 0; k < sizeof dists / sizeof dists[0]; k++)
            for (int az = 0; az < 360; az += 37) {
                double dlat = dists[k] * cos(az * M_PI / 180) / 111000.0;
                double dlon = dists[k] * sin(az * M_PI / 180) / (111000.0 * cos(lats[a] * M_PI / 180));
                double g = hyp_geo_distance_m(lats[a], 9.9, lats[a] + dlat, 9.9 + dlon);
                double s = hyp__track_step_m(lats[a], 9.9, lats[a] + dlat, 9.9 + dlon);
                assert_true(fabs(s - g) <= 1e-6 * g + 1e-9);
            }
    /* along a track, the carried radii and cosine against the step's own:
     * 1 m steps over 0.2 degree of latitude (about 22 km) at 60 N */
    hyp__step_cache c = {0};
    double fast = 0, exact = 0;
    for (int i = 0; i < 20000; i++) {
        double la1 = 60 + 1e-5 * i, lo1 = 9.9 + 1.3e-5 * i, la2 = la1 + 1e-5, lo2 = lo1 + 1.3e-5;
        fast += hyp__track_step_fast(&c, la1, lo1, la2, lo2);
        exact += hyp__track_step_m(la1, lo1, la2, lo2);
    }
    assert_true(fabs(fast - exact) <= 1e-7 * exact);
    /* longer steps are the solver's own; no position: NaN */
    assert_true(hyp__track_step_m(46, 9, 46.5, 9.5) == hyp_geo_distance_m(46, 9, 46.5, 9.5));
    assert_true(isnan(hyp__track_step_m(NAN, 9, 46, 9)));
    /* across the antimeridian: the short way */
    assert_true(fabs(hyp__track_step_m(10, 179.9999, 10, -179.9999) - hyp_geo_distance_m(10, 179.9999, 10, -179.9999)) < 1e-6);
}

static void test_page_formats(void **state)
{
    (void)state;
    hyp__page p;
    hyp__page_init(&p, 0);
    /* 2026-06-18T05:00:00Z is 1781758800 s (GNU date -d 2026-06-18T05:00:00Z +%s); -0.04 to one
     * decimal is 0.0, never -0.0 (svg.h: hyp__svg_fmt) */
    hyp__page_out(&p, "[%+.2f|%.0f|%+.1f|%.3f|%t|%z|%d|%T|%T|100%%]", 1.234, 2.5, -0.04, NAN, "a<b&\"c\"", (size_t)42, -7,
                  1781758800.0, INFINITY);
    assert_int_equal(hyp__page_status(&p, NULL), HYP_OK);
    assert_string_equal(p.b.data, "[+1.23|3|0.0|\xE2\x80\x94|a&lt;b&amp;&quot;c&quot;|42|-7|2026-06-18T05:00:00Z|\xE2\x80\x94|100%]");
    hyp__page_free(&p);
    /* a cap too small: the page fails as a whole, with a message */
    hyp__page_init(&p, 100);
    hyp__page_begin(&p, "t");
    hyp_error err;
    assert_int_equal(hyp__page_status(&p, &err), HYP_ERR_NOMEM);
    assert_non_null(strstr(err.message, "size cap"));
    hyp__page_free(&p);
}

/* A rover that cannot be read still gets a page: its error, the cautions. */
static void test_failed_run_page(void **state)
{
    (void)state;
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    hyp_survey *sv;
    hyp_error err;
    assert_int_equal(hyp_survey_new(&sv, &o, NULL, &err), HYP_OK);
    hyp_base_spec b;
    hyp_base_spec_init(&b, DEMO "/base.csv", 812.4);
    assert_int_equal(hyp_survey_add_base(sv, &b, NULL, &err), HYP_OK);
    hyp_outputs out;
    hyp_outputs_init(&out);
    char gpx[700];
    snprintf(gpx, sizeof gpx, "%s/none.gpx", work);
    out.gpx = gpx;
    hyp_rover_run *run;
    assert_int_equal(hyp_survey_run(sv, DEMO "/no-such <rover>.gpx", &out, 1, &run, &err), HYP_OK);
    assert_int_not_equal(run->status, HYP_OK);
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    assert_int_equal(hyp_rover_run_write_html(f, run, NULL, &err), HYP_OK);
    fclose(f);
    check_html_parser(buf, n, 0);
    xmlFreeDoc(parse_xml(buf, n));
    assert_non_null(strstr(buf, "The run failed"));
    assert_non_null(strstr(buf, "no-such &lt;rover&gt;.gpx"));
    assert_non_null(strstr(buf, "Not for aviation or navigation"));
    assert_non_null(strstr(buf, "not given"));   /* no command line */
    free(buf);
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
}

/* A long track (1 s samples) with one sample 15 hPa low: the page stays
 * small and the spike's height is drawn (every extreme survives the
 * thinning). */
static void test_long_track(void **state)
{
    (void)state;
    enum { N = 200000 };
    char rover[700], base[700], report[700];
    snprintf(rover, sizeof rover, "%s/long.csv", work);
    snprintf(base, sizeof base, "%s/long-base.csv", work);
    snprintf(report, sizeof report, "%s/long.report.html", work);
    const double t0 = 1781758800;   /* 2026-06-18T05:00:00Z */
    FILE *f = fopen(base, "w");
    assert_non_null(f);
    fprintf(f, "time,pressure [Pa]\n");
    for (int k = 0; k <= N / 60 + 2; k++)
        fprintf(f, "%.0f,%.1f\n", t0 - 60 + 60.0 * k, 92000.0 - 0.01 * k);
    fclose(f);
    f = fopen(rover, "w");
    assert_non_null(f);
    fprintf(f, "time,pressure [Pa],lat,lon\n");
    for (int i = 0; i < N; i++)
        fprintf(f, "%.0f,%.2f,%.7f,%.7f\n", t0 + i, 91000.0 + 300.0 * sin(i / 9000.0) - (i == 123457 ? 1500.0 : 0.0),
                46.8 + 1e-6 * i, 9.9 + 5e-7 * i);
    fclose(f);
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    o.threads = 2;
    hyp_error err;
    hyp_survey *sv;
    assert_int_equal(hyp_survey_opts_set(&o, "offset", "0", &err), HYP_OK);
    assert_int_equal(hyp_survey_new(&sv, &o, NULL, &err), HYP_OK);
    hyp_base_spec b;
    hyp_base_spec_init(&b, base, 800);
    assert_int_equal(hyp_survey_add_base(sv, &b, NULL, &err), HYP_OK);
    hyp_outputs out;
    hyp_outputs_init(&out);
    char gpx[700];
    snprintf(gpx, sizeof gpx, "%s/long.gpx", work);
    out.gpx = gpx, out.report = report, out.overwrite = 1;
    hyp_rover_run *run;
    assert_int_equal(hyp_survey_run(sv, rover, &out, 2, &run, &err), HYP_OK);
    if (run->status)
        print_message("%s\n", run->error.message);
    assert_int_equal(run->status, HYP_OK);
    double lo, hi;
    hyp__svg_range(run->result.height_m, run->result.count, &lo, &hi);
    assert_true(run->result.height_m[123457] == hi);   /* the spike is the highest point */
    size_t n;
    char *page = slurp(report, &n);
    print_message("%d-point track: report of %zu bytes\n", N, n);
    assert_true(n < 1500000);
    xmlDocPtr doc = parse_xml(page, n);
    double py_min, py_max, px_max, ay, by;
    xmlNodePtr svg = line_extremes(doc, "height-time", &py_min, &py_max, &px_max);
    axis_from_ticks(doc, svg, "ytick", "y1", &ay, &by);
    assert_true(fabs((py_min - ay) / by - hi) <= 0.5 / fabs(by));
    assert_true(fabs((py_max - ay) / by - lo) <= 0.5 / fabs(by));
    xmlFreeDoc(doc);
    free(page);
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
    remove(rover), remove(base), remove(gpx);
}

/* ---- a batch's run, its page written later ----------------------------- */

typedef struct later_page {
    int pages, with_crs;
} later_page;

static void write_later(void *ctx, size_t index, const hyp_rover_run *run)
{
    later_page *lp = ctx;
    (void)index;
    char *page = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&page, &n);
    assert_non_null(f);
    hyp_error err;
    assert_int_equal(hyp_rover_run_write_html(f, run, NULL, &err), HYP_OK);
    fclose(f);
    lp->pages++;
    /* the plan in the run's CRS, named as proj.db names EPSG:32632
     * (projinfo EPSG:32632: "WGS 84 / UTM zone 32N"); without its geo
     * the plan would be in metres about the track's centre */
    if (strstr(page, "easting [m] (WGS 84 / UTM zone 32N"))
        lp->with_crs++;
    free(page);
}

/* A batch takes each rover's PROJ set-up back once its outputs are staged
 * (its worker lends it to the next rover); a page written from the done
 * callback still gets the plan in the run's CRS. */
static void test_batch_page_later(void **state)
{
    (void)state;
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    o.threads = 1;
    o.crs = "utm";
    hyp_survey *sv;
    hyp_error err;
    assert_int_equal(hyp_survey_new(&sv, &o, NULL, &err), HYP_OK);
    hyp_base_spec b;
    hyp_base_spec_init(&b, DEMO "/base.csv", 812.4);
    assert_int_equal(hyp_base_spec_set(&b, "base-at", "46.80,9.90", &err), HYP_OK);
    assert_int_equal(hyp_survey_add_base(sv, &b, NULL, &err), HYP_OK);
    char dir[700];
    snprintf(dir, sizeof dir, "%s/batch-later", work);
    mkdir(dir, 0777);
    hyp_outputs out;
    hyp_outputs_init(&out);
    out.dir = dir, out.overwrite = 1;
    const char *rovers[1] = {DEMO "/rover.gpx"};
    hyp_run_info info;
    later_page lp = {0};
    assert_int_equal(hyp_survey_run_many(sv, rovers, 1, &out, 1, write_later, NULL, &lp, &info, &err), HYP_OK);
    assert_int_equal(lp.pages, 1);
    assert_int_equal(lp.with_crs, 1);
    hyp_survey_free(sv);
}

int main(void)
{
    make_work();
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_page_formats),
        cmocka_unit_test(test_track_step),
        cmocka_unit_test(test_page_well_formed),
        cmocka_unit_test(test_profile_matches_run),
        cmocka_unit_test(test_failed_run_page),
        cmocka_unit_test(test_long_track),
        cmocka_unit_test(test_batch_page_later),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
