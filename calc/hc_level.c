/* Pond level from pressure and distance sensors (see hc_level.h). */
#include "hc_level.h"

#include <math.h>
#include <stddef.h>

#define DEG_TO_RAD (3.14159265358979323846 / 180.0)
/* Echo noise tolerated at an empty pond [m] (common practice, no source). */
#define DRY_TOLERANCE_M 0.02

/* Error convention: hc_status. */
hc_status hc_gravity(double lat_deg, double elevation_m, double *g_m_s2)
{
    if (g_m_s2 == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(lat_deg) || !isfinite(elevation_m))
        return HC_ERR_NOT_FINITE;
    if (fabs(lat_deg) > 90 || fabs(elevation_m) > 9000)
        return HC_ERR_DOMAIN;
    double s = sin(lat_deg * DEG_TO_RAD), s2 = s * s;
    /* GRS80 normal gravity series, as in gsw_grav [m/s2]. */
    double g0 = 9.780327 * (1.0 + (5.2792e-3 + 2.32e-5 * s2) * s2);
    /* Free-air gradient 3.086e-6 s^-2 per metre [m/s2]. */
    *g_m_s2 = g0 - 3.086e-6 * elevation_m;
    return HC_OK;
}

static int usable_g_rho(double g, double rho)
{
    return isfinite(g) && isfinite(rho) && g > 0 && rho > 0;
}

hc_status hc_depth_from_pressure(double p_pa, double rho_kg_m3, double g_m_s2,
                                 double z_mount_m, double *depth_m)
{
    if (depth_m == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(p_pa) || !isfinite(z_mount_m))
        return HC_ERR_NOT_FINITE;
    if (!usable_g_rho(g_m_s2, rho_kg_m3))
        return isfinite(g_m_s2) && isfinite(rho_kg_m3) ? HC_ERR_NEGATIVE : HC_ERR_NOT_FINITE;
    if (z_mount_m < 0)
        return HC_ERR_NEGATIVE;
    if (p_pa <= 0)
        return HC_ERR_DOMAIN;
    /* Hydrostatics: p = rho g (d - z_mount) [Pa]. */
    *depth_m = p_pa / (rho_kg_m3 * g_m_s2) + z_mount_m;
    return HC_OK;
}

hc_status hc_density_from_pressure_pair(double p_lower_pa, double p_upper_pa, double dz_m,
                                        double g_m_s2, double *rho_kg_m3)
{
    if (rho_kg_m3 == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(p_lower_pa) || !isfinite(p_upper_pa) || !isfinite(dz_m) || !isfinite(g_m_s2))
        return HC_ERR_NOT_FINITE;
    if (dz_m <= 0 || g_m_s2 <= 0)
        return HC_ERR_ARGUMENT;
    if (p_upper_pa <= 0 || p_lower_pa <= p_upper_pa)
        return HC_ERR_DOMAIN;
    /* Hydrostatics between the two sensors: dp = rho g dz [Pa]. */
    *rho_kg_m3 = (p_lower_pa - p_upper_pa) / (g_m_s2 * dz_m);
    return HC_OK;
}

hc_status hc_depth_from_distance(double distance_m, double z_face_m, double *depth_m)
{
    if (depth_m == NULL)
        return HC_ERR_ARGUMENT;
    if (!isfinite(distance_m) || !isfinite(z_face_m))
        return HC_ERR_NOT_FINITE;
    if (distance_m < 0 || z_face_m < 0)
        return HC_ERR_NEGATIVE;
    double d = z_face_m - distance_m;
    if (d < -DRY_TOLERANCE_M)
        return HC_ERR_DOMAIN;
    *depth_m = d > 0 ? d : 0;
    return HC_OK;
}
