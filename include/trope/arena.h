/* trope/arena.h — a bump allocator for the many small arrays of one structure.
 *
 * Hull facets, subdivision cells and complex vertices each hold millions of short
 * lists; one malloc per list costs 16 bytes of bookkeeping and a page fault every few
 * hundred lists. An arena hands out pieces of a few large blocks instead: pointers stay
 * valid until tp_arena_free (blocks never move), pieces are not freed one by one.
 * Blocks grow geometrically from 4 KiB to 4 MiB, so a small input costs a few pages.
 */
#ifndef TROPE_ARENA_H
#define TROPE_ARENA_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <gmp.h>

typedef struct tp_arena_block tp_arena_block;

typedef struct {
    tp_arena_block *head;   /* the block being filled; older ones follow */
    size_t next;            /* size of the next block to get, bytes */
} tp_arena;

void tp_arena_init(tp_arena *A);
/* Free every block; A is left empty and usable. */
void tp_arena_free(tp_arena *A);
/* `bytes` bytes aligned to 8 bytes (enough for size_t, pointers, GMP structs and limbs;
 * not for long double), or NULL on no memory (also for a size
 * that overflows). A request of 0 bytes returns a valid pointer. */
void *tp_arena_alloc(tp_arena *A, size_t bytes);
/* The same aligned to 4 bytes only, for uint32_t lists: a list of 1, 3, 5... entries
 * then takes no padding. */
void *tp_arena_alloc4(tp_arena *A, size_t bytes);
/* Move every block of `from` into `to` (from is left empty). */
void tp_arena_take(tp_arena *to, tp_arena *from);

/* Big arrays (a structure's cell table, a hash table): zeroed memory, mapped with the
 * same huge-page advice as large arena blocks once it reaches 2 MiB, from calloc
 * below that. tp_big_realloc keeps the contents (new bytes zeroed) and moves pages
 * rather than copying them; free them only with tp_big_free. NULL on no memory
 * (tp_big_realloc then leaves p as it was). */
void *tp_big_alloc(size_t bytes);
void *tp_big_realloc(void *p, size_t bytes);
void tp_big_free(void *p);

/* Read-only GMP values stored in an arena: dst[i] becomes a copy of src[i] whose limbs
 * live in A (mpz_roinit_n views). Such a value may be read by any GMP function and
 * copied by struct assignment, but never modified, mpz_clear'ed or mpq_clear'ed: it
 * lives until its arena is freed. dst and src may be the same array. false on no
 * memory (dst then unchanged). */
bool tp_arena_qview(tp_arena *A, mpq_t *dst, const mpq_t *src, size_t n);
bool tp_arena_zview(tp_arena *A, mpz_t *dst, const mpz_t *src, size_t n);
/* z as an int64 when it fits (|z| <= INT64_MAX): GMP's inline accessors only, for the
 * hot loops that read millions of small values. */
static inline bool tp_z_get64(mpz_srcptr z, int64_t *out)
{
    size_t m = mpz_size(z);
    if (m == 0) {
        *out = 0;
        return true;
    }
    mp_limb_t l = mpz_getlimbn(z, 0);
    if (m > 1 || GMP_NUMB_BITS != 64 || l > (mp_limb_t)INT64_MAX)
        return false;
    *out = mpz_sgn(z) < 0 ? -(int64_t)l : (int64_t)l;
    return true;
}

/* Negate a read-only value in place (no allocation). */
void tp_qview_neg(mpq_t q);

#endif
