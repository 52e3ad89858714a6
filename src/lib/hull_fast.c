/* hull_fast.c — the fast exact lower-hull engine for n = 1, 2, 3 variables.
 *
 * Method: an incremental regular triangulation (cavity insertion, any dimension up to
 * 3) of the exponents lifted by the heights, located by a stochastic walk. Points are
 * inserted in biased randomized rounds, each ordered along a Hilbert (n = 2) or Morton
 * (n = 3) curve, and renumbered by that rank so that memory is read in order.
 * Degeneracy is removed by a symbolic perturbation of the heights only,
 *
 *     H_k  =  Omega * [k is a frame point]  +  h_k  -  eps * |a_k|^2  +  eps_2^(1+k),
 *
 * with Omega infinitely large, eps >> eps_2 infinitely small and k the rank. The n+1
 * "frame" points form a simplex strictly containing every exponent, so the
 * triangulation always covers the frame and the real simplices (no frame vertex)
 * triangulate the Newton polytope. Because the orientation determinant is linear in
 * the height column, each predicate is a short sequence of exact sums
 *     S = O * H_q - sum_i lambda_i * H_{v_i},
 * where O is the simplex volume and lambda_i the barycentric numerators of q (exact
 * int64/int128 from the coordinates), evaluated level by level: Omega, h, |a|^2, rank.
 * Heights are scaled to a common denominator; sums use __int128 when the operands fit
 * in 62 bits and GMP otherwise.
 *
 * The eps level (a strictly concave lift) keeps exactly the vertices of the cells of
 * the true subdivision as vertices of the triangulation, so the exact cells are the
 * classes of real simplices glued across faces whose opposite vertices lie on the same
 * lifted hyperplane (checked exactly, unperturbed). The other points on a cell, and
 * the points on facets of the Newton polytope (found from the real faces next to frame
 * simplices, grouped by hyperplane), are located once more at the end.
 *
 * A Newton polytope of dimension d < n (homogeneous input, for one) is worked in d of
 * the coordinates, on which its span projects injectively (see tp_hull_lower_fast).
 * Declines (handled = false) for a Newton polytope of dimension above 3, exponent
 * ranges above 2^28, or more than 2^26 points.
 */
#include "hull_internal.h"

#include <limits.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

__extension__ typedef __int128 i128;
__extension__ typedef unsigned __int128 u128;

#define NMAX 3
#define DMAX (NMAX + 1)
#define RANGE_MAX ((int64_t)1 << 28)
#define COUNT_MAX ((size_t)1 << 26)
#define FIT62 ((i128)1 << 62)

typedef struct {
    int n, D;            /* dimension worked in (that of the Newton polytope), n + 1 */
    size_t nfull;        /* variables of the input (n, or more when the Newton polytope
                            is lower dimensional) */
    size_t J[NMAX];      /* the input coordinates kept: a projection that is injective
                            on the affine span of the exponents */
    bool small;          /* every coordinate, frame included, below 2^19 */
    size_t count;        /* input points (P->count) */
    size_t np;           /* real points: the distinct exponents, numbered by rank */
    size_t *orig;        /* np: rank -> index in the input */
    int32_t *x;          /* (np + D) * n translated coordinates; frame points at np.. */
    int64_t *h;          /* np scaled heights, when they all fit in 62 bits */
    mpz_t *hz;           /* np scaled heights otherwise (NULL when h is used) */
    mpz_t den;           /* common denominator of the heights */
    bool *skip;          /* np: hidden at insertion, strictly above and inside */
    /* simplices */
    int32_t *sv, *sn;    /* cap * D vertices / neighbours (-1: none); sv[s*D] < 0: free */
    uint32_t *mark;
    size_t ns, cap;
    int32_t *freel;
    size_t nfree;
    uint32_t stamp;
    uint64_t rng;
    int32_t last;
    /* insertion scratch */
    int32_t *cav, *stk;
    size_t ncav, capcav, nstk, capstk;
    struct ridge *rid;
    size_t nrid, caprid;
    int32_t *htab;       /* ridge matching */
    size_t caphtab;
    mpz_t t1, t2, t3;
} fh;

struct ridge {
    int32_t key[2];      /* the D - 2 <= 2 vertices shared with q, sorted; unused INT32_MAX */
    int32_t s;
    int32_t j;
};

static uint64_t splitmix(uint64_t *s)
{
    uint64_t z = (*s += 0x9e3779b97f4a7c15u);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

static void mpz_set_i128(mpz_t r, i128 v)
{
    u128 u = v < 0 ? -(u128)v : (u128)v;
    mpz_set_ui(r, (unsigned long)(uint64_t)(u >> 64));
    mpz_mul_2exp(r, r, 64);
    mpz_add_ui(r, r, (unsigned long)(uint64_t)u);
    if (v < 0)
        mpz_neg(r, r);
}

static inline const int32_t *pt(const fh *F, int32_t i) { return &F->x[(size_t)i * F->n]; }

/* Orientation of D points (indices) in R^n: det(p1 - p0, ..., pn - p0). */
static inline i128 orient(const fh *F, const int32_t *v)
{
    const int32_t *p0 = pt(F, v[0]);
    if (F->n == 1)
        return (i128)pt(F, v[1])[0] - p0[0];
    if (F->n == 2) {
        const int32_t *p1 = pt(F, v[1]), *p2 = pt(F, v[2]);
        int64_t ax = p1[0] - p0[0], ay = p1[1] - p0[1];
        int64_t bx = p2[0] - p0[0], by = p2[1] - p0[1];
        return (i128)ax * by - (i128)ay * bx;
    }
    const int32_t *p1 = pt(F, v[1]), *p2 = pt(F, v[2]), *p3 = pt(F, v[3]);
    int64_t a0 = p1[0] - p0[0], a1 = p1[1] - p0[1], a2 = p1[2] - p0[2];
    int64_t b0 = p2[0] - p0[0], b1 = p2[1] - p0[1], b2 = p2[2] - p0[2];
    int64_t c0 = p3[0] - p0[0], c1 = p3[1] - p0[1], c2 = p3[2] - p0[2];
    i128 m0 = (i128)b1 * c2 - (i128)b2 * c1;
    i128 m1 = (i128)b0 * c2 - (i128)b2 * c0;
    i128 m2 = (i128)b0 * c1 - (i128)b1 * c0;
    return a0 * m0 - a1 * m1 + a2 * m2;
}

/* n = 3: a[i] = vertex i of simplex s minus q. */
static inline void translate3(const fh *F, int32_t s, int32_t q, int64_t a[4][3])
{
    const int32_t *sv = &F->sv[(size_t)s * 4];
    const int32_t *x = pt(F, q);
    for (int i = 0; i < 4; i++) {
        const int32_t *p = pt(F, sv[i]);
        a[i][0] = p[0] - x[0];
        a[i][1] = p[1] - x[1];
        a[i][2] = p[2] - x[2];
    }
}

/* n = 3, coordinates below 2^19, a[i] = p_i - q: c = a[j] x a[k], then
 * *lu = a[u] . c and *lv = -(a[v] . c) (cross products below 2^41, dots below 2^63). */
static inline void half3(int64_t a[4][3], int j, int k, int u, int v, int64_t *lu,
                         int64_t *lv)
{
    int64_t c0 = a[j][1] * a[k][2] - a[j][2] * a[k][1];
    int64_t c1 = a[j][2] * a[k][0] - a[j][0] * a[k][2];
    int64_t c2 = a[j][0] * a[k][1] - a[j][1] * a[k][0];
    *lu = a[u][0] * c0 + a[u][1] * c1 + a[u][2] * c2;
    *lv = -(a[v][0] * c0 + a[v][1] * c1 + a[v][2] * c2);
}

/* lambda_i = orientation with vertex i replaced by q; returns O = sum lambda_i. */
static inline i128 bary(const fh *F, int32_t s, int32_t q, i128 *lam)
{
    int D = F->D;
    if (D == 3) {
        const int32_t *sv = &F->sv[(size_t)s * 3];
        const int32_t *a = pt(F, sv[0]), *b = pt(F, sv[1]), *c = pt(F, sv[2]);
        const int32_t *x = pt(F, q);
        /* lambda_0 = orient(q, b, c), lambda_1 = orient(a, q, c), lambda_2 = orient(a, b, q) */
        /* coordinates below 2^30: each product fits in 62 bits */
        int64_t x0 = x[0], x1 = x[1], a0 = a[0], a1 = a[1];
        lam[0] = (int64_t)(b[0] - x0) * (c[1] - x1) - (int64_t)(b[1] - x1) * (c[0] - x0);
        lam[1] = (x0 - a0) * (c[1] - a1) - (x1 - a1) * (c[0] - a0);
        lam[2] = (int64_t)(b[0] - a0) * (x1 - a1) - (int64_t)(b[1] - a1) * (x0 - a0);
        return lam[0] + lam[1] + lam[2];
    }
    if (D == 4 && F->small) {
        /* Translate by q: lambda_i = (-1)^i det(a_j, j != i), a_j = p_j - q (cofactor
         * expansion of the 4x4 orientation determinant along q's row). Coordinates
         * below 2^19: cross products below 2^41, each dot product below 2^63. */
        int64_t a[4][3];
        translate3(F, s, q, a);
        int64_t l[4];
        half3(a, 2, 3, 1, 0, &l[0], &l[1]);
        half3(a, 0, 1, 3, 2, &l[2], &l[3]);
        for (int i = 0; i < 4; i++)
            lam[i] = l[i];
        return lam[0] + lam[1] + lam[2] + lam[3];
    }
    int32_t v[DMAX];
    memcpy(v, &F->sv[(size_t)s * D], D * sizeof *v);
    i128 O = 0;
    for (int i = 0; i < D; i++) {
        int32_t keep = v[i];
        v[i] = q;
        lam[i] = orient(F, v);
        v[i] = keep;
        O += lam[i];
    }
    return O;
}

static inline bool is_frame(const fh *F, int32_t v) { return (size_t)v >= F->np; }

static inline bool is_real(const fh *F, int32_t s)
{
    const int32_t *v = &F->sv[(size_t)s * F->D];
    for (int i = 0; i < F->D; i++)
        if (is_frame(F, v[i]))
            return false;
    return true;
}

static inline i128 iabs(i128 a) { return a < 0 ? -a : a; }

/* sign of O * vq - sum over real vertices lambda_i * vv[i]; |vq|, |vv[i]| < 2^62. */
static int lin_sign64(fh *F, const int32_t *v, i128 O, const i128 *lam, int64_t vq,
                      const int64_t *vv)
{
    int D = F->D;
    bool small = iabs(O) < FIT62;
    for (int i = 0; i < D && small; i++)
        small = iabs(lam[i]) < FIT62;
    if (small) {
        i128 S = O * vq;
        for (int i = 0; i < D; i++)
            if (!is_frame(F, v[i]))
                S -= lam[i] * vv[i];
        return (S > 0) - (S < 0);
    }
    mpz_set_i128(F->t1, O);
    mpz_set_si(F->t2, (long)vq);
    mpz_mul(F->t1, F->t1, F->t2);
    for (int i = 0; i < D; i++)
        if (!is_frame(F, v[i])) {
            mpz_set_i128(F->t2, lam[i]);
            mpz_set_si(F->t3, (long)vv[i]);
            mpz_submul(F->t1, F->t2, F->t3);
        }
    return mpz_sgn(F->t1);
}

/* |a|^2 of a (translated) point: below 3 * 2^56. */
static inline int64_t sq(const fh *F, int32_t i)
{
    const int32_t *p = pt(F, i);
    int64_t g = 0;
    for (int j = 0; j < F->n; j++)
        g += (int64_t)p[j] * p[j];
    return g;
}

/* The same sum with the GMP heights. */
static int lin_sign_z(fh *F, const int32_t *v, int32_t q, i128 O, const i128 *lam)
{
    int D = F->D;
    mpz_set_i128(F->t2, O);
    mpz_mul(F->t1, F->t2, F->hz[q]);
    for (int i = 0; i < D; i++)
        if (!is_frame(F, v[i])) {
            mpz_set_i128(F->t2, lam[i]);
            mpz_submul(F->t1, F->t2, F->hz[v[i]]);
        }
    return mpz_sgn(F->t1);
}

/* Unperturbed level: sign of O*h_q - sum lambda_i h_i (frame vertices contribute 0). */
static inline int level0(fh *F, const int32_t *v, int32_t q, i128 O, const i128 *lam)
{
    if (F->hz)
        return lin_sign_z(F, v, q, O, lam);
    int64_t vv[DMAX] = {0};
    for (int i = 0; i < F->D; i++)
        vv[i] = is_frame(F, v[i]) ? 0 : F->h[v[i]];
    return lin_sign64(F, v, O, lam, F->h[q], vv);
}

/* Is q strictly below the (perturbed) lifted hyperplane of simplex s? O > 0.
 * *lev0 (if not NULL) gets the sign of the unperturbed comparison (2 when the frame
 * level decided). */
static bool conflict(fh *F, int32_t s, int32_t q, i128 O, const i128 *lam, int *lev0)
{
    const int32_t *v = &F->sv[(size_t)s * F->D];
    int D = F->D;
    bool anyframe = false;
    i128 so = 0;
    if (lev0)
        *lev0 = 2;
    for (int i = 0; i < D; i++)
        if (is_frame(F, v[i])) {
            anyframe = true;
            so -= lam[i];
        }
    if (anyframe && so != 0)
        return so < 0;
    int sg = level0(F, v, q, O, lam);
    if (lev0)
        *lev0 = sg;
    if (sg != 0)
        return sg < 0;
    /* eps level: heights - eps |a|^2 (strictly concave), so only the vertices of each
     * cell of the true subdivision stay vertices of the triangulation. When q lies in
     * the closed simplex (every lambda >= 0; q is no vertex, exponents are distinct),
     * strict concavity already decides: q is above. */
    if (!anyframe) {
        bool inside = true;
        for (int i = 0; i < D && inside; i++)
            inside = lam[i] >= 0;
        if (inside)
            return false;
    }
    int64_t vv[DMAX] = {0};
    for (int i = 0; i < D; i++)
        vv[i] = is_frame(F, v[i]) ? 0 : sq(F, v[i]);
    sg = -lin_sign64(F, v, O, lam, sq(F, q), vv);
    if (sg != 0)
        return sg < 0;
    /* eps_2 level: the point of smallest index with a nonzero coefficient decides;
     * q's own coefficient is O > 0. */
    int32_t best = q;
    int bsg = 1;
    for (int i = 0; i < D; i++)
        if (!is_frame(F, v[i]) && lam[i] != 0 && v[i] < best) {
            best = v[i];
            bsg = lam[i] > 0 ? -1 : 1;
        }
    return bsg < 0;
}

/* ---- simplex storage ------------------------------------------------------------- */

static bool grow(void **p, size_t *cap, size_t need, size_t elem)
{
    if (need <= *cap)
        return true;
    size_t c = *cap ? *cap : 64;
    while (c < need)
        c *= 2;
    void *q = realloc(*p, c * elem);
    if (!q)
        return false;
    *p = q;
    *cap = c;
    return true;
}

static int32_t new_simplex(fh *F)
{
    if (F->nfree > 0)
        return F->freel[--F->nfree];
    if (F->ns == F->cap) {
        size_t c = F->cap ? F->cap * 2 : 1024;
        int32_t *a = realloc(F->sv, c * F->D * sizeof *a);
        if (!a)
            return -1;
        F->sv = a;
        a = realloc(F->sn, c * F->D * sizeof *a);
        if (!a)
            return -1;
        F->sn = a;
        uint32_t *m = realloc(F->mark, c * sizeof *m);
        if (!m)
            return -1;
        F->mark = m;
        int32_t *fl = realloc(F->freel, c * sizeof *fl);
        if (!fl)
            return -1;
        F->freel = fl;
        F->cap = c;
    }
    F->mark[F->ns] = 0;
    return (int32_t)F->ns++;
}

/* ---- point location and insertion ------------------------------------------------ */

/* One walk step for n = 3 with small coordinates (see bary): the numerators come in two
 * halves sharing a cross product, and the second half is skipped when the first already
 * shows a face to leave through. Returns that face, or -1 with lam and *O filled. */
static int step3(const fh *F, int32_t s, int32_t q, i128 *lam, i128 *O, unsigned coin)
{
    int64_t a[4][3], l[4] = {0, 0, 0, 0};
    translate3(F, s, q, a);
    for (int k = 0; k < 2; k++) {
        if ((k ^ (int)(coin & 1)) == 0) {
            half3(a, 2, 3, 1, 0, &l[0], &l[1]);
            if (l[0] < 0 || l[1] < 0)
                return l[0] < 0 && (l[1] >= 0 || (coin & 2)) ? 0 : 1;
        } else {
            half3(a, 0, 1, 3, 2, &l[2], &l[3]);
            if (l[2] < 0 || l[3] < 0)
                return l[2] < 0 && (l[3] >= 0 || (coin & 2)) ? 2 : 3;
        }
    }
    for (int i = 0; i < 4; i++)
        lam[i] = l[i];
    *O = (i128)l[0] + l[1] + l[2] + l[3];
    return -1;
}

/* Stochastic visibility walk from F->last to a simplex containing q; lam/O filled. */
static int32_t locate(fh *F, int32_t q, i128 *lam, i128 *O)
{
    int D = F->D;
    int32_t s = F->last;
    bool lazy = D == 4 && F->small;
    for (size_t steps = 0;; steps++) {
        /* a cheap xorshift step: where to start looking, and ties */
        F->rng ^= F->rng << 13;
        F->rng ^= F->rng >> 7;
        F->rng ^= F->rng << 17;
        int go = -1;
        if (lazy) {
            go = step3(F, s, q, lam, O, (unsigned)(F->rng >> 40));
        } else {
            *O = bary(F, s, q, lam);
            int start = (int)(((F->rng >> 32) * (uint64_t)D) >> 32);
            for (int k = 0; k < D && go < 0; k++) {
                int i = start + k < D ? start + k : start + k - D;
                if (lam[i] < 0)
                    go = i;
            }
        }
        if (go < 0)
            return s;
        int32_t t = F->sn[(size_t)s * D + go];
        if (t < 0 || steps > 4 * F->ns + 64)
            return -1; /* outside the frame: cannot happen */
        s = t;
    }
}

static int cmp_ridge(const void *a, const void *b)
{
    const struct ridge *x = a, *y = b;
    for (int k = 0; k < NMAX - 1; k++)
        if (x->key[k] != y->key[k])
            return x->key[k] < y->key[k] ? -1 : 1;
    return 0;
}

static tp_status insert(fh *F, int32_t q, tp_error *err)
{
    int D = F->D;
    i128 lam[DMAX], O;
    int32_t s = locate(F, q, lam, &O);
    if (s < 0)
        return tp_error_set(err, TP_EINTERNAL, 0, 0, "fast hull: point location failed");
    int lev0;
    if (!conflict(F, s, q, O, lam, &lev0)) {
        /* Above the perturbed lower hull. Strictly above the true one, inside a real
         * simplex: it stays off every cell and every facet of the Newton polytope
         * (the hull only moves down, and the polytope only grows). */
        F->last = s;   /* the next point in curve order is near */
        bool inside = lev0 > 0 && is_real(F, s);
        for (int i = 0; i < D && inside; i++)
            inside = lam[i] > 0;
        F->skip[q] = inside;
        return TP_OK;
    }

    uint32_t sc = ++F->stamp, sn = ++F->stamp;
    F->ncav = 0;
    F->nstk = 0;
    F->mark[s] = sc;
    F->cav[F->ncav++] = s;
    F->stk[F->nstk++] = s;
    while (F->nstk > 0) {
        int32_t c = F->stk[--F->nstk];
        for (int i = 0; i < D; i++) {
            int32_t t = F->sn[(size_t)c * D + i];
            if (t < 0 || F->mark[t] == sc || F->mark[t] == sn)
                continue;
            i128 l2[DMAX];
            i128 O2 = bary(F, t, q, l2);
            if (conflict(F, t, q, O2, l2, NULL)) {
                F->mark[t] = sc;
                if (!grow((void **)&F->cav, &F->capcav, F->ncav + 1, sizeof *F->cav) ||
                    !grow((void **)&F->stk, &F->capstk, F->nstk + 1, sizeof *F->stk))
                    return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
                F->cav[F->ncav++] = t;
                F->stk[F->nstk++] = t;
            } else {
                F->mark[t] = sn;
            }
        }
    }

    /* New simplices: each boundary face of the cavity coned to q. */
    F->nrid = 0;
    int32_t made = -1;
    for (size_t k = 0; k < F->ncav; k++) {
        int32_t c = F->cav[k];
        for (int i = 0; i < D; i++) {
            int32_t t = F->sn[(size_t)c * D + i];
            if (t >= 0 && F->mark[t] == sc)
                continue;
            int32_t ns = new_simplex(F);
            if (ns < 0)
                return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
            F->mark[ns] = 0;
            int32_t *nv = &F->sv[(size_t)ns * D];
            int32_t *nn = &F->sn[(size_t)ns * D];
            memcpy(nv, &F->sv[(size_t)c * D], D * sizeof *nv);
            nv[i] = q;
            for (int j = 0; j < D; j++)
                nn[j] = -1;
            nn[i] = t;
            if (t >= 0)
                for (int j = 0; j < D; j++)
                    if (F->sn[(size_t)t * D + j] == c) {
                        F->sn[(size_t)t * D + j] = ns;
                        break;
                    }
            if (!grow((void **)&F->rid, &F->caprid, F->nrid + (size_t)D, sizeof *F->rid))
                return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
            for (int j = 0; j < D; j++) {
                if (j == i)
                    continue;
                struct ridge *r = &F->rid[F->nrid++];
                int m = 0;
                for (int l = 0; l < NMAX - 1; l++)
                    r->key[l] = INT32_MAX;
                for (int l = 0; l < D; l++)
                    if (l != i && l != j)
                        r->key[m++] = nv[l];
                /* sort the key (at most 2 entries) */
                if (m == 2 && r->key[0] > r->key[1]) {
                    int32_t tmp = r->key[0];
                    r->key[0] = r->key[1];
                    r->key[1] = tmp;
                }
                r->s = ns;
                r->j = j;
            }
            made = ns;
        }
    }
    /* Glue the new simplices to each other: every ridge key occurs exactly twice; match
     * the pairs in a small open-addressing hash table. */
    size_t hcap = 16;
    while (hcap < 2 * F->nrid)
        hcap *= 2;
    if (!grow((void **)&F->htab, &F->caphtab, hcap, sizeof *F->htab))
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    memset(F->htab, 0xff, hcap * sizeof *F->htab);   /* -1: empty */
    size_t matched = 0;
    for (size_t k = 0; k < F->nrid; k++) {
        const struct ridge *r = &F->rid[k];
        uint64_t key = (uint64_t)(uint32_t)r->key[0] << 32 | (uint32_t)r->key[1];
        size_t hs = (size_t)((key * 0x9e3779b97f4a7c15u) >> 40) & (hcap - 1);
        for (;; hs = (hs + 1) & (hcap - 1)) {
            int32_t e = F->htab[hs];
            if (e == -1) {
                F->htab[hs] = (int32_t)k;
                break;
            }
            if (e >= 0 && cmp_ridge(&F->rid[e], r) == 0) {
                const struct ridge *o = &F->rid[e];
                F->sn[(size_t)o->s * D + o->j] = r->s;
                F->sn[(size_t)r->s * D + r->j] = o->s;
                F->htab[hs] = -2;   /* used up; later probes pass over it */
                matched++;
                break;
            }
        }
    }
    if (2 * matched != F->nrid)
        return tp_error_set(err, TP_EINTERNAL, 0, 0, "fast hull: unmatched ridge");
    for (size_t k = 0; k < F->ncav; k++) {
        int32_t c = F->cav[k];
        F->sv[(size_t)c * D] = -1;
        F->mark[c] = 0;
        F->freel[F->nfree++] = c;
    }
    F->last = made;
    return TP_OK;
}

/* ---- insertion order: fixed-seed rounds, each sorted along a space-filling curve --- */

/* Insertion order entries: round (5 bits) << 58 | curve key (32 bits) << 26 | point
 * index (below 2^26). The array is size_t so that emit() can reuse it for point
 * lists. */
_Static_assert(sizeof(size_t) >= 8, "size_t must hold 64 bits");
static inline int32_t ord_point(size_t e) { return (int32_t)(e & ((1u << 26) - 1)); }

/* Stable LSD radix sort on bits lo..63 (8 bits a pass; passes over digits equal in
 * every entry skipped). */
static void radix_sort(size_t *a, size_t *tmp, size_t m, int lo)
{
    uint64_t all_or = 0, all_and = ~(uint64_t)0;
    for (size_t i = 0; i < m; i++) {
        all_or |= a[i];
        all_and &= a[i];
    }
    size_t *src = a, *dst = tmp;
    for (int sh = lo; sh < 64; sh += 8) {
        if ((((all_or ^ all_and) >> sh) & 0xff) == 0)
            continue;
        size_t cnt[257] = {0};
        for (size_t i = 0; i < m; i++)
            cnt[((src[i] >> sh) & 0xff) + 1]++;
        for (int k = 0; k < 256; k++)
            cnt[k + 1] += cnt[k];
        for (size_t i = 0; i < m; i++)
            dst[cnt[(src[i] >> sh) & 0xff]++] = src[i];
        size_t *t = src;
        src = dst;
        dst = t;
    }
    if (src != a)
        memcpy(a, src, m * sizeof *a);
}

/* Position along the Hilbert curve of order `bits`, one level a step: the state is the
 * orientation of the current quadrant (a swap flag, bit 0, and a complement flag, bit 1),
 * and HILBERT[state << 2 | x bit << 1 | y bit] = digit | next state << 2. The same
 * numbering as the classic rotate-and-flip loop, without its branches. */
static const unsigned char HILBERT[16] = {4, 1, 15, 2, 0, 11, 5, 6, 10, 7, 9, 12, 14, 13, 3, 8};

static uint64_t hilbert2(uint64_t x, uint64_t y, int bits)
{
    uint64_t d = 0;
    unsigned st = 0;
    for (int l = bits - 1; l >= 0; l--) {
        unsigned t = HILBERT[st << 2 | (unsigned)((x >> l) & 1) << 1 | (unsigned)((y >> l) & 1)];
        d = d << 2 | (t & 3);
        st = t >> 2;
    }
    return d;
}

static uint64_t morton3(uint64_t x, uint64_t y, uint64_t z)
{
    uint64_t d = 0;
    for (int b = 9; b >= 0; b--)
        d = (d << 3) | (((x >> b) & 1) << 2) | (((y >> b) & 1) << 1) | ((z >> b) & 1);
    return d;
}

/* A 32-bit position along a space-filling curve (coordinates coarsened to fit). */
static uint64_t curve_key(int n, const int64_t *p, int bits)
{
    if (n == 1)
        return (uint64_t)p[0];
    if (n == 2) {
        int sh = bits > 16 ? bits - 16 : 0;
        return hilbert2((uint64_t)p[0] >> sh, (uint64_t)p[1] >> sh, bits - sh);
    }
    int sh = bits > 10 ? bits - 10 : 0;
    return morton3((uint64_t)p[0] >> sh, (uint64_t)p[1] >> sh, (uint64_t)p[2] >> sh);
}

/* ---- setup ----------------------------------------------------------------------- */

static void fh_free(fh *F)
{
    free(F->orig);
    free(F->x);
    free(F->h);
    if (F->hz) {
        for (size_t i = 0; i < F->np; i++)
            mpz_clear(F->hz[i]);
        free(F->hz);
    }
    free(F->skip);
    free(F->sv);
    free(F->sn);
    free(F->mark);
    free(F->freel);
    free(F->cav);
    free(F->stk);
    free(F->rid);
    free(F->htab);
    mpz_clears(F->den, F->t1, F->t2, F->t3, NULL);
}

/* An integer height below 2^61 in absolute value, read without a GMP call (the limbs
 * are read through gmp.h's inline accessors). */
static inline bool small_height(const mpq_t q, int64_t *v)
{
#if GMP_NUMB_BITS == 64 && GMP_NAIL_BITS == 0
    mpz_srcptr d = mpq_denref(q), num = mpq_numref(q);
    if (mpz_size(d) != 1 || mpz_getlimbn(d, 0) != 1)
        return false;
    size_t sz = mpz_size(num);
    if (sz == 0) {
        *v = 0;
        return true;
    }
    mp_limb_t l = mpz_getlimbn(num, 0);
    if (sz > 1 || (l >> 61) != 0)
        return false;
    *v = mpz_sgn(num) < 0 ? -(int64_t)l : (int64_t)l;
    return true;
#else
    if (mpz_cmp_ui(mpq_denref(q), 1) != 0 || mpz_sizeinbase(mpq_numref(q), 2) > 61)
        return false;
    *v = mpz_get_si(mpq_numref(q));
    return true;
#endif
}

/* Points are renumbered by insertion rank: rank k is original point F->orig[k], and
 * coordinates and heights are stored in rank order, so the insertion loop and the final
 * location pass read memory sequentially (a cache miss per point otherwise dominated
 * the running time). Frame points take ranks np..np+n. */

/* Heights in rank order: F->h when every scaled height fits in 62 bits, else F->hz.
 * scratch holds P->count entries. */
static tp_status fh_heights(fh *F, const tp_points *P, int64_t *scratch, tp_error *err)
{
    size_t np = F->np, count = P->count;
    /* The common case: integer heights below 2^61, read once in index order, then
     * gathered by rank. */
    F->h = malloc((np ? np : 1) * sizeof *F->h);
    if (!F->h)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    bool simple = true;
    for (size_t i = 0; i < count && simple; i++) {
        scratch[i] = 0;
        if (!P->dup[i])
            simple = small_height(P->heights[i], &scratch[i]);
    }
    mpz_set_ui(F->den, 1);
    if (simple) {
        for (size_t k = 0; k < np; k++)
            F->h[k] = scratch[F->orig[k]];
        return TP_OK;
    }

    /* Common denominator, then scaled integer heights. */
    for (size_t i = 0; i < count; i++)
        if (!P->dup[i] && mpz_cmp_ui(mpq_denref(P->heights[i]), 1) != 0)
            mpz_lcm(F->den, F->den, mpq_denref(P->heights[i]));
    bool fits = true;
    mpz_t t;
    mpz_init(t);
    for (size_t k = 0; k < np && fits; k++) {
        mpq_srcptr q = P->heights[F->orig[k]];
        mpz_divexact(t, F->den, mpq_denref(q));
        mpz_mul(t, t, mpq_numref(q));
        fits = mpz_sizeinbase(t, 2) <= 61;
        if (fits)
            F->h[k] = mpz_get_si(t);
    }
    mpz_clear(t);
    if (fits)
        return TP_OK;
    free(F->h);
    F->h = NULL;
    F->hz = malloc((np ? np : 1) * sizeof *F->hz);
    if (!F->hz)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    for (size_t k = 0; k < np; k++) {
        mpq_srcptr q = P->heights[F->orig[k]];
        mpz_init(F->hz[k]);
        mpz_divexact(F->hz[k], F->den, mpq_denref(q));
        mpz_mul(F->hz[k], F->hz[k], mpq_numref(q));
    }
    return TP_OK;
}

/* Insertion order, translated coordinates in rank order, frame, heights. Sets *ok to
 * false to decline. */
static tp_status fh_setup(fh *F, const tp_points *P, bool *ok, tp_error *err)
{
    int n = F->n;
    size_t count = P->count;
    F->count = count;
    *ok = false;
    int64_t lo[NMAX], hi[NMAX];
    for (int j = 0; j < n; j++) {
        lo[j] = INT64_MAX;
        hi[j] = INT64_MIN;
    }
    size_t np = 0;
    for (size_t i = 0; i < count; i++) {
        if (P->dup[i])
            continue;
        np++;
        for (int j = 0; j < n; j++) {
            int64_t a = P->exps[i * F->nfull + F->J[j]];
            if (a < lo[j])
                lo[j] = a;
            if (a > hi[j])
                hi[j] = a;
        }
    }
    int64_t R = 1;
    for (int j = 0; j < n; j++) {
        /* hi - lo without overflow */
        if (hi[j] > 0 && lo[j] < hi[j] - INT64_MAX)
            return TP_OK;
        if (hi[j] - lo[j] > R)
            R = hi[j] - lo[j];
    }
    if (R > RANGE_MAX)
        return TP_OK;
    F->np = np;
    int bits = 1;
    while (bits < 62 && ((int64_t)1 << bits) <= R)
        bits++;

    /* Biased randomized insertion order: point i goes to the last round with
     * probability 1/2, the one before with 1/4, ..., the first round keeps about 256
     * points (a fixed hash of i decides, so the order is deterministic). Within a round
     * the points follow the space-filling curve. One stable radix sort on
     * round << 58 | curve << 26 | index orders everything. */
    F->orig = malloc((np ? np : 1) * sizeof *F->orig);
    size_t *tmp = malloc((count ? count : 1) * sizeof *tmp);
    if (!F->orig || !tmp) {
        free(tmp);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    }
    int rounds = 0;
    while (rounds < 26 && ((size_t)256 << rounds) < np)
        rounds++;
    size_t m = 0;
    for (size_t i = 0; i < count; i++)
        if (!P->dup[i]) {
            int64_t c[NMAX];
            for (int j = 0; j < n; j++)
                c[j] = P->exps[i * F->nfull + F->J[j]] - lo[j];
            uint64_t hs = 0x5eed7470u ^ ((uint64_t)i * 0x9e3779b97f4a7c15u);
            uint64_t hv = splitmix(&hs) | ((uint64_t)1 << rounds);
            uint64_t round = (uint64_t)(rounds - __builtin_ctzll(hv));
            F->orig[m++] = (size_t)(round << 58 | curve_key(n, c, bits) << 26 | i);
        }
    radix_sort(F->orig, tmp, np, 26);
    for (size_t k = 0; k < np; k++)
        F->orig[k] = (size_t)ord_point(F->orig[k]);

    F->x = malloc((np + (size_t)F->D) * n * sizeof *F->x);
    F->skip = calloc(np ? np : 1, sizeof *F->skip);
    if (!F->x || !F->skip) {
        free(tmp);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    }
    for (size_t k = 0; k < np; k++) {
        if (k + 16 < np)
            __builtin_prefetch(&P->exps[F->orig[k + 16] * F->nfull]);
        const int64_t *e = &P->exps[F->orig[k] * F->nfull];
        for (int j = 0; j < n; j++)
            F->x[k * n + j] = (int32_t)(e[F->J[j]] - lo[j]);
    }
    /* Frame simplex {x_j >= -1, sum x_j <= n R + 1}, strictly around [0, R]^n. */
    F->small = n * R + n < ((int64_t)1 << 19);
    for (int k = 0; k < F->D; k++)
        for (int j = 0; j < n; j++)
            F->x[(np + (size_t)k) * n + j] = (k == j + 1) ? (int32_t)(n * R + n) : -1;

    tp_status st = fh_heights(F, P, (int64_t *)(void *)tmp, err);
    free(tmp);
    if (st == TP_OK)
        *ok = true;
    return st;
}

/* ---- output ---------------------------------------------------------------------- */

static int32_t uf_find(int32_t *par, int32_t a)
{
    while (par[a] != a) {
        par[a] = par[par[a]];
        a = par[a];
    }
    return a;
}

static int64_t gcd64(int64_t a, int64_t b)
{
    if (a < 0)
        a = -a;
    if (b < 0)
        b = -b;
    while (b) {
        int64_t t = a % b;
        a = b;
        b = t;
    }
    return a;
}

/* Lifted normal of real simplex s: h_i + <a_i, w> = c on its vertices. */
static void simplex_normal(fh *F, int32_t s, mpq_t *w)
{
    int n = F->n, D = F->D;
    const int32_t *v = &F->sv[(size_t)s * D];
    int64_t A[NMAX][NMAX] = {{0}};
    for (int k = 1; k < D; k++)
        for (int j = 0; j < n; j++)
            A[k - 1][j] = pt(F, v[k])[j] - pt(F, v[0])[j];
    i128 det;
    /* adj(A): w = adj(A) b / det(A), b_k = -(H_k - H_0) */
    i128 adj[NMAX][NMAX] = {{0}};
    if (n == 1) {
        det = A[0][0];
        adj[0][0] = 1;
    } else if (n == 2) {
        det = (i128)A[0][0] * A[1][1] - (i128)A[0][1] * A[1][0];
        adj[0][0] = A[1][1];
        adj[0][1] = -A[0][1];
        adj[1][0] = -A[1][0];
        adj[1][1] = A[0][0];
    } else {
        for (int r = 0; r < 3; r++)
            for (int c = 0; c < 3; c++) {
                int r1 = (c + 1) % 3, r2 = (c + 2) % 3; /* rows of A^T minor */
                int c1 = (r + 1) % 3, c2 = (r + 2) % 3;
                adj[r][c] = (i128)A[r1][c1] * A[r2][c2] - (i128)A[r1][c2] * A[r2][c1];
            }
        det = 0;
        for (int c = 0; c < 3; c++)
            det += (i128)A[0][c] * adj[c][0];
    }
    if (!F->hz) {
        i128 b[NMAX];
        for (int k = 1; k < D; k++)
            b[k - 1] = -((i128)F->h[v[k]] - F->h[v[0]]);
        bool den1 = mpz_cmp_ui(F->den, 1) == 0;
        for (int j = 0; j < n; j++) {
            i128 num = 0;
            for (int k = 0; k < n; k++)
                num += adj[j][k] * b[k];
            if (den1 && iabs(num) < FIT62 && iabs(det) < FIT62) {
                int64_t a = (int64_t)num, d = (int64_t)det;
                if (d < 0) {
                    a = -a;
                    d = -d;
                }
                int64_t g = gcd64(a, d);
                mpq_set_si(w[j], (long)(a / g), (unsigned long)(d / g));
                continue;
            }
            mpz_set_i128(mpq_numref(w[j]), num);
            mpz_set_i128(mpq_denref(w[j]), det);
            mpz_mul(mpq_denref(w[j]), mpq_denref(w[j]), F->den);
            if (mpz_sgn(mpq_denref(w[j])) < 0) {
                mpz_neg(mpq_denref(w[j]), mpq_denref(w[j]));
                mpz_neg(mpq_numref(w[j]), mpq_numref(w[j]));
            }
            mpq_canonicalize(w[j]);
        }
    } else {
        for (int j = 0; j < n; j++) {
            mpz_set_ui(F->t1, 0);
            for (int k = 1; k < D; k++) {
                mpz_sub(F->t2, F->hz[v[0]], F->hz[v[k]]);
                mpz_set_i128(F->t3, adj[j][k - 1]);
                mpz_addmul(F->t1, F->t2, F->t3);
            }
            mpz_set(mpq_numref(w[j]), F->t1);
            mpz_set_i128(mpq_denref(w[j]), det);
            mpz_mul(mpq_denref(w[j]), mpq_denref(w[j]), F->den);
            if (mpz_sgn(mpq_denref(w[j])) < 0) {
                mpz_neg(mpq_denref(w[j]), mpq_denref(w[j]));
                mpz_neg(mpq_numref(w[j]), mpq_numref(w[j]));
            }
            mpq_canonicalize(w[j]);
        }
    }
}

/* A boundary face of the Newton polytope: primitive inner normal u and offset m. */
struct bface {
    int64_t u[NMAX];
    i128 m;
    int32_t s;   /* real simplex */
    int32_t i;   /* face opposite vertex i */
};

static int cmp_bface(const void *a, const void *b)
{
    const struct bface *x = a, *y = b;
    for (int j = 0; j < NMAX; j++)
        if (x->u[j] != y->u[j])
            return x->u[j] < y->u[j] ? -1 : 1;
    if (x->m != y->m)
        return x->m < y->m ? -1 : 1;
    if (x->s != y->s)
        return x->s < y->s ? -1 : 1;
    return (x->i > y->i) - (x->i < y->i);
}

static void face_normal(const fh *F, int32_t s, int i, struct bface *bf)
{
    int n = F->n, D = F->D;
    const int32_t *v = &F->sv[(size_t)s * D];
    int32_t f[DMAX];
    int m = 0;
    for (int l = 0; l < D; l++)
        if (l != i)
            f[m++] = v[l];
    int64_t u[NMAX] = {0};
    if (n == 1) {
        u[0] = 1;
    } else if (n == 2) {
        int64_t dx = pt(F, f[1])[0] - pt(F, f[0])[0], dy = pt(F, f[1])[1] - pt(F, f[0])[1];
        u[0] = -dy;
        u[1] = dx;
    } else {
        int64_t d1[3], d2[3];
        for (int j = 0; j < 3; j++) {
            d1[j] = pt(F, f[1])[j] - pt(F, f[0])[j];
            d2[j] = pt(F, f[2])[j] - pt(F, f[0])[j];
        }
        u[0] = d1[1] * d2[2] - d1[2] * d2[1];
        u[1] = d1[2] * d2[0] - d1[0] * d2[2];
        u[2] = d1[0] * d2[1] - d1[1] * d2[0];
    }
    int64_t g = 0;
    for (int j = 0; j < n; j++)
        g = gcd64(g, u[j]);
    for (int j = 0; j < n; j++)
        u[j] /= g;
    i128 side = 0;
    for (int j = 0; j < n; j++)
        side += (i128)u[j] * (pt(F, v[i])[j] - pt(F, f[0])[j]);
    if (side < 0)
        for (int j = 0; j < n; j++)
            u[j] = -u[j];
    memset(bf, 0, sizeof *bf);
    i128 mm = 0;
    for (int j = 0; j < n; j++) {
        bf->u[j] = u[j];
        mm += (i128)u[j] * pt(F, f[0])[j];
    }
    bf->m = mm;
    bf->s = s;
    bf->i = i;
}

static bool on_face(const fh *F, const struct bface *bf, int32_t p)
{
    i128 mm = 0;
    for (int j = 0; j < F->n; j++)
        mm += (i128)bf->u[j] * pt(F, p)[j];
    return mm == bf->m;
}

struct pair {
    int32_t a;   /* cell or side */
    int32_t p;   /* point */
};

static bool push_pair(struct pair **v, size_t *len, size_t *cap, int32_t a, int32_t p)
{
    if (!grow((void **)v, cap, *len + 1, sizeof **v))
        return false;
    (*v)[*len].a = a;
    (*v)[*len].p = p;
    (*len)++;
    return true;
}

/* Stable radix sort of pairs by .p (points below 2^26: at most three 11-bit passes, a
 * pass over a digit equal everywhere skipped). */
static bool sort_pairs_by_point(struct pair *v, size_t len)
{
    if (len < 2)
        return true;
    struct pair *tmp = malloc(len * sizeof *tmp);
    if (!tmp)
        return false;
    uint32_t all_or = 0, all_and = ~0u;
    for (size_t k = 0; k < len; k++) {
        all_or |= (uint32_t)v[k].p;
        all_and &= (uint32_t)v[k].p;
    }
    struct pair *src = v, *dst = tmp;
    for (int sh = 0; sh < 33; sh += 11) {
        if ((((all_or ^ all_and) >> sh) & 0x7ff) == 0)
            continue;
        size_t cnt[2049] = {0};
        for (size_t k = 0; k < len; k++)
            cnt[(((uint32_t)src[k].p >> sh) & 0x7ff) + 1]++;
        for (int d = 0; d < 2048; d++)
            cnt[d + 1] += cnt[d];
        for (size_t k = 0; k < len; k++)
            dst[cnt[((uint32_t)src[k].p >> sh) & 0x7ff]++] = src[k];
        struct pair *t = src;
        src = dst;
        dst = t;
    }
    if (src != v)
        memcpy(v, src, len * sizeof *v);
    free(tmp);
    return true;
}

static int cmp_size_t(const void *a, const void *b)
{
    size_t x = *(const size_t *)a, y = *(const size_t *)b;
    return (x > y) - (x < y);
}

/* Counting sort of pairs by .a into CSR form: start[a]..start[a+1] (stable: lists sorted
 * by point when the pairs were). */
static bool bucket_pairs(const struct pair *v, size_t len, size_t na, size_t **start,
                         int32_t **pts)
{
    *start = calloc(na + 2, sizeof **start);
    *pts = malloc((len ? len : 1) * sizeof **pts);
    if (!*start || !*pts)
        return false;
    for (size_t k = 0; k < len; k++)
        (*start)[v[k].a + 2]++;
    for (size_t a = 0; a < na; a++)
        (*start)[a + 2] += (*start)[a + 1];
    for (size_t k = 0; k < len; k++)
        (*pts)[(*start)[v[k].a + 1]++] = v[k].p;
    return true;
}

/* The located points of every cell in CSR form, each list ascending: a point's first
 * cell is firstcell[i] (-1: none), further cells are pairs in cp (sorted by point). */
static bool bucket_cells(const int32_t *firstcell, size_t count, const struct pair *cp,
                         size_t ncp, size_t ncell, size_t **start, int32_t **pts)
{
    *start = calloc(ncell + 2, sizeof **start);
    if (!*start)
        return false;
    size_t total = ncp;
    for (size_t i = 0; i < count; i++)
        if (firstcell[i] >= 0) {
            total++;
            (*start)[firstcell[i] + 2]++;
        }
    for (size_t k = 0; k < ncp; k++)
        (*start)[cp[k].a + 2]++;
    for (size_t a = 0; a < ncell; a++)
        (*start)[a + 2] += (*start)[a + 1];
    *pts = malloc((total ? total : 1) * sizeof **pts);
    if (!*pts)
        return false;
    size_t e = 0;
    for (size_t i = 0; i < count; i++) {
        if (firstcell[i] >= 0)
            (*pts)[(*start)[firstcell[i] + 1]++] = (int32_t)i;
        for (; e < ncp && (size_t)cp[e].p == i; e++)
            (*pts)[(*start)[cp[e].a + 1]++] = (int32_t)i;
    }
    return true;
}

#define NOMEM() (st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)"))

static tp_status emit(fh *F, tp_hull *H, tp_error *err)
{
    int n = F->n, D = F->D;
    size_t np = F->np, ns = F->ns;
    tp_status st = TP_OK;
    mpq_t w[NMAX];
    for (int j = 0; j < NMAX; j++)
        mpq_init(w[j]);
    /* normals in the input's coordinates: zero off the kept ones (the hull reduces them
     * modulo the lineality space afterwards) */
    size_t nf = F->nfull;
    mpq_t *wf = malloc(nf * sizeof *wf);
    mpz_t *uf = malloc(nf * sizeof *uf);
    if (wf && uf)
        for (size_t j = 0; j < nf; j++) {
            mpq_init(wf[j]);
            mpz_init(uf[j]);
        }
    /* the insertion scratch arrays (one entry per simplex slot) are reused here */
    int32_t *par = (int32_t *)F->mark;
    int32_t *cell = F->freel;
    int32_t *seen = malloc((np ? np : 1) * sizeof *seen);
    int32_t *firstcell = malloc((F->count ? F->count : 1) * sizeof *firstcell);
    bool *isvert = calloc(np ? np : 1, sizeof *isvert);
    size_t *buf = NULL;   /* one output list (original indices) */
    const size_t *orig = F->orig;
    size_t nsp_vert = 0;
    int32_t *star = NULL;
    size_t nstar = 0, capstar = 0;
    struct pair *cp = NULL, *sp = NULL;
    size_t ncp = 0, capcp = 0, nsp = 0, capsp = 0;
    size_t *cstart = NULL, *xstart = NULL, *vstart = NULL, *sstart = NULL;
    int32_t *corder = NULL, *xpts = NULL, *vside = NULL, *spts = NULL;
    struct bface *bf = NULL;
    size_t nbf = 0, capbf = 0, ngroups = 0, ncell = 0;
    size_t *gstart = NULL;
    if (!seen || !isvert || !firstcell || !wf || !uf) {
        NOMEM();
        goto out;
    }

    /* 1. Union real simplices across faces whose far vertex lies on the same lifted
     *    hyperplane (exact, unperturbed): the classes are the cells. */
    for (size_t s = 0; s < ns; s++)
        par[s] = (int32_t)s;
    for (size_t s = 0; s < ns; s++) {
        if (F->sv[s * D] < 0 || !is_real(F, (int32_t)s))
            continue;
        for (int i = 0; i < D; i++) {
            int32_t t = F->sn[s * D + i];
            if (t < 0 || (size_t)t < s || !is_real(F, t))
                continue;
            int32_t q = -1;
            for (int j = 0; j < D; j++)
                if (F->sn[(size_t)t * D + j] == (int32_t)s)
                    q = F->sv[(size_t)t * D + j];
            i128 lam[DMAX];
            i128 O = bary(F, (int32_t)s, q, lam);
            if (level0(F, &F->sv[s * D], q, O, lam) == 0) {
                int32_t a = uf_find(par, (int32_t)s), b = uf_find(par, t);
                if (a != b)
                    par[a < b ? b : a] = a < b ? a : b;
            }
        }
    }
    for (size_t s = 0; s < ns; s++) {
        cell[s] = -1;
        if (F->sv[s * D] < 0 || !is_real(F, (int32_t)s))
            continue;
        if (uf_find(par, (int32_t)s) == (int32_t)s)
            cell[s] = (int32_t)ncell++;
        for (int i = 0; i < D; i++)
            isvert[F->sv[s * D + i]] = true;
    }
    size_t nreal = 0;
    for (size_t s = 0; s < ns; s++)
        if (F->sv[s * D] >= 0 && is_real(F, (int32_t)s)) {
            cell[s] = cell[uf_find(par, (int32_t)s)];
            nreal++;
        }
    memset(F->mark, 0, ns * sizeof *F->mark);   /* par is done; marks again */
    /* simplices bucketed by cell (counting sort) */
    cstart = calloc(ncell + 2, sizeof *cstart);
    corder = malloc((nreal ? nreal : 1) * sizeof *corder);
    if (!cstart || !corder) {
        NOMEM();
        goto out;
    }
    for (size_t s = 0; s < ns; s++)
        if (cell[s] >= 0)
            cstart[cell[s] + 2]++;
    for (size_t c = 0; c < ncell; c++)
        cstart[c + 2] += cstart[c + 1];
    for (size_t s = 0; s < ns; s++)
        if (cell[s] >= 0)
            corder[cstart[cell[s] + 1]++] = (int32_t)s;

    /* 2. Facets of the Newton polytope: real faces next to frame simplices, grouped by
     *    hyperplane. */
    for (size_t s = 0; s < ns; s++) {
        if (F->sv[s * D] < 0 || !is_real(F, (int32_t)s))
            continue;
        for (int i = 0; i < D; i++) {
            int32_t t = F->sn[s * D + i];
            if (t >= 0 && is_real(F, t))
                continue;
            if (!grow((void **)&bf, &capbf, nbf + 1, sizeof *bf)) {
                NOMEM();
                goto out;
            }
            face_normal(F, (int32_t)s, i, &bf[nbf++]);
        }
    }
    if (nbf > 1)
        qsort(bf, nbf, sizeof *bf, cmp_bface);
    gstart = malloc((nbf + 1) * sizeof *gstart);
    if (!gstart) {
        NOMEM();
        goto out;
    }
    for (size_t k = 0; k < nbf; k++)
        if (k == 0 || memcmp(bf[k].u, bf[k - 1].u, sizeof bf[k].u) != 0 ||
            bf[k].m != bf[k - 1].m)
            gstart[ngroups++] = k;
    gstart[ngroups] = nbf;
    for (size_t i = 0; i < np; i++)
        seen[i] = -1;
    for (size_t g = 0; g < ngroups; g++)
        for (size_t k = gstart[g]; k < gstart[g + 1]; k++) {
            const int32_t *v = &F->sv[(size_t)bf[k].s * D];
            for (int l = 0; l < D; l++) {
                if (l == bf[k].i || seen[v[l]] == (int32_t)g)
                    continue;
                seen[v[l]] = (int32_t)g;
                if (!push_pair(&sp, &nsp, &capsp, (int32_t)g, v[l])) {
                    NOMEM();
                    goto out;
                }
            }
        }
    /* vertex -> sides through it */
    vstart = calloc(np + 2, sizeof *vstart);
    vside = malloc((nsp ? nsp : 1) * sizeof *vside);
    if (!vstart || !vside) {
        NOMEM();
        goto out;
    }
    for (size_t k = 0; k < nsp; k++)
        vstart[sp[k].p + 2]++;
    for (size_t i = 0; i < np; i++)
        vstart[i + 2] += vstart[i + 1];
    for (size_t k = 0; k < nsp; k++)
        vside[vstart[sp[k].p + 1]++] = sp[k].a;

    memset(firstcell, 0xff, (F->count ? F->count : 1) * sizeof *firstcell);   /* -1 */
    /* 3. Every other point: locate it; if it lies on the true lower hull it joins every
     *    cell through its carrier face; if on the boundary, every side through it. */
    nsp_vert = nsp;
    for (int32_t p = 0; p < (int32_t)np; p++) {
        if (isvert[p] || F->skip[p])
            continue;
        i128 lam[DMAX], O;
        int32_t s = locate(F, p, lam, &O);
        if (s < 0) {
            st = tp_error_set(err, TP_EINTERNAL, 0, 0, "fast hull: point location failed");
            goto out;
        }
        F->last = s;
        int32_t car[DMAX];
        int ncar = 0;
        for (int i = 0; i < D; i++)
            if (lam[i] > 0)
                car[ncar++] = F->sv[(size_t)s * D + i];
        bool real_s = is_real(F, s);
        /* the simplices containing the carrier face */
        nstar = 0;
        if (ncar == D && real_s) {
            if (!grow((void **)&star, &capstar, 1, sizeof *star)) {
                NOMEM();
                goto out;
            }
            star[nstar++] = s;
        } else {
            uint32_t sc = ++F->stamp;
            F->nstk = 0;
            F->stk[F->nstk++] = s;
            F->mark[s] = sc;
            while (F->nstk > 0) {
                int32_t t = F->stk[--F->nstk];
                if (!grow((void **)&star, &capstar, nstar + 1, sizeof *star)) {
                    NOMEM();
                    goto out;
                }
                star[nstar++] = t;
                for (int i = 0; i < D; i++) {
                    int32_t vi = F->sv[(size_t)t * D + i];
                    bool in = false;
                    for (int c = 0; c < ncar; c++)
                        in = in || car[c] == vi;
                    int32_t nb = F->sn[(size_t)t * D + i];
                    if (in || nb < 0 || F->mark[nb] == sc)
                        continue;
                    F->mark[nb] = sc;
                    if (!grow((void **)&F->stk, &F->capstk, F->nstk + 1, sizeof *F->stk)) {
                        NOMEM();
                        goto out;
                    }
                    F->stk[F->nstk++] = nb;
                }
            }
        }
        int32_t r = -1;
        for (size_t k2 = 0; k2 < nstar && r < 0; k2++)
            if (is_real(F, star[k2]))
                r = star[k2];
        if (r >= 0) {
            i128 l2[DMAX];
            i128 O2 = r == s ? O : bary(F, r, p, l2);
            if (level0(F, &F->sv[(size_t)r * D], p, O2, r == s ? lam : l2) == 0) {
                /* the first cell in firstcell, any further ones as pairs */
                size_t first = ncp;
                int32_t c0 = -1;
                for (size_t k2 = 0; k2 < nstar; k2++) {
                    int32_t c = cell[star[k2]];
                    if (c < 0 || c == c0)
                        continue;
                    if (c0 < 0) {
                        c0 = c;
                        continue;
                    }
                    bool dup = false;
                    for (size_t z = first; z < ncp && !dup; z++)
                        dup = cp[z].a == c;
                    if (!dup && !push_pair(&cp, &ncp, &capcp, c, (int32_t)orig[p])) {
                        NOMEM();
                        goto out;
                    }
                }
                firstcell[orig[p]] = c0;
            }
        }
        if ((ncar < D || !real_s) && ncar > 0 && !is_frame(F, car[0])) {
            for (size_t z = vstart[car[0]]; z < vstart[car[0] + 1]; z++) {
                int32_t g = vside[z];
                if (on_face(F, &bf[gstart[g]], p) &&
                    !push_pair(&sp, &nsp, &capsp, g, (int32_t)orig[p])) {
                    NOMEM();
                    goto out;
                }
            }
        }
    }

    /* 4. Cells: vertices of their simplices plus the located points, merged into one
     *    ascending list. */
    for (size_t k = 0; k < nsp_vert; k++)
        sp[k].p = (int32_t)orig[sp[k].p];
    buf = malloc((np ? np : 1) * sizeof *buf);
    if (!buf || !sort_pairs_by_point(cp, ncp) || !sort_pairs_by_point(sp, nsp) ||
        !bucket_cells(firstcell, F->count, cp, ncp, ncell, &xstart, &xpts)) {
        NOMEM();
        goto out;
    }
    for (size_t i = 0; i < np; i++)
        seen[i] = -1;
    for (size_t c = 0; c < ncell; c++) {
        size_t m = 0;
        for (size_t k = cstart[c]; k < cstart[c + 1]; k++) {
            const int32_t *v = &F->sv[(size_t)corder[k] * D];
            for (int i = 0; i < D; i++)
                if (seen[v[i]] != (int32_t)c) {
                    seen[v[i]] = (int32_t)c;
                    buf[m++] = orig[v[i]];
                }
        }
        if (m > 16)
            qsort(buf, m, sizeof *buf, cmp_size_t);
        else
            for (size_t i = 1; i < m; i++) {
                size_t x = buf[i], k = i;
                for (; k > 0 && buf[k - 1] > x; k--)
                    buf[k] = buf[k - 1];
                buf[k] = x;
            }
        size_t nx = xstart[c + 1] - xstart[c];
        if (nx > 0) {
            /* merge from the back: the vertices move up as the located points go in */
            const int32_t *xs = &xpts[xstart[c]];
            size_t i = m, j = nx, o = m + nx;
            while (j > 0) {
                if (i > 0 && buf[i - 1] > (size_t)xs[j - 1])
                    buf[--o] = buf[--i];
                else
                    buf[--o] = (size_t)xs[--j];
            }
            for (size_t k = 0; k < nx; k++)
                H->on_hull[xs[k]] = true;
            m += nx;
        }
        simplex_normal(F, corder[cstart[c]], w);
        for (int j = 0; j < n; j++)
            mpq_swap(wf[F->J[j]], w[j]);
        st = tp_hull_push_lower(H, buf, m, wf, err);
        if (st != TP_OK)
            goto out;
    }
    for (size_t i = 0; i < np; i++)
        if (isvert[i])
            H->on_hull[orig[i]] = true;

    /* 5. Sides. */
    if (!bucket_pairs(sp, nsp, ngroups, &sstart, &spts)) {
        NOMEM();
        goto out;
    }
    for (size_t g = 0; g < ngroups; g++) {
        size_t m = 0;
        for (size_t k = sstart[g]; k < sstart[g + 1]; k++)
            buf[m++] = (size_t)spts[k];
        for (int j = 0; j < n; j++)
            mpz_set_si(uf[F->J[j]], (long)bf[gstart[g]].u[j]);
        st = tp_hull_push_side(H, buf, m, uf, err);
        if (st != TP_OK)
            goto out;
    }
out:
    for (int j = 0; j < NMAX; j++)
        mpq_clear(w[j]);
    if (wf && uf)
        for (size_t j = 0; j < nf; j++) {
            mpq_clear(wf[j]);
            mpz_clear(uf[j]);
        }
    free(wf);
    free(uf);
    free(buf);
    free(firstcell);
    free(seen);
    free(isvert);
    free(star);
    free(cp);
    free(sp);
    free(cstart);
    free(xstart);
    free(vstart);
    free(sstart);
    free(corder);
    free(xpts);
    free(vside);
    free(spts);
    free(bf);
    free(gstart);
    return st;
}

/* ---- entry point ----------------------------------------------------------------- */

/* The coordinates worked in: those that are no pivot of the lineality basis. Its rows
 * are in reduced echelon form, so a direction v of the affine span (v orthogonal to
 * every row) that vanishes on them vanishes on the pivots too: the projection is
 * injective on the span and keeps every cell and side, and a normal w' in the kept
 * coordinates, padded with zeros, satisfies <a, w> = <a', w'>. False if the span's
 * dimension is out of range. */
static bool kept_coordinates(const tp_hull *H, const tp_points *P, size_t *J)
{
    if (H->dim < 1 || H->dim > NMAX || H->nlin + (size_t)H->dim != P->n)
        return false;
    for (size_t j = 0, k = 0; j < P->n; j++) {
        bool pivot = false;
        for (size_t l = 0; l < H->nlin; l++)
            pivot = pivot || H->lin_pivot[l] == j;
        if (!pivot)
            J[k++] = j;
    }
    return true;
}

bool tp_hull_fast_accepts(const tp_hull *H, const tp_points *P)
{
    size_t J[NMAX];
    if (P->count > COUNT_MAX || !kept_coordinates(H, P, J))
        return false;
    for (int j = 0; j < H->dim; j++) {
        int64_t lo = INT64_MAX, hi = INT64_MIN;
        for (size_t i = 0; i < P->count; i++)
            if (!P->dup[i]) {
                int64_t a = P->exps[i * P->n + J[j]];
                lo = a < lo ? a : lo;
                hi = a > hi ? a : hi;
            }
        if ((uint64_t)hi - (uint64_t)lo > (uint64_t)RANGE_MAX)
            return false;
    }
    return true;
}

tp_status tp_hull_lower_fast(tp_hull *H, const tp_points *P, bool *handled, tp_error *err)
{
    *handled = false;
    fh F;
    memset(&F, 0, sizeof F);
    if (P->count > COUNT_MAX || !kept_coordinates(H, P, F.J))
        return TP_OK;
    F.n = H->dim;
    F.nfull = P->n;
    F.D = F.n + 1;
    F.np = P->count;
    F.rng = 0x74726f7065u;
    mpz_inits(F.den, F.t1, F.t2, F.t3, NULL);
    bool ok = false;
    tp_status st = fh_setup(&F, P, &ok, err);
    if (st != TP_OK || !ok) {
        fh_free(&F);
        return st;
    }
    int D = F.D;
    size_t np = F.np;

    /* The frame simplex, positively oriented. */
    int32_t s0 = new_simplex(&F);
    if (s0 < 0) {
        fh_free(&F);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    }
    for (int k = 0; k < D; k++) {
        F.sv[k] = (int32_t)(np + (size_t)k);
        F.sn[k] = -1;
    }
    if (orient(&F, F.sv) < 0) {
        int32_t t = F.sv[0];
        F.sv[0] = F.sv[1];
        F.sv[1] = t;
    }
    F.last = s0;
    size_t capst = 64;
    F.cav = malloc(capst * sizeof *F.cav);
    F.stk = malloc(capst * sizeof *F.stk);
    F.capcav = F.capstk = F.cav && F.stk ? capst : 0;
    if (!F.cav || !F.stk) {
        fh_free(&F);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (fast hull)");
    }
    for (size_t k = 0; k < np && st == TP_OK; k++)
        st = insert(&F, (int32_t)k, err);
    if (st == TP_OK)
        st = emit(&F, H, err);
    fh_free(&F);
    if (st == TP_OK)
        *handled = true;
    return st;
}
