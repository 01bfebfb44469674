/* Pond level from field sensors: hydrostatic pressure compensated by the
 * pond's own brine density and local gravity, brine density from two
 * pressure sensors, and distance-from-datum (radar, ultrasonic) sensors.
 *
 * Units: pressure p [Pa] (gauge, i.e. above the atmosphere: a vented
 * sensor), density rho [kg/m3], gravity g [m/s2], heights and depths [m]
 * above the pond floor datum, latitude [deg N].
 * Error convention: hc_status (HC_OK = 0); outputs unspecified on failure. */
#ifndef HC_LEVEL_H
#define HC_LEVEL_H

#include "hc_status.h"

/* Standard gravity g_n = 9.80665 m/s2 (CGPM 1901; ISO 80000-3). */
#define HC_STANDARD_GRAVITY 9.80665

/* Normal gravity at the ellipsoid (sea level) for latitude lat_deg:
 * g = 9.780327 (1 + (5.2792e-3 + 2.32e-5 sin^2 phi) sin^2 phi) [m/s2], the
 * GRS80 series used by TEOS-10 gsw_grav at p = 0 (IOC, SCOR & IAPSO 2010,
 * TEOS-10 manual; Moritz 2000, J. Geodesy 74, 128). Above sea level the
 * free-air gradient -3.086e-6 s^-2 per metre of elevation_m applies (common
 * geodetic value, from memory). |lat| > 90 or |elevation| > 9000 m gives
 * HC_ERR_DOMAIN. */
hc_status hc_gravity(double lat_deg, double elevation_m, double *g_m_s2);

/* Depth of brine above the floor from a submerged pressure sensor:
 * d = p / (rho g) + z_mount (hydrostatics; the density is the pond's brine,
 * not water's). p_pa is gauge pressure; z_mount_m is the sensor's height
 * above the floor. p <= 0 (sensor dry or out of the water) gives
 * HC_ERR_DOMAIN: the level is then only known to be at most z_mount. */
hc_status hc_depth_from_pressure(double p_pa, double rho_kg_m3, double g_m_s2,
                                 double z_mount_m, double *depth_m);

/* Brine density from two submerged sensors a vertical distance dz apart:
 * rho = (p_lower - p_upper) / (g dz) (hydrostatics). dz <= 0 is an
 * argument error; a non-positive difference, or either sensor reading
 * p <= 0 (out of the water), gives HC_ERR_DOMAIN. */
hc_status hc_density_from_pressure_pair(double p_lower_pa, double p_upper_pa, double dz_m,
                                        double g_m_s2, double *rho_kg_m3);

/* Depth from a distance sensor looking down at the surface from height
 * z_face_m above the floor: d = z_face - distance. A distance up to
 * 0.02 m beyond the floor reads as an empty pond (echo noise; common
 * practice, no source); beyond that, HC_ERR_DOMAIN. */
hc_status hc_depth_from_distance(double distance_m, double z_face_m, double *depth_m);

#endif
