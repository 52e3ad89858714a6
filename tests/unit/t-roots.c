/* t-roots.c — unit tests of the roots module: F_p factorisation, square-free
 * decomposition over Q, the complex root finder, series substitution, and whole
 * tp_roots_compute runs (counts, determinism). Reference checks are brute force
 * (irreducibility by trial division over F_p, products multiplied back; common
 * practice, no source). The published cross-checks are in tests/check/check_*.py. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "testlib.h"
#include "trope/roots.h"
#include "../../src/lib/roots_internal.h"

/* ---------------------------------------------------------------- F_p helpers */

typedef struct {
    int n;
    long c[64];
} lp; /* small polynomials over F_p with long coefficients */

static void lp_trim(lp *a)
{
    while (a->n > 0 && a->c[a->n - 1] == 0)
        a->n--;
}

static lp lp_mul(const lp *a, const lp *b, long p)
{
    lp r;
    memset(&r, 0, sizeof r);
    if (a->n == 0 || b->n == 0)
        return r;
    r.n = a->n + b->n - 1;
    for (int i = 0; i < a->n; i++)
        for (int j = 0; j < b->n; j++)
            r.c[i + j] = (r.c[i + j] + a->c[i] * b->c[j]) % p;
    lp_trim(&r);
    return r;
}

/* remainder of a by monic b */
static lp lp_rem(lp a, const lp *b, long p)
{
    while (a.n >= b->n && a.n > 0) {
        long q = a.c[a.n - 1];
        int sh = a.n - b->n;
        for (int j = 0; j < b->n; j++)
            a.c[sh + j] = ((a.c[sh + j] - q * b->c[j]) % p + p) % p;
        lp_trim(&a);
    }
    return a;
}

/* brute force: no monic factor of degree 1..deg/2 */
static bool lp_irreducible(const lp *f, long p)
{
    int d = f->n - 1;
    for (int k = 1; k <= d / 2; k++) {
        long total = 1;
        for (int i = 0; i < k; i++)
            total *= p;
        for (long idx = 0; idx < total; idx++) {
            lp g;
            memset(&g, 0, sizeof g);
            g.n = k + 1;
            long x = idx;
            for (int i = 0; i < k; i++) {
                g.c[i] = x % p;
                x /= p;
            }
            g.c[k] = 1;
            lp r = lp_rem(*f, &g, p);
            if (r.n == 0)
                return false;
        }
    }
    return true;
}

static void test_fp_factor(tp_rng *rng)
{
    static const long primes[] = {2, 3, 5, 7, 11, 13};
    long iters = 300 * tp_test_multiplier();
    for (long it = 0; it < iters; it++) {
        long p = primes[tp_rng_range(rng, 0, 5)];
        /* build f as a product of random factors, some repeated */
        lp f;
        memset(&f, 0, sizeof f);
        f.n = 1;
        f.c[0] = tp_rng_range(rng, 1, p - 1);
        int nf = (int)tp_rng_range(rng, 1, 4);
        for (int k = 0; k < nf; k++) {
            lp g;
            memset(&g, 0, sizeof g);
            g.n = (int)tp_rng_range(rng, 2, 4);
            for (int i = 0; i < g.n; i++)
                g.c[i] = tp_rng_range(rng, 0, p - 1);
            g.c[g.n - 1] = tp_rng_range(rng, 1, p - 1);
            int rep = tp_rng_range(rng, 0, 3) == 0 ? 2 : 1;
            for (int r = 0; r < rep && f.n + g.n < 40; r++)
                f = lp_mul(&f, &g, p);
        }
        mpz_t *c = malloc((size_t)f.n * sizeof *c);
        mpz_t pz, lc;
        mpz_init_set_si(pz, p);
        mpz_init(lc);
        for (int i = 0; i < f.n; i++)
            mpz_init_set_si(c[i], f.c[i]);
        fp_factor *fac = NULL;
        size_t nfac = 0;
        bool ok = fp_factor_poly((const mpz_t *)c, (size_t)f.n, pz, lc, &fac, &nfac);
        tp_check(ok, "fp_factor_poly failed (p=%ld)", p);
        /* multiply back */
        lp prod;
        memset(&prod, 0, sizeof prod);
        prod.n = 1;
        prod.c[0] = mpz_get_si(lc);
        for (size_t k = 0; ok && k < nfac; k++) {
            lp g;
            memset(&g, 0, sizeof g);
            g.n = (int)fac[k].f.n;
            for (int i = 0; i < g.n; i++)
                g.c[i] = mpz_get_si(fac[k].f.c[i]);
            tp_check(g.c[g.n - 1] == 1, "factor not monic (p=%ld it=%ld)", p, it);
            tp_check(lp_irreducible(&g, p), "factor %zu of degree %d reducible (p=%ld it=%ld)",
                     k, g.n - 1, p, it);
            for (size_t m = 0; m < fac[k].mult; m++)
                prod = lp_mul(&prod, &g, p);
            for (size_t j = 0; j < k; j++) {
                bool same = fac[j].f.n == fac[k].f.n;
                for (size_t i = 0; same && i < fac[k].f.n; i++)
                    same = mpz_cmp(fac[j].f.c[i], fac[k].f.c[i]) == 0;
                tp_check(!same, "factor listed twice (p=%ld it=%ld)", p, it);
            }
        }
        bool eq = prod.n == f.n;
        for (int i = 0; eq && i < f.n; i++)
            eq = prod.c[i] == f.c[i];
        tp_check(eq, "product of factors differs from f (p=%ld, it=%ld, seed=%llu)", p, it,
                 (unsigned long long)tp_test_seed());
        fp_factors_free(fac, nfac);
        for (int i = 0; i < f.n; i++)
            mpz_clear(c[i]);
        free(c);
        mpz_clear(pz);
        mpz_clear(lc);
    }
}

/* ---------------------------------------------------------------- Q[x] */

static void qp_from(qpoly *f, const long *c, size_t n)
{
    if (!qp_init(f, n))
        return;
    for (size_t i = 0; i < n; i++)
        mpq_set_si(f->c[i], c[i], 1);
}

static void test_squarefree(void)
{
    /* (x-1)^3 (x+2)^2 (x^2+1) expanded: coefficients from x^0 up */
    /* (x-1)^3 = x^3-3x^2+3x-1; (x+2)^2 = x^2+4x+4; product with x^2+1 */
    long a[] = {-1, 3, -3, 1}, b[] = {4, 4, 1}, c[] = {1, 0, 1};
    long ab[6] = {0}, abc[8] = {0};
    for (int i = 0; i < 4; i++)
        for (int j = 0; j < 3; j++)
            ab[i + j] += a[i] * b[j];
    for (int i = 0; i < 6; i++)
        for (int j = 0; j < 3; j++)
            abc[i + j] += ab[i] * c[j];
    qpoly f;
    qp_from(&f, abc, 8);
    qpoly *parts = NULL;
    size_t np = 0;
    tp_check(qp_squarefree(&f, &parts, &np), "qp_squarefree failed");
    tp_check(np == 3, "expected parts up to multiplicity 3, got %zu", np);
    if (np == 3) {
        char *s1 = qp_to_str(&parts[0], "x"), *s2 = qp_to_str(&parts[1], "x"),
             *s3 = qp_to_str(&parts[2], "x");
        tp_check(strcmp(s1, "x^2 + 1") == 0, "part 1: %s", s1);
        tp_check(strcmp(s2, "x + 2") == 0, "part 2: %s", s2);
        tp_check(strcmp(s3, "x - 1") == 0, "part 3: %s", s3);
        free(s1);
        free(s2);
        free(s3);
        /* rational roots of part 3 and none of part 1 */
        mpq_t *rq = NULL;
        size_t nq = 0;
        qpoly rest;
        tp_check(qp_rational_roots(&parts[0], &rq, &nq, &rest) && nq == 0 && rest.n == 3,
                 "x^2 + 1 has no rational roots");
        qp_clear(&rest);
        free(rq);
    }
    for (size_t k = 0; k < np; k++)
        qp_clear(&parts[k]);
    free(parts);
    qp_clear(&f);
    /* 6x^3 - 7x^2 + 1 = (x - 1)(2x - 1)(3x + 1): rational roots -1/3, 1/2, 1 */
    long d[] = {1, 0, -7, 6};
    qp_from(&f, d, 4);
    mpq_t *rq = NULL;
    size_t nq = 0;
    qpoly rest;
    tp_check(qp_rational_roots(&f, &rq, &nq, &rest), "qp_rational_roots failed");
    tp_check(nq == 3, "expected 3 rational roots, got %zu", nq);
    if (nq == 3) {
        tp_check(mpq_cmp_si(rq[0], -1, 3) == 0 && mpq_cmp_si(rq[1], 1, 2) == 0 &&
                     mpq_cmp_si(rq[2], 1, 1) == 0, "rational roots not -1/3, 1/2, 1");
    }
    for (size_t i = 0; i < nq; i++)
        mpq_clear(rq[i]);
    free(rq);
    qp_clear(&rest);
    qp_clear(&f);
}

/* ---------------------------------------------------------------- complex roots */

static void test_cx_roots(void)
{
    /* (x - 2)^3 (x + 1) = x^4 - 5x^3 + 6x^2 + 4x - 8 */
    long c[] = {-8, 4, 6, -5, 1};
    mpc_t cc[5], z[4];
    size_t mu[4];
    for (int i = 0; i < 5; i++) {
        mpc_init2(cc[i], RN_PREC);
        mpc_set_si(cc[i], c[i], MPC_RNDNN);
    }
    for (int i = 0; i < 4; i++)
        mpc_init2(z[i], RN_PREC);
    size_t n = cx_roots((const mpc_t *)cc, 5, z, mu);
    tp_check(n == 2, "expected 2 distinct roots, got %zu", n);
    for (size_t i = 0; i < n; i++) {
        double re = mpfr_get_d(mpc_realref(z[i]), MPFR_RNDN);
        double im = mpfr_get_d(mpc_imagref(z[i]), MPFR_RNDN);
        bool two = mu[i] == 3 && re > 2 - 1e-14 && re < 2 + 1e-14 && im == 0;
        bool mone = mu[i] == 1 && re > -1 - 1e-14 && re < -1 + 1e-14 && im == 0;
        tp_check(two || mone, "root %g%+gi multiplicity %zu", re, im, mu[i]);
    }
    for (int i = 0; i < 5; i++)
        mpc_clear(cc[i]);
    for (int i = 0; i < 4; i++)
        mpc_clear(z[i]);
}

/* ---------------------------------------------------------------- substitution */

static void test_substitute(void)
{
    /* f = x^2 - 2 t x + t^2 - t^3 = (x - t)^2 - t^3; x = t(1 + x1) gives
     * t^2 x1^2 - t^3, normalised: x1^2 - t */
    rupoly f;
    tp_check(ru_init(&f, 3), "ru_init");
    rnum c;
    rn_init(&c);
    mpq_t e;
    mpq_init(e);
    rn_set_si(&c, 1);
    mpq_set_ui(e, 2, 1);
    rs_add_term(&f.a[0], e, &c);
    rn_set_si(&c, -1);
    mpq_set_ui(e, 3, 1);
    rs_add_term(&f.a[0], e, &c);
    rn_set_si(&c, -2);
    mpq_set_ui(e, 1, 1);
    rs_add_term(&f.a[1], e, &c);
    rn_set_si(&c, 1);
    mpq_set_ui(e, 0, 1);
    rs_add_term(&f.a[2], e, &c);
    mpq_set_ui(e, 1, 1);
    rn_set_si(&c, 1);
    tp_check(ru_substitute(&f, e, &c), "ru_substitute");
    tp_check(f.a[0].len == 1 && mpq_cmp_ui(f.a[0].e[0], 1, 1) == 0 &&
                 mpq_cmp_si(f.a[0].c[0].q, -1, 1) == 0, "constant term should be -t");
    tp_check(f.a[1].len == 0, "linear term should vanish");
    tp_check(f.a[2].len == 1 && mpq_sgn(f.a[2].e[0]) == 0, "x1^2 coefficient should be 1");
    rn_clear(&c);
    mpq_clear(e);
    ru_clear(&f);
}

/* ---------------------------------------------------------------- whole runs */

static char *roots_json(const char *text, const char *over, size_t K, tp_status *st,
                        bool expect_ok)
{
    tp_input in;
    tp_input_init(&in);
    tp_error err;
    tp_error_init(&err, "<test>");
    tp_parse_options po;
    memset(&po, 0, sizeof po);
    po.over = over;
    *st = tp_input_parse(&in, text, strlen(text), &po, &err);
    char *buf = NULL;
    size_t len = 0;
    if (*st == TP_OK) {
        tp_roots R;
        tp_roots_init(&R);
        tp_roots_options o = {.terms = K, .max_steps = 0};
        *st = tp_roots_compute(&R, &in.polys[0], &in.field, in.vars, &o, &err);
        if (*st == TP_OK) {
            FILE *m = open_memstream(&buf, &len);
            if (m) {
                tp_status ws = tp_roots_write_json(m, &R, &err);
                tp_check(ws == TP_OK, "write_json");
                ws = tp_roots_write_text(m, &R, &err);
                tp_check(ws == TP_OK, "write_text");
                fclose(m);
            }
            size_t sum = R.nzero, rsum = 0;
            for (size_t s = 0; s < R.nsegs; s++)
                sum += R.segs[s].count;
            for (size_t i = 0; i < R.nroots; i++)
                rsum += R.roots[i].count * R.roots[i].multiplicity;
            tp_check(sum == R.degree && rsum == R.degree, "%s: counts %zu %zu vs degree %zu",
                     text, sum, rsum, R.degree);
        } else
            tp_check(!expect_ok, "%s: %s", text, err.msg);
        tp_roots_clear(&R);
    }
    tp_input_clear(&in);
    return buf;
}

static void test_runs(tp_rng *rng)
{
    tp_status st;
    char *a = roots_json("x^3 - t^2", "t", 3, &st, true);
    tp_check(a && strstr(a, "\"valuation\": \"2/3\", \"count\": 3"), "x^3 - t^2 segment");
    char *b = roots_json("x^3 - t^2", "t", 3, &st, true);
    tp_check(a && b && strcmp(a, b) == 0, "same input, different bytes");
    free(a);
    free(b);
    a = roots_json("x*y + 1", "t", 1, &st, false);
    tp_check(st == TP_EDOMAIN && !a, "two variables must be refused");
    free(a);
    a = roots_json("3 + t", "t", 1, &st, false);
    tp_check(st == TP_EDOMAIN && !a, "a constant must be refused");
    free(a);
    a = roots_json("x^2 - 2", "Q", 1, &st, false);
    tp_check(st == TP_EDOMAIN && !a, "the trivial field must be refused");
    free(a);
    /* random polynomials: counts add up (checked inside roots_json) */
    long iters = 60 * tp_test_multiplier();
    for (long it = 0; it < iters; it++) {
        char text[512];
        size_t len = 0;
        int deg = (int)tp_rng_range(rng, 1, 6);
        bool padic = tp_rng_range(rng, 0, 1) == 1;
        for (int i = 0; i <= deg; i++) {
            if (i != 0 && i != deg && tp_rng_range(rng, 0, 2) == 0)
                continue;
            long c = tp_rng_range(rng, -5, 5);
            if (c == 0 || c % 3 == 0)
                c = 1;
            long e = tp_rng_range(rng, -2, 4), d = tp_rng_range(rng, 1, 3);
            if (padic)
                len += (size_t)snprintf(text + len, sizeof text - len, "%s%ld%s3^%ld*x^%d",
                                        len ? " + " : "", c, e < 0 ? "/" : "*", e < 0 ? -e : e, i);
            else
                len += (size_t)snprintf(text + len, sizeof text - len, "%s%ld*t^(%ld/%ld)*x^%d",
                                        len ? " + " : "", c, e, d, i);
        }
        char *s = roots_json(text, padic ? "p=3" : "t", (size_t)tp_rng_range(rng, 0, 3), &st, true);
        free(s);
    }
}

int main(void)
{
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed());
    test_fp_factor(&rng);
    test_squarefree();
    test_cx_roots();
    test_substitute();
    test_runs(&rng);
    return tp_test_finish("t-roots");
}
