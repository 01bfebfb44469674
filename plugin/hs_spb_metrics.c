/* Sparkplug metrics of ponds and transfers (see hs_spb_metrics.h). */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "hc_state.h"
#include "hs_spb_metrics.h"
#include "hs_store.h"

#define CODE_ALIAS 50

static const char *const advice_names[] = {"idle", "run", "blocked", "wait"};

void hs_spb_transfer_names_init(hs_spb_transfer_names *t, const char *transfer)
{
    static const char *const leaf[HS_SPB_TRANSFER_METRICS] = {"advice", "pump_on",
                                                              "reason_bits"};
    for (int m = 0; m < HS_SPB_TRANSFER_METRICS; m++)
        snprintf(t->name[m], sizeof t->name[m], "transfer/%.60s/%s", transfer, leaf[m]);
}

int hs_spb_pond_dead(const hs_scada_pond *p)
{
    return !p->have || p->code[HS_CODE_QUALITY] == HS_QUALITY_BAD;
}

static const char *stage_text(uint16_t code)
{
    return code >= 1 && code <= HC_STAGE_COUNT ? hc_stage_name((hc_stage)(code - 1)) : NULL;
}

static const char *quality_text(uint16_t code)
{
    return code < HS_QUALITY_COUNT ? hs_quality_name((hs_quality)code) : NULL;
}

/* Code c of a pond as a metric (value only; name/type added for births). */
static hp_spb_metric code_metric(size_t i, const hs_scada_pond *p, hs_scada_code c)
{
    static const char *const names[] = {"stage", "next_stage", "quality", "alarm_bits",
                                        "method", "level_quality"};
    hp_spb_metric m = {.name = names[c], .alias = 1000 * (i + 1) + CODE_ALIAS + c,
                       .type = HP_SPB_STRING};
    uint16_t v = p->code[c];
    switch (c) {
    case HS_CODE_STAGE:
    case HS_CODE_NEXT_STAGE: m.text = stage_text(v); break;
    case HS_CODE_QUALITY:
    case HS_CODE_LEVEL_QUALITY: m.text = quality_text(v); break;
    case HS_CODE_METHOD:
        m.text = v < HC_METHOD_COUNT ? hc_method_name((hc_method)v) : NULL;
        break;
    default:
        m.type = HP_SPB_UINT16;
        m.number = v;
        break;
    }
    m.is_null = m.type == HP_SPB_STRING && m.text == NULL;
    return m;
}

static hp_spb_metric number_metric(size_t i, size_t k, double v)
{
    return (hp_spb_metric){.name = hs_scada_pond_points[k].name,
                           .alias = 1000 * (i + 1) + k, .type = HP_SPB_FLOAT, .number = v,
                           .is_null = !isfinite(v), .unit = hs_scada_pond_points[k].unit};
}

size_t hs_spb_pond_birth(size_t i, const hs_scada_pond *p, hp_spb_metric *out)
{
    size_t n = 0;
    for (size_t k = 0; k < hs_scada_pond_n_points; k++) {
        out[n] = number_metric(i, k, p->number[k]);
        out[n++].with_type = 1;
    }
    for (int c = 0; c < HS_CODE_TIME_HI; c++) {
        out[n] = code_metric(i, p, (hs_scada_code)c);
        out[n++].with_type = 1;
    }
    return n;
}

static int number_changed(double sent, double now, double deadband)
{
    if (isnan(sent) || isnan(now))
        return isnan(sent) != isnan(now);
    return fabs(now - sent) > deadband;
}

size_t hs_spb_pond_changes(size_t i, hs_scada_pond *sent, const hs_scada_pond *now,
                           hp_spb_metric *out)
{
    size_t n = 0;
    for (size_t k = 0; k < hs_scada_pond_n_points; k++)
        if (number_changed(sent->number[k], now->number[k], hs_scada_pond_points[k].deadband)) {
            sent->number[k] = now->number[k];
            out[n] = number_metric(i, k, now->number[k]);
            out[n].name = NULL;
            out[n++].unit = NULL;
        }
    for (int c = 0; c < HS_CODE_TIME_HI; c++)
        if (sent->code[c] != now->code[c]) {
            sent->code[c] = now->code[c];
            out[n] = code_metric(i, now, (hs_scada_code)c);
            out[n++].name = NULL;
        }
    sent->have = now->have;
    sent->time_s = now->time_s;
    return n;
}

size_t hs_spb_node_death(uint64_t bd_seq, hp_spb_metric *out)
{
    out[0] = (hp_spb_metric){.name = "bdSeq", .type = HP_SPB_UINT64, .with_type = 1,
                             .u64 = bd_seq};
    return 1;
}

size_t hs_spb_node_birth(uint64_t bd_seq, hp_spb_metric *out)
{
    hs_spb_node_death(bd_seq, out);
    out[1] = (hp_spb_metric){.name = "Node Control/Rebirth", .type = HP_SPB_BOOLEAN,
                             .with_type = 1, .number = 0};
    return 2;
}

static size_t transfer_metrics(size_t j, const hs_scada_transfer *t, unsigned which,
                               hp_spb_metric *out)
{
    size_t n = 0;
    uint64_t base = 100 + 4 * (uint64_t)j;
    if (which & 1u)
        out[n++] = (hp_spb_metric){.alias = base, .type = HP_SPB_STRING,
                                   .text = t->advice < 4 ? advice_names[t->advice] : NULL,
                                   .is_null = t->advice >= 4};
    if (which & 2u)
        out[n++] = (hp_spb_metric){.alias = base + 1, .type = HP_SPB_BOOLEAN,
                                   .number = t->pump_on ? 1 : 0, .is_null = t->advice >= 4};
    if (which & 4u)
        out[n++] = (hp_spb_metric){.alias = base + 2, .type = HP_SPB_UINT32,
                                   .number = t->reasons, .is_null = t->advice >= 4};
    return n;
}

size_t hs_spb_transfer_birth(size_t j, const hs_spb_transfer_names *names,
                             const hs_scada_transfer *t, hp_spb_metric *out)
{
    size_t n = transfer_metrics(j, t, 7, out);
    for (size_t m = 0; m < n; m++) {
        out[m].name = names->name[m];
        out[m].with_type = 1;
    }
    return n;
}

size_t hs_spb_transfer_changes(size_t j, hs_scada_transfer *sent, const hs_scada_transfer *now,
                               hp_spb_metric *out)
{
    int null_change = (sent->advice >= 4) != (now->advice >= 4);
    unsigned which = (sent->advice != now->advice ? 1u : 0u) |
                     (null_change || sent->pump_on != now->pump_on ? 2u : 0u) |
                     (null_change || sent->reasons != now->reasons ? 4u : 0u);
    *sent = *now;
    return which ? transfer_metrics(j, now, which, out) : 0;
}
