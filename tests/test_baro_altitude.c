/* test_baro_altitude.c - tracks that store a barometric altitude instead of
 * a pressure (--baro-altitude): a simulated day's track turned into the
 * altitudes an altimeter would have shown (rounded to 1 m, re-set once in
 * the middle) corrects to within its budget of the truth and of the same
 * track with its raw pressures, and the re-setting is found where it was
 * made. Check values name their source. */
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

#include "hypsolev/hypsolev.h"
#include "baro_altitude.h"
#include "sim_files.h"

#define SIM_DIR HYP_BINARY_DIR "/sim-baro"
/* the recorder's references: set to 1018 hPa at the start, re-set to
 * 1009 hPa at the middle point (the test's own choice) */
#define REF1_HPA 1018.0
#define REF2_HPA 1009.0

/* The altimeter law, ICAO Doc 7488/3 troposphere, written here apart from
 * the library: a = T0 / L (1 - (p / ref)^(R* L / (g0 M0))), T0 288.15 K,
 * L 0.0065 K/m, R* 8.31432, g0 9.80665, M0 0.0289644 (USSA 1976). */
static double altimeter_m(double p_hpa, double ref_hpa)
{
    return 288.15 / 0.0065 * (1.0 - pow(p_hpa / ref_hpa, 8.31432 * 0.0065 / (9.80665 * 0.0289644)));
}

/* Writes the simulator's rover.gpx as an altimeter's track: each point's
 * <lg:pressure unit="hPa"> becomes its altitude, rounded to 1 m, in <ele>
 * (in_ele) or in <lg:altitude> (the <ele> kept). Returns the points. */
static size_t make_baro_track(const char *in, const char *out, int in_ele)
{
    size_t n;
    char *src = slurp(in, &n);
    size_t npts = 0;
    for (char *s = src; (s = strstr(s, "<trkpt ")); s++)
        npts++;
    FILE *f = fopen(out, "wb");
    assert_non_null(f);
    const char *s = src;
    size_t k = 0;
    const char *pt;
    while ((pt = strstr(s, "<trkpt "))) {
        const char *end = strstr(pt, "</trkpt>");
        const char *ps = strstr(pt, "<lg:pressure unit=\"hPa\">");
        const char *es = strstr(pt, "<ele>"), *ee = strstr(pt, "</ele>");
        assert_true(end && ps && es && ee && ps < end && ee < end);
        const char *pv = ps + strlen("<lg:pressure unit=\"hPa\">");
        const char *pe = strstr(pv, "</lg:pressure>") + strlen("</lg:pressure>");
        double a = nearbyint(altimeter_m(strtod(pv, NULL), k < npts / 2 ? REF1_HPA : REF2_HPA));
        if (in_ele) {
            fwrite(s, 1, (size_t)(es - s), f);
            fprintf(f, "<ele>%.0f", a);
            fwrite(ee, 1, (size_t)(ps - ee), f);
        } else {
            fwrite(s, 1, (size_t)(ps - s), f);
            fprintf(f, "<lg:altitude>%.0f</lg:altitude>", a);
        }
        s = pe;
        k++;
    }
    fputs(s, f);
    fclose(f);
    free(src);
    return npts;
}

static int setup(void **state)
{
    (void)state;
    char cmd[8192];
    snprintf(cmd, sizeof cmd, "rm -rf '%s' && mkdir -p '%s' && '%s' calm '%s' --seed 11 > /dev/null", SIM_DIR, SIM_DIR,
             HYP_SIM_EXE, SIM_DIR);
    if (system(cmd) != 0)
        return -1;
    make_baro_track(SIM_DIR "/rover.gpx", SIM_DIR "/baro-ele.gpx", 1);
    make_baro_track(SIM_DIR "/rover.gpx", SIM_DIR "/baro-ext.gpx", 0);
    return 0;
}

/* The re-setting and the quantisation, found by the library on the track
 * as read. */
static void test_resetting_found(void **state)
{
    (void)state;
    truth tr;
    read_truth(SIM_DIR "/truth.csv", &tr);
    hyp_read_opts ro;
    hyp_read_opts_init(&ro);
    ro.baro_altitude_field = "ele";
    hyp_gpx_doc doc;
    hyp_gpx_doc_init(&doc);
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    hyp_error err;
    assert_int_equal(hyp_gpx_read(SIM_DIR "/baro-ele.gpx", &ro, &doc, &msgs, &err), HYP_OK);
    assert_int_equal(doc.pts.count, tr.n);
    hyp__baro b;
    assert_int_equal(hyp__baro_join(&doc.pts, "baro-ele.gpx", &b, &msgs, &err), HYP_OK);
    /* rounded to 1 m by make_baro_track */
    assert_true(b.quant_m == 1.0);
    /* q / sqrt(12) at about 11 Pa/m (USSA 1976 density near 900 hPa, about
     * 1.1 kg/m^3, times g0): 0.29 m is 3 to 3.5 Pa */
    assert_true(b.quant_pa > 3.0 && b.quant_pa < 3.5);
    assert_int_equal(b.n_steps, 1);
    /* at the middle point, +-1 sample */
    size_t mid = tr.n / 2, at = SIZE_MAX;
    for (size_t i = 0; i < tr.n; i++)
        if (fabs(tr.t[i] - b.steps[0].time_s) < 1e-6)
            at = i;
    print_message("re-setting found at point %zu (made at %zu), %+.2f m +- %.2f m\n", at, mid, b.steps[0].size_m,
                  b.steps[0].sigma_m);
    assert_true(at != SIZE_MAX && at + 1 >= mid && at <= mid + 1);
    /* its size: the altimeter law at the true pressure there, both
     * references (the sim's truth.csv pressure) */
    char line[256];
    FILE *f = fopen(SIM_DIR "/truth.csv", "r");
    assert_non_null(f);
    double p_pa = NAN;
    for (size_t i = 0; fgets(line, sizeof line, f);)
        if (line[0] != 't' && i++ == mid)
            p_pa = strtod(strrchr(line, ',') + 1, NULL);
    fclose(f);
    double want = altimeter_m(p_pa / 100.0, REF2_HPA) - altimeter_m(p_pa / 100.0, REF1_HPA);
    print_message("step expected %+.2f m\n", want);
    /* 1 m rounding on each side, the sensor's noise and the walk over one
     * 5 s interval: 2 m */
    assert_true(fabs(b.steps[0].size_m - want) < 2.0);
    assert_true(b.steps[0].sigma_m > 0.1 && b.steps[0].sigma_m < 2.0);
    hyp_gpx_doc_free(&doc);
    hyp_msgs_free(&msgs);
    free(tr.t);
    free(tr.h);
}

/* A new survey with the default options and, if field is not NULL,
 * --baro-altitude field; msgs is initialised here. */
static hyp_survey *new_survey(const char *field, hyp_msgs *msgs, hyp_error *err)
{
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    if (field)
        assert_int_equal(hyp_survey_opts_set(&o, "baro-altitude", field, err), HYP_OK);
    hyp_survey *sv;
    hyp_msgs_init(msgs);
    assert_int_equal(hyp_survey_new(&sv, &o, msgs, err), HYP_OK);
    return sv;
}

static hyp_rover_run *run_one(const char *rover, const char *field)
{
    hyp_error err;
    hyp_msgs msgs;
    hyp_survey *sv = new_survey(field, &msgs, &err);
    hyp_base_spec b;
    hyp_base_spec_init(&b, SIM_DIR "/base.csv", scenario_value(SIM_DIR, "base_height_m"));
    b.lat_deg = scenario_value(SIM_DIR, "base_lat");
    b.lon_deg = scenario_value(SIM_DIR, "base_lon");
    assert_int_equal(hyp_survey_add_base(sv, &b, &msgs, &err), HYP_OK);
    hyp_rover_run *run = NULL;
    assert_int_equal(hyp_survey_run(sv, rover, NULL, 1, &run, &err), HYP_OK);
    if (run->status)
        print_message("%s\n", run->error.message);
    assert_int_equal(run->status, HYP_OK);
    hyp_survey_free(sv);
    hyp_msgs_free(&msgs);
    return run;
}

/* The same track with raw pressures and as altitudes: both against the
 * simulator's truth, and against each other. */
static void check_against_raw(const char *rover, const char *field)
{
    truth tr;
    read_truth(SIM_DIR "/truth.csv", &tr);
    hyp_rover_run *raw = run_one(SIM_DIR "/rover.gpx", NULL), *alt = run_one(rover, field);
    const hyp_correct_result *a = &alt->result, *r = &raw->result;
    double ss_a = 0, ss_r = 0;
    size_t n = 0, cov = 0, near_raw = 0;
    for (size_t i = 0; i < tr.n; i++) {
        if (a->status[i] != HYP_PT_OK || r->status[i] != HYP_PT_OK)
            continue;
        double ea = a->height_m[i] - tr.h[i], er = r->height_m[i] - tr.h[i];
        ss_a += ea * ea, ss_r += er * er, n++;
        cov += fabs(ea) <= 2.0 * a->sigma_m[i];
        near_raw += fabs(a->height_m[i] - r->height_m[i]) <= 2.0 * a->sigma_m[i];
    }
    double rmse_a = sqrt(ss_a / (double)n), rmse_r = sqrt(ss_r / (double)n);
    print_message("%s: %zu points; RMSE %.3f m (raw pressure %.3f m); truth within 2 sigma %.3f, raw run within 2 sigma %.3f; median sigma %.2f m (raw %.2f m)\n",
                  rover, n, rmse_a, rmse_r, (double)cov / (double)n, (double)near_raw / (double)n, a->median_sigma_m,
                  r->median_sigma_m);
    assert_true(n >= tr.n * 95 / 100);
    /* 2-sigma coverage of a normal error is 0.954; 0.95 allowed (the
     * budget's promise, as test_coverage holds it) */
    assert_true((double)cov / (double)n >= 0.95);
    assert_true((double)near_raw / (double)n >= 0.95);
    /* the altitudes add 1 m quantisation and a joined step: the RMSE
     * stays within the budget's median sigma of the altitudes' run */
    assert_true(rmse_a <= a->median_sigma_m);
    /* the budget grew by the quantisation (q / sqrt(12) = 0.29 m) */
    assert_true(a->median_sigma_m > r->median_sigma_m);
    hyp_rover_run_free(raw);
    hyp_rover_run_free(alt);
    free(tr.t);
    free(tr.h);
}

static void test_ele_against_raw(void **state)
{
    (void)state;
    check_against_raw(SIM_DIR "/baro-ele.gpx", "ele");
}

static void test_extension_against_raw(void **state)
{
    (void)state;
    check_against_raw(SIM_DIR "/baro-ext.gpx", "altitude");
}

/* A step no re-setting can make: 3000 m in 1 s at about 1000 m needs
 * references 1013 and about 1430 hPa, beyond the highest sea-level
 * pressure recorded (1083.8 hPa, from memory): refused, naming the line. */
static void test_step_refused(void **state)
{
    (void)state;
    hyp_series s;
    hyp_series_init(&s);
    for (int i = 0; i < 40; i++) {
        double a = 1000.0 + (i >= 20 ? 3000.0 : 0.0);
        assert_int_equal(hyp_series_push(&s, 1.0e9 + i, hyp_baro_altitude_to_pressure_pa(a, HYP_P0_PA), NAN, NAN,
                                         46.8, 9.9, NAN, (uint32_t)(10 + i), HYP_SAMPLE_OK), HYP_OK);
    }
    hyp__baro b;
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    hyp_error err;
    assert_int_equal(hyp__baro_join(&s, "t.gpx", &b, &msgs, &err), HYP_ERR_VALUE);
    print_message("%s\n", err.message);
    assert_non_null(strstr(err.message, "t.gpx:30:"));
    assert_non_null(strstr(err.message, "1000.0 m to 4000.0 m"));
    /* a 50 m step is a re-setting, joined: the pressures after it scaled
     * back to continue those before */
    hyp_series_free(&s);
    hyp_series_init(&s);
    for (int i = 0; i < 40; i++) {
        double a = 1000.0 + (i >= 20 ? 50.0 : 0.0);
        assert_int_equal(hyp_series_push(&s, 1.0e9 + i, hyp_baro_altitude_to_pressure_pa(a, HYP_P0_PA), NAN, NAN,
                                         46.8, 9.9, NAN, (uint32_t)(10 + i), HYP_SAMPLE_OK), HYP_OK);
    }
    assert_int_equal(hyp__baro_join(&s, "t.gpx", &b, &msgs, &err), HYP_OK);
    assert_int_equal(b.n_steps, 1);
    assert_true(fabs(b.steps[0].size_m - 50.0) < 1e-3);
    /* float pressures: 0.008 Pa steps near 900 hPa (samples.h) */
    assert_true(fabs(s.pressure_pa[39] - s.pressure_pa[0]) < 0.02);
    hyp_series_free(&s);
    hyp_msgs_free(&msgs);
}

/* A 300 m step in 10 s that the GNSS heights make too (a cable car) is
 * motion: no re-setting, nothing rescaled. The same step with GNSS heights
 * that stay put is one. */
static void test_gnss_motion_not_resetting(void **state)
{
    (void)state;
    for (int gnss_moves = 1; gnss_moves >= 0; gnss_moves--) {
        hyp_series s;
        hyp_series_init(&s);
        for (int i = 0; i < 40; i++) {
            double a = 1000.0 + (i >= 20 ? 300.0 : 0.0), g = gnss_moves ? a + 47.0 + (i % 3) * 4.0 : 1047.0;
            assert_int_equal(hyp_series_push(&s, 1.0e9 + 10.0 * i, hyp_baro_altitude_to_pressure_pa(a, HYP_P0_PA), NAN,
                                             NAN, 46.8, 9.9, g, (uint32_t)(10 + i), HYP_SAMPLE_OK), HYP_OK);
        }
        float p39 = s.pressure_pa[39];
        hyp__baro b;
        hyp_msgs msgs;
        hyp_msgs_init(&msgs);
        hyp_error err;
        assert_int_equal(hyp__baro_join(&s, "t.gpx", &b, &msgs, &err), HYP_OK);
        assert_int_equal(b.n_steps, gnss_moves ? 0 : 1);
        assert_true(gnss_moves ? s.pressure_pa[39] == p39 : s.pressure_pa[39] != p39);
        hyp_series_free(&s);
        hyp_msgs_free(&msgs);
    }
}

/* Writes a track of the demo network survey as a recorder storing its
 * altitude, rounded to 1 m, in <lg:altitude> for the reference ref_hpa
 * (the <ele> GNSS heights kept). */
static void network_track_as_altitudes(const char *in, const char *out, double ref_hpa)
{
    size_t n;
    char *src = slurp(in, &n);
    FILE *f = fopen(out, "wb");
    assert_non_null(f);
    const char *s = src, *ps;
    static const char open_tag[] = "<lg:pressure unit=\"hPa\">", close_tag[] = "</lg:pressure>";
    while ((ps = strstr(s, open_tag))) {
        fwrite(s, 1, (size_t)(ps - s), f);
        const char *pv = ps + strlen(open_tag);
        fprintf(f, "<lg:altitude>%.0f</lg:altitude>", nearbyint(altimeter_m(strtod(pv, NULL), ref_hpa)));
        s = strstr(pv, close_tag) + strlen(close_tag);
    }
    fputs(s, f);
    fclose(f);
    free(src);
}

static hyp_network_result *adjust(const char *dir, const char *field, const char *const *tracks)
{
    hyp_error err;
    hyp_msgs m;
    hyp_survey *sv = new_survey(field, &m, &err);
    assert_int_equal(hyp_survey_add_base_dir(sv, dir, &m, &err), HYP_OK);
    hyp_network_opts no;
    hyp_network_opts_init(&no);
    char stations[4200], fb[4200];
    snprintf(stations, sizeof stations, "%s/stations.csv", dir);
    snprintf(fb, sizeof fb, "%s/fieldbook.csv", dir);
    no.stations_path = stations;
    no.fieldbook_path = fb;
    hyp_network_result *r = NULL;
    hyp_status st = hyp_network_run(sv, &no, tracks, 4, &r, &err);
    if (st)
        fail_msg("%s", err.message);
    hyp_survey_free(sv);
    hyp_msgs_free(&m);
    return r;
}

/* `adjust` with --baro-altitude: the committed Skelvorn Moor survey
 * (surveys/skelvorn-moor, the simulator's network) with each track's
 * pressures stored as altitudes for a different reference (1018, 1008,
 * 1013.25 and 1020 hPa, the test's choice). Every station within 2 sigma
 * of the truth (truth.csv) and of the raw-pressure adjustment, every test
 * of the network passed. */
static void test_adjust(void **state)
{
    (void)state;
    const char *dir = HYP_SOURCE_DIR "/surveys/skelvorn-moor";
    static const char *names[4] = {"ra-day1", "rb-day1", "ra-day2", "rb-day2"};
    static const double ref[4] = {1018.0, 1008.0, 1013.25, 1020.0};
    char raw[4][4200], alt[4][4200];
    const char *rawp[4], *altp[4];
    for (int k = 0; k < 4; k++) {
        snprintf(raw[k], sizeof raw[k], "%s/%s.gpx", dir, names[k]);
        snprintf(alt[k], sizeof alt[k], "%s/%s.gpx", SIM_DIR, names[k]);
        network_track_as_altitudes(raw[k], alt[k], ref[k]);
        rawp[k] = raw[k], altp[k] = alt[k];
    }
    hyp_network_result *r0 = adjust(dir, NULL, rawp), *r1 = adjust(dir, "altitude", altp);
    assert_false(r1->tests_failed);
    char path[4200], line[256], name[64];
    snprintf(path, sizeof path, "%s/truth.csv", dir);
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    size_t n = 0;
    double ss0 = 0, ss1 = 0, h;
    while (fgets(line, sizeof line, f))
        if (sscanf(line, "%63[^,],%lf", name, &h) == 2)
            for (size_t s = 0; s < r1->stations.count; s++)
                if (!strcmp(r1->stations.name[s], name) && !r1->st[s].control) {
                    const hyp_network_station *a = &r1->st[s], *b = &r0->st[s];
                    assert_true(a->height_m == a->height_m);
                    assert_true(fabs(a->height_m - h) <= 2.0 * a->sigma_m);
                    assert_true(fabs(a->height_m - b->height_m) <= 2.0 * a->sigma_m);
                    ss0 += (b->height_m - h) * (b->height_m - h);
                    ss1 += (a->height_m - h) * (a->height_m - h);
                    n++;
                }
    fclose(f);
    print_message("adjust: %zu stations; RMSE %.3f m from altitudes, %.3f m from raw pressures\n", n, sqrt(ss1 / (double)n),
                  sqrt(ss0 / (double)n));
    assert_true(n >= 9);
    hyp_network_result_free(r0);
    hyp_network_result_free(r1);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_resetting_found),
        cmocka_unit_test(test_ele_against_raw),
        cmocka_unit_test(test_extension_against_raw),
        cmocka_unit_test(test_step_refused),
        cmocka_unit_test(test_gnss_motion_not_resetting),
        cmocka_unit_test(test_adjust),
    };
    return cmocka_run_group_tests(tests, setup, NULL);
}
