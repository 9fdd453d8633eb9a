/* error.h - status codes, the caller-owned error record and the list of
 * warnings and notes that every library entry point can fill. */
#ifndef HYPSOLEV_ERROR_H
#define HYPSOLEV_ERROR_H

#include "hypsolev/export.h"

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum hyp_status {
    HYP_OK = 0,
    HYP_ERR_IO,          /* a file could not be opened, read or written */
    HYP_ERR_FORMAT,      /* the file is not of the expected format */
    HYP_ERR_VALUE,       /* a field holds a value that cannot be used */
    HYP_ERR_UNIT,        /* a unit is unknown or cannot be inferred */
    HYP_ERR_NODATA,      /* nothing usable was found */
    HYP_ERR_USAGE,       /* the caller asked for something inconsistent */
    HYP_ERR_NOMEM,       /* an allocation failed or a size cap was hit */
    HYP_ERR_INTERNAL     /* a consistency check of the library failed */
} hyp_status;

/* The fatal error of a call: one message with its context
 * ("base.csv:214: pressure \"1O13.2\" is not a number"). */
typedef struct hyp_error {
    hyp_status status;
    char message[1024];
} hyp_error;

typedef enum hyp_level { HYP_NOTE = 0, HYP_WARNING = 1 } hyp_level;

/* A message about an input: its level, a short code saying what kind of
 * message it is (stable, for filtering: "sample", "unit", "base-quality",
 * "calibration", "fit", "gnss", "clock", "method", "output", "input";
 * "" when unclassified), the file and line (or record) it is about (NULL
 * and 0 when none), and its text, which does not repeat the file and line:
 * hyp_msgs_write prints "file:line: text". */
typedef struct hyp_msg {
    hyp_level level;
    const char *code;   /* a static string, never NULL */
    char *file;         /* NULL: not about one file */
    unsigned line;      /* 0: not about one line */
    char *text;
} hyp_msg;

/* Warnings and notes collected during a call, in order. Capped: past
 * `cap_count` messages only `dropped` is counted, so a file with a million
 * bad rows cannot exhaust memory. */
typedef struct hyp_msgs {
    hyp_msg *items;
    size_t count;
    size_t alloc;
    size_t cap_count;   /* 0 means the default (200) */
    size_t dropped;
} hyp_msgs;

HYP_API void hyp_error_clear(hyp_error *err);
/* Sets err (if not NULL) and returns status, printf-style. */
HYP_API hyp_status hyp_error_set(hyp_error *err, hyp_status status, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

HYP_API void hyp_msgs_init(hyp_msgs *m);
HYP_API void hyp_msgs_free(hyp_msgs *m);
/* Adds a message; msgs may be NULL (then nothing is kept). Out of memory is
 * counted in `dropped`, never fatal. */
HYP_API void hyp_msgs_add(hyp_msgs *m, hyp_level level, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

/* The same, with the message's code, file and line (file may be NULL,
 * line 0). */
HYP_API void hyp_msgs_add_at(hyp_msgs *m, hyp_level level, const char *code, const char *file, unsigned line,
                     const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 6, 7)))
#endif
    ;

HYP_API const char *hyp_status_name(hyp_status s);

#ifdef __cplusplus
}
#endif
#endif
