/* units.h - unit names for pressure, temperature and humidity, conversion to
 * SI, and inference of a unit from the magnitude of a column of values. */
#ifndef HYPSOLEV_UNITS_H
#define HYPSOLEV_UNITS_H

#include "hypsolev/export.h"

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum hyp_quantity { HYP_Q_PRESSURE, HYP_Q_TEMPERATURE, HYP_Q_HUMIDITY } hyp_quantity;

typedef enum hyp_unit {
    HYP_UNIT_NONE = 0,   /* not given */
    HYP_UNIT_PA, HYP_UNIT_HPA, HYP_UNIT_MBAR, HYP_UNIT_KPA, HYP_UNIT_INHG,
    HYP_UNIT_MMHG,
    HYP_UNIT_DEGC, HYP_UNIT_K, HYP_UNIT_DEGF,
    HYP_UNIT_PERCENT
} hyp_unit;

/* Parses a unit name (case-insensitive; "hPa", "mbar", "mb", "Pa", "kPa",
 * "inHg", "mmHg", "degC", "C", "°C", "K", "degF", "F", "°F", "%") for the
 * quantity q. Returns HYP_UNIT_NONE when the name is unknown for q. */
HYP_API hyp_unit hyp_unit_parse(hyp_quantity q, const char *name);
/* The canonical spelling of a unit ("hPa", "degC", ...). */
HYP_API const char *hyp_unit_name(hyp_unit u);
/* A comma-separated list of the names accepted for q, for messages. */
HYP_API const char *hyp_unit_choices(hyp_quantity q);
/* Converts a value to SI: Pa, K, or % (humidity stays in %).
 * Pressure factors: 1 inHg = 3386.389 Pa, 1 mmHg = 133.322387415 Pa
 * (NIST SP 811, 2008, Appendix B.8, conventional mercury units). */
HYP_API double hyp_unit_to_si(hyp_unit u, double v);

/* Infers the unit of a column from its values' range [vmin, vmax]: the unit
 * for which every value is physically plausible (pressure 300-1100 hPa,
 * temperature -60..+60 degC), if exactly one is (hPa and mbar count as one).
 * Returns HYP_UNIT_NONE when none or several fit; then `candidates` (if not
 * NULL, size n) lists the ones that fit. */
HYP_API hyp_unit hyp_unit_infer(hyp_quantity q, double vmin, double vmax,
                        char *candidates, size_t n);

#ifdef __cplusplus
}
#endif
#endif
