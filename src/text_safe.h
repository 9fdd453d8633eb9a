/* text_safe.h - UTF-8 checking and XML escaping of text that came from
 * inputs (file names, track names, labels) (private). */
#ifndef HYP_TEXT_SAFE_H
#define HYP_TEXT_SAFE_H

#include <stddef.h>
#include "buf.h"

/* One character of well-formed UTF-8 at s: its length with *cp set, or
 * the length of the ill-formed prefix (at least 1) with *cp = -1. */
size_t hyp__utf8_next(const unsigned char *s, long *cp);
/* Appends s as XML character data or attribute value: & < > " ' as
 * entities, tab and line ends as spaces, invalid UTF-8 and characters XML
 * 1.0 forbids (and C1, bidirectional controls) as U+FFFD. -1 when b
 * refuses to grow. */
int hyp__xml_escape(hyp__buf *b, const char *s);

#endif
