/* Specific gravity and heavy-liquid degree Baume. */
#include <math.h>
#include <stddef.h>

#include "hc_baume.h"
#include "hc_eos80.h"

int hc_baume_modulus_valid(double modulus)
{
    return isfinite(modulus) && modulus > 0.0;
}

hc_status hc_baume_sg(double rho_at_tref_kg_m3, double t_ref_c, double *sg)
{
    if (!isfinite(rho_at_tref_kg_m3) || !isfinite(t_ref_c))
        return HC_ERR_NOT_FINITE;
    if (rho_at_tref_kg_m3 <= 0.0)
        return HC_ERR_NEGATIVE;
    double rho_w = hc_eos80_rho_water(t_ref_c);
    if (isnan(rho_w))
        return HC_ERR_TEMPERATURE_RANGE;
    *sg = rho_at_tref_kg_m3 / rho_w; /* SG(t_ref/t_ref) = rho(t_ref) / rho_w(t_ref) [1] */
    return HC_OK;
}

hc_status hc_baume_from_sg(double sg, double modulus, double *baume)
{
    if (!isfinite(sg) || !isfinite(modulus))
        return HC_ERR_NOT_FINITE;
    if (!hc_baume_modulus_valid(modulus))
        return HC_ERR_ARGUMENT;
    if (sg < 1.0)
        return HC_ERR_DOMAIN;
    *baume = modulus * (1.0 - 1.0 / sg); /* heavy-liquid scale [deg Be] */
    return HC_OK;
}

hc_status hc_sg_from_baume(double baume, double modulus, double *sg)
{
    if (!isfinite(baume) || !isfinite(modulus))
        return HC_ERR_NOT_FINITE;
    if (!hc_baume_modulus_valid(modulus))
        return HC_ERR_ARGUMENT;
    if (baume < 0.0)
        return HC_ERR_NEGATIVE;
    if (baume >= modulus)
        return HC_ERR_DOMAIN;
    *sg = modulus / (modulus - baume); /* inverse of the heavy-liquid scale [1] */
    return HC_OK;
}
