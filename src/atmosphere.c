/* atmosphere.c - physics kernels: US Standard Atmosphere 1976, WGS84 normal
 * gravity, WMO saturation vapour pressure, virtual temperature and the
 * hypsometric equation. Pure functions; sources cited at each formula. */
#include "hypsolev/atmosphere.h"

#include <math.h>

#define PI 3.14159265358979323846

/* USSA 1976 (NOAA-S/T 76-1562), Table 4: base geopotential heights (m') and
 * molecular-scale temperature gradients (K/m') of the seven layers below
 * 84.852 km', and the sea-level temperature. Base temperatures and
 * pressures follow from these by eqs. 23, 33a and 33b. */
static const double layer_h[8] = {0.0, 11000.0, 20000.0, 32000.0, 47000.0,
                                  51000.0, 71000.0, 84852.0};
static const double layer_l[7] = {-0.0065, 0.0, 0.001, 0.0028, 0.0,
                                  -0.0028, -0.002};

/* g0 M0 / R*, K/m': the hydrostatic constant of USSA 1976 eq. 33. */
#define GMR (HYP_G0_M_S2 * HYP_M0_KG_MOL / HYP_RSTAR_J_MOL_K)

static double layer_pressure(double pb, double tb, double l, double dh)
{
    if (l == 0.0)
        return pb * exp(-GMR * dh / tb);              /* eq. 33b */
    return pb * pow(tb / (tb + l * dh), GMR / l);     /* eq. 33a */
}

/* Walks up the layers to the one holding h (or pressure p when h is NaN),
 * returning its index and base temperature and pressure. */
static int find_layer(double h, double p, double *tb, double *pb)
{
    double t = HYP_T0_K, pr = HYP_P0_PA;
    int b = 0;
    for (; b < 6; b++) {
        double dh = layer_h[b + 1] - layer_h[b];
        double pn = layer_pressure(pr, t, layer_l[b], dh);
        if (h == h ? h < layer_h[b + 1] : p > pn)
            break;
        t += layer_l[b] * dh;
        pr = pn;
    }
    *tb = t;
    *pb = pr;
    return b;
}

double hyp_geopotential_from_geometric_m(double z_m)
{
    return HYP_R0_M * z_m / (HYP_R0_M + z_m);         /* USSA 1976 eq. 18 */
}

double hyp_geometric_from_geopotential_m(double h_gp_m)
{
    return HYP_R0_M * h_gp_m / (HYP_R0_M - h_gp_m);   /* eq. 18 inverted */
}

double hyp_isa_temperature_k(double h_gp_m)
{
    if (!(h_gp_m >= -5000.0 && h_gp_m <= layer_h[7]))
        return NAN;
    double tb, pb;
    int b = find_layer(h_gp_m, NAN, &tb, &pb);
    return tb + layer_l[b] * (h_gp_m - layer_h[b]);  /* eq. 23 */
}

double hyp_isa_pressure_pa(double h_gp_m)
{
    if (!(h_gp_m >= -5000.0 && h_gp_m <= layer_h[7]))
        return NAN;
    double tb, pb;
    int b = find_layer(h_gp_m, NAN, &tb, &pb);
    return layer_pressure(pb, tb, layer_l[b], h_gp_m - layer_h[b]);
}

double hyp_isa_height_gp_m(double pressure_pa)
{
    if (!(pressure_pa >= 0.3734 && pressure_pa <= 177687.0))
        return NAN;
    double tb, pb;
    int b = find_layer(NAN, pressure_pa, &tb, &pb);
    double l = layer_l[b];
    if (l == 0.0)
        return layer_h[b] + tb / GMR * log(pb / pressure_pa);
    return layer_h[b] + tb / l * (pow(pb / pressure_pa, l / GMR) - 1.0);
}

/* QNH reduction: ICAO Doc 7488 (Manual of the ICAO Standard Atmosphere)
 * troposphere, the same law as USSA 1976 eq. 33a with L = -0.0065 K/m'. */
double hyp_station_from_qnh_pa(double qnh_pa, double h_m)
{
    if (!(h_m >= -1000.0 && h_m <= 11000.0) || !(qnh_pa > 0.0))
        return NAN;
    return qnh_pa * pow(1.0 - 0.0065 * h_m / HYP_T0_K, GMR / 0.0065);
}

double hyp_qnh_from_station_pa(double station_pa, double h_m)
{
    if (!(h_m >= -1000.0 && h_m <= 11000.0) || !(station_pa > 0.0))
        return NAN;
    return station_pa / pow(1.0 - 0.0065 * h_m / HYP_T0_K, GMR / 0.0065);
}

/* WGS84 defining and derived constants, NIMA TR8350.2 (3rd ed., 2000),
 * Tables 3.1 and 3.3. */
#define WGS84_A        6378137.0
#define WGS84_F        (1.0 / 298.257223563)
#define WGS84_GE       9.7803253359          /* normal gravity at the equator */
#define WGS84_K        0.00193185265241      /* Somigliana's constant */
#define WGS84_E2       0.00669437999013      /* first eccentricity squared */
#define WGS84_M        0.00344978650684      /* w^2 a^2 b / GM */

double hyp_gravity_normal_m_s2(double lat_deg)
{
    if (!(lat_deg >= -90.0 && lat_deg <= 90.0))
        return NAN;
    double s = sin(lat_deg * PI / 180.0);
    double s2 = s * s;
    /* TR8350.2 eq. 4-1 */
    return WGS84_GE * (1.0 + WGS84_K * s2) / sqrt(1.0 - WGS84_E2 * s2);
}

/* TR8350.2 eq. 4-3 for gravity g on the ellipsoid and sin^2(lat) s2. */
static double height_term(double g, double s2, double h_m)
{
    return g * (1.0 - 2.0 / WGS84_A * (1.0 + WGS84_F + WGS84_M - 2.0 * WGS84_F * s2) * h_m
                + 3.0 / (WGS84_A * WGS84_A) * h_m * h_m);
}

hyp_gravity hyp_gravity_at_lat(double lat_deg)
{
    hyp_gravity g = {NAN, NAN};
    if (!(lat_deg >= -90.0 && lat_deg <= 90.0))
        return g;
    double s = sin(lat_deg * PI / 180.0);
    g.s2 = s * s;
    /* TR8350.2 eq. 4-1 */
    g.g0 = WGS84_GE * (1.0 + WGS84_K * g.s2) / sqrt(1.0 - WGS84_E2 * g.s2);
    return g;
}

double hyp_gravity_h_m_s2(const hyp_gravity *g, double h_m)
{
    if (g->g0 != g->g0 || h_m != h_m)
        return NAN;
    return height_term(g->g0, g->s2, h_m);
}

double hyp_gravity_at_height_m_s2(double lat_deg, double h_m)
{
    hyp_gravity g = hyp_gravity_at_lat(lat_deg);
    return hyp_gravity_h_m_s2(&g, h_m);
}

double hyp_svp_water_pa(double temp_k)
{
    double t = temp_k - 273.15;
    if (!(t >= -45.0 && t <= 60.0))
        return NAN;
    return 611.2 * exp(17.62 * t / (243.12 + t));    /* WMO-No. 8 Annex 4.B */
}

double hyp_svp_enhancement(double pressure_pa)
{
    double p = pressure_pa / 100.0;
    if (!(p > 0.0))
        return NAN;
    return 1.0016 + 3.15e-6 * p - 0.074 / p;         /* WMO-No. 8 Annex 4.B */
}

double hyp_virtual_temperature_k(double temp_k, double rh_pct, double pressure_pa)
{
    if (!(rh_pct >= 0.0 && rh_pct <= 100.0) || !(pressure_pa > 1000.0))
        return NAN;
    double ew = hyp_svp_water_pa(temp_k);
    if (ew != ew)
        return NAN;
    double e = rh_pct / 100.0 * hyp_svp_enhancement(pressure_pa) * ew;
    if (!(e < pressure_pa))
        return NAN;
    double r = HYP_EPSILON * e / (pressure_pa - e);   /* mixing ratio */
    return temp_k * (1.0 + r / HYP_EPSILON) / (1.0 + r);
}

double hyp_layer_mean_temperature_k(double t1_k, double t2_k)
{
    if (!(t1_k > 0.0 && t2_k > 0.0))
        return NAN;
    double d = t1_k - t2_k;
    if (fabs(d) < 1e-6 * t1_k)
        return 0.5 * (t1_k + t2_k);
    return d / log(t1_k / t2_k);
}

double hyp_hypsometric_dphi_j_kg(double p1_pa, double p2_pa, double tv_mean_k)
{
    if (!(p1_pa > 0.0 && p2_pa > 0.0 && tv_mean_k > 0.0))
        return NAN;
    return HYP_RD_J_KG_K * tv_mean_k * log(p1_pa / p2_pa);
}

double hyp_height_difference_g_m(double dphi_j_kg, double h1_m, const hyp_gravity *g)
{
    if (g->g0 != g->g0 || dphi_j_kg != dphi_j_kg || h1_m != h1_m)
        return NAN;
    /* Normal gravity is linear in h to 1e-7 over a few km, so the mean over
     * the layer is its value at mid-layer: two fixed-point steps. */
    double dz = dphi_j_kg / height_term(g->g0, g->s2, h1_m);
    for (int i = 0; i < 2; i++)
        dz = dphi_j_kg / height_term(g->g0, g->s2, h1_m + 0.5 * dz);
    return dz;
}

double hyp_height_difference_m(double dphi_j_kg, double h1_m, double lat_deg)
{
    hyp_gravity g = hyp_gravity_at_lat(lat_deg);
    return hyp_height_difference_g_m(dphi_j_kg, h1_m, &g);
}

/* Barometric altitude: the USSA 1976 pressure law (eqs. 33a, 33b) with
 * every pressure scaled by ref / P0, as an altimeter's reference setting
 * scales it (ICAO Doc 7488 troposphere; see atmosphere.h). */
double hyp_baro_altitude_to_pressure_pa(double alt_m, double ref_pa)
{
    if (!(alt_m >= -5000.0 && alt_m <= 20000.0) || !(ref_pa >= 10000.0 && ref_pa <= 120000.0))
        return NAN;
    return hyp_isa_pressure_pa(alt_m) * (ref_pa / HYP_P0_PA);
}

double hyp_baro_altitude_from_pressure_m(double pressure_pa, double ref_pa)
{
    if (!(ref_pa >= 10000.0 && ref_pa <= 120000.0) || !(pressure_pa > 0.0))
        return NAN;
    double h = hyp_isa_height_gp_m(pressure_pa * (HYP_P0_PA / ref_pa));
    return h >= -5000.0 && h <= 20000.0 ? h : NAN;
}
