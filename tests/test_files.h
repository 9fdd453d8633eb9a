/* test_files.h - reading a whole file in a test. Include after cmocka.h. */
#ifndef HYP_TESTS_TEST_FILES_H
#define HYP_TESTS_TEST_FILES_H

#include <stdio.h>
#include <stdlib.h>

/* The bytes of path, NUL-terminated (free them); their count in *n. */
static inline char *slurp(const char *path, size_t *n)
{
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    fseek(f, 0, SEEK_END);
    long len = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *b = malloc((size_t)len + 1);
    assert_non_null(b);
    assert_int_equal(fread(b, 1, (size_t)len, f), (size_t)len);
    b[len] = '\0';
    fclose(f);
    *n = (size_t)len;
    return b;
}

#endif
