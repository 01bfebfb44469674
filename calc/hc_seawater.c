/* Reference-composition seawater and the seawater-range brine state. */
#include <math.h>
#include <stddef.h>

#include "hc_baume.h"
#include "hc_eos80.h"
#include "hc_pss78.h"
#include "hc_seawater.h"

static const struct {
    const char *name;
    int charge;
    double molar_mass; /* [g/mol], IUPAC 2005 atomic weights, as Millero et al. (2008) used */
    double g_per_kg;   /* [g per kg seawater] at S_R = 35.16504, Millero et al. (2008) table 4 */
} ions[HC_SW_ION_COUNT] = {
    [HC_SW_NA] = {"Na", 1, 22.98976928, 10.78145},
    [HC_SW_K] = {"K", 1, 39.0983, 0.39910},
    [HC_SW_MG] = {"Mg", 2, 24.3050, 1.28372},
    [HC_SW_CA] = {"Ca", 2, 40.078, 0.41208},
    [HC_SW_SR] = {"Sr", 2, 87.62, 0.00795},
    [HC_SW_CL] = {"Cl", -1, 35.453, 19.35271},
    [HC_SW_SO4] = {"SO4", -2, 32.065 + 4 * 15.9994, 2.71235},
    [HC_SW_HCO3] = {"HCO3", -1, 1.00794 + 12.0107 + 3 * 15.9994, 0.10481},
    [HC_SW_CO3] = {"CO3", -2, 12.0107 + 3 * 15.9994, 0.01434},
    [HC_SW_BR] = {"Br", -1, 79.904, 0.06728},
};

static int ion_valid(hc_sw_ion ion)
{
    return (int)ion >= 0 && ion < HC_SW_ION_COUNT;
}

const char *hc_sw_ion_name(hc_sw_ion ion)
{
    return ion_valid(ion) ? ions[ion].name : NULL;
}

int hc_sw_ion_charge(hc_sw_ion ion)
{
    return ion_valid(ion) ? ions[ion].charge : 0;
}

double hc_sw_ion_molar_mass(hc_sw_ion ion)
{
    return ion_valid(ion) ? ions[ion].molar_mass : NAN;
}

/* S_R = (35.16504 / 35) S_P, Millero et al. (2008) eq. 7 [g/kg] */
static double sr_from_sp(double sp)
{
    return HC_SW_SR_35 / 35.0 * sp;
}

static hc_status check_sp(double sp)
{
    if (!isfinite(sp))
        return HC_ERR_NOT_FINITE;
    if (sp < 0.0)
        return HC_ERR_NEGATIVE;
    if (sp > HC_PSS78_SP_MAX)
        return HC_ERR_SALINITY_RANGE;
    return HC_OK;
}

hc_status hc_seawater_composition(double sp, unsigned flags, hc_sw_composition *out)
{
    hc_status st = check_sp(sp);
    if (st != HC_OK)
        return st;
    if ((flags & ~(unsigned)(HC_SW_LUMP | HC_SW_DROP_CARBONATE)) != 0 ||
        ((flags & HC_SW_DROP_CARBONATE) && !(flags & HC_SW_LUMP)))
        return HC_ERR_ARGUMENT;

    double sr = sr_from_sp(sp);
    double scale = sr / HC_SW_SR_35;
    double water_kg = 1.0 - sr / 1000.0; /* kg of water per kg of seawater */
    for (int i = 0; i < HC_SW_ION_COUNT; i++)
        out->molality[i] = ions[i].g_per_kg * scale / ions[i].molar_mass / water_kg;
    out->salinity_g_kg = sr;
    out->cl_adjustment_mol_kg = 0.0;
    if (!(flags & HC_SW_LUMP))
        return HC_OK;

    double *m = out->molality;
    m[HC_SW_CA] += m[HC_SW_SR];
    m[HC_SW_SR] = 0.0;
    m[HC_SW_CL] += m[HC_SW_BR];
    m[HC_SW_BR] = 0.0;
    if (flags & HC_SW_DROP_CARBONATE) {
        m[HC_SW_HCO3] = 0.0;
        m[HC_SW_CO3] = 0.0;
    }
    double charge = 0.0; /* sum z_i m_i [eq/kg water] */
    for (int i = 0; i < HC_SW_ION_COUNT; i++)
        charge += ions[i].charge * m[i];
    /* Cl- has z = -1, so adding the excess positive charge balances it. */
    out->cl_adjustment_mol_kg = charge;
    m[HC_SW_CL] += charge;
    return HC_OK;
}

hc_status hc_seawater_cf(double sp, double feed_sp, double *cf)
{
    hc_status st = check_sp(sp);
    if (st != HC_OK)
        return st;
    if (!isfinite(feed_sp))
        return HC_ERR_NOT_FINITE;
    if (feed_sp <= 0.0)
        return HC_ERR_ARGUMENT;
    if (feed_sp > HC_PSS78_SP_MAX)
        return HC_ERR_SALINITY_RANGE;
    double sr = sr_from_sp(sp);
    double sr_feed = sr_from_sp(feed_sp);
    /* CF = (salt/water now) / (salt/water in the feed) [1] */
    *cf = (sr / (1000.0 - sr)) / (sr_feed / (1000.0 - sr_feed));
    return HC_OK;
}

void hc_seawater_options_default(hc_seawater_options *opt)
{
    opt->feed_sp = HC_SW_FEED_SP_DEFAULT;
    opt->reference_temperature_c = HC_TREF_DEFAULT;
    opt->baume_modulus = HC_BAUME_MODULUS_DEFAULT;
}

/* Relative shortfall of CF below 1 that still counts as the feed itself:
 * about the accuracy of a field conductivity cell (common practice, no source). */
#define BELOW_FEED_TOLERANCE 0.001

hc_status hc_seawater_state_from_sp(double sp, double t90_c, double p_dbar,
                                    const hc_seawater_options *opt, hc_brine_state *out)
{
    hc_seawater_options defaults;
    if (opt == NULL) {
        hc_seawater_options_default(&defaults);
        opt = &defaults;
    }
    if (!hc_baume_modulus_valid(opt->baume_modulus))
        return HC_ERR_ARGUMENT;
    if (!isfinite(opt->feed_sp) || opt->feed_sp <= 0.0 || opt->feed_sp > HC_PSS78_SP_MAX)
        return HC_ERR_ARGUMENT;

    double rho, rho_ref, sg, baume, cf;
    hc_status st = hc_eos80_rho(sp, t90_c, p_dbar, &rho);
    if (st != HC_OK)
        return st;
    /* SG is defined at the reference temperature and one atmosphere for
     * the same composition, not from the density at pond temperature. */
    st = hc_eos80_rho(sp, opt->reference_temperature_c, 0.0, &rho_ref);
    if (st == HC_OK)
        st = hc_baume_sg(rho_ref, opt->reference_temperature_c, &sg);
    if (st == HC_OK)
        st = hc_baume_from_sg(sg, opt->baume_modulus, &baume);
    if (st == HC_OK)
        st = hc_seawater_cf(sp, opt->feed_sp, &cf);
    if (st != HC_OK)
        return st;

    hc_state_clear(out);
    out->practical_salinity = sp;
    out->salinity_g_kg = sr_from_sp(sp);
    out->density_kg_m3 = rho;
    out->density_ref_kg_m3 = rho_ref;
    out->temperature_c = t90_c;
    out->specific_gravity = sg;
    out->reference_temperature_c = opt->reference_temperature_c;
    out->baume = baume;
    out->baume_modulus = opt->baume_modulus;
    out->concentration_factor = cf;
    out->stage = HC_STAGE_SEAWATER;
    out->next_stage = HC_STAGE_NONE;
    if (cf < 1.0 - BELOW_FEED_TOLERANCE)
        out->warnings |= HC_WARN_BELOW_FEED;
    if (hc_eos80_t_extrapolated(t90_c) || hc_eos80_t_extrapolated(opt->reference_temperature_c))
        out->warnings |= HC_WARN_TEMPERATURE_EXTRAPOLATED;
    return HC_OK;
}

hc_status hc_seawater_state_from_conductivity(double cond_ms_cm, double t90_c, double p_dbar,
                                              const hc_seawater_options *opt,
                                              hc_brine_state *out)
{
    double sp;
    unsigned warn = 0;
    hc_status st = hc_pss78_sp_from_c(cond_ms_cm, t90_c, p_dbar, &sp, &warn);
    if (st != HC_OK)
        return st;
    st = hc_seawater_state_from_sp(sp, t90_c, p_dbar, opt, out);
    if (st != HC_OK)
        return st;
    out->method = HC_METHOD_PSS78;
    out->warnings |= warn;
    return HC_OK;
}

hc_status hc_seawater_state_from_density(double rho_kg_m3, double t90_c, double p_dbar,
                                         const hc_seawater_options *opt, hc_brine_state *out)
{
    double sp;
    hc_status st = hc_eos80_sp_from_rho(rho_kg_m3, t90_c, p_dbar, &sp);
    if (st != HC_OK)
        return st;
    st = hc_seawater_state_from_sp(sp, t90_c, p_dbar, opt, out);
    if (st != HC_OK)
        return st;
    out->method = HC_METHOD_DENSITY_INPUT;
    return HC_OK;
}
