/* hypsim.c - the project's survey simulator: a roving barometer walking a
 * route while a base logger records, through a model atmosphere with weather
 * change, humidity, sensor noise, instrument offsets and drift. Pressures come
 * from integrating the hydrostatic equation numerically (RK4) - never from
 * the library's formulas - and the truth is written beside the logs so tests
 * can score a correction against it.
 *
 *   hypsim SCENARIO OUTDIR [--seed N] [--lapse K_PER_KM] [--gnss-bias M]
 *          [--gnss-heights geoid|ellipsoidal] [--t0 UNIX_SECONDS] [OPTION VALUE]...
 *   scenarios: demo, calm, ties, front, faraway, clock, twobase, threebase,
 *   qnh, warm, coldfront
 *   further options (each takes a value; the scenario's own value when
 *   absent): --route-km KM, --top-h M, --rest-s S, --trend HPA_PER_H,
 *   --front-pa PA, --front-kmh KMH, --front-km KM, --front-dir DEG,
 *   --front-time S (after the start), --front-trough PA_PER_H,
 *   --base-temp-bias K, --gnss-sd M, --gnss-tau S, --pos-noise M,
 *   --pos-tau S, --pos-spike-s S, --coloc-offset M, --xbase-off PA,
 *   --xbase-at-top 0|1, --xbase-coloc 0|1, --th-benchmark 0|1, --stops 0|3
 *
 * Writes OUTDIR/rover.gpx, OUTDIR/base.csv, OUTDIR/truth.csv and
 * OUTDIR/scenario.txt (the parameters), and OUTDIR/benchmarks.csv where the
 * scenario has benchmarks. Everything is invented.
 *
 *   hypsim network|network-hard OUTDIR [--seed N] [--days D] [--rovers R]
 *          [--stations S] [--dt S] [--mislabel] [--open-tracks]
 *
 * A whole multi-day, multi-rover survey of stations in the same atmosphere
 * (network.c, which documents its files).
 *
 *   hypsim leapfrog OUTDIR [--seed N] [--index-error PA]
 *   hypsim loop OUTDIR [--seed N] [--singular]
 *
 * Surveys without a base logger: a leapfrog traverse with two instruments
 * and a loop with one (leapfrog.c, which documents its files). */
#define _DEFAULT_SOURCE
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <proj.h>

#include "sim.h"

static const scenario scenarios[] = {
    {"demo", 46.80, 9.90, 812.4, 1968.0, 7.5, 1781766000.0 /* 2026-06-18T07:00Z */,
     900, 1200, 1.05, 5, 30,
     101600, -0.35, 0.02, -0.03, 291.0, -6.2, 3.0, 70, -8,
     42.0, 5.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400, .n_stops = 0},
    {"calm", 46.80, 9.90, 812.4, 1468.0, 4.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101400, 0.0, 0.0, 0.0, 290.0, -6.5, 1.0, 60, -5,
     30.0, 0.0, 2.0, 1.0, 0.0, 1.0, 1.0, 0.0, 4.0, 400, .n_stops = 0},
    /* a calm day with ties at three heights; the real lapse rate (-5.4 K/km)
     * differs from the standard one the correction assumes */
    {"ties", 46.80, 9.90, 812.4, 2050.0, 8.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101500, -0.15, 0.01, 0.0, 289.0, -5.4, 2.0, 65, -6,
     35.0, 4.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .n_stops = 3, .stops = {{0.3, 240, "BM-LOW", 1}, {0.6, 240, "BM-MID", 0}, {0.92, 240, "BM-HIGH", 1}}},
    /* a front passes between base and rover: -3 hPa over 12 km moving NE at
     * 35 km/h, its middle over the base at 10:00; the lapse rate (-7.4 K/km)
     * departs from the standard one by a typical day-to-day amount */
    {"front", 46.80, 9.90, 812.4, 1700.0, 9.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101300, -0.2, 0.0, 0.0, 290.0, -7.4, 2.0, 70, -8,
     38.0, 3.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .front_pa = -300.0, .front_kmh = 35.0, .front_dir_deg = 37.0, .front_t_s = 3 * 3600.0, .front_km = 12.0},
    /* the base 35 km SW of the trailhead, a stiff gradient (3 hPa/100 km),
     * falling pressure and a base clock 90 s fast; the rover starts and ends
     * on the trailhead benchmark TH; lapse rate -5.6 K/km */
    {"faraway", 46.58, 9.58, 455.0, 1650.0, 6.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101200, -1.0, 0.021, 0.021, 290.0, -5.6, 2.0, 70, -8,
     40.0, 4.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .th_east_km = 24.0, .th_north_km = 24.5, .th_h = 812.4, .th_is_benchmark = 1, .base_clock_s = 90.0},
    /* a base logger whose clock runs 90 s fast, beside the rover at the start
     * and the end, in falling pressure with small pressure waves (4 Pa,
     * a few minutes) that both loggers see */
    {"clock", 46.80, 9.90, 812.4, 1500.0, 5.0, 1781766000.0,
     1200, 900, 1.0, 5, 30,
     101200, -1.5, 0.0, 0.0, 290.0, -6.5, 2.0, 70, -8,
     30.0, 3.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .base_clock_s = 90.0, .micro_pa = 4.0, .micro_tau_s = 240.0},
    /* a low and a high base bracketing the walk, a morning inversion (+4 K
     * over the 250 m above the low base, mixed out by 10:00), a rover with
     * no thermometer; the high logger starts beside the low one */
    {"twobase", 46.80, 9.90, 812.4, 1750.0, 6.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101500, -0.3, 0.0, 0.0, 288.0, -6.0, 2.0, 70, -8,
     35.0, 3.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .n_extra = 1, .extra = {{4.7, 3.5, 1745.0, 60.0, 1}},
     .inv_dt_k = 4.0, .inv_depth_m = 250.0, .inv_end_s = 3 * 3600.0, .no_rover_temp = 1},
    /* three bases around the area, a 2 hPa/100 km gradient turning 20
     * degrees an hour; the loggers start side by side */
    {"threebase", 46.80, 9.90, 812.4, 1600.0, 6.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101500, -0.4, 0.02, 0.0, 289.0, -6.3, 2.0, 70, -8,
     35.0, 3.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .n_extra = 2, .extra = {{9.0, -3.0, 1020.0, -40.0, 1}, {2.0, 9.0, 640.0, 25.0, 1}},
     .grad_rot_deg_h = 20.0},
    /* no base logger: a weather station 20 km away reports QNH every half
     * hour to 1 hPa; the rover starts and ends on the trailhead benchmark */
    {"qnh", 46.80, 9.90, 812.4, 1700.0, 6.0, 1781766000.0,
     900, 900, 1.0, 5, 30,
     101400, -0.5, 0.01, 0.01, 289.0, -6.4, 2.0, 70, -8,
     35.0, 3.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .th_h = 812.4, .th_is_benchmark = 1,
     .qnh_east_km = -14.0, .qnh_north_km = -14.0, .qnh_h = 600.0, .qnh_dt_s = 1800.0},
    /* the rover's thermometer warmed 5 K by the body while walking; a warm
     * afternoon with a steep lapse rate (-7.6 K/km) */
    {"warm", 46.80, 9.90, 812.4, 1900.0, 7.0, 1781766000.0,
     900, 1200, 1.05, 5, 30,
     101600, -0.3, 0.0, 0.0, 294.0, -7.6, 3.0, 60, -8,
     40.0, 4.0, 2.5, 1.0, 0.0, 1.2, 1.0, 5.0, 4.0, 400, .n_stops = 0},
    /* a cold front crossing the survey area: a trough of 1.5 hPa/100 km
     * either side moves with it (at 30 km/h the pressure falls 0.45 hPa/h
     * ahead of it and rises as fast behind it), and across its 4 km width
     * the pressure rises 3 hPa (in 8 minutes at 30 km/h); it moves NE and is
     * over the base 2.5 h after the start; a walk of 6 km climbing 190 m,
     * co-locations at both ends; the options vary speed, direction, time
     * and the walk's length */
    {"coldfront", 46.80, 9.90, 812.4, 1000.0, 6.0, 1781766000.0,
     900, 600, 1.0, 5, 30,
     101300, 0.0, 0.0, 0.0, 290.0, -6.5, 2.0, 70, -8,
     35.0, 3.0, 2.5, 1.0, 0.0, 1.2, 1.0, 2.5, 4.0, 400,
     .front_pa = 300.0, .front_kmh = 30.0, .front_dir_deg = 45.0, .front_t_s = 2.5 * 3600.0, .front_km = 4.0,
     .front_trough_pa_h = 45.0},
};

/* --- deterministic random numbers: xorshift64* and Box-Muller --- */
static uint64_t rng_state = 88172645463325252ULL;

/* Mixes a seed into the generator (what --seed does). */
void sim_seed(uint64_t seed)
{
    rng_state ^= seed * 0x9E3779B97F4A7C15ULL;
}

double urand(void)
{
    rng_state ^= rng_state >> 12;
    rng_state ^= rng_state << 25;
    rng_state ^= rng_state >> 27;
    return (double)((rng_state * 2685821657736338717ULL) >> 11) * (1.0 / 9007199254740992.0);
}
double nrand(void)
{
    double u = urand(), v = urand();
    if (u < 1e-300)
        u = 1e-300;
    return sqrt(-2.0 * log(u)) * cos(2.0 * M_PI * v);
}

/* --- the model atmosphere --- */
/* Gravity: GRS80 international gravity formula with the free-air gradient
 * (Moritz 1980) - a different formula from the library's on purpose. */
static double sim_gravity(double lat_deg, double z)
{
    double s = sin(lat_deg * M_PI / 180.0), s2 = sin(2.0 * lat_deg * M_PI / 180.0);
    return 9.780327 * (1.0 + 0.0053024 * s * s - 0.0000058 * s2 * s2) - 3.086e-6 * z;
}

double air_temp(const scenario *sc, double z, double t)
{
    double hour = fmod((t / 3600.0), 24.0);
    double diurnal = sc->diurnal_k * sin(2.0 * M_PI * (hour - 9.0) / 24.0);
    double inv = 0.0;
    if (sc->inv_dt_k != 0.0) {
        /* warmer air above the base: +dT reached at the inversion's top,
         * fading out by inv_end_s after the start */
        double f = 1.0 - (t - sc->t0) / sc->inv_end_s, dz = (z - sc->base_h) / sc->inv_depth_m;
        f = f < 0 ? 0 : f > 1 ? 1 : f;
        dz = dz < 0 ? 0 : dz > 1 ? 1 : dz;
        inv = sc->inv_dt_k * f * dz;
    }
    return sc->t_sl_k + diurnal + sc->lapse_k_km * z / 1000.0 + inv;
}

double air_rh(const scenario *sc, double z)
{
    double rh = sc->rh_sl + sc->rh_lapse_km * z / 1000.0;
    return rh < 5 ? 5 : rh > 100 ? 100 : rh;
}

/* Bolton (1980) saturation vapour pressure, Pa - not the library's WMO one. */
static double sim_es(double tk)
{
    double tc = tk - 273.15;
    return 611.2 * exp(17.67 * tc / (tc + 243.5));
}

static double sea_level_pressure(const scenario *sc, double east_km, double north_km, double t)
{
    double ge = sc->grad_pa_km_e, gn = sc->grad_pa_km_n;
    if (sc->grad_rot_deg_h != 0.0) {
        double a = sc->grad_rot_deg_h * (t - sc->t0) / 3600.0 * M_PI / 180.0;
        double e2 = ge * cos(a) - gn * sin(a), n2 = ge * sin(a) + gn * cos(a);
        ge = e2, gn = n2;
    }
    double p = sc->slp_pa + sc->trend_pa_h * 100.0 * (t - sc->t0) / 3600.0 +
               ge * 100.0 * east_km + gn * 100.0 * north_km;
    if (sc->front_pa != 0.0) {
        /* a pressure step of width front_km moving towards front_dir_deg */
        double a = sc->front_dir_deg * M_PI / 180.0;
        double x = east_km * sin(a) + north_km * cos(a);
        double pos = sc->front_kmh / 3600.0 * (t - sc->t0 - sc->front_t_s);
        p += sc->front_pa * 0.5 * (1.0 + tanh((pos - x) / (0.5 * sc->front_km)));
        if (sc->front_trough_pa_h != 0.0) {
            /* |pos - x| smoothed over the front's width: at a fixed place the
             * pressure falls at the given rate before, rises after */
            double g = sc->front_trough_pa_h / sc->front_kmh;   /* Pa per km */
            p += g * sqrt((pos - x) * (pos - x) + sc->front_km * sc->front_km);
        }
    }
    return p;
}

/* dp/dz = -p g / (Rd Tv), integrated by RK4 from sea level in steps <= 5 m. */
static double dpdz(const scenario *sc, double lat, double z, double p, double t)
{
    const double rd = 287.0531, eps = 0.621957;
    double tk = air_temp(sc, z, t);
    double e = air_rh(sc, z) / 100.0 * sim_es(tk);
    double tv = tk / (1.0 - e / p * (1.0 - eps));
    return -p * sim_gravity(lat, z) / (rd * tv);
}

/* Small pressure waves: an AR(1) series on a 1 s grid from its own
 * generator (so the other noises stay as they were), the same everywhere
 * in the survey area at one time. */
#define MICRO_N 200000
static double micro[MICRO_N];
static double micro_t0;

static void micro_init(const scenario *sc)
{
    uint64_t st = 0x2545F4914F6CDD1DULL;
    double a = sc->micro_tau_s > 0 ? exp(-1.0 / sc->micro_tau_s) : 0.0, x = 0.0;
    micro_t0 = sc->t0 - 7200.0;
    for (int i = 0; i < MICRO_N; i++) {
        st ^= st >> 12, st ^= st << 25, st ^= st >> 27;
        double u = (double)((st * 2685821657736338717ULL) >> 11) * (1.0 / 9007199254740992.0);
        st ^= st >> 12, st ^= st << 25, st ^= st >> 27;
        double v = (double)((st * 2685821657736338717ULL) >> 11) * (1.0 / 9007199254740992.0);
        double g = sqrt(-2.0 * log(u < 1e-300 ? 1e-300 : u)) * cos(2.0 * M_PI * v);
        x = a * x + sqrt(1.0 - a * a) * sc->micro_pa * g;
        micro[i] = x;
    }
}

static double micro_at(const scenario *sc, double t)
{
    if (sc->micro_pa == 0.0)
        return 0.0;
    double x = t - micro_t0;
    int i = (int)floor(x);
    if (i < 0 || i + 1 >= MICRO_N)
        return 0.0;
    return micro[i] + (x - i) * (micro[i + 1] - micro[i]);
}

double true_pressure(const scenario *sc, double lat, double east_km, double north_km, double z, double t)
{
    double p = sea_level_pressure(sc, east_km, north_km, t) + micro_at(sc, t);
    int n = (int)ceil(fabs(z) / 5.0);
    if (n < 1)
        n = 1;
    double h = z / n, zz = 0.0;
    for (int i = 0; i < n; i++) {
        double k1 = dpdz(sc, lat, zz, p, t);
        double k2 = dpdz(sc, lat, zz + h / 2, p + h / 2 * k1, t);
        double k3 = dpdz(sc, lat, zz + h / 2, p + h / 2 * k2, t);
        double k4 = dpdz(sc, lat, zz + h, p + h * k3, t);
        p += h / 6.0 * (k1 + 2 * k2 + 2 * k3 + k4);
        zz += h;
    }
    return p;
}

/* --- the route: out and back along a bent line, a smooth climb --- */
typedef struct state { double east_km, north_km, z, walking; } state;

/* Distance along the route (km) after tt seconds of the way up, with the
 * stops; *walking is 0 during a stop. */
static double up_distance(const scenario *sc, double tt, double *walking)
{
    double v = sc->walk_speed / 1000.0, done = 0.0, s_prev = 0.0;
    *walking = 1.0;
    for (int k = 0; k < sc->n_stops; k++) {
        double sk = sc->stops[k].frac * sc->route_km, reach = done + (sk - s_prev) / v;
        if (tt < reach)
            return s_prev + (tt - done) * v;
        if (tt < reach + sc->stops[k].dur_s) {
            *walking = 0.0;
            return sk;
        }
        done = reach + sc->stops[k].dur_s;
        s_prev = sk;
    }
    return s_prev + (tt - done) * v;
}

static double stops_s(const scenario *sc)
{
    double d = 0;
    for (int k = 0; k < sc->n_stops; k++)
        d += sc->stops[k].dur_s;
    return d;
}

static double start_h(const scenario *sc)
{
    return sc->th_h > 0 ? sc->th_h : sc->base_h;
}

static state at_distance(const scenario *sc, double s_km)
{
    double f = s_km / sc->route_km;
    state st;
    st.east_km = sc->th_east_km + 0.8 * s_km + 0.3 * sin(3.0 * f);
    st.north_km = sc->th_north_km + 0.6 * s_km;
    /* climb with a dip and a steep last third */
    double prof = 0.5 - 0.5 * cos(M_PI * f) + 0.04 * sin(5.0 * M_PI * f);
    st.z = start_h(sc) + (sc->top_h - start_h(sc)) * prof;
    st.walking = 1.0;
    return st;
}

static state where(const scenario *sc, double t)
{
    double walk_s = sc->route_km * 1000.0 / sc->walk_speed;
    double up_s = walk_s + stops_s(sc);
    double tt = t - sc->t0;
    double s_km;   /* distance along the route from the start */
    double walking = 1.0;
    if (tt < sc->coloc_s) { s_km = 0; walking = 0; }
    else if (tt < sc->coloc_s + up_s) s_km = up_distance(sc, tt - sc->coloc_s, &walking);
    else if (tt < sc->coloc_s + up_s + sc->rest_s) { s_km = sc->route_km; walking = 0; }
    else if (tt < sc->coloc_s + up_s + walk_s + sc->rest_s)
        s_km = sc->route_km - (tt - sc->coloc_s - up_s - sc->rest_s) * sc->walk_speed / 1000.0;
    else { s_km = 0; walking = 0; }
    state st = at_distance(sc, s_km);
    st.walking = walking;
    if (s_km == 0 && !walking)
        st.east_km += sc->coloc_offset_m / 1000.0;
    return st;
}

static double total_s(const scenario *sc)
{
    return 2 * sc->coloc_s + 2 * sc->route_km * 1000.0 / sc->walk_speed + sc->rest_s + stops_s(sc);
}

/* Middle of stop k, Unix s. */
static double stop_mid_time(const scenario *sc, int k)
{
    double v = sc->walk_speed / 1000.0, t = sc->t0 + sc->coloc_s, s_prev = 0.0;
    for (int j = 0; j <= k; j++) {
        double sk = sc->stops[j].frac * sc->route_km;
        t += (sk - s_prev) / v;
        if (j < k)
            t += sc->stops[j].dur_s;
        s_prev = sk;
    }
    return t + 0.5 * sc->stops[k].dur_s;
}

void iso(double t, char *buf, size_t n)
{
    time_t s = (time_t)floor(t);
    struct tm tm;
    gmtime_r(&s, &tm);
    strftime(buf, n, "%Y-%m-%dT%H:%M:%SZ", &tm);
}

double quant(double v, double q)
{
    return q > 0 ? q * floor(v / q + 0.5) : v;
}

/* Options of a run. */
static double opt_gnss_bias_m = 0.0;   /* a bias of the whole track's GNSS heights */
static int opt_ellipsoidal = 0;        /* write GNSS heights above the ellipsoid */
static PJ *to_ell;                     /* PROJ: EGM96 height -> ellipsoidal */
static PJ_CONTEXT *proj_ctx;

static double gnss_ref_shift(double lat, double lon)
{
    if (!opt_ellipsoidal)
        return 0.0;
    PJ_COORD c = proj_trans(to_ell, PJ_FWD, proj_coord(lon, lat, 0.0, 0.0));
    return c.xyz.z;   /* ellipsoidal height of a point on the geoid: N */
}

FILE *open_out(const char *dir, const char *name)
{
    char path[4096];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "w");
    if (!f)
        perror(path);
    return f;
}

void latlon(const scenario *sc, double east_km, double north_km, double *lat, double *lon)
{
    *lat = sc->lat0 + north_km / 111.2;
    *lon = sc->lon0 + east_km / (111.2 * cos(sc->lat0 * M_PI / 180.0));
}

static int write_base(const scenario *sc, const char *dir)
{
    FILE *f = open_out(dir, "base.csv");
    if (!f)
        return 1;
    fprintf(f, "# base logger at the trailhead (simulated, scenario %s)\n", sc->name);
    fprintf(f, "time,pressure [hPa],temperature [degC],humidity [%%]\n");
    double t_end = sc->t0 + total_s(sc) + 1800;
    int early = 0;   /* the main base logs from when other loggers stand beside it */
    for (int k = 0; k < sc->n_extra; k++)
        early |= sc->extra[k].coloc_first;
    for (double t = sc->t0 - (early ? 7200 : 1800); t <= t_end; t += sc->base_dt) {
        double p = true_pressure(sc, sc->lat0, 0, 0, sc->base_h, t);
        double pm = quant(p + sc->base_off_pa + sc->base_noise_pa * nrand(), sc->base_q_pa);
        double tk = air_temp(sc, sc->base_h, t) + sc->base_temp_bias_k + 0.2 * nrand();
        char ts[40];
        iso(t + sc->base_clock_s, ts, sizeof ts);   /* the logger's clock */
        fprintf(f, "%s,%.2f,%.2f,%.1f\n", ts, pm / 100.0, tk - 273.15, air_rh(sc, sc->base_h));
    }
    return fclose(f) != 0;
}

/* Further base loggers; base2.csv, base3.csv, ... */
static int write_extra_bases(const scenario *sc, const char *dir)
{
    for (int k = 0; k < sc->n_extra; k++) {
        const struct xbase *x = &sc->extra[k];
        char name[32];
        snprintf(name, sizeof name, "base%d.csv", k + 2);
        FILE *f = open_out(dir, name);
        if (!f)
            return 1;
        double lat, lon;
        latlon(sc, x->east_km, x->north_km, &lat, &lon);
        fprintf(f, "# base logger %d at %.6f, %.6f, %.1f m (simulated, scenario %s)\n", k + 2, lat, lon, x->h, sc->name);
        fprintf(f, "time,pressure [hPa],temperature [degC],humidity [%%]\n");
        double t_end = sc->t0 + total_s(sc) + 1800;
        double t = x->coloc_first ? sc->t0 - 7200 : sc->t0 - 1800;
        for (; t <= t_end; t += sc->base_dt) {
            int beside = x->coloc_first && t < sc->t0 - 5400;
            if (x->coloc_first && !beside && t < sc->t0 - 1800)
                continue;   /* being carried to its site */
            double p = beside ? true_pressure(sc, sc->lat0, 0, 0, sc->base_h, t)
                              : true_pressure(sc, lat, x->east_km, x->north_km, x->h, t);
            double pm = quant(p + x->off_pa + sc->base_noise_pa * nrand(), sc->base_q_pa);
            double tk = air_temp(sc, beside ? sc->base_h : x->h, t) + sc->base_temp_bias_k + 0.2 * nrand();
            char ts[40];
            iso(t, ts, sizeof ts);
            fprintf(f, "%s,%.2f,%.2f,%.1f\n", ts, pm / 100.0, tk - 273.15, air_rh(sc, x->h));
        }
        if (fclose(f) != 0)
            return 1;
    }
    if (sc->qnh_dt_s > 0) {
        FILE *f = open_out(dir, "qnh.csv");
        if (!f)
            return 1;
        double lat, lon;
        latlon(sc, sc->qnh_east_km, sc->qnh_north_km, &lat, &lon);
        fprintf(f, "# QNH of a weather station at %.6f, %.6f, %.1f m (simulated)\n", lat, lon, sc->qnh_h);
        fprintf(f, "time,pressure [hPa]\n");
        for (double t = sc->t0 - 3600; t <= sc->t0 + total_s(sc) + 3600; t += sc->qnh_dt_s) {
            double p = true_pressure(sc, lat, sc->qnh_east_km, sc->qnh_north_km, sc->qnh_h, t);
            /* QNH by its definition: the ICAO standard atmosphere from the
             * station down to sea level (ICAO Doc 7488), reported to 1 hPa */
            double qnh = p / pow(1.0 - 0.0065 * sc->qnh_h / 288.15, 9.80665 / (287.0531 * 0.0065));
            char ts[40];
            iso(t, ts, sizeof ts);
            fprintf(f, "%s,%.0f\n", ts, qnh / 100.0);
        }
        if (fclose(f) != 0)
            return 1;
    }
    return 0;
}

/* The measured position: 2 m of white noise per axis, or the scenario's
 * own (white, or AR(1) with correlation time pos_tau_s), with a 50 m spike
 * every pos_spike_s (north and east in turn; no random draw, so the rest
 * of the day is unchanged). */
static double pos_e_m, pos_n_m;
static void position_fix(const scenario *sc, double t, double lat, double lon, double *mlat, double *mlon)
{
    double sd = sc->pos_noise_m > 0 ? sc->pos_noise_m : 2.0;
    double a = sc->pos_tau_s > 0 ? exp(-sc->rover_dt / sc->pos_tau_s) : 0.0;
    double de = nrand(), dn = nrand();   /* drawn in this order: lat first */
    pos_n_m = a * pos_n_m + sqrt(1.0 - a * a) * sd * de;
    pos_e_m = a * pos_e_m + sqrt(1.0 - a * a) * sd * dn;
    double n = pos_n_m, e = pos_e_m;
    if (sc->pos_spike_s > 0) {
        long k = lround((t - sc->t0) / sc->rover_dt), every = lround(sc->pos_spike_s / sc->rover_dt);
        if (every > 0 && k % every == every / 2)
            (k / every) % 2 ? (n += 50.0) : (e += 50.0);
    }
    if (sc->pos_noise_m > 0 || sc->pos_tau_s > 0 || sc->pos_spike_s > 0) {
        *mlat = lat + n / 111200.0;
        *mlon = lon + e / (111200.0 * cos(lat * M_PI / 180.0));
    } else {   /* as the first scenarios had it */
        *mlat = lat + 2.0 / 111200.0 * de;
        *mlon = lon + 2.0 / 80000.0 * dn;
    }
}

static int write_rover(const scenario *sc, const char *dir)
{
    FILE *g = open_out(dir, "rover.gpx"), *tr = open_out(dir, "truth.csv");
    if (!g || !tr)
        return 1;
    fprintf(g, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
               "<gpx version=\"1.1\" creator=\"hypsim\" xmlns=\"http://www.topografix.com/GPX/1/1\"\n"
               "     xmlns:lg=\"urn:example:field-logger:1\">\n"
               "  <metadata><name>simulated walk (%s)</name></metadata>\n", sc->name);
    for (int k = 0; k < sc->n_stops; k++) {
        if (!sc->stops[k].waypoint)
            continue;
        state st = at_distance(sc, sc->stops[k].frac * sc->route_km);
        double lat, lon;
        latlon(sc, st.east_km, st.north_km, &lat, &lon);
        char ts[40];
        iso(stop_mid_time(sc, k), ts, sizeof ts);
        fprintf(g, "  <wpt lat=\"%.7f\" lon=\"%.7f\"><time>%s</time><name>%s</name></wpt>\n", lat, lon, ts,
                sc->stops[k].name);
    }
    fputs("  <trk>\n    <name>walk</name>\n    <trkseg>\n", g);
    fprintf(tr, "time,lat,lon,height_m,pressure_pa\n");
    double gnss_err = 0.0, a = exp(-sc->rover_dt / sc->gnss_tau_s);
    double gnss_bias = opt_gnss_bias_m;
    double t_end = sc->t0 + total_s(sc);
    for (double t = sc->t0; t <= t_end; t += sc->rover_dt) {
        state st = where(sc, t);
        double lat, lon;
        latlon(sc, st.east_km, st.north_km, &lat, &lon);
        double p = true_pressure(sc, lat, st.east_km, st.north_km, st.z, t);
        double hours = (t - sc->t0) / 3600.0;
        double pm = quant(p + sc->rover_off_pa + sc->rover_drift_pa_h * hours + sc->rover_noise_pa * nrand(), sc->rover_q_pa);
        double tk = air_temp(sc, st.z, t) + sc->body_warming_k * (st.walking ? 1.0 : 0.4) + 0.3 * nrand();
        gnss_err = a * gnss_err + sqrt(1 - a * a) * sc->gnss_sd_m * nrand();
        double mlat, mlon;
        position_fix(sc, t, lat, lon, &mlat, &mlon);
        char ts[40];
        iso(t, ts, sizeof ts);
        if (sc->no_rover_temp)
            fprintf(g, "      <trkpt lat=\"%.7f\" lon=\"%.7f\"><ele>%.1f</ele><time>%s</time>"
                       "<extensions><lg:sensor><lg:pressure unit=\"hPa\">%.2f</lg:pressure></lg:sensor></extensions></trkpt>\n",
                    mlat, mlon, st.z + gnss_err + gnss_bias + gnss_ref_shift(lat, lon) + 1.0 * nrand(), ts, pm / 100.0);
        else
        fprintf(g, "      <trkpt lat=\"%.7f\" lon=\"%.7f\"><ele>%.1f</ele><time>%s</time>"
                   "<extensions><lg:sensor><lg:pressure unit=\"hPa\">%.2f</lg:pressure>"
                   "<lg:temperature unit=\"degC\">%.1f</lg:temperature></lg:sensor></extensions></trkpt>\n",
                mlat, mlon, st.z + gnss_err + gnss_bias + gnss_ref_shift(lat, lon) + 1.0 * nrand(), ts, pm / 100.0,
                tk - 273.15);
        fprintf(tr, "%s,%.7f,%.7f,%.3f,%.2f\n", ts, lat, lon, st.z, p);
    }
    fputs("    </trkseg>\n  </trk>\n</gpx>\n", g);
    return (fclose(g) != 0) | (fclose(tr) != 0);
}

static int write_benchmarks(const scenario *sc, const char *dir)
{
    if (sc->n_stops == 0 && !sc->th_is_benchmark)
        return 0;
    FILE *f = open_out(dir, "benchmarks.csv");
    if (!f)
        return 1;
    fprintf(f, "name,lat,lon,height,sigma,note\n");
    double lat, lon;
    if (sc->th_is_benchmark) {
        state st = at_distance(sc, 0.0);
        latlon(sc, st.east_km, st.north_km, &lat, &lon);
        fprintf(f, "TH,%.7f,%.7f,%.3f,0.005,trailhead bolt (simulated)\n", lat, lon, st.z);
    }
    for (int k = 0; k < sc->n_stops; k++) {
        state st = at_distance(sc, sc->stops[k].frac * sc->route_km);
        latlon(sc, st.east_km, st.north_km, &lat, &lon);
        fprintf(f, "%s,%.7f,%.7f,%.3f,0.005,simulated benchmark\n", sc->stops[k].name, lat, lon, st.z);
    }
    return fclose(f) != 0;
}

/* The options of the coverage tests: one number each. 0 when known. */
static int set_option(scenario *sc, const char *name, double v)
{
    static const struct { const char *name; size_t off; } num[] = {
        {"--route-km", offsetof(scenario, route_km)},
        {"--top-h", offsetof(scenario, top_h)},
        {"--rest-s", offsetof(scenario, rest_s)},
        {"--trend", offsetof(scenario, trend_pa_h)},
        {"--front-pa", offsetof(scenario, front_pa)},
        {"--front-kmh", offsetof(scenario, front_kmh)},
        {"--front-km", offsetof(scenario, front_km)},
        {"--front-dir", offsetof(scenario, front_dir_deg)},
        {"--front-time", offsetof(scenario, front_t_s)},
        {"--front-trough", offsetof(scenario, front_trough_pa_h)},
        {"--base-temp-bias", offsetof(scenario, base_temp_bias_k)},
        {"--gnss-sd", offsetof(scenario, gnss_sd_m)},
        {"--gnss-tau", offsetof(scenario, gnss_tau_s)},
        {"--pos-noise", offsetof(scenario, pos_noise_m)},
        {"--pos-tau", offsetof(scenario, pos_tau_s)},
        {"--pos-spike-s", offsetof(scenario, pos_spike_s)},
        {"--coloc-offset", offsetof(scenario, coloc_offset_m)},
    };
    for (size_t i = 0; i < sizeof num / sizeof num[0]; i++)
        if (strcmp(name, num[i].name) == 0) {
            *(double *)((char *)sc + num[i].off) = v;
            return 0;
        }
    if (strcmp(name, "--xbase-off") == 0 && sc->n_extra > 0)
        sc->extra[0].off_pa = v;
    else if (strcmp(name, "--xbase-coloc") == 0 && sc->n_extra > 0)
        sc->extra[0].coloc_first = v != 0;   /* the logger first stands beside the main base */
    else if (strcmp(name, "--xbase-at-top") == 0 && sc->n_extra > 0 && v != 0) {
        /* the second logger at the walk's top, where the rover rests beside it */
        state st = at_distance(sc, sc->route_km);
        sc->extra[0].east_km = st.east_km;
        sc->extra[0].north_km = st.north_km;
        sc->extra[0].h = st.z;
    } else if (strcmp(name, "--th-benchmark") == 0)
        sc->th_is_benchmark = v != 0;   /* the trailhead is benchmark TH */
    else if (strcmp(name, "--stops") == 0 && v == 3) {
        /* stops at benchmarks at three heights, as the ties day has them */
        static const stop three[3] = {{0.3, 240, "BM-LOW", 1}, {0.6, 240, "BM-MID", 0}, {0.92, 240, "BM-HIGH", 1}};
        sc->n_stops = 3;
        memcpy(sc->stops, three, sizeof three);
    } else
        return -1;
    return 0;
}

int main(int argc, char **argv)
{
    if (argc >= 2 && (strcmp(argv[1], "network") == 0 || strcmp(argv[1], "network-hard") == 0))
        return sim_network_main(argc - 1, argv + 1);   /* a whole station survey: network.c */
    if (argc >= 2 && (strcmp(argv[1], "leapfrog") == 0 || strcmp(argv[1], "loop") == 0))
        return sim_leapfrog_main(argc - 1, argv + 1);  /* surveys without a base: leapfrog.c */
    if (argc < 3) {
        fprintf(stderr, "usage: hypsim SCENARIO OUTDIR [--seed N]\n"
                        "       hypsim network|network-hard OUTDIR [--seed N] [--days D] [--rovers R]\n"
                        "              [--stations S] [--dt S] [--mislabel] [--open-tracks]\n"
                        "       hypsim leapfrog OUTDIR [--seed N] [--index-error PA]\n"
                        "       hypsim loop OUTDIR [--seed N] [--singular]\n");
        return 2;
    }
    const scenario *sc = NULL;
    for (size_t i = 0; i < sizeof scenarios / sizeof scenarios[0]; i++)
        if (strcmp(argv[1], scenarios[i].name) == 0)
            sc = &scenarios[i];
    if (!sc) {
        fprintf(stderr, "hypsim: unknown scenario %s\n", argv[1]);
        return 2;
    }
    scenario custom = *sc;
    for (int k = 3; k + 1 < argc; k += 2) {
        if (strcmp(argv[k], "--seed") == 0)
            rng_state ^= strtoull(argv[k + 1], NULL, 10) * 0x9E3779B97F4A7C15ULL;
        else if (strcmp(argv[k], "--lapse") == 0)   /* K/km: another day's atmosphere */
            custom.lapse_k_km = strtod(argv[k + 1], NULL);
        else if (strcmp(argv[k], "--t0") == 0)   /* another day: Unix seconds of the start */
            custom.t0 = strtod(argv[k + 1], NULL);
        else if (strcmp(argv[k], "--gnss-bias") == 0)   /* m */
            opt_gnss_bias_m = strtod(argv[k + 1], NULL);
        else if (strcmp(argv[k], "--gnss-heights") == 0)   /* geoid or ellipsoidal */
            opt_ellipsoidal = strcmp(argv[k + 1], "ellipsoidal") == 0;
        else if (set_option(&custom, argv[k], strtod(argv[k + 1], NULL)) != 0) {
            fprintf(stderr, "hypsim: unknown option %s\n", argv[k]);
            return 2;
        }
    }
    sc = &custom;
    micro_init(sc);
    if (opt_ellipsoidal) {
        /* PROJ directly (not the library): EGM96 heights to WGS84 ellipsoidal */
        PJ_CONTEXT *ctx = proj_ctx = proj_context_create();
        proj_context_set_enable_network(ctx, 0);
        const char *const o[] = {"ALLOW_BALLPARK=NO", NULL};
        PJ *src = proj_create(ctx, "EPSG:4326+5773"), *dst = proj_create(ctx, "EPSG:4979");
        PJ *op = src && dst ? proj_create_crs_to_crs_from_pj(ctx, src, dst, NULL, o) : NULL;
        to_ell = op ? proj_normalize_for_visualization(ctx, op) : NULL;
        proj_destroy(op);
        proj_destroy(src);
        proj_destroy(dst);
        if (!to_ell) {
            fprintf(stderr, "hypsim: PROJ cannot convert EGM96 to ellipsoidal heights here\n");
            return 1;
        }
    }
    int bad = write_base(sc, argv[2]) || write_rover(sc, argv[2]) || write_benchmarks(sc, argv[2]) ||
              write_extra_bases(sc, argv[2]);
    proj_destroy(to_ell);
    if (proj_ctx)
        proj_context_destroy(proj_ctx);
    if (bad)
        return 1;
    FILE *f = open_out(argv[2], "scenario.txt");
    if (!f)
        return 1;
    fprintf(f, "scenario %s\nbase_height_m %.3f\nbase_lat %.6f\nbase_lon %.6f\n"
               "rover_offset_pa %.2f\nrover_drift_pa_per_h %.2f\nrover_noise_pa %.2f\nrover_quantum_pa %.2f\n"
               "base_noise_pa %.2f\nbase_quantum_pa %.2f\nbase_clock_s %.1f\n",
            sc->name, sc->base_h, sc->lat0, sc->lon0, sc->rover_off_pa, sc->rover_drift_pa_h,
            sc->rover_noise_pa, sc->rover_q_pa, sc->base_noise_pa, sc->base_q_pa, sc->base_clock_s);
    for (int k = 0; k < sc->n_extra; k++) {   /* where the further loggers stand */
        double lat, lon;
        latlon(sc, sc->extra[k].east_km, sc->extra[k].north_km, &lat, &lon);
        fprintf(f, "base%d_lat %.6f\nbase%d_lon %.6f\nbase%d_height_m %.3f\nbase%d_offset_pa %.2f\n", k + 2, lat, k + 2,
                lon, k + 2, sc->extra[k].h, k + 2, sc->extra[k].off_pa);
    }
    return fclose(f) != 0;
}
