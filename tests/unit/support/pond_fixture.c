/* See pond_fixture.h. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "pond_fixture.h"

void pond_fixture(hs_site *site, hs_pond *pond, hs_signal sig[HS_QUANTITY_COUNT],
                  hs_reading rd[HS_QUANTITY_COUNT])
{
    memset(site, 0, sizeof *site);
    memset(pond, 0, sizeof *pond);
    snprintf(site->site.name, sizeof site->site.name, "t");
    site->site.latitude_deg = 40.0;
    site->site.reference_temperature_c = 20.0;
    site->site.baume_modulus = 145.0;
    pond->pressure_spacing_m = 0.5;
    pond->pressure_height_m = 0.1;
    pond->distance_height_m = 2.0;
    pond->feed_index = -1;
    site->ponds = pond;
    site->n_ponds = 1;
    for (int q = 0; q < HS_QUANTITY_COUNT; q++) {
        memset(&sig[q], 0, sizeof sig[q]);
        sig[q].quantity = (hs_quantity)q;
        sig[q].pond_index = 0;
        sig[q].si_factor = 1.0;
        memset(&rd[q], 0, sizeof rd[q]);
        rd[q].value = NAN;
        rd[q].quality = HS_QUALITY_BAD;
    }
    site->signals = sig;
    site->n_signals = HS_QUANTITY_COUNT;
}
