/* complex.c — the tropical hypersurface dual to the regular subdivision.
 *
 * For a subdivision cell sigma of dimension k >= 1 the dual cell has dimension n - k:
 * its vertices are the normals of the lower facets containing sigma, its rays the
 * inner normals of the Newton polytope facets containing sigma, and it contains the
 * lineality space L. Top cells (k = 1) carry the lattice length of their dual edge as
 * weight.
 *
 * Balancing (computed, not assumed): at a codimension-2 cell C (dual to a 2-cell
 * sigma), let W be the linear span of C. The adjacent top cells C_e (e an edge of
 * sigma) give primitive generators u_e of the rank-one lattice (Z^n ∩ span C_e) /
 * (Z^n ∩ W). With Phi an integer basis of the saturated lattice W^perp ∩ Z^n (two
 * vectors), x -> (phi_1.x, phi_2.x) identifies Z^n / (Z^n ∩ W) with Z^2, so u_e is
 * the primitive integer vector along Phi(q_e - p), q_e and p relative interior
 * points of C_e and C. The cell is balanced when sum_e weight_e * u_e = 0.
 */
#include "trope/complex.h"
#include "idx_list.h"

#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "trope/poly.h"

void tp_complex_init(tp_complex *C)
{
    memset(C, 0, sizeof *C);
    C->dim = -1;
    C->genus = -1;
    C->smooth = -1;
    tp_arena_init(&C->limbs);
}

static void zvec_free(mpz_t *v, size_t len)
{
    if (!v)
        return;
    for (size_t i = 0; i < len; i++)
        mpz_clear(v[i]);
    free(v);
}

static void qvec_free(mpq_t *v, size_t len)
{
    if (!v)
        return;
    for (size_t i = 0; i < len; i++)
        mpq_clear(v[i]);
    free(v);
}

static mpz_t *zvec_new(size_t len)
{
    mpz_t *v = malloc((len ? len : 1) * sizeof *v);
    if (v)
        for (size_t i = 0; i < len; i++)
            mpz_init(v[i]);
    return v;
}

static mpq_t *qvec_new(size_t len)
{
    mpq_t *v = malloc((len ? len : 1) * sizeof *v);
    if (v)
        for (size_t i = 0; i < len; i++)
            mpq_init(v[i]);
    return v;
}

void tp_complex_clear(tp_complex *C)
{
    for (size_t i = 0; i < C->ncells; i++) {
        tp_complex_cell *c = &C->cells[i];
        /* weight is a read-only value in C->limbs */
        free(c->initial_form);
    }
    tp_big_free(C->cells);
    tp_big_free(C->idx_pool);
    zvec_free(C->lin, C->nlin * C->n);
    tp_big_free(C->verts); /* read-only values: their limbs go with the arena */
    tp_big_free(C->vmult);
    tp_arena_free(&C->limbs);
    zvec_free(C->rays, C->nrays * C->n);
    free(C->f_vector);
    for (size_t i = 0; i < C->nraydeg; i++) {
        zvec_free(C->raydeg[i].dir, C->n);
        mpz_clear(C->raydeg[i].weight);
    }
    free(C->raydeg);
    tp_complex_init(C);
}

/* ---- small exact helpers -------------------------------------------------------- */

__extension__ typedef __int128 i128;

/* Binary gcd of two unsigned 64-bit values. */
static uint64_t gcd_u64(uint64_t a, uint64_t b)
{
    if (!a)
        return b;
    if (!b)
        return a;
    int sh = __builtin_ctzll(a | b);
    a >>= __builtin_ctzll(a);
    do {
        b >>= __builtin_ctzll(b);
        if (a > b) {
            uint64_t t = a;
            a = b;
            b = t;
        }
        b -= a;
    } while (b);
    return a << sh;
}

static i128 gcd128(i128 a, i128 b)
{
    if (a < 0)
        a = -a;
    if (b < 0)
        b = -b;
    if ((a >> 64) == 0 && (b >> 64) == 0)
        return (i128)gcd_u64((uint64_t)a, (uint64_t)b);
    while (b) {
        i128 t = a % b;
        a = b;
        b = t;
    }
    return a;
}

static bool fits64(i128 v)
{
    return v >= -(i128)INT64_MAX && v <= (i128)INT64_MAX;
}


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

/* Primitive integer vector along a rational vector (zero stays zero). */
static void primitive_of_q(mpz_t *out, mpq_t *v, size_t n)
{
    mpz_t den, t;
    mpz_inits(den, t, NULL);
    mpz_set_ui(den, 1);
    for (size_t j = 0; j < n; j++)
        mpz_lcm(den, den, mpq_denref(v[j]));
    for (size_t j = 0; j < n; j++) {
        mpz_divexact(t, den, mpq_denref(v[j]));
        mpz_mul(out[j], mpq_numref(v[j]), t);
    }
    make_primitive(out, n);
    mpz_clears(den, t, NULL);
}

/* Integer kernel {x in Z^n : A x = 0} of the r x n integer matrix A, by unimodular
 * column operations; writes the basis (rows of length n) into *K, returns its size,
 * or SIZE_MAX on no memory. */
static size_t int_kernel(mpz_t *A, size_t r, size_t n, mpz_t **K)
{
    mpz_t *U = zvec_new(n * n);   /* U[j*n + i]: column j of U, entry i */
    mpz_t *row = zvec_new(n);
    if (!U || !row) {
        zvec_free(U, n * n);
        zvec_free(row, n);
        return SIZE_MAX;
    }
    for (size_t j = 0; j < n; j++)
        mpz_set_ui(U[j * n + j], 1);
    mpz_t g, s, t, a, b, x, y;
    mpz_inits(g, s, t, a, b, x, y, NULL);
    size_t c = 0;
    for (size_t i = 0; i < r && c < n; i++) {
        for (size_t j = c; j < n; j++) {
            mpz_set_ui(row[j], 0);
            for (size_t k = 0; k < n; k++)
                mpz_addmul(row[j], A[i * n + k], U[j * n + k]);
        }
        /* Move a nonzero entry to column c. */
        size_t nz = n;
        for (size_t j = c; j < n; j++)
            if (mpz_sgn(row[j]) != 0) {
                nz = j;
                break;
            }
        if (nz == n)
            continue;
        if (nz != c) {
            for (size_t k = 0; k < n; k++)
                mpz_swap(U[c * n + k], U[nz * n + k]);
            mpz_swap(row[c], row[nz]);
        }
        for (size_t j = c + 1; j < n; j++) {
            if (mpz_sgn(row[j]) == 0)
                continue;
            mpz_gcdext(g, s, t, row[c], row[j]);
            mpz_divexact(a, row[c], g);
            mpz_divexact(b, row[j], g);
            for (size_t k = 0; k < n; k++) {
                /* col_c' = s col_c + t col_j ; col_j' = a col_j - b col_c */
                mpz_mul(x, s, U[c * n + k]);
                mpz_addmul(x, t, U[j * n + k]);
                mpz_mul(y, a, U[j * n + k]);
                mpz_submul(y, b, U[c * n + k]);
                mpz_set(U[c * n + k], x);
                mpz_set(U[j * n + k], y);
            }
            mpz_set(row[c], g);
            mpz_set_ui(row[j], 0);
        }
        c++;
    }
    mpz_clears(g, s, t, a, b, x, y, NULL);
    size_t dimk = n - c;
    *K = zvec_new(dimk * n);
    if (!*K) {
        zvec_free(U, n * n);
        zvec_free(row, n);
        return SIZE_MAX;
    }
    for (size_t j = 0; j < dimk; j++)
        for (size_t k = 0; k < n; k++)
            mpz_set((*K)[j * n + k], U[(c + j) * n + k]);
    zvec_free(U, n * n);
    zvec_free(row, n);
    return dimk;
}

/* gcd of the 2x2 minors of the rows x, y (the lattice area of the parallelogram they
 * span, measured in the saturated lattice of their plane). */
static void minors_gcd(mpz_t out, mpz_t *x, mpz_t *y, size_t n)
{
    mpz_t m;
    mpz_init(m);
    mpz_set_ui(out, 0);
    for (size_t i = 0; i < n; i++)
        for (size_t j = i + 1; j < n; j++) {
            mpz_mul(m, x[i], y[j]);
            mpz_submul(m, x[j], y[i]);
            mpz_gcd(out, out, m);
        }
    mpz_clear(m);
}

/* Difference of two exponent vectors as mpz. */
static void exp_diff(mpz_t *out, const tp_points *P, size_t i, size_t j)
{
    mpz_t t;
    mpz_init(t);
    for (size_t k = 0; k < P->n; k++) {
        mpz_set_si(out[k], (long)P->exps[i * P->n + k]);
        mpz_set_si(t, (long)P->exps[j * P->n + k]);
        mpz_sub(out[k], out[k], t);
    }
    mpz_clear(t);
}

/* minors_gcd of (a_hi - a_lo, a_p - a_lo) in int64/int128; false on overflow. */
static bool area64(mpz_t out, const tp_points *P, size_t hi, size_t lo, size_t p)
{
    size_t n = P->n;
    if (n > 8)
        return false;
    int64_t x[8], y[8];
    for (size_t k = 0; k < n; k++)
        if (__builtin_sub_overflow(P->exps[hi * n + k], P->exps[lo * n + k], &x[k]) ||
            __builtin_sub_overflow(P->exps[p * n + k], P->exps[lo * n + k], &y[k]))
            return false;
    i128 g = 0;
    for (size_t i = 0; i < n; i++)
        for (size_t j = i + 1; j < n; j++) {
            i128 m = (i128)x[i] * y[j] - (i128)x[j] * y[i]; /* |m| < 2^127 */
            g = gcd128(g, m);
        }
    if (!fits64(g))
        return false;
    mpz_set_si(out, (long)g);
    return true;
}

/* The two extreme points of a collinear point set and its lattice length. */
static int64_t gcd64(int64_t a, int64_t b)
{
    uint64_t x = a < 0 ? (uint64_t)0 - (uint64_t)a : (uint64_t)a;
    uint64_t y = b < 0 ? (uint64_t)0 - (uint64_t)b : (uint64_t)b;
    while (y) {
        uint64_t t = x % y;
        x = y;
        y = t;
    }
    return (int64_t)x; /* callers only pass differences that fit, so x < 2^63 */
}

/* edge_extremes without GMP: false when some intermediate would overflow int64. */
static bool edge_extremes64(const tp_points *P, const uint32_t *pts, size_t npts,
                            size_t *lo, size_t *hi, mpz_t len)
{
    size_t n = P->n;
    if (n > 8)
        return false;
    int64_t d[8];
    const int64_t *e0 = &P->exps[pts[0] * n], *e1 = &P->exps[pts[1] * n];
    for (size_t k = 0; k < n; k++)
        if (__builtin_sub_overflow(e1[k], e0[k], &d[k]))
            return false;
    int64_t blo = 0, bhi = 0;
    size_t ilo = pts[0], ihi = pts[0];
    for (size_t q = 0; q < npts; q++) {
        const int64_t *e = &P->exps[pts[q] * n];
        int64_t s = 0, m;
        for (size_t k = 0; k < n; k++)
            if (__builtin_mul_overflow(e[k], d[k], &m) || __builtin_add_overflow(s, m, &s))
                return false;
        if (q == 0 || s < blo) {
            blo = s;
            ilo = pts[q];
        }
        if (q == 0 || s > bhi) {
            bhi = s;
            ihi = pts[q];
        }
    }
    const int64_t *a = &P->exps[ihi * n], *b = &P->exps[ilo * n];
    int64_t g = 0;
    for (size_t k = 0; k < n; k++) {
        int64_t t;
        if (__builtin_sub_overflow(a[k], b[k], &t) || t == INT64_MIN)
            return false;
        g = gcd64(g, t);
    }
    *lo = ilo;
    *hi = ihi;
    mpz_set_si(len, (long)g);
    return true;
}

static void edge_extremes(const tp_points *P, const uint32_t *pts, size_t npts, size_t *lo,
                          size_t *hi, mpz_t len)
{
    if (edge_extremes64(P, pts, npts, lo, hi, len))
        return;
    size_t n = P->n;
    mpz_t *d = zvec_new(n);
    mpz_t s, best_lo, best_hi, t;
    mpz_inits(s, best_lo, best_hi, t, NULL);
    /* Direction from the first two points; position along it = dot product. */
    exp_diff(d, P, pts[1], pts[0]);
    *lo = *hi = pts[0];
    for (size_t q = 0; q < npts; q++) {
        mpz_set_ui(s, 0);
        for (size_t k = 0; k < n; k++) {
            mpz_set_si(t, (long)P->exps[pts[q] * n + k]);
            mpz_addmul(s, t, d[k]);
        }
        if (q == 0 || mpz_cmp(s, best_lo) < 0) {
            mpz_set(best_lo, s);
            *lo = pts[q];
        }
        if (q == 0 || mpz_cmp(s, best_hi) > 0) {
            mpz_set(best_hi, s);
            *hi = pts[q];
        }
    }
    exp_diff(d, P, *hi, *lo);
    mpz_set_ui(len, 0);
    for (size_t k = 0; k < n; k++)
        mpz_gcd(len, len, d[k]);
    mpz_clears(s, best_lo, best_hi, t, NULL);
    zvec_free(d, n);
}

/* ---- a tiny string builder for initial forms ------------------------------------ */

typedef struct {
    char *s;
    size_t len, cap;
    bool fail;
} sbuf;

static void sb_put(sbuf *b, const char *t)
{
    size_t m = strlen(t);
    if (b->fail)
        return;
    if (b->len + m + 1 > b->cap) {
        size_t ncap = (b->len + m + 1) * 2;
        char *g = realloc(b->s, ncap);
        if (!g) {
            b->fail = true;
            return;
        }
        b->s = g;
        b->cap = ncap;
    }
    memcpy(b->s + b->len, t, m + 1);
    b->len += m;
}

/* residue strings: "3", "-7/4", "2-3i"; a complex or fractional residue is put in
 * parentheses when multiplied. */
static char *initial_form(const tp_points *P, const uint32_t *pts, size_t npts,
                          char *const *vars)
{
    if (!P->residue)
        return NULL;
    sbuf b = {0};
    for (size_t t = 0; t < npts; t++) {
        const char *r = P->residue[pts[t]];
        if (!r)
            r = "1";
        bool neg = r[0] == '-';
        const char *mag = neg ? r + 1 : r;
        bool compound = strpbrk(mag, "+-i") != NULL; /* complex: keep whole, signed */
        char *mono = tp_monomial_to_str(&P->exps[pts[t] * P->n], P->n, vars);
        if (!mono) {
            free(b.s);
            return NULL;
        }
        bool is_one_mono = strcmp(mono, "1") == 0;
        if (compound) {
            sb_put(&b, t ? " + (" : "(");
            sb_put(&b, r);
            sb_put(&b, ")");
            if (!is_one_mono) {
                sb_put(&b, "*");
                sb_put(&b, mono);
            }
        } else {
            sb_put(&b, t ? (neg ? " - " : " + ") : (neg ? "-" : ""));
            if (strcmp(mag, "1") != 0 || is_one_mono) {
                sb_put(&b, mag);
                if (!is_one_mono)
                    sb_put(&b, "*");
            }
            if (!is_one_mono)
                sb_put(&b, mono);
        }
        free(mono);
    }
    if (b.fail) {
        free(b.s);
        return NULL;
    }
    return b.s ? b.s : strdup("");
}

/* ---- sorting with permutations ------------------------------------------------ */

/* Sorting sorts 32-bit indices in place (sort_idx below: no scratch copy, which at
 * a million cells was the peak of the run), then moves the rows in place. */
typedef struct {
    const mpq_t *q;  /* rows of rationals, or NULL */
    const mpz_t *z;  /* rows of integers, or NULL */
    size_t n;
} rowctx;

static int cmp_row_r(const void *x, const void *y, void *ctx)
{
    const rowctx *r = ctx;
    size_t a = *(const uint32_t *)x * r->n, b = *(const uint32_t *)y * r->n;
    for (size_t j = 0; j < r->n; j++) {
        int c = r->q ? mpq_cmp(r->q[a + j], r->q[b + j])
                     : mpz_cmp(r->z[a + j], r->z[b + j]);
        if (c)
            return c < 0 ? -1 : 1;
    }
    return 0;
}

/* Ties broken by the index: the order is total, so the result is the one a stable
 * sort of 0..n-1 gives, whatever the algorithm. */
typedef int (*cmp_r_fn)(const void *, const void *, void *);

static inline int cmp_idx(uint32_t a, uint32_t b, cmp_r_fn cmp, void *ctx)
{
    int c = cmp(&a, &b, ctx);
    return c ? c : (a > b) - (a < b);
}

static void sift_down(uint32_t *a, size_t root, size_t n, cmp_r_fn cmp, void *ctx)
{
    for (;;) {
        size_t c = 2 * root + 1;
        if (c >= n)
            return;
        if (c + 1 < n && cmp_idx(a[c], a[c + 1], cmp, ctx) < 0)
            c++;
        if (cmp_idx(a[root], a[c], cmp, ctx) >= 0)
            return;
        uint32_t t = a[root];
        a[root] = a[c];
        a[c] = t;
        root = c;
    }
}

/* Introsort: quicksort on the median of three, insertion sort for short ranges,
 * heapsort when the recursion gets deep (O(n log n) always, in place). */
static void sort_idx_depth(uint32_t *a, size_t n, cmp_r_fn cmp, void *ctx, int depth)
{
    while (n > 16) {
        if (depth-- == 0) {
            for (size_t i = n / 2; i-- > 0;)
                sift_down(a, i, n, cmp, ctx);
            for (size_t i = n - 1; i > 0; i--) {
                uint32_t t = a[0];
                a[0] = a[i];
                a[i] = t;
                sift_down(a, 0, i, cmp, ctx);
            }
            return;
        }
        size_t mid = n / 2;
        if (cmp_idx(a[mid], a[0], cmp, ctx) < 0) {
            uint32_t t = a[mid]; a[mid] = a[0]; a[0] = t;
        }
        if (cmp_idx(a[n - 1], a[0], cmp, ctx) < 0) {
            uint32_t t = a[n - 1]; a[n - 1] = a[0]; a[0] = t;
        }
        if (cmp_idx(a[n - 1], a[mid], cmp, ctx) < 0) {
            uint32_t t = a[n - 1]; a[n - 1] = a[mid]; a[mid] = t;
        }
        uint32_t pivot = a[mid];
        size_t i = 0, j = n - 1;
        for (;;) {
            while (cmp_idx(a[i], pivot, cmp, ctx) < 0)
                i++;
            while (cmp_idx(pivot, a[j], cmp, ctx) < 0)
                j--;
            if (i >= j)
                break;
            uint32_t t = a[i];
            a[i] = a[j];
            a[j] = t;
            i++;
            j--;
        }
        /* a[0..j] <= pivot <= a[j+1..n-1]: recurse on the smaller side */
        size_t left = j + 1;
        if (left < n - left) {
            sort_idx_depth(a, left, cmp, ctx, depth);
            a += left;
            n -= left;
        } else {
            sort_idx_depth(a + left, n - left, cmp, ctx, depth);
            n = left;
        }
    }
    for (size_t i = 1; i < n; i++) {
        uint32_t x = a[i];
        size_t k = i;
        for (; k > 0 && cmp_idx(a[k - 1], x, cmp, ctx) > 0; k--)
            a[k] = a[k - 1];
        a[k] = x;
    }
}

static void sort_idx(uint32_t *a, size_t n, cmp_r_fn cmp, void *ctx)
{
    int depth = 2;
    for (size_t m = n; m > 1; m >>= 1)
        depth += 2;
    sort_idx_depth(a, n, cmp, ctx, depth);
}

static int cmp_cell(const void *x, const void *y);

static int cmp_cell_r(const void *x, const void *y, void *ctx)
{
    const tp_complex_cell *cells = ctx;
    return cmp_cell(&cells[*(const uint32_t *)x], &cells[*(const uint32_t *)y]);
}

static int cmp_cell(const void *x, const void *y)
{
    const tp_complex_cell *a = x, *b = y;
    if (a->dim != b->dim)
        return a->dim < b->dim ? -1 : 1;
    int c = tp_idx_cmp_lists(a->verts, a->nverts, b->verts, b->nverts);
    if (c)
        return c;
    return tp_idx_cmp_lists(tp_complex_cell_rays(a), a->nrays, tp_complex_cell_rays(b),
                            b->nrays);
}

/* ---- build ------------------------------------------------------------------------ */

/* Move row i of the m rows at base (rowbytes each) to row to[i], in place; `to` is
 * destroyed (left the identity). tmp holds one row. */
static void permute_rows(void *base, size_t rowbytes, uint32_t *to, size_t m, void *tmp)
{
    unsigned char *b = base;
    for (size_t i = 0; i < m; i++)
        while (to[i] != i) {
            size_t j = to[i];
            memcpy(tmp, b + j * rowbytes, rowbytes);
            memcpy(b + j * rowbytes, b + i * rowbytes, rowbytes);
            memcpy(b + i * rowbytes, tmp, rowbytes);
            to[i] = to[j];
            to[j] = (uint32_t)j;
        }
}

static tp_status nomem(tp_error *err)
{
    return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (tropical complex)");
}

/* num/den (den > 0) reduced; false unless both fit in int64 (|x| <= INT64_MAX). */
static bool q_reduce(i128 *num, i128 *den)
{
    if (*den == 1)
        return fits64(*num);
    if (fits64(*num) && fits64(*den)) {
        /* 64-bit arithmetic: the common case, and much cheaper than 128-bit division */
        int64_t a = (int64_t)*num, b = (int64_t)*den;
        uint64_t ua = a < 0 ? (uint64_t)0 - (uint64_t)a : (uint64_t)a;
        int64_t g = (int64_t)gcd_u64(ua, (uint64_t)b);
        if (g > 1) {
            a /= g;
            b /= g;
        }
        *num = a;
        *den = b;
        return true;
    }
    i128 g = gcd128(*num, *den);
    if (g > 1) {
        *num /= g;
        *den /= g;
    }
    return fits64(*num) && fits64(*den);
}

/* Coordinate j of the interior point of c (centroid of the vertices plus the sum of
 * the rays) as a reduced int64 fraction; false when a value leaves int64. */
static bool interior_coord64(const tp_complex *C, const tp_complex_cell *c, size_t j,
                             int64_t *num, int64_t *den)
{
    size_t n = C->n;
    i128 a = 0, b = 1;
    for (size_t v = 0; v < c->nverts; v++) {
        mpq_srcptr w = C->verts[c->verts[v] * n + j];
        int64_t x64, y64;
        if (!tp_z_get64(mpq_numref(w), &x64) || !tp_z_get64(mpq_denref(w), &y64))
            return false;
        i128 x = x64, y = y64;
        if (v == 0) {
            a = x; /* already reduced */
            b = y;
            continue;
        }
        if (y == b) {
            a += x; /* same denominator (often 1) */
        } else {
            a = a * y + x * b;
            b = b * y;
        }
        if (!q_reduce(&a, &b))
            return false;
    }
    if (c->nverts > 1) {
        b *= (i128)c->nverts;
        if (!q_reduce(&a, &b))
            return false;
    }
    for (size_t r = 0; r < c->nrays; r++) {
        mpz_srcptr u = C->rays[tp_complex_cell_rays(c)[r] * n + j];
        int64_t u64;
        if (!tp_z_get64(u, &u64))
            return false;
        a += (i128)u64 * b;
        if (!fits64(a))
            return false;
    }
    *num = (int64_t)a;
    *den = (int64_t)b;
    return true;
}

/* tp_complex_interior with int64 rationals; false when a value leaves int64 (the
 * caller then uses GMP). */
static bool interior64(mpq_t *out, const tp_complex *C, const tp_complex_cell *c)
{
    size_t n = C->n;
    if (c->nverts == 1 && c->nrays == 0) {
        for (size_t j = 0; j < n; j++)
            mpq_set(out[j], C->verts[c->verts[0] * n + j]);
        return true;
    }
    for (size_t j = 0; j < n; j++) {
        int64_t num, den;
        if (!interior_coord64(C, c, j, &num, &den))
            return false;
        mpz_set_si(mpq_numref(out[j]), (long)num);
        mpz_set_si(mpq_denref(out[j]), (long)den);
    }
    return true;
}

/* The interior point of c as reduced int64 fractions num[j]/den[j] (n <= 8); false
 * when a value leaves int64. */
static bool interior_frac64(const tp_complex *C, const tp_complex_cell *c, int64_t *num,
                            int64_t *den)
{
    for (size_t j = 0; j < C->n; j++)
        if (!interior_coord64(C, c, j, &num[j], &den[j]))
            return false;
    return true;
}

static void cell_interior(const tp_complex *C, const tp_complex_cell *c, mpq_t *out)
{
    if (interior64(out, C, c))
        return;
    size_t n = C->n;
    mpq_t t;
    mpq_init(t);
    for (size_t j = 0; j < n; j++)
        mpq_set_ui(out[j], 0, 1);
    for (size_t v = 0; v < c->nverts; v++)
        for (size_t j = 0; j < n; j++)
            mpq_add(out[j], out[j], C->verts[c->verts[v] * n + j]);
    if (c->nverts > 1) {
        mpq_set_ui(t, (unsigned long)c->nverts, 1);
        for (size_t j = 0; j < n; j++)
            mpq_div(out[j], out[j], t);
    }
    for (size_t r = 0; r < c->nrays; r++)
        for (size_t j = 0; j < n; j++) {
            mpq_set_z(t, C->rays[tp_complex_cell_rays(c)[r] * n + j]);
            mpq_add(out[j], out[j], t);
        }
    mpq_clear(t);
}

mpz_srcptr tp_complex_mult(const tp_complex *C, size_t i)
{
    static const mp_limb_t zero_limb = 0;
    static const mpz_t zero = MPZ_ROINIT_N((mp_limb_t *)&zero_limb, 0);
    const tp_complex_cell *c = &C->cells[i];
    if (C->vmult && c->dim == (int)C->nlin && c->nverts == 1 && c->nrays == 0)
        return C->vmult[c->verts[0]];
    return zero;
}

void tp_complex_interior(const tp_complex *C, size_t i, mpq_t *out)
{
    cell_interior(C, &C->cells[i], out);
}

/* check_balance for n = 2 (Phi the identity) in int64/int128: 1 balanced, 0 not,
 * -1 when some value overflows (the caller then uses GMP). Same arithmetic as the
 * GMP path: u_e is the primitive integer vector along q_e - p. */
static int balance2_fast(const tp_subdiv *S, const tp_subdiv_cell *sig, const size_t *eoff,
                         const uint32_t *eids, const bool *mark,
                         const tp_complex *C, size_t sc)
{
    int64_t pn[2], pd[2], qn[2], qd[2];
    if (!interior_frac64(C, &C->cells[sc], pn, pd))
        return -1;
    i128 sum[2] = {0, 0};
    size_t f = sig->lower[0], nadj = 0;
    for (size_t q = eoff[f]; q < eoff[f + 1]; q++) {
        const tp_subdiv_cell *e = &S->cells[eids[q]];
        bool inside = true;
        for (size_t t = 0; t < e->npts && inside; t++)
            inside = mark[e->pts[t]];
        if (!inside)
            continue;
        nadj++;
        const tp_complex_cell *ce = &C->cells[eids[q]];
        if (!mpz_fits_slong_p(ce->weight) || !interior_frac64(C, ce, qn, qd))
            return -1;
        /* d_j = qn/qd - pn/pd = x_j / y_j, y_j > 0 */
        i128 x[2], y[2];
        for (int j = 0; j < 2; j++) {
            x[j] = (i128)qn[j] * pd[j] - (i128)pn[j] * qd[j];
            y[j] = (i128)qd[j] * pd[j];
            i128 g = gcd128(x[j], y[j]);
            if (g > 1) {
                x[j] /= g;
                y[j] /= g;
            }
        }
        /* direction (x0 / y0, x1 / y1) ~ (x0 (l / y0), x1 (l / y1)), l = lcm(y0, y1) */
        i128 gy = gcd128(y[0], y[1]);
        i128 u[2];
        if (__builtin_mul_overflow(x[0], y[1] / gy, &u[0]) ||
            __builtin_mul_overflow(x[1], y[0] / gy, &u[1]))
            return -1;
        i128 g = gcd128(u[0], u[1]);
        if (g > 1) {
            u[0] /= g;
            u[1] /= g;
        }
        i128 wgt = mpz_get_si(ce->weight), m;
        for (int j = 0; j < 2; j++)
            if (__builtin_mul_overflow(wgt, u[j], &m) ||
                __builtin_add_overflow(sum[j], m, &sum[j]))
                return -1;
    }
    return nadj >= 3 && sum[0] == 0 && sum[1] == 0;
}

/* Scratch space of check_balance, set up once per complex. */
typedef struct {
    size_t n;
    mpz_t *x, *y, *A, *u;
    mpq_t *dq, *pin, *qin;
    mpq_t acc, im[2];
    mpz_t sum[2], pr[2], g;
} bal_ws;

static void bal_ws_clear(bal_ws *w)
{
    zvec_free(w->x, w->n);
    zvec_free(w->y, w->n);
    zvec_free(w->A, 2 * w->n);
    zvec_free(w->u, w->n);
    qvec_free(w->dq, w->n);
    qvec_free(w->pin, w->n);
    qvec_free(w->qin, w->n);
    mpq_clears(w->acc, w->im[0], w->im[1], NULL);
    mpz_clears(w->sum[0], w->sum[1], w->pr[0], w->pr[1], w->g, NULL);
}

static bool bal_ws_init(bal_ws *w, size_t n)
{
    w->n = n;
    w->x = zvec_new(n);
    w->y = zvec_new(n);
    w->A = zvec_new(2 * n);
    w->u = zvec_new(n);
    w->dq = qvec_new(n);
    w->pin = qvec_new(n);
    w->qin = qvec_new(n);
    mpq_inits(w->acc, w->im[0], w->im[1], NULL);
    mpz_inits(w->sum[0], w->sum[1], w->pr[0], w->pr[1], w->g, NULL);
    if (!w->x || !w->y || !w->A || !w->u || !w->dq || !w->pin || !w->qin) {
        bal_ws_clear(w);
        return false;
    }
    return true;
}

/* Balancing at the codimension-2 cell dual to the 2-cell `sc`. `edges_of_facet`
 * (CSR over lower facets) lists the subdivision edges in each lower facet. */
static tp_status check_balance(const tp_subdiv *S, const tp_points *P, size_t sc,
                               const size_t *eoff, const uint32_t *eids, bool *mark,
                               const tp_complex *C,
                               bal_ws *w, bool *balanced)
{
    const tp_subdiv_cell *sig = &S->cells[sc];
    size_t n = P->n;
    tp_status st = TP_OK;
    *balanced = false;
    mpz_t *K = NULL, *Phi = NULL;
    mpz_t *x = w->x, *y = w->y, *A = w->A;
    mpq_t *dq = w->dq;
    mpz_set_ui(w->sum[0], 0);
    mpz_set_ui(w->sum[1], 0);
    if (sig->npts < 3)
        return TP_EINTERNAL;
    /* For n = 2 sigma spans the whole plane: W = 0 and Phi is the identity, so the
     * plane test and the two kernels are skipped. */
    if (n != 2) {
        /* Two differences spanning sigma's plane. */
        exp_diff(x, P, sig->pts[1], sig->pts[0]);
        bool found = false;
        for (size_t t = 2; t < sig->npts && !found; t++) {
            exp_diff(y, P, sig->pts[t], sig->pts[0]);
            minors_gcd(w->g, x, y, n);
            found = mpz_sgn(w->g) != 0;
        }
        if (!found)
            return TP_EINTERNAL;
        for (size_t k = 0; k < n; k++) {
            mpz_set(A[k], x[k]);
            mpz_set(A[n + k], y[k]);
        }
        size_t nk = int_kernel(A, 2, n, &K);
        if (nk == SIZE_MAX)
            return TP_ENOMEM;
        size_t nphi = int_kernel(K, nk, n, &Phi);
        zvec_free(K, nk * n);
        if (nphi == SIZE_MAX)
            return TP_ENOMEM;
        if (nphi != 2) {
            zvec_free(Phi, nphi * n);
            return TP_EINTERNAL;
        }
    }
    for (size_t t = 0; t < sig->npts; t++)
        mark[sig->pts[t]] = true;
    if (n == 2) {
        int fast = balance2_fast(S, sig, eoff, eids, mark, C, sc);
        if (fast >= 0) {
            for (size_t t = 0; t < sig->npts; t++)
                mark[sig->pts[t]] = false;
            *balanced = fast == 1;
            return TP_OK;
        }
    }
    mpq_t *p = w->pin;
    cell_interior(C, &C->cells[sc], p);
    /* Edges of sigma: subdivision edges inside one lower facet containing sigma whose
     * points all lie in sigma. */
    size_t f = sig->lower[0];
    size_t nadj = 0;
    for (size_t q = eoff[f]; q < eoff[f + 1]; q++) {
        const tp_subdiv_cell *e = &S->cells[eids[q]];
        bool inside = true;
        for (size_t t = 0; t < e->npts && inside; t++)
            inside = mark[e->pts[t]];
        if (!inside)
            continue;
        nadj++;
        tp_complex_cell *ce = &C->cells[eids[q]];
        mpq_t *qi = w->qin;
        cell_interior(C, ce, qi);
        /* im = Phi(dq), made a primitive integer vector in Z^2 */
        if (!Phi) {
            mpq_sub(w->im[0], qi[0], p[0]);
            mpq_sub(w->im[1], qi[1], p[1]);
        } else {
            for (size_t j = 0; j < n; j++)
                mpq_sub(dq[j], qi[j], p[j]);
            for (size_t r = 0; r < 2; r++) {
                mpq_set_ui(w->im[r], 0, 1);
                for (size_t j = 0; j < n; j++) {
                    mpq_set_z(w->acc, Phi[r * n + j]);
                    mpq_mul(w->acc, w->acc, dq[j]);
                    mpq_add(w->im[r], w->im[r], w->acc);
                }
            }
        }
        primitive_of_q(w->pr, w->im, 2);
        for (size_t r = 0; r < 2; r++)
            mpz_addmul(w->sum[r], ce->weight, w->pr[r]);
    }
    for (size_t t = 0; t < sig->npts; t++)
        mark[sig->pts[t]] = false;
    *balanced = nadj >= 3 && mpz_sgn(w->sum[0]) == 0 && mpz_sgn(w->sum[1]) == 0;
    zvec_free(Phi, 2 * n);
    return st;
}

static tp_status build(tp_complex *C, const tp_subdiv *S, tp_subdiv *take,
                       const tp_points *P, char *const *vars, bool max, tp_error *err);

tp_status tp_complex_build(tp_complex *C, const tp_subdiv *S, const tp_points *P,
                           char *const *vars, bool max, tp_error *err)
{
    return build(C, S, NULL, P, vars, max, err);
}

tp_status tp_complex_build_move(tp_complex *C, tp_subdiv *S, const tp_points *P,
                                char *const *vars, bool max, tp_error *err)
{
    return build(C, S, S, P, vars, max, err);
}

/* take: S itself when its normals are to be moved, else NULL. */
static tp_status build(tp_complex *C, const tp_subdiv *S, tp_subdiv *take,
                       const tp_points *P, char *const *vars, bool max, tp_error *err)
{
    tp_complex_clear(C);
    const tp_hull *H = &S->hull;
    size_t n = P->n;
    C->n = n;
    C->max = max;
    C->f_vector = calloc(n + 1, sizeof *C->f_vector);
    if (!C->f_vector)
        return nomem(err);
    C->nlin = H->nlin;
    C->lin = zvec_new(H->nlin * n);
    if (!C->lin)
        return nomem(err);
    for (size_t i = 0; i < H->nlin * n; i++)
        mpz_set(C->lin[i], H->lin[i]);
    if (H->dim <= 0) {
        C->dim = -1; /* a monomial: the hypersurface is empty */
        C->balanced = true;
        return TP_OK;
    }
    C->dim = (int)n - 1;
    tp_status st = TP_OK;

    size_t *rmap = NULL, *eoff = NULL;
    uint32_t *vmap = NULL; /* vertex and ray maps: fewer than 2^32 of each */
    uint32_t *eids = NULL; /* subdivision cell indices: fewer than 2^32 */
    bool *ray_used = NULL, *mark = NULL;
    uint32_t *ord = NULL;

    /* Vertices: every lower facet normal (read-only values: moved with their limbs
     * from the hull, or copied into this complex's arena). */
    C->nverts = H->nlower;
    for (size_t v = 0; v < H->nlower; v++)
        if (!H->lower[v].w) {
            st = tp_error_set(err, TP_EINTERNAL, 0, 0,
                              "the subdivision's normals were already taken");
            goto done;
        }
    C->verts = tp_big_alloc((C->nverts * n + 1) * sizeof *C->verts);
    if (!C->verts) {
        st = nomem(err);
        goto done;
    }
    if (take) {
        tp_hull *Hm = &take->hull;
        for (size_t v = 0; v < Hm->nlower; v++) {
            memcpy(&C->verts[v * n], Hm->lower[v].w, n * sizeof *C->verts);
            Hm->lower[v].w = NULL;
        }
        tp_arena_take(&C->limbs, &Hm->w_limbs);
        tp_arena_free(&Hm->w_mem);
    } else {
        for (size_t v = 0; v < H->nlower; v++)
            if (!tp_arena_qview(&C->limbs, &C->verts[v * n],
                                (const mpq_t *)H->lower[v].w, n)) {
                st = nomem(err);
                goto done;
            }
    }
    if (S->ncells >= UINT32_MAX) {
        st = tp_error_set(err, TP_ELIMIT, 0, 0,
                          "%zu subdivision faces: the complex takes fewer than 2^32",
                          S->ncells);
        goto done;
    }
    /* Cells, one per subdivision cell of dimension >= 1. Weights and multiplicities
     * are read-only values in C->limbs (zero until set). */
    static const mp_limb_t zero_limb = 0;
    mpz_t tw;
    size_t nc = 0, nidx = 0;
    for (size_t s = 0; s < S->ncells; s++)
        if (S->cells[s].dim >= 1) {
            nc++;
            nidx += S->cells[s].nlower + S->cells[s].nsides;
        }
    C->cells = tp_big_alloc((nc ? nc : 1) * sizeof *C->cells);
    C->idx_pool = tp_big_alloc((nidx ? nidx : 1) * sizeof *C->idx_pool);
    ray_used = calloc(H->nsides + 1, sizeof *ray_used);
    if (!C->cells || !C->idx_pool || !ray_used) {
        st = nomem(err);
        goto done;
    }
    uint32_t *ip = C->idx_pool;
    mpz_init(tw);
    for (size_t s = 0; s < S->ncells; s++) {
        const tp_subdiv_cell *sig = &S->cells[s];
        if (sig->dim < 1)
            continue;
        if (C->ncells != s) {
            /* cells come sorted by dimension, descending (subdiv.h): complex cell i is
             * dual to subdivision cell i, which the code below relies on */
            st = tp_error_set(err, TP_EINTERNAL, 0, 0, "subdivision cells out of order");
            mpz_clear(tw);
            goto done;
        }
        tp_complex_cell *c = &C->cells[C->ncells];
        mpz_roinit_n(c->weight, &zero_limb, 0);
        C->ncells++;
        c->dim = (int)n - sig->dim;
        c->dual = (uint32_t)s;
        c->nverts = sig->nlower;
        c->verts = ip;
        ip += c->nverts;
        c->nrays = sig->nsides;
        ip += c->nrays;
        memcpy(c->verts, sig->lower, c->nverts * sizeof *c->verts);
        memcpy(ip - c->nrays, tp_subdiv_sides(sig), c->nrays * sizeof *ip);
        for (size_t r = 0; r < c->nrays; r++)
            ray_used[tp_complex_cell_rays(c)[r]] = true;
        if (sig->dim == 1) {
            size_t lo, hi;
            edge_extremes(P, sig->pts, sig->npts, &lo, &hi, tw);
            if (!tp_arena_zview(&C->limbs, &c->weight, (const mpz_t *)&tw, 1)) {
                mpz_clear(tw);
                st = nomem(err);
                goto done;
            }
        }
        if (P->residue) {
            c->initial_form = initial_form(P, sig->pts, sig->npts, vars);
            if (!c->initial_form) {
                mpz_clear(tw);
                st = nomem(err);
                goto done;
            }
        }
        C->f_vector[c->dim]++;
    }
    mpz_clear(tw);

    /* Rays: the used Newton facet normals. */
    rmap = malloc((H->nsides + 1) * sizeof *rmap);
    if (!rmap) {
        st = nomem(err);
        goto done;
    }
    size_t nr = 0;
    for (size_t r = 0; r < H->nsides; r++)
        rmap[r] = ray_used[r] ? nr++ : SIZE_MAX;
    C->nrays = nr;
    C->rays = zvec_new(nr * n);
    if (!C->rays) {
        st = nomem(err);
        goto done;
    }
    for (size_t r = 0; r < H->nsides; r++)
        if (rmap[r] != SIZE_MAX)
            for (size_t j = 0; j < n; j++)
                mpz_set(C->rays[rmap[r] * n + j], H->sides[r].u[j]);
    for (size_t i = 0; i < C->ncells; i++) {
        uint32_t *cr = tp_complex_cell_rays(&C->cells[i]);
        for (size_t r = 0; r < C->cells[i].nrays; r++)
            cr[r] = (uint32_t)rmap[cr[r]]; /* < nsides < 2^32 (tp_subdiv_build) */
    }

    /* Vertex multiplicities of curves and of n = 1 (before negation; they are
     * invariant). */
    int d = H->dim;
    if (d == 2 || (d == 1 && n == 1)) {
        C->vmult = tp_big_alloc((C->nverts + 1) * sizeof *C->vmult);
        if (!C->vmult) {
            st = nomem(err);
            goto done;
        }
        for (size_t v = 0; v < C->nverts; v++)
            mpz_roinit_n(C->vmult[v], &zero_limb, 0);
    }
    if (d == 1 && n == 1) {
        /* every cell is a vertex dual to an edge; shares the weight's read-only limbs */
        for (size_t i = 0; i < C->ncells; i++)
            C->vmult[C->cells[i].verts[0]][0] = C->cells[i].weight[0];
    }
    /* Edges by lower facet (CSR), for balancing and for polygon areas. */
    eoff = tp_big_alloc((H->nlower + 1) * sizeof *eoff); /* scratch: big_alloc gives */
    /* the pages back to the system when freed, unlike a hole in malloc's heap */
    if (!eoff) {
        st = nomem(err);
        goto done;
    }
    size_t tot = 0;
    for (size_t s = 0; s < S->ncells; s++)
        if (S->cells[s].dim == 1) {
            for (size_t l = 0; l < S->cells[s].nlower; l++)
                eoff[S->cells[s].lower[l] + 1]++;
            tot += S->cells[s].nlower;
        }
    for (size_t f = 0; f < H->nlower; f++)
        eoff[f + 1] += eoff[f];
    eids = tp_big_alloc((tot ? tot : 1) * sizeof *eids);
    mark = calloc(P->count + 1, sizeof *mark);
    if (!eids || !mark) {
        st = nomem(err);
        goto done;
    }
    /* fill with eoff[f] as the cursor of facet f, then shift the offsets back */
    for (size_t s = 0; s < S->ncells; s++)
        if (S->cells[s].dim == 1)
            for (size_t l = 0; l < S->cells[s].nlower; l++)
                eids[eoff[S->cells[s].lower[l]]++] = (uint32_t)s;
    for (size_t f = H->nlower; f > 0; f--)
        eoff[f] = eoff[f - 1];
    eoff[0] = 0;

    if (d == 2) {
        /* Normalized area of each maximal polygon: sum over its edges (a, b) of the
         * lattice area of (b - a, p - a), p a fixed point of the polygon. */
        mpz_t *e1 = zvec_new(n), *e2 = zvec_new(n);
        mpz_t g, len, acc;
        mpz_inits(g, len, acc, NULL);
        if (!e1 || !e2)
            st = nomem(err);
        for (size_t s = 0; s < S->ncells && st == TP_OK; s++) {
            const tp_subdiv_cell *sig = &S->cells[s];
            if (sig->dim != 2)
                continue;
            for (size_t t = 0; t < sig->npts; t++)
                mark[sig->pts[t]] = true;
            size_t f = sig->lower[0]; /* the only lower facet of a maximal cell */
            mpz_set_ui(acc, 0);
            for (size_t q = eoff[f]; q < eoff[f + 1]; q++) {
                const tp_subdiv_cell *e = &S->cells[eids[q]];
                bool inside = true;
                for (size_t t = 0; t < e->npts && inside; t++)
                    inside = mark[e->pts[t]];
                if (!inside)
                    continue;
                size_t lo, hi;
                edge_extremes(P, e->pts, e->npts, &lo, &hi, len);
                if (!area64(g, P, hi, lo, sig->pts[0])) {
                    exp_diff(e1, P, hi, lo);
                    exp_diff(e2, P, sig->pts[0], lo);
                    minors_gcd(g, e1, e2, n);
                }
                mpz_add(acc, acc, g);
            }
            for (size_t t = 0; t < sig->npts; t++)
                mark[sig->pts[t]] = false;
            if (!tp_arena_zview(&C->limbs, &C->vmult[f], (const mpz_t *)&acc, 1))
                st = nomem(err);
        }
        mpz_clears(g, len, acc, NULL);
        zvec_free(e1, n);
        zvec_free(e2, n);
        if (st != TP_OK)
            goto done;
    }

    /* Balancing of every codimension-2 cell. */
    C->balanced = true;
    if (d >= 2) {
        bal_ws ws;
        if (!bal_ws_init(&ws, n)) {
            st = nomem(err);
            goto done;
        }
        for (size_t s = 0; s < S->ncells; s++) {
            if (S->cells[s].dim != 2)
                continue;
            bool ok = false;
            tp_status bs = check_balance(S, P, s, eoff, eids, mark, C, &ws, &ok);
            if (bs == TP_ENOMEM) {
                bal_ws_clear(&ws);
                st = nomem(err);
                goto done;
            }
            if (!ok) {
                C->balanced = false;
                C->nunbalanced++;
            }
        }
        bal_ws_clear(&ws);
    }

    /* Curve invariants (Newton polytope of dimension 2). */
    if (d == 2) {
        C->is_curve = true;
        /* Graph: nodes = cells of dim n-2 (dual to polygons), edges = bounded top cells. */
        size_t *parent = malloc((C->nverts + 1) * sizeof *parent);
        if (!parent) {
            st = nomem(err);
            goto done;
        }
        for (size_t v = 0; v < C->nverts; v++)
            parent[v] = v;
        size_t comps = C->nverts;
        C->nbounded = C->nunbounded = 0;
        for (size_t i = 0; i < C->ncells; i++) {
            tp_complex_cell *c = &C->cells[i];
            if (c->dim != (int)n - 1)
                continue;
            if (c->nrays == 0 && c->nverts == 2) {
                C->nbounded++;
                size_t a = c->verts[0], b = c->verts[1];
                while (parent[a] != a)
                    a = parent[a] = parent[parent[a]];
                while (parent[b] != b)
                    b = parent[b] = parent[parent[b]];
                if (a != b) {
                    parent[a] = b;
                    comps--;
                }
            } else {
                C->nunbounded++;
            }
        }
        free(parent);
        C->genus = (long)C->nbounded - (long)C->nverts + (long)comps;
        C->smooth = 1;
        for (size_t s = 0; s < S->ncells; s++) {
            const tp_subdiv_cell *sig = &S->cells[s];
            if (sig->dim == 2 &&
                (sig->npts != 3 || mpz_cmp_ui(C->vmult[sig->lower[0]], 1) != 0))
                C->smooth = 0;
        }
    }

    /* Max convention: negate everything geometric. */
    if (max) {
        for (size_t i = 0; i < C->nverts * n; i++)
            tp_qview_neg(C->verts[i]);
        for (size_t i = 0; i < C->nrays * n; i++)
            mpz_neg(C->rays[i], C->rays[i]);
    }

    /* The scratch arrays are no longer needed: give them back before sorting. */
    free(ray_used);
    tp_big_free(eoff);
    tp_big_free(eids);
    free(mark);
    free(rmap);
    eoff = rmap = NULL;
    eids = NULL;
    ray_used = mark = NULL;

    /* Canonical order: sort vertices and rays, remap, sort cells. Rows are permuted in
     * place by moving the mpq_t / mpz_t structs themselves (no new limbs). */
    size_t nref = C->nverts > C->nrays ? C->nverts : C->nrays;
    vmap = tp_big_alloc((nref ? nref : 1) * sizeof *vmap);
    void *row = malloc(n * sizeof(mpq_t) + 1); /* one row of verts or rays */
    if (!vmap || !row) {
        free(row);
        st = nomem(err);
        goto done;
    }
    for (int pass = 0; pass < 2; pass++) {
        size_t m = pass == 0 ? C->nverts : C->nrays;
        ord = tp_big_alloc((m ? m : 1) * sizeof *ord);
        if (!ord) {
            free(row);
            st = nomem(err);
            goto done;
        }
        for (size_t v = 0; v < m; v++)
            ord[v] = (uint32_t)v; /* m < 2^32: the subdivision's facet limit */
        rowctx rc = {pass == 0 ? (const mpq_t *)C->verts : NULL,
                     pass == 0 ? NULL : (const mpz_t *)C->rays, n};
        sort_idx(ord, m, cmp_row_r, &rc);
        for (size_t k = 0; k < m; k++)
            vmap[ord[k]] = (uint32_t)k;
        tp_big_free(ord);
        ord = NULL;
        for (size_t i = 0; i < C->ncells; i++) {
            tp_complex_cell *c = &C->cells[i];
            uint32_t *lst = pass == 0 ? c->verts : tp_complex_cell_rays(c);
            size_t cnt = pass == 0 ? c->nverts : c->nrays;
            for (size_t t = 0; t < cnt; t++)
                lst[t] = vmap[lst[t]];
            tp_idx_sort(lst, cnt);
        }
        if (pass == 0 && C->vmult) {
            /* vmult follows the vertices: permute a copy of the map first */
            uint32_t *vm2 = malloc((m ? m : 1) * sizeof *vm2);
            if (!vm2) {
                free(row);
                st = nomem(err);
                goto done;
            }
            memcpy(vm2, vmap, m * sizeof *vm2);
            mpz_t zt;
            permute_rows(C->vmult, sizeof *C->vmult, vm2, m, zt);
            free(vm2);
        }
        if (pass == 0)
            permute_rows(C->verts, n * sizeof *C->verts, vmap, m, row);
        else
            permute_rows(C->rays, n * sizeof *C->rays, vmap, m, row);
    }
    free(row);
    tp_big_free(vmap);
    vmap = NULL;
    /* Cells: sort indices, then move cell k to position k along the cycles of the
     * permutation (ord[k] = old position of the cell that goes to k). */
    ord = tp_big_alloc((C->ncells ? C->ncells : 1) * sizeof *ord);
    if (!ord) {
        st = nomem(err);
        goto done;
    }
    for (size_t i = 0; i < C->ncells; i++)
        ord[i] = (uint32_t)i; /* fewer than 2^32 cells, checked above */
    sort_idx(ord, C->ncells, cmp_cell_r, (void *)C->cells);
    for (size_t i = 0; i < C->ncells; i++) {
        if (ord[i] == i)
            continue;
        tp_complex_cell tmp = C->cells[i];
        size_t j = i;
        for (;;) {
            size_t k = ord[j];
            ord[j] = (uint32_t)j;
            if (k == i) {
                C->cells[j] = tmp;
                break;
            }
            C->cells[j] = C->cells[k];
            j = k;
        }
    }
    tp_big_free(ord);
    ord = NULL;

    /* Rays by direction with total weight (curves): unbounded top cells with one ray. */
    if (C->is_curve) {
        C->raydeg = calloc(C->nrays + 1, sizeof *C->raydeg);
        if (!C->raydeg) {
            st = nomem(err);
            goto done;
        }
        C->nraydeg = C->nrays;
        for (size_t r = 0; r < C->nrays; r++) {
            C->raydeg[r].dir = zvec_new(n);
            mpz_init(C->raydeg[r].weight);
            if (!C->raydeg[r].dir) {
                st = nomem(err);
                goto done;
            }
            for (size_t j = 0; j < n; j++)
                mpz_set(C->raydeg[r].dir[j], C->rays[r * n + j]);
        }
        for (size_t i = 0; i < C->ncells; i++) {
            const tp_complex_cell *c = &C->cells[i];
            if (c->dim == (int)n - 1 && c->nrays == 1)
                mpz_add(C->raydeg[tp_complex_cell_rays(c)[0]].weight,
                        C->raydeg[tp_complex_cell_rays(c)[0]].weight,
                        c->weight);
        }
    }

done:
    tp_big_free(vmap);
    free(rmap);
    tp_big_free(ord);
    free(ray_used);
    tp_big_free(eoff);
    tp_big_free(eids);
    free(mark);
    if (st != TP_OK)
        tp_complex_clear(C);
    return st;
}

tp_status tp_complex_check(const tp_complex *C, tp_error *err)
{
    size_t n = C->n;
    for (size_t i = 0; i < C->ncells; i++) {
        const tp_complex_cell *c = &C->cells[i];
        if (c->dim < 0 || c->dim > (int)n - 1)
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "cell %zu has dimension %d", i,
                                c->dim);
        if (c->nverts == 0)
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "cell %zu has no vertex", i);
        for (size_t t = 0; t < c->nverts; t++)
            if (c->verts[t] >= C->nverts || (t && c->verts[t - 1] >= c->verts[t]))
                return tp_error_set(err, TP_EINTERNAL, 0, 0, "cell %zu: bad vertex list", i);
        for (size_t t = 0; t < c->nrays; t++)
            if (tp_complex_cell_rays(c)[t] >= C->nrays ||
                (t && tp_complex_cell_rays(c)[t - 1] >= tp_complex_cell_rays(c)[t]))
                return tp_error_set(err, TP_EINTERNAL, 0, 0, "cell %zu: bad ray list", i);
        if (c->dim == (int)n - 1 && mpz_sgn(c->weight) <= 0)
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "top cell %zu has weight <= 0", i);
        if (i && cmp_cell(&C->cells[i - 1], c) >= 0)
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "cells not sorted at %zu", i);
    }
    mpz_t g;
    mpz_init(g);
    for (size_t r = 0; r < C->nrays; r++) {
        mpz_set_ui(g, 0);
        for (size_t j = 0; j < n; j++)
            mpz_gcd(g, g, C->rays[r * n + j]);
        if (mpz_cmp_ui(g, 1) != 0) {
            mpz_clear(g);
            return tp_error_set(err, TP_EINTERNAL, 0, 0, "ray %zu is not primitive", r);
        }
    }
    mpz_clear(g);
    if (!C->balanced)
        return tp_error_set(err, TP_EINTERNAL, 0, 0, "%zu codimension-2 cells are not balanced",
                            C->nunbalanced);
    return TP_OK;
}
