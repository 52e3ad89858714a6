/* roots_sqf.c — square-free decomposition of a polynomial in x whose coefficients are
 * exact Puiseux polynomials (elements of Q[t^(1/D)]), over the field Q(t^(1/D)).
 *
 * Method: g_1 = f, g_{k+1} = gcd(g_k, g_k') (primitive pseudo-remainder sequences over
 * Q[t^(1/D)], contents removed with Euclid's algorithm in Q[t^(1/D)]); s_k = g_k/g_{k+1}
 * carries the roots of multiplicity >= k and h_k = s_k/s_{k+1} those of multiplicity
 * exactly k. Everything is up to nonzero scalars of Q(t^(1/D)), which do not move roots.
 */
#include "roots_internal.h"

#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------- Q[T] */

static bool rs_exact(const rseries *s) { return rs_all_exact(s); }

/* leading (highest) exponent index */
static size_t top(const rseries *s) { return s->len - 1; }

/* long division in Q[T] by the highest term: a = q b + r, deg r < deg b. q may be NULL.
 * Gives up (false) after too many steps (exponents outside one lattice). */
static bool rs_divrem(rseries *q, rseries *r, const rseries *a, const rseries *b)
{
    if (!rs_set(r, a))
        return false;
    if (q)
        rs_zero(q);
    rnum c;
    rn_init(&c);
    mpq_t e;
    mpq_init(e);
    bool ok = true;
    for (int steps = 0; ok && r->len > 0 && mpq_cmp(r->e[top(r)], b->e[top(b)]) >= 0; steps++) {
        if (steps > 200000) {
            ok = false;
            break;
        }
        rn_div(&c, &r->c[top(r)], &b->c[top(b)]);
        mpq_sub(e, r->e[top(r)], b->e[top(b)]);
        if (q)
            ok = rs_add_term(q, e, &c);
        rn_neg(&c, &c);
        if (ok) {
            rseries t;
            rs_init(&t);
            ok = rs_set(&t, r) && rs_addmul(&t, b, &c, e) && rs_set(r, &t);
            rs_clear(&t);
        }
    }
    rn_clear(&c);
    mpq_clear(e);
    return ok;
}

/* monic gcd in Q[T] */
static bool rs_gcd(rseries *g, const rseries *a, const rseries *b)
{
    rseries x, y, r;
    rs_init(&x);
    rs_init(&y);
    rs_init(&r);
    bool ok = rs_set(&x, a) && rs_set(&y, b);
    while (ok && y.len > 0) {
        ok = rs_divrem(NULL, &r, &x, &y);
        if (ok)
            ok = rs_set(&x, &y) && rs_set(&y, &r);
    }
    if (ok && x.len > 0) {
        rnum inv, one;
        rn_init(&inv);
        rn_init(&one);
        rn_set_si(&one, 1);
        rn_div(&inv, &one, &x.c[top(&x)]);
        mpq_t z;
        mpq_init(z);
        rs_zero(&r);
        ok = rs_addmul(&r, &x, &inv, z) && rs_set(&x, &r);
        mpq_clear(z);
        rn_clear(&inv);
        rn_clear(&one);
    }
    if (ok)
        ok = rs_set(g, &x);
    rs_clear(&x);
    rs_clear(&y);
    rs_clear(&r);
    return ok;
}

/* ---------------------------------------------------------------- Q[T][x] */

static size_t deg(const rupoly *f)
{
    size_t d = f->n;
    while (d > 0 && rs_is_zero(&f->a[d - 1]))
        d--;
    return d; /* number of coefficients up to the last nonzero one */
}

static void trim(rupoly *f)
{
    size_t d = deg(f);
    for (size_t i = d; i < f->n; i++)
        rs_clear(&f->a[i]);
    f->n = d;
}

/* divide every coefficient by their gcd; also shift exponents to start at 0 */
static bool primitive(rupoly *f)
{
    trim(f);
    if (f->n == 0)
        return true;
    rseries g, q, r;
    rs_init(&g);
    rs_init(&q);
    rs_init(&r);
    bool ok = true;
    for (size_t i = 0; ok && i < f->n; i++) {
        if (rs_is_zero(&f->a[i]))
            continue;
        if (g.len == 0)
            ok = rs_set(&g, &f->a[i]);
        else
            ok = rs_gcd(&g, &g, &f->a[i]);
        if (ok && g.len == 1 && mpq_sgn(g.e[0]) == 0)
            break; /* the constant 1 */
    }
    for (size_t i = 0; ok && i < f->n && g.len > 0; i++) {
        if (rs_is_zero(&f->a[i]))
            continue;
        ok = rs_divrem(&q, &r, &f->a[i], &g) && r.len == 0 && rs_set(&f->a[i], &q);
    }
    /* scale so that the top coefficient's top term is 1 (keeps numbers small) */
    if (ok && f->n > 0 && f->a[f->n - 1].len > 0) {
        rnum inv, one;
        rn_init(&inv);
        rn_init(&one);
        rn_set_si(&one, 1);
        rseries *lt = &f->a[f->n - 1];
        rn_div(&inv, &one, &lt->c[lt->len - 1]);
        mpq_t z;
        mpq_init(z);
        for (size_t i = 0; ok && i < f->n; i++) {
            rs_zero(&q);
            ok = rs_addmul(&q, &f->a[i], &inv, z) && rs_set(&f->a[i], &q);
        }
        mpq_clear(z);
        rn_clear(&inv);
        rn_clear(&one);
    }
    /* make the lowest exponent 0 (a unit T^k) */
    if (ok) {
        bool have = false;
        mpq_t lo;
        mpq_init(lo);
        for (size_t i = 0; i < f->n; i++)
            if (!rs_is_zero(&f->a[i]) && (!have || mpq_cmp(f->a[i].e[0], lo) < 0)) {
                mpq_set(lo, f->a[i].e[0]);
                have = true;
            }
        mpq_neg(lo, lo);
        for (size_t i = 0; i < f->n; i++)
            rs_shift(&f->a[i], lo);
        mpq_clear(lo);
    }
    rs_clear(&g);
    rs_clear(&q);
    rs_clear(&r);
    return ok;
}

/* pseudo-division: lc(b)^k a = q b + r with deg r < deg b (q may be NULL) */
static bool pdiv(rupoly *q, rupoly *r, const rupoly *a, const rupoly *b)
{
    size_t nb = deg(b);
    if (nb == 0 || !ru_set(r, a))
        return false;
    trim(r);
    if (q) {
        ru_clear(q);
        if (!ru_init(q, r->n >= nb ? r->n - nb + 1 : 1))
            return false;
    }
    const rseries *lb = &b->a[nb - 1];
    rnum mone;
    rn_init(&mone);
    rn_set_si(&mone, -1);
    mpq_t z;
    mpq_init(z);
    rseries t, lr;
    rs_init(&t);
    rs_init(&lr);
    bool ok = true;
    while (ok && r->n >= nb) {
        size_t before = r->n, sh = r->n - nb;
        ok = rs_set(&lr, &r->a[r->n - 1]);
        for (size_t i = 0; ok && q && i < q->n; i++)
            ok = rs_mul(&t, &q->a[i], lb) && rs_set(&q->a[i], &t);
        if (ok && q) {
            rnum one;
            rn_init(&one);
            rn_set_si(&one, 1);
            ok = rs_addmul(&q->a[sh], &lr, &one, z);
            rn_clear(&one);
        }
        for (size_t i = 0; ok && i < r->n; i++)
            ok = rs_mul(&t, &r->a[i], lb) && rs_set(&r->a[i], &t);
        for (size_t i = 0; ok && i < nb; i++)
            ok = rs_mul(&t, &lr, &b->a[i]) && rs_addmul(&r->a[i + sh], &t, &mone, z);
        if (ok) {
            trim(r);
            if (r->n >= before)
                ok = false;
        }
    }
    rn_clear(&mone);
    mpq_clear(z);
    rs_clear(&t);
    rs_clear(&lr);
    return ok;
}

static bool deriv(rupoly *d, const rupoly *f)
{
    ru_clear(d);
    if (!ru_init(d, f->n > 1 ? f->n - 1 : 1))
        return false;
    rnum k;
    rn_init(&k);
    mpq_t z;
    mpq_init(z);
    bool ok = true;
    for (size_t i = 1; ok && i < f->n; i++) {
        rn_set_si(&k, (long)i);
        ok = rs_addmul(&d->a[i - 1], &f->a[i], &k, z);
    }
    rn_clear(&k);
    mpq_clear(z);
    trim(d);
    return ok;
}

/* size budget: the decomposition is abandoned (the caller falls back to separating
 * branches) when a polynomial of the remainder sequence grows past it */
static bool too_big(const rupoly *f)
{
    size_t terms = 0, bits = 0;
    for (size_t i = 0; i < f->n; i++) {
        terms += f->a[i].len;
        for (size_t k = 0; k < f->a[i].len; k++) {
            size_t b = mpz_sizeinbase(mpq_numref(f->a[i].c[k].q), 2) +
                       mpz_sizeinbase(mpq_denref(f->a[i].c[k].q), 2);
            if (b > bits)
                bits = b;
        }
    }
    return terms > 4000 || bits > 20000;
}

/* primitive gcd in Q[T][x] */
static bool gcd_x(rupoly *g, const rupoly *a0, const rupoly *b0)
{
    rupoly a = {0, NULL}, b = {0, NULL}, r = {0, NULL};
    bool ok = ru_set(&a, a0) && ru_set(&b, b0) && primitive(&a) && primitive(&b);
    if (ok && deg(&a) < deg(&b)) {
        rupoly t = a;
        a = b;
        b = t;
    }
    int steps = 0;
    while (ok && deg(&b) > 0) {
        if (++steps > 10000) {
            ok = false;
            break;
        }
        ok = pdiv(NULL, &r, &a, &b) && !too_big(&r) && primitive(&r);
        if (!ok)
            break;
        ru_clear(&a);
        a = b;
        b = r;
        r.n = 0;
        r.a = NULL;
    }
    if (ok)
        ok = primitive(&a);
    if (ok) {
        ru_clear(g);
        *g = a;
        a.a = NULL;
        a.n = 0;
    }
    ru_clear(&a);
    ru_clear(&b);
    ru_clear(&r);
    return ok;
}

/* q = a / b exactly (up to a scalar), primitive */
static bool div_x(rupoly *q, const rupoly *a, const rupoly *b)
{
    rupoly r = {0, NULL};
    bool ok = pdiv(q, &r, a, b) && deg(&r) == 0 && primitive(q);
    ru_clear(&r);
    return ok;
}

/* cheap certificate: f specialised at t^(1/D) = 2/3 (D the common denominator of the
 * exponents) and reduced modulo the prime q = 2^61 - 1 keeps its degree and is
 * square-free over F_q; then the specialisation is square-free over Q, hence so is f
 * over Q(t^(1/D)) (a square factor would survive both steps). */
static bool squarefree_at_point(const rupoly *f)
{
    size_t n = deg(f);
    if (n < 2)
        return true;
    mpz_t D, q, T0, v, inv;
    mpz_init_set_ui(D, 1);
    mpz_init(q);
    mpz_init(T0);
    mpz_init(v);
    mpz_init(inv);
    mpz_ui_pow_ui(q, 2, 61);
    mpz_sub_ui(q, q, 1);
    /* T0 = 2/3 mod q */
    mpz_set_ui(inv, 3);
    mpz_invert(inv, inv, q);
    mpz_mul_ui(T0, inv, 2);
    mpz_mod(T0, T0, q);
    for (size_t i = 0; i < n; i++)
        for (size_t k = 0; k < f->a[i].len; k++)
            mpz_lcm(D, D, mpq_denref(f->a[i].e[k]));
    mpz_t *g = malloc(n * sizeof *g);
    bool ok = g != NULL;
    for (size_t i = 0; ok && i < n; i++)
        mpz_init(g[i]);
    mpq_t e;
    mpq_init(e);
    for (size_t i = 0; ok && i < n; i++) {
        for (size_t k = 0; ok && k < f->a[i].len; k++) {
            mpq_set_z(e, D);
            mpq_mul(e, e, f->a[i].e[k]); /* an integer m: t^e = T0^m */
            if (mpz_sgn(mpq_numref(e)) < 0) {
                mpz_invert(v, T0, q);
                mpz_neg(mpq_numref(e), mpq_numref(e));
            } else
                mpz_set(v, T0);
            mpz_powm(v, v, mpq_numref(e), q);
            const mpq_t *c = (const mpq_t *)&f->a[i].c[k].q;
            if (!mpz_invert(inv, mpq_denref(*c), q)) {
                ok = false;
                break;
            }
            mpz_mul(v, v, inv);
            mpz_mul(v, v, mpq_numref(*c));
            mpz_add(g[i], g[i], v);
            mpz_mod(g[i], g[i], q);
        }
    }
    bool sqf = false;
    if (ok && mpz_sgn(g[n - 1]) != 0 && !fp_is_squarefree((const mpz_t *)g, n, q, &sqf))
        sqf = false;
    if (g)
        for (size_t i = 0; i < n; i++)
            mpz_clear(g[i]);
    free(g);
    mpq_clear(e);
    mpz_clear(D);
    mpz_clear(q);
    mpz_clear(T0);
    mpz_clear(v);
    mpz_clear(inv);
    return sqf;
}

bool roots_squarefree(const rupoly *f, rupoly **parts, size_t *nparts)
{
    *parts = NULL;
    *nparts = 0;
    for (size_t i = 0; i < f->n; i++)
        if (!rs_exact(&f->a[i]))
            return false;
    if (squarefree_at_point(f)) {
        rupoly *h = calloc(1, sizeof *h);
        if (!h || !ru_set(&h[0], f)) {
            free(h);
            return false;
        }
        *parts = h;
        *nparts = 1;
        return true;
    }
    size_t cap = deg(f) + 2;
    rupoly *g = calloc(cap, sizeof *g);
    rupoly *sq = calloc(cap, sizeof *sq);
    if (!g || !sq) {
        free(g);
        free(sq);
        return false;
    }
    size_t ng = 0;
    bool ok = ru_set(&g[0], f) && primitive(&g[0]);
    ng = 1;
    /* g_{k+1} = gcd(g_k, g_k') until constant */
    while (ok && deg(&g[ng - 1]) > 1 && ng < cap) {
        rupoly d = {0, NULL};
        ok = deriv(&d, &g[ng - 1]) && gcd_x(&g[ng], &g[ng - 1], &d);
        ru_clear(&d);
        if (ok)
            ng++;
    }
    /* s_k = g_k / g_{k+1}, k = 0..ng-2 (s_{ng-1} = g_{ng-1}, a constant or linear) */
    size_t ns = 0;
    for (size_t k = 0; ok && k + 1 < ng; k++) {
        ok = div_x(&sq[k], &g[k], &g[k + 1]);
        ns = k + 1;
    }
    if (ok && ng >= 1 && deg(&g[ng - 1]) > 1) {
        ok = ru_set(&sq[ns], &g[ng - 1]);
        ns++;
    }
    rupoly *h = ok ? calloc(ns ? ns : 1, sizeof *h) : NULL;
    if (ok && !h)
        ok = false;
    for (size_t k = 0; ok && k < ns; k++) {
        if (k + 1 < ns)
            ok = div_x(&h[k], &sq[k], &sq[k + 1]);
        else
            ok = ru_set(&h[k], &sq[k]);
    }
    for (size_t k = 0; k < cap; k++) {
        ru_clear(&g[k]);
        ru_clear(&sq[k]);
    }
    free(g);
    free(sq);
    if (!ok) {
        if (h)
            for (size_t k = 0; k < ns; k++)
                ru_clear(&h[k]);
        free(h);
        return false;
    }
    *parts = h;
    *nparts = ns;
    return true;
}
