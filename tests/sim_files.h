/* sim_files.h - reading what the simulator writes beside a survey, for the
 * tests that score runs against it: truth.csv (time, lat, lon, height_m,
 * pressure_pa per rover point) and scenario.txt (key value lines). Include
 * after cmocka.h. */
#ifndef HYP_TESTS_SIM_FILES_H
#define HYP_TESTS_SIM_FILES_H

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "hypsolev/timeparse.h"

typedef struct truth { size_t n; double *t, *h; } truth;

/* The rover points' times and true heights of a truth.csv. */
static inline void read_truth(const char *path, truth *tr)
{
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    char line[512];
    size_t cap = 1024;
    tr->n = 0;
    tr->t = malloc(cap * sizeof(double));
    tr->h = malloc(cap * sizeof(double));
    assert_non_null(fgets(line, sizeof line, f));   /* header */
    while (fgets(line, sizeof line, f)) {
        char *c1 = strchr(line, ','), *c2 = c1 ? strchr(c1 + 1, ',') : NULL, *c3 = c2 ? strchr(c2 + 1, ',') : NULL;
        assert_non_null(c3);
        *c1 = '\0';
        if (tr->n == cap) {
            cap *= 2;
            tr->t = realloc(tr->t, cap * sizeof(double));
            tr->h = realloc(tr->h, cap * sizeof(double));
        }
        assert_int_equal(hyp_time_parse(line, NULL, &tr->t[tr->n]), HYP_TIME_OK);
        tr->h[tr->n++] = strtod(c3 + 1, NULL);
    }
    fclose(f);
}

/* A value of DIR/scenario.txt (the test fails when it is missing). */
static inline double scenario_value(const char *dir, const char *key)
{
    char path[4200], k[64], line[256];
    snprintf(path, sizeof path, "%s/scenario.txt", dir);
    FILE *f = fopen(path, "r");
    assert_non_null(f);
    double v, found = NAN;
    while (fgets(line, sizeof line, f))
        if (sscanf(line, "%63s %lf", k, &v) == 2 && strcmp(k, key) == 0)
            found = v;
    fclose(f);
    assert_false(isnan(found));
    return found;
}

#endif
