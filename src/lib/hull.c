/* hull.c — tp_hull_lower: the affine span and lineality space, engine dispatch, and the
 * canonical form of the result (sorted facets, vectors reduced modulo L).
 *
 * The engines (hull_cdd.c, hull_fast.c) only find facets; everything that makes the
 * output canonical lives here, so both engines give identical tp_hull objects.
 */
#include "hull_internal.h"
#include "idx_list.h"

#include <stdlib.h>
#include <string.h>

void tp_hull_init(tp_hull *H)
{
    memset(H, 0, sizeof *H);
    H->dim = -1;
    tp_arena_init(&H->pts_mem);
    tp_arena_init(&H->w_mem);
    tp_arena_init(&H->w_limbs);
}

static void side_clear(tp_hull_side *s, size_t n)
{
    if (s->u) {
        for (size_t j = 0; j < n; j++)
            mpz_clear(s->u[j]);
        free(s->u);
    }
    free(s->pts);
}

void tp_hull_clear(tp_hull *H)
{
    free(H->lower); /* facets' pts and w live in the arenas */
    tp_arena_free(&H->pts_mem);
    tp_arena_free(&H->w_mem);
    tp_arena_free(&H->w_limbs);
    for (size_t i = 0; i < H->nsides; i++)
        side_clear(&H->sides[i], H->n);
    free(H->sides);
    if (H->lin) {
        for (size_t i = 0; i < H->nlin * H->n; i++)
            mpz_clear(H->lin[i]);
        free(H->lin);
    }
    free(H->lin_pivot);
    free(H->on_hull);
    tp_hull_init(H);
}

/* Copy the engine's size_t list into a 32-bit one, sorted; false if an index does not
 * fit (then dst is partly written). */
static bool narrow_sorted(uint32_t *dst, const size_t *pts, size_t npts)
{
    for (size_t i = 0; i < npts; i++) {
        if ((uint64_t)pts[i] > UINT32_MAX)
            return false;
        dst[i] = (uint32_t)pts[i];
    }
    tp_idx_sort(dst, npts);
    return true;
}

static tp_status too_many_points(tp_error *err)
{
    return tp_error_set(err, TP_ELIMIT, 0, 0,
                        "a point index of 2^32 or more: point lists are 32-bit");
}

/* Arrays of facets grow geometrically: capacity 64, then the next power of two (the
 * capacity is a function of the count, so it need not be stored). */
static bool needs_growth(size_t count, size_t *ncap)
{
    if (count == 0) {
        *ncap = 64;
        return true;
    }
    if (count >= 64 && (count & (count - 1)) == 0) {
        *ncap = 2 * count;
        return true;
    }
    return false;
}

tp_status tp_hull_push_lower(tp_hull *H, const size_t *pts, size_t npts, mpq_t *w,
                             tp_error *err)
{
    size_t ncap;
    if (needs_growth(H->nlower, &ncap)) {
        tp_hull_facet *g = realloc(H->lower, ncap * sizeof *g);
        if (!g)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lower hull)");
        H->lower = g;
    }
    tp_hull_facet *f = &H->lower[H->nlower];
    memset(f, 0, sizeof *f);
    f->pts = tp_arena_alloc4(&H->pts_mem, npts * sizeof *f->pts);
    f->w = tp_arena_alloc(&H->w_mem, H->n * sizeof *f->w);
    if (!f->pts || !f->w)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lower hull)");
    if (!narrow_sorted(f->pts, pts, npts))
        return too_many_points(err); /* H->nlower not advanced: f is not counted */
    f->npts = npts;
    bool ok;
    if (H->nlin > 0) {
        /* reduce modulo L now: the stored values are read-only */
        mpq_t *r = malloc(H->n * sizeof *r);
        if (!r)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lower hull)");
        for (size_t j = 0; j < H->n; j++) {
            mpq_init(r[j]);
            mpq_set(r[j], w[j]);
        }
        tp_hull_reduce_q(H, r);
        ok = tp_arena_qview(&H->w_limbs, f->w, (const mpq_t *)r, H->n);
        for (size_t j = 0; j < H->n; j++)
            mpq_clear(r[j]);
        free(r);
    } else {
        ok = tp_arena_qview(&H->w_limbs, f->w, (const mpq_t *)w, H->n);
    }
    if (!ok)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lower hull)");
    H->nlower++;
    return TP_OK;
}

tp_status tp_hull_push_side(tp_hull *H, const size_t *pts, size_t npts, mpz_t *u,
                            tp_error *err)
{
    size_t ncap;
    if (needs_growth(H->nsides, &ncap)) {
        tp_hull_side *g = realloc(H->sides, ncap * sizeof *g);
        if (!g)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (Newton polytope)");
        H->sides = g;
    }
    tp_hull_side *s = &H->sides[H->nsides];
    memset(s, 0, sizeof *s);
    s->pts = malloc((npts ? npts : 1) * sizeof *s->pts);
    s->u = malloc((H->n ? H->n : 1) * sizeof *s->u);
    if (!s->pts || !s->u) {
        free(s->pts);
        free(s->u);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (Newton polytope)");
    }
    if (!narrow_sorted(s->pts, pts, npts)) {
        free(s->pts);
        free(s->u);
        return too_many_points(err);
    }
    s->npts = npts;
    for (size_t j = 0; j < H->n; j++) {
        mpz_init(s->u[j]);
        mpz_set(s->u[j], u[j]);
    }
    H->nsides++;
    return TP_OK;
}

/* ---- affine span and lineality ---------------------------------------------------- */

/* Divide an integer vector by the gcd of its entries (no-op for the zero vector). */
static void make_primitive(mpz_t *v, size_t n)
{
    mpz_t g;
    mpz_init(g);
    for (size_t j = 0; j < n; j++)
        mpz_gcd(g, g, v[j]);
    if (mpz_sgn(g) != 0 && mpz_cmp_ui(g, 1) != 0)
        for (size_t j = 0; j < n; j++)
            mpz_divexact(v[j], v[j], g);
    mpz_clear(g);
}

tp_status tp_hull_span(tp_hull *H, const tp_points *P, tp_error *err)
{
    size_t n = P->n;
    H->n = n;
    H->npoints = P->count;
    size_t base = P->count;
    for (size_t i = 0; i < P->count; i++)
        if (!P->dup[i]) {
            base = i;
            break;
        }
    if (base == P->count)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "no points: expected at least one term");

    /* Echelon basis of the exponent differences, fraction-free, pivots ascending. */
    mpz_t *B = malloc((n * n + 1) * sizeof *B);
    size_t *piv = malloc((n + 1) * sizeof *piv);
    mpz_t *v = malloc((n + 1) * sizeof *v);
    if (!B || !piv || !v) {
        free(B);
        free(piv);
        free(v);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (affine span)");
    }
    for (size_t j = 0; j < n * n; j++)
        mpz_init(B[j]);
    for (size_t j = 0; j < n; j++)
        mpz_init(v[j]);
    size_t rank = 0;
    mpz_t t1, t2;
    mpz_inits(t1, t2, NULL);
    for (size_t i = base + 1; i < P->count && rank < n; i++) {
        if (P->dup[i])
            continue;
        for (size_t j = 0; j < n; j++) {
            mpz_set_si(v[j], (long)P->exps[i * n + j]);
            mpz_set_si(t1, (long)P->exps[base * n + j]);
            mpz_sub(v[j], v[j], t1);
        }
        for (size_t r = 0; r < rank; r++) {
            size_t p = piv[r];
            if (mpz_sgn(v[p]) == 0)
                continue;
            /* v = B_p * v - v_p * B */
            mpz_set(t2, v[p]);
            for (size_t j = 0; j < n; j++) {
                mpz_mul(v[j], v[j], B[r * n + p]);
                mpz_submul(v[j], t2, B[r * n + j]);
            }
            make_primitive(v, n);
        }
        size_t p = n;
        for (size_t j = 0; j < n; j++)
            if (mpz_sgn(v[j]) != 0) {
                p = j;
                break;
            }
        if (p == n)
            continue;
        /* Keep rows sorted by pivot. */
        size_t at = rank;
        while (at > 0 && piv[at - 1] > p) {
            for (size_t j = 0; j < n; j++)
                mpz_swap(B[at * n + j], B[(at - 1) * n + j]);
            piv[at] = piv[at - 1];
            at--;
        }
        for (size_t j = 0; j < n; j++)
            mpz_set(B[at * n + j], v[j]);
        piv[at] = p;
        rank++;
    }
    H->dim = (int)rank;
    H->nlin = n - rank;
    tp_status st = TP_OK;
    if (H->nlin > 0) {
        /* Nullspace of the rank x n matrix B, over Q: back-substitute to RREF first. */
        mpq_t *R = malloc((rank * n + 1) * sizeof *R);
        mpq_t *L = malloc((H->nlin * n + 1) * sizeof *L);
        H->lin = malloc(H->nlin * n * sizeof *H->lin);
        H->lin_pivot = malloc(H->nlin * sizeof *H->lin_pivot);
        bool *ispiv = calloc(n, sizeof *ispiv);
        if (!R || !L || !H->lin || !H->lin_pivot || !ispiv) {
            free(R);
            free(L);
            free(ispiv);
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lineality)");
            goto done;
        }
        for (size_t j = 0; j < rank * n; j++) {
            mpq_init(R[j]);
            mpq_set_z(R[j], B[j]);
        }
        mpq_t q;
        mpq_init(q);
        for (size_t r = 0; r < rank; r++) {
            size_t p = piv[r];
            ispiv[p] = true;
            mpq_inv(q, R[r * n + p]);
            for (size_t j = 0; j < n; j++)
                mpq_mul(R[r * n + j], R[r * n + j], q);
            for (size_t s = 0; s < rank; s++) {
                if (s == r || mpq_sgn(R[s * n + p]) == 0)
                    continue;
                mpq_set(q, R[s * n + p]);
                for (size_t j = 0; j < n; j++) {
                    mpq_t tmp;
                    mpq_init(tmp);
                    mpq_mul(tmp, q, R[r * n + j]);
                    mpq_sub(R[s * n + j], R[s * n + j], tmp);
                    mpq_clear(tmp);
                }
            }
        }
        /* One nullspace vector per free column f: x_f = 1, x_p = -R[r][f]. */
        size_t k = 0;
        for (size_t f = 0; f < n; f++) {
            if (ispiv[f])
                continue;
            for (size_t j = 0; j < n; j++)
                mpq_init(L[k * n + j]);
            mpq_set_ui(L[k * n + f], 1, 1);
            for (size_t r = 0; r < rank; r++)
                mpq_neg(L[k * n + piv[r]], R[r * n + f]);
            k++;
        }
        /* Canonical basis: reduced echelon form with pivots from the last coordinate
         * backwards. */
        size_t row = 0;
        for (size_t cc = n; cc-- > 0 && row < H->nlin;) {
            size_t sel = H->nlin;
            for (size_t s = row; s < H->nlin; s++)
                if (mpq_sgn(L[s * n + cc]) != 0) {
                    sel = s;
                    break;
                }
            if (sel == H->nlin)
                continue;
            for (size_t j = 0; j < n; j++)
                mpq_swap(L[row * n + j], L[sel * n + j]);
            mpq_inv(q, L[row * n + cc]);
            for (size_t j = 0; j < n; j++)
                mpq_mul(L[row * n + j], L[row * n + j], q);
            for (size_t s = 0; s < H->nlin; s++) {
                if (s == row || mpq_sgn(L[s * n + cc]) == 0)
                    continue;
                mpq_set(q, L[s * n + cc]);
                for (size_t j = 0; j < n; j++) {
                    mpq_t tmp;
                    mpq_init(tmp);
                    mpq_mul(tmp, q, L[row * n + j]);
                    mpq_sub(L[s * n + j], L[s * n + j], tmp);
                    mpq_clear(tmp);
                }
            }
            H->lin_pivot[row] = cc;
            row++;
        }
        /* Integer, primitive, pivot entry positive. */
        mpz_t den;
        mpz_init(den);
        for (size_t s = 0; s < H->nlin; s++) {
            mpz_set_ui(den, 1);
            for (size_t j = 0; j < n; j++)
                mpz_lcm(den, den, mpq_denref(L[s * n + j]));
            for (size_t j = 0; j < n; j++) {
                mpz_init(H->lin[s * n + j]);
                mpz_divexact(t1, den, mpq_denref(L[s * n + j]));
                mpz_mul(H->lin[s * n + j], mpq_numref(L[s * n + j]), t1);
            }
            make_primitive(&H->lin[s * n], n);
        }
        mpz_clear(den);
        mpq_clear(q);
        for (size_t j = 0; j < rank * n; j++)
            mpq_clear(R[j]);
        for (size_t j = 0; j < H->nlin * n; j++)
            mpq_clear(L[j]);
        free(R);
        free(L);
        free(ispiv);
    }
done:
    mpz_clears(t1, t2, NULL);
    for (size_t j = 0; j < n * n; j++)
        mpz_clear(B[j]);
    for (size_t j = 0; j < n; j++)
        mpz_clear(v[j]);
    free(B);
    free(piv);
    free(v);
    return st;
}

void tp_hull_reduce_q(const tp_hull *H, mpq_t *v)
{
    mpq_t q, t;
    mpq_inits(q, t, NULL);
    for (size_t s = 0; s < H->nlin; s++) {
        const mpz_t *b = (const mpz_t *)&H->lin[s * H->n];
        size_t p = H->lin_pivot[s];
        if (mpq_sgn(v[p]) == 0)
            continue;
        /* v -= (v_p / b_p) b */
        mpq_set_z(t, b[p]);
        mpq_div(q, v[p], t);
        for (size_t j = 0; j < H->n; j++) {
            mpq_set_z(t, b[j]);
            mpq_mul(t, t, q);
            mpq_sub(v[j], v[j], t);
        }
    }
    mpq_clears(q, t, NULL);
}

void tp_hull_reduce_z(const tp_hull *H, mpz_t *v)
{
    size_t n = H->n;
    mpz_t a, b;
    mpz_inits(a, b, NULL);
    for (size_t s = 0; s < H->nlin; s++) {
        const mpz_t *l = (const mpz_t *)&H->lin[s * n];
        size_t p = H->lin_pivot[s];
        if (mpz_sgn(v[p]) == 0)
            continue;
        /* v = l_p * v - v_p * l, scaled by sign(l_p) > 0 (pivots are positive). */
        mpz_set(a, l[p]);
        mpz_set(b, v[p]);
        for (size_t j = 0; j < n; j++) {
            mpz_mul(v[j], v[j], a);
            mpz_submul(v[j], b, l[j]);
        }
    }
    mpz_clears(a, b, NULL);
    make_primitive(v, n);
}

/* ---- canonical form ------------------------------------------------------------- */


static int cmp_facet(const void *x, const void *y)
{
    const tp_hull_facet *a = x, *b = y;
    return tp_idx_cmp_lists(a->pts, a->npts, b->pts, b->npts);
}

static int cmp_side(const void *x, const void *y)
{
    const tp_hull_side *a = x, *b = y;
    return tp_idx_cmp_lists(a->pts, a->npts, b->pts, b->npts);
}

tp_status tp_hull_finish(tp_hull *H, tp_error *err)
{
    (void)err;
    /* lower facet normals were reduced by tp_hull_push_lower */
    if (H->nlower >= 64) {
        /* give back the spare capacity (up to half the array) */
        tp_hull_facet *g = realloc(H->lower, H->nlower * sizeof *g);
        if (g)
            H->lower = g;
    }
    for (size_t i = 0; i < H->nsides; i++)
        tp_hull_reduce_z(H, H->sides[i].u);
    /* engines often emit in order already: sort only when needed */
    bool sorted = true;
    for (size_t i = 1; i < H->nlower && sorted; i++)
        sorted = cmp_facet(&H->lower[i - 1], &H->lower[i]) < 0;
    if (!sorted)
        qsort(H->lower, H->nlower, sizeof *H->lower, cmp_facet);
    sorted = true;
    for (size_t i = 1; i < H->nsides && sorted; i++)
        sorted = cmp_side(&H->sides[i - 1], &H->sides[i]) < 0;
    if (!sorted)
        qsort(H->sides, H->nsides, sizeof *H->sides, cmp_side);
    return TP_OK;
}

/* ---- dispatch ------------------------------------------------------------------- */

tp_status tp_hull_lower(tp_hull *H, const tp_points *P, tp_engine engine, tp_error *err)
{
    tp_hull_clear(H);
    tp_status st = tp_hull_span(H, P, err);
    if (st != TP_OK)
        return st;
    H->on_hull = calloc(P->count ? P->count : 1, sizeof *H->on_hull);
    if (!H->on_hull)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lower hull)");

    if (H->dim == 0) {
        /* One distinct exponent: the Newton polytope is a point, the only cell. */
        size_t i = 0;
        while (P->dup[i])
            i++;
        mpq_t *w = malloc((P->n ? P->n : 1) * sizeof *w);
        if (!w)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (lower hull)");
        for (size_t j = 0; j < P->n; j++)
            mpq_init(w[j]);
        st = tp_hull_push_lower(H, &i, 1, w, err);
        for (size_t j = 0; j < P->n; j++)
            mpq_clear(w[j]);
        free(w);
        if (st != TP_OK)
            return st;
        H->on_hull[i] = true;
        return tp_hull_finish(H, err);
    }

    bool handled = false;
#ifdef TP_HAVE_FAST_ENGINE
    if (engine != TP_ENGINE_CDD) {
        st = tp_hull_lower_fast(H, P, &handled, err);
        if (st != TP_OK)
            return st;
    }
#else
    (void)engine;
#endif
    if (!handled) {
        st = tp_hull_lower_cdd(H, P, err);
        if (st != TP_OK)
            return st;
    }
    return tp_hull_finish(H, err);
}
