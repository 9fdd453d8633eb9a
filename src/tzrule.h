/* tzrule.h - POSIX TZ rule strings, as in the footer of TZif files: parsed
 * into a hyp_tz_rule and evaluated at a UTC instant. Private to the library. */
#ifndef HYP_TZRULE_H
#define HYP_TZRULE_H

#include "hypsolev/timeparse.h"

/* Parses the whole NUL-terminated TZ string at *pp (POSIX.1-2017 section
 * 8.3, TZ: std offset [dst [offset] [,start[/time],end[/time]]]). v3
 * non-zero allows the RFC 8536 section 3.3.1 extension of TZif version 3
 * and later (rule times signed, hours -167..167). Returns NULL on success,
 * else a message saying what was expected, with *pp left at the offending
 * character. A daylight-saving name without a rule is refused: POSIX
 * leaves its dates to each implementation. */
const char *hyp__tz_rule_parse(hyp_tz_rule *r, const char **pp, int v3);

/* UTC offset (s east) the rule gives at utc_s (s since the epoch). Pure:
 * no allocation, any utc_s. */
int32_t hyp__tz_rule_offset(const hyp_tz_rule *r, int64_t utc_s);

/* The rule's changes in (after_s, upto_s], ascending: at most cap
 * instants to at_s and the offsets from them on to off_s; returns how
 * many. Changes that leave the offset as it was (DST all year) are listed
 * too; of two at one instant the one that wins comes last. */
size_t hyp__tz_rule_changes(const hyp_tz_rule *r, int64_t after_s, int64_t upto_s, int64_t *at_s,
                            int32_t *off_s, size_t cap);

#endif
