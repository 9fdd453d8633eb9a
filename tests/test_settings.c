/* test_settings.c - the settings catalogue (settings.h) is the one list
 * of names: every entry is accepted by the function of its scope with
 * its example value and refused by the others, no name outside it is
 * accepted, and the help lists every entry; the survey set-up takes
 * settings by name in order, copies values, checks the rovers, and names
 * a rover read from standard input "stdin" in its run's texts. */
#define _GNU_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "hypsolev/hypsolev.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

/* The catalogue's own shape: names unique, a value's metavar and example
 * given exactly when it takes one, help and group always, and each group
 * in one run of entries (the help prints a heading where it changes). */
static void test_catalogue_shape(void **state)
{
    (void)state;
    size_t n;
    const hyp_setting_info *s = hyp_settings(&n);
    assert_true(n >= 60);   /* the program had 61 settings and 8 of adjust's before the catalogue */
    for (size_t k = 0; k < n; k++) {
        assert_non_null(s[k].name);
        assert_non_null(s[k].help);
        assert_non_null(s[k].group);
        assert_true(s[k].takes_value ? s[k].metavar && s[k].example : !s[k].metavar && !s[k].example);
        assert_ptr_equal(hyp_setting_find(s[k].name), &s[k]);
        for (size_t j = 0; j < k; j++) {
            assert_string_not_equal(s[j].name, s[k].name);
            if (j + 1 < k && !strcmp(s[j].group, s[k].group))   /* no group between them */
                assert_string_equal(s[k - 1].group, s[k].group);
        }
    }
    assert_null(hyp_setting_find("no-such-setting"));
    assert_null(hyp_setting_find(NULL));
}

/* The setter of a scope on fresh objects; -1 for the set-up's own. */
static hyp_status set_in(hyp_setting_scope scope, const char *name, const char *value, hyp_error *err)
{
    hyp_survey_opts o;
    hyp_base_spec b;
    hyp_rover_spec r;
    hyp_network_opts no;
    hyp_survey_opts_init(&o);
    hyp_base_spec_init(&b, "base.csv", 812.4);
    hyp_rover_spec_init(&r, "walk.gpx");
    hyp_network_opts_init(&no);
    switch (scope) {
    case HYP_SCOPE_SURVEY: return hyp_survey_opts_set(&o, name, value, err);
    case HYP_SCOPE_BASE: return hyp_base_spec_set(&b, name, value, err);
    case HYP_SCOPE_ROVER: return hyp_rover_spec_set(&r, name, value, err);
    case HYP_SCOPE_NETWORK: return hyp_network_opts_set(&no, name, value, err);
    case HYP_SCOPE_SETUP: break;
    }
    return (hyp_status)-1;
}

/* Every entry with its example: accepted by its scope's function (and by
 * the set-up, after a base and a rover), refused by every other. */
static void test_each_accepted_in_its_scope_only(void **state)
{
    (void)state;
    size_t n;
    const hyp_setting_info *s = hyp_settings(&n);
    hyp_error err;
    for (size_t k = 0; k < n; k++) {
        for (int sc = HYP_SCOPE_SURVEY; sc <= HYP_SCOPE_NETWORK; sc++) {
            if (sc == HYP_SCOPE_SETUP)
                continue;
            hyp_status st = set_in((hyp_setting_scope)sc, s[k].name, s[k].example, &err);
            if (sc == (int)s[k].scope) {
                if (st)
                    fail_msg("%s \"%s\" refused: %s", s[k].name, s[k].example ? s[k].example : "(flag)", err.message);
            } else {
                assert_int_equal(st, HYP_ERR_USAGE);
                assert_non_null(strstr(err.message, "no such"));
            }
        }
        if (s[k].scope == HYP_SCOPE_NETWORK)
            continue;
        hyp_survey_setup *su;
        assert_int_equal(hyp_survey_setup_new(&su, &err), HYP_OK);
        assert_int_equal(hyp_survey_setup_set(su, "base", "base.csv", &err), HYP_OK);
        assert_int_equal(hyp_survey_setup_set(su, "rover", "walk.gpx", &err), HYP_OK);
        if (hyp_survey_setup_set(su, s[k].name, s[k].example, &err))
            fail_msg("set-up: %s refused: %s", s[k].name, err.message);
        hyp_survey_setup_free(su);
    }
    /* names of no scope, and a flag given no value where one is needed */
    for (int sc = HYP_SCOPE_SURVEY; sc <= HYP_SCOPE_NETWORK; sc++)
        if (sc != HYP_SCOPE_SETUP)
            assert_int_equal(set_in((hyp_setting_scope)sc, "lapse", "1", &err), HYP_ERR_USAGE);
    assert_int_equal(set_in(HYP_SCOPE_SURVEY, "method", NULL, &err), HYP_ERR_USAGE);
}

/* Values in range and out: the network's numbers (ranges as the program
 * had them before they moved: occupation-radius 1 to 1000 m, weather-walk
 * 0.01 to 20 hPa per sqrt(hour)) reach their fields. */
static void test_network_values(void **state)
{
    (void)state;
    hyp_network_opts no;
    hyp_error err;
    hyp_network_opts_init(&no);
    assert_int_equal(hyp_network_opts_set(&no, "occupation-radius", "25", &err), HYP_OK);
    assert_true(no.occ_radius_m == 25.0);
    assert_int_equal(hyp_network_opts_set(&no, "weather-walk", "0.3", &err), HYP_OK);
    assert_true(no.weather_walk_hpa_sqrt_h == 0.3);
    assert_int_equal(hyp_network_opts_set(&no, "no-find-occupations", NULL, &err), HYP_OK);
    assert_int_equal(no.auto_occupations, 0);
    const char *st = "st.csv";
    assert_int_equal(hyp_network_opts_set(&no, "stations", st, &err), HYP_OK);
    assert_ptr_equal(no.stations_path, st);
    assert_int_equal(hyp_network_opts_set(&no, "occupation-radius", "0.5", &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "occupation-radius \"0.5\": expected a number from 1 to 1000");
    assert_int_equal(hyp_network_opts_set(&no, "weather-walk", "nan", &err), HYP_ERR_USAGE);
    assert_int_equal(hyp_network_opts_set(&no, "min-common", "0x20", &err), HYP_ERR_USAGE);
}

/* The help names every entry of the scopes asked for, and no other. */
static void test_help_lists_each(void **state)
{
    (void)state;
    size_t n, len;
    char *buf;
    const hyp_setting_info *s = hyp_settings(&n);
    unsigned no_net = ~HYP_SCOPE_BIT(HYP_SCOPE_NETWORK);
    FILE *f = open_memstream(&buf, &len);
    assert_non_null(f);
    hyp_settings_write_help(f, no_net);
    fclose(f);
    for (size_t k = 0; k < n; k++) {
        char opt[96];
        snprintf(opt, sizeof opt, "  --%s%s%s", s[k].name, s[k].metavar ? " " : "", s[k].metavar ? s[k].metavar : "");
        if (no_net & HYP_SCOPE_BIT(s[k].scope)) {
            if (!strstr(buf, opt))
                fail_msg("help lacks %s", opt);
        } else
            assert_null(strstr(buf, opt));
    }
    assert_non_null(strstr(buf, "air column:\n  --column-temp MODE       base (base thermometer"));
    assert_null(strstr(buf, "nan"));
    free(buf);
}

/* In order: a base setting needs a base before it, a rover setting a
 * rover; "auto" clock offsets ask for the estimate; values are copied. */
static void test_setup_order_and_copies(void **state)
{
    (void)state;
    hyp_survey_setup *su;
    hyp_error err;
    assert_int_equal(hyp_survey_setup_new(&su, &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_set(su, "base-height", "800", &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "--base-height must follow the --base it applies to");
    assert_int_equal(hyp_survey_setup_set(su, "rover-time-zone", "UTC", &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "--rover-time-zone must follow the --rover it applies to");
    assert_int_equal(hyp_survey_setup_set(su, "stations", "st.csv", &err), HYP_ERR_USAGE);
    assert_int_equal(hyp_survey_setup_set(su, "lapse", "1", &err), HYP_ERR_USAGE);
    assert_int_equal(hyp_survey_setup_has_bases(su), 0);
    assert_int_equal(hyp_survey_setup_set(su, "base", HYP_SOURCE_DIR "/tests/data/base.csv", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_has_bases(su), 1);
    assert_int_equal(hyp_survey_setup_set(su, "base-clock-offset", "auto", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_opts(su)->correct.estimate_clock, 1);
    char text[32] = "marks.csv";
    assert_int_equal(hyp_survey_setup_set(su, "benchmarks", text, &err), HYP_OK);
    strcpy(text, "overwritten");
    assert_string_equal(hyp_survey_setup_opts(su)->benchmarks_path, "marks.csv");
    assert_int_equal(hyp_survey_setup_set(su, "smooth", "-5", &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "smooth \"-5\": expected a number from 0 to 3600");   /* the example of survey.h */
    hyp_survey_setup_free(su);
}

/* The rovers: at least one; a --rover file given once only, never a
 * folder or a pattern that matches nothing. */
static void test_setup_rovers(void **state)
{
    (void)state;
    hyp_survey_setup *su;
    hyp_error err;
    const char *const *rv;
    size_t n;
    const char *walk = HYP_SOURCE_DIR "/tests/data/rover.gpx";
    assert_int_equal(hyp_survey_setup_new(&su, &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_rovers(su, &rv, &n, &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "no rover file given");
    assert_int_equal(hyp_survey_setup_set(su, "rover", HYP_SOURCE_DIR "/tests/data", &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "a folder; --rover names one rover file"));
    assert_int_equal(hyp_survey_setup_set(su, "rover", "/nonexistent/*.gpx", &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "no such file; --rover names one rover file, not a pattern"));
    assert_int_equal(hyp_survey_setup_set(su, "rover", walk, &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_set(su, "rover-pressure-unit", "hPa", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_rovers(su, &rv, &n, &err), HYP_OK);
    assert_int_equal(n, 1);
    assert_string_equal(rv[0], walk);
    assert_int_equal(hyp_survey_setup_add_rover(su, walk, &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_rovers(su, &rv, &n, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "is also given as a rover (or twice)"));
    hyp_survey_setup_free(su);
}

/* A rover from standard input (here a file opened as the stream): the
 * refusals, then a run whose texts name it "stdin", never its copy; the
 * copy is gone after the set-up is freed. The log's third line has a
 * date that may be day.month or month.day (tests/data/bad/
 * ambiguous_dates.csv, as the cli case stdin_rover_bad). */
static void test_setup_stdin(void **state)
{
    (void)state;
    hyp_survey_setup *su;
    hyp_error err;
    const char *const *rv;
    size_t n;
    char out_gpx[] = HYP_BINARY_DIR "/test_settings_stdin.gpx";
    hyp_outputs out;
    hyp_outputs_init(&out);
    assert_int_equal(hyp_survey_setup_new(&su, &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_set(su, "base", HYP_SOURCE_DIR "/tests/data/base.csv", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_set(su, "base-height", "812.4", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_set(su, "time-zone", "UTC", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_add_rover(su, "-", &err), HYP_OK);
    assert_int_equal(hyp_survey_setup_reads_stdin(su), 1);
    assert_int_equal(hyp_survey_setup_rovers(su, &rv, &n, &err), HYP_OK);
    FILE *in = fopen(HYP_SOURCE_DIR "/tests/data/bad/ambiguous_dates.csv", "r");
    assert_non_null(in);
    assert_int_equal(hyp_survey_setup_spool_stdin(su, in, NULL, &out, &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "a rover from standard input (-) needs -o FILE for its corrected GPX");
    out.gpx = out_gpx;
    assert_int_equal(hyp_survey_setup_spool_stdin(su, in, NULL, &out, &err), HYP_OK);
    fclose(in);
    char copy[4096];
    snprintf(copy, sizeof copy, "%s", rv[0]);
    assert_string_not_equal(copy, "-");
    assert_int_equal(access(copy, R_OK), 0);
    hyp_survey *sv;
    hyp_msgs m;
    hyp_msgs_init(&m);
    assert_int_equal(hyp_survey_setup_open(su, &sv, &m, &err), HYP_OK);
    hyp_rover_run *run = NULL;
    assert_int_equal(hyp_survey_run(sv, rv[0], &out, 1, &run, &err), HYP_OK);
    assert_non_null(run);
    assert_int_not_equal(run->status, HYP_OK);
    assert_string_equal(run->path, "stdin");
    assert_non_null(strstr(run->error.message, "stdin:3: time \"03.04.2026 09:00:00\""));
    assert_null(strstr(run->error.message, copy));
    for (size_t k = 0; k < run->msgs.count; k++)
        assert_true(!run->msgs.items[k].file || !strstr(run->msgs.items[k].file, copy));
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
    hyp_msgs_free(&m);
    hyp_survey_setup_free(su);
    assert_int_not_equal(access(copy, F_OK), 0);
}

/* POSIX.1-2017 XCU 2.2.3: inside single quotes every character is
 * literal, so a quote is written '\'' (close, escaped quote, reopen). */
static void test_command_line_join(void **state)
{
    (void)state;
    char *argv[] = {"correct", "a b.gpx", "it's", "--offset=35", ""};
    char *s = hyp_command_line_join(5, argv);
    assert_non_null(s);
    assert_string_equal(s, "hypsolev correct 'a b.gpx' 'it'\\''s' --offset=35 ''");
    free(s);
}

/* A batch's status: the order the program documented before it moved
 * here (cmd_correct.c's rank: usage 2, then input 1, then a failed test
 * 3, then 0); a rover not started (interrupted) counts as an input error. */
static void test_batch_exit_status(void **state)
{
    (void)state;
    hyp_run_info r[3];
    memset(r, 0, sizeof r);
    for (int i = 0; i < 3; i++)
        r[i].started = 1;
    assert_int_equal(hyp_batch_exit_status(r, 0), 0);
    assert_int_equal(hyp_batch_exit_status(r, 3), 0);
    r[1].test_failed = 1;
    assert_int_equal(hyp_batch_exit_status(r, 3), 3);
    r[2].status = HYP_ERR_IO;
    assert_int_equal(hyp_batch_exit_status(r, 3), 1);
    r[0].status = HYP_ERR_USAGE;
    assert_int_equal(hyp_batch_exit_status(r, 3), 2);
    memset(r, 0, sizeof r);
    r[0].started = 1;
    r[0].test_failed = 1;
    assert_int_equal(hyp_batch_exit_status(r, 2), 1);   /* r[1] not started */
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_catalogue_shape),
        cmocka_unit_test(test_each_accepted_in_its_scope_only),
        cmocka_unit_test(test_network_values),
        cmocka_unit_test(test_help_lists_each),
        cmocka_unit_test(test_setup_order_and_copies),
        cmocka_unit_test(test_setup_rovers),
        cmocka_unit_test(test_setup_stdin),
        cmocka_unit_test(test_command_line_join),
        cmocka_unit_test(test_batch_exit_status),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
