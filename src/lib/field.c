/* field.c — the valued fields and their coefficients (see trope/field.h).
 *
 * Coefficient arithmetic has void signatures (like GMP's); running out of memory in
 * it aborts, as GMP itself does. Everything else reports through tp_error.
 */
#include "trope/field.h"

#include <ctype.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------- memory */

static void *xrealloc(void *p, size_t n, size_t size)
{
    if (n && size > (size_t)-1 / n)
        abort();
    void *q = realloc(p, n * size != 0 ? n * size : 1);
    if (!q)
        abort(); /* void arithmetic API: out of memory is fatal, as in GMP */
    return q;
}

/* Growable string used by the printers. */
typedef struct {
    char *s;
    size_t len, cap;
    bool bad;
} sbuf;

static void sb_putn(sbuf *b, const char *s, size_t n)
{
    if (b->bad)
        return;
    if (b->len + n + 1 > b->cap) {
        size_t nc = b->cap ? b->cap : 32;
        while (nc < b->len + n + 1)
            nc *= 2;
        char *q = realloc(b->s, nc);
        if (!q) {
            b->bad = true;
            return;
        }
        b->s = q;
        b->cap = nc;
    }
    memcpy(b->s + b->len, s, n);
    b->len += n;
    b->s[b->len] = 0;
}
static void sb_puts(sbuf *b, const char *s) { sb_putn(b, s, strlen(s)); }
static void sb_putq(sbuf *b, const mpq_t q)
{
    char *s = mpq_get_str(NULL, 10, q);
    sb_puts(b, s);
    void (*freefunc)(void *, size_t);
    mp_get_memory_functions(NULL, NULL, &freefunc);
    freefunc(s, strlen(s) + 1);
}
static char *sb_finish(sbuf *b)
{
    if (b->bad) {
        free(b->s);
        return NULL;
    }
    if (!b->s)
        sb_puts(b, "");
    return b->s;
}

/* ---------------------------------------------------------------- fields */

void tp_field_init(tp_field *F)
{
    F->kind = TP_FIELD_TRIVIAL;
    mpz_init(F->p);
    F->param[0] = 0;
}

void tp_field_clear(tp_field *F) { mpz_clear(F->p); }

void tp_field_set(tp_field *dst, const tp_field *src)
{
    dst->kind = src->kind;
    mpz_set(dst->p, src->p);
    memcpy(dst->param, src->param, sizeof dst->param);
}

static bool is_ident_start(int c) { return isalpha(c) || c == '_'; }
static bool is_ident_char(int c) { return isalnum(c) || c == '_'; }

tp_status tp_field_parse(tp_field *F, const char *spec, tp_error *err)
{
    const unsigned char *s = (const unsigned char *)spec;
    size_t i = 0;
    while (s[i] == ' ' || s[i] == '\t')
        i++;
    size_t start = i;
    if (!s[i])
        return tp_error_set(err, TP_ESYNTAX, 0, (int)i + 1,
                            "expected a field: p=PRIME, Q, C or a parameter name such as t");
    if (!is_ident_start(s[i]))
        return tp_error_set(err, TP_ESYNTAX, 0, (int)i + 1,
                            "expected a field (p=PRIME, Q, C or a parameter name such as t), "
                            "found '%c'", isprint(s[i]) ? s[i] : '?');
    while (is_ident_char(s[i]))
        i++;
    size_t idlen = i - start;
    size_t j = i;
    while (s[j] == ' ' || s[j] == '\t')
        j++;
    if (idlen == 1 && s[start] == 'p' && s[j] == '=') {
        j++;
        while (s[j] == ' ' || s[j] == '\t')
            j++;
        size_t ns = j;
        bool neg = false;
        if (s[j] == '-' || s[j] == '+') {
            neg = s[j] == '-';
            j++;
        }
        size_t ds = j;
        while (isdigit(s[j]))
            j++;
        if (j == ds)
            return tp_error_set(err, TP_ESYNTAX, 0, (int)j + 1,
                                "expected a prime number after 'p='");
        size_t de = j;
        while (s[j] == ' ' || s[j] == '\t')
            j++;
        if (s[j])
            return tp_error_set(err, TP_ESYNTAX, 0, (int)j + 1,
                                "expected the end of the field after the prime, found '%c'",
                                isprint(s[j]) ? s[j] : '?');
        char *digits = malloc(de - ds + 1);
        if (!digits)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        memcpy(digits, s + ds, de - ds);
        digits[de - ds] = 0;
        mpz_t p;
        mpz_init(p);
        mpz_set_str(p, digits, 10);
        free(digits);
        if (neg)
            mpz_neg(p, p);
        tp_status st = TP_OK;
        if (mpz_cmp_ui(p, 2) < 0) {
            st = tp_error_set(err, TP_EDOMAIN, 0, (int)ns + 1,
                              "p must be a prime number (2, 3, 5, 7, ...), found %s%.*s",
                              neg ? "-" : "", (int)(de - ds > 40 ? 40 : de - ds), spec + ds);
        } else if (!mpz_probab_prime_p(p, 30)) {
            st = tp_error_set(err, TP_EDOMAIN, 0, (int)ns + 1,
                              "p must be a prime number, but %.*s%s is not prime",
                              (int)(de - ds > 40 ? 40 : de - ds), spec + ds,
                              de - ds > 40 ? "..." : "");
        }
        if (st == TP_OK) {
            F->kind = TP_FIELD_PADIC;
            mpz_set(F->p, p);
            F->param[0] = 0;
        }
        mpz_clear(p);
        return st;
    }
    if (s[j])
        return tp_error_set(err, TP_ESYNTAX, 0, (int)j + 1,
                            "expected a field: p=PRIME, Q, C or a parameter name such as t; "
                            "found '%c' after '%.*s'", isprint(s[j]) ? s[j] : '?',
                            (int)(idlen > 40 ? 40 : idlen), spec + start);
    if (idlen == 1 && s[start] == 'Q') {
        F->kind = TP_FIELD_TRIVIAL;
        mpz_set_ui(F->p, 0);
        F->param[0] = 0;
        return TP_OK;
    }
    if (idlen == 1 && s[start] == 'C') {
        F->kind = TP_FIELD_COMPLEX;
        mpz_set_ui(F->p, 0);
        F->param[0] = 0;
        return TP_OK;
    }
    if (idlen >= sizeof F->param)
        return tp_error_set(err, TP_ESYNTAX, 0, (int)start + 1,
                            "the parameter name is too long (at most %zu characters)",
                            sizeof F->param - 1);
    F->kind = TP_FIELD_PUISEUX;
    mpz_set_ui(F->p, 0);
    memcpy(F->param, spec + start, idlen);
    F->param[idlen] = 0;
    return TP_OK;
}

void tp_field_describe(const tp_field *F, char *buf, size_t size)
{
    switch (F->kind) {
    case TP_FIELD_PADIC: {
        char *p = mpz_get_str(NULL, 10, F->p);
        if (p && strlen(p) <= 40)
            snprintf(buf, size, "Q_%s (%s-adic)", p, p);
        else
            snprintf(buf, size, "Q_p (p-adic, p of %zu digits)", p ? strlen(p) : 0);
        if (p) {
            void (*freefunc)(void *, size_t);
            mp_get_memory_functions(NULL, NULL, &freefunc);
            freefunc(p, strlen(p) + 1);
        }
        break;
    }
    case TP_FIELD_PUISEUX:
        snprintf(buf, size, "Puiseux series in %s", F->param);
        break;
    case TP_FIELD_COMPLEX:
        snprintf(buf, size, "C (complex)");
        break;
    default:
        snprintf(buf, size, "Q (trivial valuation)");
        break;
    }
}

/* ------------------------------------------------------ Puiseux polynomials */

static void pp_reserve(tp_ppoly *p, size_t n)
{
    if (n <= p->cap)
        return;
    size_t nc = p->cap ? p->cap : 2;
    while (nc < n)
        nc *= 2;
    p->exp = xrealloc(p->exp, nc, sizeof *p->exp);
    p->coef = xrealloc(p->coef, nc, sizeof *p->coef);
    for (size_t k = p->cap; k < nc; k++) {
        mpq_init(p->exp[k]);
        mpq_init(p->coef[k]);
    }
    p->cap = nc;
}

void tp_ppoly_init(tp_ppoly *p)
{
    p->len = p->cap = 0;
    p->exp = p->coef = NULL;
}

void tp_ppoly_clear(tp_ppoly *p)
{
    for (size_t k = 0; k < p->cap; k++) {
        mpq_clear(p->exp[k]);
        mpq_clear(p->coef[k]);
    }
    free(p->exp);
    free(p->coef);
    tp_ppoly_init(p);
}

void tp_ppoly_set(tp_ppoly *r, const tp_ppoly *a)
{
    if (r == a)
        return;
    pp_reserve(r, a->len);
    for (size_t k = 0; k < a->len; k++) {
        mpq_set(r->exp[k], a->exp[k]);
        mpq_set(r->coef[k], a->coef[k]);
    }
    r->len = a->len;
}

static void pp_swap(tp_ppoly *a, tp_ppoly *b)
{
    tp_ppoly t = *a;
    *a = *b;
    *b = t;
}

/* r = c * t^e (c may be 0). */
static void pp_set_term(tp_ppoly *r, const mpq_t c, const mpq_t e)
{
    if (mpq_sgn(c) == 0) {
        r->len = 0;
        return;
    }
    pp_reserve(r, 1);
    mpq_set(r->coef[0], c);
    mpq_set(r->exp[0], e);
    r->len = 1;
}

static void pp_set_one(tp_ppoly *r)
{
    pp_reserve(r, 1);
    mpq_set_ui(r->coef[0], 1, 1);
    mpq_set_ui(r->exp[0], 0, 1);
    r->len = 1;
}

static bool pp_is_one(const tp_ppoly *a)
{
    return a->len == 1 && mpq_sgn(a->exp[0]) == 0 && mpq_cmp_ui(a->coef[0], 1, 1) == 0;
}

static bool pp_equal(const tp_ppoly *a, const tp_ppoly *b)
{
    if (a->len != b->len)
        return false;
    for (size_t k = 0; k < a->len; k++)
        if (!mpq_equal(a->exp[k], b->exp[k]) || !mpq_equal(a->coef[k], b->coef[k]))
            return false;
    return true;
}

/* r = a + sign*b */
static void pp_addsub(tp_ppoly *r, const tp_ppoly *a, const tp_ppoly *b, int sign)
{
    tp_ppoly t;
    tp_ppoly_init(&t);
    pp_reserve(&t, a->len + b->len);
    size_t i = 0, j = 0, n = 0;
    while (i < a->len || j < b->len) {
        int c;
        if (i == a->len)
            c = 1;
        else if (j == b->len)
            c = -1;
        else
            c = mpq_cmp(a->exp[i], b->exp[j]);
        if (c < 0) {
            mpq_set(t.exp[n], a->exp[i]);
            mpq_set(t.coef[n], a->coef[i]);
            i++;
        } else if (c > 0) {
            mpq_set(t.exp[n], b->exp[j]);
            if (sign < 0)
                mpq_neg(t.coef[n], b->coef[j]);
            else
                mpq_set(t.coef[n], b->coef[j]);
            j++;
        } else {
            mpq_set(t.exp[n], a->exp[i]);
            if (sign < 0)
                mpq_sub(t.coef[n], a->coef[i], b->coef[j]);
            else
                mpq_add(t.coef[n], a->coef[i], b->coef[j]);
            i++;
            j++;
            if (mpq_sgn(t.coef[n]) == 0)
                continue;
        }
        n++;
    }
    t.len = n;
    pp_swap(r, &t);
    tp_ppoly_clear(&t);
}

/* r = a * c * t^e */
static void pp_scale(tp_ppoly *r, const tp_ppoly *a, const mpq_t c, const mpq_t e)
{
    if (mpq_sgn(c) == 0) {
        r->len = 0;
        return;
    }
    pp_reserve(r, a->len);
    for (size_t k = 0; k < a->len; k++) {
        mpq_mul(r->coef[k], a->coef[k], c);
        mpq_add(r->exp[k], a->exp[k], e);
    }
    r->len = a->len;
}

static void pp_neg(tp_ppoly *r, const tp_ppoly *a)
{
    tp_ppoly_set(r, a);
    for (size_t k = 0; k < r->len; k++)
        mpq_neg(r->coef[k], r->coef[k]);
}

/* Merge sort of an index array by exponent. */
static void idx_sort(size_t *ix, size_t *tmp, size_t n, mpq_t *key)
{
    if (n < 2)
        return;
    size_t h = n / 2;
    idx_sort(ix, tmp, h, key);
    idx_sort(ix + h, tmp, n - h, key);
    size_t i = 0, j = h, k = 0;
    while (i < h && j < n)
        tmp[k++] = mpq_cmp(key[ix[j]], key[ix[i]]) < 0 ? ix[j++] : ix[i++];
    while (i < h)
        tmp[k++] = ix[i++];
    while (j < n)
        tmp[k++] = ix[j++];
    memcpy(ix, tmp, n * sizeof *ix);
}

static void pp_mul(tp_ppoly *r, const tp_ppoly *a, const tp_ppoly *b)
{
    if (a->len == 0 || b->len == 0) {
        r->len = 0;
        return;
    }
    if (a->len == 1 || b->len == 1) {
        const tp_ppoly *m = a->len == 1 ? a : b, *o = a->len == 1 ? b : a;
        tp_ppoly t;
        tp_ppoly_init(&t);
        pp_scale(&t, o, m->coef[0], m->exp[0]);
        pp_swap(r, &t);
        tp_ppoly_clear(&t);
        return;
    }
    size_t n = a->len * b->len;
    tp_ppoly prod;
    tp_ppoly_init(&prod);
    pp_reserve(&prod, n);
    size_t k = 0;
    for (size_t i = 0; i < a->len; i++)
        for (size_t j = 0; j < b->len; j++, k++) {
            mpq_add(prod.exp[k], a->exp[i], b->exp[j]);
            mpq_mul(prod.coef[k], a->coef[i], b->coef[j]);
        }
    size_t *ix = xrealloc(NULL, n, sizeof *ix), *tmp = xrealloc(NULL, n, sizeof *tmp);
    for (k = 0; k < n; k++)
        ix[k] = k;
    idx_sort(ix, tmp, n, prod.exp);
    tp_ppoly t;
    tp_ppoly_init(&t);
    pp_reserve(&t, n);
    size_t m = 0;
    for (k = 0; k < n;) {
        size_t q = ix[k];
        mpq_set(t.exp[m], prod.exp[q]);
        mpq_set(t.coef[m], prod.coef[q]);
        k++;
        while (k < n && mpq_equal(prod.exp[ix[k]], t.exp[m]))
            mpq_add(t.coef[m], t.coef[m], prod.coef[ix[k++]]);
        if (mpq_sgn(t.coef[m]) != 0)
            m++;
    }
    t.len = m;
    free(ix);
    free(tmp);
    tp_ppoly_clear(&prod);
    pp_swap(r, &t);
    tp_ppoly_clear(&t);
}

/* ------------------------------------------- gcd reduction of num/den (Puiseux) */

/* Dense polynomial in u with mpq coefficients, degree deg (coef[deg] != 0), or
 * deg = -1 for zero. */
typedef struct {
    long deg;
    mpq_t *c;
    long cap;
} dpoly;

static void dp_init(dpoly *p, long cap)
{
    p->cap = cap;
    p->deg = -1;
    p->c = xrealloc(NULL, (size_t)cap, sizeof *p->c);
    for (long k = 0; k < cap; k++)
        mpq_init(p->c[k]);
}
static void dp_clear(dpoly *p)
{
    for (long k = 0; k < p->cap; k++)
        mpq_clear(p->c[k]);
    free(p->c);
}
static void dp_trim(dpoly *p)
{
    while (p->deg >= 0 && mpq_sgn(p->c[p->deg]) == 0)
        p->deg--;
}
static void dp_copy(dpoly *r, const dpoly *a)
{
    for (long k = 0; k <= a->deg; k++)
        mpq_set(r->c[k], a->c[k]);
    for (long k = a->deg + 1; k <= r->deg; k++)
        mpq_set_ui(r->c[k], 0, 1);
    r->deg = a->deg;
}
/* a = a mod b (b nonzero), quotient into q if q != NULL. */
static void dp_divrem(dpoly *a, const dpoly *b, dpoly *q)
{
    mpq_t f, t;
    mpq_init(f);
    mpq_init(t);
    if (q) {
        for (long k = 0; k <= q->deg; k++)
            mpq_set_ui(q->c[k], 0, 1);
        q->deg = a->deg - b->deg;
        if (q->deg < 0)
            q->deg = -1;
    }
    while (a->deg >= b->deg) {
        long s = a->deg - b->deg;
        mpq_div(f, a->c[a->deg], b->c[b->deg]);
        if (q)
            mpq_set(q->c[s], f);
        for (long k = 0; k <= b->deg; k++) {
            mpq_mul(t, f, b->c[k]);
            mpq_sub(a->c[k + s], a->c[k + s], t);
        }
        mpq_set_ui(a->c[a->deg], 0, 1);
        dp_trim(a);
    }
    mpq_clear(f);
    mpq_clear(t);
}

/* Make p monic (keeps the coefficients of Euclid's remainders small). */
static void dp_monic(dpoly *p)
{
    if (p->deg < 0 || mpq_cmp_ui(p->c[p->deg], 1, 1) == 0)
        return;
    mpq_t l;
    mpq_init(l);
    mpq_inv(l, p->c[p->deg]);
    for (long k = 0; k <= p->deg; k++)
        mpq_mul(p->c[k], p->c[k], l);
    mpq_clear(l);
}

#define GCD_MAX_DEGREE 400

/* Reduce num/den to lowest terms when both are small enough for dense Euclid.
 * den's lowest term is 1*t^0 on entry; on exit num/den are scaled back so again. */
static void puiseux_reduce(tp_ppoly *num, tp_ppoly *den)
{
    if (num->len == 0 || pp_is_one(den) || den->len < 2)
        return;
    /* L = lcm of exponent denominators; shift num so its lowest exponent is 0 */
    mpz_t L;
    mpz_init_set_ui(L, 1);
    for (size_t k = 0; k < num->len; k++)
        mpz_lcm(L, L, mpq_denref(num->exp[k]));
    for (size_t k = 0; k < den->len; k++)
        mpz_lcm(L, L, mpq_denref(den->exp[k]));
    mpq_t shift, d, Lq;
    mpq_init(shift);
    mpq_init(d);
    mpq_init(Lq);
    mpq_set(shift, num->exp[0]);
    mpq_set_z(Lq, L);
    long dn = 0, dd = 0;
    bool ok = true;
    mpq_sub(d, num->exp[num->len - 1], shift);
    mpq_mul(d, d, Lq);
    if (mpz_cmp_ui(mpq_numref(d), GCD_MAX_DEGREE) > 0)
        ok = false;
    else
        dn = (long)mpz_get_ui(mpq_numref(d));
    mpq_mul(d, den->exp[den->len - 1], Lq);
    if (mpz_cmp_ui(mpq_numref(d), GCD_MAX_DEGREE) > 0)
        ok = false;
    else
        dd = (long)mpz_get_ui(mpq_numref(d));
    if (ok) {
        dpoly A, B, G, R;
        dp_init(&A, dn + 1);
        dp_init(&B, dd + 1);
        long mx = dn > dd ? dn : dd;
        dp_init(&G, mx + 1);
        dp_init(&R, mx + 1);
        for (size_t k = 0; k < num->len; k++) {
            mpq_sub(d, num->exp[k], shift);
            mpq_mul(d, d, Lq);
            mpq_set(A.c[mpz_get_ui(mpq_numref(d))], num->coef[k]);
        }
        A.deg = dn;
        for (size_t k = 0; k < den->len; k++) {
            mpq_mul(d, den->exp[k], Lq);
            mpq_set(B.c[mpz_get_ui(mpq_numref(d))], den->coef[k]);
        }
        B.deg = dd;
        /* G = gcd(A, B) by Euclid on copies */
        dp_copy(&G, &A);
        dp_copy(&R, &B);
        while (R.deg >= 0) {
            dp_monic(&R);
            dp_divrem(&G, &R, NULL);
            /* swap G and R */
            dpoly t = G;
            G = R;
            R = t;
        }
        if (G.deg > 0) {
            dpoly Q;
            dp_init(&Q, mx + 1);
            dp_divrem(&A, &G, &Q); /* A becomes remainder 0 */
            tp_ppoly nn, nd;
            tp_ppoly_init(&nn);
            tp_ppoly_init(&nd);
            pp_reserve(&nn, (size_t)Q.deg + 1);
            for (long k = 0; k <= Q.deg; k++)
                if (mpq_sgn(Q.c[k])) {
                    mpq_set_si(d, k, 1);
                    mpq_div(nn.exp[nn.len], d, Lq);
                    mpq_add(nn.exp[nn.len], nn.exp[nn.len], shift);
                    mpq_set(nn.coef[nn.len], Q.c[k]);
                    nn.len++;
                }
            dp_divrem(&B, &G, &Q);
            pp_reserve(&nd, (size_t)Q.deg + 1);
            for (long k = 0; k <= Q.deg; k++)
                if (mpq_sgn(Q.c[k])) {
                    mpq_set_si(d, k, 1);
                    mpq_div(nd.exp[nd.len], d, Lq);
                    mpq_set(nd.coef[nd.len], Q.c[k]);
                    nd.len++;
                }
            /* rescale so that den's lowest term is 1*t^0 (it is t^0: g(0) != 0) */
            mpq_inv(d, nd.coef[0]);
            mpq_set_ui(Lq, 0, 1);
            pp_scale(num, &nn, d, Lq);
            pp_scale(den, &nd, d, Lq);
            tp_ppoly_clear(&nn);
            tp_ppoly_clear(&nd);
            dp_clear(&Q);
        }
        dp_clear(&A);
        dp_clear(&B);
        dp_clear(&G);
        dp_clear(&R);
    }
    mpq_clear(shift);
    mpq_clear(d);
    mpq_clear(Lq);
    mpz_clear(L);
}

/* Restore the PUISEUX invariants: den != 0 with lowest term 1*t^0, lowest terms. */
static void puiseux_normalize(tp_coeff *c)
{
    if (c->num.len == 0) {
        pp_set_one(&c->den);
        return;
    }
    if (!(mpq_cmp_ui(c->den.coef[0], 1, 1) == 0 && mpq_sgn(c->den.exp[0]) == 0)) {
        mpq_t s, e;
        mpq_init(s);
        mpq_init(e);
        mpq_inv(s, c->den.coef[0]);
        mpq_neg(e, c->den.exp[0]);
        pp_scale(&c->num, &c->num, s, e);
        pp_scale(&c->den, &c->den, s, e);
        mpq_clear(s);
        mpq_clear(e);
    }
    puiseux_reduce(&c->num, &c->den);
}

/* ------------------------------------------------------------ coefficients */

void tp_coeff_init(tp_coeff *c)
{
    mpq_init(c->q);
    mpq_init(c->im);
    tp_ppoly_init(&c->num);
    tp_ppoly_init(&c->den);
}

void tp_coeff_clear(tp_coeff *c)
{
    mpq_clear(c->q);
    mpq_clear(c->im);
    tp_ppoly_clear(&c->num);
    tp_ppoly_clear(&c->den);
}

void tp_coeff_set(tp_coeff *r, const tp_coeff *a)
{
    if (r == a)
        return;
    mpq_set(r->q, a->q);
    mpq_set(r->im, a->im);
    tp_ppoly_set(&r->num, &a->num);
    tp_ppoly_set(&r->den, &a->den);
}

void tp_coeff_set_q(tp_coeff *r, const mpq_t a, const tp_field *F)
{
    if (F->kind == TP_FIELD_PUISEUX) {
        mpq_t z;
        mpq_init(z);
        pp_set_term(&r->num, a, z);
        pp_set_one(&r->den);
        mpq_clear(z);
        return;
    }
    mpq_set(r->q, a);
    mpq_set_ui(r->im, 0, 1);
}

void tp_coeff_set_si(tp_coeff *r, long a, const tp_field *F)
{
    mpq_t q;
    mpq_init(q);
    mpq_set_si(q, a, 1);
    tp_coeff_set_q(r, q, F);
    mpq_clear(q);
}

void tp_coeff_set_imag_q(tp_coeff *r, const mpq_t a, const tp_field *F)
{
    (void)F;
    mpq_set_ui(r->q, 0, 1);
    mpq_set(r->im, a);
}

void tp_coeff_set_param_pow(tp_coeff *r, const mpq_t e, const tp_field *F)
{
    (void)F;
    mpq_t one;
    mpq_init(one);
    mpq_set_ui(one, 1, 1);
    pp_set_term(&r->num, one, e);
    pp_set_one(&r->den);
    mpq_clear(one);
}

bool tp_coeff_is_zero(const tp_coeff *a, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PUISEUX: return a->num.len == 0;
    case TP_FIELD_COMPLEX: return mpq_sgn(a->q) == 0 && mpq_sgn(a->im) == 0;
    default: return mpq_sgn(a->q) == 0;
    }
}

bool tp_coeff_is_one(const tp_coeff *a, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PUISEUX: return pp_is_one(&a->num) && pp_is_one(&a->den);
    case TP_FIELD_COMPLEX: return mpq_cmp_ui(a->q, 1, 1) == 0 && mpq_sgn(a->im) == 0;
    default: return mpq_cmp_ui(a->q, 1, 1) == 0;
    }
}

bool tp_coeff_equal(const tp_coeff *a, const tp_coeff *b, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PUISEUX: {
        if (pp_equal(&a->den, &b->den))
            return pp_equal(&a->num, &b->num);
        tp_ppoly x, y;
        tp_ppoly_init(&x);
        tp_ppoly_init(&y);
        pp_mul(&x, &a->num, &b->den);
        pp_mul(&y, &b->num, &a->den);
        bool eq = pp_equal(&x, &y);
        tp_ppoly_clear(&x);
        tp_ppoly_clear(&y);
        return eq;
    }
    case TP_FIELD_COMPLEX: return mpq_equal(a->q, b->q) && mpq_equal(a->im, b->im);
    default: return mpq_equal(a->q, b->q);
    }
}

void tp_coeff_neg(tp_coeff *r, const tp_coeff *a, const tp_field *F)
{
    if (F->kind == TP_FIELD_PUISEUX) {
        pp_neg(&r->num, &a->num);
        tp_ppoly_set(&r->den, &a->den);
        return;
    }
    mpq_neg(r->q, a->q);
    mpq_neg(r->im, a->im);
}

static void puiseux_addsub(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, int sign)
{
    if (pp_equal(&a->den, &b->den)) {
        pp_addsub(&r->num, &a->num, &b->num, sign);
        tp_ppoly_set(&r->den, &a->den);
    } else {
        tp_ppoly x, y, d;
        tp_ppoly_init(&x);
        tp_ppoly_init(&y);
        tp_ppoly_init(&d);
        pp_mul(&x, &a->num, &b->den);
        pp_mul(&y, &b->num, &a->den);
        pp_mul(&d, &a->den, &b->den);
        pp_addsub(&r->num, &x, &y, sign);
        pp_swap(&r->den, &d);
        tp_ppoly_clear(&x);
        tp_ppoly_clear(&y);
        tp_ppoly_clear(&d);
    }
    puiseux_normalize(r);
}

void tp_coeff_add(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, const tp_field *F)
{
    if (F->kind == TP_FIELD_PUISEUX) {
        puiseux_addsub(r, a, b, 1);
        return;
    }
    mpq_add(r->q, a->q, b->q);
    mpq_add(r->im, a->im, b->im);
}

void tp_coeff_sub(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, const tp_field *F)
{
    if (F->kind == TP_FIELD_PUISEUX) {
        puiseux_addsub(r, a, b, -1);
        return;
    }
    mpq_sub(r->q, a->q, b->q);
    mpq_sub(r->im, a->im, b->im);
}

void tp_coeff_mul(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PUISEUX: {
        tp_ppoly n, d;
        tp_ppoly_init(&n);
        tp_ppoly_init(&d);
        pp_mul(&n, &a->num, &b->num);
        if (pp_is_one(&a->den))
            tp_ppoly_set(&d, &b->den);
        else if (pp_is_one(&b->den))
            tp_ppoly_set(&d, &a->den);
        else
            pp_mul(&d, &a->den, &b->den);
        pp_swap(&r->num, &n);
        pp_swap(&r->den, &d);
        tp_ppoly_clear(&n);
        tp_ppoly_clear(&d);
        puiseux_normalize(r);
        return;
    }
    case TP_FIELD_COMPLEX: {
        mpq_t re, im, t;
        mpq_init(re);
        mpq_init(im);
        mpq_init(t);
        mpq_mul(re, a->q, b->q);
        mpq_mul(t, a->im, b->im);
        mpq_sub(re, re, t);
        mpq_mul(im, a->q, b->im);
        mpq_mul(t, a->im, b->q);
        mpq_add(im, im, t);
        mpq_swap(r->q, re);
        mpq_swap(r->im, im);
        mpq_clear(re);
        mpq_clear(im);
        mpq_clear(t);
        return;
    }
    default:
        mpq_mul(r->q, a->q, b->q);
        mpq_set_ui(r->im, 0, 1);
        return;
    }
}

tp_status tp_coeff_inv(tp_coeff *r, const tp_coeff *a, const tp_field *F, tp_error *err)
{
    if (tp_coeff_is_zero(a, F))
        return tp_error_set(err, TP_EDOMAIN, err ? err->line : 0, err ? err->col : 0,
                            "division by zero");
    switch (F->kind) {
    case TP_FIELD_PUISEUX: {
        tp_ppoly n, d;
        tp_ppoly_init(&n);
        tp_ppoly_init(&d);
        tp_ppoly_set(&n, &a->den);
        tp_ppoly_set(&d, &a->num);
        pp_swap(&r->num, &n);
        pp_swap(&r->den, &d);
        tp_ppoly_clear(&n);
        tp_ppoly_clear(&d);
        puiseux_normalize(r);
        return TP_OK;
    }
    case TP_FIELD_COMPLEX: {
        mpq_t n2, t;
        mpq_init(n2);
        mpq_init(t);
        mpq_mul(n2, a->q, a->q);
        mpq_mul(t, a->im, a->im);
        mpq_add(n2, n2, t);
        mpq_div(r->q, a->q, n2);
        mpq_div(r->im, a->im, n2);
        mpq_neg(r->im, r->im);
        mpq_clear(n2);
        mpq_clear(t);
        return TP_OK;
    }
    default:
        mpq_inv(r->q, a->q);
        mpq_set_ui(r->im, 0, 1);
        return TP_OK;
    }
}

tp_status tp_coeff_pow_si(tp_coeff *r, const tp_coeff *a, long e, const tp_field *F,
                          tp_error *err)
{
    tp_coeff base, acc;
    tp_coeff_init(&base);
    tp_coeff_init(&acc);
    tp_status st = TP_OK;
    if (e < 0) {
        st = tp_coeff_inv(&base, a, F, err);
        if (st != TP_OK)
            goto done;
    } else {
        tp_coeff_set(&base, a);
    }
    if (F->kind == TP_FIELD_PUISEUX && base.num.len == 1 && pp_is_one(&base.den)) {
        /* monomial: c^e t^(k e) directly */
        unsigned long m = e < 0 ? (unsigned long)(-(e + 1)) + 1 : (unsigned long)e;
        mpz_pow_ui(mpq_numref(acc.q), mpq_numref(base.num.coef[0]), m);
        mpz_pow_ui(mpq_denref(acc.q), mpq_denref(base.num.coef[0]), m);
        mpq_canonicalize(acc.q);
        mpq_set_ui(acc.im, m, 1);
        mpq_mul(acc.im, acc.im, base.num.exp[0]);
        pp_set_term(&r->num, acc.q, acc.im);
        pp_set_one(&r->den);
        goto done;
    }
    if (F->kind == TP_FIELD_TRIVIAL || F->kind == TP_FIELD_PADIC) {
        unsigned long m = e < 0 ? (unsigned long)(-(e + 1)) + 1 : (unsigned long)e;
        mpz_pow_ui(mpq_numref(r->q), mpq_numref(base.q), m);
        mpz_pow_ui(mpq_denref(r->q), mpq_denref(base.q), m);
        mpq_canonicalize(r->q);
        mpq_set_ui(r->im, 0, 1);
        goto done;
    }
    tp_coeff_set_si(&acc, 1, F);
    unsigned long m = e < 0 ? (unsigned long)(-(e + 1)) + 1 : (unsigned long)e;
    while (m) {
        if (m & 1)
            tp_coeff_mul(&acc, &acc, &base, F);
        m >>= 1;
        if (m)
            tp_coeff_mul(&base, &base, &base, F);
    }
    tp_coeff_set(r, &acc);
done:
    tp_coeff_clear(&base);
    tp_coeff_clear(&acc);
    return st;
}

bool tp_coeff_is_param_pow(const tp_coeff *a, mpq_t e, const tp_field *F)
{
    if (F->kind != TP_FIELD_PUISEUX)
        return false;
    if (a->num.len != 1 || !pp_is_one(&a->den) || mpq_cmp_ui(a->num.coef[0], 1, 1) != 0)
        return false;
    mpq_set(e, a->num.exp[0]);
    return true;
}

void tp_coeff_val(mpq_t v, const tp_coeff *a, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PADIC: {
        mpz_t t;
        mpz_init(t);
        long k = 0;
        if (mpq_sgn(a->q) != 0) {
            k += (long)mpz_remove(t, mpq_numref(a->q), F->p);
            k -= (long)mpz_remove(t, mpq_denref(a->q), F->p);
        }
        mpq_set_si(v, k, 1);
        mpz_clear(t);
        return;
    }
    case TP_FIELD_PUISEUX:
        if (a->num.len == 0)
            mpq_set_ui(v, 0, 1);
        else
            mpq_sub(v, a->num.exp[0], a->den.exp[0]);
        return;
    default:
        mpq_set_ui(v, 0, 1);
        return;
    }
}

void tp_coeff_residue_q(mpq_t r, const tp_coeff *a, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PADIC: {
        if (mpq_sgn(a->q) == 0) {
            mpq_set_ui(r, 0, 1);
            return;
        }
        mpz_t n, d;
        mpz_init(n);
        mpz_init(d);
        mpz_remove(n, mpq_numref(a->q), F->p);
        mpz_remove(d, mpq_denref(a->q), F->p);
        mpz_mod(n, n, F->p);
        mpz_mod(d, d, F->p);
        mpz_invert(d, d, F->p);
        mpz_mul(n, n, d);
        mpz_mod(n, n, F->p);
        mpq_set_z(r, n);
        mpz_clear(n);
        mpz_clear(d);
        return;
    }
    case TP_FIELD_PUISEUX:
        if (a->num.len == 0)
            mpq_set_ui(r, 0, 1);
        else
            mpq_div(r, a->num.coef[0], a->den.coef[0]);
        return;
    default:
        mpq_set(r, a->q);
        return;
    }
}

char *tp_coeff_residue_str(const tp_coeff *a, const tp_field *F)
{
    if (F->kind == TP_FIELD_COMPLEX)
        return tp_coeff_to_str(a, F);
    mpq_t r;
    mpq_init(r);
    tp_coeff_residue_q(r, a, F);
    sbuf b = {0};
    sb_putq(&b, r);
    mpq_clear(r);
    return sb_finish(&b);
}

/* ------------------------------------------------------------------ text */

static void put_param_pow(sbuf *b, const char *param, const mpq_t e)
{
    sb_puts(b, param);
    if (mpq_cmp_ui(e, 1, 1) == 0)
        return;
    sb_puts(b, "^");
    bool frac = mpz_cmp_ui(mpq_denref(e), 1) != 0;
    if (frac)
        sb_puts(b, "(");
    sb_putq(b, e);
    if (frac)
        sb_puts(b, ")");
}

/* ascending order, e.g. "1 + t - 3/2*t^(5/2)" ; shift is added to each exponent */
static void put_ppoly(sbuf *b, const tp_ppoly *p, const mpq_t shift, const char *param)
{
    mpq_t e, c;
    mpq_init(e);
    mpq_init(c);
    if (p->len == 0)
        sb_puts(b, "0");
    for (size_t k = 0; k < p->len; k++) {
        mpq_add(e, p->exp[k], shift);
        mpq_set(c, p->coef[k]);
        if (k > 0) {
            sb_puts(b, mpq_sgn(c) < 0 ? " - " : " + ");
            mpq_abs(c, c);
        }
        if (mpq_sgn(e) == 0) {
            sb_putq(b, c);
            continue;
        }
        if (mpq_cmp_si(c, -1, 1) == 0)
            sb_puts(b, "-");
        else if (mpq_cmp_ui(c, 1, 1) != 0) {
            sb_putq(b, c);
            sb_puts(b, "*");
        }
        put_param_pow(b, param, e);
    }
    mpq_clear(e);
    mpq_clear(c);
}

static void put_imag(sbuf *b, const mpq_t v, bool with_sign)
{
    mpq_t a;
    mpq_init(a);
    mpq_abs(a, v);
    if (mpq_sgn(v) < 0)
        sb_puts(b, "-");
    else if (with_sign)
        sb_puts(b, "+");
    if (mpz_cmp_ui(mpq_numref(a), 1) != 0) {
        char *s = mpz_get_str(NULL, 10, mpq_numref(a));
        sb_puts(b, s ? s : "?");
        void (*freefunc)(void *, size_t);
        mp_get_memory_functions(NULL, NULL, &freefunc);
        if (s)
            freefunc(s, strlen(s) + 1);
    }
    sb_puts(b, "i");
    if (mpz_cmp_ui(mpq_denref(a), 1) != 0) {
        char *s = mpz_get_str(NULL, 10, mpq_denref(a));
        sb_puts(b, "/");
        sb_puts(b, s ? s : "?");
        void (*freefunc)(void *, size_t);
        mp_get_memory_functions(NULL, NULL, &freefunc);
        if (s)
            freefunc(s, strlen(s) + 1);
    }
    mpq_clear(a);
}

char *tp_coeff_to_str(const tp_coeff *a, const tp_field *F)
{
    sbuf b = {0};
    switch (F->kind) {
    case TP_FIELD_PUISEUX: {
        mpq_t s;
        mpq_init(s);
        if (pp_is_one(&a->den)) {
            put_ppoly(&b, &a->num, s, F->param);
        } else {
            /* multiply num and den by t^k so that both have exponents >= 0 */
            if (a->num.len && mpq_sgn(a->num.exp[0]) < 0)
                mpq_neg(s, a->num.exp[0]);
            sb_puts(&b, "(");
            put_ppoly(&b, &a->num, s, F->param);
            sb_puts(&b, ")/(");
            put_ppoly(&b, &a->den, s, F->param);
            sb_puts(&b, ")");
        }
        mpq_clear(s);
        break;
    }
    case TP_FIELD_COMPLEX:
        if (mpq_sgn(a->im) == 0) {
            sb_putq(&b, a->q);
        } else if (mpq_sgn(a->q) == 0) {
            put_imag(&b, a->im, false);
        } else {
            sb_putq(&b, a->q);
            put_imag(&b, a->im, true);
        }
        break;
    default:
        sb_putq(&b, a->q);
        break;
    }
    return sb_finish(&b);
}
