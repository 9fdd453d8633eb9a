/* consumer.c - a client of the installed library: only the public header,
 * linked through pkg-config or find_package (tests/consumer/run.sh). Runs
 * the demo survey (surveys/quenwick-tor: one base at 812.4 m, 46.80 N
 * 9.90 E, as its README gives) through the survey API and writes the
 * corrected GPX and the report.
 * usage: consumer SURVEY_DIR OUT.gpx; prints "corrected N of M points". */
#include <hypsolev/hypsolev.h>

#include <stdio.h>

int main(int argc, char **argv)
{
    if (argc != 3) {
        fputs("usage: consumer SURVEY_DIR OUT.gpx\n", stderr);
        return 2;
    }
    char rover[4096], base[4096], report[4200];
    snprintf(rover, sizeof rover, "%s/rover.gpx", argv[1]);
    snprintf(base, sizeof base, "%s/base.csv", argv[1]);
    snprintf(report, sizeof report, "%s.report.txt", argv[2]);
    hyp_msgs msgs;
    hyp_msgs_init(&msgs);
    hyp_error err;
    hyp_survey *sv = NULL;
    hyp_rover_run *run = NULL;
    hyp_base_spec b;
    hyp_base_spec_init(&b, base, 812.4);
    b.lat_deg = 46.80;
    b.lon_deg = 9.90;
    hyp_outputs out = {.gpx = argv[2], .report = report};
    int rc = 1;
    if (hyp_survey_new(&sv, NULL, &msgs, &err) || hyp_survey_add_base(sv, &b, &msgs, &err) ||
        hyp_survey_run(sv, rover, &out, 0, &run, &err)) {
        fprintf(stderr, "consumer: %s\n", err.message);
        goto done;
    }
    if (run->status) {
        fprintf(stderr, "consumer: %s: %s\n", rover, run->error.message);
        goto done;
    }
    FILE *f = fopen(argv[2], "rb");
    FILE *r = fopen(report, "rb");
    if (!f || !r)
        fprintf(stderr, "consumer: %s or %s not written\n", argv[2], report);
    else {
        printf("corrected %zu of %zu points\n", run->result.n_ok, run->result.count);
        rc = run->result.n_ok > 0 && run->n_written == 1 ? 0 : 1;
    }
    if (f)
        fclose(f);
    if (r)
        fclose(r);
done:
    hyp_rover_run_free(run);
    hyp_survey_free(sv);
    hyp_msgs_free(&msgs);
    return rc;
}
