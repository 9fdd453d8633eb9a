/* atmosphere.h - the physics kernels: standard atmosphere, normal gravity,
 * saturation vapour pressure, virtual temperature, hypsometric equation.
 * Every function is pure: no allocation, no state, NaN for input outside its
 * domain. Units are in the parameter names. */
#ifndef HYPSOLEV_ATMOSPHERE_H
#define HYPSOLEV_ATMOSPHERE_H

#include "hypsolev/export.h"

#ifdef __cplusplus
extern "C" {
#endif

/* US Standard Atmosphere 1976 constants (NOAA-S/T 76-1562, 1976). */
#define HYP_G0_M_S2        9.80665      /* standard gravity */
#define HYP_RSTAR_J_MOL_K  8.31432      /* gas constant as USSA 1976 uses it */
#define HYP_M0_KG_MOL      0.0289644    /* mean molar mass of dry air */
#define HYP_RD_J_KG_K      (HYP_RSTAR_J_MOL_K / HYP_M0_KG_MOL) /* 287.053 */
#define HYP_R0_M           6356766.0    /* effective Earth radius for H */
#define HYP_P0_PA          101325.0
#define HYP_T0_K           288.15
/* Ratio of the gas constants of dry air and water vapour, Rd/Rv
 * (WMO-No. 8, 2018, Annex 4.B: 0.62198). */
#define HYP_EPSILON        0.62198

/* Geopotential height H (m') from geometric height z (m) and back,
 * USSA 1976 eq. 18: H = r0 z / (r0 + z). */
HYP_API double hyp_geopotential_from_geometric_m(double z_m);
HYP_API double hyp_geometric_from_geopotential_m(double h_gp_m);

/* USSA 1976 temperature (K) and pressure (Pa) at geopotential height
 * h_gp_m, valid from -5000 m' to 84852 m' (the 86 km geometric top of the
 * seven-layer model); NaN outside. */
HYP_API double hyp_isa_temperature_k(double h_gp_m);
HYP_API double hyp_isa_pressure_pa(double h_gp_m);
/* Inverse of hyp_isa_pressure_pa: geopotential height (m') of a pressure
 * (Pa), from 0.3734 Pa to 177687 Pa (the same domain); NaN outside. */
HYP_API double hyp_isa_height_gp_m(double pressure_pa);

/* Station pressure (Pa) at height h_m (m above mean sea level, taken as
 * geopotential) from QNH (Pa), and QNH from station pressure: the
 * standard-atmosphere reduction, ICAO Doc 7488 / USSA 1976 troposphere:
 * p = QNH * (1 - L h / T0)^(g0 / (Rd L)), L = 0.0065 K/m. Valid for
 * -1000 m <= h <= 11000 m; NaN outside. */
HYP_API double hyp_station_from_qnh_pa(double qnh_pa, double h_m);
HYP_API double hyp_qnh_from_station_pa(double station_pa, double h_m);

/* WGS84 normal gravity (m/s^2) on the ellipsoid at geodetic latitude
 * lat_deg (Somigliana closed form, NIMA TR8350.2, 3rd ed., eq. 4-1), and at
 * ellipsoidal height h_m above it (eq. 4-3, second-order series, valid
 * to about 20 km). lat_deg in [-90, 90], else NaN. */
HYP_API double hyp_gravity_normal_m_s2(double lat_deg);
HYP_API double hyp_gravity_at_height_m_s2(double lat_deg, double h_m);

/* The same, evaluated once per latitude for many heights (the sine is the
 * costly part): g0 is the normal gravity there (NaN outside -90..90), s2
 * the squared sine of the latitude. */
typedef struct hyp_gravity { double g0, s2; } hyp_gravity;
HYP_API hyp_gravity hyp_gravity_at_lat(double lat_deg);
HYP_API double hyp_gravity_h_m_s2(const hyp_gravity *g, double h_m);

/* Saturation vapour pressure over water (Pa) at temp_k, WMO-No. 8 (2018),
 * Annex 4.B: e_w(t) = 6.112 exp(17.62 t / (243.12 + t)) hPa, t in degC,
 * stated for -45 degC <= t <= 60 degC; NaN outside. */
HYP_API double hyp_svp_water_pa(double temp_k);
/* Enhancement factor of moist air f(p) = 1.0016 + 3.15e-6 p - 0.074 / p
 * (p in hPa), WMO-No. 8 Annex 4.B. Dimensionless. */
HYP_API double hyp_svp_enhancement(double pressure_pa);

/* Virtual temperature (K) of moist air at temp_k, relative humidity rh_pct
 * (0..100) and pressure_pa: vapour pressure e = rh/100 f(p) e_w(T), mixing
 * ratio r = eps e / (p - e), Tv = T (1 + r/eps) / (1 + r) (WMO-No. 8 Annex
 * 4.B definitions; Wallace and Hobbs, Atmospheric Science, 2nd ed., eq.
 * 3.59). NaN outside the domains above. */
HYP_API double hyp_virtual_temperature_k(double temp_k, double rh_pct,
                                 double pressure_pa);

/* Layer-mean temperature (K) of a layer whose temperature varies linearly
 * with height from t1_k to t2_k: the logarithmic mean (t1 - t2) / ln(t1/t2),
 * which makes the hypsometric equation exact for a constant lapse rate
 * (it follows from integrating dp/p = -g dz / (R T(z)) with T linear in z). */
HYP_API double hyp_layer_mean_temperature_k(double t1_k, double t2_k);

/* Hypsometric equation: geopotential difference (J/kg = m^2/s^2) between
 * the levels of pressure p1_pa (lower) and p2_pa (upper) for a layer-mean
 * virtual temperature tv_mean_k: Phi2 - Phi1 = Rd Tv ln(p1/p2)
 * (Wallace and Hobbs, eq. 3.29). Positive when p2 < p1. */
HYP_API double hyp_hypsometric_dphi_j_kg(double p1_pa, double p2_pa, double tv_mean_k);

/* Geometric height difference (m) for a geopotential difference dphi_j_kg
 * starting at ellipsoidal height h1_m, latitude lat_deg: solves
 * dphi = integral of g(lat, h) dh with the normal gravity above (two fixed
 * point iterations on the mid-layer gravity, exact to < 0.1 mm per km). */
HYP_API double hyp_height_difference_m(double dphi_j_kg, double h1_m, double lat_deg);
/* The same with the latitude's gravity already evaluated. */
HYP_API double hyp_height_difference_g_m(double dphi_j_kg, double h1_m, const hyp_gravity *g);

/* Barometric (standard-atmosphere) altitude: what an altimeter shows.
 * An altimeter set to reference pressure ref_pa (its "sea-level" setting)
 * shows the USSA 1976 geopotential height of its pressure scaled by
 * P0 / ref_pa: p = hyp_isa_pressure_pa(alt) * ref_pa / P0. In the
 * troposphere this is ICAO Doc 7488's altimeter law p = ref (1 - L H /
 * T0)^(g0 M0 / (R* L)), L = 0.0065 K/m', exactly (the law is a power of
 * ref-free terms times ref); above 11 km' the same scaling is the
 * convention of this library. alt_m is taken as geopotential (m'), as
 * ICAO's pressure altitude is; valid for -5000 m' <= alt_m <= 20000 m'
 * and 10000 Pa <= ref_pa <= 120000 Pa, NaN outside. */
HYP_API double hyp_baro_altitude_to_pressure_pa(double alt_m, double ref_pa);
/* Inverse: the barometric altitude (m') an altimeter set to ref_pa shows
 * at pressure_pa; NaN outside the domain above. */
HYP_API double hyp_baro_altitude_from_pressure_m(double pressure_pa, double ref_pa);

#ifdef __cplusplus
}
#endif
#endif
