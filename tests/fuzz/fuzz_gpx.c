/* fuzz_gpx.c - libFuzzer harness for the GPX reader and the splice writer. */
#include "fuzz_common.h"
#include "hypsolev/hypsolev.h"

#include <math.h>
#include <stdlib.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[64];
    int fd = fuzz_file(data, size, path, sizeof path);
    if (fd < 0)
        return 0;
    hyp_gpx_doc d;
    hyp_gpx_doc_init(&d);
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    hyp_read_opts o;
    hyp_read_opts_init(&o);
    o.pressure_unit = HYP_UNIT_HPA;
    if (size % 2) {   /* half the inputs: values held in attributes */
        o.pressure_field = "pressure@value";
        o.temperature_field = "temperature@v";
    }
    if (hyp_gpx_read(path, &o, &d, &m, &err) == HYP_OK) {
        /* splice a made-up result back: every offset must land */
        hyp_correct_result r;
        hyp_correct_result_init(&r);
        size_t n = d.pts.count;
        r.count = n;
        r.height_m = calloc(n, sizeof(double));
        r.sigma_m = calloc(n, sizeof *r.sigma_m);
        r.status = calloc(n, 1);
        for (size_t i = 0; i < n && r.status; i++)
            r.status[i] = d.pts.flag[i] ? HYP_PT_REFUSED : HYP_PT_OK;
        char out[64];
        snprintf(out, sizeof out, "/tmp/fuzz-gpx-out-%d.gpx", (int)getpid());
        hyp_output_info info = {.vref = "test <ref> & more"};
        if (r.height_m && r.sigma_m && r.status &&
            hyp_gpx_write_spliced(path, &d, &r, &info, out, &err) == HYP_ERR_INTERNAL)
            abort();   /* a layout that does not match the file is a reader bug */
        remove(out);
        hyp_correct_result_free(&r);
    }
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
    /* the same bytes as a barometric-altitude track (--baro-altitude) */
    hyp_gpx_doc_init(&d);
    hyp_msgs_init(&m);
    o.baro_altitude_field = size & 1 ? "ele" : "pressure";
    hyp_gpx_read(path, &o, &d, &m, &err);
    hyp_gpx_doc_free(&d);
    hyp_msgs_free(&m);
    close(fd);
    return 0;
}
