/* hull_cdd.c — the reference lower-hull engine: cddlib's GMP-exact double description.
 *
 * cddlib types and its 1-based sets stay inside this file. cddlib keeps process-wide
 * state (global constants, statistics counters, rand() for the row order), so every
 * call runs under one lock, set up once.
 *
 * Input: rows [1, a_1..a_n, h] for each non-duplicate point plus the ray
 * [0, 0..0, 1] (the +R>=0 e_{n+1} direction). Output inequalities c0 + c.a + c_{n+1} h
 * >= 0 with c_{n+1} > 0 are the lower facets (w = c / c_{n+1}); those with
 * c_{n+1} == 0 are the facets of the Newton polytope (inner normal c).
 */
#define GMPRATIONAL 1
#include <cddlib/setoper.h>
#include <cddlib/cdd.h>

#include "hull_internal.h"

#include <stdlib.h>
#include <string.h>
#include <threads.h>

static once_flag cdd_once = ONCE_FLAG_INIT;
static mtx_t cdd_lock;

static void cdd_setup(void)
{
    dd_set_global_constants();
    mtx_init(&cdd_lock, mtx_plain);
    atexit(dd_free_global_constants);
}

static tp_status run_locked(tp_hull *H, const tp_points *P, tp_error *err)
{
    size_t n = P->n;
    size_t m = 0;
    size_t *idx = malloc((P->count ? P->count : 1) * sizeof *idx);
    size_t *buf = malloc((P->count + 1) * sizeof *buf);
    mpq_t *w = malloc((n ? n : 1) * sizeof *w);
    mpz_t *u = malloc((n ? n : 1) * sizeof *u);
    if (!idx || !buf || !w || !u) {
        free(idx);
        free(buf);
        free(w);
        free(u);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (cddlib input)");
    }
    for (size_t j = 0; j < n; j++) {
        mpq_init(w[j]);
        mpz_init(u[j]);
    }
    for (size_t i = 0; i < P->count; i++)
        if (!P->dup[i])
            idx[m++] = i;

    tp_status st = TP_OK;
    dd_MatrixPtr M = dd_CreateMatrix((dd_rowrange)(m + 1), (dd_colrange)(n + 2));
    dd_PolyhedraPtr poly = NULL;
    dd_MatrixPtr Hm = NULL;
    dd_SetFamilyPtr inc = NULL;
    if (!M) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (cddlib matrix)");
        goto done;
    }
    M->representation = dd_Generator;
    M->numbtype = dd_Rational;
    for (size_t r = 0; r < m; r++) {
        size_t i = idx[r];
        mpq_set_si(M->matrix[r][0], 1, 1);
        for (size_t j = 0; j < n; j++)
            mpq_set_si(M->matrix[r][j + 1], (long)P->exps[i * n + j], 1);
        mpq_set(M->matrix[r][n + 1], P->heights[i]);
    }
    mpq_set_si(M->matrix[m][n + 1], 1, 1);

    dd_ErrorType derr = dd_NoError;
    poly = dd_DDMatrix2Poly2(M, dd_RandomRow, &derr);
    if (derr != dd_NoError || !poly) {
        st = tp_error_set(err, TP_EHULL, 0, 0, "cddlib failed on the lifted point set (error %d)",
                          (int)derr);
        goto done;
    }
    Hm = dd_CopyInequalities(poly);
    inc = dd_CopyIncidence(poly);
    if (!Hm || !inc) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (cddlib output)");
        goto done;
    }
    for (dd_rowrange k = 0; k < Hm->rowsize; k++) {
        if (set_member(k + 1, Hm->linset))
            continue; /* an equation of the affine span */
        mpq_t *row = Hm->matrix[k];
        int last = mpq_sgn(row[n + 1]);
        bool zero = last == 0;
        for (size_t j = 0; j < n && zero; j++)
            zero = mpq_sgn(row[j + 1]) == 0;
        if (zero)
            continue; /* the trivial inequality 1 >= 0 */
        size_t np = 0;
        for (size_t r = 0; r < m; r++)
            if (set_member((long)r + 1, inc->set[k]))
                buf[np++] = idx[r];
        if (last > 0) {
            for (size_t j = 0; j < n; j++)
                mpq_div(w[j], row[j + 1], row[n + 1]);
            st = tp_hull_push_lower(H, buf, np, w, err);
            for (size_t t = 0; t < np; t++)
                H->on_hull[buf[t]] = true;
        } else if (last == 0) {
            mpz_t den, t1;
            mpz_inits(den, t1, NULL);
            mpz_set_ui(den, 1);
            for (size_t j = 0; j < n; j++)
                mpz_lcm(den, den, mpq_denref(row[j + 1]));
            for (size_t j = 0; j < n; j++) {
                mpz_divexact(t1, den, mpq_denref(row[j + 1]));
                mpz_mul(u[j], mpq_numref(row[j + 1]), t1);
            }
            mpz_clears(den, t1, NULL);
            st = tp_hull_push_side(H, buf, np, u, err);
        } else {
            st = tp_error_set(err, TP_EHULL, 0, 0,
                              "cddlib returned a facet facing downwards (internal error)");
        }
        if (st != TP_OK)
            goto done;
    }
    if (H->nlower == 0)
        st = tp_error_set(err, TP_EHULL, 0, 0, "cddlib found no lower facet (internal error)");

done:
    if (inc)
        dd_FreeSetFamily(inc);
    if (Hm)
        dd_FreeMatrix(Hm);
    if (poly)
        dd_FreePolyhedra(poly);
    if (M)
        dd_FreeMatrix(M);
    for (size_t j = 0; j < n; j++) {
        mpq_clear(w[j]);
        mpz_clear(u[j]);
    }
    free(w);
    free(u);
    free(idx);
    free(buf);
    return st;
}

tp_status tp_hull_lower_cdd(tp_hull *H, const tp_points *P, tp_error *err)
{
    call_once(&cdd_once, cdd_setup);
    mtx_lock(&cdd_lock);
    tp_status st = run_locked(H, P, err);
    mtx_unlock(&cdd_lock);
    return st;
}
