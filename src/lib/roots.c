/* roots.c — Newton polygons, residual polynomials, Newton–Puiseux expansions and
 * p-adic Hensel digits of the roots of a univariate polynomial (see trope/roots.h). */
#include "trope/write.h"
#include "trope/roots.h"
#include "roots_internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define MAX_DEGREE 100000

/* ------------------------------------------------------------ init / clear */

void tp_roots_init(tp_roots *R)
{
    memset(R, 0, sizeof *R);
    tp_field_init(&R->field);
}

static void seg_clear(tp_root_segment *s)
{
    mpq_clear(s->valuation);
    if (s->residual)
        for (size_t i = 0; i < s->ncoef; i++)
            mpq_clear(s->residual[i]);
    free(s->residual);
    free(s->residual_text);
    for (size_t i = 0; i < s->nfactors; i++)
        free(s->factors[i].text);
    free(s->factors);
    free(s->factored_text);
    for (size_t i = 0; i < s->nresroots; i++)
        mpz_clear(s->resroots[i]);
    free(s->resroots);
    free(s->resmult);
}

static void root_clear(tp_root *r)
{
    mpq_clear(r->valuation);
    mpq_clear(r->next_exponent);
    for (size_t i = 0; i < r->nterms; i++) {
        mpq_clear(r->terms[i].exponent);
        mpq_clear(r->terms[i].q);
    }
    free(r->terms);
    for (size_t i = 0; i < r->ndigits; i++)
        mpz_clear(r->digits[i]);
    free(r->digits);
    mpz_clear(r->approx);
    free(r->note);
    if (r->series) {
        rs_clear(r->series);
        free(r->series);
    }
}

void tp_roots_clear(tp_roots *R)
{
    for (size_t i = 0; i < R->nsegs; i++)
        seg_clear(&R->segs[i]);
    free(R->segs);
    for (size_t i = 0; i < R->nroots; i++)
        root_clear(&R->roots[i]);
    free(R->roots);
    free(R->poly_text);
    tp_field_clear(&R->field);
    memset(R, 0, sizeof *R);
}

static tp_root *new_root(tp_roots *R, size_t *cap)
{
    if (R->nroots == *cap) {
        size_t nc = *cap ? 2 * *cap : 8;
        tp_root *v = realloc(R->roots, nc * sizeof *v);
        if (!v)
            return NULL;
        R->roots = v;
        *cap = nc;
    }
    tp_root *r = &R->roots[R->nroots++];
    memset(r, 0, sizeof *r);
    mpq_init(r->valuation);
    mpq_init(r->next_exponent);
    mpz_init(r->approx);
    r->count = 1;
    r->multiplicity = 1;
    r->ramification = 1;
    return r;
}

/* ------------------------------------------------------------ Newton polygon */

/* lower hull of the points (j, val[j]) for j in [lo, hi] with has[j]; strict vertices
 * into verts (ascending). returns the number of vertices. */
static size_t lower_hull(const mpq_t *val, const bool *has, size_t lo, size_t hi,
                         size_t *verts)
{
    size_t nv = 0;
    mpq_t a, b, t;
    mpq_init(a);
    mpq_init(b);
    mpq_init(t);
    for (size_t j = lo; j <= hi; j++) {
        if (!has[j])
            continue;
        while (nv >= 2) {
            size_t o = verts[nv - 2], p = verts[nv - 1];
            /* cross = (p - o) x (j - o) = (p-o)*(val_j - val_o) - (val_p - val_o)*(j-o) */
            mpq_sub(a, val[j], val[o]);
            mpq_set_ui(t, (unsigned long)(p - o), 1);
            mpq_mul(a, a, t);
            mpq_sub(b, val[p], val[o]);
            mpq_set_ui(t, (unsigned long)(j - o), 1);
            mpq_mul(b, b, t);
            if (mpq_cmp(a, b) <= 0)
                nv--;
            else
                break;
        }
        verts[nv++] = j;
    }
    mpq_clear(a);
    mpq_clear(b);
    mpq_clear(t);
    return nv;
}

/* valuation of the roots on the segment (i0, i1): (val_i0 - val_i1) / (i1 - i0) */
static void seg_valuation(mpq_t v, const mpq_t *val, size_t i0, size_t i1)
{
    mpq_t d;
    mpq_init(d);
    mpq_sub(v, val[i0], val[i1]);
    mpq_set_ui(d, (unsigned long)(i1 - i0), 1);
    mpq_div(v, v, d);
    mpq_clear(d);
}

/* is (j, val_j) on the line through (i0, val_i0) with root valuation v? */
static bool on_segment(const mpq_t *val, size_t i0, size_t j, const mpq_t v)
{
    mpq_t e, d;
    mpq_init(e);
    mpq_init(d);
    mpq_set_ui(d, (unsigned long)(j - i0), 1);
    mpq_mul(d, d, v);
    mpq_sub(e, val[i0], d);
    bool on = mpq_equal(e, val[j]);
    mpq_clear(e);
    mpq_clear(d);
    return on;
}

/* ------------------------------------------------------------ residual roots */

typedef struct {
    rnum c;
    size_t mult;
} rroot;

static int rroot_cmp(const void *x, const void *y)
{
    const rroot *a = x, *b = y;
    if (a->c.exact != b->c.exact)
        return a->c.exact ? -1 : 1;
    if (a->c.exact)
        return mpq_cmp(a->c.q, b->c.q);
    double ar, ai, br, bi;
    rn_get_d(&a->c, &ar, &ai);
    rn_get_d(&b->c, &br, &bi);
    if (fabs(ar - br) > 1e-12 * (1 + fabs(ar)))
        return ar < br ? -1 : 1;
    if (ai != bi)
        return ai < bi ? -1 : 1;
    return 0;
}

static void rroots_free(rroot *r, size_t n)
{
    for (size_t i = 0; i < n; i++)
        rn_clear(&r[i].c);
    free(r);
}

/* nonzero roots of sum coef[i] x^i (coef[0] != 0, coef[n-1] != 0) with multiplicities */
static bool residual_roots(const rnum *coef, size_t n, rroot **out, size_t *nout)
{
    *out = NULL;
    *nout = 0;
    size_t deg = n - 1;
    rroot *rs = calloc(deg ? deg : 1, sizeof *rs);
    if (!rs)
        return false;
    size_t nr = 0;
    bool exact = true;
    for (size_t i = 0; i < n; i++)
        if (!coef[i].exact)
            exact = false;
    bool ok = true;
    mpc_t *cc = malloc(n * sizeof *cc);
    mpc_t *zs = malloc(n * sizeof *zs);
    size_t *mu = malloc(n * sizeof *mu);
    if (!cc || !zs || !mu) {
        free(cc); free(zs); free(mu); free(rs);
        return false;
    }
    for (size_t i = 0; i < n; i++) {
        mpc_init2(cc[i], RN_PREC);
        mpc_init2(zs[i], RN_PREC);
    }
    if (exact) {
        qpoly f;
        ok = qp_init(&f, n);
        for (size_t i = 0; ok && i < n; i++)
            mpq_set(f.c[i], coef[i].q);
        qpoly *parts = NULL;
        size_t np = 0;
        if (ok)
            ok = qp_squarefree(&f, &parts, &np);
        for (size_t k = 0; ok && k < np; k++) {
            if (parts[k].n < 2)
                continue;
            mpq_t *rq = NULL;
            size_t nq = 0;
            qpoly rest;
            ok = qp_rational_roots(&parts[k], &rq, &nq, &rest);
            if (!ok)
                break;
            for (size_t i = 0; i < nq; i++) {
                rn_init(&rs[nr].c);
                rn_set_q(&rs[nr].c, rq[i]);
                rs[nr].mult = k + 1;
                nr++;
                mpq_clear(rq[i]);
            }
            free(rq);
            if (rest.n >= 2) {
                for (size_t i = 0; i < rest.n; i++)
                    mpc_set_q(cc[i], rest.c[i], MPC_RNDNN);
                size_t nz = cx_roots((const mpc_t *)cc, rest.n, zs, mu);
                if (nz == (size_t)-1)
                    ok = false;
                for (size_t i = 0; ok && i < nz; i++)
                    for (size_t m = 0; m < mu[i]; m++) {
                        /* a square-free part: clusters are numerically close roots */
                        rn_init(&rs[nr].c);
                        rn_set_mpc(&rs[nr].c, zs[i]);
                        rs[nr].mult = k + 1;
                        nr++;
                    }
            }
            qp_clear(&rest);
        }
        for (size_t k = 0; k < np; k++)
            qp_clear(&parts[k]);
        free(parts);
        qp_clear(&f);
    } else {
        for (size_t i = 0; i < n; i++)
            rn_get_mpc(cc[i], &coef[i]);
        size_t nz = cx_roots((const mpc_t *)cc, n, zs, mu);
        if (nz == (size_t)-1)
            ok = false;
        for (size_t i = 0; ok && i < nz; i++) {
            rn_init(&rs[nr].c);
            rn_set_mpc(&rs[nr].c, zs[i]);
            rs[nr].mult = mu[i];
            nr++;
        }
    }
    for (size_t i = 0; i < n; i++) {
        mpc_clear(cc[i]);
        mpc_clear(zs[i]);
    }
    free(cc);
    free(zs);
    free(mu);
    if (!ok) {
        rroots_free(rs, nr);
        return false;
    }
    qsort(rs, nr, sizeof *rs, rroot_cmp);
    *out = rs;
    *nout = nr;
    return true;
}

/* ------------------------------------------------------------ Newton–Puiseux */

typedef struct {
    tp_roots *R;
    size_t *cap;
    size_t K;
    size_t max_steps;
    size_t seg;
    size_t mult;         /* multiplicity of the square-free part being solved */
    tp_status st;
    tp_error *err;
    /* the prefix of the current branch */
    size_t np, npcap;
    mpq_t *pe;
    rnum *pc;
} np_ctx;

static bool prefix_push(np_ctx *X, const mpq_t e, const rnum *c)
{
    if (X->np == X->npcap) {
        size_t nc = X->npcap ? 2 * X->npcap : 16;
        mpq_t *pe = realloc(X->pe, nc * sizeof *pe);
        if (!pe)
            return false;
        X->pe = pe;
        rnum *pc = realloc(X->pc, nc * sizeof *pc);
        if (!pc)
            return false;
        X->pc = pc;
        for (size_t i = X->npcap; i < nc; i++) {
            mpq_init(X->pe[i]);
            rn_init(&X->pc[i]);
        }
        X->npcap = nc;
    }
    mpq_set(X->pe[X->np], e);
    rn_set(&X->pc[X->np], c);
    X->np++;
    return true;
}

/* emit the current prefix as a root */
static bool emit(np_ctx *X, size_t count, size_t mult, bool proved, bool terminates,
                 bool unresolved, const mpq_t *next)
{
    tp_root *r = new_root(X->R, X->cap);
    if (!r)
        return false;
    r->segment = X->seg;
    for (size_t s = 0; s < X->R->nsegs; s++)
        if (mpq_equal(X->R->segs[s].valuation, X->pe[0]))
            r->segment = s;
    mpq_set(r->valuation, X->pe[0]);
    r->count = count;
    r->multiplicity = mult * (X->mult ? X->mult : 1);
    r->multiplicity_proved = proved;
    r->unresolved = unresolved;
    size_t nt = X->np < X->K ? X->np : X->K;
    r->terminates = terminates && X->np <= X->K;
    if (X->np > X->K) {
        r->has_next = true;
        mpq_set(r->next_exponent, X->pe[X->K]);
    } else if (next) {
        r->has_next = true;
        mpq_set(r->next_exponent, *next);
    }
    /* ramification: lcm of exponent denominators */
    mpz_t l;
    mpz_init_set_ui(l, 1);
    for (size_t i = 0; i < nt; i++)
        mpz_lcm(l, l, mpq_denref(X->pe[i]));
    r->ramification = mpz_fits_ulong_p(l) ? (size_t)mpz_get_ui(l) : 0;
    mpz_clear(l);
    r->terms = calloc(nt ? nt : 1, sizeof *r->terms);
    r->series = malloc(sizeof *r->series);
    if (!r->terms || !r->series)
        return false;
    rs_init(r->series);
    r->nterms = nt;
    for (size_t i = 0; i < nt; i++) {
        tp_root_term *T = &r->terms[i];
        mpq_init(T->exponent);
        mpq_init(T->q);
        mpq_set(T->exponent, X->pe[i]);
        T->exact = X->pc[i].exact;
        if (T->exact)
            mpq_set(T->q, X->pc[i].q);
        rn_get_d(&X->pc[i], &T->re, &T->im);
        if (!rs_add_term(r->series, X->pe[i], &X->pc[i]))
            return false;
    }
    return true;
}

static bool branch(np_ctx *X, const rupoly *F, const mpq_t v, const rnum *c, size_t m,
                   size_t depth);

/* the m roots x of G with val(x) > 0; the prefix holds `depth` terms */
static bool solve(np_ctx *X, const rupoly *G, size_t m, size_t depth)
{
    size_t n = G->n;
    size_t k0 = 0;
    while (k0 < n && rs_is_zero(&G->a[k0]))
        k0++;
    if (k0 >= n || k0 > m) {
        X->st = tp_error_set(X->err, TP_EINTERNAL, 0, 0,
                             "Newton-Puiseux step lost the polynomial (numerical zero?)");
        return false;
    }
    if (k0 > 0) {
        /* x = 0 is a root of multiplicity k0: the prefix is an exact root */
        if (!emit(X, 1, k0, true, true, false, NULL))
            return false;
        if (k0 == m)
            return true;
    }
    size_t need = m - k0;
    mpq_t *val = malloc(n * sizeof *val);
    bool *has = calloc(n, sizeof *has);
    size_t *verts = malloc(n * sizeof *verts);
    rnum *coef = calloc(n, sizeof *coef);
    if (!val || !has || !verts || !coef) {
        free(val); free(has); free(verts); free(coef);
        return false;
    }
    for (size_t j = 0; j < n; j++) {
        mpq_init(val[j]);
        if (!rs_is_zero(&G->a[j])) {
            has[j] = true;
            mpq_set(val[j], *rs_val(&G->a[j]));
        }
    }
    size_t nv = lower_hull((const mpq_t *)val, has, k0, n - 1, verts);
    bool ok = true;
    size_t got = 0;
    mpq_t w, e;
    mpq_init(w);
    mpq_init(e);
    for (size_t s = 0; ok && s + 1 < nv; s++) {
        size_t i0 = verts[s], i1 = verts[s + 1];
        seg_valuation(w, (const mpq_t *)val, i0, i1);
        if (mpq_sgn(w) <= 0)
            break;
        got += i1 - i0;
        mpq_add(e, X->pe[X->np - 1], w);
        if (depth >= X->K && need == 1) {
            /* the root is determined; the next exponent is e */
            ok = emit(X, 1, 1, true, false, false, (const mpq_t *)&e);
            break;
        }
        if (depth >= X->K + X->max_steps) {
            ok = emit(X, i1 - i0, 1, false, false, true, (const mpq_t *)&e);
            continue;
        }
        size_t nc = i1 - i0 + 1;
        for (size_t j = 0; j < nc; j++) {
            rn_init(&coef[j]);
            if (has[i0 + j] && on_segment((const mpq_t *)val, i0, i0 + j, w))
                rn_set(&coef[j], &G->a[i0 + j].c[0]);
        }
        rroot *rr = NULL;
        size_t nr = 0;
        ok = residual_roots(coef, nc, &rr, &nr);
        for (size_t j = 0; j < nc; j++)
            rn_clear(&coef[j]);
        size_t total = 0;
        for (size_t i = 0; ok && i < nr; i++) {
            total += rr[i].mult;
            size_t save = X->np;
            ok = prefix_push(X, e, &rr[i].c);
            if (ok)
                ok = branch(X, G, w, &rr[i].c, rr[i].mult, depth + 1);
            X->np = save;
        }
        if (ok && total != i1 - i0) {
            X->st = tp_error_set(X->err, TP_EINTERNAL, 0, 0,
                                 "residual polynomial of degree %zu gave %zu roots",
                                 i1 - i0, total);
            ok = false;
        }
        rroots_free(rr, nr);
    }
    if (ok && got != need) {
        X->st = tp_error_set(X->err, TP_EINTERNAL, 0, 0,
                             "Newton-Puiseux step found %zu roots where %zu were expected",
                             got, need);
        ok = false;
    }
    mpq_clear(w);
    mpq_clear(e);
    free(coef);
    for (size_t j = 0; j < n; j++)
        mpq_clear(val[j]);
    free(val);
    free(has);
    free(verts);
    return ok;
}

/* all roots of H (zero roots skipped): its Newton polygon, then every branch */
static bool solve_top(np_ctx *X, const rupoly *H)
{
    size_t n = H->n;
    while (n > 0 && rs_is_zero(&H->a[n - 1]))
        n--;
    size_t k0 = 0;
    while (k0 < n && rs_is_zero(&H->a[k0]))
        k0++;
    if (n == 0 || k0 + 1 >= n)
        return true;
    mpq_t *val = malloc(n * sizeof *val);
    bool *has = calloc(n, sizeof *has);
    size_t *verts = malloc(n * sizeof *verts);
    rnum *coef = calloc(n, sizeof *coef);
    if (!val || !has || !verts || !coef) {
        free(val); free(has); free(verts); free(coef);
        return false;
    }
    for (size_t j = 0; j < n; j++) {
        mpq_init(val[j]);
        if (!rs_is_zero(&H->a[j])) {
            has[j] = true;
            mpq_set(val[j], *rs_val(&H->a[j]));
        }
    }
    size_t nv = lower_hull((const mpq_t *)val, has, k0, n - 1, verts);
    bool ok = true;
    mpq_t w;
    mpq_init(w);
    for (size_t s = 0; ok && s + 1 < nv; s++) {
        size_t i0 = verts[s], i1 = verts[s + 1];
        seg_valuation(w, (const mpq_t *)val, i0, i1);
        size_t nc = i1 - i0 + 1;
        for (size_t j = 0; j < nc; j++) {
            rn_init(&coef[j]);
            if (has[i0 + j] && on_segment((const mpq_t *)val, i0, i0 + j, w))
                rn_set(&coef[j], &H->a[i0 + j].c[0]);
        }
        rroot *rr = NULL;
        size_t nr = 0;
        ok = residual_roots(coef, nc, &rr, &nr);
        for (size_t j = 0; j < nc; j++)
            rn_clear(&coef[j]);
        for (size_t i = 0; ok && i < nr; i++) {
            X->np = 0;
            ok = prefix_push(X, w, &rr[i].c) && branch(X, H, w, &rr[i].c, rr[i].mult, 1);
        }
        rroots_free(rr, nr);
    }
    mpq_clear(w);
    free(coef);
    for (size_t j = 0; j < n; j++)
        mpq_clear(val[j]);
    free(val);
    free(has);
    free(verts);
    return ok;
}

static bool branch(np_ctx *X, const rupoly *F, const mpq_t v, const rnum *c, size_t m,
                   size_t depth)
{
    /* the depth-th term is in the prefix; stop when nothing more is asked */
    rupoly G = {0, NULL};
    if (!ru_set(&G, F))
        return false;
    bool ok = ru_substitute(&G, v, c);
    if (ok)
        ok = solve(X, &G, m, depth);
    ru_clear(&G);
    return ok;
}

/* ------------------------------------------------------------ coefficients */

static bool ppoly_to_series(rseries *s, const tp_ppoly *p)
{
    rnum c;
    rn_init(&c);
    bool ok = true;
    for (size_t i = 0; ok && i < p->len; i++) {
        rn_set_q(&c, p->coef[i]);
        ok = rs_add_term(s, p->exp[i], &c);
    }
    rn_clear(&c);
    return ok;
}

static bool ppoly_equal(const tp_ppoly *a, const tp_ppoly *b)
{
    if (a->len != b->len)
        return false;
    for (size_t i = 0; i < a->len; i++)
        if (!mpq_equal(a->exp[i], b->exp[i]) || !mpq_equal(a->coef[i], b->coef[i]))
            return false;
    return true;
}

static bool ppoly_is_one(const tp_ppoly *a)
{
    return a->len == 1 && mpq_sgn(a->exp[0]) == 0 && mpq_cmp_ui(a->coef[0], 1, 1) == 0;
}

bool roots_series_poly(rupoly *out, tp_coeff *const *c, size_t n)
{
    /* clear denominators: multiply every coefficient by the product of the distinct
     * denominators (the roots do not change) */
    const tp_ppoly **dens = malloc((n ? n : 1) * sizeof *dens);
    if (!dens)
        return false;
    size_t nd = 0;
    for (size_t i = 0; i < n; i++) {
        if (!c[i] || ppoly_is_one(&c[i]->den))
            continue;
        bool seen = false;
        for (size_t k = 0; k < nd; k++)
            if (ppoly_equal(dens[k], &c[i]->den))
                seen = true;
        if (!seen)
            dens[nd++] = &c[i]->den;
    }
    bool ok = ru_init(out, n);
    rseries a, b, t;
    rs_init(&a);
    rs_init(&b);
    rs_init(&t);
    for (size_t i = 0; ok && i < n; i++) {
        if (!c[i])
            continue;
        rs_zero(&a);
        ok = ppoly_to_series(&a, &c[i]->num);
        for (size_t k = 0; ok && k < nd; k++) {
            if (ppoly_equal(dens[k], &c[i]->den))
                continue;
            rs_zero(&b);
            ok = ppoly_to_series(&b, dens[k]) && rs_mul(&t, &a, &b) && rs_set(&a, &t);
        }
        if (ok)
            ok = rs_set(&out->a[i], &a);
    }
    rs_clear(&a);
    rs_clear(&b);
    rs_clear(&t);
    free(dens);
    return ok;
}

/* ------------------------------------------------------------ segments */

static tp_status build_segments(tp_roots *R, const mpq_t *val, const bool *has, size_t n,
                                size_t lo, tp_coeff *const *c, const tp_field *F,
                                tp_error *err)
{
    size_t *verts = malloc(n * sizeof *verts);
    if (!verts)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    size_t nv = lower_hull(val, has, lo, n - 1, verts);
    R->segs = calloc(nv ? nv : 1, sizeof *R->segs);
    if (!R->segs) {
        free(verts);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    const char *xv = "x";
    tp_status st = TP_OK;
    mpq_t r;
    mpq_init(r);
    for (size_t s = 0; st == TP_OK && s + 1 < nv; s++) {
        tp_root_segment *S = &R->segs[R->nsegs++];
        mpq_init(S->valuation);
        size_t i0 = verts[s], i1 = verts[s + 1];
        seg_valuation(S->valuation, val, i0, i1);
        S->start = i0;
        S->end = i1;
        S->count = i1 - i0;
        S->ramification = mpz_fits_ulong_p(mpq_denref(S->valuation))
                              ? (size_t)mpz_get_ui(mpq_denref(S->valuation)) : 0;
        S->ncoef = S->count + 1;
        S->residual = malloc(S->ncoef * sizeof *S->residual);
        if (!S->residual) {
            S->ncoef = 0;
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
            break;
        }
        for (size_t j = 0; j < S->ncoef; j++) {
            mpq_init(S->residual[j]);
            if (has[i0 + j] && on_segment(val, i0, i0 + j, S->valuation))
                tp_coeff_residue_q(S->residual[j], c[i0 + j], F);
        }
        rbuf fb;
        rb_init(&fb);
        if (F->kind == TP_FIELD_PADIC) {
            mpz_t *zc = malloc(S->ncoef * sizeof *zc);
            mpz_t lc;
            mpz_init(lc);
            fp_factor *fac = NULL;
            size_t nf = 0;
            bool ok = zc != NULL;
            for (size_t j = 0; ok && j < S->ncoef; j++) {
                mpz_init(zc[j]);
                mpz_mod(zc[j], mpq_numref(S->residual[j]), F->p);
            }
            if (ok)
                S->residual_text = fp_to_str((const mpz_t *)zc, S->ncoef, xv);
            if (ok)
                ok = fp_factor_poly((const mpz_t *)zc, S->ncoef, F->p, lc, &fac, &nf);
            if (ok) {
                S->factors = calloc(nf ? nf : 1, sizeof *S->factors);
                ok = S->factors != NULL;
            }
            if (ok) {
                S->resroots = malloc((nf ? nf : 1) * sizeof *S->resroots);
                S->resmult = malloc((nf ? nf : 1) * sizeof *S->resmult);
                ok = S->resroots && S->resmult;
            }
            for (size_t k = 0; ok && k < nf; k++) {
                if (fac[k].f.n != 2)
                    continue;
                mpz_t *z = &S->resroots[S->nresroots];
                mpz_init(*z);
                mpz_neg(*z, fac[k].f.c[0]);
                mpz_mod(*z, *z, F->p);
                S->resmult[S->nresroots++] = fac[k].mult;
            }
            for (size_t a = 1; ok && a < S->nresroots; a++)
                for (size_t b = a; b > 0 && mpz_cmp(S->resroots[b - 1], S->resroots[b]) > 0;
                     b--) {
                    mpz_swap(S->resroots[b - 1], S->resroots[b]);
                    size_t tm = S->resmult[b - 1];
                    S->resmult[b - 1] = S->resmult[b];
                    S->resmult[b] = tm;
                }
            if (ok && mpz_cmp_ui(lc, 1) != 0) {
                rb_z(&fb, lc);
                if (nf)
                    rb_puts(&fb, "*");
            }
            for (size_t k = 0; ok && k < nf; k++) {
                tp_root_factor *Fk = &S->factors[S->nfactors++];
                Fk->text = fp_to_str((const mpz_t *)fac[k].f.c, fac[k].f.n, xv);
                Fk->degree = fac[k].f.n - 1;
                Fk->multiplicity = fac[k].mult;
                Fk->irreducible = true;
                if (!Fk->text)
                    ok = false;
                else {
                    rb_printf(&fb, "%s(%s)", k ? "*" : "", Fk->text);
                    if (fac[k].mult > 1)
                        rb_printf(&fb, "^%zu", fac[k].mult);
                }
            }
            fp_factors_free(fac, nf);
            if (zc)
                for (size_t j = 0; j < S->ncoef; j++)
                    mpz_clear(zc[j]);
            free(zc);
            mpz_clear(lc);
            if (!ok)
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        } else {
            qpoly f;
            bool ok = qp_init(&f, S->ncoef);
            for (size_t j = 0; ok && j < S->ncoef; j++)
                mpq_set(f.c[j], S->residual[j]);
            if (ok)
                S->residual_text = qp_to_str(&f, xv);
            qpoly *parts = NULL;
            size_t np = 0;
            if (ok)
                ok = qp_squarefree(&f, &parts, &np);
            /* factors: rational roots of every square-free part, then its rest */
            size_t cap = S->count + 1;
            if (ok) {
                S->factors = calloc(cap, sizeof *S->factors);
                ok = S->factors != NULL;
            }
            if (ok && mpq_cmp_si(f.c[f.n - 1], -1, 1) == 0)
                rb_puts(&fb, "-");
            else if (ok && mpq_cmp_ui(f.c[f.n - 1], 1, 1) != 0) {
                rb_q(&fb, f.c[f.n - 1]);
                rb_puts(&fb, "*");
            }
            for (size_t k = 0; ok && k < np; k++) {
                if (parts[k].n < 2)
                    continue;
                mpq_t *rq = NULL;
                size_t nq = 0;
                qpoly rest;
                ok = qp_rational_roots(&parts[k], &rq, &nq, &rest);
                if (!ok)
                    break;
                for (size_t i = 0; i < nq + 1 && ok; i++) {
                    qpoly g;
                    if (i < nq) {
                        ok = qp_init(&g, 2);
                        if (!ok)
                            break;
                        mpq_neg(g.c[0], rq[i]);
                        mpq_set_ui(g.c[1], 1, 1);
                    } else {
                        if (rest.n < 2)
                            break;
                        g = rest;
                        rest.c = NULL;
                        rest.n = 0;
                    }
                    tp_root_factor *Fk = &S->factors[S->nfactors++];
                    Fk->text = qp_to_str(&g, xv);
                    Fk->degree = g.n - 1;
                    Fk->multiplicity = k + 1;
                    Fk->irreducible = g.n - 1 <= 3; /* no rational root: degree 2, 3 */
                    if (!Fk->text)
                        ok = false;
                    else {
                        rb_printf(&fb, "%s(%s)",
                                  fb.len && fb.s[fb.len - 1] != '*' && fb.s[fb.len - 1] != '-'
                                      ? "*" : "",
                                  Fk->text);
                        if (k > 0)
                            rb_printf(&fb, "^%zu", k + 1);
                    }
                    qp_clear(&g);
                }
                for (size_t i = 0; i < nq; i++)
                    mpq_clear(rq[i]);
                free(rq);
                qp_clear(&rest);
            }
            for (size_t k = 0; k < np; k++)
                qp_clear(&parts[k]);
            free(parts);
            qp_clear(&f);
            if (!ok)
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        }
        S->factored_text = rb_take(&fb);
        if (st == TP_OK && (!S->factored_text || !S->residual_text))
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    mpq_clear(r);
    free(verts);
    return st;
}

/* ------------------------------------------------------------ p-adic */

/* v_p of a nonzero rational */
static long vp_q(const mpq_t a, const mpz_t p)
{
    mpz_t t;
    mpz_init(t);
    long v = (long)mpz_remove(t, mpq_numref(a), p);
    v -= (long)mpz_remove(t, mpq_denref(a), p);
    mpz_clear(t);
    return v;
}

/* r = a mod M for a rational whose denominator is prime to p */
static void q_mod(mpz_t r, const mpq_t a, const mpz_t M)
{
    mpz_t inv;
    mpz_init(inv);
    mpz_invert(inv, mpq_denref(a), M);
    mpz_mul(r, mpq_numref(a), inv);
    mpz_mod(r, r, M);
    mpz_clear(inv);
}

/* value and derivative of sum gc[i] y^i mod M */
static void zp_eval(mpz_t v, mpz_t dv, const mpz_t *gc, size_t n, const mpz_t y,
                    const mpz_t M)
{
    mpz_set_ui(v, 0);
    mpz_set_ui(dv, 0);
    for (size_t i = n; i-- > 0;) {
        mpz_mul(dv, dv, y);
        mpz_add(dv, dv, v);
        mpz_mod(dv, dv, M);
        mpz_mul(v, v, y);
        mpz_add(v, v, gc[i]);
        mpz_mod(v, v, M);
    }
}

static tp_status padic_group(tp_roots *R, size_t *cap, size_t s, size_t count,
                             const char *note, tp_error *err)
{
    tp_root *r = new_root(R, cap);
    if (!r)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    const tp_root_segment *S = &R->segs[s];
    r->segment = s;
    mpq_set(r->valuation, S->valuation);
    r->count = count;
    r->ramification = S->ramification;
    if (note && !(r->note = rn_strdup(note)))
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    return TP_OK;
}

/* Repeated residual roots over Q_p: the same Newton polygon step again on
 * H(y) = f(A + p^e y) (exact rationals), where A holds the digits found so far. */
typedef struct {
    tp_roots *R;
    size_t *cap;
    size_t seg;
    mpz_srcptr p;
    size_t K;
    long vx;             /* valuation of the roots being refined */
    const mpq_t *f;      /* f's coefficients (0 for missing terms) */
    size_t n;
    tp_error *err;
} pctx;

/* root in Q_p with value x (exact, or exact up to O(p^(vx+K))) */
static tp_status padic_emit(pctx *P, const mpq_t x, size_t mult, bool exact)
{
    tp_root *r = new_root(P->R, P->cap);
    if (!r)
        return tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
    r->segment = P->seg;
    mpq_set_si(r->valuation, P->vx, 1);
    r->in_qp = true;
    r->multiplicity = mult;
    r->multiplicity_proved = true;
    r->terminates = exact;
    mpq_t U;
    mpz_t M, t;
    mpq_init(U);
    mpz_init(M);
    mpz_init(t);
    mpz_pow_ui(M, P->p, (unsigned long)P->K);
    mpz_pow_ui(t, P->p, (unsigned long)labs(P->vx));
    mpq_set(U, x);
    if (P->vx >= 0) {
        mpz_mul(mpq_denref(U), mpq_denref(U), t);
    } else {
        mpz_mul(mpq_numref(U), mpq_numref(U), t);
    }
    mpq_canonicalize(U);
    q_mod(r->approx, U, M);
    r->digits = malloc((P->K ? P->K : 1) * sizeof *r->digits);
    tp_status st = TP_OK;
    if (!r->digits)
        st = tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
    else {
        mpz_set(t, r->approx);
        for (size_t d = 0; d < P->K; d++) {
            mpz_init(r->digits[d]);
            mpz_fdiv_qr(t, r->digits[d], t, P->p);
            r->ndigits++;
        }
    }
    mpq_clear(U);
    mpz_clear(M);
    mpz_clear(t);
    return st;
}

/* H = f(A + p^e y): Taylor shift by A, then coefficient j times p^(e j) */
static void shift_poly(mpq_t *H, const mpq_t *f, size_t n, const mpq_t A, long e, mpz_srcptr p)
{
    mpq_t t, s;
    mpq_init(t);
    mpq_init(s);
    for (size_t i = 0; i < n; i++)
        mpq_set(H[i], f[i]);
    for (size_t i = 0; i + 1 < n; i++)
        for (size_t j = n - 1; j-- > i;) {
            mpq_mul(t, H[j + 1], A);
            mpq_add(H[j], H[j], t);
        }
    mpq_set_ui(s, 1, 1);
    mpz_pow_ui(mpq_numref(t), p, (unsigned long)labs(e));
    mpz_set_ui(mpq_denref(t), 1);
    if (e < 0)
        mpq_inv(t, t);
    for (size_t j = 0; j < n; j++) {
        mpq_mul(H[j], H[j], s);
        mpq_mul(s, s, t);
    }
    mpq_clear(t);
    mpq_clear(s);
}

/* Hensel: the root z = r + O(p) of G(z) = H(p^w z) / p^mu, mu = v(H_i0) + i0 w, mod p^N */
static bool hensel_q(mpz_t u, const mpq_t *H, size_t n, size_t i0, long w, const mpz_t r,
                     size_t N, mpz_srcptr p)
{
    mpz_t M, g, dg, t;
    mpq_t gi, pp;
    mpz_init(M); mpz_init(g); mpz_init(dg); mpz_init(t);
    mpq_init(gi); mpq_init(pp);
    mpz_pow_ui(M, p, (unsigned long)N);
    mpz_t *gc = malloc(n * sizeof *gc);
    bool ok = gc != NULL;
    long mu = vp_q(H[i0], p) + (long)i0 * w;
    for (size_t j = 0; ok && j < n; j++) {
        mpz_init(gc[j]);
        if (mpq_sgn(H[j]) == 0)
            continue;
        long e = (long)j * w - mu;
        mpz_pow_ui(t, p, (unsigned long)labs(e));
        mpq_set_ui(pp, 1, 1);
        if (e >= 0)
            mpz_set(mpq_numref(pp), t);
        else
            mpz_set(mpq_denref(pp), t);
        mpq_mul(gi, H[j], pp);
        if (vp_q(gi, p) < 0)
            ok = false;
        else
            q_mod(gc[j], gi, M);
    }
    bool conv = false;
    mpz_set(u, r);
    for (size_t it = 0; ok && it < N + 4; it++) {
        zp_eval(g, dg, (const mpz_t *)gc, n, u, M);
        if (mpz_sgn(g) == 0) {
            conv = true;
            break;
        }
        if (!mpz_invert(dg, dg, M))
            break;
        mpz_mul(g, g, dg);
        mpz_sub(u, u, g);
        mpz_mod(u, u, M);
    }
    if (gc)
        for (size_t j = 0; j < n; j++)
            mpz_clear(gc[j]);
    free(gc);
    mpz_clear(M); mpz_clear(g); mpz_clear(dg); mpz_clear(t);
    mpq_clear(gi); mpq_clear(pp);
    return ok && conv;
}

/* the k roots x = A + p^e y with v(y) > 0 */
static tp_status padic_find(pctx *P, const mpq_t A, long e, size_t k, int depth)
{
    size_t n = P->n;
    mpq_t *H = malloc(n * sizeof *H);
    mpq_t *val = malloc(n * sizeof *val);
    bool *has = calloc(n, sizeof *has);
    size_t *verts = malloc(n * sizeof *verts);
    if (!H || !val || !has || !verts) {
        free(H); free(val); free(has); free(verts);
        return tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t j = 0; j < n; j++) {
        mpq_init(H[j]);
        mpq_init(val[j]);
    }
    shift_poly(H, P->f, n, A, e, P->p);
    tp_status st = TP_OK;
    size_t k0 = 0;
    while (k0 < n && mpq_sgn(H[k0]) == 0)
        k0++;
    if (k0 > 0) {
        st = padic_emit(P, A, k0, true); /* f(A) = 0: A is an exact root */
        if (st == TP_OK) {
            rbuf b;
            rb_init(&b);
            rb_puts(&b, "an exact root: ");
            rb_q(&b, A);
            tp_root *r = &P->R->roots[P->R->nroots - 1];
            if (!(r->note = rb_take(&b)))
                st = tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
        }
    }
    size_t need = k > k0 ? k - k0 : 0;
    if (st == TP_OK && need > 0 && depth > 60) {
        st = padic_group(P->R, P->cap, P->seg, need,
                         "roots agreeing in more than 60 refinement steps; digits not computed",
                         P->err);
        need = 0;
    }
    size_t got = 0;
    if (st == TP_OK && need > 0) {
        for (size_t j = k0; j < n; j++)
            if (mpq_sgn(H[j]) != 0) {
                has[j] = true;
                mpq_set_si(val[j], vp_q(H[j], P->p), 1);
            }
        size_t nv = lower_hull((const mpq_t *)val, has, k0, n - 1, verts);
        mpq_t w, Anew, pw;
        mpz_t u, lc;
        mpq_init(w); mpq_init(Anew); mpq_init(pw);
        mpz_init(u); mpz_init(lc);
        for (size_t s = 0; st == TP_OK && s + 1 < nv; s++) {
            size_t i0 = verts[s], i1 = verts[s + 1];
            seg_valuation(w, (const mpq_t *)val, i0, i1);
            if (mpq_sgn(w) <= 0)
                break;
            size_t cnt = i1 - i0;
            got += cnt;
            if (mpz_cmp_ui(mpq_denref(w), 1) != 0) {
                st = padic_group(P->R, P->cap, P->seg, cnt,
                                 "these roots differ from each other by a ramified amount: they "
                                 "are not in Q_p; digits not computed", P->err);
                continue;
            }
            long wi = mpz_get_si(mpq_numref(w));
            mpz_t *rc = malloc((cnt + 1) * sizeof *rc);
            fp_factor *fac = NULL;
            size_t nf = 0;
            bool ok = rc != NULL;
            for (size_t j = 0; ok && j <= cnt; j++) {
                mpz_init(rc[j]);
                if (has[i0 + j] && on_segment((const mpq_t *)val, i0, i0 + j, w)) {
                    mpq_t uq;
                    mpq_init(uq);
                    long vj = vp_q(H[i0 + j], P->p);
                    mpz_pow_ui(mpq_numref(pw), P->p, (unsigned long)labs(vj));
                    mpz_set_ui(mpq_denref(pw), 1);
                    if (vj > 0)
                        mpq_inv(pw, pw);
                    mpq_mul(uq, H[i0 + j], pw);
                    q_mod(rc[j], uq, P->p);
                    mpq_clear(uq);
                }
            }
            if (ok)
                ok = fp_factor_poly((const mpz_t *)rc, cnt + 1, P->p, lc, &fac, &nf);
            if (!ok)
                st = tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
            for (size_t q = 0; st == TP_OK && q < nf; q++) {
                size_t d = fac[q].f.n - 1, m = fac[q].mult;
                if (d != 1) {
                    char note[160];
                    snprintf(note, sizeof note,
                             "residual factor of degree %zu after refinement: the roots lie in "
                             "an unramified extension of Q_p; digits not computed", d);
                    st = padic_group(P->R, P->cap, P->seg, d * m, note, P->err);
                    continue;
                }
                mpz_t r0;
                mpz_init(r0);
                mpz_neg(r0, fac[q].f.c[0]);
                mpz_mod(r0, r0, P->p);
                /* Anew = A + p^(e + w) * r0 */
                long ew = e + wi;
                mpz_pow_ui(mpq_numref(pw), P->p, (unsigned long)labs(ew));
                mpz_set_ui(mpq_denref(pw), 1);
                if (ew < 0)
                    mpq_inv(pw, pw);
                if (m == 1) {
                    if (!hensel_q(u, (const mpq_t *)H, n, i0, wi, r0, P->K + 2, P->p))
                        st = tp_error_set(P->err, TP_EINTERNAL, 0, 0,
                                          "Hensel lifting did not converge");
                    else {
                        mpq_set_z(Anew, u);
                        mpq_mul(Anew, Anew, pw);
                        mpq_add(Anew, Anew, A);
                        st = padic_emit(P, Anew, 1, false);
                    }
                } else {
                    mpq_set_z(Anew, r0);
                    mpq_mul(Anew, Anew, pw);
                    mpq_add(Anew, Anew, A);
                    st = padic_find(P, Anew, ew, m, depth + 1);
                }
                mpz_clear(r0);
            }
            fp_factors_free(fac, nf);
            if (rc)
                for (size_t j = 0; j <= cnt; j++)
                    mpz_clear(rc[j]);
            free(rc);
        }
        mpq_clear(w); mpq_clear(Anew); mpq_clear(pw);
        mpz_clear(u); mpz_clear(lc);
        if (st == TP_OK && got != need)
            st = tp_error_set(P->err, TP_EINTERNAL, 0, 0,
                              "p-adic refinement found %zu roots where %zu were expected", got,
                              need);
    }
    for (size_t j = 0; j < n; j++) {
        mpq_clear(H[j]);
        mpq_clear(val[j]);
    }
    free(H);
    free(val);
    free(has);
    free(verts);
    return st;
}

static tp_status padic_roots(tp_roots *R, size_t *cap, tp_coeff *const *c, size_t n,
                             const tp_field *F, size_t K, tp_error *err)
{
    const mpz_t *p = (const mpz_t *)&F->p;
    tp_status st = TP_OK;
    mpz_t M, y, g, dg, t;
    mpq_t gi, pp, mu;
    mpz_init(M); mpz_init(y); mpz_init(g); mpz_init(dg); mpz_init(t);
    mpq_init(gi); mpq_init(pp); mpq_init(mu);
    mpz_t *gc = malloc((n ? n : 1) * sizeof *gc);
    if (!gc)
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    for (size_t i = 0; gc && i < n; i++)
        mpz_init(gc[i]);
    mpz_pow_ui(M, *p, (unsigned long)(K ? K : 1));
    for (size_t s = 0; st == TP_OK && s < R->nsegs; s++) {
        tp_root_segment *S = &R->segs[s];
        if (K == 0) {
            st = padic_group(R, cap, s, S->count, NULL, err);
            continue;
        }
        if (mpz_cmp_ui(mpq_denref(S->valuation), 1) != 0) {
            char note[160];
            snprintf(note, sizeof note,
                     "ramified: the valuation has denominator %zu, so these roots are not "
                     "in Q_p; digits not computed", S->ramification);
            st = padic_group(R, cap, s, S->count, note, err);
            continue;
        }
        if (!mpz_fits_slong_p(mpq_numref(S->valuation))) {
            st = tp_error_set(err, TP_EOVERFLOW, 0, 0, "a root valuation leaves the long range");
            break;
        }
        long v = mpz_get_si(mpq_numref(S->valuation));
        /* g(y) = f(p^v y) / p^mu, mu = val(c_start) + start*v; integral coefficients */
        tp_coeff_val(mu, c[S->start], F);
        mpq_set_si(gi, v, 1);
        mpq_set_ui(pp, (unsigned long)S->start, 1);
        mpq_mul(gi, gi, pp);
        mpq_add(mu, mu, gi);
        long imu = mpz_get_si(mpq_numref(mu));
        for (size_t i = 0; i < n; i++) {
            mpz_set_ui(gc[i], 0);
            if (!c[i])
                continue;
            long e = v * (long)i - imu;
            mpz_pow_ui(t, *p, (unsigned long)labs(e));
            mpq_set_ui(pp, 1, 1);
            if (e >= 0)
                mpz_set(mpq_numref(pp), t);
            else
                mpz_set(mpq_denref(pp), t);
            mpq_mul(gi, c[i]->q, pp);
            if (vp_q(gi, *p) < 0) {
                st = tp_error_set(err, TP_EINTERNAL, 0, 0,
                                  "Hensel set-up: a coefficient below the Newton polygon");
                break;
            }
            q_mod(gc[i], gi, M);
        }
        size_t covered = 0;
        for (size_t k = 0; st == TP_OK && k < S->nresroots; k++) {
            if (S->resmult[k] != 1) {
                /* a repeated residual root: refine x = p^v (r + p^w y) */
                mpq_t *fq = malloc(n * sizeof *fq);
                if (!fq) {
                    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                    break;
                }
                for (size_t i = 0; i < n; i++) {
                    mpq_init(fq[i]);
                    if (c[i])
                        mpq_set(fq[i], c[i]->q);
                }
                pctx P = {R, cap, s, F->p, K, v, (const mpq_t *)fq, n, err};
                mpq_t A;
                mpq_init(A);
                mpz_pow_ui(mpq_numref(A), F->p, (unsigned long)labs(v));
                if (v < 0)
                    mpq_inv(A, A);
                mpz_mul(mpq_numref(A), mpq_numref(A), S->resroots[k]);
                mpq_canonicalize(A);
                if (n <= 2000)
                    st = padic_find(&P, A, v, S->resmult[k], 0);
                else
                    st = padic_group(R, cap, s, S->resmult[k],
                                     "repeated residual root (degree too large to refine); "
                                     "digits not computed", err);
                covered += S->resmult[k];
                mpq_clear(A);
                for (size_t i = 0; i < n; i++)
                    mpq_clear(fq[i]);
                free(fq);
                continue;
            }
            mpz_set(y, S->resroots[k]);
            bool conv = false;
            for (size_t it = 0; it < K + 4; it++) {
                zp_eval(g, dg, (const mpz_t *)gc, n, y, M);
                if (mpz_sgn(g) == 0) {
                    conv = true;
                    break;
                }
                if (!mpz_invert(dg, dg, M))
                    break;
                mpz_mul(g, g, dg);
                mpz_sub(y, y, g);
                mpz_mod(y, y, M);
            }
            if (!conv) {
                st = tp_error_set(err, TP_EINTERNAL, 0, 0, "Hensel lifting did not converge");
                break;
            }
            tp_root *r = new_root(R, cap);
            if (!r) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                break;
            }
            r->segment = s;
            mpq_set(r->valuation, S->valuation);
            r->in_qp = true;
            r->multiplicity_proved = true;
            mpz_set(r->approx, y);
            r->digits = malloc(K * sizeof *r->digits);
            if (!r->digits) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                break;
            }
            mpz_set(t, y);
            for (size_t d = 0; d < K; d++) {
                mpz_init(r->digits[d]);
                mpz_fdiv_qr(t, r->digits[d], t, *p);
                r->ndigits++;
            }
            covered++;
        }
        if (st == TP_OK && covered < S->count) {
            /* what is left are residual factors of degree > 1 */
            char note[200];
            size_t maxdeg = 1;
            for (size_t k = 0; k < S->nfactors; k++)
                if (S->factors[k].degree > maxdeg)
                    maxdeg = S->factors[k].degree;
            snprintf(note, sizeof note,
                     "residual factors of degree up to %zu: the roots lie in unramified "
                     "extensions of Q_p; digits not computed", maxdeg);
            st = padic_group(R, cap, s, S->count - covered, note, err);
        }
    }
    if (gc)
        for (size_t i = 0; i < n; i++)
            mpz_clear(gc[i]);
    free(gc);
    mpz_clear(M); mpz_clear(y); mpz_clear(g); mpz_clear(dg); mpz_clear(t);
    mpq_clear(gi); mpq_clear(pp); mpq_clear(mu);
    return st;
}

/* ------------------------------------------------------------ core */

tp_status roots_core(tp_roots *R, tp_coeff *const *c, size_t n, const tp_field *F,
                     const tp_roots_options *opt, tp_error *err)
{
    size_t K = opt ? opt->terms : 0;
    size_t max_steps = opt && opt->max_steps ? opt->max_steps : 64;
    R->terms = K;
    size_t lo = 0;
    while (lo < n && !c[lo])
        lo++;
    if (lo + 1 >= n + 0 && lo >= n)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "the zero polynomial has no roots");
    R->nzero += lo;
    mpq_t *val = malloc(n * sizeof *val);
    bool *has = calloc(n, sizeof *has);
    if (!val || !has) {
        free(val);
        free(has);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t i = 0; i < n; i++) {
        mpq_init(val[i]);
        if (c[i]) {
            has[i] = true;
            tp_coeff_val(val[i], c[i], F);
        }
    }
    tp_status st = build_segments(R, (const mpq_t *)val, has, n, lo, c, F, err);
    size_t cap = 0;
    if (st == TP_OK && R->nzero > 0) {
        tp_root *r = new_root(R, &cap);
        if (!r)
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        else {
            r->zero = true;
            r->multiplicity = R->nzero;
            r->multiplicity_proved = true;
            r->terminates = true;
        }
    }
    if (st == TP_OK && F->kind == TP_FIELD_PADIC)
        st = padic_roots(R, &cap, c, n, F, K, err);
    if (st == TP_OK && F->kind == TP_FIELD_PUISEUX) {
        rupoly F0 = {0, NULL};
        np_ctx X;
        memset(&X, 0, sizeof X);
        X.R = R;
        X.cap = &cap;
        X.K = K;
        X.max_steps = max_steps;
        X.err = err;
        if (!roots_series_poly(&F0, c, n))
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        for (size_t s = 0; st == TP_OK && s < R->nsegs; s++) {
            tp_root_segment *S = &R->segs[s];
            X.seg = s;
            if (K == 0) {
                tp_root *r = new_root(R, &cap);
                if (!r) {
                    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                    break;
                }
                r->segment = s;
                mpq_set(r->valuation, S->valuation);
                r->count = S->count;
                r->ramification = S->ramification;
                continue;
            }
        }
        if (st == TP_OK && K > 0) {
            /* square-free parts over Q(t^(1/D)) make multiplicities exact; without them
             * (numerical trouble, huge input) the branches separate what they can */
            rupoly *parts = NULL;
            size_t np = 0;
            bool ok;
            rupoly view = {n - lo, F0.a + lo}; /* without the factor x^lo */
            if (n <= 200 && roots_squarefree(&view, &parts, &np)) {
                ok = true;
                for (size_t k = 0; ok && k < np; k++) {
                    X.mult = k + 1;
                    ok = solve_top(&X, &parts[k]);
                }
                for (size_t k = 0; k < np; k++)
                    ru_clear(&parts[k]);
                free(parts);
            } else {
                X.mult = 1;
                ok = solve_top(&X, &F0);
            }
            if (!ok)
                st = X.st != TP_OK ? X.st : tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        }
        for (size_t i = 0; i < X.npcap; i++) {
            mpq_clear(X.pe[i]);
            rn_clear(&X.pc[i]);
        }
        free(X.pe);
        free(X.pc);
        ru_clear(&F0);
    }
    for (size_t i = 0; i < n; i++)
        mpq_clear(val[i]);
    free(val);
    free(has);
    if (st != TP_OK)
        return st;
    /* roots by segment (the root 0 first), keeping the order within a segment */
    for (size_t i = 1; i < R->nroots; i++)
        for (size_t j = i; j > 0; j--) {
            tp_root *a = &R->roots[j - 1], *b = &R->roots[j];
            size_t ka = a->zero ? 0 : a->segment + 1, kb = b->zero ? 0 : b->segment + 1;
            if (ka <= kb)
                break;
            tp_root t;
            memcpy(&t, a, sizeof t);
            memcpy(a, b, sizeof t);
            memcpy(b, &t, sizeof t);
        }
    /* self-checks: counts add up to the degree */
    size_t sum = R->nzero, rsum = 0;
    for (size_t s = 0; s < R->nsegs; s++)
        sum += R->segs[s].count;
    for (size_t i = 0; i < R->nroots; i++)
        rsum += R->roots[i].count * R->roots[i].multiplicity;
    if (sum != R->degree || rsum != R->degree)
        return tp_error_set(err, TP_EINTERNAL, 0, 0,
                            "root counts do not add up: degree %zu, segments %zu, roots %zu",
                            R->degree, sum, rsum);
    return TP_OK;
}

tp_status tp_roots_compute(tp_roots *R, const tp_poly *f, const tp_field *F,
                           char *const *vars, const tp_roots_options *opt, tp_error *err)
{
    if (F->kind != TP_FIELD_PUISEUX && F->kind != TP_FIELD_PADIC)
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "roots needs a valued field: --over t (Puiseux series) or "
                            "--over p=PRIME");
    /* the one variable that occurs */
    size_t used = (size_t)-1;
    for (size_t k = 0; k < f->nterms; k++)
        for (size_t v = 0; v < f->nvars; v++)
            if (f->exps[k * f->nvars + v] != 0) {
                if (used != (size_t)-1 && used != v)
                    return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                                        "expected a polynomial in one variable; this one "
                                        "has several (use `trope lift` or `tropicalize`)");
                used = v;
            }
    if (used == (size_t)-1)
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "expected a polynomial in one variable; this is a constant, "
                            "which has no roots");
    int64_t lo = INT64_MAX, hi = INT64_MIN;
    for (size_t k = 0; k < f->nterms; k++) {
        int64_t e = f->exps[k * f->nvars + used];
        if (e < lo)
            lo = e;
        if (e > hi)
            hi = e;
    }
    if ((lo < 0 && hi > INT64_MAX + lo) || hi - lo > MAX_DEGREE)
        return tp_error_set(err, TP_EOVERFLOW, f->line, f->col,
                            "the polynomial's degree span is above %d", MAX_DEGREE);
    tp_roots_clear(R);
    tp_roots_init(R);
    tp_field_set(&R->field, F);
    snprintf(R->var, sizeof R->var, "%s", vars && vars[used] ? vars[used] : "x");
    R->low = lo;
    size_t n = (size_t)(hi - lo) + 1;
    /* a polynomial (lo >= 0) has the root 0 lo times; a Laurent one counts torus roots */
    size_t shift = lo > 0 ? (size_t)lo : 0;
    R->nzero = shift;
    R->degree = shift + n - 1;
    tp_coeff **c = calloc(n, sizeof *c);
    if (!c)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    for (size_t k = 0; k < f->nterms; k++)
        c[f->exps[k * f->nvars + used] - lo] = &f->coeffs[k];
    char *names[1] = {R->var};
    tp_poly g;
    tp_poly_init(&g, 1);
    g.nterms = f->nterms;
    g.exps = malloc((f->nterms ? f->nterms : 1) * sizeof *g.exps);
    if (g.exps) {
        for (size_t k = 0; k < f->nterms; k++)
            g.exps[k] = f->exps[k * f->nvars + used];
        g.coeffs = f->coeffs;
        R->poly_text = tp_poly_to_str(&g, F, names);
        free(g.exps);
    }
    if (!R->poly_text) {
        free(c);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    tp_status st = roots_core(R, c, n, F, opt, err);
    free(c);
    if (st != TP_OK && err && err->line == 0) {
        err->line = f->line;
        err->col = f->col;
    }
    return st;
}

/* ------------------------------------------------------------ writers */

static void put_q(FILE *o, const mpq_t q) { mpq_out_str(o, 10, q); }

static void put_exp(FILE *o, const char *param, const mpq_t e)
{
    if (mpq_sgn(e) == 0)
        return;
    if (mpq_cmp_ui(e, 1, 1) == 0) {
        fputs(param, o);
        return;
    }
    fprintf(o, "%s^", param);
    bool paren = mpz_cmp_ui(mpq_denref(e), 1) != 0 || mpq_sgn(e) < 0;
    if (paren)
        fputc('(', o);
    put_q(o, e);
    if (paren)
        fputc(')', o);
}

static void fmt_d(char *buf, size_t n, double x)
{
    if (x == 0)
        x = 0; /* no "-0" */
    snprintf(buf, n, "%.17g", x);
}

char *tp_root_term_str(const tp_root_term *T, const char *param)
{
    char *s = NULL;
    size_t len = 0;
    FILE *o = open_memstream(&s, &len);
    if (!o)
        return NULL;
    bool unit = mpq_sgn(T->exponent) == 0;
    if (T->exact) {
        bool one = mpq_cmp_ui(T->q, 1, 1) == 0, mone = mpq_cmp_si(T->q, -1, 1) == 0;
        if (unit || !(one || mone)) {
            put_q(o, T->q);
            if (!unit)
                fputc('*', o);
        } else if (mone)
            fputc('-', o);
    } else {
        char a[40], b[40];
        fmt_d(a, sizeof a, T->re);
        fmt_d(b, sizeof b, fabs(T->im));
        if (T->im == 0)
            fputs(a, o);
        else if (T->re == 0)
            fprintf(o, "%s%si", T->im < 0 ? "-" : "", b);
        else
            fprintf(o, "(%s%s%si)", a, T->im < 0 ? "-" : "+", b);
        if (!unit)
            fputc('*', o);
    }
    put_exp(o, param, T->exponent);
    if (fclose(o) != 0) {
        free(s);
        return NULL;
    }
    return s;
}

static void put_str(FILE *o, const char *s) { tp_json_put_string(o, s); }

static void put_qstr(FILE *o, const mpq_t q)
{
    fputc('"', o);
    put_q(o, q);
    fputc('"', o);
}

static void put_over(FILE *o, const tp_field *F)
{
    if (F->kind == TP_FIELD_PADIC) {
        fputs("{\"kind\": \"p-adic\", \"p\": ", o);
        mpz_out_str(o, 10, F->p);
        fputs("}", o);
    } else {
        fputs("{\"kind\": \"puiseux\", \"parameter\": ", o);
        put_str(o, F->param);
        fputs("}", o);
    }
}

static const char *param_of(const tp_roots *R)
{
    return R->field.kind == TP_FIELD_PUISEUX ? R->field.param : "p";
}

tp_status tp_roots_write_json(FILE *o, const tp_roots *R, tp_error *err)
{
    char a[40], b[40];
    fputs("{\"format\": \"trope.roots/1\",\n \"over\": ", o);
    put_over(o, &R->field);
    fputs(",\n \"variable\": ", o);
    put_str(o, R->var);
    fputs(",\n \"polynomial\": ", o);
    put_str(o, R->poly_text);
    fprintf(o, ",\n \"degree\": %zu,\n \"zero_roots\": %zu,\n \"terms\": %zu,\n \"segments\": [",
            R->degree, R->nzero, R->terms);
    for (size_t s = 0; s < R->nsegs; s++) {
        const tp_root_segment *S = &R->segs[s];
        fputs(s ? ",\n  " : "\n  ", o);
        fputs("{\"valuation\": ", o);
        put_qstr(o, S->valuation);
        fprintf(o, ", \"count\": %zu, \"start\": %zu, \"end\": %zu, \"ramification\": %zu, "
                "\"residual\": ", S->count, S->start + (size_t)(R->low > 0 ? R->low : 0),
                S->end + (size_t)(R->low > 0 ? R->low : 0), S->ramification);
        put_str(o, S->residual_text);
        fputs(", \"residual_coefficients\": [", o);
        for (size_t j = 0; j < S->ncoef; j++) {
            if (j)
                fputs(", ", o);
            put_qstr(o, S->residual[j]);
        }
        fputs("], \"factored\": ", o);
        put_str(o, S->factored_text);
        fputs(", \"factors\": [", o);
        for (size_t k = 0; k < S->nfactors; k++) {
            const tp_root_factor *Fk = &S->factors[k];
            fputs(k ? ", " : "", o);
            fputs("{\"factor\": ", o);
            put_str(o, Fk->text);
            fprintf(o, ", \"degree\": %zu, \"multiplicity\": %zu, \"irreducible\": %s}",
                    Fk->degree, Fk->multiplicity, Fk->irreducible ? "true" : "false");
        }
        fputs("]", o);
        if (R->field.kind == TP_FIELD_PADIC) {
            fputs(", \"residual_roots\": [", o);
            for (size_t k = 0; k < S->nresroots; k++) {
                fputs(k ? ", " : "", o);
                fputs("{\"root\": ", o);
                mpz_out_str(o, 10, S->resroots[k]);
                fprintf(o, ", \"multiplicity\": %zu}", S->resmult[k]);
            }
            fputs("]", o);
        }
        fputs("}", o);
    }
    fputs("],\n \"roots\": [", o);
    for (size_t i = 0; i < R->nroots; i++) {
        const tp_root *r = &R->roots[i];
        fputs(i ? ",\n  " : "\n  ", o);
        if (r->zero) {
            fprintf(o, "{\"zero\": true, \"valuation\": \"inf\", \"multiplicity\": %zu, "
                    "\"multiplicity_proved\": true, \"count\": 1, \"terms\": []}",
                    r->multiplicity);
            continue;
        }
        fputs("{\"valuation\": ", o);
        put_qstr(o, r->valuation);
        fprintf(o, ", \"segment\": %zu, \"multiplicity\": %zu, \"multiplicity_proved\": %s, "
                "\"count\": %zu, \"ramification\": %zu",
                r->segment, r->multiplicity, r->multiplicity_proved ? "true" : "false",
                r->count, r->ramification);
        if (R->field.kind == TP_FIELD_PUISEUX) {
            fputs(", \"terms\": [", o);
            for (size_t k = 0; k < r->nterms; k++) {
                const tp_root_term *T = &r->terms[k];
                fputs(k ? ", " : "", o);
                fputs("{\"exponent\": ", o);
                put_qstr(o, T->exponent);
                fputs(", \"coefficient\": ", o);
                if (T->exact)
                    put_qstr(o, T->q);
                else {
                    fmt_d(a, sizeof a, T->re);
                    fmt_d(b, sizeof b, T->im);
                    fprintf(o, "[%s, %s]", a, b);
                    if (r->series && k < r->series->len) {
                        /* the same number to 100 significant digits */
                        mpc_t z;
                        mpc_init2(z, RN_PREC);
                        rn_get_mpc(z, &r->series->c[k]);
                        mpfr_fprintf(o, ", \"coefficient_digits\": [\"%.100Rg\", \"%.100Rg\"]",
                                     mpc_realref(z), mpc_imagref(z));
                        mpc_clear(z);
                    }
                }
                fputs("}", o);
            }
            fprintf(o, "], \"terminates\": %s, \"unresolved\": %s",
                    r->terminates ? "true" : "false", r->unresolved ? "true" : "false");
            if (r->has_next) {
                fputs(", \"next_exponent\": ", o);
                put_qstr(o, r->next_exponent);
            }
        } else {
            fprintf(o, ", \"in_Qp\": %s", r->in_qp ? "true" : "false");
            if (r->in_qp) {
                fputs(", \"digits\": [", o);
                for (size_t k = 0; k < r->ndigits; k++) {
                    fputs(k ? ", " : "", o);
                    mpz_out_str(o, 10, r->digits[k]);
                }
                fputs("], \"approximation\": ", o);
                fputc('"', o);
                mpz_out_str(o, 10, r->approx);
                fputc('"', o);
            }
            if (r->note) {
                fputs(", \"note\": ", o);
                put_str(o, r->note);
            }
        }
        fputs("}", o);
    }
    fputs("]}\n", o);
    if (ferror(o))
        return tp_error_set(err, TP_EIO, 0, 0, "write error");
    return TP_OK;
}

tp_status tp_roots_write_text(FILE *o, const tp_roots *R, tp_error *err)
{
    char desc[128];
    tp_field_describe(&R->field, desc, sizeof desc);
    const char *par = param_of(R);
    fprintf(o, "roots of %s\nover %s\n", R->poly_text, desc);
    fprintf(o, "degree %zu: %zu roots counted with multiplicity", R->degree, R->degree);
    if (R->low < 0)
        fprintf(o, " (Laurent polynomial: roots in the torus)");
    fputs("\n\n", o);
    fprintf(o, "Newton polygon (lower hull of the points (i, val c_i)), %zu segment%s\n",
            R->nsegs, R->nsegs == 1 ? "" : "s");
    size_t off = R->low > 0 ? (size_t)R->low : 0;
    for (size_t s = 0; s < R->nsegs; s++) {
        const tp_root_segment *S = &R->segs[s];
        fprintf(o, "  [%zu] %s^%zu .. %s^%zu: %zu root%s of valuation ", s, R->var,
                S->start + off, R->var, S->end + off, S->count, S->count == 1 ? "" : "s");
        put_q(o, S->valuation);
        if (S->ramification > 1)
            fprintf(o, " (ramification %zu)", S->ramification);
        if (R->field.kind == TP_FIELD_PADIC) {
            fputs("\n      residual over F_", o);
            mpz_out_str(o, 10, R->field.p);
        } else
            fputs("\n      residual over Q", o);
        fprintf(o, ": %s", S->residual_text);
        size_t rl = strlen(S->residual_text), fl = strlen(S->factored_text);
        bool same = fl == rl + 2 && S->factored_text[0] == '(' &&
                    strncmp(S->factored_text + 1, S->residual_text, rl) == 0;
        if (!same && strcmp(S->factored_text, S->residual_text) != 0 && fl > 0)
            fprintf(o, " = %s", S->factored_text);
        fputc('\n', o);
        if (R->field.kind == TP_FIELD_PADIC && S->nresroots) {
            fputs("      roots mod ", o);
            mpz_out_str(o, 10, R->field.p);
            fputc(':', o);
            for (size_t k = 0; k < S->nresroots; k++) {
                fputc(' ', o);
                mpz_out_str(o, 10, S->resroots[k]);
                if (S->resmult[k] > 1)
                    fprintf(o, " (x%zu)", S->resmult[k]);
            }
            fputc('\n', o);
        }
    }
    if (R->nzero)
        fprintf(o, "  and the root 0 with multiplicity %zu\n", R->nzero);
    fputc('\n', o);
    if (R->terms == 0) {
        if (ferror(o))
            return tp_error_set(err, TP_EIO, 0, 0, "write error");
        return TP_OK;
    }
    if (R->field.kind == TP_FIELD_PUISEUX)
        fprintf(o, "roots as Puiseux series in %s (first %zu term%s)\n", par, R->terms,
                R->terms == 1 ? "" : "s");
    else
    {
        fputs("roots (the first ", o);
        fprintf(o, "%zu p-adic digit%s of those in Q_", R->terms, R->terms == 1 ? "" : "s");
        mpz_out_str(o, 10, R->field.p);
        fputs(")\n", o);
    }
    for (size_t i = 0; i < R->nroots; i++) {
        const tp_root *r = &R->roots[i];
        fprintf(o, "  %2zu. ", i + 1);
        if (r->zero) {
            fprintf(o, "%s = 0, multiplicity %zu\n", R->var, r->multiplicity);
            continue;
        }
        fputs("val ", o);
        put_q(o, r->valuation);
        if (r->count > 1)
            fprintf(o, ", %zu roots", r->count);
        if (r->multiplicity > 1)
            fprintf(o, ", multiplicity %zu", r->multiplicity);
        fputs(": ", o);
        if (R->field.kind == TP_FIELD_PUISEUX) {
            if (r->nterms == 0)
                fputs("(terms not requested)", o);
            for (size_t k = 0; k < r->nterms; k++) {
                char *ts = tp_root_term_str(&r->terms[k], par);
                if (!ts)
                    return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                if (k && ts[0] == '-')
                    fprintf(o, " - %s", ts + 1);
                else
                    fprintf(o, "%s%s", k ? " + " : "", ts);
                free(ts);
            }
            if (r->terminates)
                fputs("   (exact)", o);
            else if (r->has_next) {
                fputs(" + O(", o);
                mpq_t one;
                mpq_init(one);
                mpq_set_ui(one, 1, 1);
                if (mpq_equal(r->next_exponent, one))
                    fputs(par, o);
                else
                    put_exp(o, par, r->next_exponent);
                mpq_clear(one);
                fputs(")", o);
            }
            if (r->unresolved)
                fprintf(o, "   (%zu roots agree in every computed term)", r->count);
        } else {
            if (r->in_qp) {
                /* x = p^v * approx + O(p^(v+K)), digits lowest first */
                mpq_t x, pv;
                mpq_init(x);
                mpq_init(pv);
                long v = mpz_get_si(mpq_numref(r->valuation));
                mpz_pow_ui(mpq_numref(pv), R->field.p, (unsigned long)labs(v));
                if (v < 0)
                    mpq_inv(pv, pv);
                mpq_set_z(x, r->approx);
                mpq_mul(x, x, pv);
                fprintf(o, "%s = ", R->var);
                put_q(o, x);
                fputs(" + O(", o);
                mpz_out_str(o, 10, R->field.p);
                fprintf(o, "^%ld), digits", v + (long)r->ndigits);
                for (size_t k = 0; k < r->ndigits; k++) {
                    fputc(' ', o);
                    mpz_out_str(o, 10, r->digits[k]);
                }
                fputs(" (lowest first, from ", o);
                mpz_out_str(o, 10, R->field.p);
                fprintf(o, "^%ld)", v);
                if (r->note)
                    fprintf(o, "; %s", r->note);
                mpq_clear(x);
                mpq_clear(pv);
            } else if (r->note)
                fputs(r->note, o);
            else
                fputs("(digits not requested)", o);
        }
        fputc('\n', o);
    }
    if (ferror(o))
        return tp_error_set(err, TP_EIO, 0, 0, "write error");
    return TP_OK;
}
