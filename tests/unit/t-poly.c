/* t-poly.c — the input language: round trips, exact numbers, expansion, error positions.
 * Expected expansions are worked by hand (binomial theorem: common practice, no source).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "testlib.h"
#include "trope/poly.h"

static tp_status parse(tp_input *in, const char *text, const char *over, tp_error *err)
{
    tp_parse_options o;
    memset(&o, 0, sizeof o);
    o.over = over;
    tp_input_init(in);
    tp_error_init(err, "in");
    return tp_input_parse(in, text, strlen(text), &o, err);
}

static void expect_str(const char *text, const char *over, const char *want)
{
    tp_input in;
    tp_error err;
    tp_status st = parse(&in, text, over, &err);
    tp_check(st == TP_OK, "parse '%s': %s", text, err.msg);
    if (st == TP_OK) {
        char *s = tp_poly_to_str(&in.polys[0], &in.field, in.vars);
        tp_check(s && strcmp(s, want) == 0, "'%s' printed '%s', want '%s'", text, s, want);
        free(s);
    }
    tp_input_clear(&in);
}

/* parse(to_str(f)) == f */
static bool round_trip(const char *text, const char *over)
{
    tp_input a, b;
    tp_error err;
    if (parse(&a, text, over, &err) != TP_OK) {
        tp_check(false, "round trip parse '%s': %s", text, err.msg);
        tp_input_clear(&a);
        return false;
    }
    char *s = tp_poly_to_str(&a.polys[0], &a.field, a.vars);
    tp_parse_options o;
    memset(&o, 0, sizeof o);
    o.over = over;
    char vl[4096] = "";
    for (size_t k = 0; k < a.nvars; k++) {
        strcat(vl, a.vars[k]);
        strcat(vl, " ");
    }
    o.vars = vl;
    tp_input_init(&b);
    tp_error_init(&err, "in");
    bool ok = tp_input_parse(&b, s, strlen(s), &o, &err) == TP_OK;
    if (ok) {
        const tp_poly *f = &a.polys[0], *g = &b.polys[0];
        ok = f->nterms == g->nterms && a.nvars == b.nvars;
        for (size_t k = 0; ok && k < f->nterms; k++) {
            ok = memcmp(f->exps + k * a.nvars, g->exps + k * a.nvars, a.nvars * sizeof(int64_t)) == 0 &&
                 tp_coeff_equal(&f->coeffs[k], &g->coeffs[k], &a.field);
        }
    }
    tp_check(ok, "round trip of '%s' via '%s' (%s)", text, s, err.msg);
    free(s);
    tp_input_clear(&a);
    tp_input_clear(&b);
    return ok;
}

static void random_round_trips(void)
{
    tp_rng R;
    tp_rng_seed(&R, tp_test_seed());
    const char *fields[] = {"Q", "p=5", "t", "C"};
    const char *vars[] = {"x", "y", "z"};
    char buf[4096];
    for (long it = 0; it < 300 * tp_test_multiplier(); it++) {
        const char *over = fields[it % 4];
        size_t o = 0;
        long nt = tp_rng_range(&R, 1, 6);
        for (long k = 0; k < nt; k++) {
            o += (size_t)snprintf(buf + o, sizeof buf - o, "%s(%ld/%ld", k ? " + " : "",
                                  tp_rng_range(&R, -30, 30), tp_rng_range(&R, 1, 9));
            if (it % 4 == 2)
                o += (size_t)snprintf(buf + o, sizeof buf - o, " + %ld*t^(%ld/%ld))/(1 - t^%ld)",
                                      tp_rng_range(&R, -5, 5), tp_rng_range(&R, -7, 7),
                                      tp_rng_range(&R, 1, 3), tp_rng_range(&R, 1, 3));
            else if (it % 4 == 3)
                o += (size_t)snprintf(buf + o, sizeof buf - o, " + %ld/%ldi)", tp_rng_range(&R, -5, 5),
                                      tp_rng_range(&R, 1, 4));
            else
                o += (size_t)snprintf(buf + o, sizeof buf - o, ")");
            for (int v = 0; v < 3; v++)
                o += (size_t)snprintf(buf + o, sizeof buf - o, "*%s^%ld", vars[v], tp_rng_range(&R, -3, 3));
        }
        tp_input in;
        tp_error err;
        tp_status st = parse(&in, buf, over, &err);
        tp_input_clear(&in);
        if (st == TP_EDOMAIN && strstr(err.msg, "zero"))
            continue; /* everything cancelled */
        tp_check(st == TP_OK, "random '%s' over %s: %s", buf, over, err.msg);
        if (st == TP_OK)
            round_trip(buf, over);
    }
}

struct bad {
    const char *text, *over;
    tp_status code;
    int line, col;
    const char *msg;
};

static const struct bad catalogue[] = {
    {"x + )", NULL, TP_ESYNTAX, 1, 5, "expected a number, a variable or '(' after '+', found ')'"},
    {"(x + 1", NULL, TP_ESYNTAX, 1, 7, "unbalanced '(' opened at 1:1: expected ')'"},
    {"x^", NULL, TP_ESYNTAX, 1, 3, "expected an integer exponent after '^'"},
    {"x^y", NULL, TP_ESYNTAX, 1, 3, "expected an integer exponent after '^'"},
    {"x^2.5", NULL, TP_ESYNTAX, 1, 3, "expected an integer exponent"},
    {"x^(1/2)", "t", TP_EDOMAIN, 1, 2, "fractional exponent on a variable"},
    {"3/0*x", NULL, TP_EDOMAIN, 1, 2, "division by zero"},
    {"x/(y - y)", NULL, TP_EDOMAIN, 1, 2, "division by zero"},
    {"1/(x + y)", NULL, TP_EDOMAIN, 1, 2, "cannot divide by a polynomial with 2 terms"},
    {"(x+1)^-1", NULL, TP_EDOMAIN, 1, 6, "negative power"},
    {"x - x", NULL, TP_EDOMAIN, 1, 1, "the polynomial is zero"},
    {"  # only a comment\n;;", NULL, TP_EDOMAIN, 2, 3, "empty input: expected a polynomial"},
    {"x^9223372036854775807*x", NULL, TP_EOVERFLOW, 1, 22, "64-bit"},
    {"x^9223372036854775808", NULL, TP_EOVERFLOW, 1, 2, "64-bit"},
    {"3x", NULL, TP_ESYNTAX, 1, 2, "expected an operator such as '*' after the number '3'"},
    {"x y", NULL, TP_ESYNTAX, 1, 3, "expected an operator"},
    {"x)", NULL, TP_ESYNTAX, 1, 2, "unmatched ')'"},
    {"x $ y", NULL, TP_ESYNTAX, 1, 3, "unexpected character '$'"},
    {"x +\n  \x01", NULL, TP_ESYNTAX, 2, 3, "unexpected character control byte 0x01"},
    {"x\0y", NULL, TP_ESYNTAX, 1, 2, "unexpected character"},
    {"x + \xff", NULL, TP_ESYNTAX, 1, 5, "unexpected character byte 0xFF"},
    {"2i*x", NULL, TP_EDOMAIN, 1, 1, "needs complex coefficients"},
    {"x^2^3", NULL, TP_ESYNTAX, 1, 4, "parentheses"},
    {"vars: x y\nx + w", NULL, TP_ESYNTAX, 2, 5, "unknown variable 'w': expected one of x, y"},
    {"over: p=4\nx", NULL, TP_EDOMAIN, 1, 9, "not prime"},
    {"x;\nover: p=5", NULL, TP_ESYNTAX, 2, 1, "header lines"},
    {"2*", NULL, TP_ESYNTAX, 1, 3, "after '*', found the end of the input"},
    {"t^(1/0)", "t", TP_EDOMAIN, 1, 6, "division by zero"},
    {"(x+y+z+w)^1000", NULL, TP_ELIMIT, 1, 10, "--max-terms"},
    {"2^100000000*x", NULL, TP_ELIMIT, 1, 2, "--max-digits"},
    {"(1+t)^100000", "t", TP_ELIMIT, 1, 6, "--max-digits"},
    {"vars: x, , y\nx", NULL, TP_ESYNTAX, 1, 10, "expected a variable name"},
    {"x*(y", NULL, TP_ESYNTAX, 1, 5, "unbalanced '(' opened at 1:3"},
};

static void error_catalogue(void)
{
    size_t n = sizeof catalogue / sizeof catalogue[0];
    tp_check(n >= 25, "catalogue has %zu entries", n);
    for (size_t k = 0; k < n; k++) {
        const struct bad *b = &catalogue[k];
        size_t len = strlen(b->text);
        if (strcmp(b->text, "x") == 0)
            len = 1;
        if (k == 19)
            len = 3; /* "x\0y": the NUL byte is part of the input */
        tp_parse_options o;
        memset(&o, 0, sizeof o);
        o.over = b->over;
        tp_input in;
        tp_input_init(&in);
        tp_error err;
        tp_error_init(&err, "in");
        tp_status st = tp_input_parse(&in, b->text, len, &o, &err);
        tp_check(st == b->code && err.line == b->line && err.col == b->col &&
                     strstr(err.msg, b->msg) != NULL,
                 "bad input #%zu: got %s %d:%d '%s', want %s %d:%d '%s'", k, tp_status_name(st),
                 err.line, err.col, err.msg, tp_status_name(b->code), b->line, b->col, b->msg);
        tp_check(in.npolys == 0, "bad input #%zu leaves the input cleared", k);
        tp_input_clear(&in);
    }
    /* parenthesis depth limit */
    char deep[1000];
    memset(deep, '(', 300);
    strcpy(deep + 300, "x");
    for (int k = 0; k < 300; k++)
        strcat(deep, ")");
    tp_input in;
    tp_error err;
    tp_status st = parse(&in, deep, NULL, &err);
    tp_check(st == TP_ELIMIT && err.col == 201 && strstr(err.msg, "--max-depth"),
             "depth limit: %s %d %s", tp_status_name(st), err.col, err.msg);
    tp_input_clear(&in);
}

static void exact_numbers(void)
{
    expect_str("0.75*x + 1.5e-3", NULL, "3/4*x + 3/2000");
    expect_str("(x + y)^3 - x^3", NULL, "3*x^2*y + 3*x*y^2 + y^3");
    expect_str("49/3*x^2*y + x*y^-1 - 7/4", NULL, "49/3*x^2*y + x*y^-1 - 7/4");
    expect_str("x*y^(-1) + y^-1*x", NULL, "2*x*y^-1");
    expect_str("(1+t)/(t^2-t^3)*x*y + t^(5/2)*y^3", "t", "(1 + t)/(t^2 - t^3)*x*y + t^(5/2)*y^3");
    expect_str("(2-3i)*x + i*y", "C", "(2-3i)*x + i*y");
    expect_str("(x^2 - 1)/x", NULL, "x - x^-1");
    expect_str("over: t\nvars: y x\nx + t*y", NULL, "t*y + x");
    expect_str("1e3*x - 2.50", NULL, "1000*x - 5/2");
    /* a number of 100000 digits, read exactly */
    size_t n = 100000;
    char *s = malloc(n + 8);
    for (size_t k = 0; k < n; k++)
        s[k] = (char)('1' + k % 9);
    strcpy(s + n, "*x + 1");
    tp_input in;
    tp_error err;
    tp_status st = parse(&in, s, NULL, &err);
    tp_check(st == TP_OK, "100000 digits: %s", err.msg);
    if (st == TP_OK) {
        s[n] = 0;
        mpz_t z;
        mpz_init_set_str(z, s, 10);
        tp_check(mpz_cmp(mpq_numref(in.polys[0].coeffs[0].q), z) == 0 &&
                     mpz_cmp_ui(mpq_denref(in.polys[0].coeffs[0].q), 1) == 0,
                 "100000-digit coefficient exact");
        mpz_clear(z);
    }
    tp_input_clear(&in);
    free(s);
    /* variables by first appearance across polynomials; the parameter is not one */
    st = parse(&in, "z*t + y; x^2 - t", "t", &err);
    tp_check(st == TP_OK && in.nvars == 3 && strcmp(in.vars[0], "z") == 0 &&
                 strcmp(in.vars[1], "y") == 0 && strcmp(in.vars[2], "x") == 0 && in.npolys == 2,
             "variables z y x, two polynomials");
    tp_input_clear(&in);
}

int main(void)
{
    exact_numbers();
    error_catalogue();
    random_round_trips();
    return tp_test_finish("t-poly");
}
