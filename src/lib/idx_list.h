/* idx_list.h — 32-bit index lists (points, facets, vertices, rays): sorting and
 * comparing, shared by hull.c, subdiv.c and complex.c (internal, not installed). */
#ifndef TROPE_IDX_LIST_H
#define TROPE_IDX_LIST_H

#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>

static inline int tp_idx_cmp_u32(const void *a, const void *b)
{
    uint32_t x = *(const uint32_t *)a, y = *(const uint32_t *)b;
    return (x > y) - (x < y);
}

/* Ascending sort: nothing for a sorted list (engines often hand lists over sorted),
 * insertion sort for short lists, qsort beyond. */
static inline void tp_idx_sort(uint32_t *v, size_t m)
{
    size_t s = 1;
    while (s < m && v[s - 1] < v[s])
        s++;
    if (s >= m)
        return;
    if (m > 16) {
        qsort(v, m, sizeof *v, tp_idx_cmp_u32);
        return;
    }
    for (size_t i = 1; i < m; i++) {
        uint32_t x = v[i];
        size_t k = i;
        for (; k > 0 && v[k - 1] > x; k--)
            v[k] = v[k - 1];
        v[k] = x;
    }
}

/* Lexicographic order of two lists, a shorter prefix first. */
static inline int tp_idx_cmp_lists(const uint32_t *a, size_t na, const uint32_t *b,
                                   size_t nb)
{
    size_t m = na < nb ? na : nb;
    for (size_t i = 0; i < m; i++)
        if (a[i] != b[i])
            return a[i] < b[i] ? -1 : 1;
    return (na > nb) - (na < nb);
}

#endif
