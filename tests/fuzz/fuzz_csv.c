/* fuzz_csv.c - libFuzzer harness for the CSV log reader, then a correction
 * against itself as base and the log checks (exercises the core and inspect
 * on whatever the reader lets through). */
#include "fuzz_common.h"
#include "hypsolev/hypsolev.h"

#include <math.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[64];
    int fd = fuzz_file(data, size, path, sizeof path);
    if (fd < 0)
        return 0;
    hyp_series s;
    hyp_series_init(&s);
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    hyp_read_opts o;
    hyp_read_opts_init(&o);
    o.temperature_unit = HYP_UNIT_DEGC;
    if (hyp_csv_read(path, &o, &s, NULL, &m, &err) == HYP_OK && s.count < 20000) {
        hyp_base b = {.log = &s, .name = "fuzz", .height_m = 500.0, .lat_deg = 46.8, .lon_deg = 9.9};
        hyp_correct_result r;
        hyp_correct_result_init(&r);
        hyp_correct(&s, &b, 1, NULL, &r, &m, &err);
        hyp_correct_result_free(&r);
        hyp_inspection in;
        if (hyp_inspect(&s, NULL, &in, &err) == HYP_OK)
            hyp_inspection_free(&in);
    }
    hyp_series_free(&s);
    hyp_msgs_free(&m);
    close(fd);
    return 0;
}
