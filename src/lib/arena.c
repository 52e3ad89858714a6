/* arena.c — the bump allocator and big arrays of arena.h. */
#define _GNU_SOURCE /* mremap */
#include "trope/arena.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>

struct tp_arena_block {
    tp_arena_block *next;
    size_t size, used;      /* bytes of data[], bytes handed out */
    size_t mapped;          /* bytes mapped with mmap (0: from malloc) */
    _Alignas(16) unsigned char data[];
};

#define ARENA_MIN ((size_t)4096)
#define ARENA_MAX ((size_t)4 << 20)
#define HUGE_PAGE ((size_t)2 << 20)

/* A block of at least `bytes` bytes in all. Blocks of 2 MiB and more are mapped at a
 * 2 MiB boundary and marked for transparent huge pages: filling a few hundred MB of
 * small lists then costs one page fault per 2 MiB instead of one per 4 KiB (the
 * kernel's "madvise" mode; elsewhere the advice is harmless). */
static tp_arena_block *block_new(size_t bytes)
{
    tp_arena_block *g;
    if (bytes >= HUGE_PAGE && bytes <= SIZE_MAX - 2 * HUGE_PAGE) {
        size_t len = (bytes + HUGE_PAGE - 1) & ~(HUGE_PAGE - 1);
        unsigned char *m = mmap(NULL, len + HUGE_PAGE, PROT_READ | PROT_WRITE,
                                MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
        if (m == MAP_FAILED)
            return NULL;
        size_t lead = (HUGE_PAGE - ((uintptr_t)m & (HUGE_PAGE - 1))) & (HUGE_PAGE - 1);
        if (lead)
            munmap(m, lead);
        if (HUGE_PAGE - lead)
            munmap(m + lead + len, HUGE_PAGE - lead);
        m += lead;
#ifdef MADV_HUGEPAGE
        (void)madvise(m, len, MADV_HUGEPAGE);
#endif
        g = (tp_arena_block *)(void *)m;
        g->mapped = len;
        g->size = len - sizeof *g;
    } else {
        g = malloc(bytes);
        if (!g)
            return NULL;
        g->mapped = 0;
        g->size = bytes - sizeof *g;
    }
    g->used = 0;
    return g;
}

static void block_free(tp_arena_block *b)
{
    if (b->mapped)
        munmap(b, b->mapped);
    else
        free(b);
}

void tp_arena_init(tp_arena *A)
{
    A->head = NULL;
    A->next = ARENA_MIN;
}

void tp_arena_free(tp_arena *A)
{
    tp_arena_block *b = A->head;
    while (b) {
        tp_arena_block *nx = b->next;
        block_free(b);
        b = nx;
    }
    tp_arena_init(A);
}

/* A piece of `bytes` bytes at an offset of its block that is a multiple of `align`
 * (4 or 8; block data is 16-byte aligned). */
static void *arena_alloc(tp_arena *A, size_t bytes, size_t align)
{
    if (bytes > SIZE_MAX / 2)
        return NULL;
    size_t need = (bytes + align - 1) & ~(align - 1);
    tp_arena_block *b = A->head;
    size_t at = 0; /* where the piece would start in b */
    if (b) {
        at = (b->used + align - 1) & ~(align - 1);
        if (at > b->size)
            at = b->size; /* a block of 4 (mod 8) bytes, full */
    }
    if (b && b->size - at < need && need >= A->next / 4) {
        /* a large piece gets a block of its own, behind the one being filled */
        tp_arena_block *g = block_new(need + sizeof *g);
        if (!g)
            return NULL;
        g->used = need;
        g->next = b->next;
        b->next = g;
        return g->data;
    }
    if (!b || b->size - at < need) {
        if (A->next < ARENA_MIN)
            A->next = ARENA_MIN;
        size_t size = A->next;
        if (size < need + sizeof *b)
            size = need + sizeof *b;
        tp_arena_block *g = block_new(size);
        if (!g)
            return NULL;
        g->next = b;
        A->head = b = g;
        at = 0;
        if (A->next < ARENA_MAX)
            A->next *= 2;
    }
    void *p = b->data + at;
    b->used = at + need;
    return p;
}

void *tp_arena_alloc(tp_arena *A, size_t bytes)
{
    return arena_alloc(A, bytes, 8);
}

void *tp_arena_alloc4(tp_arena *A, size_t bytes)
{
    return arena_alloc(A, bytes, 4);
}

void tp_arena_take(tp_arena *to, tp_arena *from)
{
    tp_arena_block *b = from->head;
    while (b) {
        tp_arena_block *nx = b->next;
        /* keep `to`'s head (the block being filled) first */
        if (to->head) {
            b->next = to->head->next;
            to->head->next = b;
        } else {
            b->next = NULL;
            to->head = b;
        }
        b = nx;
    }
    if (from->next > to->next)
        to->next = from->next;
    tp_arena_init(from);
}

/* ---- big arrays: a 16-byte header (mapped length or 0 for calloc, size asked) ---- */

#define BIG_HDR ((size_t)16)

static size_t *big_hdr(void *p)
{
    return (size_t *)(void *)((unsigned char *)p - BIG_HDR);
}

void *tp_big_alloc(size_t bytes)
{
    if (bytes > SIZE_MAX / 2)
        return NULL;
    size_t *h;
    if (bytes + BIG_HDR < HUGE_PAGE) {
        h = calloc(1, bytes + BIG_HDR);
        if (!h)
            return NULL;
        h[0] = 0;
    } else {
        tp_arena_block *b = block_new(bytes + BIG_HDR); /* mapped: zero-filled */
        if (!b)
            return NULL;
        size_t len = b->mapped;
        memset(b, 0, sizeof *b); /* block_new's bookkeeping overlaps the data */
        h = (size_t *)(void *)b;
        h[0] = len;
    }
    h[1] = bytes;
    return (unsigned char *)h + BIG_HDR;
}

void tp_big_free(void *p)
{
    if (!p)
        return;
    size_t *h = big_hdr(p);
    if (h[0])
        munmap(h, h[0]);
    else
        free(h);
}

void *tp_big_realloc(void *p, size_t bytes)
{
    if (!p)
        return tp_big_alloc(bytes);
    if (bytes > SIZE_MAX / 2)
        return NULL;
    size_t *h = big_hdr(p);
    size_t old = h[0], had = h[1];
    if (old == 0 || bytes + BIG_HDR < HUGE_PAGE) {
        /* small on one side: a plain copy of at most 2 MiB */
        void *q = tp_big_alloc(bytes);
        if (!q)
            return NULL;
        memcpy(q, p, had < bytes ? had : bytes);
        tp_big_free(p);
        return q;
    }
    size_t len = (bytes + BIG_HDR + HUGE_PAGE - 1) & ~(HUGE_PAGE - 1);
    if (len != old) {
        void *m = mremap(h, old, len, MREMAP_MAYMOVE); /* new pages are zero */
        if (m == MAP_FAILED)
            return NULL;
#ifdef MADV_HUGEPAGE
        (void)madvise(m, len, MADV_HUGEPAGE);
#endif
        h = m;
        h[0] = len;
    }
    unsigned char *q = (unsigned char *)h + BIG_HDR;
    if (bytes > had) {
        /* pages that were mapped before may hold contents of an earlier shrink */
        size_t stale = (old - BIG_HDR < bytes ? old - BIG_HDR : bytes) - had;
        memset(q + had, 0, stale);
    }
    h[1] = bytes;
    return q;
}

/* signed limb count of z (GMP's convention: negative for negative values) */
static mp_size_t ssize(mpz_srcptr z)
{
    mp_size_t m = (mp_size_t)mpz_size(z);
    return mpz_sgn(z) < 0 ? -m : m;
}

bool tp_arena_qview(tp_arena *A, mpq_t *dst, const mpq_t *src, size_t n)
{
    size_t total = 0;
    for (size_t i = 0; i < n; i++)
        total += mpz_size(mpq_numref(src[i])) + mpz_size(mpq_denref(src[i]));
    if (total > SIZE_MAX / sizeof(mp_limb_t) / 2)
        return false;
    mp_limb_t *l = tp_arena_alloc(A, total * sizeof *l);
    if (!l)
        return false;
    for (size_t i = 0; i < n; i++) {
        mpz_srcptr a = mpq_numref(src[i]), b = mpq_denref(src[i]);
        mp_size_t sa = ssize(a), sb = ssize(b);
        size_t na = mpz_size(a), nb = mpz_size(b);
        if (na == 1)
            l[0] = mpz_getlimbn(a, 0);
        else if (na)
            memcpy(l, mpz_limbs_read(a), na * sizeof *l);
        if (nb == 1)
            l[na] = mpz_getlimbn(b, 0);
        else if (nb)
            memcpy(l + na, mpz_limbs_read(b), nb * sizeof *l);
        mpz_roinit_n(mpq_numref(dst[i]), l, sa);
        mpz_roinit_n(mpq_denref(dst[i]), l + na, sb);
        l += na + nb;
    }
    return true;
}

bool tp_arena_zview(tp_arena *A, mpz_t *dst, const mpz_t *src, size_t n)
{
    size_t total = 0;
    for (size_t i = 0; i < n; i++)
        total += mpz_size(src[i]);
    if (total > SIZE_MAX / sizeof(mp_limb_t) / 2)
        return false;
    mp_limb_t *l = tp_arena_alloc(A, total * sizeof *l);
    if (!l)
        return false;
    for (size_t i = 0; i < n; i++) {
        size_t m = mpz_size(src[i]);
        mp_size_t s = ssize(src[i]);
        if (m)
            memcpy(l, mpz_limbs_read(src[i]), m * sizeof *l);
        mpz_roinit_n(dst[i], l, s);
        l += m;
    }
    return true;
}

void tp_qview_neg(mpq_t q)
{
    mpz_ptr a = mpq_numref(q);
    mpz_roinit_n(a, mpz_limbs_read(a), -ssize(a));
}
