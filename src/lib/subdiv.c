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
#include "idx_list.h"

#include <stdint.h>
#include <stdlib.h>
#ifdef __GLIBC__
#include <malloc.h>
#endif
#include <string.h>
#include <time.h>

void tp_subdiv_init(tp_subdiv *S)
{
    memset(S, 0, sizeof *S);
    tp_hull_init(&S->hull);
    tp_arena_init(&S->pool);
}

void tp_subdiv_clear(tp_subdiv *S)
{
    tp_big_free(S->cells);
    tp_arena_free(&S->pool);
    free(S->unused);
    tp_hull_clear(&S->hull);
    tp_subdiv_init(S);
}

/* ---- affine rank of a set of exponents (exact, fraction-free) --------------------- */

static int affine_rank(const tp_points *P, const uint32_t *pts, size_t npts, int upto)
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
    const int64_t *a0 = &P->exps[(size_t)pts[0] * n];
    for (size_t i = 1; i < npts && rank < upto; i++) {
        const int64_t *a = &P->exps[(size_t)pts[i] * n];
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

/* ---- the cells under construction ----------------------------------------------- */

/* Point lists and facet lists of all cells live in an arena (S->pool), so pointers to
 * them stay valid while cells are added; a maximal cell shares its point list with its
 * lower facet, a face whose points are a run of its parent's list shares that run. A hash set of point lists (open addressing, at most 3/4 full; a slot
 * holds cell index + 1 in its low 40 bits and the top 24 bits of the list's hash
 * above, 0 = empty) finds a cell by its points with one memory access per probe. */
#define SLOT_IDX(x) ((size_t)((x) & (((uint64_t)1 << 40) - 1)))
#define SLOT_TAG(h) ((h) >> 40 << 40)

typedef struct {
    size_t cap;      /* power of two */
    uint64_t *slot;
} cellset;

static uint64_t hash_pts(const uint32_t *pts, size_t npts)
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
    tp_arena *mem;       /* S->pool */
    cellset set;
} builder;

static inline const uint32_t *cell_pts(const builder *b, size_t c)
{
    return b->cells[c].pts;
}

/* the set holds at most 3/4 of its capacity */
static bool set_full(size_t cells, size_t cap)
{
    return cells / 3 * 4 + (cells % 3) * 4 / 3 >= cap;
}

static bool same_pts(const builder *b, size_t c, const uint32_t *pts, size_t npts)
{
    return b->cells[c].npts == npts &&
           memcmp(cell_pts(b, c), pts, npts * sizeof *pts) == 0;
}

static bool set_grow(builder *b)
{
    size_t ncap = b->set.cap ? b->set.cap * 2 : 1024;
    while (set_full(b->ncells + 1, ncap))
        ncap *= 2;
    if (b->ncells + 1 >= ((uint64_t)1 << 40))
        return false;
    uint64_t *slot = tp_big_alloc(ncap * sizeof *slot);
    if (!slot)
        return false;
    for (size_t i = 0; i < b->ncells; i++) {
        uint64_t h = hash_pts(cell_pts(b, i), b->cells[i].npts);
        size_t k = (size_t)h & (ncap - 1);
        while (slot[k])
            k = (k + 1) & (ncap - 1);
        slot[k] = SLOT_TAG(h) | (uint64_t)(i + 1);
    }
    tp_big_free(b->set.slot);
    b->set.slot = slot;
    b->set.cap = ncap;
    return true;
}

/* Find the cell with these points (hash h); returns its index or SIZE_MAX. */
static size_t set_find(const builder *b, const uint32_t *pts, size_t npts, uint64_t h)
{
    if (!b->set.cap)
        return SIZE_MAX;
    size_t k = (size_t)h & (b->set.cap - 1);
    uint64_t t = SLOT_TAG(h), x;
    while ((x = b->set.slot[k]) != 0) {
        size_t c = SLOT_IDX(x) - 1;
        if (SLOT_TAG(x) == t && same_pts(b, c, pts, npts))
            return c;
        k = (k + 1) & (b->set.cap - 1);
    }
    return SIZE_MAX;
}

/* Append a new cell (hash h); its point list is `shared` when not NULL (a list that
 * outlives the subdivision's cells, equal to pts), else a copy of pts. Returns its
 * index or SIZE_MAX on no memory. */
static size_t add_cell(builder *b, int dim, const uint32_t *pts, size_t npts, uint64_t h,
                       uint32_t *shared)
{
    if (set_full(b->ncells + 1, b->set.cap) && !set_grow(b))
        return SIZE_MAX;
    if (b->ncells == b->cap) {
        size_t ncap = b->cap ? b->cap / 2 * 3 : 256;
        tp_subdiv_cell *g = tp_big_realloc(b->cells, ncap * sizeof *g);
        if (!g)
            return SIZE_MAX;
        b->cells = g;
        b->cap = ncap;
    }
    uint32_t *own = shared;
    if (!own) {
        own = tp_arena_alloc4(b->mem, npts * sizeof *own);
        if (!own)
            return SIZE_MAX;
        memcpy(own, pts, npts * sizeof *pts);
    }
    tp_subdiv_cell *c = &b->cells[b->ncells];
    memset(c, 0, sizeof *c);
    c->dim = dim;
    c->npts = (uint32_t)npts; /* < 2^32: tp_subdiv_build checks the point count */
    c->pts = own;
    size_t k = (size_t)h & (b->set.cap - 1);
    while (b->set.slot[k])
        k = (k + 1) & (b->set.cap - 1);
    b->set.slot[k] = SLOT_TAG(h) | (uint64_t)(b->ncells + 1);
    return b->ncells++;
}

/* ---- point -> facet index ------------------------------------------------------- */

typedef struct {
    size_t *off;     /* npoints + 1 */
    uint32_t *ids;   /* facet ids: lower facets 0..nlower-1, sides nlower.. (fewer
                        than 2^32: tp_subdiv_build checks) */
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
            ix->ids[fill[H->lower[f].pts[t]]++] = (uint32_t)f;
    for (size_t f = 0; f < H->nsides; f++)
        for (size_t t = 0; t < H->sides[f].npts; t++)
            ix->ids[fill[H->sides[f].pts[t]]++] = (uint32_t)(H->nlower + f);
    free(fill);
    return true;
}

/* Fill the lower / side facet lists of cell ci: the facets containing every point of
 * it, one piece of the arena (sides right after lower). `count` is a zeroed scratch
 * array over facet ids, `touched` a scratch list; both left clean. */
static bool set_containing(builder *b, size_t ci, const tp_hull *H, const pindex *ix,
                           uint32_t *count, uint32_t *touched)
{
    tp_subdiv_cell *c = &b->cells[ci];
    const uint32_t *pts = cell_pts(b, ci);
    size_t nt = 0;
    for (size_t t = 0; t < c->npts; t++) {
        uint32_t p = pts[t];
        for (size_t k = ix->off[p]; k < ix->off[p + 1]; k++) {
            uint32_t f = ix->ids[k];
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
    uint32_t *lower = tp_arena_alloc4(b->mem, (nl + ns) * sizeof *lower);
    if (!lower) {
        for (size_t k = 0; k < nt; k++)
            count[touched[k]] = 0;
        return false;
    }
    uint32_t *sides = lower + nl;
    c->lower = lower; /* sides follow: tp_subdiv_sides */
    c->nlower = c->nsides = 0;
    for (size_t k = 0; k < nt; k++) {
        uint32_t f = touched[k];
        if (count[f] == c->npts) {
            if (f < H->nlower)
                lower[c->nlower++] = f;
            else
                sides[c->nsides++] = (uint32_t)(f - H->nlower);
        }
        count[f] = 0;
    }
    tp_idx_sort(lower, c->nlower);
    tp_idx_sort(sides, c->nsides);
    return true;
}

static const uint32_t *facet_pts(const tp_hull *H, size_t f, size_t *npts)
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
    return tp_idx_cmp_lists(a->pts, a->npts, b->pts, b->npts);
}

/* Return the free pages inside malloc's heap to the system after a big run (a hull of
 * 2^16 facets or more; small runs, e.g. a batch of polynomials, skip the walk over the
 * heap). Big temporary arrays freed in the middle of the heap otherwise stay resident,
 * and the next stage's tables (tp_big_alloc, outside the heap) cannot reuse them. */
static void give_back_memory(const tp_hull *H)
{
#ifdef __GLIBC__
    if (H->nlower >= ((size_t)1 << 16))
        malloc_trim(0);
#else
    (void)H;
#endif
}

tp_status tp_subdiv_build(tp_subdiv *S, const tp_points *P, tp_engine engine, tp_error *err)
{
    return tp_subdiv_build_limited(S, P, engine, 0, err);
}

tp_status tp_subdiv_build_limited(tp_subdiv *S, const tp_points *P, tp_engine engine,
                                  size_t max_cells, tp_error *err)
{
    if (max_cells == 0)
        max_cells = TP_SUBDIV_MAX_CELLS;
    tp_subdiv_clear(S);
    struct timespec t0, t1;
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t0);
    tp_status st = tp_hull_lower(&S->hull, P, engine, err);
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t1);
    S->hull_ms = (double)(t1.tv_sec - t0.tv_sec) * 1e3 + (double)(t1.tv_nsec - t0.tv_nsec) * 1e-6;
    if (st != TP_OK)
        return st;
    give_back_memory(&S->hull); /* the hull engine's scratch */
    const tp_hull *H = &S->hull;
    size_t nfac = H->nlower + H->nsides;
    if (H->npoints >= UINT32_MAX || nfac >= UINT32_MAX)
        return tp_error_set(err, TP_ELIMIT, 0, 0,
                            "%zu points and %zu facets: the subdivision takes fewer than "
                            "2^32 of each", H->npoints, nfac);

    /* Finding a face costs about dim^2 rank work in high dimension: count faces in
     * units of max(1, dim^2 / 4) against the limit. */
    size_t unit = (size_t)(H->dim > 2 ? H->dim * H->dim / 4 : 1);
    size_t cell_cap = max_cells / unit;
    if (cell_cap >= UINT32_MAX)
        cell_cap = UINT32_MAX - 1; /* cell indices are 32-bit in the complex */

    builder b = {0};
    b.mem = &S->pool;
    pindex ix = {0};
    /* 32-bit scratch: facet ids, point indices and counts of a cell's points are all
     * below 2^32 (checked above) */
    uint32_t *count = calloc(nfac + 1, sizeof *count);
    uint32_t *touched = malloc((nfac + 1) * sizeof *touched);
    uint32_t *inter = malloc((H->npoints + 1) * sizeof *inter);
    uint32_t *cand = malloc((nfac + 1) * sizeof *cand);
    if (!count || !touched || !inter || !cand || !pindex_build(&ix, H)) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
        goto done;
    }

    /* Capacity for a plane triangulation with T triangles: 1 + 3T + (boundary edges)
     * faces by Euler's formula; other cases grow from there. */
    b.cap = H->dim == 2 ? 3 * H->nlower + H->nlower / 16 + 64
                        : 3 * H->nlower + H->npoints + 16;
    b.cells = tp_big_alloc(b.cap * sizeof *b.cells);
    if (!b.cells) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
        goto done;
    }
    b.set.cap = 1024;
    while (set_full(b.cap, b.set.cap))
        b.set.cap *= 2;
    b.set.slot = tp_big_alloc(b.set.cap * sizeof *b.set.slot);
    if (!b.set.slot) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
        goto done;
    }

    /* Maximal cells. */
    for (size_t f = 0; f < H->nlower; f++) {
        size_t c = add_cell(&b, H->dim, H->lower[f].pts, H->lower[f].npts,
                            hash_pts(H->lower[f].pts, H->lower[f].npts), H->lower[f].pts);
        if (c == SIZE_MAX || !set_containing(&b, c, H, &ix, count, touched)) {
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
            size_t gn = b.cells[g].npts;
            for (size_t t = 0; t < gn; t++) {
                uint32_t p = cell_pts(&b, g)[t];
                for (size_t q = ix.off[p]; q < ix.off[p + 1]; q++) {
                    uint32_t f = ix.ids[q];
                    if (count[f]++ == 0)
                        cand[nt++] = f;
                }
            }
            for (size_t q = 0; q < nt; q++) {
                uint32_t f = cand[q];
                size_t hits = count[f];
                if (hits == gn || hits < (size_t)k)
                    continue; /* contains G, or too few points for a (k-1)-face */
                /* G ∩ X, in G's (ascending) point order. */
                size_t fn;
                const uint32_t *fp = facet_pts(H, f, &fn);
                size_t ni = 0, a = 0, c2 = 0, first = 0;
                uint32_t *gp = b.cells[g].pts; /* refetched: add_cell may move b.cells */
                while (a < gn && c2 < fn) {
                    if (gp[a] == fp[c2]) {
                        if (ni == 0)
                            first = a;
                        inter[ni++] = gp[a];
                        a++;
                        c2++;
                    } else if (gp[a] < fp[c2]) {
                        a++;
                    } else {
                        c2++;
                    }
                }
                uint64_t h = hash_pts(inter, ni);
                if (set_find(&b, inter, ni, h) != SIZE_MAX)
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
                if (b.ncells >= cell_cap) {
                    st = tp_error_set(err, TP_ELIMIT, 0, 0,
                                      "the regular subdivision has more than %zu faces in "
                                      "dimension %d (the limit is %zu face units, a face "
                                      "counting (dim^2)/4 of them); raise it with "
                                      "--max-cells N",
                                      cell_cap, H->dim, max_cells);
                    goto done;
                }
                /* a run of G's own list is shared rather than copied (an edge of a
                 * triangle, every vertex) */
                bool run = ni > 0 && gp[first + ni - 1] == inter[ni - 1];
                size_t c = add_cell(&b, k - 1, inter, ni, h, run ? gp + first : NULL);
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
            if (!set_containing(&b, c, H, &ix, count, touched)) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (subdivision)");
                goto done;
            }
        lo = hi;
        hi = b.ncells;
    }

    tp_big_free(b.set.slot);
    b.set.slot = NULL;
    /* Give back unused capacity, then sort. Cells were made in dim-descending blocks,
     * so only blocks need sorting, and a block already in order is left alone. */
    if (b.ncells && b.ncells < b.cap) {
        tp_subdiv_cell *g = tp_big_realloc(b.cells, b.ncells * sizeof *g);
        if (g) {
            b.cells = g;
            b.cap = b.ncells;
        }
    }
    for (size_t s0 = 0; s0 < b.ncells;) {
        size_t s1 = s0 + 1;
        bool sorted = true;
        while (s1 < b.ncells && b.cells[s1].dim == b.cells[s0].dim) {
            if (sorted && cmp_cell(&b.cells[s1 - 1], &b.cells[s1]) > 0)
                sorted = false;
            s1++;
        }
        if (!sorted)
            qsort(b.cells + s0, s1 - s0, sizeof *b.cells, cmp_cell);
        s0 = s1;
    }
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
    tp_big_free(b.cells);
    tp_big_free(b.set.slot);
    free(ix.off);
    free(ix.ids);
    free(count);
    free(touched);
    free(inter);
    free(cand);
    give_back_memory(&S->hull);
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
                                        c, (size_t)C->lower[l]);
            }
        }
        if (c > 0 && cmp_cell(&S->cells[c - 1], C) >= 0)
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "subdivision cells not sorted at %zu",
                                c);
    }
    return TP_OK;
}
