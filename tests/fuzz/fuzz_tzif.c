/* fuzz_tzif.c - libFuzzer harness for TZif files (RFC 8536) and their
 * footer rules: the input read as a zone through hyp_zone_parse's zone
 * directory, then local times, far ones included, read in that zone.
 * Seeds: files of the tz database (public domain), Debian's tzdata. */
#include "fuzz_common.h"
#include "hypsolev/hypsolev.h"

#include <stdint.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[64], name[16];
    int fd = fuzz_file(data, size, path, sizeof path);
    if (fd < 0)
        return 0;
    snprintf(name, sizeof name, "%d", fd);   /* path is /proc/self/fd/NAME */
    hyp_zone z;
    hyp_error err;
    hyp_zone_init(&z);
    if (hyp_zone_parse(&z, name, "/proc/self/fd", &err) == HYP_OK) {
        static const char *const stamps[] = {"1900-01-01T00:00:00", "1970-01-01T00:00:00", "2026-03-29T02:30:00",
                                             "2040-07-15T12:00:00", "2200-12-31T23:59:59"};
        double t;
        for (size_t i = 0; i < sizeof stamps / sizeof *stamps; i++)
            hyp_time_parse(stamps[i], &z, &t);
        static const int64_t locals_s[] = {INT64_MIN, -(INT64_C(1) << 40), -1, 0, 2225966400, INT64_C(1) << 40,
                                           INT64_MAX};
        for (size_t i = 0; i < sizeof locals_s / sizeof *locals_s; i++)
            hyp_zone_offset_for_local(&z, locals_s[i]);
    }
    hyp_zone_free(&z);
    close(fd);
    return 0;
}
