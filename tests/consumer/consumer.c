/* consumer.c - a client of the installed library: only the public header,
 * linked through pkg-config or find_package (tests/consumer/run.sh). Corrects
 * the demo survey (surveys/quenwick-tor: one base at 812.4 m, 46.80 N
 * 9.90 E, as its README gives) and writes the corrected GPX.
 * usage: consumer SURVEY_DIR OUT.gpx; prints "corrected N of M points". */
#include <hypsolev/hypsolev.h>

#include <stdio.h>

static int fail(const char *what, const hyp_error *err)
{
    fprintf(stderr, "consumer: %s: %s\n", what, err->message);
    return 1;
}

int main(int argc, char **argv)
{
    if (argc != 3) {
        fputs("usage: consumer SURVEY_DIR OUT.gpx\n", stderr);
        return 2;
    }
    char rover[4096], base[4096];
    snprintf(rover, sizeof rover, "%s/rover.gpx", argv[1]);
    snprintf(base, sizeof base, "%s/base.csv", argv[1]);
    hyp_gpx_doc doc;
    hyp_series b;
    hyp_correct_result res;
    hyp_msgs msgs;
    hyp_error err;
    hyp_gpx_doc_init(&doc);
    hyp_series_init(&b);
    hyp_correct_result_init(&res);
    hyp_msgs_init(&msgs);
    int rc = 1;
    if (hyp_gpx_read(rover, NULL, &doc, &msgs, &err)) {
        rc = fail(rover, &err);
        goto out;
    }
    if (hyp_csv_read(base, NULL, &b, NULL, &msgs, &err)) {
        rc = fail(base, &err);
        goto out;
    }
    hyp_base hb;
    hyp_base_init(&hb, &b, base, 812.4);
    hb.lat_deg = 46.80;
    hb.lon_deg = 9.90;
    hyp_correct_opts o;
    hyp_correct_opts_init(&o);
    if (hyp_correct(&doc.pts, &hb, 1, &o, &res, &msgs, &err)) {
        rc = fail("correct", &err);
        goto out;
    }
    if (hyp_gpx_write_spliced(rover, &doc, &res, NULL, argv[2], &err)) {
        rc = fail(argv[2], &err);
        goto out;
    }
    FILE *f = fopen(argv[2], "rb");
    if (!f) {
        fprintf(stderr, "consumer: %s: not written\n", argv[2]);
        goto out;
    }
    fclose(f);
    printf("corrected %zu of %zu points\n", res.n_ok, res.count);
    rc = res.n_ok > 0 ? 0 : 1;
out:
    hyp_msgs_free(&msgs);
    hyp_correct_result_free(&res);
    hyp_series_free(&b);
    hyp_gpx_doc_free(&doc);
    return rc;
}
