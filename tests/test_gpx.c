/* test_gpx.c - the GPX reader and the splicing writer: values read from
 * varied files, outputs that differ from their input only in the changed
 * elements (compared byte for byte), and schema validation of what is
 * written against the GPX 1.0 / 1.1 schemas in ../shared/gpx. */
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
#include <sys/stat.h>

#include <libxml/xmlschemas.h>

#include "hypsolev/hypsolev.h"

#define DATA HYP_SOURCE_DIR "/tests/data/lossless/"
#define VREF "EGM96 geoid (EPSG:5773)"
#define SHARED HYP_SOURCE_DIR "/../shared/gpx/"
/* The fixtures' own private elements, declared so that GPX 1.0's strict
 * wildcard can check the input's part as well as ours. */
#define SENSOR_XSD HYP_SOURCE_DIR "/tests/data/lossless/sensor.xsd"

/* A result with made-up heights: the writer is under test, not the core. */
static void fake_result(const hyp_gpx_doc *d, hyp_correct_result *r)
{
    hyp_correct_result_init(r);
    size_t n = d->pts.count;
    r->count = n;
    r->height_m = calloc(n, sizeof(double));
    r->sigma_m = calloc(n, sizeof(float));
    r->status = calloc(n, 1);
    for (size_t i = 0; i < n; i++) {
        r->status[i] = d->pts.flag[i] ? HYP_PT_REFUSED : HYP_PT_OK;
        r->height_m[i] = r->status[i] ? NAN : 1000.0 + 0.125 * (double)i;
        r->sigma_m[i] = r->status[i] ? NAN : 0.5f + 0.001f * (float)i;
    }
}

/* The expected output, built from the input bytes and the documented forms
 * of the changes (docs/formats.md): the namespace declaration on the root,
 * the new ele text, and the added elements under extensions. */
static char *expected_output(const char *in, size_t n, const hyp_gpx_doc *d, const hyp_correct_result *r)
{
    const hyp_gpx_layout *L = &d->layout;
    size_t cap = n + 512 * (d->pts.count + 1);
    char *out = malloc(cap), *w = out;
    size_t pos = 0;
    const char *p = L->prefix, *c = L->prefix[0] ? ":" : "";
#define COPY_TO(off) do { memcpy(w, in + pos, (size_t)(off) - pos); w += (size_t)(off) - pos; pos = (size_t)(off); } while (0)
    COPY_TO(L->root_attr_ins);
    w += sprintf(w, " xmlns:hyp=\"urn:hypsolev:gpx:1\"");
    const char *vr = "<hyp:vertical_ref>" VREF "</hyp:vertical_ref>";
    if (L->version == 11 && L->meta_kind == 0) {
        COPY_TO(L->root_open_end);
        w += sprintf(w, "<%s%smetadata><%s%sextensions>%s</%s%sextensions></%s%smetadata>", p, c, p, c, vr, p, c, p, c);
    } else if (L->version == 11 && L->meta_kind == 1) {
        COPY_TO(L->meta_ins);
        w += sprintf(w, "%s", vr);
    } else if (L->version == 11 && L->meta_kind == 2) {
        COPY_TO(L->meta_ins);
        w += sprintf(w, "<%s%sextensions>%s</%s%sextensions>", p, c, vr, p, c);
    }
    int64_t anchor = 0;
    for (size_t j = 0; j < d->pts.count; j++) {
        char el[256];
        hyp_gpx_point P;
        hyp_gpx_point_next(L, j, &anchor, &P);
        if (P.open_end < 0)
            continue;   /* <trkpt .../>: no content to change (docs/formats.md) */
        size_t i = d->pt_series ? d->pt_series[j] : j;   /* file point j is sample i */
        if (r->status[i] == HYP_PT_OK) {
            char ein[64] = "";
            if (!isnan(d->pts.ele_m[i]))
                sprintf(ein, "<hyp:ele_in>%.3f</hyp:ele_in>", d->pts.ele_m[i]);
            sprintf(el, "%s<hyp:sigma>%.3f</hyp:sigma>", ein, r->sigma_m[i]);
            if (P.ele_beg >= 0) {
                COPY_TO(P.ele_beg);
                w += sprintf(w, "%.3f", r->height_m[i]);
                pos = (size_t)P.ele_end;
            } else {
                COPY_TO(P.open_end);
                w += sprintf(w, "<%s%sele>%.3f</%s%sele>", p, c, r->height_m[i], p, c);
            }
        } else {
            sprintf(el, "<hyp:status>not corrected: %s</hyp:status>", hyp_sample_flag_text((hyp_sample_flag)d->pts.flag[i]));
        }
        COPY_TO(P.ext_ins);
        if (P.ext_kind == HYP_EXT_WRAP)
            w += sprintf(w, "<%s%sextensions>%s</%s%sextensions>", p, c, el, p, c);
        else
            w += sprintf(w, "%s", el);
    }
    if (L->version == 10) {
        COPY_TO(L->root_close);
        w += sprintf(w, "%s", vr);
    }
    COPY_TO(n);
#undef COPY_TO
    *w = '\0';
    return out;
}

static int validate(const char *xsd_path, const char *doc_path)
{
    xmlSchemaParserCtxtPtr pc = xmlSchemaNewParserCtxt(xsd_path);
    xmlSchemaPtr schema = xmlSchemaParse(pc);
    assert_non_null(schema);
    xmlSchemaValidCtxtPtr vc = xmlSchemaNewValidCtxt(schema);
    int rc = xmlSchemaValidateFile(vc, doc_path, 0);
    xmlSchemaFreeValidCtxt(vc);
    xmlSchemaFree(schema);
    xmlSchemaFreeParserCtxt(pc);
    return rc;
}

/* Validates against the GPX schema together with the project's own schema
 * for its namespace (needed where GPX 1.0's wildcard is strict). */
static void validate_or_skip(const char *gpx_xsd, const char *ns, const char *out_path)
{
    struct stat st;
    char xsd[4096];
    snprintf(xsd, sizeof xsd, "%s%s", SHARED, gpx_xsd);
    if (stat(xsd, &st) != 0) {
        print_message("schema check skipped: %s absent (the shared folder is not beside this checkout)\n", xsd);
        return;
    }
    char wrap[4096];
    snprintf(wrap, sizeof wrap, "%s.wrap.xsd", out_path);
    FILE *f = fopen(wrap, "w");
    assert_non_null(f);
    fprintf(f, "<xsd:schema xmlns:xsd=\"http://www.w3.org/2001/XMLSchema\">\n"
               "<xsd:import namespace=\"%s\" schemaLocation=\"%s\"/>\n"
               "<xsd:import namespace=\"urn:hypsolev:gpx:1\" schemaLocation=\"%s/docs/hypsolev-gpx-1.xsd\"/>\n"
               "<xsd:import namespace=\"urn:example:sensor\" schemaLocation=\"%s\"/>\n"
               "</xsd:schema>\n", ns, xsd, HYP_SOURCE_DIR, SENSOR_XSD);
    fclose(f);
    assert_int_equal(validate(wrap, out_path), 0);
    remove(wrap);
}

static void splice_file(const char *in_path, const char *out_path, const char *xsd, const char *ns, int threads)
{
    hyp_gpx_doc d;
    hyp_gpx_doc_init(&d);
    hyp_error err;
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    hyp_read_opts ro;
    hyp_read_opts_init(&ro);
    ro.pressure_unit = HYP_UNIT_HPA;
    ro.temperature_unit = HYP_UNIT_DEGC;
    hyp_status st = hyp_gpx_read(in_path, &ro, &d, &msgs, &err);
    if (st)
        print_message("%s\n", err.message);
    assert_int_equal(st, HYP_OK);
    size_t n;
    char *in = slurp(in_path, &n);
    /* the layout points at the ele text the reader parsed */
    int64_t anchor = 0;
    for (size_t j = 0; j < d.pts.count; j++) {
        hyp_gpx_point P;
        hyp_gpx_point_next(&d.layout, j, &anchor, &P);
        size_t i = d.pt_series ? d.pt_series[j] : j;
        if (P.ele_beg >= 0 && !isnan(d.pts.ele_m[i]))   /* ele_m is a float: 1e-4 m steps at these heights */
            assert_true(fabs(strtod(in + P.ele_beg, NULL) - d.pts.ele_m[i]) < 1e-4);
    }
    hyp_correct_result r;
    fake_result(&d, &r);
    hyp_output_info info = {.vref = VREF, .threads = threads};
    assert_int_equal(hyp_gpx_write_spliced(in_path, &d, &r, &info, out_path, &err), HYP_OK);
    size_t m;
    char *got = slurp(out_path, &m);
    char *want = expected_output(in, n, &d, &r);
    assert_int_equal(m, strlen(want));
    assert_memory_equal(got, want, m);
    if (xsd)
        validate_or_skip(xsd, ns, out_path);
    /* reading the output again is refused: it is this tool's own output */
    hyp_gpx_doc d2;
    hyp_gpx_doc_init(&d2);
    assert_int_equal(hyp_gpx_read(out_path, &ro, &d2, &msgs, &err), HYP_ERR_FORMAT);
    assert_non_null(strstr(err.message, "this tool's own output"));
    free(in);
    free(got);
    free(want);
    hyp_correct_result_free(&r);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&msgs);
}

static void splice_case(const char *name, const char *xsd, const char *ns)
{
    char in_path[4096], out_path[4096];
    snprintf(in_path, sizeof in_path, "%s%s", DATA, name);
    snprintf(out_path, sizeof out_path, "%s/out-%s", HYP_BINARY_DIR, name);
    splice_file(in_path, out_path, xsd, ns, 1);
}

/* A long track of four kinds of point in turn (ele and extensions; no ele;
 * self-closed; ele without extensions), written by two threads: the output
 * is the same as the documented splice of the input (expected_output),
 * wherever the halves meet (n / 2 falls on each kind in turn). */
static void test_splice_two_threads(void **state)
{
    (void)state;
    for (int v = 10; v <= 11; v++)
        for (size_t n = 25000; n < 25008; n += 2) {
            char in_path[4096], out_path[4096];
            snprintf(in_path, sizeof in_path, "%s/long-%d-%zu.gpx", HYP_BINARY_DIR, v, n);
            snprintf(out_path, sizeof out_path, "%s/out-long-%d-%zu.gpx", HYP_BINARY_DIR, v, n);
            FILE *f = fopen(in_path, "w");
            assert_non_null(f);
            fprintf(f, "<?xml version=\"1.0\"?>\n<gpx version=\"1.%d\" creator=\"t\" xmlns=\"http://www.topografix.com/GPX/1/%d\" xmlns:s=\"urn:example:sensor\">"
                       "<trk><trkseg>\n", v - 10, v - 10);
            for (size_t i = 0; i < n; i++) {
                int sec = (int)(i % 60), min = (int)(i / 60 % 60), hr = (int)(i / 3600);
                char t[64];
                snprintf(t, sizeof t, "<time>2026-06-18T%02d:%02d:%02dZ</time>", 7 + hr, min, sec);
                const char *ext = v == 11 ? "<extensions><s:pressure>923.1</s:pressure></extensions>" : "<s:pressure>923.1</s:pressure>";
                switch (i % 4) {
                case 0: fprintf(f, "<trkpt lat=\"46.8\" lon=\"9.9\"><ele>812.%zu</ele>%s%s</trkpt>\n", i % 10, t, ext); break;
                case 1: fprintf(f, "<trkpt lat=\"46.8\" lon=\"9.9\">%s%s</trkpt>\n", t, ext); break;
                case 2: fprintf(f, "<trkpt lat=\"46.8\" lon=\"9.9\"/>\n"); break;
                default:
                    /* points whose <ele> lies beyond 64 KiB of white space
                     * (the layout's rare wide case) */
                    fprintf(f, "<trkpt lat=\"46.8\" lon=\"9.9\">%*s<ele>  813 </ele>%s</trkpt>\n",
                            i == 15 || i == 12503 ? 70000 : 0, "", t);
                    break;
                }
            }
            fprintf(f, "</trkseg></trk></gpx>\n");
            fclose(f);
            if (n == 25000)   /* one of each version against the schema */
                splice_file(in_path, out_path, v == 11 ? "gpx-1.1.xsd" : "gpx-1.0.xsd",
                            v == 11 ? "http://www.topografix.com/GPX/1/1" : "http://www.topografix.com/GPX/1/0", 2);
            else
                splice_file(in_path, out_path, NULL, NULL, 2);
            remove(in_path);
            remove(out_path);
        }
}

static void test_splice_v11_prefixed(void **state)
{
    (void)state;
    splice_case("v11_prefixed.gpx", "gpx-1.1.xsd", "http://www.topografix.com/GPX/1/1");
}

static void test_splice_v10(void **state)
{
    (void)state;
    splice_case("v10.gpx", "gpx-1.0.xsd", "http://www.topografix.com/GPX/1/0");
}

static void test_splice_v11_default_ns(void **state)
{
    (void)state;
    splice_case("v11_default_ns.gpx", "gpx-1.1.xsd", "http://www.topografix.com/GPX/1/1");
}

static void test_splice_no_namespace(void **state)
{
    (void)state;
    splice_case("no_namespace.gpx", NULL, NULL);
}

/* Inputs a user sent: whitespace around values (the ele text replaced
 * whole, the rest byte for byte), a <gpx> nested in <metadata><time>
 * (its point is not spliced), an <ele> of 1e39 (replaced by the height,
 * no ele_in). */
static void test_splice_user_files(void **state)
{
    (void)state;
    static const char *names[] = {"whitespace.gpx", "nested_gpx.gpx", "ele_1e39.gpx"};
    for (size_t k = 0; k < sizeof names / sizeof *names; k++) {
        char in_path[4096], out_path[4096];
        snprintf(in_path, sizeof in_path, "%s/tests/data/bad/%s", HYP_SOURCE_DIR, names[k]);
        snprintf(out_path, sizeof out_path, "%s/out-%s", HYP_BINARY_DIR, names[k]);
        splice_file(in_path, out_path, NULL, NULL, 1);   /* (their <pressure> is not schema-valid) */
        remove(out_path);
    }
}

/* A track written in reverse is read in time order; the output keeps the
 * file's order, and each point gets its own height: checked here from
 * each output point's own <time>, without the reader's map. */
static void test_splice_reversed(void **state)
{
    (void)state;
    const char *in_path = HYP_SOURCE_DIR "/tests/data/bad/reversed_track.gpx";
    char out_path[4096];
    snprintf(out_path, sizeof out_path, "%s/out-reversed_track.gpx", HYP_BINARY_DIR);
    splice_file(in_path, out_path, NULL, NULL, 1);
    hyp_gpx_doc d;
    hyp_gpx_doc_init(&d);
    hyp_error err;
    assert_int_equal(hyp_gpx_read(in_path, NULL, &d, NULL, &err), HYP_OK);
    hyp_correct_result r;
    fake_result(&d, &r);   /* sample i (time order) gets 1000 + 0.125 i */
    hyp_output_info info = {.vref = VREF};
    assert_int_equal(hyp_gpx_write_spliced(in_path, &d, &r, &info, out_path, &err), HYP_OK);
    size_t m, seen = 0;
    char *got = slurp(out_path, &m);
    const double t0 = 1781765400.0;   /* 2026-06-18T06:50:00Z, the first time (GNU date) */
    for (char *p = strstr(got, "<trkpt"); p; p = strstr(p + 1, "<trkpt")) {
        char *e = strstr(p, "<ele>"), *t = strstr(p, "<time>");
        assert_non_null(e);
        assert_non_null(t);
        char ts[32];
        memcpy(ts, t + 6, 20);
        ts[20] = '\0';
        double time_s;
        assert_int_equal(hyp_time_parse(ts, NULL, &time_s), HYP_TIME_OK);
        double i = (time_s - t0) / 30.0;   /* the points are 30 s apart */
        assert_true(fabs(strtod(e + 5, NULL) - (1000.0 + 0.125 * i)) < 5e-4);
        seen++;
    }
    assert_int_equal(seen, 120);
    free(got);
    remove(out_path);
    hyp_correct_result_free(&r);
    hyp_gpx_doc_free(&d);
}

/* What the reader finds in the varied 1.1 file. */
static void test_read_values(void **state)
{
    (void)state;
    hyp_gpx_doc d;
    hyp_gpx_doc_init(&d);
    hyp_error err;
    hyp_read_opts ro;
    hyp_read_opts_init(&ro);
    assert_int_equal(hyp_gpx_read(DATA "v11_prefixed.gpx", &ro, &d, NULL, &err), HYP_OK);
    assert_int_equal(d.layout.version, 11);
    assert_string_equal(d.layout.prefix, "g");
    assert_int_equal(d.pts.count, 5);   /* one rtept, four trkpt */
    assert_true(fabs(d.pts.pressure_pa[0] - 92300.0) < 1e-6);
    assert_true(fabs(d.pts.pressure_pa[1] - 92295.0) < 1e-6);   /* nested in a foreign element */
    assert_true(fabs(d.pts.ele_m[1] - 812.5) < 1e-9);
    assert_true(isnan(d.pts.ele_m[2]));
    assert_int_equal(d.pts.flag[3], HYP_SAMPLE_NO_PRESSURE);
    assert_true(fabs(d.pts.temp_k[4] - 285.65) < 1e-4);   /* stored as float: 3e-5 K steps */
    assert_int_equal(d.wpts.count, 1);
    assert_string_equal(d.wpts.name[0], "BM-7");
    assert_true(fabs(d.wpts.time_s[0] - 1781769600.0) < 1e-9);
    /* without a unit attribute the option decides; 1.0 file, no namespace */
    hyp_gpx_doc_free(&d);
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    assert_int_equal(hyp_gpx_read(DATA "v10.gpx", &ro, &d, &msgs, &err), HYP_OK);
    assert_int_equal(d.layout.version, 10);
    assert_int_equal(d.pressure_unit, HYP_UNIT_HPA);   /* inferred, with a note */
    assert_true(msgs.count >= 1 && strstr(msgs.items[0].text, "taken as hPa"));
    hyp_gpx_doc_free(&d);
    assert_int_equal(hyp_gpx_read(DATA "no_namespace.gpx", &ro, &d, &msgs, &err), HYP_OK);
    /* 07:00:00.250+02:00 is 05:00:00.250Z */
    assert_true(fabs(d.pts.time_s[0] - (1781766000.0 - 7200.0 + 0.25)) < 1e-6);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&msgs);
}

/* A GPX written from a CSV rover validates against GPX 1.1. */
static void test_write_new(void **state)
{
    (void)state;
    hyp_series s;
    hyp_series_init(&s);
    for (int i = 0; i < 3; i++)
        hyp_series_push(&s, 1781766000.0 + i, 92300.0, 285.0, NAN, 46.8, 9.9, 812.0, (uint32_t)i + 2, HYP_SAMPLE_OK);
    hyp_series_push(&s, 1781766010.0, NAN, NAN, NAN, 46.8, 9.9, NAN, 5, HYP_SAMPLE_NO_PRESSURE);
    hyp_correct_result r;
    hyp_correct_result_init(&r);
    r.count = 4;
    double h[4] = {812.1, 812.2, 812.3, NAN};
    float sg[4] = {0.4f, 0.4f, 0.4f, NAN};
    uint8_t stt[4] = {0, 0, 0, HYP_PT_REFUSED};
    r.height_m = h;
    r.sigma_m = sg;
    r.status = stt;
    char out[4096];
    snprintf(out, sizeof out, "%s/new-track.gpx", HYP_BINARY_DIR);
    hyp_error err;
    hyp_output_info info = {.vref = VREF};
    assert_int_equal(hyp_gpx_write_new(&s, &r, &info, "a <walk> & more", out, &err), HYP_OK);
    validate_or_skip("gpx-1.1.xsd", "http://www.topografix.com/GPX/1/1", out);
    hyp_series_free(&s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_read_values),
        cmocka_unit_test(test_splice_v11_prefixed),
        cmocka_unit_test(test_splice_two_threads),
        cmocka_unit_test(test_splice_v10),
        cmocka_unit_test(test_splice_v11_default_ns),
        cmocka_unit_test(test_splice_no_namespace),
        cmocka_unit_test(test_write_new),
        cmocka_unit_test(test_splice_user_files),
        cmocka_unit_test(test_splice_reversed),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
