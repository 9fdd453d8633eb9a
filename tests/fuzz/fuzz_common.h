/* fuzz_common.h - libFuzzer helpers: the readers take paths, so each input
 * goes to an anonymous in-memory file reached through /proc/self/fd. */
#ifndef HYP_FUZZ_COMMON_H
#define HYP_FUZZ_COMMON_H

#ifndef _GNU_SOURCE
#define _GNU_SOURCE
#endif
#include <stdint.h>
#include <stdio.h>
#include <sys/mman.h>
#include <unistd.h>

static int fuzz_file(const uint8_t *data, size_t size, char *path, size_t n)
{
    int fd = memfd_create("fuzz", 0);
    if (fd < 0)
        return -1;
    if (size && write(fd, data, size) != (ssize_t)size) {
        close(fd);
        return -1;
    }
    snprintf(path, n, "/proc/self/fd/%d", fd);
    return fd;
}

#endif
