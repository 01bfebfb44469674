/* The pond-state document: the one JSON shape of a pond's state that every
 * outlet prints (MQTT pond/<pond>/state, `halostage status --json`,
 * `halostaged --once --json`, the plugin's emit of pond/<pond>/state,
 * `halostage export --json`). Its fields are documented once, in
 * halostage(1) under "POND-STATE DOCUMENT".
 *
 * To add a field: add it to struct hs_pond_doc (unknown = NaN / NULL, set in
 * hs_pond_doc_init), write it in hs_pond_doc_json (hs_pond_doc.c), give it
 * its digits in the table there when 7 significant digits is wrong, fill it
 * where the outlets fill the struct, and add a line to the man page.
 *
 * Ownership: the document borrows its strings (pond, role, notes); the
 * caller keeps them alive while it builds the JSON. The JSON is the
 * caller's (json_decref); the text from hs_doc_dumps is the caller's (free).
 * Error convention: NULL when jansson cannot allocate. */
#ifndef HS_POND_DOC_H
#define HS_POND_DOC_H

#include <stdint.h>

#include <jansson.h>

#include "hc_state.h"
#include "hs_hydro.h"
#include "hs_store.h"

struct hs_pond_doc {
    const char *pond;
    const char *role;              /* NULL: not known to this outlet */
    int64_t t_ms;                  /* newest input behind the state; 0 unknown */
    int64_t now_ms;                /* when the outlet looks at it; 0: no age given */
    int64_t stale_after_ms;        /* older than this is stale; 0: not judged */
    hs_quality quality;            /* worst input behind the brine state */
    int level_quality;             /* hs_quality of the level; -1 unknown */
    hc_brine_state state;
    /* Level and balance (NaN unknown); depth_m is the level reading. */
    struct hs_hydro_report hydro;
    int hydro_known;               /* 0: no balance figures (calibration_drift null) */
    const char *note;              /* why there is no brine state; NULL none */
    const char *uncertain_alarms;  /* "rule,rule": alarm rules whose limit the state
                                      crosses only within 2u (uncertain-source);
                                      NULL: not known to this outlet */
    const char *level_note;        /* why there is no level; NULL none */
};

/* Everything unknown: NaN numbers, HC_STAGE_NONE, NULL strings. */
void hs_pond_doc_init(struct hs_pond_doc *d);

/* A stored state row (history store) as a document; role may be NULL. */
void hs_pond_doc_from_row(struct hs_pond_doc *d, const hs_state_row *row, const char *pond,
                          const char *role);

/* The document's JSON object, fields in documentation order. */
json_t *hs_pond_doc_json(const struct hs_pond_doc *d);

/* The one serialiser of the documents (and of what embeds them): compact
 * JSON whose numbers carry the digits the field has (7 significant unless
 * the digits table says otherwise), never binary noise such as
 * 16.900000000000002. Returns a malloc'ed string. */
char *hs_doc_dumps(const json_t *o);

/* Significant digits of a field by its key (nested keys take the digits of
 * their parent field). */
int hs_doc_digits(const char *key);

#endif
