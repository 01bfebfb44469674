/* "Did you mean": the known name nearest to a mistyped one, for messages
 * about unknown keys, sections, ponds, signals and commands.
 *
 * Nearness is the optimal-string-alignment distance (insertions, deletions,
 * substitutions and swaps of neighbours, each 1), with case ignored and '-'
 * and '_' taken as the same letter, since both slips are common in site
 * files and on command lines. A candidate is offered only when it is close
 * enough to be a slip: at most 1 edit for names up to 4 letters, 2 up to 8,
 * 3 beyond, and never the same as the given name.
 * Pure: no allocation (names longer than HS_SUGGEST_MAX are not compared). */
#ifndef HS_SUGGEST_H
#define HS_SUGGEST_H

#include <stddef.h>

#define HS_SUGGEST_MAX 64

/* A growing search: start with hs_suggest_init, offer every known name, then
 * read best (NULL when nothing is close enough). The struct keeps pointers to
 * the offered names: they must outlive it. */
typedef struct {
    const char *given;
    const char *best;
    int best_distance;
} hs_suggest;

void hs_suggest_init(hs_suggest *s, const char *given);
void hs_suggest_offer(hs_suggest *s, const char *candidate);

/* Edit distance as described above; -1 when either name is too long. */
int hs_suggest_distance(const char *a, const char *b);

/* Writes " (did you mean 'X'?)" into buf when s found a candidate, else "".
 * Returns buf, for use as a printf argument. */
const char *hs_suggest_text(const hs_suggest *s, char *buf, size_t len);

#endif
