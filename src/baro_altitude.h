/* baro_altitude.h - a track that stored barometric altitudes: their
 * quantisation, and the recorder's re-settings found and joined. */
#ifndef HYP_BARO_ALTITUDE_H
#define HYP_BARO_ALTITUDE_H

#include "hypsolev/correct.h"
#include "hypsolev/error.h"
#include "hypsolev/samples.h"

#define HYP__BARO_MAX_STEPS 64

/* A bound on the vertical speed of the recorder, m/s: faster than a person
 * on foot or skis climbs or descends for a sample interval (common
 * practice, no source; a cable car can exceed it and is then taken for a
 * re-setting). */
#define HYP__BARO_VMAX_M_S 5.0

/* The 1-sigma additive offset of a recorder's pressure sensor, Pa, which
 * the rescaling by the reference takes for part of the reference (common
 * practice, no source: consumer barometers are sold as +-1 hPa). */
#define HYP__BARO_SENSOR_SIGMA_PA 100.0
/* ... and of an uncalibrated reference's departure from 1013.25 hPa: the
 * day's sea-level pressure is seldom more than about 10 hPa from it
 * (common practice, no source). */
#define HYP__BARO_REF_SIGMA_PA 1000.0

typedef struct hyp__baro {
    double quant_m;            /* step of the stored altitudes, m; 0: finer than 1 mm */
    double quant_pa;           /* its 1-sigma uniform noise q / sqrt(12), in Pa */
    size_t n_steps;
    hyp_baro_step steps[HYP__BARO_MAX_STEPS];
    double ref_pa;             /* the recorder's reference before the first
                                  re-setting, from a first correction; NaN: none */
} hyp__baro;

/* The pressures of s were made from barometric altitudes with the
 * reference 1013.25 hPa (the GPX reader does it). Finds the altitudes'
 * quantisation, finds the re-settings (a step between two samples larger
 * than HYP__BARO_VMAX_M_S allows, beyond the quantisation and 1 m, that
 * GNSS heights, where both samples have them, do not make too), and
 * rescales each later segment to join the one before (the recorder's
 * reference is then one unknown, which the offset calibrates). Refuses,
 * naming the line, re-settings that no sea-level pressure could make.
 * Each step is a note in msgs. */
hyp_status hyp__baro_join(hyp_series *s, const char *path, hyp__baro *b, hyp_msgs *msgs, hyp_error *err);

/* After a first correction res of s: the mean over corrected points
 * (about 4000 evenly spread at most) of
 * 1 - offset / p is ref / P0 (the pressures are the true ones times P0 /
 * ref, the offset closes the difference); rescales s by it, sets
 * b->ref_pa and says so in msgs. */
void hyp__baro_rescale(hyp_series *s, const hyp_correct_result *res, hyp__baro *b, const char *path, hyp_msgs *msgs);

/* The joining errors' variance, relative (dimensionless^2), between the
 * times t_s and ref_s: the sum of sigma_rel^2 of the steps between them. */
double hyp__baro_join_var(const hyp_baro_step *st, size_t n, double t_s, double ref_s);

#endif
