/* test_rover_spec.c - each rover's own reading options (issue 15): set by
 * name with the program's option names, refused with a message naming the
 * option and what was expected, and found by path when a rover is read,
 * the survey's options staying the default of rovers without their own. */
#define _GNU_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "hypsolev/hypsolev.h"
#include "survey_int.h"

#include <string.h>

/* Each name sets its field; the values are the unit names of units.h's
 * list (hyp_unit_choices) and texts kept by pointer. */
static void test_set_each(void **state)
{
    (void)state;
    hyp_rover_spec r;
    hyp_error err;
    hyp_rover_spec_init(&r, "walk.gpx");
    assert_string_equal(r.path, "walk.gpx");
    assert_int_equal(r.pressure_unit, HYP_UNIT_NONE);
    assert_null(r.pressure_field);
    assert_true(r.clock_offset_s == 0.0);
    const char *baro = "baro", *tc = "tc", *rh = "rh", *zone = "Europe/Vienna";
    assert_int_equal(hyp_rover_spec_set(&r, "rover-pressure-unit", "Pa", &err), HYP_OK);
    assert_int_equal(r.pressure_unit, HYP_UNIT_PA);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-pressure-unit", "inHg", &err), HYP_OK);
    assert_int_equal(r.pressure_unit, HYP_UNIT_INHG);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-temperature-unit", "degF", &err), HYP_OK);
    assert_int_equal(r.temperature_unit, HYP_UNIT_DEGF);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-pressure-field", baro, &err), HYP_OK);
    assert_ptr_equal(r.pressure_field, baro);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-temperature-field", tc, &err), HYP_OK);
    assert_ptr_equal(r.temperature_field, tc);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-humidity-field", rh, &err), HYP_OK);
    assert_ptr_equal(r.humidity_field, rh);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-time-zone", zone, &err), HYP_OK);
    assert_ptr_equal(r.time_zone, zone);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-clock-offset", "-3600.5", &err), HYP_OK);
    assert_true(r.clock_offset_s == -3600.5);
    /* the range's ends, as the man page gives them (-86400 to 86400 s) */
    assert_int_equal(hyp_rover_spec_set(&r, "rover-clock-offset", "86400", &err), HYP_OK);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-clock-offset", "-86400", &err), HYP_OK);
}

/* Bad values: HYP_ERR_USAGE, the option and what was expected; the spec
 * keeps its value. */
static void test_set_refused(void **state)
{
    (void)state;
    hyp_rover_spec r;
    hyp_error err;
    hyp_rover_spec_init(&r, "walk.gpx");
    static const struct { const char *name, *value, *message; } bad[] = {
        {"rover-pressure-unit", "bar", "rover-pressure-unit \"bar\": expected one of Pa, hPa, mbar (mb, millibar), kPa, inHg, mmHg"},
        {"rover-pressure-unit", "degC", "rover-pressure-unit \"degC\": expected one of Pa, hPa, mbar (mb, millibar), kPa, inHg, mmHg"},
        {"rover-temperature-unit", "hPa", "rover-temperature-unit \"hPa\": expected one of degC, K, degF"},
        {"rover-clock-offset", "86401", "rover-clock-offset \"86401\": expected a number from -86400 to 86400"},
        {"rover-clock-offset", "0x10", "rover-clock-offset \"0x10\": expected a number from -86400 to 86400"},
        {"rover-clock-offset", "nan", "rover-clock-offset \"nan\": expected a number from -86400 to 86400"},
        {"rover-clock-offset", "", "rover-clock-offset \"\": expected a number from -86400 to 86400"},
        {"rover-pressure-field", "", "rover-pressure-field \"\": expected a name"},
        {"rover-time-zone", "", "rover-time-zone \"\": expected a name"},
        {"rover-height", "800", "rover-height: no such rover setting"},
        {"pressure-unit", "Pa", "pressure-unit: no such rover setting"},
    };
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        assert_int_equal(hyp_rover_spec_set(&r, bad[k].name, bad[k].value, &err), HYP_ERR_USAGE);
        assert_string_equal(err.message, bad[k].message);
    }
    assert_int_equal(hyp_rover_spec_set(&r, "rover-pressure-field", NULL, &err), HYP_ERR_USAGE);
    assert_int_equal(r.pressure_unit, HYP_UNIT_NONE);
    assert_null(r.pressure_field);
    assert_true(r.clock_offset_s == 0.0);
}

/* Found by path when a rover is read; the survey's options are the
 * default, field by field. */
static void test_read_opts(void **state)
{
    (void)state;
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    hyp_error err;
    assert_int_equal(hyp_survey_opts_set(&o, "pressure-field", "pressure_hpa", &err), HYP_OK);
    assert_int_equal(hyp_survey_opts_set(&o, "temperature-unit", "K", &err), HYP_OK);
    assert_int_equal(hyp_survey_opts_set(&o, "pressure-unit", "hPa", &err), HYP_OK);
    hyp_survey *sv;
    hyp_msgs m;
    hyp_msgs_init(&m);
    assert_int_equal(hyp_survey_new(&sv, &o, &m, &err), HYP_OK);
    hyp_rover_spec r;
    hyp_rover_spec_init(&r, "a/walk.gpx");
    assert_int_equal(hyp_rover_spec_set(&r, "rover-pressure-field", "baro", &err), HYP_OK);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-pressure-unit", "Pa", &err), HYP_OK);
    assert_int_equal(hyp_rover_spec_set(&r, "rover-time-zone", "UTC", &err), HYP_OK);
    assert_int_equal(hyp_survey_add_rover_spec(sv, &r, &err), HYP_OK);

    hyp_read_opts ro;
    hyp__rover_read_opts(sv, "a/walk.gpx", &ro);
    assert_string_equal(ro.pressure_field, "baro");
    assert_int_equal(ro.pressure_unit, HYP_UNIT_PA);
    assert_int_equal(ro.temperature_unit, HYP_UNIT_K);   /* the survey's */
    assert_null(ro.humidity_field);
    assert_ptr_equal(ro.zone, &hyp__rover_own_find(sv, "a/walk.gpx")->zone);
    assert_int_equal(ro.need_position, 1);
    /* another rover (another spelling of a path too) has the survey's */
    hyp__rover_read_opts(sv, "b/walk.gpx", &ro);
    assert_string_equal(ro.pressure_field, "pressure_hpa");
    assert_int_equal(ro.pressure_unit, HYP_UNIT_HPA);
    assert_ptr_equal(ro.zone, &sv->rover_zone);

    /* the same path twice, an empty path, a zone that cannot be read */
    assert_int_equal(hyp_survey_add_rover_spec(sv, &r, &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "--rover a/walk.gpx is given twice");
    hyp_rover_spec_init(&r, "");
    assert_int_equal(hyp_survey_add_rover_spec(sv, &r, &err), HYP_ERR_USAGE);
    hyp_rover_spec_init(&r, "c.gpx");
    r.time_zone = "Mars/Olympus";
    assert_int_equal(hyp_survey_add_rover_spec(sv, &r, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "--rover-time-zone (of --rover c.gpx): "));
    assert_null(hyp__rover_own_find(sv, "c.gpx"));
    hyp_survey_free(sv);
    hyp_msgs_free(&m);
}

/* A clock offset moves the rover's times to true time: logged - offset,
 * as a base's (the GPX's own times are 2026-06-18T07:00:00Z on; checked
 * against GNU date -u -d 2026-06-18T07:00:00Z +%s = 1781766000). */
static void test_clock_apply(void **state)
{
    (void)state;
    hyp_survey *sv;
    hyp_msgs m;
    hyp_error err;
    hyp_msgs_init(&m);
    assert_int_equal(hyp_survey_new(&sv, NULL, &m, &err), HYP_OK);
    hyp_rover_spec r;
    hyp_rover_spec_init(&r, HYP_SOURCE_DIR "/tests/data/rover_own/clock_ahead.gpx");
    r.clock_offset_s = 3600.0;
    assert_int_equal(hyp_survey_add_rover_spec(sv, &r, &err), HYP_OK);
    hyp_read_opts ro;
    hyp__rover_read_opts(sv, r.path, &ro);
    hyp__log l;
    assert_int_equal(hyp__log_read(r.path, &ro, &l, &m, &err), HYP_OK);
    const hyp_series *s = hyp__log_series(&l);
    assert_true(s->time_s[0] == 1781766000.0 + 3600.0);   /* as logged */
    hyp__rover_clock_apply(hyp__rover_own_find(sv, r.path), &l);
    assert_true(s->time_s[0] == 1781766000.0);
    assert_true(s->time_s[1] == 1781766030.0);
    hyp__rover_clock_apply(NULL, &l);   /* no spec: unchanged */
    assert_true(s->time_s[0] == 1781766000.0);
    hyp__log_free(&l);
    hyp_survey_free(sv);
    hyp_msgs_free(&m);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_set_each),
        cmocka_unit_test(test_set_refused),
        cmocka_unit_test(test_read_opts),
        cmocka_unit_test(test_clock_apply),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
