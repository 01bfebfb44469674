/* Sparkplug B payloads on protobuf-c (see hp_spb.h). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <jansson.h>

#include "hp_spb.h"
#include "protocol/sparkplug_b.pb-c.h" /* generated: build/gen */

typedef Halostage__Spb__Payload Payload;
typedef Halostage__Spb__Payload__Metric Metric;
typedef Halostage__Spb__Payload__PropertySet PropertySet;
typedef Halostage__Spb__Payload__PropertyValue PropertyValue;

/* One metric with its unit property, laid out so nothing is allocated per
 * field: the arrays of pointers point into this struct. */
struct metric_box {
    Metric metric;
    PropertySet props;
    PropertyValue unit_value;
    char *keys[1];
    PropertyValue *values[1];
};

static void fill(struct metric_box *b, const hp_spb_metric *m)
{
    Metric init = HALOSTAGE__SPB__PAYLOAD__METRIC__INIT;
    PropertySet pinit = HALOSTAGE__SPB__PAYLOAD__PROPERTY_SET__INIT;
    PropertyValue vinit = HALOSTAGE__SPB__PAYLOAD__PROPERTY_VALUE__INIT;
    b->metric = init;
    b->props = pinit;
    b->unit_value = vinit;
    Metric *x = &b->metric;
    x->name = (char *)(uintptr_t)m->name; /* protobuf-c's struct is not const; only read */
    if (m->alias) {
        x->has_alias = 1;
        x->alias = m->alias;
    }
    if (m->timestamp_ms) {
        x->has_timestamp = 1;
        x->timestamp = m->timestamp_ms;
    }
    if (m->with_type) {
        x->has_datatype = 1;
        x->datatype = (uint32_t)m->type;
    }
    int unknown = m->is_null || (m->type != HP_SPB_STRING && m->type != HP_SPB_UINT64 &&
                                 !isfinite(m->number)) ||
                  (m->type == HP_SPB_STRING && m->text == NULL);
    if (unknown) {
        x->has_is_null = 1;
        x->is_null = 1;
    } else {
        switch (m->type) {
        case HP_SPB_UINT16:
        case HP_SPB_UINT32:
            x->value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_INT_VALUE;
            x->int_value = (uint32_t)m->number;
            break;
        case HP_SPB_UINT64:
            x->value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_LONG_VALUE;
            x->long_value = m->u64;
            break;
        case HP_SPB_FLOAT:
            x->value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_FLOAT_VALUE;
            x->float_value = (float)m->number;
            break;
        case HP_SPB_DOUBLE:
            x->value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_DOUBLE_VALUE;
            x->double_value = m->number;
            break;
        case HP_SPB_BOOLEAN:
            x->value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_BOOLEAN_VALUE;
            x->boolean_value = m->number != 0;
            break;
        case HP_SPB_STRING:
            x->value_case = HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_STRING_VALUE;
            x->string_value = (char *)(uintptr_t)m->text;
            break;
        }
    }
    if (m->unit != NULL) {
        b->keys[0] = "unit";
        b->unit_value.has_type = 1;
        b->unit_value.type = HP_SPB_STRING;
        b->unit_value.value_case = HALOSTAGE__SPB__PAYLOAD__PROPERTY_VALUE__VALUE_STRING_VALUE;
        b->unit_value.string_value = (char *)(uintptr_t)m->unit;
        b->values[0] = &b->unit_value;
        b->props.n_keys = b->props.n_values = 1;
        b->props.keys = b->keys;
        b->props.values = b->values;
        x->properties = &b->props;
    }
}

int hp_spb_encode(uint64_t timestamp_ms, int seq, const hp_spb_metric *metrics, size_t n,
                  uint8_t **out, size_t *len)
{
    *out = NULL;
    *len = 0;
    struct metric_box *boxes = calloc(n ? n : 1, sizeof *boxes);
    Metric **list = calloc(n ? n : 1, sizeof *list);
    if (boxes == NULL || list == NULL)
        goto fail;
    for (size_t i = 0; i < n; i++) {
        fill(&boxes[i], &metrics[i]);
        list[i] = &boxes[i].metric;
    }
    Payload p = HALOSTAGE__SPB__PAYLOAD__INIT;
    p.has_timestamp = 1;
    p.timestamp = timestamp_ms;
    if (seq >= 0) {
        p.has_seq = 1;
        p.seq = (uint64_t)seq;
    }
    p.n_metrics = n;
    p.metrics = list;
    size_t size = halostage__spb__payload__get_packed_size(&p);
    *out = malloc(size ? size : 1);
    if (*out == NULL)
        goto fail;
    *len = halostage__spb__payload__pack(&p, *out);
    free(boxes);
    free(list);
    return 0;
fail:
    free(boxes);
    free(list);
    return -1;
}

int hp_spb_command_is(const void *payload, size_t len, const char *control_name, char *why,
                      size_t whylen)
{
    Payload *p = halostage__spb__payload__unpack(NULL, len, payload);
    if (p == NULL) {
        snprintf(why, whylen, "not a Sparkplug B payload (%zu bytes)", len);
        return -1;
    }
    int yes = 0;
    if (p->n_metrics != 1) {
        snprintf(why, whylen, "%zu metrics; only %s = true is accepted", p->n_metrics,
                 control_name);
    } else {
        const Metric *m = p->metrics[0];
        if (m->name == NULL || strcmp(m->name, control_name) != 0)
            snprintf(why, whylen, "metric '%.80s' refused; only %s = true is accepted",
                     m->name ? m->name : "(by alias)", control_name);
        else if (m->value_case != HALOSTAGE__SPB__PAYLOAD__METRIC__VALUE_BOOLEAN_VALUE ||
                 !m->boolean_value)
            snprintf(why, whylen, "%s must be the Boolean true", control_name);
        else
            yes = 1;
    }
    halostage__spb__payload__free_unpacked(p, NULL);
    return yes;
}

int hp_spb_state_parse(const void *payload, size_t len, int *online, uint64_t *timestamp_ms)
{
    json_error_t e;
    json_t *o = json_loadb(payload, len, 0, &e);
    const json_t *on = json_object_get(o, "online"), *ts = json_object_get(o, "timestamp");
    int ok = json_is_boolean(on) && json_is_integer(ts) && json_integer_value(ts) >= 0;
    if (ok) {
        *online = json_is_true(on);
        *timestamp_ms = (uint64_t)json_integer_value(ts);
    }
    json_decref(o);
    return ok ? 0 : -1;
}
