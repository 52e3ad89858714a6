/* subdiv.c — every lower face of the lifted point set: the regular subdivision.
 *
 * The maximal cells are the lower facets found by the hull engine. Faces of dimension
 * k-1 of a k-dimensional cell G are the intersections of G with the hull facets (lower
 * facets and Newton polytope facets) that touch G without containing it, kept when
 * their affine dimension is k-1 (every face of a polytope is an intersection of facets
 * containing it, and a facet of G is a face G ∩ X for some facet X not containing G).
 * Facets touching G are found through a point -> facet index, so the work is
 * proportional to the sum over cells of the facet degrees of their points.
 */
#include "trope/subdiv.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

void tp_subdiv_init(tp_subdiv *S)
{
    memset(S, 0, sizeof *S);
    tp_hull_init(&S->hull);
}

static void cell_clear(tp_subdiv_cell *c)
{
    free(c->pts);
    free(c->lower);
    free(c->sides);
}

void tp_subdiv_clear(tp_subdiv *S)
{
    for (size_t i = 0; i < S->ncells; i++)
        cell_clear(&S->cells[i]);
    free(S->cells);
    free(S->unused);
    tp_hull_clear(&S->hull);
    tp_subdiv_init(S);
}

/* ---- affine rank of a set of exponents (exact, fraction-free) --------------------- */

static int affine_rank(const tp_points *P, const size_t *pts, size_t npts, int upto)
{
    size_t n = P->n;
    if (npts <= 1)
        return 0;
    mpz_t *B = malloc((n * n + 1) * sizeof *B);
    size_t *piv = malloc((n + 1) * sizeof *piv);
    mpz_t *v = malloc((n + 1) * sizeof *v);
    if (!B || !piv || !v) {
        free(B);
        free(piv);
        free(v);
        return -1;
    }
    for (size_t j = 0; j < n * n; j++)
        mpz_init(B[j]);
    for (size_t j = 0; j < n; j++)
        mpz_init(v[j]);
    mpz_t t;
    mpz_init(t);
    int rank = 0;
    const int64_t *a0 = &P->exps[pts[0] * n];
    for (size_t i = 1; i < npts && rank < upto; i++) {
        const int64_t *a = &P->exps[pts[i] * n];
        for (size_t j = 0; j < n; j++) {
            mpz_set_si(v[j], (long)a[j]);
            mpz_set_si(t, (long)a0[j]);
            mpz_sub(v[j], v[j], t);
        }
        for (int r = 0; r < rank; r++) {
            size_t p = piv[r];
            if (mpz_sgn(v[p]) == 0)
                continue;
            mpz_set(t, v[p]);
            for (size_t j = 0; j < n; j++) {
                mpz_mul(v[j], v[j], B[(size_t)r * n + p]);
                mpz_submul(v[j], t, B[(size_t)r * n + j]);
            }
        }
        size_t p = n;
        for (size_t j = 0; j < n; j++)
            if (mpz_sgn(v[j]) != 0) {
                p = j;
                break;
            }
        if (p == n)
            continue;
        for (size_t j = 0; j < n; j++)
            mpz_set(B[(size_t)rank * n + j], v[j]);
        piv[rank++] = p;
    }
    mpz_clear(t);
    for (size_t j = 0; j < n * n; j++)
        mpz_clear(B[j]);
    for (size_t j = 0; j < n; j++)
        mpz_clear(v[j]);
    free(B);
    free(piv);
    free(v);
    return rank;
}

/* ---- a hash set of point lists ------------------------------------------------------ */

typedef struct {
    size_t cap;      /* power of two */
    size_t *slot;    /* cell index + 1, 0 = empty */
} cellset;

static uint64_t hash_pts(const size_t *pts, size_t npts)
{
    uint64_t h = 1469598103934665603u;
    for (size_t i = 0; i < npts; i++) {
        h ^= (uint64_t)pts[i] + 0x9e3779b97f4a7c15u;
        h *= 1099511628211u;
        h ^= h >> 29;
    }
    return h;
}

typedef struct {
    size_t ncells, cap;
    tp_subdiv_cell *cells;
    cellset set;
} builder;

static bool same_pts(const tp_subdiv_cell *c, const size_t *pts, size_t npts)
{
    return c->npts == npts && memcmp(c->pts, pts, npts * sizeof *pts) == 0;
}

static bool set_grow(builder *b)
{
    size_t ncap = b->set.cap ? b->set.cap * 2 : 1024;
    size_t *slot = calloc(ncap, sizeof *slot);
    if (!slot)
        return false;
    for (size_t i = 0; i < b->ncells; i++) {
        uint64_t h = hash_pts(b->cells[i].pts, b->cells[i].npts);
        size_t k = (size_t)h & (ncap - 1);
        while (slot[k])
            k = (k + 1) & (ncap - 1);
        slot[k] = i + 1;
    }
    free(b->set.slot);
    b->set.slot = slot;
    b->set.cap = ncap;
    return true;
}

/* Find the cell with these points; returns its index or SIZE_MAX. */
static size_t set_find(const builder *b, const size_t *pts, size_t npts)
{
    if (!b->set.cap)
        return SIZE_MAX;
    size_t k = (size_t)hash_pts(pts, npts) & (b->set.cap - 1);
    while (b->set.slot[k]) {
        size_t c = b->set.slot[k] - 1;
        if (same_pts(&b->cells[c], pts, npts))
            return c;
        k = (k + 1) & (b->set.cap - 1);
    }
    return SIZE_MAX;
}

/* Append a new cell (pts copied); returns its index or SIZE_MAX on no memory. */
static size_t add_cell(builder *b, int dim, const size_t *pts, size_t npts)
{
    if ((b->ncells + 1) * 2 > b->set.cap && !set_grow(b))
        return SIZE_MAX;
    if (b->ncells == b->cap) {
        size_t ncap = b->cap ? b->cap * 2 : 256;
        tp_subdiv_cell *g = realloc(b->cells, ncap * sizeof *g);
        if (!g)
            return SIZE_MAX;
        b->cells = g;
        b->cap = ncap;
    }
    tp_subdiv_cell *c = &b->cells[b->ncells];
    memset(c, 0, sizeof *c);
    c->dim = dim;
    c->npts = npts;
    c->pts = malloc((npts ? npts : 1) * sizeof *c->pts);
    if (!c->pts)
        return SIZE_MAX;
    memcpy(c->pts, pts, npts * sizeof *pts);
    size_t k = (size_t)hash_pts(pts, npts) & (b->set.cap - 1);
    while (b->set.slot[k])
        k = (k + 1) & (b->set.cap - 1);
    b->set.slot[k] = b->ncells + 1;
    return b->ncells++;
}

/* ---- point -> facet index ------------------------------------------------------- */

typedef struct {
    size_t *off;     /* npoints + 1 */
    size_t *ids;     /* facet ids: lower facets 0..nlower-1, sides nlower.. */
} pindex;

static bool pindex_build(pindex *ix, const tp_hull *H)
{
    size_t np = H->npoints;
    ix->off = calloc(np + 1, sizeof *ix->off);
    if (!ix->off)
        return false;
    size_t total = 0;
    for (size_t f = 0; f < H->nlower; f++) {
        for (size_t t = 0; t < H->lower[f].npts; t++)
            ix->off[H->lower[f].pts[t] + 1]++;
        total += H->lower[f].npts;
    }
    for (size_t f = 0; f < H->nsides; f++) {
        for (size_t t = 0; t < H->sides[f].npts; t++)
            ix->off[H->sides[f].pts[t] + 1]++;
        total += H->sides[f].npts;
    }
    for (size_t p = 0; p < np; p++)
        ix->off[p + 1] += ix->off[p];
    ix->ids = malloc((total ? total : 1) * sizeof *ix->ids);
    size_t *fill = malloc((np + 1) * sizeof *fill);
    if (!ix->ids || !fill) {
        free(fill);
        return false;
    }
    memcpy(fill, ix->off, (np + 1) * sizeof *fill);
    for (size_t f = 0; f < H->nlower; f++)
        for (size_t t = 0; t < H->lower[f].npts; t++)
            ix->ids[fill[H->lower[f].pts[t]]++] = f;
    for (size_t f = 0; f < H->nsides; f++)
        for (size_t t = 0; t < H->sides[f].npts; t++)
            ix->ids[fill[H->sides[f].pts[t]]++] = H->nlower + f;
    free(fill);
    return true;
}

static int cmp_size(const void *a, const void *b)
{
    size_t x = *(const size_t *)a, y = *(const size_t *)b;
    return (x > y) - (x < y);
}

/* Fill c->lower / c->sides: the facets containing every point of c. `count` is a
 * zeroed scratch array over facet ids, `touched` a scratch list; both left clean. */
static bool set_containing(tp_subdiv_cell *c, const tp_hull *H, const pindex *ix,
                           size_t *count, size_t *touched)
{
    size_t nt = 0;
    for (size_t t = 0; t < c->npts; t++) {
        size_t p = c->pts[t];
        for (size_t k = ix->off[p]; k < ix->off[p + 1]; k++) {
            size_t f = ix->ids[k];
            if (count[f]++ == 0)
                touched[nt++] = f;
        }
    }
    size_t nl = 0, ns = 0;
    for (size_t k = 0; k < nt; k++)
        if (count[touched[k]] == c->npts) {
            if (touched[k] < H->nlower)
                nl++;
            else
                ns++;
        }
    c->lower = malloc((nl ? nl : 1) * sizeof *c->lower);
    c->sides = malloc((ns ? ns : 1) * sizeof *c->sides);
    if (!c->lower || !c->sides) {
        for (size_t k = 0; k < nt; k++)
            count[touched[k]] = 0;
        return false;
    }
    c->nlower = c->nsides = 0;
    for (size_t k = 0; k < nt; k++) {
        size_t f = touched[k];
        if (count[f] == c->npts) {
            if (f < H->nlower)
                c->lower[c->nlower++] = f;
            else
                c->sides[c->nsides++] = f - H->nlower;
        }
        count[f] = 0;
    }
    qsort(c->lower, c->nlower, sizeof *c->lower, cmp_size);
    qsort(c->sides, c->nsides, sizeof *c->sides, cmp_size);
    return true;
}

static const size_t *facet_pts(const tp_hull *H, size_t f, size_t *npts)
{
    if (f < H->nlower) {
        *npts = H->lower[f].npts;
        return H->lower[f].pts;
    }
    *npts = H->sides[f - H->nlower].npts;
    return H->sides[f - H->nlower].pts;
}

static int cmp_cell(const void *x, const void *y)
{
    const tp_subdiv_cell *a = x, *b = y;
    if (a->dim != b->dim)
        return a->dim > b->dim ? -1 : 1;
    size_t m = a->npts < b->npts ? a->npts : b->npts;
    for (size_t i = 0; i < m; i++)
        if (a->pts[i] != b->pts[i])
            return a->pts[i] < b->pts[i] ? -1 : 1;
    return (a->npts > b->npts) - (a->npts < b->npts);
}

tp_status tp_subdiv_build(tp_subdiv *S, const tp_points *P, tp_engine engine, tp_error *err)
{
    tp_subdiv_clear(S);
    struct timespec t0, t1;
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t0);
    tp_status st = tp_hull_lower(&S->hull, P, engine, err);
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t1);
    S->hull_ms = (double)(t1.tv_sec - t0.tv_sec) * 1e3 + (double)(t1.tv_nsec - t0.tv_nsec) * 1e-6;
    if (st != TP_OK)
        return st;
    const tp_hull *H = &S->hull;
    size_t nfac = H->nlower + H->nsides;

    builder b = {0};
    pindex ix = {0};
    size_t *count = calloc(nfac + 1, sizeof *count);
    size_t *touched = malloc((nfac + 1) * sizeof *touched);
    size_t *inter = malloc((H->npoints + 1) * sizeof *inter);
    size_t *cand = malloc((nfac + 1) * sizeof *cand);
    if (!count || !touched || !inter || !cand || !pindex_build(&ix, H)) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
        goto done;
    }

    /* Maximal cells. */
    for (size_t f = 0; f < H->nlower; f++) {
        size_t c = add_cell(&b, H->dim, H->lower[f].pts, H->lower[f].npts);
        if (c == SIZE_MAX || !set_containing(&b.cells[c], H, &ix, count, touched)) {
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
            goto done;
        }
    }

    /* Walk down one dimension at a time; cells of dimension k are [lo, hi). */
    size_t lo = 0, hi = b.ncells;
    for (int k = H->dim; k >= 1; k--) {
        for (size_t g = lo; g < hi; g++) {
            /* Count, for each facet touching G, how many of G's points it holds. */
            size_t nt = 0;
            const tp_subdiv_cell *G = &b.cells[g];
            size_t gn = G->npts;
            for (size_t t = 0; t < gn; t++) {
                size_t p = b.cells[g].pts[t];
                for (size_t q = ix.off[p]; q < ix.off[p + 1]; q++) {
                    size_t f = ix.ids[q];
                    if (count[f]++ == 0)
                        cand[nt++] = f;
                }
            }
            for (size_t q = 0; q < nt; q++) {
                size_t f = cand[q];
                size_t hits = count[f];
                if (hits == gn || hits < (size_t)k)
                    continue; /* contains G, or too few points for a (k-1)-face */
                /* G ∩ X, in G's (ascending) point order. */
                size_t fn;
                const size_t *fp = facet_pts(H, f, &fn);
                size_t ni = 0, a = 0, c2 = 0;
                const size_t *gp = b.cells[g].pts;
                while (a < gn && c2 < fn) {
                    if (gp[a] == fp[c2]) {
                        inter[ni++] = gp[a];
                        a++;
                        c2++;
                    } else if (gp[a] < fp[c2]) {
                        a++;
                    } else {
                        c2++;
                    }
                }
                if (set_find(&b, inter, ni) != SIZE_MAX)
                    continue;
                int d;
                if (k - 1 == 0)
                    d = ni == 1 ? 0 : -2;
                else if (k - 1 == 1)
                    d = ni >= 2 ? 1 : 0;
                else
                    d = affine_rank(P, inter, ni, k);
                if (d == -1) {
                    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
                    goto done;
                }
                if (d != k - 1)
                    continue;
                size_t c = add_cell(&b, k - 1, inter, ni);
                if (c == SIZE_MAX) {
                    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
                    goto done;
                }
            }
            for (size_t q = 0; q < nt; q++)
                count[cand[q]] = 0;
        }
        /* Containing-facet lists of the new cells. */
        for (size_t c = hi; c < b.ncells; c++)
            if (!set_containing(&b.cells[c], H, &ix, count, touched)) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
                goto done;
            }
        lo = hi;
        hi = b.ncells;
    }

    qsort(b.cells, b.ncells, sizeof *b.cells, cmp_cell);
    S->cells = b.cells;
    S->ncells = b.ncells;
    b.cells = NULL;
    b.ncells = 0;

    S->unused = malloc((H->npoints ? H->npoints : 1) * sizeof *S->unused);
    if (!S->unused) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
        goto done;
    }
    for (size_t i = 0; i < H->npoints; i++)
        if (!H->on_hull[i])
            S->unused[S->nunused++] = i;

done:
    for (size_t i = 0; i < b.ncells; i++)
        cell_clear(&b.cells[i]);
    free(b.cells);
    free(b.set.slot);
    free(ix.off);
    free(ix.ids);
    free(count);
    free(touched);
    free(inter);
    free(cand);
    return st;
}

tp_status tp_subdiv_check(const tp_subdiv *S, const tp_points *P, tp_error *err)
{
    const tp_hull *H = &S->hull;
    for (size_t c = 0; c < S->ncells; c++) {
        const tp_subdiv_cell *C = &S->cells[c];
        int d = affine_rank(P, C->pts, C->npts, (int)P->n + 1);
        if (d != C->dim)
            return tp_error_set(err, TP_EINTERNAL, 0, 0,
                                "subdivision cell %zu has dimension %d, recorded %d", c, d,
                                C->dim);
        for (size_t t = 1; t < C->npts; t++)
            if (C->pts[t - 1] >= C->pts[t])
                return tp_error_set(err, TP_EINTERNAL, 0, 0,
                                    "subdivision cell %zu: points not ascending", c);
        if (C->nlower == 0)
            return tp_error_set(err, TP_EINTERNAL, 0, 0,
                                "subdivision cell %zu lies on no lower facet", c);
        /* Every point of the cell attains the minimum of h + <a, w> for each listed
         * lower facet w. */
        for (size_t l = 0; l < C->nlower; l++) {
            const tp_hull_facet *F = &H->lower[C->lower[l]];
            size_t a = 0;
            for (size_t t = 0; t < C->npts; t++) {
                while (a < F->npts && F->pts[a] < C->pts[t])
                    a++;
                if (a == F->npts || F->pts[a] != C->pts[t])
                    return tp_error_set(err, TP_EINTERNAL, 0, 0,
                                        "subdivision cell %zu is not inside lower facet %zu",
                                        c, C->lower[l]);
            }
        }
        if (c > 0 && cmp_cell(&S->cells[c - 1], C) >= 0)
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "subdivision cells not sorted at %zu",
                                c);
    }
    return TP_OK;
}
