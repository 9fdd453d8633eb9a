/* export.h - HYP_API marks the library's public functions: the only
 * symbols the shared library exports (everything else is built with
 * hidden visibility). */
#ifndef HYPSOLEV_EXPORT_H
#define HYPSOLEV_EXPORT_H

#if defined(__GNUC__) || defined(__clang__)
#define HYP_API __attribute__((visibility("default")))
#else
#define HYP_API
#endif

#endif
