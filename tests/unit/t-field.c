/* t-field.c — valued fields: arithmetic laws and valuation laws on random coefficients.
 *
 * Source for every law checked here: common practice, no source (field axioms, and the
 * axioms of a valuation: v(ab) = v(a) + v(b), v(a + b) >= min(v(a), v(b)) with
 * equality when v(a) != v(b); the residue map is multiplicative).
 * Fixed values (v_7(49/3) = 2 and so on) are computed by hand.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "testlib.h"
#include "trope/field.h"

static tp_rng R;

static void rand_q(mpq_t q, long lo, long hi)
{
    long n = tp_rng_range(&R, lo, hi), d = tp_rng_range(&R, 1, 30);
    mpq_set_si(q, n, (unsigned long)d);
    mpq_canonicalize(q);
}

/* A random nonzero (if nonzero) coefficient of field F. */
static void rand_coeff(tp_coeff *c, const tp_field *F, bool nonzero)
{
    mpq_t q, e;
    mpq_init(q);
    mpq_init(e);
    for (;;) {
        switch (F->kind) {
        case TP_FIELD_PADIC: {
            rand_q(q, -40, 40);
            long a = tp_rng_range(&R, -3, 3);
            mpz_t pp;
            mpz_init(pp);
            mpz_pow_ui(pp, F->p, (unsigned long)(a < 0 ? -a : a));
            if (a >= 0)
                mpz_mul(mpq_numref(q), mpq_numref(q), pp);
            else
                mpz_mul(mpq_denref(q), mpq_denref(q), pp);
            mpq_canonicalize(q);
            mpz_clear(pp);
            tp_coeff_set_q(c, q, F);
            break;
        }
        case TP_FIELD_COMPLEX: {
            tp_coeff im;
            tp_coeff_init(&im);
            rand_q(q, -9, 9);
            tp_coeff_set_q(c, q, F);
            rand_q(q, -9, 9);
            tp_coeff_set_imag_q(&im, q, F);
            tp_coeff_add(c, c, &im, F);
            tp_coeff_clear(&im);
            break;
        }
        case TP_FIELD_PUISEUX: {
            /* (sum of 1..3 terms) / (sum of 1..2 terms) */
            tp_coeff num, den, term, k;
            tp_coeff_init(&num);
            tp_coeff_init(&den);
            tp_coeff_init(&term);
            tp_coeff_init(&k);
            tp_coeff_set_si(&num, 0, F);
            tp_coeff_set_si(&den, 0, F);
            long nt = tp_rng_range(&R, 1, 3), dt = tp_rng_range(&R, 1, 2);
            for (long s = 0; s < nt + dt; s++) {
                mpq_set_si(e, tp_rng_range(&R, -6, 6), (unsigned long)tp_rng_range(&R, 1, 3));
                mpq_canonicalize(e);
                tp_coeff_set_param_pow(&term, e, F);
                rand_q(q, -9, 9);
                tp_coeff_set_q(&k, q, F);
                tp_coeff_mul(&term, &term, &k, F);
                if (s < nt)
                    tp_coeff_add(&num, &num, &term, F);
                else
                    tp_coeff_add(&den, &den, &term, F);
            }
            if (tp_coeff_is_zero(&den, F))
                tp_coeff_set_si(&den, 1, F);
            tp_error err;
            tp_error_init(&err, NULL);
            if (tp_coeff_inv(&den, &den, F, &err) != TP_OK)
                tp_check(false, "inverse of a nonzero denominator failed");
            tp_coeff_mul(c, &num, &den, F);
            tp_coeff_clear(&num);
            tp_coeff_clear(&den);
            tp_coeff_clear(&term);
            tp_coeff_clear(&k);
            break;
        }
        default:
            rand_q(q, -40, 40);
            tp_coeff_set_q(c, q, F);
            break;
        }
        if (!nonzero || !tp_coeff_is_zero(c, F))
            break;
    }
    mpq_clear(q);
    mpq_clear(e);
}

/* residue(ab) == residue(a) residue(b) (mod p for p-adic). */
static bool residue_mult(const tp_coeff *a, const tp_coeff *b, const tp_coeff *ab,
                         const tp_field *F)
{
    if (F->kind == TP_FIELD_COMPLEX || F->kind == TP_FIELD_TRIVIAL)
        return true; /* the residue is the value: covered by multiplication */
    mpq_t ra, rb, rab;
    mpq_init(ra);
    mpq_init(rb);
    mpq_init(rab);
    tp_coeff_residue_q(ra, a, F);
    tp_coeff_residue_q(rb, b, F);
    tp_coeff_residue_q(rab, ab, F);
    mpq_mul(ra, ra, rb);
    bool ok;
    if (F->kind == TP_FIELD_PADIC) {
        mpz_t x;
        mpz_init(x);
        mpz_mod(x, mpq_numref(ra), F->p);
        ok = mpz_cmp(x, mpq_numref(rab)) == 0 && mpz_sgn(x) > 0;
        mpz_clear(x);
    } else {
        ok = mpq_equal(ra, rab);
    }
    mpq_clear(ra);
    mpq_clear(rb);
    mpq_clear(rab);
    return ok;
}

static void laws(const char *spec, long iters)
{
    tp_field F;
    tp_field_init(&F);
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_field_parse(&F, spec, &err) == TP_OK, "parse field %s", spec);
    tp_coeff a, b, c, x, y, z;
    tp_coeff *all[] = {&a, &b, &c, &x, &y, &z};
    for (int k = 0; k < 6; k++)
        tp_coeff_init(all[k]);
    mpq_t va, vb, vs;
    mpq_init(va);
    mpq_init(vb);
    mpq_init(vs);
    for (long it = 0; it < iters; it++) {
        rand_coeff(&a, &F, true);
        rand_coeff(&b, &F, true);
        rand_coeff(&c, &F, false);
        /* associativity of + and * */
        tp_coeff_add(&x, &a, &b, &F);
        tp_coeff_add(&x, &x, &c, &F);
        tp_coeff_add(&y, &b, &c, &F);
        tp_coeff_add(&y, &a, &y, &F);
        tp_check(tp_coeff_equal(&x, &y, &F), "%s: (a+b)+c == a+(b+c)", spec);
        tp_coeff_mul(&x, &a, &b, &F);
        tp_coeff_mul(&x, &x, &c, &F);
        tp_coeff_mul(&y, &b, &c, &F);
        tp_coeff_mul(&y, &a, &y, &F);
        tp_check(tp_coeff_equal(&x, &y, &F), "%s: (ab)c == a(bc)", spec);
        /* commutativity, distributivity */
        tp_coeff_mul(&x, &a, &b, &F);
        tp_coeff_mul(&y, &b, &a, &F);
        tp_check(tp_coeff_equal(&x, &y, &F), "%s: ab == ba", spec);
        tp_coeff_add(&x, &b, &c, &F);
        tp_coeff_mul(&x, &a, &x, &F);
        tp_coeff_mul(&y, &a, &b, &F);
        tp_coeff_mul(&z, &a, &c, &F);
        tp_coeff_add(&y, &y, &z, &F);
        tp_check(tp_coeff_equal(&x, &y, &F), "%s: a(b+c) == ab+ac", spec);
        /* inverses */
        tp_check(tp_coeff_inv(&x, &a, &F, &err) == TP_OK, "%s: inverse exists", spec);
        tp_coeff_mul(&x, &x, &a, &F);
        tp_check(tp_coeff_is_one(&x, &F), "%s: a * (1/a) == 1", spec);
        tp_coeff_sub(&x, &a, &a, &F);
        tp_check(tp_coeff_is_zero(&x, &F), "%s: a - a == 0", spec);
        tp_coeff_neg(&x, &a, &F);
        tp_coeff_add(&x, &x, &a, &F);
        tp_check(tp_coeff_is_zero(&x, &F), "%s: -a + a == 0", spec);
        /* powers: a^3 a^-2 == a */
        tp_check(tp_coeff_pow_si(&x, &a, 3, &F, &err) == TP_OK &&
                     tp_coeff_pow_si(&y, &a, -2, &F, &err) == TP_OK, "%s: powers", spec);
        tp_coeff_mul(&x, &x, &y, &F);
        tp_check(tp_coeff_equal(&x, &a, &F), "%s: a^3 * a^-2 == a", spec);
        /* valuation of a product is the sum */
        tp_coeff_val(va, &a, &F);
        tp_coeff_val(vb, &b, &F);
        tp_coeff_mul(&x, &a, &b, &F);
        tp_coeff_val(vs, &x, &F);
        mpq_add(va, va, vb);
        tp_check(mpq_equal(va, vs), "%s: v(ab) == v(a) + v(b)", spec);
        tp_check(residue_mult(&a, &b, &x, &F), "%s: residue(ab) == residue(a) residue(b)", spec);
        /* ultrametric inequality, equality when the valuations differ */
        tp_coeff_add(&x, &a, &b, &F);
        tp_coeff_val(va, &a, &F);
        if (!tp_coeff_is_zero(&x, &F)) {
            tp_coeff_val(vs, &x, &F);
            mpq_t mn;
            mpq_init(mn);
            mpq_set(mn, mpq_cmp(va, vb) < 0 ? va : vb);
            tp_check(mpq_cmp(vs, mn) >= 0, "%s: v(a+b) >= min", spec);
            if (!mpq_equal(va, vb))
                tp_check(mpq_equal(vs, mn), "%s: v(a+b) == min when v(a) != v(b)", spec);
            mpq_clear(mn);
        }
        /* aliasing: r may be an input */
        tp_coeff_set(&x, &a);
        tp_coeff_mul(&x, &x, &x, &F);
        tp_coeff_mul(&y, &a, &a, &F);
        tp_check(tp_coeff_equal(&x, &y, &F), "%s: aliased square", spec);
        /* printing is never empty */
        char *s = tp_coeff_to_str(&a, &F);
        tp_check(s && s[0], "%s: to_str", spec);
        free(s);
    }
    tp_coeff_set_si(&z, 0, &F);
    tp_check(tp_coeff_inv(&x, &z, &F, &err) == TP_EDOMAIN && strstr(err.msg, "division by zero"),
             "%s: 1/0 is TP_EDOMAIN", spec);
    for (int k = 0; k < 6; k++)
        tp_coeff_clear(all[k]);
    mpq_clear(va);
    mpq_clear(vb);
    mpq_clear(vs);
    tp_field_clear(&F);
}

static void check_spec(const char *spec, tp_status want, tp_field_kind kind, int col)
{
    tp_field F;
    tp_field_init(&F);
    tp_error err;
    tp_error_init(&err, NULL);
    tp_status st = tp_field_parse(&F, spec, &err);
    tp_check(st == want, "field '%s': status %s, want %s (%s)", spec, tp_status_name(st),
             tp_status_name(want), err.msg);
    if (st == TP_OK)
        tp_check(F.kind == kind, "field '%s': kind", spec);
    else
        tp_check(err.col == col && err.msg[0], "field '%s': column %d, want %d", spec, err.col, col);
    tp_field_clear(&F);
}

static void fixed_values(void)
{
    tp_field F;
    tp_field_init(&F);
    tp_error err;
    tp_error_init(&err, NULL);
    tp_coeff a, b;
    tp_coeff_init(&a);
    tp_coeff_init(&b);
    mpq_t q, v;
    mpq_init(q);
    mpq_init(v);
    /* 7-adic: v(49/3) = 2, residue 49/3 / 49 = 1/3 = 5 mod 7; v(3/98) = -2, 98 = 49*2,
     * residue 3/2 = 3*4 = 12 = 5 mod 7; v(50) = 0, residue 1. */
    tp_check(tp_field_parse(&F, "p=7", &err) == TP_OK, "p=7");
    struct { const char *q; long val; long res; } pv[] = {
        {"49/3", 2, 5}, {"3/98", -2, 5}, {"50", 0, 1}, {"-1", 0, 6}, {"686", 3, 2}};
    for (size_t k = 0; k < sizeof pv / sizeof pv[0]; k++) {
        mpq_set_str(q, pv[k].q, 10);
        tp_coeff_set_q(&a, q, &F);
        tp_coeff_val(v, &a, &F);
        tp_check(mpq_cmp_si(v, pv[k].val, 1) == 0, "v_7(%s) == %ld", pv[k].q, pv[k].val);
        char *r = tp_coeff_residue_str(&a, &F);
        char want[32];
        snprintf(want, sizeof want, "%ld", pv[k].res);
        tp_check(r && strcmp(r, want) == 0, "residue_7(%s) == %s, got %s", pv[k].q, want,
                 r ? r : "(null)");
        free(r);
    }
    char d[64];
    tp_field_describe(&F, d, sizeof d);
    tp_check(strcmp(d, "Q_7 (7-adic)") == 0, "describe p=7: %s", d);
    /* a large prime: 2^127 - 1 (a Mersenne prime, common practice) */
    tp_check(tp_field_parse(&F, "p=170141183460469231731687303715884105727", &err) == TP_OK,
             "p = 2^127 - 1 accepted");
    mpz_set_ui(mpq_numref(q), 0);
    mpz_setbit(mpq_numref(q), 127);
    mpz_sub_ui(mpq_numref(q), mpq_numref(q), 1);
    mpz_mul_ui(mpq_numref(q), mpq_numref(q), 10);
    mpz_set_ui(mpq_denref(q), 1);
    tp_coeff_set_q(&a, q, &F);
    tp_coeff_val(v, &a, &F);
    tp_check(mpq_cmp_si(v, 1, 1) == 0, "v_p(10 p) == 1 for p = 2^127 - 1");
    /* t-adic: (1+t)/(t^2-t^3): val -2, residue 1, printed back in the input's shape */
    tp_check(tp_field_parse(&F, "t", &err) == TP_OK, "t");
    tp_coeff_set_si(&a, 1, &F);
    mpq_set_ui(q, 1, 1);
    tp_coeff_set_param_pow(&b, q, &F);
    tp_coeff_add(&a, &a, &b, &F);            /* 1 + t */
    tp_coeff tt;
    tp_coeff_init(&tt);
    mpq_set_ui(q, 2, 1);
    tp_coeff_set_param_pow(&tt, q, &F);      /* t^2 */
    mpq_set_ui(q, 3, 1);
    tp_coeff_set_param_pow(&b, q, &F);       /* t^3 */
    tp_coeff_sub(&tt, &tt, &b, &F);          /* t^2 - t^3 */
    tp_check(tp_coeff_inv(&tt, &tt, &F, &err) == TP_OK, "inverse");
    tp_coeff_mul(&a, &a, &tt, &F);
    tp_coeff_val(v, &a, &F);
    tp_check(mpq_cmp_si(v, -2, 1) == 0, "val((1+t)/(t^2-t^3)) == -2");
    tp_coeff_residue_q(q, &a, &F);
    tp_check(mpq_cmp_si(q, 1, 1) == 0, "residue((1+t)/(t^2-t^3)) == 1");
    char *s = tp_coeff_to_str(&a, &F);
    tp_check(s && strcmp(s, "(1 + t)/(t^2 - t^3)") == 0, "to_str: %s", s);
    free(s);
    /* lowest terms: (t - t^3)/(1 - t) == t + t^2 */
    mpq_set_ui(q, 1, 1);
    tp_coeff_set_param_pow(&a, q, &F);
    mpq_set_ui(q, 3, 1);
    tp_coeff_set_param_pow(&b, q, &F);
    tp_coeff_sub(&a, &a, &b, &F);
    tp_coeff_set_si(&tt, 1, &F);
    mpq_set_ui(q, 1, 1);
    tp_coeff_set_param_pow(&b, q, &F);
    tp_coeff_sub(&tt, &tt, &b, &F);
    tp_check(tp_coeff_inv(&tt, &tt, &F, &err) == TP_OK, "inverse");
    tp_coeff_mul(&a, &a, &tt, &F);
    s = tp_coeff_to_str(&a, &F);
    tp_check(s && strcmp(s, "t + t^2") == 0, "(t - t^3)/(1 - t) reduced: %s", s);
    free(s);
    /* t^(5/2): a parameter power; val 5/2 */
    mpq_set_si(q, 5, 2);
    tp_coeff_set_param_pow(&a, q, &F);
    tp_coeff_val(v, &a, &F);
    tp_check(mpq_equal(v, q) && tp_coeff_is_param_pow(&a, v, &F), "t^(5/2)");
    s = tp_coeff_to_str(&a, &F);
    tp_check(s && strcmp(s, "t^(5/2)") == 0, "to_str t^(5/2): %s", s);
    free(s);
    /* complex: (2-3i)(2+3i) = 13; printing */
    tp_check(tp_field_parse(&F, "C", &err) == TP_OK, "C");
    mpq_set_si(q, 2, 1);
    tp_coeff_set_q(&a, q, &F);
    mpq_set_si(q, -3, 1);
    tp_coeff_set_imag_q(&b, q, &F);
    tp_coeff_add(&a, &a, &b, &F);
    s = tp_coeff_to_str(&a, &F);
    tp_check(s && strcmp(s, "2-3i") == 0, "to_str 2-3i: %s", s);
    free(s);
    tp_coeff_neg(&b, &b, &F);
    mpq_set_si(q, 2, 1);
    tp_coeff_set_q(&tt, q, &F);
    tp_coeff_add(&b, &b, &tt, &F);
    tp_coeff_mul(&a, &a, &b, &F);
    s = tp_coeff_to_str(&a, &F);
    tp_check(s && strcmp(s, "13") == 0, "(2-3i)(2+3i) == 13: %s", s);
    free(s);
    mpq_clear(q);
    mpq_clear(v);
    tp_coeff_clear(&a);
    tp_coeff_clear(&b);
    tp_coeff_clear(&tt);
    tp_field_clear(&F);
}

int main(void)
{
    tp_rng_seed(&R, tp_test_seed());
    long it = 200 * tp_test_multiplier();
    laws("Q", it);
    laws("p=2", it);
    laws("p=7", it);
    laws("p=2305843009213693951", it); /* 2^61 - 1, a Mersenne prime */
    laws("C", it);
    laws("t", it);
    laws("eps", it / 2);
    check_spec("p=7", TP_OK, TP_FIELD_PADIC, 0);
    check_spec(" p = 11 ", TP_OK, TP_FIELD_PADIC, 0);
    check_spec("Q", TP_OK, TP_FIELD_TRIVIAL, 0);
    check_spec("C", TP_OK, TP_FIELD_COMPLEX, 0);
    check_spec("t", TP_OK, TP_FIELD_PUISEUX, 0);
    check_spec("eps", TP_OK, TP_FIELD_PUISEUX, 0);
    check_spec("p=1", TP_EDOMAIN, 0, 3);
    check_spec("p=4", TP_EDOMAIN, 0, 3);
    check_spec("p=0", TP_EDOMAIN, 0, 3);
    check_spec("p=-7", TP_EDOMAIN, 0, 3);
    check_spec("p=x", TP_ESYNTAX, 0, 3);
    check_spec("p=", TP_ESYNTAX, 0, 3);
    check_spec("p=7x", TP_ESYNTAX, 0, 4);
    check_spec("", TP_ESYNTAX, 0, 1);
    check_spec("7", TP_ESYNTAX, 0, 1);
    check_spec("Q_7", TP_OK, TP_FIELD_PUISEUX, 0); /* an identifier: a parameter name */
    check_spec("p=170141183460469231731687303715884105729", TP_EDOMAIN, 0, 3); /* 2^127+1 */
    fixed_values();
    return tp_test_finish("t-field");
}
