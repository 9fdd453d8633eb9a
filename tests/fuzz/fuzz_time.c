/* fuzz_time.c - libFuzzer harness for time stamps, zones, export time
 * formats ("FORMAT<tab>TEXT") and units. */
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
    /* export formats: "FORMAT<tab>TEXT", read in a fixed zone; numeric dates */
    char *tab = strchr(buf, '\t');
    hyp_zone fixed;
    hyp_zone_init(&fixed);
    fixed.kind = 1;
    fixed.offset_s = 3600;
    int a, b;
    hyp_time_numeric_date(buf, &a, &b);
    hyp_time_parse_numeric(buf, 1, &fixed, &t, NULL);
    hyp_time_parse_numeric(buf, 0, NULL, &t, NULL);
    if (tab) {
        char why[160];
        *tab = '\0';
        hyp_time_format_check(buf, why, sizeof why);
        hyp_time_local how;
        hyp_time_parse_format(tab + 1, buf, &fixed, &t, &how);
    }
    for (int q = 0; q < 3; q++)
        hyp_unit_parse((hyp_quantity)q, buf);
    return 0;
}
