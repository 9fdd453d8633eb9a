/* replay_main.c - runs a fuzz harness over files (the seed corpus and the
 * kept crashers) without libFuzzer, so that every ordinary build checks
 * them: ctest runs fuzz_replay_* over tests/fuzz/corpus and regress. */
#include <dirent.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static int run_file(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return 0;
    uint8_t *buf = malloc(1 << 20);
    size_t n = buf ? fread(buf, 1, 1 << 20, f) : 0;
    fclose(f);
    if (buf)
        LLVMFuzzerTestOneInput(buf, n);
    free(buf);
    return 1;
}

int main(int argc, char **argv)
{
    int count = 0;
    for (int i = 1; i < argc; i++) {
        DIR *d = opendir(argv[i]);
        if (!d) {
            count += run_file(argv[i]);
            continue;
        }
        struct dirent *e;
        while ((e = readdir(d))) {
            if (e->d_name[0] == '.')
                continue;
            char p[4096];
            snprintf(p, sizeof p, "%s/%s", argv[i], e->d_name);
            count += run_file(p);
        }
        closedir(d);
    }
    printf("replayed %d inputs\n", count);
    return 0;
}
