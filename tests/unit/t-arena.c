/* t-arena.c — the arena, big arrays and read-only GMP values of trope/arena.h.
 *
 * Reference: GMP itself. Every read-only value must compare equal (mpq_equal /
 * mpz_cmp) to the ordinary GMP value it was made from, print the same digits
 * (mpq_get_str), and negate like mpq_neg; big arrays must keep their contents and
 * zero-fill new bytes, as calloc / realloc would (common practice, no source).
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "testlib.h"
#include "trope/arena.h"

/* A random rational of up to `limbs` limbs in numerator and denominator. */
static void random_q(mpq_t q, tp_rng *r, int limbs)
{
    mpz_t a, b;
    mpz_inits(a, b, NULL);
    int na = (int)tp_rng_range(r, 0, limbs), nb = (int)tp_rng_range(r, 1, limbs);
    for (int i = 0; i < na; i++) {
        mpz_mul_2exp(a, a, 64);
        mpz_add_ui(a, a, (unsigned long)tp_rng_next(r));
    }
    for (int i = 0; i < nb; i++) {
        mpz_mul_2exp(b, b, 64);
        mpz_add_ui(b, b, (unsigned long)tp_rng_next(r));
    }
    if (tp_rng_range(r, 0, 3) == 0)
        mpz_set_si(a, tp_rng_range(r, -5, 5)); /* small values, zero among them */
    if (mpz_sgn(b) == 0)
        mpz_set_ui(b, 1);
    if (tp_rng_range(r, 0, 1))
        mpz_neg(a, a);
    mpq_set_num(q, a);
    mpq_set_den(q, b);
    mpq_canonicalize(q);
    mpz_clears(a, b, NULL);
}

static void test_views(void)
{
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed() + 11);
    tp_arena A;
    tp_arena_init(&A);
    enum { N = 3000 };
    mpq_t *src = malloc(N * sizeof *src), *dst = malloc(N * sizeof *dst);
    mpz_t *zs = malloc(N * sizeof *zs), *zd = malloc(N * sizeof *zd);
    for (int i = 0; i < N; i++) {
        mpq_init(src[i]);
        random_q(src[i], &r, 4);
        mpz_init_set(zs[i], mpq_numref(src[i]));
    }
    /* in pieces of varying length, so blocks fill up and new ones start */
    for (int i = 0; i < N;) {
        int m = (int)tp_rng_range(&r, 1, 7);
        if (i + m > N)
            m = N - i;
        tp_check(tp_arena_qview(&A, dst + i, (const mpq_t *)src + i, (size_t)m), "qview");
        tp_check(tp_arena_zview(&A, zd + i, (const mpz_t *)zs + i, (size_t)m), "zview");
        i += m;
    }
    int bad = 0, badneg = 0, badz = 0;
    mpq_t t;
    mpq_init(t);
    for (int i = 0; i < N; i++) {
        char *a = mpq_get_str(NULL, 10, src[i]), *b = mpq_get_str(NULL, 10, dst[i]);
        bad += !mpq_equal(src[i], dst[i]) || strcmp(a, b) != 0;
        free(a);
        free(b);
        badz += mpz_cmp(zs[i], zd[i]) != 0;
        tp_qview_neg(dst[i]);
        mpq_neg(t, src[i]);
        badneg += !mpq_equal(t, dst[i]);
        tp_qview_neg(dst[i]);
        badneg += !mpq_equal(src[i], dst[i]);
    }
    tp_check(bad == 0, "read-only rationals differ from their sources: %d", bad);
    tp_check(badz == 0, "read-only integers differ from their sources: %d", badz);
    tp_check(badneg == 0, "negation of read-only rationals: %d wrong", badneg);
    /* the sources may go: the views own copies of the limbs */
    for (int i = 0; i < N; i++) {
        mpq_set(t, dst[i]);
        mpq_set_ui(src[i], 7, 3);
        mpz_set_ui(zs[i], 5);
        bad += !mpq_equal(t, dst[i]);
    }
    tp_check(bad == 0, "views changed with their sources");
    mpq_clear(t);
    for (int i = 0; i < N; i++) {
        mpq_clear(src[i]);
        mpz_clear(zs[i]);
    }
    free(src);
    free(dst);
    free(zs);
    free(zd);
    tp_arena_free(&A);
}

static void test_alloc(void)
{
    tp_arena A;
    tp_arena_init(&A);
    bool ok = true;
    tp_rng r;
    tp_rng_seed(&r, tp_test_seed() + 12);
    /* pieces are 8-byte aligned (4-byte for tp_arena_alloc4, mixed in at random),
     * disjoint and keep what was written */
    unsigned char **p = malloc(20000 * sizeof *p);
    size_t *len = malloc(20000 * sizeof *len);
    for (int i = 0; i < 20000; i++) {
        len[i] = (size_t)tp_rng_range(&r, 0, i % 100 == 0 ? 3000000 : 200);
        bool four = tp_rng_range(&r, 0, 1) == 1;
        p[i] = four ? tp_arena_alloc4(&A, len[i]) : tp_arena_alloc(&A, len[i]);
        ok = ok && p[i] && ((uintptr_t)p[i] & (four ? 3 : 7)) == 0;
        if (p[i])
            memset(p[i], i & 0xff, len[i]);
    }
    tp_check(ok, "arena pieces: allocated and aligned");
    int bad = 0;
    for (int i = 0; i < 20000; i++) {
        for (size_t k = 0; k < len[i]; k += 97)
            bad += p[i][k] != (unsigned char)(i & 0xff);
        if (len[i])
            bad += p[i][len[i] - 1] != (unsigned char)(i & 0xff);
    }
    tp_check(bad == 0, "arena pieces overlap (%d bytes overwritten)", bad);
    free(p);
    free(len);
    tp_arena_free(&A);
    tp_check(tp_arena_alloc(&A, SIZE_MAX - 4) == NULL, "absurd size refused");
    tp_arena_free(&A);

    /* a first block of 4 (mod 8) bytes, filled by a 4-aligned piece: an 8-aligned
     * piece then starts a new block (the sanitizer build sees any overrun) */
    unsigned char *q4 = tp_arena_alloc4(&A, 1000004);
    unsigned char *q8 = tp_arena_alloc(&A, 8);
    tp_check(q4 && q8 && ((uintptr_t)q8 & 7) == 0 && (q8 >= q4 + 1000004 || q8 + 8 <= q4),
             "4-aligned block then an 8-aligned piece");
    if (q4 && q8) {
        memset(q4, 1, 1000004);
        memset(q8, 2, 8);
        tp_check(q4[1000003] == 1 && q8[0] == 2, "4-aligned block: contents");
    }
    tp_arena_free(&A);

    /* take: the blocks of one arena join another */
    tp_arena B;
    tp_arena_init(&A);
    tp_arena_init(&B);
    char *x = tp_arena_alloc(&A, 100), *y = tp_arena_alloc(&B, 5000000);
    tp_check(x && y, "take: allocations");
    if (x && y) {
        strcpy(x, "kept");
        y[4999999] = 'z';
        tp_arena_take(&B, &A);
        tp_check(A.head == NULL && strcmp(x, "kept") == 0 && y[4999999] == 'z', "take");
    }
    tp_arena_free(&A);
    tp_arena_free(&B);
}

static void test_big(void)
{
    /* sizes across the 2 MiB line in both directions; contents kept, new bytes zero */
    static const size_t sizes[] = {100, 5000000, 3000000, 9000000, 1000, 2097152, 40,
                                   7000000, 0, 123456};
    size_t have = 0;
    unsigned char *p = tp_big_alloc(0);
    tp_check(p != NULL, "big: empty array");
    for (size_t s = 0; s < sizeof sizes / sizeof *sizes; s++) {
        size_t want = sizes[s];
        unsigned char *q = tp_big_realloc(p, want);
        tp_check(q != NULL, "big: realloc to %zu", want);
        if (!q)
            break;
        p = q;
        size_t keep = have < want ? have : want;
        int bad = 0;
        for (size_t k = 0; k < keep; k += 4093)
            bad += p[k] != (unsigned char)(k * 7 + 1);
        for (size_t k = keep; k < want; k += k < keep + 4096 ? 1 : 4093)
            bad += p[k] != 0;
        if (want > keep && p[want - 1] != 0)
            bad++;
        tp_check(bad == 0, "big: contents after realloc %zu -> %zu (%d wrong)", have, want,
                 bad);
        /* write a pattern only into every 4093rd byte, the rest stays zero */
        for (size_t k = 0; k < want; k += 4093)
            p[k] = (unsigned char)(k * 7 + 1);
        have = want;
    }
    tp_big_free(p);
    unsigned char *z = tp_big_alloc(6000000);
    int nz = 0;
    for (size_t k = 0; z && k < 6000000; k += k < 65536 ? 1 : 999)
        nz += z[k] != 0;
    tp_check(z && nz == 0, "big: zero-filled");
    tp_big_free(z);
    tp_big_free(NULL);
}

int main(void)
{
    test_views();
    test_alloc();
    test_big();
    return tp_test_finish("t-arena");
}
