/* sim_write.h - what the simulator's surveys with several standings
 * (network.c: rovers on loops; leapfrog.c: instruments without a base) do
 * alike: where a sensor is between its standings, a track's samples (GNSS
 * fixes and logger readings), and the files written from them (GPX track,
 * stations.csv/truth.csv, fieldbook.csv/occupations-truth.csv, a sensor's
 * scenario.txt lines). One piece for both so their files stay alike. Test
 * tool only: nothing here is shared with the library. */
#ifndef HYPSIM_SIM_WRITE_H
#define HYPSIM_SIM_WRITE_H

#include <stddef.h>
#include <stdio.h>

#include "sim.h"

/* Where a sensor is at a time (km from the scenario's origin, height m),
 * and whether it is being carried. */
typedef struct sim_where { double e_km, n_km, z_m; int walking; } sim_where;

/* One standing: where the sensor stands (the mark's position plus the
 * sensor's place aside, km; the mark's height, m), when (whole Unix s), and
 * the shape of the walk to the next standing (a bump in height and a bow
 * sideways, m, both a half sine over the walk). */
typedef struct sim_standing { double e_km, n_km, h_m, t_on, t_off, bump_m, lateral_m; } sim_standing;

/* Standing k (0 .. n-1) of the sensor described by ctx. */
typedef sim_standing (*sim_standing_fn)(const void *ctx, int k);

/* Where the sensor with n standings is at t: at its standing until it
 * leaves, on a straight line bowed by lateral_m while walking to the next,
 * at the last one after it. */
sim_where sim_where_at(sim_standing_fn get, const void *ctx, int n, double t);

/* One track sample: GNSS position (degrees) and height (m), the logger's
 * pressure (Pa) and temperature (degC), the time (Unix s). */
typedef struct sim_fix { double lat, lon, ele, p_pa, t_c, time; } sim_fix;

/* What a track is sampled from. The sensor reads pressure(at) + off_pa +
 * extra_off_pa + drift_pa_h x hours since t0 + noise_pa x white noise,
 * quantised to w->rover_q_pa. */
typedef struct sim_track_src {
    const scenario *w;
    double t0, t1, dt_s;
    double off_pa, extra_off_pa, drift_pa_h, noise_pa;
    sim_where (*where)(const void *ctx, double t);
    double (*pressure)(const void *ctx, sim_where at, double t);   /* true pressure, Pa */
    const void *ctx;
} sim_track_src;

/* The track's samples every dt_s from t0 to t1: GNSS fixes (horizontal
 * error 2 m a component with a 120 s correlation time plus 0.7 m white;
 * height error w->gnss_sd_m with w->gnss_tau_s plus 1 m white) and the
 * logger's readings (thermometer warmed by w->body_warming_k while walking,
 * 0.4 of it standing, plus 0.3 K white). NULL when out of memory; free(). */
sim_fix *sim_sample_track(const sim_track_src *src, size_t *count);

/* Opens dir/file and writes a GPX 1.1 header with the logger's namespace
 * and the metadata name title; NULL (reported) on failure. */
FILE *sim_gpx_open(const char *dir, const char *file, const char *title);

/* Writes track trk_name with the n samples and the GPX end, and closes g:
 * 0, or 1 when writing failed. */
int sim_gpx_finish(FILE *g, const char *trk_name, const sim_fix *f, size_t n);

/* A mark for stations.csv and truth.csv: sigma_m > 0 makes it a control
 * mark with its height and sigma in stations.csv. */
typedef struct sim_mark { const char *name; double lat, lon, h_m, sigma_m; } sim_mark;

/* Writes dir/stations.csv and dir/truth.csv for the n marks: 0, or 1. */
int sim_write_stations(const char *dir, const sim_mark *m, int n);

/* Opens dir/fieldbook.csv and dir/occupations-truth.csv and writes their
 * headers: 0, or 1 when either failed (the one that opened is left in its
 * pointer for sim_close). */
int sim_occupations_open(const char *dir, FILE **fb, FILE **tr);

/* The booked window of a standing: whole minutes, at least 15 s inside the
 * true one. */
void sim_booked(double t_on, double t_off, double *start, double *end);

/* One occupation: as booked (booked_st, the booked window) in fb, as it was
 * (true_st, the true window) in tr. */
void sim_occupation_row(FILE *fb, FILE *tr, const char *booked_st, const char *true_st, const char *rover,
                        double t_on, double t_off);

/* A sensor's lines in scenario.txt. */
void sim_sensor_params(FILE *f, const char *name, double off_pa, double drift_pa_h, double noise_pa, double t_on,
                       double t_off);

/* Closes f if open: 0, or 1 when closing failed. */
int sim_close(FILE *f);

#endif
