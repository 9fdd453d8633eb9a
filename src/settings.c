/* settings.c - the catalogue of a survey's settings: every name the
 * program's options, hyp_survey_opts_set, hyp_base_spec_set,
 * hyp_rover_spec_set, hyp_network_opts_set and hyp_survey_setup_set know, with its scope, value
 * and help; and the help written from it. The *_set functions refuse a
 * name that is not here in their scope, so this list is the one source. */
#include "hypsolev/settings.h"

#include <string.h>

#define SV HYP_SCOPE_SURVEY
#define BS HYP_SCOPE_BASE
#define RV HYP_SCOPE_ROVER
#define SU HYP_SCOPE_SETUP
#define NW HYP_SCOPE_NETWORK
/* A setting with a value, and a flag. */
#define V(name, scope, meta, help, example) {name, scope, 1, meta, help, G, example}
#define F(name, scope, help) {name, scope, 0, NULL, help, G, NULL}

static const hyp_setting_info catalogue[] = {
#define G "base station (these apply to the --base before them)"
    V("base", SU, "FILE", "base log (CSV or GPX) with time and pressure", "base.csv"),
    V("base-height", BS, "M", "height of the base sensor, m (required)", "812.4"),
    V("base-at", BS, "LAT,LON", "base position, degrees; enables automatic co-location", "46.80,9.90"),
    V("base-clock-offset", BS, "S", "seconds the base logger's clock is ahead of true time;\n"
      "auto: estimated from co-locations (pressure changes)", "12"),
    V("base-time-zone", BS, "Z", "zone of base times that carry none (+HH:MM, UTC, Area/City)", "Europe/Vienna"),
    V("base-time-format", BS, "FMT", "how the base CSV writes its times, e.g. \"%d.%m.%Y %H:%M:%S\"\n"
      "(as --time-format)", "%d.%m.%Y %H:%M:%S"),
    V("base-offset", BS, "PA", "this base reads PA high (instrument offset), with", "20"),
    V("base-offset-sigma", BS, "PA", "its 1-sigma", "5"),
    F("base-qnh", BS, "the log holds sea-level pressure (QNH) of a weather\nstation at --base-height"),
    V("base-pressure-unit", BS, "U", "how this base's log is read, where it differs from\n"
      "the rovers' (as --pressure-unit below)", "hPa"),
    V("base-temperature-unit", BS, "U", "(as --temperature-unit below)", "degC"),
    V("base-pressure-field", BS, "NAME", "(as --pressure-field below)", "baro"),
    V("base-temperature-field", BS, "NAME", "(as --temperature-field below)", "temp"),
    V("base-humidity-field", BS, "NAME", "(as --humidity-field below)", "rh"),
#undef G
#define G "several bases (repeat --base)"
    V("method", SV, "M", "auto (default), single, two-base or field", "two-base"),
    V("bases-colocated", SV, "START/END", "the base loggers stood side by side then",
      "2026-04-03T08:00:00Z/2026-04-03T08:30:00Z"),
    V("base-dir", SU, "DIR", "base logs listed in DIR/bases.csv (file, height, lat,\n"
      "lon, clock_offset, kind, time_format); each rover\ngets the logs that cover its time span", "bases"),
#undef G
#define G "rover-minus-base instrument offset"
    V("offset", SV, "PA", "offset in Pa (rover reads this much higher than base)", "35"),
    V("offset-sigma", SV, "PA", "its 1-sigma uncertainty, Pa (default 0)", "10"),
    V("colocate", SU, "START/END", "rover beside the base in this window (ISO 8601 times);\n"
      "repeatable; replaces automatic detection", "2026-04-03T08:00:00Z/2026-04-03T08:10:00Z"),
    F("no-auto-colocate", SV, "do not look for co-location from positions"),
    V("colocate-radius", SV, "M", "co-location radius, m (default 30)", "50"),
    V("colocate-min", SV, "S", "minimum co-location time, s (default 300)", "600"),
#undef G
#define G "benchmarks and ties"
    V("benchmarks", SV, "FILE", "CSV: name, lat, lon, height [m], optional sigma [m], note", "marks.csv"),
    V("benchmark-sigma", SV, "M", "sigma of benchmarks that give none (default 0.01 m)", "0.02"),
    V("ties", SV, "FILE", "CSV: name, start, end: the rover stood on benchmark name\n"
      "(or \"base\") over that window", "ties.csv"),
    V("tie-radius", SV, "M", "automatic ties: within M of a benchmark (default 30)", "20"),
    V("tie-min", SV, "S", "... and standing still at least S (default 60)\n"
      "GPX waypoints named like a benchmark are ties too", "120"),
#undef G
#define G "heights and positions"
    V("gnss-heights", SV, "REF", "what the track's own ele is: geoid (EGM96, default) or\n"
      "ellipsoidal; a point's <geoidheight> is used where given", "ellipsoidal"),
    V("known-heights", SV, "REF", "reference of --base-height and benchmarks (default geoid)", "geoid"),
    V("height-crs", SV, "REF", "reference of the heights written (default: as known)", "ellipsoidal"),
    V("crs", SV, "CRS", "add easting/northing: EPSG:n, a PROJ string, WKT, or utm", "utm"),
    F("no-gnss-anchor", SV, "with no co-location, tie or offset, do not level the\ntrack on its GNSS heights"),
#undef G
#define G "error budget"
    V("smooth", SV, "S", "centred moving average of rover pressure over S seconds", "30"),
    V("gradient-sigma", SV, "G", "horizontal pressure gradient, hPa per 100 km (default 1)", "2"),
    V("clock-sigma", SV, "S", "base clock uncertainty, s (default 2)", "5"),
#undef G
#define G "air column"
    V("column-temp", SV, "MODE", "base (base thermometer and lapse rate, default),\n"
      "rover (base and rover thermometers), both (their mean)", "both"),
    V("lapse-rate", SV, "K_PER_KM", "default -6.5 K/km (standard atmosphere)", "-5.5"),
    V("humidity", SV, "PCT", "humidity when no log has one (default 50 %)", "70"),
    V("column-temp-sigma", SV, "K", "base thermometer as a measure of the air, 1 sigma (default 0.5 K)", "1"),
    V("lapse-sigma", SV, "K_PER_KM", "spread of real lapse rates about --lapse-rate (default 1 K/km)", "2"),
    V("max-gap", SV, "S", "longest base gap bridged, s (default 180)", "300"),
#undef G
#define G "inputs (every log, unless a --base-* option above says otherwise for a base\n" \
          "or a --rover-* option below for a rover)"
    V("pressure-unit", SV, "U", "Pa, hPa, mbar, kPa, inHg, mmHg (when the file says none)", "hPa"),
    V("temperature-unit", SV, "U", "degC, K, degF", "K"),
    V("pressure-field", SV, "NAME", "element or column name of pressure (default pressure);\n"
      "GPX ELEMENT@ATTR: an attribute's value (baro@value)", "baro@value"),
    V("temperature-field", SV, "NAME", "(default temperature)", "temp"),
    V("humidity-field", SV, "NAME", "(default humidity)", "rh"),
    V("time-zone", SV, "Z", "zone of rover times that carry none", "UTC"),
    V("rover", SU, "FILE", "a rover read its own way: the options below apply to\n"
      "the --rover before them, in place of those above", "walk.gpx"),
    V("rover-pressure-unit", RV, "U", "(as --pressure-unit above)", "Pa"),
    V("rover-temperature-unit", RV, "U", "(as --temperature-unit above)", "degF"),
    V("rover-pressure-field", RV, "NAME", "(as --pressure-field above)", "baro"),
    V("rover-temperature-field", RV, "NAME", "(as --temperature-field above)", "tc"),
    V("rover-humidity-field", RV, "NAME", "(as --humidity-field above)", "rh"),
    V("rover-time-zone", RV, "Z", "(as --time-zone above)", "Europe/Vienna"),
    V("rover-clock-offset", RV, "S", "seconds this rover's logger clock is ahead of true time", "-30"),
    V("baro-altitude", SV, "FIELD", "rover GPX stores a barometric altitude (m) in ele or\n"
      "in the extension element FIELD, not a pressure", "ele"),
    V("time-format", SV, "FMT", "how rover CSVs write their times: %Y %y %m %b %d %H %I %p\n"
      "%M %S (a fraction may follow) %z %%, e.g.\n\"%m/%d/%Y %I:%M:%S %p\"; default ISO 8601, epoch seconds,\n"
      "or DD.MM.YYYY / MM/DD/YYYY where the dates tell which", "%m/%d/%Y %I:%M:%S %p"),
#undef G
#define G "inputs"
    V("stations", NW, "FILE", "CSV: name, lat, lon, optional height [m] and sigma [m];\n"
      "a station with a height is control", "stations.csv"),
    V("control-sigma", NW, "M", "sigma of control heights that give none (default 0.02 m)", "0.05"),
    V("occupations", NW, "FILE", "field book, CSV: station, rover (track file name without\n"
      "extension; optional with one rover), start, end", "book.csv"),
    V("occupation-radius", NW, "M", "occupations found in the tracks: within M of a station\n(default 15 m)", "20"),
    V("occupation-min", NW, "S", "... for at least S seconds (default 180 s)", "300"),
    F("no-find-occupations", NW, "only the field book and waypoints\n"
      "GPX waypoints named like a station are occupations too"),
    V("min-common", NW, "S", "rovers without a base (leapfrog): two occupations by\n"
      "different rovers at once for at least S seconds give\na height difference (default 120 s)", "60"),
    V("weather-walk", NW, "HPA", "one rover without a base (loop): the weather's change\n"
      "as a random walk of HPA hPa per sqrt(hour), 1 sigma\n(default 0.6 hPa)", "1"),
#undef G
};

const hyp_setting_info *hyp_settings(size_t *n)
{
    if (n)
        *n = sizeof catalogue / sizeof catalogue[0];
    return catalogue;
}

const hyp_setting_info *hyp_setting_find(const char *name)
{
    for (size_t k = 0; name && k < sizeof catalogue / sizeof catalogue[0]; k++)
        if (!strcmp(name, catalogue[k].name))
            return &catalogue[k];
    return NULL;
}

/* "  --name METAVAR" padded to column 27, then the help, its further
 * lines indented to the same column. */
static void write_entry(FILE *f, const hyp_setting_info *s)
{
    int w = fprintf(f, "  --%s%s%s", s->name, s->metavar ? " " : "", s->metavar ? s->metavar : "");
    fprintf(f, "%*s", w < 26 ? 27 - w : 2, "");
    for (const char *p = s->help; *p; p++) {
        fputc(*p, f);
        if (*p == '\n')
            fprintf(f, "%27s", "");
    }
    fputc('\n', f);
}

void hyp_settings_write_help(FILE *f, unsigned scopes)
{
    const char *group = NULL;
    for (size_t k = 0; k < sizeof catalogue / sizeof catalogue[0]; k++) {
        if (!(scopes & HYP_SCOPE_BIT(catalogue[k].scope)))
            continue;
        if (!group || strcmp(group, catalogue[k].group) != 0)
            fprintf(f, "%s%s:\n", group ? "\n" : "", catalogue[k].group);
        group = catalogue[k].group;
        write_entry(f, &catalogue[k]);
    }
}
