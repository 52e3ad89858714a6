/* roots_num.c — numbers, Puiseux-polynomial series, polynomials over them, rational
 * polynomial helpers and a complex root finder for the roots/lift modules. */
#include "roots_internal.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------- rnum */

void rn_init(rnum *a)
{
    a->exact = true;
    mpq_init(a->q);
    mpc_init2(a->z, RN_PREC);
}

void rn_clear(rnum *a)
{
    mpq_clear(a->q);
    mpc_clear(a->z);
}

void rn_set(rnum *r, const rnum *a)
{
    if (r == a)
        return;
    r->exact = a->exact;
    if (a->exact)
        mpq_set(r->q, a->q);
    else
        mpc_set(r->z, a->z, MPC_RNDNN);
}

void rn_set_q(rnum *r, const mpq_t q)
{
    r->exact = true;
    mpq_set(r->q, q);
}

void rn_set_si(rnum *r, long v)
{
    r->exact = true;
    mpq_set_si(r->q, v, 1);
}

void rn_set_mpc(rnum *r, const mpc_t z)
{
    r->exact = false;
    mpc_set(r->z, z, MPC_RNDNN);
}

void rn_get_mpc(mpc_t z, const rnum *a)
{
    if (a->exact)
        mpc_set_q(z, a->q, MPC_RNDNN);
    else
        mpc_set(z, a->z, MPC_RNDNN);
}

static void rn_binop(rnum *r, const rnum *a, const rnum *b, int op)
{
    if (a->exact && b->exact) {
        switch (op) {
        case 0: mpq_add(r->q, a->q, b->q); break;
        case 1: mpq_sub(r->q, a->q, b->q); break;
        case 2: mpq_mul(r->q, a->q, b->q); break;
        default: mpq_div(r->q, a->q, b->q); break;
        }
        r->exact = true;
        return;
    }
    /* numeric operands are used in place (MPC allows aliasing); exact ones are
     * converted into a temporary */
    mpc_t x, y;
    bool tx = a->exact, ty = b->exact;
    if (tx) {
        mpc_init2(x, RN_PREC);
        mpc_set_q(x, a->q, MPC_RNDNN);
    }
    if (ty) {
        mpc_init2(y, RN_PREC);
        mpc_set_q(y, b->q, MPC_RNDNN);
    }
    mpc_srcptr xa = tx ? x : a->z, yb = ty ? y : b->z;
    if (op == 2 && tx && mpq_sgn(a->q) != 0 && mpz_cmp_ui(mpq_denref(a->q), 1) == 0 &&
        mpz_fits_slong_p(mpq_numref(a->q))) {
        /* small integer times a complex number: cheaper and exact */
        mpc_mul_si(r->z, yb, mpz_get_si(mpq_numref(a->q)), MPC_RNDNN);
    } else {
        switch (op) {
        case 0: mpc_add(r->z, xa, yb, MPC_RNDNN); break;
        case 1: mpc_sub(r->z, xa, yb, MPC_RNDNN); break;
        case 2: mpc_mul(r->z, xa, yb, MPC_RNDNN); break;
        default: mpc_div(r->z, xa, yb, MPC_RNDNN); break;
        }
    }
    r->exact = false;
    if (tx)
        mpc_clear(x);
    if (ty)
        mpc_clear(y);
}

void rn_add(rnum *r, const rnum *a, const rnum *b) { rn_binop(r, a, b, 0); }
void rn_sub(rnum *r, const rnum *a, const rnum *b) { rn_binop(r, a, b, 1); }
void rn_mul(rnum *r, const rnum *a, const rnum *b) { rn_binop(r, a, b, 2); }
void rn_div(rnum *r, const rnum *a, const rnum *b) { rn_binop(r, a, b, 3); }

void rn_neg(rnum *r, const rnum *a)
{
    r->exact = a->exact;
    if (a->exact)
        mpq_neg(r->q, a->q);
    else
        mpc_neg(r->z, a->z, MPC_RNDNN);
}

bool rn_is_zero(const rnum *a)
{
    if (a->exact)
        return mpq_sgn(a->q) == 0;
    return mpfr_zero_p(mpc_realref(a->z)) && mpfr_zero_p(mpc_imagref(a->z));
}

double rn_log2abs(const rnum *a)
{
    mpfr_t m;
    mpfr_init2(m, 64);
    if (a->exact)
        mpfr_set_q(m, a->q, MPFR_RNDN);
    else
        mpc_abs(m, a->z, MPFR_RNDN);
    long ex;
    double d = mpfr_get_d_2exp(&ex, m, MPFR_RNDN);
    mpfr_clear(m);
    if (d == 0)
        return -1e300;
    return log2(fabs(d)) + (double)ex;
}

void rn_get_d(const rnum *a, double *re, double *im)
{
    if (a->exact) {
        *re = mpq_get_d(a->q);
        *im = 0;
    } else {
        *re = mpfr_get_d(mpc_realref(a->z), MPFR_RNDN);
        *im = mpfr_get_d(mpc_imagref(a->z), MPFR_RNDN);
    }
}

/* ---------------------------------------------------------------- series */

void rs_init(rseries *s)
{
    s->len = s->cap = 0;
    s->e = NULL;
    s->c = NULL;
}

void rs_clear(rseries *s)
{
    for (size_t i = 0; i < s->cap; i++) {
        mpq_clear(s->e[i]);
        rn_clear(&s->c[i]);
    }
    free(s->e);
    free(s->c);
    rs_init(s);
}

static bool rs_reserve(rseries *s, size_t need)
{
    if (need <= s->cap)
        return true;
    size_t nc = s->cap ? s->cap * 2 : 4;
    while (nc < need)
        nc *= 2;
    mpq_t *e = realloc(s->e, nc * sizeof *e);
    if (!e)
        return false;
    s->e = e;
    rnum *c = realloc(s->c, nc * sizeof *c);
    if (!c)
        return false;
    s->c = c;
    for (size_t i = s->cap; i < nc; i++) {
        mpq_init(s->e[i]);
        rn_init(&s->c[i]);
    }
    s->cap = nc;
    return true;
}

void rs_zero(rseries *s) { s->len = 0; }

bool rs_set(rseries *r, const rseries *a)
{
    if (r == a)
        return true;
    if (!rs_reserve(r, a->len))
        return false;
    for (size_t i = 0; i < a->len; i++) {
        mpq_set(r->e[i], a->e[i]);
        rn_set(&r->c[i], &a->c[i]);
    }
    r->len = a->len;
    return true;
}

/* binary search: index of the first exponent >= e */
static size_t rs_find(const rseries *s, const mpq_t e)
{
    size_t lo = 0, hi = s->len;
    while (lo < hi) {
        size_t mid = (lo + hi) / 2;
        if (mpq_cmp(s->e[mid], e) < 0)
            lo = mid + 1;
        else
            hi = mid;
    }
    return lo;
}

static void rs_remove(rseries *s, size_t k)
{
    /* rotate the removed slot to the end so its storage is reused */
    mpq_t te;
    rnum tc;
    memcpy(&te, &s->e[k], sizeof te);
    memcpy(&tc, &s->c[k], sizeof tc);
    memmove(&s->e[k], &s->e[k + 1], (s->len - k - 1) * sizeof *s->e);
    memmove(&s->c[k], &s->c[k + 1], (s->len - k - 1) * sizeof *s->c);
    memcpy(&s->e[s->len - 1], &te, sizeof te);
    memcpy(&s->c[s->len - 1], &tc, sizeof tc);
    s->len--;
}

bool rs_add_term(rseries *s, const mpq_t e, const rnum *c)
{
    if (rn_is_zero(c))
        return true;
    size_t k = rs_find(s, e);
    if (k < s->len && mpq_equal(s->e[k], e)) {
        rn_add(&s->c[k], &s->c[k], c);
        if (rn_is_zero(&s->c[k]))
            rs_remove(s, k);
        return true;
    }
    if (!rs_reserve(s, s->len + 1))
        return false;
    /* rotate the spare slot at len into position k */
    mpq_t te;
    rnum tc;
    memcpy(&te, &s->e[s->len], sizeof te);
    memcpy(&tc, &s->c[s->len], sizeof tc);
    memmove(&s->e[k + 1], &s->e[k], (s->len - k) * sizeof *s->e);
    memmove(&s->c[k + 1], &s->c[k], (s->len - k) * sizeof *s->c);
    memcpy(&s->e[k], &te, sizeof te);
    memcpy(&s->c[k], &tc, sizeof tc);
    mpq_set(s->e[k], e);
    rn_set(&s->c[k], c);
    s->len++;
    return true;
}

static void rs_swap_slots(rseries *s, size_t x, size_t y)
{
    if (x == y)
        return;
    mpq_t te;
    rnum tc;
    memcpy(&te, &s->e[x], sizeof te);
    memcpy(&tc, &s->c[x], sizeof tc);
    memcpy(&s->e[x], &s->e[y], sizeof te);
    memcpy(&s->c[x], &s->c[y], sizeof tc);
    memcpy(&s->e[y], &te, sizeof te);
    memcpy(&s->c[y], &tc, sizeof tc);
}

/* one merge pass from the back: live terms of r stay in [0, i), new ones are written at
 * the top, then the two blocks are joined and zero sums removed */
bool rs_addmul(rseries *r, const rseries *a, const rnum *k, const mpq_t sh)
{
    size_t n = r->len, m = a->len;
    if (m == 0 || rn_is_zero(k))
        return true;
    if (!rs_reserve(r, n + m))
        return false;
    rnum t;
    mpq_t e;
    rn_init(&t);
    mpq_init(e);
    size_t i = n, j = m, w = n + m;
    while (j > 0) {
        mpq_add(e, a->e[j - 1], sh);
        int cmp = i > 0 ? mpq_cmp(r->e[i - 1], e) : -1;
        if (cmp > 0) {
            rs_swap_slots(r, i - 1, w - 1);
            i--;
        } else if (cmp == 0) {
            rn_mul(&t, &a->c[j - 1], k);
            rn_add(&r->c[i - 1], &r->c[i - 1], &t);
            rs_swap_slots(r, i - 1, w - 1);
            i--;
            j--;
        } else {
            mpq_set(r->e[w - 1], e);
            rn_mul(&r->c[w - 1], &a->c[j - 1], k);
            j--;
        }
        w--;
    }
    /* join [0, i) and [w, n + m), dropping zero coefficients */
    size_t out = i;
    for (size_t q = w; q < n + m; q++) {
        if (rn_is_zero(&r->c[q]))
            continue;
        rs_swap_slots(r, out, q);
        out++;
    }
    r->len = out;
    rn_clear(&t);
    mpq_clear(e);
    return true;
}

bool rs_mul(rseries *r, const rseries *a, const rseries *b)
{
    rs_zero(r);
    bool ok = true;
    for (size_t i = 0; i < a->len && ok; i++)
        ok = rs_addmul(r, b, &a->c[i], a->e[i]);
    return ok;
}

void rs_shift(rseries *s, const mpq_t sh)
{
    for (size_t i = 0; i < s->len; i++)
        mpq_add(s->e[i], s->e[i], sh);
}

bool rs_is_zero(const rseries *s) { return s->len == 0; }

const mpq_t *rs_val(const rseries *s) { return (const mpq_t *)&s->e[0]; }

bool rs_all_exact(const rseries *s)
{
    for (size_t i = 0; i < s->len; i++)
        if (!s->c[i].exact)
            return false;
    return true;
}

/* ---------------------------------------------------------------- upoly */

bool ru_init(rupoly *f, size_t n)
{
    f->n = n;
    f->a = calloc(n ? n : 1, sizeof *f->a);
    if (!f->a)
        return false;
    for (size_t i = 0; i < n; i++)
        rs_init(&f->a[i]);
    return true;
}

void ru_clear(rupoly *f)
{
    if (f->a)
        for (size_t i = 0; i < f->n; i++)
            rs_clear(&f->a[i]);
    free(f->a);
    f->a = NULL;
    f->n = 0;
}

bool ru_set(rupoly *r, const rupoly *a)
{
    ru_clear(r);
    if (!ru_init(r, a->n))
        return false;
    for (size_t i = 0; i < a->n; i++)
        if (!rs_set(&r->a[i], &a->a[i]))
            return false;
    return true;
}

void ru_clean(rupoly *f)
{
    double top = -1e300;
    for (size_t i = 0; i < f->n; i++)
        for (size_t k = 0; k < f->a[i].len; k++)
            if (!f->a[i].c[k].exact) {
                double l = rn_log2abs(&f->a[i].c[k]);
                if (l > top)
                    top = l;
            }
    if (top <= -1e299)
        return;
    for (size_t i = 0; i < f->n; i++) {
        rseries *s = &f->a[i];
        for (size_t k = 0; k < s->len;) {
            if (!s->c[k].exact && rn_log2abs(&s->c[k]) < top - RN_ZERO_BITS)
                rs_remove(s, k);
            else
                k++;
        }
    }
}

bool ru_substitute(rupoly *f, const mpq_t v, const rnum *c)
{
    mpq_t sh;
    mpq_init(sh);
    /* a_i <- a_i t^{i v} */
    for (size_t i = 0; i < f->n; i++) {
        mpq_set_ui(sh, (unsigned long)i, 1);
        mpq_mul(sh, sh, v);
        rs_shift(&f->a[i], sh);
    }
    /* Taylor shift x -> c + x: repeated synthetic division */
    mpq_set_ui(sh, 0, 1);
    bool ok = true;
    size_t n = f->n;
    for (size_t i = 0; i + 1 < n && ok; i++)
        for (size_t j = n - 2; ok; j--) {
            ok = rs_addmul(&f->a[j], &f->a[j + 1], c, sh);
            if (j == i)
                break;
        }
    if (ok) {
        ru_clean(f);
        bool have = false;
        for (size_t i = 0; i < n; i++)
            if (!rs_is_zero(&f->a[i])) {
                const mpq_t *m = rs_val(&f->a[i]);
                if (!have || mpq_cmp(*m, sh) < 0)
                    mpq_set(sh, *m);
                have = true;
            }
        if (have) {
            mpq_neg(sh, sh);
            for (size_t i = 0; i < n; i++)
                rs_shift(&f->a[i], sh);
        }
    }
    mpq_clear(sh);
    return ok;
}

bool ru_eval_series(rseries *out, const rupoly *f, const rseries *x0)
{
    rseries acc, tmp;
    rs_init(&acc);
    rs_init(&tmp);
    rnum one;
    rn_init(&one);
    rn_set_si(&one, 1);
    mpq_t zero;
    mpq_init(zero);
    bool ok = true;
    for (size_t i = f->n; i-- > 0 && ok;) {
        ok = rs_mul(&tmp, &acc, x0) && rs_addmul(&tmp, &f->a[i], &one, zero) &&
             rs_set(&acc, &tmp);
    }
    if (ok)
        ok = rs_set(out, &acc);
    rs_clear(&acc);
    rs_clear(&tmp);
    rn_clear(&one);
    mpq_clear(zero);
    return ok;
}

/* ---------------------------------------------------------------- qpoly */

bool qp_init(qpoly *f, size_t n)
{
    f->n = n;
    f->c = malloc((n ? n : 1) * sizeof *f->c);
    if (!f->c)
        return false;
    for (size_t i = 0; i < n; i++)
        mpq_init(f->c[i]);
    return true;
}

void qp_clear(qpoly *f)
{
    if (f->c)
        for (size_t i = 0; i < f->n; i++)
            mpq_clear(f->c[i]);
    free(f->c);
    f->c = NULL;
    f->n = 0;
}

static void qp_trim(qpoly *f)
{
    while (f->n > 0 && mpq_sgn(f->c[f->n - 1]) == 0) {
        mpq_clear(f->c[f->n - 1]);
        f->n--;
    }
}

static bool qp_copy(qpoly *r, const qpoly *a)
{
    if (!qp_init(r, a->n))
        return false;
    for (size_t i = 0; i < a->n; i++)
        mpq_set(r->c[i], a->c[i]);
    return true;
}

static void qp_monic(qpoly *f)
{
    if (f->n == 0)
        return;
    mpq_t l;
    mpq_init(l);
    mpq_set(l, f->c[f->n - 1]);
    for (size_t i = 0; i < f->n; i++)
        mpq_div(f->c[i], f->c[i], l);
    mpq_clear(l);
}

/* q = a / b, r = a mod b (b nonzero); q or r may be NULL */
static bool qp_divmod(qpoly *q, qpoly *r, const qpoly *a, const qpoly *b)
{
    qpoly rem;
    if (!qp_copy(&rem, a))
        return false;
    size_t qn = a->n >= b->n ? a->n - b->n + 1 : 0;
    qpoly quo;
    if (!qp_init(&quo, qn)) {
        qp_clear(&rem);
        return false;
    }
    mpq_t t;
    mpq_init(t);
    for (size_t k = qn; k-- > 0;) {
        mpq_div(quo.c[k], rem.c[k + b->n - 1], b->c[b->n - 1]);
        for (size_t j = 0; j < b->n; j++) {
            mpq_mul(t, quo.c[k], b->c[j]);
            mpq_sub(rem.c[k + j], rem.c[k + j], t);
        }
    }
    mpq_clear(t);
    qp_trim(&rem);
    qp_trim(&quo);
    if (q)
        *q = quo;
    else
        qp_clear(&quo);
    if (r)
        *r = rem;
    else
        qp_clear(&rem);
    return true;
}

static bool qp_gcd(qpoly *g, const qpoly *a, const qpoly *b)
{
    qpoly x, y;
    if (!qp_copy(&x, a))
        return false;
    if (!qp_copy(&y, b)) {
        qp_clear(&x);
        return false;
    }
    while (y.n > 0) {
        qpoly r;
        if (!qp_divmod(NULL, &r, &x, &y)) {
            qp_clear(&x);
            qp_clear(&y);
            return false;
        }
        qp_clear(&x);
        x = y;
        y = r;
    }
    qp_clear(&y);
    qp_monic(&x);
    *g = x;
    return true;
}

static bool qp_deriv(qpoly *d, const qpoly *f)
{
    if (!qp_init(d, f->n ? f->n - 1 : 0))
        return false;
    for (size_t i = 1; i < f->n; i++) {
        mpq_set_ui(d->c[i - 1], (unsigned long)i, 1);
        mpq_mul(d->c[i - 1], d->c[i - 1], f->c[i]);
    }
    qp_trim(d);
    return true;
}

bool qp_squarefree(const qpoly *f, qpoly **parts, size_t *nparts)
{
    /* Yun: a0 = gcd(f, f'), b1 = f/a0, c1 = f'/a0, d1 = c1 - b1'; gk = gcd(bk, dk) */
    *parts = NULL;
    *nparts = 0;
    size_t cap = f->n ? f->n : 1;
    qpoly *out = calloc(cap, sizeof *out);
    if (!out)
        return false;
    qpoly fm, fd, a0, b, c, d, bd;
    bool ok = qp_copy(&fm, f);
    if (!ok) {
        free(out);
        return false;
    }
    qp_monic(&fm);
    ok = qp_deriv(&fd, &fm);
    if (ok)
        ok = qp_gcd(&a0, &fm, &fd);
    if (ok)
        ok = qp_divmod(&b, NULL, &fm, &a0);
    if (ok)
        ok = qp_divmod(&c, NULL, &fd, &a0);
    if (ok)
        ok = qp_deriv(&bd, &b);
    size_t k = 0;
    if (ok) {
        /* d = c - b' */
        size_t n = c.n > bd.n ? c.n : bd.n;
        ok = qp_init(&d, n);
        for (size_t i = 0; ok && i < n; i++) {
            if (i < c.n)
                mpq_set(d.c[i], c.c[i]);
            if (i < bd.n)
                mpq_sub(d.c[i], d.c[i], bd.c[i]);
        }
        if (ok)
            qp_trim(&d);
        qp_clear(&bd);
        while (ok && b.n > 1 && k < cap) {
            qpoly g, b2, c2, bd2;
            ok = qp_gcd(&g, &b, &d);
            if (!ok)
                break;
            ok = qp_divmod(&b2, NULL, &b, &g) && qp_divmod(&c2, NULL, &d, &g);
            if (!ok) {
                qp_clear(&g);
                break;
            }
            out[k++] = g;
            qp_clear(&b);
            qp_clear(&d);
            b = b2;
            ok = qp_deriv(&bd2, &b);
            if (ok) {
                size_t n2 = c2.n > bd2.n ? c2.n : bd2.n;
                ok = qp_init(&d, n2);
                for (size_t i = 0; ok && i < n2; i++) {
                    if (i < c2.n)
                        mpq_set(d.c[i], c2.c[i]);
                    if (i < bd2.n)
                        mpq_sub(d.c[i], d.c[i], bd2.c[i]);
                }
                if (ok)
                    qp_trim(&d);
                qp_clear(&bd2);
            } else {
                qp_init(&d, 0);
            }
            qp_clear(&c2);
        }
        qp_clear(&d);
        qp_clear(&b);
        qp_clear(&c);
        qp_clear(&a0);
    }
    qp_clear(&fd);
    qp_clear(&fm);
    if (!ok) {
        for (size_t i = 0; i < k; i++)
            qp_clear(&out[i]);
        free(out);
        return false;
    }
    /* drop trailing trivial parts */
    while (k > 0 && out[k - 1].n <= 1) {
        qp_clear(&out[k - 1]);
        k--;
    }
    *parts = out;
    *nparts = k;
    return true;
}

static void qp_eval(mpq_t r, const qpoly *f, const mpq_t x)
{
    mpq_set_ui(r, 0, 1);
    for (size_t i = f->n; i-- > 0;) {
        mpq_mul(r, r, x);
        mpq_add(r, r, f->c[i]);
    }
}

bool qp_rational_roots(const qpoly *f, mpq_t **roots, size_t *nroots, qpoly *rest)
{
    *roots = NULL;
    *nroots = 0;
    if (!qp_copy(rest, f))
        return false;
    qp_monic(rest);
    if (f->n <= 1)
        return true;
    size_t deg = f->n - 1;
    mpq_t *rr = malloc(deg * sizeof *rr);
    mpc_t *cc = malloc(f->n * sizeof *cc);
    mpc_t *zs = malloc(deg * sizeof *zs);
    size_t *mu = malloc(deg * sizeof *mu);
    if (!rr || !cc || !zs || !mu) {
        free(rr); free(cc); free(zs); free(mu);
        qp_clear(rest);
        return false;
    }
    /* integer polynomial: multiply by the lcm of denominators */
    mpz_t L, an;
    mpz_init_set_ui(L, 1);
    mpz_init(an);
    for (size_t i = 0; i < f->n; i++)
        mpz_lcm(L, L, mpq_denref(f->c[i]));
    mpq_t t, val, cand;
    mpq_init(t);
    mpq_init(val);
    mpq_init(cand);
    mpq_set_z(t, L);
    mpq_mul(t, t, f->c[f->n - 1]);
    mpz_abs(an, mpq_numref(t));
    size_t found = 0;
    /* x = 0 */
    size_t lo = 0;
    while (lo < f->n && mpq_sgn(f->c[lo]) == 0)
        lo++;
    if (lo > 0)
        mpq_init(rr[found++]), mpq_set_ui(rr[0], 0, 1);
    for (size_t i = 0; i < f->n - lo; i++) {
        mpc_init2(cc[i], RN_PREC);
        mpc_set_q(cc[i], f->c[i + lo], MPC_RNDNN);
    }
    for (size_t i = 0; i < deg; i++)
        mpc_init2(zs[i], RN_PREC);
    size_t nz = f->n - lo > 1 ? cx_roots((const mpc_t *)cc, f->n - lo, zs, mu) : 0;
    bool ok = nz != (size_t)-1;
    mpfr_t x, y;
    mpfr_init2(x, RN_PREC);
    mpfr_init2(y, RN_PREC);
    mpz_t N;
    mpz_init(N);
    for (size_t k = 0; ok && k < nz; k++) {
        mpc_abs(y, zs[k], MPFR_RNDN);
        mpfr_abs(x, mpc_imagref(zs[k]), MPFR_RNDN);
        mpfr_mul_2si(y, y, -40, MPFR_RNDN);
        mpfr_add_d(y, y, 1e-40, MPFR_RNDN);
        if (mpfr_cmp(x, y) > 0)
            continue;
        mpfr_mul_z(x, mpc_realref(zs[k]), an, MPFR_RNDN);
        mpfr_round(x, x);
        mpfr_get_z(N, x, MPFR_RNDN);
        static const int order[3] = {0, -1, 1};
        for (int oi = 0; oi < 3; oi++) {
            int dlt = order[oi];
            mpq_set_num(cand, N);
            if (dlt < 0)
                mpz_sub_ui(mpq_numref(cand), mpq_numref(cand), 1);
            else if (dlt > 0)
                mpz_add_ui(mpq_numref(cand), mpq_numref(cand), 1);
            mpq_set_den(cand, an);
            mpq_canonicalize(cand);
            if (mpq_sgn(cand) == 0)
                continue;
            qp_eval(val, f, cand);
            if (mpq_sgn(val) != 0)
                continue;
            bool dup = false;
            for (size_t j = 0; j < found; j++)
                if (mpq_equal(rr[j], cand))
                    dup = true;
            if (dup)
                continue;
            mpq_init(rr[found]);
            mpq_set(rr[found++], cand);
            break;
        }
    }
    mpz_clear(N);
    mpfr_clear(x);
    mpfr_clear(y);
    for (size_t i = 0; i < f->n - lo; i++)
        mpc_clear(cc[i]);
    for (size_t i = 0; i < deg; i++)
        mpc_clear(zs[i]);
    free(cc);
    free(zs);
    free(mu);
    /* sort roots ascending and divide them out of rest */
    for (size_t i = 1; i < found; i++)
        for (size_t j = i; j > 0 && mpq_cmp(rr[j - 1], rr[j]) > 0; j--)
            mpq_swap(rr[j - 1], rr[j]);
    for (size_t i = 0; ok && i < found; i++) {
        qpoly lin, q;
        ok = qp_init(&lin, 2);
        if (!ok)
            break;
        mpq_neg(lin.c[0], rr[i]);
        mpq_set_ui(lin.c[1], 1, 1);
        ok = qp_divmod(&q, NULL, rest, &lin);
        qp_clear(&lin);
        if (ok) {
            qp_clear(rest);
            *rest = q;
        }
    }
    mpq_clear(t);
    mpq_clear(val);
    mpq_clear(cand);
    mpz_clear(L);
    mpz_clear(an);
    if (!ok) {
        for (size_t i = 0; i < found; i++)
            mpq_clear(rr[i]);
        free(rr);
        qp_clear(rest);
        return false;
    }
    *roots = rr;
    *nroots = found;
    return true;
}

/* ---------------------------------------------------------------- text */

char *rn_strdup(const char *s)
{
    size_t n = strlen(s) + 1;
    char *r = malloc(n);
    if (r)
        memcpy(r, s, n);
    return r;
}

void rb_init(rbuf *b)
{
    b->s = NULL;
    b->len = b->cap = 0;
    b->oom = false;
}

static void rb_grow(rbuf *b, size_t add)
{
    if (b->oom)
        return;
    if (b->len + add + 1 <= b->cap)
        return;
    size_t nc = b->cap ? b->cap : 64;
    while (nc < b->len + add + 1)
        nc *= 2;
    char *s = realloc(b->s, nc);
    if (!s) {
        b->oom = true;
        return;
    }
    b->s = s;
    b->cap = nc;
}

void rb_printf(rbuf *b, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (n < 0) {
        b->oom = true;
        return;
    }
    rb_grow(b, (size_t)n);
    if (b->oom)
        return;
    va_start(ap, fmt);
    vsnprintf(b->s + b->len, b->cap - b->len, fmt, ap);
    va_end(ap);
    b->len += (size_t)n;
}

void rb_puts(rbuf *b, const char *s)
{
    size_t n = strlen(s);
    rb_grow(b, n);
    if (b->oom)
        return;
    memcpy(b->s + b->len, s, n + 1);
    b->len += n;
}

char *rb_take(rbuf *b)
{
    if (b->oom) {
        free(b->s);
        rb_init(b);
        return NULL;
    }
    if (!b->s) {
        rb_grow(b, 0);
        if (b->oom)
            return NULL;
        b->s[0] = 0;
    }
    char *s = b->s;
    rb_init(b);
    return s;
}

void rb_free(rbuf *b)
{
    free(b->s);
    rb_init(b);
}

void rb_q(rbuf *b, const mpq_t q)
{
    char *s = mpq_get_str(NULL, 10, q);
    if (!s) {
        b->oom = true;
        return;
    }
    rb_puts(b, s);
    void (*fr)(void *, size_t);
    mp_get_memory_functions(NULL, NULL, &fr);
    fr(s, strlen(s) + 1);
}

void rb_z(rbuf *b, const mpz_t z)
{
    char *s = mpz_get_str(NULL, 10, z);
    if (!s) {
        b->oom = true;
        return;
    }
    rb_puts(b, s);
    void (*fr)(void *, size_t);
    mp_get_memory_functions(NULL, NULL, &fr);
    fr(s, strlen(s) + 1);
}

/* "c*x^k" terms from highest degree down, rationals exact */
char *qp_to_str(const qpoly *f, const char *var)
{
    rbuf b;
    rb_init(&b);
    bool first = true;
    mpq_t a;
    mpq_init(a);
    for (size_t i = f->n; i-- > 0;) {
        if (mpq_sgn(f->c[i]) == 0)
            continue;
        mpq_abs(a, f->c[i]);
        if (first)
            rb_puts(&b, mpq_sgn(f->c[i]) < 0 ? "-" : "");
        else
            rb_puts(&b, mpq_sgn(f->c[i]) < 0 ? " - " : " + ");
        first = false;
        bool one = mpz_cmp_ui(mpq_numref(a), 1) == 0 && mpz_cmp_ui(mpq_denref(a), 1) == 0;
        if (i == 0 || !one) {
            rb_q(&b, a);
            if (i > 0)
                rb_puts(&b, "*");
        }
        if (i == 1)
            rb_puts(&b, var);
        else if (i > 1)
            rb_printf(&b, "%s^%zu", var, i);
    }
    if (first)
        rb_puts(&b, "0");
    mpq_clear(a);
    return rb_take(&b);
}

/* ---------------------------------------------------------------- complex roots */

static void cx_eval(mpc_t v, mpc_t dv, const mpc_t *c, size_t n, const mpc_t x)
{
    /* Horner for value and derivative */
    mpc_set_ui(v, 0, MPC_RNDNN);
    mpc_set_ui(dv, 0, MPC_RNDNN);
    for (size_t i = n; i-- > 0;) {
        mpc_mul(dv, dv, x, MPC_RNDNN);
        mpc_add(dv, dv, v, MPC_RNDNN);
        mpc_mul(v, v, x, MPC_RNDNN);
        mpc_add(v, v, c[i], MPC_RNDNN);
    }
}

size_t cx_roots(const mpc_t *c, size_t n, mpc_t *roots, size_t *mult)
{
    size_t deg = n - 1;
    if (deg == 0)
        return 0;
    mpc_t *z = malloc(deg * sizeof *z);
    bool *done = calloc(deg, sizeof *done);
    double *last = malloc(deg * sizeof *last);
    mpc_t *d = malloc(n * sizeof *d);
    if (!z || !done || !d || !last) {
        free(z); free(done); free(d); free(last);
        return (size_t)-1;
    }
    for (size_t k = 0; k < deg; k++)
        last[k] = 1e300;
    mpc_t v, dv, s, w, one;
    mpfr_t r, a, tol;
    mpc_init2(v, RN_PREC); mpc_init2(dv, RN_PREC); mpc_init2(s, RN_PREC);
    mpc_init2(w, RN_PREC); mpc_init2(one, RN_PREC);
    mpfr_init2(r, RN_PREC); mpfr_init2(a, RN_PREC); mpfr_init2(tol, RN_PREC);
    mpc_set_ui(one, 1, MPC_RNDNN);
    /* initial radius: geometric mean of |c0/cn| */
    mpc_abs(r, c[0], MPFR_RNDN);
    mpc_abs(a, c[deg], MPFR_RNDN);
    mpfr_div(r, r, a, MPFR_RNDN);
    mpfr_rootn_ui(r, r, (unsigned long)deg, MPFR_RNDN);
    for (size_t k = 0; k < deg; k++) {
        mpc_init2(z[k], RN_PREC);
        double ang = 2.0 * M_PI * ((double)k + 0.25) / (double)deg + 0.4;
        mpfr_mul_d(mpc_realref(z[k]), r, cos(ang), MPFR_RNDN);
        mpfr_mul_d(mpc_imagref(z[k]), r, sin(ang), MPFR_RNDN);
    }
    /* Aberth–Ehrlich iteration */
    for (int it = 0; it < 2000; it++) {
        bool moved = false;
        for (size_t k = 0; k < deg; k++) {
            if (done[k])
                continue;
            cx_eval(v, dv, c, n, z[k]);
            if (mpc_cmp_si(v, 0) == 0) {
                done[k] = true;
                continue;
            }
            mpc_div(w, v, dv, MPC_RNDNN);          /* Newton step N = f/f' */
            mpc_set_ui(s, 0, MPC_RNDNN);
            for (size_t j = 0; j < deg; j++) {
                if (j == k)
                    continue;
                mpc_sub(dv, z[k], z[j], MPC_RNDNN);
                if (mpc_cmp_si(dv, 0) == 0)
                    continue;
                mpc_ui_div(dv, 1, dv, MPC_RNDNN);
                mpc_add(s, s, dv, MPC_RNDNN);
            }
            /* step = N / (1 - N*s) */
            mpc_mul(s, s, w, MPC_RNDNN);
            mpc_sub(s, one, s, MPC_RNDNN);
            if (mpc_cmp_si(s, 0) != 0)
                mpc_div(w, w, s, MPC_RNDNN);
            mpc_sub(z[k], z[k], w, MPC_RNDNN);
            mpc_abs(a, w, MPFR_RNDN);
            mpc_abs(r, z[k], MPFR_RNDN);
            /* converged: the step is at the rounding level, or it stopped shrinking
             * once below 2^-200 relative (rounding noise; the final Newton polish
             * restores full precision) */
            mpfr_mul_2si(tol, r, -(RN_PREC - 64), MPFR_RNDN);
            mpfr_mul_2si(r, r, -200, MPFR_RNDN);
            double l = mpfr_get_d(a, MPFR_RNDN) == 0 ? -1e300 : mpfr_get_exp(a) * 1.0;
            if (mpfr_cmp(a, tol) <= 0 || (mpfr_cmp(a, r) <= 0 && l >= last[k]))
                done[k] = true;
            else
                moved = true;
            last[k] = l;
        }
        if (!moved)
            break;
    }
    /* cluster: |zi - zj| <= 2^-50 * max(1, |zi|) */
    size_t *cl = malloc(deg * sizeof *cl);
    if (!cl) {
        for (size_t k = 0; k < deg; k++)
            mpc_clear(z[k]);
        free(z); free(done); free(d); free(last);
        mpc_clear(v); mpc_clear(dv); mpc_clear(s); mpc_clear(w); mpc_clear(one);
        mpfr_clear(r); mpfr_clear(a); mpfr_clear(tol);
        return (size_t)-1;
    }
    for (size_t k = 0; k < deg; k++)
        cl[k] = k;
    for (size_t k = 0; k < deg; k++)
        for (size_t j = 0; j < k; j++) {
            if (cl[j] != j)
                continue;
            mpc_sub(w, z[k], z[j], MPC_RNDNN);
            mpc_abs(a, w, MPFR_RNDN);
            mpc_abs(r, z[j], MPFR_RNDN);
            if (mpfr_cmp_ui(r, 1) < 0)
                mpfr_set_ui(r, 1, MPFR_RNDN);
            mpfr_mul_2si(r, r, -50, MPFR_RNDN);
            if (mpfr_cmp(a, r) <= 0 && cl[k] == k) {
                cl[k] = j;
                break;
            }
        }
    size_t nout = 0;
    for (size_t j = 0; j < deg; j++) {
        if (cl[j] != j)
            continue;
        size_t m = 0;
        mpc_set_ui(s, 0, MPC_RNDNN);
        for (size_t k = 0; k < deg; k++)
            if (cl[k] == j) {
                m++;
                mpc_add(s, s, z[k], MPC_RNDNN);
            }
        mpc_div_ui(s, s, (unsigned long)m, MPC_RNDNN);
        /* polish with Newton on the (m-1)-th derivative */
        size_t nd = n - (m - 1);
        for (size_t i = 0; i < nd; i++) {
            mpc_init2(d[i], RN_PREC);
            mpc_set(d[i], c[i + m - 1], MPC_RNDNN);
            for (size_t q = 1; q < m; q++)
                mpc_mul_ui(d[i], d[i], (unsigned long)(i + q), MPC_RNDNN);
        }
        for (int it = 0; it < 60; it++) {
            cx_eval(v, dv, (const mpc_t *)d, nd, s);
            if (mpc_cmp_si(dv, 0) == 0 || mpc_cmp_si(v, 0) == 0)
                break;
            mpc_div(w, v, dv, MPC_RNDNN);
            mpc_sub(s, s, w, MPC_RNDNN);
            mpc_abs(a, w, MPFR_RNDN);
            mpc_abs(r, s, MPFR_RNDN);
            mpfr_mul_2si(r, r, -(RN_PREC - 8), MPFR_RNDN);
            if (mpfr_cmp(a, r) <= 0)
                break;
        }
        for (size_t i = 0; i < nd; i++)
            mpc_clear(d[i]);
        /* snap parts that are zero to working precision (real roots stay real) */
        mpc_abs(r, s, MPFR_RNDN);
        mpfr_mul_2si(r, r, -(RN_PREC - 64), MPFR_RNDN);
        mpfr_abs(a, mpc_imagref(s), MPFR_RNDN);
        if (mpfr_cmp(a, r) <= 0)
            mpfr_set_ui(mpc_imagref(s), 0, MPFR_RNDN);
        mpfr_abs(a, mpc_realref(s), MPFR_RNDN);
        if (mpfr_cmp(a, r) <= 0)
            mpfr_set_ui(mpc_realref(s), 0, MPFR_RNDN);
        mpc_set(roots[nout], s, MPC_RNDNN);
        mult[nout] = m;
        nout++;
    }
    free(cl);
    for (size_t k = 0; k < deg; k++)
        mpc_clear(z[k]);
    free(z); free(done); free(d); free(last);
    mpc_clear(v); mpc_clear(dv); mpc_clear(s); mpc_clear(w); mpc_clear(one);
    mpfr_clear(r); mpfr_clear(a); mpfr_clear(tol);
    return nout;
}
