/* test_survey.c - the survey run's own rules: outputs that would destroy
 * an input (a hard link to it too) are refused; names that XML and JSON
 * cannot hold are made safe in what is written; stale staging files are
 * removed, and only ours of dead processes. */
#define _GNU_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "hypsolev/hypsolev.h"
#include "output_set.h"
#include "text_safe.h"

#include <libxml/parser.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#define DATA HYP_SOURCE_DIR "/tests/data"

static char work[4096];

static int setup(void **state)
{
    (void)state;
    snprintf(work, sizeof work, "%s/survey-work", HYP_BINARY_DIR);
    char cmd[8300];
    snprintf(cmd, sizeof cmd, "rm -rf '%s' && mkdir -p '%s'", work, work);
    return system(cmd);
}

static hyp_survey *open_demo(hyp_survey_opts *o)
{
    hyp_survey *sv;
    hyp_error err;
    assert_int_equal(hyp_survey_new(&sv, o, NULL, &err), HYP_OK);
    hyp_base_spec b;
    hyp_base_spec_init(&b, DATA "/base.csv", 812.4);
    assert_int_equal(hyp_base_spec_set(&b, "base-at", "46.8,9.9", &err), HYP_OK);
    assert_int_equal(hyp_survey_add_base(sv, &b, NULL, &err), HYP_OK);
    return sv;
}

/* A hard link to an input is that input: an output through it would
 * replace the input's bytes. */
static void test_hard_link_to_input_refused(void **state)
{
    (void)state;
    char copy[4200], link[4200];
    snprintf(copy, sizeof copy, "%s/rover.gpx", work);
    snprintf(link, sizeof link, "%s/alias.gpx", work);
    char cmd[9000];
    snprintf(cmd, sizeof cmd, "cp '%s' '%s' && ln -f '%s' '%s'", DATA "/rover.gpx", copy, copy, link);
    assert_int_equal(system(cmd), 0);
    hyp_survey *sv = open_demo(NULL);
    const char *rovers[] = {copy};
    hyp_outputs out = {.gpx = link};
    hyp_error err;
    assert_int_equal(hyp_survey_check_outputs(sv, rovers, 1, &out, NULL, &err), HYP_ERR_USAGE);
    assert_non_null(strstr(err.message, "would overwrite an input"));
    /* and a run asked directly refuses it too, writing nothing */
    hyp_rover_run *run;
    assert_int_equal(hyp_survey_run(sv, copy, &out, 1, &run, &err), HYP_OK);
    assert_int_equal(run->status, HYP_ERR_USAGE);
    hyp_rover_run_free(run);
    struct stat a, b;
    assert_int_equal(stat(DATA "/rover.gpx", &a), 0);
    assert_int_equal(stat(copy, &b), 0);
    assert_true(a.st_size == b.st_size);
    hyp_survey_free(sv);
}

/* A CSV rover whose file name holds a control character and a byte that is
 * not UTF-8: the new GPX names its track after the file, and must still
 * be well-formed XML (XML 1.0, section 2.2); the JSON batch summary must
 * hold only UTF-8 without raw control characters (RFC 8259, 7 and 8.1). */
static void test_hostile_name_written_safely(void **state)
{
    (void)state;
    char rover[4200], gpx[4200], cmd[9000];
    snprintf(rover, sizeof rover, "%s/walk\x01\xff<&.csv", work);
    snprintf(gpx, sizeof gpx, "%s/walk.gpx", work);
    snprintf(cmd, sizeof cmd, "cp '%s' '%s'", DATA "/rover_local.csv", rover);
    assert_int_equal(system(cmd), 0);
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    hyp_error err;
    assert_int_equal(hyp_survey_opts_set(&o, "time-zone", "Europe/Vienna", &err), HYP_OK);
    hyp_survey *sv = open_demo(&o);
    hyp_outputs out = {.gpx = gpx};
    hyp_rover_run *run;
    assert_int_equal(hyp_survey_run(sv, rover, &out, 1, &run, &err), HYP_OK);
    if (run->status)
        print_message("%s\n", run->error.message);
    assert_int_equal(run->status, HYP_OK);
    xmlDocPtr doc = xmlReadFile(gpx, NULL, XML_PARSE_NONET | XML_PARSE_NOERROR | XML_PARSE_NOWARNING);
    assert_non_null(doc);   /* NULL: not well-formed */
    xmlFreeDoc(doc);
    hyp_run_info info = {.path = rover, .started = 1, .median_sigma_m = 1.0};
    snprintf(info.message, sizeof info.message, "bad \x02 name \xc3");
    char *text = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&text, &len);
    hyp_batch_summary_write(f, &info, 1, HYP_SUMMARY_JSON);
    fclose(f);
    for (const unsigned char *p = (const unsigned char *)text; *p;) {
        long cp;
        p += hyp__utf8_next(p, &cp);
        assert_true(cp >= 0);                 /* well-formed UTF-8 throughout */
        assert_true(cp >= 0x20 || cp == '\n');  /* no raw control character */
    }
    assert_non_null(strstr(text, "\\u0001"));
    assert_non_null(strstr(text, "\\ufffd"));
    free(text);
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
}

/* Staging files: a dead process's are removed, a living one's and files
 * not of our pattern are kept. */
static void test_stale_staging_removed(void **state)
{
    (void)state;
    pid_t child = fork();
    if (child == 0)
        _exit(0);
    waitpid(child, NULL, 0);   /* a pid that is gone */
    char target[4200], dead[4300], live[4300], other[4300];
    snprintf(target, sizeof target, "%s/t.gpx", work);
    snprintf(dead, sizeof dead, "%s" HYP__STAGE_TAG "%ld-abc123", target, (long)child);
    snprintf(live, sizeof live, "%s" HYP__STAGE_TAG "%ld-abc123", target, (long)getppid());
    snprintf(other, sizeof other, "%s.tmp-abc123", target);
    const char *files[] = {dead, live, other};
    for (int k = 0; k < 3; k++) {
        FILE *f = fopen(files[k], "w");
        assert_non_null(f);
        fclose(f);
    }
    assert_int_equal(hyp__stale_remove(target), 1);
    assert_int_not_equal(access(dead, F_OK), 0);
    assert_int_equal(access(live, F_OK), 0);
    assert_int_equal(access(other, F_OK), 0);
}

/* An output set is all or nothing: a file that fails to open leaves the
 * others' targets as they were. */
static void test_output_set_all_or_nothing(void **state)
{
    (void)state;
    char a[4200], bad[4200];
    snprintf(a, sizeof a, "%s/a.txt", work);
    snprintf(bad, sizeof bad, "%s/no/such/dir/b.txt", work);
    FILE *f = fopen(a, "w");
    fputs("old\n", f);
    fclose(f);
    hyp__outset set;
    hyp__outset_init(&set);
    hyp_error err;
    hyp__outfile *o = hyp__outset_add(&set, a, &err);
    assert_non_null(o);
    fputs("new\n", o->f);
    assert_null(hyp__outset_add(&set, bad, &err));
    hyp__outset_abort(&set);
    char buf[16] = "";
    f = fopen(a, "r");
    assert_non_null(fgets(buf, sizeof buf, f));
    fclose(f);
    assert_string_equal(buf, "old\n");
    hyp__outset_init(&set);
    o = hyp__outset_add(&set, a, &err);
    fputs("new\n", o->f);
    assert_int_equal(hyp__outset_commit(&set, NULL, NULL, &err), HYP_OK);
    f = fopen(a, "r");
    assert_non_null(fgets(buf, sizeof buf, f));
    fclose(f);
    assert_string_equal(buf, "new\n");
}

/* Settings by name: ranges and units as the man page gives them. */
static void test_settings(void **state)
{
    (void)state;
    hyp_survey_opts o;
    hyp_survey_opts_init(&o);
    hyp_error err;
    assert_int_equal(hyp_survey_opts_set(&o, "lapse-rate", "-5.5", &err), HYP_OK);
    assert_true(o.correct.lapse_k_per_m == -0.0055);   /* K/km to K/m */
    assert_int_equal(hyp_survey_opts_set(&o, "gradient-sigma", "2", &err), HYP_OK);
    assert_true(o.correct.gradient_sigma_pa_per_m == 0.002);   /* 2 hPa / 100 km = 200 Pa / 1e5 m */
    assert_int_equal(hyp_survey_opts_set(&o, "smooth", "-5", &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "smooth \"-5\": expected a number from 0 to 3600");
    assert_int_equal(hyp_survey_opts_set(&o, "max-gap", "0x20", &err), HYP_ERR_USAGE);
    assert_int_equal(hyp_survey_opts_set(&o, "max-gap", "inf", &err), HYP_ERR_USAGE);
    assert_int_equal(hyp_survey_opts_set(&o, "method", "field", &err), HYP_OK);
    assert_int_equal(o.correct.method, HYP_METHOD_FIELD);
    assert_int_equal(hyp_survey_opts_set(&o, "no-such-thing", "1", &err), HYP_ERR_USAGE);
    hyp_base_spec b;
    hyp_base_spec_init(&b, "x.csv", 100);
    assert_int_equal(hyp_base_spec_set(&b, "base-at", "95,3", &err), HYP_ERR_USAGE);
    assert_string_equal(err.message, "base-at latitude \"95\": expected a number from -90 to 90");
}

int main(void)
{
    xmlInitParser();
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_hard_link_to_input_refused),
        cmocka_unit_test(test_hostile_name_written_safely),
        cmocka_unit_test(test_stale_staging_removed),
        cmocka_unit_test(test_output_set_all_or_nothing),
        cmocka_unit_test(test_settings),
    };
    return cmocka_run_group_tests(tests, setup, NULL);
}
