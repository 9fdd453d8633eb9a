/* base_offset.h - the upper base's instrument offset relative to the
 * lower when two bases were never compared side by side, estimated from
 * what the survey observes (private). */
#ifndef HYP_BASE_OFFSET_H
#define HYP_BASE_OFFSET_H

#include "correct_int.h"

/* Two-base correction whose bases were never compared: estimates the
 * upper base's offset from the calibrations found (co-locations with each
 * base, ties at different heights), the track's GNSS heights (lower
 * grade), both bases' thermometers in calm hours (lower grade) and the
 * prior of an uncalibrated barometer; removes it from the upper base's
 * view, records it (base_offset_pa, base_offset_sigma_pa,
 * base_offset_how) and recomputes the calibrations' statistics. Does
 * nothing for other corrections. -1 when out of memory. */
int hyp__estimate_base_offset(hyp__work *w);

#endif
