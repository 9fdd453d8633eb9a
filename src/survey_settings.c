/* survey_settings.c - a survey's options by name and text value, with
 * their ranges and units, so that every client (the program, a script
 * binding, a configuration file) sets them the same way and gets the same
 * message for a bad value. */
#include "hypsolev/survey.h"
#include "hypsolev/settings.h"
#include "hypsolev/network.h"

#include <errno.h>
#include <math.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* A number within [lo, hi]: decimal only (no hexadecimal, no inf/nan). */
static hyp_status number(const char *name, const char *text, double lo, double hi, double *v, hyp_error *err)
{
    char *end;
    errno = 0;
    double x = strtod(text, &end);
    if (!text[0] || *end || errno || strpbrk(text, "xX") || !isfinite(x) || x < lo || x > hi)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s \"%s\": expected a number from %g to %g", name, text, lo, hi);
    *v = x;
    return HYP_OK;
}

/* Numeric settings of the correction: name, range in the unit the user
 * gives, the factor to the library's unit, where it goes. */
typedef struct num_setting {
    const char *name;
    double lo, hi, scale;
    size_t at;   /* offset in hyp_correct_opts */
} num_setting;

#define C(f) offsetof(hyp_correct_opts, f)
static const num_setting nums[] = {
    {"offset", -5000, 5000, 1, C(offset_pa)},                     /* Pa */
    {"offset-sigma", 0, 5000, 1, C(offset_sigma_pa)},             /* Pa */
    {"colocate-radius", 0, 10000, 1, C(coloc_radius_m)},
    {"colocate-min", 10, 86400, 1, C(coloc_min_s)},
    {"max-gap", 1, 86400, 1, C(max_gap_s)},
    {"humidity", 0, 100, 1, C(default_rh_pct)},
    {"lapse-rate", -12, 12, 1e-3, C(lapse_k_per_m)},              /* K/km */
    {"tie-radius", 1, 10000, 1, C(tie_radius_m)},
    {"tie-min", 1, 86400, 1, C(tie_min_s)},
    {"smooth", 0, 3600, 1, C(smooth_s)},
    {"gradient-sigma", 0, 100, 1e-3, C(gradient_sigma_pa_per_m)}, /* hPa per 100 km */
    {"clock-sigma", 0, 3600, 1, C(clock_sigma_s)},
    {"column-temp-sigma", 0, 30, 1, C(tcol_sigma_k)},
    {"lapse-sigma", 0, 10, 1e-3, C(lapse_sigma_k_per_m)},         /* K/km */
};
#undef C

/* A word of a list: its index, or -1 with the message. */
static int choice(const char *name, const char *text, const char *const *words, const char *expected, hyp_error *err)
{
    for (int k = 0; words[k]; k++)
        if (strcmp(text, words[k]) == 0)
            return k;
    hyp_error_set(err, HYP_ERR_USAGE, "%s \"%s\": expected %s", name, text, expected);
    return -1;
}

static hyp_status set_vref(const char *name, const char *text, hyp_vref *v, hyp_error *err)
{
    int r = hyp_vref_parse(text);
    if (r < 0)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s \"%s\": expected geoid or ellipsoidal", name, text);
    *v = (hyp_vref)r;
    return HYP_OK;
}

static hyp_status set_time_format(const char *name, const char *text, const char **to, hyp_error *err)
{
    char why[160];
    if (hyp_time_format_check(text, why, sizeof why))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s \"%s\" %s (see \"Time formats\" in docs/formats.md)",
                             name, text, why);
    *to = text;
    return HYP_OK;
}

static hyp_status set_unit(hyp_quantity q, const char *name, const char *text, hyp_unit *u, hyp_error *err)
{
    if (!(*u = hyp_unit_parse(q, text)))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s \"%s\": expected one of %s", name, text, hyp_unit_choices(q));
    return HYP_OK;
}

/* The catalogue (settings.c) is the list of names: one not there in this
 * scope is refused before anything is looked at. */
static hyp_status in_scope(const char *name, hyp_setting_scope scope, const char *what, hyp_error *err)
{
    const hyp_setting_info *s = hyp_setting_find(name);
    if (!s || s->scope != scope)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: no such %ssetting", name ? name : "", what);
    return HYP_OK;
}

/* The settings that take a file, a name or a word. */
static hyp_status set_text(hyp_survey_opts *o, const char *name, const char *v, hyp_error *err)
{
    static const char *const methods[] = {"auto", "single", "two-base", "field", NULL};
    static const char *const tcols[] = {"base", "rover", "both", NULL};
    static const struct { const char *name; size_t at; } texts[] = {
        {"pressure-field", offsetof(hyp_survey_opts, read.pressure_field)},
        {"temperature-field", offsetof(hyp_survey_opts, read.temperature_field)},
        {"humidity-field", offsetof(hyp_survey_opts, read.humidity_field)},
        {"time-zone", offsetof(hyp_survey_opts, rover_time_zone)},
        {"benchmarks", offsetof(hyp_survey_opts, benchmarks_path)},
        {"ties", offsetof(hyp_survey_opts, ties_path)},
        {"crs", offsetof(hyp_survey_opts, crs)},
        {"bases-colocated", offsetof(hyp_survey_opts, bases_colocated)},
        {"baro-altitude", offsetof(hyp_survey_opts, read.baro_altitude_field)},
    };
    if (!strcmp(name, "baro-altitude") && (!v || !v[0] || strpbrk(v, " \t<>:/\"'&")))
        return hyp_error_set(err, HYP_ERR_USAGE, "%s \"%s\": expected ele or the local name of an extension element", name,
                             v ? v : "");
    for (size_t k = 0; k < sizeof texts / sizeof texts[0]; k++)
        if (!strcmp(name, texts[k].name)) {
            *(const char **)((char *)o + texts[k].at) = v;
            return HYP_OK;
        }
    int k;
    if (!strcmp(name, "method")) {
        if ((k = choice(name, v, methods, "auto, single, two-base or field", err)) < 0)
            return HYP_ERR_USAGE;
        o->correct.method = (hyp_method)k;
    } else if (!strcmp(name, "column-temp")) {
        if ((k = choice(name, v, tcols, "base, rover or both", err)) < 0)
            return HYP_ERR_USAGE;
        o->correct.tcol = (hyp_tcol_mode)k;
    } else if (!strcmp(name, "pressure-unit"))
        return set_unit(HYP_Q_PRESSURE, name, v, &o->read.pressure_unit, err);
    else if (!strcmp(name, "temperature-unit"))
        return set_unit(HYP_Q_TEMPERATURE, name, v, &o->read.temperature_unit, err);
    else if (!strcmp(name, "time-format"))
        return set_time_format(name, v, &o->read.time_format, err);
    else if (!strcmp(name, "gnss-heights"))
        return set_vref(name, v, &o->gnss_ref, err);
    else if (!strcmp(name, "known-heights"))
        return set_vref(name, v, &o->known_ref, err);
    else if (!strcmp(name, "height-crs")) {
        o->out_ref_set = 1;
        return set_vref(name, v, &o->out_ref, err);
    } else
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: no such setting", name);
    return HYP_OK;
}

hyp_status hyp_survey_opts_set(hyp_survey_opts *o, const char *name, const char *value, hyp_error *err)
{
    if (in_scope(name, HYP_SCOPE_SURVEY, "", err))
        return HYP_ERR_USAGE;
    for (size_t k = 0; k < sizeof nums / sizeof nums[0]; k++)
        if (!strcmp(name, nums[k].name)) {
            double v;
            if (number(name, value ? value : "", nums[k].lo, nums[k].hi, &v, err))
                return HYP_ERR_USAGE;
            *(double *)((char *)&o->correct + nums[k].at) = v * nums[k].scale;
            return HYP_OK;
        }
    if (!strcmp(name, "benchmark-sigma"))
        return number(name, value ? value : "", 0, 100, &o->benchmark_sigma_m, err);
    if (!strcmp(name, "no-auto-colocate")) {
        o->correct.auto_colocate = 0;
        return HYP_OK;
    }
    if (!strcmp(name, "no-gnss-anchor")) {
        o->correct.gnss_anchor = 0;
        return HYP_OK;
    }
    if (!value)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s needs a value", name);
    return set_text(o, name, value, err);
}

hyp_status hyp_base_spec_set(hyp_base_spec *b, const char *name, const char *value, hyp_error *err)
{
    const char *v = value ? value : "";
    if (in_scope(name, HYP_SCOPE_BASE, "base ", err))
        return HYP_ERR_USAGE;
    if (!strcmp(name, "base-height"))
        return number(name, v, -500, 9000, &b->height_m, err);
    if (!strcmp(name, "base-offset"))
        return number(name, v, -5000, 5000, &b->offset_pa, err);
    if (!strcmp(name, "base-offset-sigma"))
        return number(name, v, 0, 5000, &b->offset_sigma_pa, err);
    if (!strcmp(name, "base-clock-offset"))
        return number(name, v, -86400, 86400, &b->clock_offset_s, err);
    if (!strcmp(name, "base-time-zone")) {
        b->time_zone = value;
        return HYP_OK;
    }
    if (!strcmp(name, "base-time-format"))
        return set_time_format(name, v, &b->time_format, err);
    if (!strcmp(name, "base-qnh")) {
        b->kind = HYP_BASE_QNH;
        return HYP_OK;
    }
    if (!strcmp(name, "base-pressure-unit"))
        return set_unit(HYP_Q_PRESSURE, name, v, &b->pressure_unit, err);
    if (!strcmp(name, "base-temperature-unit"))
        return set_unit(HYP_Q_TEMPERATURE, name, v, &b->temperature_unit, err);
    if (!strcmp(name, "base-pressure-field"))
        return b->pressure_field = value, HYP_OK;
    if (!strcmp(name, "base-temperature-field"))
        return b->temperature_field = value, HYP_OK;
    if (!strcmp(name, "base-humidity-field"))
        return b->humidity_field = value, HYP_OK;
    if (strcmp(name, "base-at") != 0)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: no such base setting", name);
    char buf[128], *comma;
    snprintf(buf, sizeof buf, "%s", v);
    if (!(comma = strchr(buf, ',')))
        return hyp_error_set(err, HYP_ERR_USAGE, "base-at \"%s\": expected LAT,LON in degrees", v);
    *comma = '\0';
    if (number("base-at latitude", buf, -90, 90, &b->lat_deg, err) ||
        number("base-at longitude", comma + 1, -180, 180, &b->lon_deg, err))
        return HYP_ERR_USAGE;
    return HYP_OK;
}

hyp_status hyp_rover_spec_set(hyp_rover_spec *r, const char *name, const char *value, hyp_error *err)
{
    const char *v = value ? value : "";
    if (in_scope(name, HYP_SCOPE_ROVER, "rover ", err))
        return HYP_ERR_USAGE;
    if (!strcmp(name, "rover-pressure-unit"))
        return set_unit(HYP_Q_PRESSURE, name, v, &r->pressure_unit, err);
    if (!strcmp(name, "rover-temperature-unit"))
        return set_unit(HYP_Q_TEMPERATURE, name, v, &r->temperature_unit, err);
    if (!strcmp(name, "rover-clock-offset"))
        return number(name, v, -86400, 86400, &r->clock_offset_s, err);
    const char **text = !strcmp(name, "rover-pressure-field")      ? &r->pressure_field
                        : !strcmp(name, "rover-temperature-field") ? &r->temperature_field
                        : !strcmp(name, "rover-humidity-field")    ? &r->humidity_field
                        : !strcmp(name, "rover-time-zone")         ? &r->time_zone
                                                                   : NULL;
    if (!text)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s: no such rover setting", name);
    if (!value || !value[0])
        return hyp_error_set(err, HYP_ERR_USAGE, "%s \"\": expected a name", name);
    *text = value;
    return HYP_OK;
}

hyp_status hyp_network_opts_set(hyp_network_opts *o, const char *name, const char *value, hyp_error *err)
{
    static const struct { const char *name; double lo, hi; size_t at; } net[] = {
        {"occupation-radius", 1, 1000, offsetof(hyp_network_opts, occ_radius_m)},
        {"occupation-min", 10, 86400, offsetof(hyp_network_opts, occ_min_s)},
        {"control-sigma", 0.0001, 100, offsetof(hyp_network_opts, control_sigma_m)},
        {"min-common", 10, 86400, offsetof(hyp_network_opts, min_common_s)},
        {"weather-walk", 0.01, 20, offsetof(hyp_network_opts, weather_walk_hpa_sqrt_h)},
    };
    if (in_scope(name, HYP_SCOPE_NETWORK, "network ", err))
        return HYP_ERR_USAGE;
    for (size_t k = 0; k < sizeof net / sizeof net[0]; k++)
        if (!strcmp(name, net[k].name))
            return number(name, value ? value : "", net[k].lo, net[k].hi, (double *)((char *)o + net[k].at), err);
    if (!strcmp(name, "no-find-occupations"))
        return o->auto_occupations = 0, HYP_OK;
    if (!value)
        return hyp_error_set(err, HYP_ERR_USAGE, "%s needs a value", name);
    if (!strcmp(name, "stations"))
        o->stations_path = value;
    else
        o->fieldbook_path = value;
    return HYP_OK;
}
