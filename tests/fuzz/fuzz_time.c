/* fuzz_time.c - libFuzzer harness for time stamps, zones and units. */
#include "fuzz_common.h"
#include "hypsolev/hypsolev.h"

#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char buf[256];
    size_t n = size < sizeof buf - 1 ? size : sizeof buf - 1;
    memcpy(buf, data, n);
    buf[n] = '\0';
    double t;
    hyp_zone z;
    hyp_zone_init(&z);
    hyp_error err;
    hyp_time_parse(buf, NULL, &t);
    /* the first line as a zone, the rest as a stamp in it */
    char *nl = strchr(buf, '\n');
    if (nl) {
        *nl = '\0';
        if (hyp_zone_parse(&z, buf, NULL, &err) == HYP_OK) {
            if (hyp_time_parse(nl + 1, &z, &t) == HYP_TIME_OK) {
                char out[40];
                hyp_time_format(t, out, sizeof out);
            }
        }
    }
    hyp_zone_free(&z);
    for (int q = 0; q < 3; q++)
        hyp_unit_parse((hyp_quantity)q, buf);
    return 0;
}
