/* sim.h - what the simulator's files share: the scenario (a day's
 * atmosphere, sensors and route), the random numbers and the model
 * atmosphere of hypsim.c, and the station-network surveys of network.c.
 * Test tool only: nothing here is shared with the library. */
#ifndef HYPSIM_SIM_H
#define HYPSIM_SIM_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

typedef struct stop { double frac, dur_s; const char *name; int waypoint; } stop;

typedef struct scenario {
    const char *name;
    double lat0, lon0, base_h;      /* base position and height (m) */
    double top_h, route_km;         /* highest point, one-way length */
    double t0;                      /* start, Unix s */
    double coloc_s, rest_s;         /* standing at the start, at the top */
    double walk_speed;              /* m/s horizontally */
    double rover_dt, base_dt;       /* sampling, s */
    /* atmosphere */
    double slp_pa, trend_pa_h;      /* sea-level pressure and its trend */
    double grad_pa_km_e, grad_pa_km_n; /* horizontal gradient of it */
    double t_sl_k, lapse_k_km, diurnal_k; /* sea-level temp, lapse, diurnal amplitude */
    double rh_sl, rh_lapse_km;      /* humidity at sea level (%), change per km */
    /* sensors */
    double rover_off_pa, rover_drift_pa_h, rover_noise_pa, rover_q_pa;
    double base_off_pa, base_noise_pa, base_q_pa;
    double body_warming_k;          /* rover thermometer warming while walking */
    double gnss_sd_m, gnss_tau_s;   /* correlated GNSS height error */
    /* later additions (zero in the first scenarios) */
    int n_stops;                    /* stops on the way up, at benchmarks */
    stop stops[4];
    double th_east_km, th_north_km, th_h; /* trailhead from the base, km; its height */
    int th_is_benchmark;            /* write the trailhead as benchmark TH */
    double base_clock_s;            /* base logger clock ahead of true time */
    double front_pa, front_kmh, front_dir_deg, front_t_s, front_km; /* a moving pressure step */
    double micro_pa, micro_tau_s;   /* small pressure waves seen alike everywhere nearby */
    /* more bases: position from the main base (km), height, instrument
     * offset; coloc_first: the logger starts beside the main base (from 2 h
     * to 1.5 h before the start) and is then carried to its site */
    int n_extra;
    struct xbase { double east_km, north_km, h, off_pa; int coloc_first; } extra[3];
    double inv_dt_k, inv_depth_m, inv_end_s;   /* a morning inversion above the main base */
    double grad_rot_deg_h;          /* the gradient turns this fast */
    int no_rover_temp;              /* the rover logs no temperature */
    double qnh_east_km, qnh_north_km, qnh_h, qnh_dt_s; /* a weather station's QNH series */
    /* the coverage tests' additions (zero: as before) */
    double front_trough_pa_h;       /* a trough moving with the front: the
                                       pressure falls this fast ahead of it
                                       and rises this fast behind it */
    double base_temp_bias_k;        /* the base thermometer's error as a
                                       measure of the air (siting, radiation) */
    double pos_noise_m, pos_tau_s;  /* per-axis position noise (0: 2 m white)
                                       and its correlation time (0: white) */
    double pos_spike_s;             /* a 50 m position spike every this many s */
    double coloc_offset_m;          /* standing this far east of the trailhead
                                       when at the start (co-location) */
} scenario;

/* Random numbers (hypsim.c): one deterministic stream for a run. */
void sim_seed(uint64_t seed);
double urand(void);   /* uniform in [0, 1) */
double nrand(void);   /* standard normal */

/* The model atmosphere (hypsim.c). Heights z in m, times t in Unix s. */
double air_temp(const scenario *sc, double z, double t);   /* K */
double air_rh(const scenario *sc, double z);               /* % */
/* True pressure (Pa) at a point east_km/north_km from the scenario's origin. */
double true_pressure(const scenario *sc, double lat, double east_km, double north_km, double z, double t);

/* Helpers (hypsim.c). */
void iso(double t, char *buf, size_t n);       /* Unix s -> YYYY-MM-DDTHH:MM:SSZ */
double quant(double v, double q);
FILE *open_out(const char *dir, const char *name);
void latlon(const scenario *sc, double east_km, double north_km, double *lat, double *lon);

/* hypsim network|network-hard OUTDIR [options] (network.c); argv[0] is the
 * variant's name. Returns the process exit status. */
int sim_network_main(int argc, char **argv);

/* hypsim leapfrog|loop OUTDIR [options] (leapfrog.c); argv[0] is the
 * survey's kind. Returns the process exit status. */
int sim_leapfrog_main(int argc, char **argv);

#endif
