/* roots_fp.c — factorisation of residual polynomials over F_p: square-free
 * decomposition, distinct-degree factorisation, equal-degree splitting
 * (Cantor–Zassenhaus, fixed-seed generator; trace map for p = 2). */
#include "roots_internal.h"

#include <stdlib.h>
#include <string.h>

typedef struct {
    mpz_srcptr p;     /* modulus */
    uint64_t seed;    /* deterministic generator state */
    bool oom;
} fctx;

static bool fp_init(fpoly *f, size_t n)
{
    f->n = n;
    f->c = malloc((n ? n : 1) * sizeof *f->c);
    if (!f->c)
        return false;
    for (size_t i = 0; i < n; i++)
        mpz_init(f->c[i]);
    return true;
}

static void fp_clear(fpoly *f)
{
    if (f->c)
        for (size_t i = 0; i < f->n; i++)
            mpz_clear(f->c[i]);
    free(f->c);
    f->c = NULL;
    f->n = 0;
}

static void fp_trim(fpoly *f)
{
    while (f->n > 0 && mpz_sgn(f->c[f->n - 1]) == 0) {
        mpz_clear(f->c[f->n - 1]);
        f->n--;
    }
}

static bool fp_copy(fpoly *r, const fpoly *a)
{
    if (!fp_init(r, a->n))
        return false;
    for (size_t i = 0; i < a->n; i++)
        mpz_set(r->c[i], a->c[i]);
    return true;
}

static size_t fp_deg(const fpoly *f) { return f->n ? f->n - 1 : 0; }

static void fp_monic(fpoly *f, const mpz_t p)
{
    if (f->n == 0)
        return;
    mpz_t inv;
    mpz_init(inv);
    mpz_invert(inv, f->c[f->n - 1], p);
    for (size_t i = 0; i < f->n; i++) {
        mpz_mul(f->c[i], f->c[i], inv);
        mpz_mod(f->c[i], f->c[i], p);
    }
    mpz_clear(inv);
}

/* q = a / b, r = a mod b; b nonzero; q, r may be NULL */
static bool fp_divmod(fpoly *q, fpoly *r, const fpoly *a, const fpoly *b, const mpz_t p)
{
    fpoly rem, quo;
    if (!fp_copy(&rem, a))
        return false;
    size_t qn = a->n >= b->n ? a->n - b->n + 1 : 0;
    if (!fp_init(&quo, qn)) {
        fp_clear(&rem);
        return false;
    }
    mpz_t inv, t;
    mpz_init(inv);
    mpz_init(t);
    mpz_invert(inv, b->c[b->n - 1], p);
    for (size_t k = qn; k-- > 0;) {
        mpz_mul(quo.c[k], rem.c[k + b->n - 1], inv);
        mpz_mod(quo.c[k], quo.c[k], p);
        if (mpz_sgn(quo.c[k]) == 0)
            continue;
        for (size_t j = 0; j < b->n; j++) {
            mpz_mul(t, quo.c[k], b->c[j]);
            mpz_sub(rem.c[k + j], rem.c[k + j], t);
            mpz_mod(rem.c[k + j], rem.c[k + j], p);
        }
    }
    mpz_clear(inv);
    mpz_clear(t);
    fp_trim(&rem);
    fp_trim(&quo);
    if (q)
        *q = quo;
    else
        fp_clear(&quo);
    if (r)
        *r = rem;
    else
        fp_clear(&rem);
    return true;
}

static bool fp_mul(fpoly *r, const fpoly *a, const fpoly *b, const mpz_t p)
{
    if (a->n == 0 || b->n == 0)
        return fp_init(r, 0);
    if (!fp_init(r, a->n + b->n - 1))
        return false;
    for (size_t i = 0; i < a->n; i++)
        for (size_t j = 0; j < b->n; j++)
            mpz_addmul(r->c[i + j], a->c[i], b->c[j]);
    for (size_t i = 0; i < r->n; i++)
        mpz_mod(r->c[i], r->c[i], p);
    fp_trim(r);
    return true;
}

static bool fp_mulmod(fpoly *r, const fpoly *a, const fpoly *b, const fpoly *m, const mpz_t p)
{
    fpoly t;
    if (!fp_mul(&t, a, b, p))
        return false;
    bool ok = fp_divmod(NULL, r, &t, m, p);
    fp_clear(&t);
    return ok;
}

static bool fp_gcd(fpoly *g, const fpoly *a, const fpoly *b, const mpz_t p)
{
    fpoly x, y;
    if (!fp_copy(&x, a))
        return false;
    if (!fp_copy(&y, b)) {
        fp_clear(&x);
        return false;
    }
    while (y.n > 0) {
        fpoly r;
        if (!fp_divmod(NULL, &r, &x, &y, p)) {
            fp_clear(&x);
            fp_clear(&y);
            return false;
        }
        fp_clear(&x);
        x = y;
        y = r;
    }
    fp_clear(&y);
    fp_monic(&x, p);
    *g = x;
    return true;
}

/* r = b^e mod m */
static bool fp_powmod(fpoly *r, const fpoly *b, const mpz_t e, const fpoly *m, const mpz_t p)
{
    fpoly acc, base;
    if (!fp_init(&acc, 1))
        return false;
    mpz_set_ui(acc.c[0], 1);
    if (!fp_divmod(NULL, &base, b, m, p)) {
        fp_clear(&acc);
        return false;
    }
    {
        fpoly t;
        if (!fp_divmod(NULL, &t, &acc, m, p)) {
            fp_clear(&acc);
            fp_clear(&base);
            return false;
        }
        fp_clear(&acc);
        acc = t;
    }
    bool ok = true;
    size_t bits = mpz_sizeinbase(e, 2);
    for (size_t i = bits; i-- > 0 && ok;) {
        fpoly t;
        ok = fp_mulmod(&t, &acc, &acc, m, p);
        if (!ok)
            break;
        fp_clear(&acc);
        acc = t;
        if (mpz_tstbit(e, i)) {
            ok = fp_mulmod(&t, &acc, &base, m, p);
            if (!ok)
                break;
            fp_clear(&acc);
            acc = t;
        }
    }
    fp_clear(&base);
    if (!ok) {
        fp_clear(&acc);
        return false;
    }
    *r = acc;
    return true;
}

static bool fp_deriv(fpoly *d, const fpoly *f, const mpz_t p)
{
    if (!fp_init(d, f->n ? f->n - 1 : 0))
        return false;
    for (size_t i = 1; i < f->n; i++) {
        mpz_mul_ui(d->c[i - 1], f->c[i], (unsigned long)i);
        mpz_mod(d->c[i - 1], d->c[i - 1], p);
    }
    fp_trim(d);
    return true;
}

/* ---- factor list */
typedef struct {
    fp_factor *v;
    size_t n, cap;
} flist;

static bool fl_push(flist *L, fpoly *f, size_t mult)
{
    if (L->n == L->cap) {
        size_t nc = L->cap ? 2 * L->cap : 8;
        fp_factor *v = realloc(L->v, nc * sizeof *v);
        if (!v)
            return false;
        L->v = v;
        L->cap = nc;
    }
    L->v[L->n].f = *f;
    L->v[L->n].mult = mult;
    L->n++;
    f->c = NULL;
    f->n = 0;
    return true;
}

static uint64_t next_rand(fctx *C)
{
    uint64_t z = (C->seed += 0x9e3779b97f4a7c15ull);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
    return z ^ (z >> 31);
}

/* split g (monic, square-free, product of irreducibles of degree d) */
static bool edf(flist *L, const fpoly *g, size_t d, size_t mult, fctx *C)
{
    mpz_srcptr p = C->p;
    if (fp_deg(g) == d) {
        fpoly c;
        if (!fp_copy(&c, g))
            return false;
        return fl_push(L, &c, mult) || (fp_clear(&c), false);
    }
    mpz_t e;
    mpz_init(e);
    bool ok = true;
    for (int attempt = 0; attempt < 1000 && ok; attempt++) {
        fpoly a, b, u;
        ok = fp_init(&a, fp_deg(g));
        if (!ok)
            break;
        for (size_t i = 0; i < a.n; i++) {
            mpz_set_ui(a.c[i], (unsigned long)(next_rand(C) >> 1));
            mpz_mul_2exp(a.c[i], a.c[i], 64);
            mpz_add_ui(a.c[i], a.c[i], (unsigned long)(next_rand(C) >> 1));
            mpz_mod(a.c[i], a.c[i], p);
        }
        fp_trim(&a);
        if (a.n < 2) {
            fp_clear(&a);
            continue;
        }
        if (mpz_cmp_ui(p, 2) == 0) {
            /* trace: a + a^2 + ... + a^(2^(d-1)) mod g */
            fpoly acc, pw;
            ok = fp_copy(&acc, &a) && fp_copy(&pw, &a);
            for (size_t k = 1; ok && k < d; k++) {
                fpoly t;
                ok = fp_mulmod(&t, &pw, &pw, g, p);
                if (!ok)
                    break;
                fp_clear(&pw);
                pw = t;
                size_t n = acc.n > pw.n ? acc.n : pw.n;
                fpoly s;
                ok = fp_init(&s, n);
                for (size_t i = 0; ok && i < n; i++) {
                    if (i < acc.n)
                        mpz_add(s.c[i], s.c[i], acc.c[i]);
                    if (i < pw.n)
                        mpz_add(s.c[i], s.c[i], pw.c[i]);
                    mpz_mod(s.c[i], s.c[i], p);
                }
                if (ok) {
                    fp_trim(&s);
                    fp_clear(&acc);
                    acc = s;
                }
            }
            fp_clear(&pw);
            b = acc;
        } else {
            mpz_pow_ui(e, p, (unsigned long)d);
            mpz_sub_ui(e, e, 1);
            mpz_tdiv_q_2exp(e, e, 1);
            ok = fp_powmod(&b, &a, e, g, p);
            if (ok) {
                if (b.n == 0) {
                    fp_clear(&b);
                    ok = fp_init(&b, 1);
                }
                if (ok) {
                    mpz_sub_ui(b.c[0], b.c[0], 1);
                    mpz_mod(b.c[0], b.c[0], p);
                    fp_trim(&b);
                }
            }
        }
        fp_clear(&a);
        if (!ok)
            break;
        ok = fp_gcd(&u, g, &b, p);
        fp_clear(&b);
        if (!ok)
            break;
        if (u.n >= 2 && u.n < g->n) {
            fpoly w;
            ok = fp_divmod(&w, NULL, g, &u, p);
            if (ok) {
                fp_monic(&w, p);
                ok = edf(L, &u, d, mult, C) && edf(L, &w, d, mult, C);
                fp_clear(&w);
            }
            fp_clear(&u);
            mpz_clear(e);
            return ok;
        }
        fp_clear(&u);
    }
    mpz_clear(e);
    if (!ok)
        return false;
    /* should not happen: keep g whole (it is still a product of degree-d factors) */
    fpoly c;
    if (!fp_copy(&c, g))
        return false;
    return fl_push(L, &c, mult) || (fp_clear(&c), false);
}

/* distinct-degree factorisation of a monic square-free f */
static bool ddf(flist *L, const fpoly *f0, size_t mult, fctx *C)
{
    mpz_srcptr p = C->p;
    fpoly f, h, x;
    if (!fp_copy(&f, f0))
        return false;
    if (!fp_init(&x, 2)) {
        fp_clear(&f);
        return false;
    }
    mpz_set_ui(x.c[1], 1);
    bool ok = fp_divmod(NULL, &h, &x, &f, p);
    for (size_t i = 1; ok && fp_deg(&f) >= 2 * i; i++) {
        fpoly t, g, hx;
        ok = fp_powmod(&t, &h, p, &f, p);
        if (!ok)
            break;
        fp_clear(&h);
        h = t;
        size_t n = h.n > 2 ? h.n : 2;
        ok = fp_init(&hx, n);
        for (size_t k = 0; ok && k < n; k++) {
            if (k < h.n)
                mpz_set(hx.c[k], h.c[k]);
            if (k == 1)
                mpz_sub_ui(hx.c[k], hx.c[k], 1);
            mpz_mod(hx.c[k], hx.c[k], p);
        }
        if (!ok)
            break;
        fp_trim(&hx);
        ok = fp_gcd(&g, &f, &hx, p);
        fp_clear(&hx);
        if (!ok)
            break;
        if (g.n >= 2) {
            fpoly q, hr;
            ok = edf(L, &g, i, mult, C) && fp_divmod(&q, NULL, &f, &g, p);
            if (ok) {
                fp_clear(&f);
                f = q;
                fp_monic(&f, p);
                ok = fp_divmod(NULL, &hr, &h, &f, p);
                if (ok) {
                    fp_clear(&h);
                    h = hr;
                }
            }
        }
        fp_clear(&g);
    }
    if (ok && f.n >= 2) {
        fpoly c;
        ok = fp_copy(&c, &f) && fl_push(L, &c, mult);
    }
    fp_clear(&f);
    fp_clear(&h);
    fp_clear(&x);
    return ok;
}

/* square-free factorisation over F_p, feeding each part to ddf */
static bool sff(flist *L, const fpoly *f0, size_t mult, fctx *C)
{
    mpz_srcptr p = C->p;
    if (f0->n < 2)
        return true;
    fpoly f, d;
    if (!fp_copy(&f, f0))
        return false;
    fp_monic(&f, p);
    bool ok = fp_deriv(&d, &f, p);
    if (!ok) {
        fp_clear(&f);
        return false;
    }
    if (d.n == 0) {
        /* f = g(x^p): take the p-th root (a^p = a in F_p) */
        fp_clear(&d);
        size_t ps = (size_t)mpz_get_ui(p);
        fpoly g;
        ok = fp_init(&g, (f.n - 1) / ps + 1);
        for (size_t i = 0; ok && i < g.n; i++)
            mpz_set(g.c[i], f.c[i * ps]);
        if (ok)
            ok = sff(L, &g, mult * ps, C);
        fp_clear(&g);
        fp_clear(&f);
        return ok;
    }
    fpoly c, w;
    ok = fp_gcd(&c, &f, &d, p) && fp_divmod(&w, NULL, &f, &c, p);
    fp_clear(&d);
    size_t i = 1;
    while (ok && w.n >= 2) {
        fpoly y, z, c2;
        ok = fp_gcd(&y, &w, &c, p);
        if (!ok)
            break;
        ok = fp_divmod(&z, NULL, &w, &y, p);
        if (ok) {
            fp_monic(&z, p);
            if (z.n >= 2)
                ok = ddf(L, &z, mult * i, C);
            fp_clear(&z);
        }
        if (ok)
            ok = fp_divmod(&c2, NULL, &c, &y, p);
        if (ok) {
            fp_clear(&c);
            c = c2;
        }
        fp_clear(&w);
        w = y;
        i++;
    }
    if (ok && c.n >= 2) {
        /* remaining c is a p-th power */
        size_t ps = (size_t)mpz_get_ui(p);
        fpoly g;
        fp_monic(&c, p);
        ok = fp_init(&g, (c.n - 1) / ps + 1);
        for (size_t k = 0; ok && k < g.n; k++)
            mpz_set(g.c[k], c.c[k * ps]);
        if (ok)
            ok = sff(L, &g, mult * ps, C);
        fp_clear(&g);
    }
    fp_clear(&c);
    fp_clear(&w);
    fp_clear(&f);
    return ok;
}

static int fac_cmp(const void *a, const void *b)
{
    const fp_factor *x = a, *y = b;
    if (x->f.n != y->f.n)
        return x->f.n < y->f.n ? -1 : 1;
    for (size_t i = x->f.n; i-- > 0;) {
        int c = mpz_cmp(x->f.c[i], y->f.c[i]);
        if (c)
            return c;
    }
    return x->mult < y->mult ? -1 : x->mult > y->mult;
}

bool fp_factor_poly(const mpz_t *coef, size_t n, const mpz_t p, mpz_t lc,
                    fp_factor **out, size_t *nout)
{
    *out = NULL;
    *nout = 0;
    fpoly f;
    if (!fp_init(&f, n))
        return false;
    for (size_t i = 0; i < n; i++)
        mpz_mod(f.c[i], coef[i], p);
    fp_trim(&f);
    if (f.n == 0) {
        mpz_set_ui(lc, 0);
        fp_clear(&f);
        return true;
    }
    mpz_set(lc, f.c[f.n - 1]);
    fctx C = {p, 0x7470u, false};
    flist L = {NULL, 0, 0};
    bool ok = sff(&L, &f, 1, &C);
    fp_clear(&f);
    if (!ok) {
        fp_factors_free(L.v, L.n);
        return false;
    }
    if (L.n > 1)
        qsort(L.v, L.n, sizeof *L.v, fac_cmp);
    *out = L.v;
    *nout = L.n;
    return true;
}

bool fp_is_squarefree(const mpz_t *coef, size_t n, mpz_srcptr p, bool *sqf)
{
    fpoly f, d, g;
    *sqf = false;
    if (!fp_init(&f, n))
        return false;
    for (size_t i = 0; i < n; i++)
        mpz_mod(f.c[i], coef[i], p);
    fp_trim(&f);
    bool ok = fp_deriv(&d, &f, p);
    if (ok && d.n > 0) {
        ok = fp_gcd(&g, &f, &d, p);
        if (ok) {
            *sqf = g.n == 1;
            fp_clear(&g);
        }
    }
    if (ok)
        fp_clear(&d);
    fp_clear(&f);
    return ok;
}

void fp_factors_free(fp_factor *f, size_t n)
{
    for (size_t i = 0; i < n; i++)
        fp_clear(&f[i].f);
    free(f);
}

char *fp_to_str(const mpz_t *c, size_t n, const char *var)
{
    rbuf b;
    rb_init(&b);
    bool first = true;
    for (size_t i = n; i-- > 0;) {
        if (mpz_sgn(c[i]) == 0)
            continue;
        if (!first)
            rb_puts(&b, " + ");
        first = false;
        bool one = mpz_cmp_ui(c[i], 1) == 0;
        if (i == 0 || !one) {
            rb_z(&b, c[i]);
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
    return rb_take(&b);
}
