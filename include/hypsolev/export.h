/* export.h - HYP_API, the mark of a declaration that libhypsolev.so
 * exports. The library can be compiled with -fvisibility=hidden (CMake
 * option HYP_HIDDEN_VISIBILITY): then only what is marked HYP_API is in the
 * shared library's dynamic symbol table, and the internal hyp__ functions
 * and the static helpers stay private.
 *
 * Put it before the return type of every public function declaration,
 *     HYP_API hyp_status hyp_gpx_read(const char *path, ...);
 * and of every public extern object. Types, enums and macros need nothing.
 *
 * Under GCC and clang it is __attribute__((visibility("default"))) (GCC
 * manual, "Common Function Attributes", visibility). It is empty when
 * HYP_STATIC is defined (a client of the static archive: the CMake target
 * hypsolev::hypsolev_static defines it for its clients) and with other
 * compilers. The library's own objects are compiled without HYP_STATIC, as
 * they go into both the shared library and the static archive. */
#ifndef HYPSOLEV_EXPORT_H
#define HYPSOLEV_EXPORT_H

#if defined(HYP_STATIC)
#define HYP_API
#elif defined(__GNUC__) && __GNUC__ >= 4   /* clang defines __GNUC__ too */
#define HYP_API __attribute__((visibility("default")))
#else
#define HYP_API
#endif

#endif
