/* "Did you mean" (see hs_suggest.h). */
#include <stdio.h>
#include <string.h>

#include "hs_suggest.h"

static char fold(char c)
{
    if (c >= 'A' && c <= 'Z')
        return (char)(c - 'A' + 'a');
    return c == '-' ? '_' : c;
}

static int min3(int a, int b, int c)
{
    int m = a < b ? a : b;
    return m < c ? m : c;
}

int hs_suggest_distance(const char *a, const char *b)
{
    size_t n = strlen(a), m = strlen(b);
    if (n > HS_SUGGEST_MAX || m > HS_SUGGEST_MAX)
        return -1;
    /* Three rows of the dynamic-programming table suffice for the swap rule. */
    int rows[3][HS_SUGGEST_MAX + 1];
    int *prev2 = rows[0], *prev = rows[1], *cur = rows[2];
    for (size_t j = 0; j <= m; j++)
        prev[j] = (int)j;
    for (size_t i = 1; i <= n; i++) {
        cur[0] = (int)i;
        for (size_t j = 1; j <= m; j++) {
            int cost = fold(a[i - 1]) == fold(b[j - 1]) ? 0 : 1;
            cur[j] = min3(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
            if (i > 1 && j > 1 && fold(a[i - 1]) == fold(b[j - 2]) &&
                fold(a[i - 2]) == fold(b[j - 1]) && prev2[j - 2] + 1 < cur[j])
                cur[j] = prev2[j - 2] + 1;
        }
        int *t = prev2;
        prev2 = prev;
        prev = cur;
        cur = t;
    }
    return prev[m];
}

static int allowed(const char *given)
{
    size_t n = strlen(given);
    return n <= 4 ? 1 : n <= 8 ? 2 : 3;
}

void hs_suggest_init(hs_suggest *s, const char *given)
{
    s->given = given;
    s->best = NULL;
    s->best_distance = 0;
}

void hs_suggest_offer(hs_suggest *s, const char *candidate)
{
    if (candidate == NULL || s->given == NULL || strcmp(candidate, s->given) == 0)
        return;
    int d = hs_suggest_distance(s->given, candidate);
    if (d < 0 || d > allowed(s->given))
        return;
    if (s->best == NULL || d < s->best_distance) {
        s->best = candidate;
        s->best_distance = d;
    }
}

const char *hs_suggest_text(const hs_suggest *s, char *buf, size_t len)
{
    if (len == 0)
        return buf;
    if (s->best != NULL)
        snprintf(buf, len, " (did you mean '%s'?)", s->best);
    else
        buf[0] = '\0';
    return buf;
}
