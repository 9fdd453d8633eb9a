/* fuzz_benchmarks.c - libFuzzer harness for benchmark and tie lists and the
 * base folder's index. */
#include "fuzz_common.h"
#include "hypsolev/hypsolev.h"

#include <stdlib.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char path[64];
    int fd = fuzz_file(data, size, path, sizeof path);
    if (fd < 0)
        return 0;
    hyp_benchmarks b;
    hyp_benchmarks_init(&b);
    hyp_error err;
    hyp_benchmarks_read(path, 0.01, &b, NULL, &err);
    hyp_tie_spec *t = NULL;
    size_t n = 0;
    hyp_zone z;
    hyp_zone_init(&z);
    hyp_ties_read(path, &z, b.count ? &b : NULL, &t, &n, &err);
    free(t);
    hyp_base_entry *e = NULL;   /* the base folder's index (a sidecar) */
    size_t ne = 0;
    hyp_base_index_read(path, &e, &ne, &err);
    free(e);
    hyp_benchmarks_free(&b);
    close(fd);
    return 0;
}
