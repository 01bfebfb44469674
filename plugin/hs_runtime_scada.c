/* The runtime's SCADA outlets: the read-only Modbus server and the
 * Sparkplug B edge node, each in its own thread, each fed from the runtime's
 * thread with what the pond-state document and the transfer advice say.
 * Neither has a way back: the Modbus server gets only a read function over
 * the register image, the edge node only accepts a rebirth request; nothing
 * here reaches hs_rt_write() or a bus. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <limits.h>

#include "hs_conf_mqtt.h"
#include "hs_conf_scada.h"
#include "hs_log.h"
#include "hs_runtime_private.h"
#include "hs_secret.h"
#include "hs_sparkplug.h"

static int sparkplug_open(hs_runtime *rt)
{
    const hs_mqtt_conf *mq = rt->site.mqtt;
    rt->spb = NULL;
    if (rt->site.sparkplug == NULL)
        return 0;
    if (mq == NULL || !mq->enabled) {
        hs_log(HSP_LOG_NOTICE, "Sparkplug: off with [mqtt] enabled = no");
        return 0;
    }
    char password[256] = "", err[PATH_MAX + 128];
    if (mq->password_file[0] &&
        hs_read_secret(mq->password_file, password, sizeof password, err, sizeof err) != 0) {
        hs_log(HSP_LOG_ERR, "[mqtt] password_file %s", err);
        return -1;
    }
    if (rt->spb_bd_seq_kept < 0) {
        /* after a restart the next bdSeq comes from the store: a host that
         * still holds the old session's death certificate must not see it
         * match the new birth */
        int64_t kept = 0;
        if (hs_store_meta_get(rt->store, "sparkplug_next_bdseq", 0, &kept) == 0 && kept >= 0)
            rt->spb_bd_seq = (uint64_t)kept & 0xFF;
        rt->spb_bd_seq_kept = (int64_t)rt->spb_bd_seq;
    }
    rt->spb = hs_sparkplug_start(&rt->site, password[0] ? password : NULL, rt->spb_bd_seq, err,
                                 sizeof err);
    explicit_bzero(password, sizeof password);
    if (rt->spb == NULL) {
        hs_log(HSP_LOG_ERR, "[sparkplug]: %s", err);
        return -1;
    }
    hs_log(HSP_LOG_NOTICE, "Sparkplug B edge node spBv1.0/%s/.../%s as %s%s%s",
           rt->site.sparkplug->group_id, rt->site.sparkplug->edge_node_id,
           rt->site.sparkplug->client_id, rt->site.sparkplug->primary_host_id[0]
                                              ? ", primary host " : "",
           rt->site.sparkplug->primary_host_id);
    return 0;
}

int hs_rt_scada_open(hs_runtime *rt)
{
    const hs_modbus_server_conf *m = rt->site.modbus_server;
    rt->mb_image = NULL;
    rt->mb_server = NULL;
    if (sparkplug_open(rt) != 0)
        return -1;
    if (m == NULL)
        return 0;
    hp_order order = m->word_order ? HP_ORDER_LITTLE : HP_ORDER_BIG;
    rt->mb_image = hs_mb_image_new(rt->site.n_ponds, rt->site.n_transfers, order);
    if (rt->mb_image == NULL) {
        hs_log(HSP_LOG_ERR, "[modbus_server]: cannot build the register map");
        return -1;
    }
    hp_mbserver_options opt = {
        .listen = m->listen, .unit_id = m->unit_id, .max_clients = m->max_clients,
        .idle_timeout_ms = (int)m->idle_timeout_ms, .allow = &m->acl,
        .read = hs_mb_image_read, .ctx = rt->mb_image,
    };
    char err[256];
    rt->mb_server = hp_mbserver_start(&opt, err, sizeof err);
    if (rt->mb_server == NULL) {
        hs_log(HSP_LOG_ERR, "%s:%d: [modbus_server]: %s", rt->site.path, m->line, err);
        hs_mb_image_free(rt->mb_image);
        rt->mb_image = NULL;
        return -1;
    }
    hs_log(HSP_LOG_NOTICE, "Modbus server (read-only) on %s, unit %u, %s word order%s%s",
           m->listen, m->unit_id, hs_word_order_names[m->word_order],
           m->allow[0] ? ", clients " : "", m->allow);
    return 0;
}

/* Keeps the next session's bdSeq in the store when it changed. */
static void keep_bd_seq(hs_runtime *rt, uint64_t next)
{
    if (rt->store == NULL || (int64_t)next == rt->spb_bd_seq_kept)
        return;
    /* committed at once (it changes once a session): a crash must not
     * bring back a bdSeq already used */
    if (hs_store_meta_set(rt->store, "sparkplug_next_bdseq", (int64_t)next) == 0 &&
        hs_store_flush(rt->store) == 0)
        rt->spb_bd_seq_kept = (int64_t)next;
}

void hs_rt_scada_close(hs_runtime *rt)
{
    if (rt->spb != NULL) {
        rt->spb_bd_seq = hs_sparkplug_stop(rt->spb);
        keep_bd_seq(rt, rt->spb_bd_seq);
    }
    rt->spb = NULL;
    hp_mbserver_stop(rt->mb_server); /* first: the server reads the image */
    rt->mb_server = NULL;
    hs_mb_image_free(rt->mb_image);
    rt->mb_image = NULL;
}

static uint16_t alarm_bits(const hs_runtime *rt, const char *pond)
{
    uint16_t bits = 0;
    for (size_t i = 0; rt->alarms != NULL && i < hs_alarm_count(rt->alarms); i++) {
        hs_alarm_info info;
        if (hs_alarm_get(rt->alarms, i, &info) == 0 && info.active &&
            strcmp(info.pond, pond) == 0 && info.kind < 16)
            bits |= (uint16_t)(1u << info.kind);
    }
    return bits;
}

void hs_rt_scada_pond(hs_runtime *rt, size_t pond, const json_t *doc)
{
    if (rt->mb_image == NULL && rt->spb == NULL)
        return;
    hs_scada_pond p;
    hs_scada_pond_clear(&p);
    hs_scada_pond_from_doc(&p, doc);
    p.code[HS_CODE_ALARM_BITS] = alarm_bits(rt, rt->site.ponds[pond].name);
    if (rt->mb_image != NULL)
        hs_mb_image_pond(rt->mb_image, pond, &p);
    hs_sparkplug_pond(rt->spb, pond, &p);
}

void hs_rt_scada_transfer(hs_runtime *rt, size_t i)
{
    if (rt->mb_image == NULL && rt->spb == NULL)
        return;
    const struct hs_rt_transfer *x = &rt->transfers[i];
    hs_scada_transfer t = {
        .advice = x->have_last ? (uint16_t)x->last.advice : 0xFFFF,
        .pump_on = x->have_last && x->last.pump_on ? 1 : 0,
        .reasons = x->have_last ? x->last.reasons : 0,
    };
    if (rt->mb_image != NULL)
        hs_mb_image_transfer(rt->mb_image, i, &t);
    hs_sparkplug_transfer(rt->spb, i, &t);
}

void hs_rt_scada_beat(hs_runtime *rt, int64_t now_ms)
{
    if (rt->spb != NULL)
        keep_bd_seq(rt, hs_sparkplug_next_bd_seq(rt->spb));
    if (rt->mb_image != NULL)
        hs_mb_image_beat(rt->mb_image, (uint32_t)(now_ms / 1000));
}
