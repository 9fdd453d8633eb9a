/* units.c - unit names, conversion to SI and inference from magnitude. */
#include "hypsolev/units.h"

#include <stdio.h>
#include <string.h>
#include <strings.h>

struct unit_name { hyp_quantity q; hyp_unit u; const char *name; };

static const struct unit_name names[] = {
    {HYP_Q_PRESSURE, HYP_UNIT_PA, "Pa"},
    {HYP_Q_PRESSURE, HYP_UNIT_HPA, "hPa"},
    {HYP_Q_PRESSURE, HYP_UNIT_MBAR, "mbar"},
    {HYP_Q_PRESSURE, HYP_UNIT_MBAR, "mb"},
    {HYP_Q_PRESSURE, HYP_UNIT_MBAR, "millibar"},
    {HYP_Q_PRESSURE, HYP_UNIT_MBAR, "millibars"},
    {HYP_Q_PRESSURE, HYP_UNIT_HPA, "hectopascal"},
    {HYP_Q_PRESSURE, HYP_UNIT_HPA, "hectopascals"},
    {HYP_Q_PRESSURE, HYP_UNIT_KPA, "kPa"},
    {HYP_Q_PRESSURE, HYP_UNIT_INHG, "inHg"},
    {HYP_Q_PRESSURE, HYP_UNIT_MMHG, "mmHg"},
    {HYP_Q_PRESSURE, HYP_UNIT_MMHG, "Torr"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGC, "degC"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGC, "C"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGC, "\xC2\xB0" "C"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGC, "Celsius"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_K, "K"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_K, "Kelvin"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGF, "degF"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGF, "F"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGF, "\xC2\xB0" "F"},
    {HYP_Q_TEMPERATURE, HYP_UNIT_DEGF, "Fahrenheit"},
    {HYP_Q_HUMIDITY, HYP_UNIT_PERCENT, "%"},
    {HYP_Q_HUMIDITY, HYP_UNIT_PERCENT, "pct"},
    {HYP_Q_HUMIDITY, HYP_UNIT_PERCENT, "percent"},
    {HYP_Q_HUMIDITY, HYP_UNIT_PERCENT, "%RH"},
};

hyp_unit hyp_unit_parse(hyp_quantity q, const char *name)
{
    if (!name)
        return HYP_UNIT_NONE;
    /* users write " mb " or "MBAR": blanks around the name and case are
     * not part of it */
    while (*name == ' ' || *name == '\t')
        name++;
    size_t len = strlen(name);
    while (len && (name[len - 1] == ' ' || name[len - 1] == '\t'))
        len--;
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++)
        if (names[i].q == q && strlen(names[i].name) == len && strncasecmp(names[i].name, name, len) == 0)
            return names[i].u;
    return HYP_UNIT_NONE;
}

const char *hyp_unit_name(hyp_unit u)
{
    switch (u) {
    case HYP_UNIT_NONE: return "(none)";
    case HYP_UNIT_PA: return "Pa";
    case HYP_UNIT_HPA: return "hPa";
    case HYP_UNIT_MBAR: return "mbar";
    case HYP_UNIT_KPA: return "kPa";
    case HYP_UNIT_INHG: return "inHg";
    case HYP_UNIT_MMHG: return "mmHg";
    case HYP_UNIT_DEGC: return "degC";
    case HYP_UNIT_K: return "K";
    case HYP_UNIT_DEGF: return "degF";
    case HYP_UNIT_PERCENT: return "%";
    }
    return "?";
}

const char *hyp_unit_choices(hyp_quantity q)
{
    switch (q) {
    case HYP_Q_PRESSURE: return "Pa, hPa, mbar (mb, millibar), kPa, inHg, mmHg";
    case HYP_Q_TEMPERATURE: return "degC, K, degF";
    case HYP_Q_HUMIDITY: return "%";
    }
    return "";
}

double hyp_unit_to_si(hyp_unit u, double v)
{
    switch (u) {
    case HYP_UNIT_PA: return v;
    case HYP_UNIT_HPA:
    case HYP_UNIT_MBAR: return v * 100.0;
    case HYP_UNIT_KPA: return v * 1000.0;
    case HYP_UNIT_INHG: return v * 3386.389;        /* NIST SP 811 B.8 */
    case HYP_UNIT_MMHG: return v * 133.322387415;   /* NIST SP 811 B.8 */
    case HYP_UNIT_DEGC: return v + 273.15;
    case HYP_UNIT_K: return v;
    case HYP_UNIT_DEGF: return (v - 32.0) * 5.0 / 9.0 + 273.15;
    case HYP_UNIT_PERCENT: return v;
    case HYP_UNIT_NONE: break;
    }
    return v;
}

/* Plausible field ranges in SI: 300-1100 hPa and -60..+60 degC, the range
 * checks the readers apply anyway. */
#define P_MIN_PA 30000.0
#define P_MAX_PA 110000.0
#define T_MIN_K 213.15
#define T_MAX_K 333.15

hyp_unit hyp_unit_infer(hyp_quantity q, double vmin, double vmax,
                        char *candidates, size_t n)
{
    static const hyp_unit pu[] = {HYP_UNIT_PA, HYP_UNIT_HPA, HYP_UNIT_KPA,
                                  HYP_UNIT_INHG, HYP_UNIT_MMHG};
    static const hyp_unit tu[] = {HYP_UNIT_DEGC, HYP_UNIT_K, HYP_UNIT_DEGF};
    const hyp_unit *list;
    size_t nl;
    double lo, hi;
    if (q == HYP_Q_PRESSURE) {
        list = pu; nl = 5; lo = P_MIN_PA; hi = P_MAX_PA;
    } else if (q == HYP_Q_TEMPERATURE) {
        list = tu; nl = 3; lo = T_MIN_K; hi = T_MAX_K;
    } else {
        if (candidates && n)
            snprintf(candidates, n, "%%");
        return HYP_UNIT_PERCENT;
    }
    hyp_unit found = HYP_UNIT_NONE;
    int nfound = 0;
    if (candidates && n)
        candidates[0] = '\0';
    for (size_t i = 0; i < nl; i++) {
        double a = hyp_unit_to_si(list[i], vmin), b = hyp_unit_to_si(list[i], vmax);
        if (a >= lo && b <= hi) {
            found = list[i];
            nfound++;
            if (candidates && n) {
                size_t len = strlen(candidates);
                snprintf(candidates + len, n - len, "%s%s", len ? " or " : "",
                         hyp_unit_name(list[i]));
            }
        }
    }
    return nfound == 1 ? found : HYP_UNIT_NONE;
}
