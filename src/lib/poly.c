/* poly.c — Laurent polynomials and the input language (see trope/poly.h).
 *
 * Two passes over the text: the first lexes the body once to learn the variables in
 * order of first appearance (unless a vars: line or --vars fixes them); the second
 * parses by recursive descent into hashed term accumulators, which are sorted into
 * tp_poly at the end of each polynomial. Sizes are estimated before every product and
 * power, so hostile input is refused up front (TP_ELIMIT) instead of hanging.
 */
#include "trope/poly.h"

#include <ctype.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define DEFAULT_MAX_TERMS 1000000
#define DEFAULT_MAX_DEPTH 200
#define DEFAULT_MAX_DIGITS 1000000
#define DEFAULT_MAX_POLYS 100000
/* term multiplications allowed per product or power, as a multiple of max_terms */
#define WORK_FACTOR 10
/* exponent entries (terms x variables) allowed, as a multiple of max_terms */
#define ENTRY_FACTOR 16

/* ------------------------------------------------------------------ lexer */

enum { T_END, T_NUM, T_IDENT, T_OP };

typedef struct {
    int kind;
    char op;             /* T_OP: one of + - * / ^ ( ) ; */
    size_t start, len;   /* byte span in the text */
    int line, col;
    bool is_int;         /* T_NUM: plain digits, no point, exponent or i */
    bool imag;           /* T_NUM: ends in i */
    mpq_t val;           /* T_NUM (pass 2 only) */
} token;

typedef struct {
    const char *s;
    size_t len, pos;
    int line;
    size_t line_start;
    size_t max_digits;
    tp_error *err;
} lexer;

static int lx_col(const lexer *L, size_t pos) { return (int)(pos - L->line_start) + 1; }

static bool id_start(int c) { return (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || c == '_'; }
static bool id_char(int c) { return id_start(c) || (c >= '0' && c <= '9'); }
static bool is_digit(int c) { return c >= '0' && c <= '9'; }

/* Describe the byte(s) at pos for "unexpected character" messages. */
static void describe_char(const lexer *L, size_t pos, char *buf, size_t size)
{
    unsigned char c = (unsigned char)L->s[pos];
    if (c >= 0x20 && c < 0x7f) {
        snprintf(buf, size, "'%c'", c);
        return;
    }
    if (c < 0x80) {
        snprintf(buf, size, "control byte 0x%02X", c);
        return;
    }
    /* try to decode one UTF-8 sequence */
    int n = c >= 0xF0 && c < 0xF5 ? 4 : c >= 0xE0 ? 3 : c >= 0xC2 && c < 0xE0 ? 2 : 0;
    if (c >= 0xF5)
        n = 0;
    if (n && pos + (size_t)n <= L->len) {
        unsigned long cp = c & (0x7F >> n);
        bool ok = true;
        for (int k = 1; k < n; k++) {
            unsigned char d = (unsigned char)L->s[pos + (size_t)k];
            if ((d & 0xC0) != 0x80) {
                ok = false;
                break;
            }
            cp = (cp << 6) | (d & 0x3F);
        }
        if (ok && !((n == 3 && cp < 0x800) || (n == 4 && (cp < 0x10000 || cp > 0x10FFFF)) ||
                    (cp >= 0xD800 && cp <= 0xDFFF))) {
            snprintf(buf, size, "'%.*s' (U+%04lX)", n, L->s + pos, cp);
            return;
        }
    }
    snprintf(buf, size, "byte 0x%02X (not valid UTF-8 text)", c);
}

static void skip_space(lexer *L)
{
    while (L->pos < L->len) {
        char c = L->s[L->pos];
        if (c == ' ' || c == '\t' || c == '\r') {
            L->pos++;
        } else if (c == '\n') {
            L->pos++;
            L->line++;
            L->line_start = L->pos;
        } else if (c == '#') {
            while (L->pos < L->len && L->s[L->pos] != '\n')
                L->pos++;
        } else {
            break;
        }
    }
}

/* Convert the digits of a number token to an exact rational. */
static tp_status convert_number(lexer *L, token *t, size_t mant_end, long exp10)
{
    const char *s = L->s + t->start;
    size_t n = mant_end - t->start;
    char *digits = malloc(n + 1);
    if (!digits)
        return tp_error_set(L->err, TP_ENOMEM, t->line, t->col, "out of memory");
    size_t nd = 0;
    long frac = 0;
    bool after_point = false;
    for (size_t k = 0; k < n; k++) {
        if (s[k] == '.') {
            after_point = true;
            continue;
        }
        digits[nd++] = s[k];
        if (after_point)
            frac++;
    }
    digits[nd] = 0;
    mpz_set_str(mpq_numref(t->val), digits, 10);
    free(digits);
    mpz_set_ui(mpq_denref(t->val), 1);
    long scale = frac - exp10;
    if (scale > 0)
        mpz_ui_pow_ui(mpq_denref(t->val), 10, (unsigned long)scale);
    else if (scale < 0) {
        mpz_t p;
        mpz_init(p);
        mpz_ui_pow_ui(p, 10, (unsigned long)-scale);
        mpz_mul(mpq_numref(t->val), mpq_numref(t->val), p);
        mpz_clear(p);
    }
    mpq_canonicalize(t->val);
    return TP_OK;
}

/* Read the next token. convert: fill t->val for numbers. */
static tp_status lex_next(lexer *L, token *t, bool convert)
{
    skip_space(L);
    t->start = L->pos;
    t->len = 0;
    t->line = L->line;
    t->col = lx_col(L, L->pos);
    t->is_int = t->imag = false;
    if (L->pos >= L->len) {
        t->kind = T_END;
        return TP_OK;
    }
    unsigned char c = (unsigned char)L->s[L->pos];
    if (strchr("+-*/^();", c) && c) {
        t->kind = T_OP;
        t->op = (char)c;
        t->len = 1;
        L->pos++;
        return TP_OK;
    }
    if (id_start(c)) {
        while (L->pos < L->len && id_char((unsigned char)L->s[L->pos]))
            L->pos++;
        t->kind = T_IDENT;
        t->len = L->pos - t->start;
        return TP_OK;
    }
    if (is_digit(c) || (c == '.' && L->pos + 1 < L->len && is_digit((unsigned char)L->s[L->pos + 1]))) {
        size_t ndig = 0;
        bool point = false;
        while (L->pos < L->len) {
            char d = L->s[L->pos];
            if (is_digit(d))
                ndig++;
            else if (d == '.' && !point)
                point = true;
            else
                break;
            L->pos++;
        }
        size_t mant_end = L->pos;
        long exp10 = 0;
        bool has_exp = false;
        if (L->pos < L->len && (L->s[L->pos] == 'e' || L->s[L->pos] == 'E')) {
            size_t q = L->pos + 1;
            bool neg = false;
            if (q < L->len && (L->s[q] == '+' || L->s[q] == '-')) {
                neg = L->s[q] == '-';
                q++;
            }
            if (q < L->len && is_digit(L->s[q])) {
                has_exp = true;
                unsigned long v = 0;
                bool big = false;
                while (q < L->len && is_digit(L->s[q])) {
                    if (v > 100000000000UL)
                        big = true;
                    else
                        v = v * 10 + (unsigned long)(L->s[q] - '0');
                    q++;
                }
                if (big || v + ndig > L->max_digits)
                    return tp_error_set(L->err, TP_ELIMIT, t->line, t->col,
                                        "the number has more than %zu digits once its "
                                        "exponent is written out (raise the limit with "
                                        "--max-digits N)", L->max_digits);
                exp10 = neg ? -(long)v : (long)v;
                L->pos = q;
            }
        }
        if (ndig > L->max_digits)
            return tp_error_set(L->err, TP_ELIMIT, t->line, t->col,
                                "the number has %zu digits, more than the limit of %zu "
                                "(raise it with --max-digits N)", ndig, L->max_digits);
        if (L->pos < L->len && L->s[L->pos] == 'i' &&
            !(L->pos + 1 < L->len && id_char((unsigned char)L->s[L->pos + 1]))) {
            t->imag = true;
            L->pos++;
        }
        t->kind = T_NUM;
        t->len = L->pos - t->start;
        t->is_int = !point && !has_exp && !t->imag;
        if (L->pos < L->len && (id_char((unsigned char)L->s[L->pos]) || L->s[L->pos] == '.')) {
            char what[64];
            describe_char(L, L->pos, what, sizeof what);
            return tp_error_set(L->err, TP_ESYNTAX, L->line, lx_col(L, L->pos),
                                "expected an operator such as '*' after the number '%.*s', "
                                "found %s", (int)(t->len > 30 ? 30 : t->len),
                                L->s + t->start, what);
        }
        if (convert)
            return convert_number(L, t, mant_end, exp10);
        return TP_OK;
    }
    char what[64];
    describe_char(L, L->pos, what, sizeof what);
    return tp_error_set(L->err, TP_ESYNTAX, t->line, t->col,
                        "unexpected character %s: expected a number, a variable, an "
                        "operator or a parenthesis", what);
}

/* ---------------------------------------------------------- term accumulators */

typedef struct {
    size_t n, cap;
    int64_t *e;          /* n * nv */
    tp_coeff *c;         /* n, initialised */
    size_t *slot;        /* hash slots: index+1, 0 = empty */
    size_t nslot;
} pv;

typedef struct {
    lexer L;
    token cur;
    tp_field F;
    size_t nv;
    char **vars;
    const char *vars_from;   /* "the vars: line", "--vars", or NULL (first appearance) */
    size_t max_terms, max_depth, max_digits, max_polys;
    size_t depth;
    tp_error *err;
    int64_t *tmpe;           /* scratch exponent vector, nv entries */
} parser;

static void pv_init(pv *a) { memset(a, 0, sizeof *a); }

static void pv_clear(pv *a)
{
    for (size_t k = 0; k < a->n; k++)
        tp_coeff_clear(&a->c[k]);
    free(a->e);
    free(a->c);
    free(a->slot);
    pv_init(a);
}

static uint64_t hash_exp(const int64_t *e, size_t nv)
{
    uint64_t h = 0x9e3779b97f4a7c15u;
    for (size_t j = 0; j < nv; j++) {
        h ^= (uint64_t)e[j] + 0x9e3779b97f4a7c15u + (h << 6) + (h >> 2);
        h *= 0xbf58476d1ce4e5b9u;
    }
    return h ^ (h >> 31);
}

static tp_status pv_rehash(parser *P, pv *a, size_t nslot)
{
    size_t *s = calloc(nslot, sizeof *s);
    if (!s)
        return tp_error_set(P->err, TP_ENOMEM, P->cur.line, P->cur.col, "out of memory");
    free(a->slot);
    a->slot = s;
    a->nslot = nslot;
    for (size_t k = 0; k < a->n; k++) {
        size_t h = (size_t)hash_exp(a->e + k * P->nv, P->nv) & (nslot - 1);
        while (s[h])
            h = (h + 1) & (nslot - 1);
        s[h] = k + 1;
    }
    return TP_OK;
}

/* Index of the term with exponent e, adding a zero term if absent. */
static tp_status pv_find(parser *P, pv *a, const int64_t *e, size_t *idx)
{
    size_t nv = P->nv;
    if (2 * (a->n + 1) > a->nslot) {
        tp_status st = pv_rehash(P, a, a->nslot ? 2 * a->nslot : 16);
        if (st)
            return st;
    }
    size_t h = (size_t)hash_exp(e, nv) & (a->nslot - 1);
    while (a->slot[h]) {
        size_t k = a->slot[h] - 1;
        if (nv == 0 || memcmp(a->e + k * nv, e, nv * sizeof *e) == 0) {
            *idx = k;
            return TP_OK;
        }
        h = (h + 1) & (a->nslot - 1);
    }
    if (a->n == a->cap) {
        size_t nc = a->cap ? 2 * a->cap : 8;
        if ((double)a->n * (double)nv > ENTRY_FACTOR * (double)P->max_terms)
            return tp_error_set(P->err, TP_ELIMIT, P->cur.line, P->cur.col,
                                "the polynomial has more than %zu terms in %zu variables "
                                "here, too large (raise the limit with --max-terms N)",
                                a->n, nv);
        int64_t *ne = realloc(a->e, (nv ? nc * nv : 1) * sizeof *ne);
        if (!ne)
            return tp_error_set(P->err, TP_ENOMEM, P->cur.line, P->cur.col, "out of memory");
        a->e = ne;
        tp_coeff *ncf = realloc(a->c, nc * sizeof *ncf);
        if (!ncf)
            return tp_error_set(P->err, TP_ENOMEM, P->cur.line, P->cur.col, "out of memory");
        a->c = ncf;
        a->cap = nc;
    }
    size_t k = a->n++;
    if (nv)
        memcpy(a->e + k * nv, e, nv * sizeof *e);
    tp_coeff_init(&a->c[k]);
    tp_coeff_set_si(&a->c[k], 0, &P->F);
    a->slot[h] = k + 1;
    *idx = k;
    return TP_OK;
}

/* Drop zero terms. */
static tp_status pv_compact(parser *P, pv *a)
{
    size_t m = 0;
    for (size_t k = 0; k < a->n; k++) {
        if (tp_coeff_is_zero(&a->c[k], &P->F)) {
            tp_coeff_clear(&a->c[k]);
            continue;
        }
        if (m != k) {
            a->c[m] = a->c[k];
            if (P->nv)
                memmove(a->e + m * P->nv, a->e + k * P->nv, P->nv * sizeof *a->e);
        }
        m++;
    }
    if (m == a->n)
        return TP_OK;
    a->n = m;
    size_t ns = 16;
    while (ns < 2 * (m + 1))
        ns *= 2;
    return pv_rehash(P, a, ns);
}

static tp_status limit_terms(parser *P, int line, int col)
{
    return tp_error_set(P->err, TP_ELIMIT, line, col,
                        "the polynomial has more than %zu terms here (raise the limit "
                        "with --max-terms N)", P->max_terms);
}

/* a += sign * c * x^e */
static tp_status pv_add_term(parser *P, pv *a, const int64_t *e, const tp_coeff *c,
                             int sign, int line, int col)
{
    size_t k = 0;
    tp_status st = pv_find(P, a, e, &k);
    if (st)
        return st;
    if (sign < 0)
        tp_coeff_sub(&a->c[k], &a->c[k], c, &P->F);
    else
        tp_coeff_add(&a->c[k], &a->c[k], c, &P->F);
    if (a->n > P->max_terms) {
        st = pv_compact(P, a);
        if (st)
            return st;
        if (a->n > P->max_terms)
            return limit_terms(P, line, col);
    }
    return TP_OK;
}

static tp_status pv_add(parser *P, pv *a, const pv *b, int sign, int line, int col)
{
    for (size_t k = 0; k < b->n; k++) {
        tp_status st = pv_add_term(P, a, b->e + k * P->nv, &b->c[k], sign, line, col);
        if (st)
            return st;
    }
    return TP_OK;
}

static tp_status pv_set_const(parser *P, pv *a, const tp_coeff *c)
{
    pv_clear(a);
    memset(P->tmpe, 0, P->nv * sizeof *P->tmpe);
    return pv_add_term(P, a, P->tmpe, c, 1, 0, 0);
}

static void pv_swap(pv *a, pv *b)
{
    pv t = *a;
    *a = *b;
    *b = t;
}

static tp_status overflow_at(parser *P, int line, int col)
{
    return tp_error_set(P->err, TP_EOVERFLOW, line, col,
                        "an exponent leaves the 64-bit range (|e| < 2^63) here");
}

/* r = a * b (a, b compacted; r distinct from both) */
static tp_status pv_mul(parser *P, pv *r, const pv *a, const pv *b, int line, int col)
{
    size_t nv = P->nv;
    double work = (double)a->n * (double)b->n;
    if (work > (double)WORK_FACTOR * (double)P->max_terms ||
        work * (double)nv > (double)WORK_FACTOR * ENTRY_FACTOR * (double)P->max_terms)
        return tp_error_set(P->err, TP_ELIMIT, line, col,
                            "this product of %zu by %zu terms in %zu variables is too "
                            "much work for the term limit %zu (raise it with --max-terms N)",
                            a->n, b->n, nv, P->max_terms);
    pv_clear(r);
    tp_coeff c;
    tp_coeff_init(&c);
    tp_status st = TP_OK;
    for (size_t i = 0; i < a->n && !st; i++)
        for (size_t j = 0; j < b->n && !st; j++) {
            for (size_t v = 0; v < nv; v++)
                if (__builtin_add_overflow(a->e[i * nv + v], b->e[j * nv + v], &P->tmpe[v]) ||
                    P->tmpe[v] == INT64_MIN) {
                    st = overflow_at(P, line, col);
                    break;
                }
            if (st)
                break;
            tp_coeff_mul(&c, &a->c[i], &b->c[j], &P->F);
            st = pv_add_term(P, r, P->tmpe, &c, 1, line, col);
        }
    tp_coeff_clear(&c);
    if (!st)
        st = pv_compact(P, r);
    return st;
}

/* log10 |z| (0 for z == 0). */
static double log10_abs(const mpz_t z)
{
    if (mpz_sgn(z) == 0)
        return 0;
    long ex;
    double m = mpz_get_d_2exp(&ex, z);
    return (log2(fabs(m)) + (double)ex) * 0.30102999566398120;
}

/* How many decimal digits a coefficient's numbers gain per multiplication by itself,
 * roughly (0 for 1, -1, i, t^e). */
static double coeff_digits(const tp_coeff *c, const tp_field *F)
{
    if (F->kind == TP_FIELD_PUISEUX) {
        double m = 0;
        const tp_ppoly *pp[2] = {&c->num, &c->den};
        for (int s = 0; s < 2; s++)
            for (size_t k = 0; k < pp[s]->len; k++) {
                double d = log10_abs(mpq_numref(pp[s]->coef[k])) +
                           log10_abs(mpq_denref(pp[s]->coef[k]));
                if (d > m)
                    m = d;
            }
        return m;
    }
    double d = log10_abs(mpq_numref(c->q)) + log10_abs(mpq_denref(c->q));
    if (F->kind == TP_FIELD_COMPLEX) {
        double e = log10_abs(mpq_numref(c->im)) + log10_abs(mpq_denref(c->im));
        d = (d > e ? d : e) + (mpq_sgn(c->q) && mpq_sgn(c->im) ? 0.30103 : 0);
    }
    return d;
}

/* Binomial C(n + k - 1, k - 1) as a double, saturating at 1e300. */
static double multiset_count(double n, double k)
{
    double r = 1;
    for (double i = 1; i < k; i++) {
        r = r * (n + i) / i;
        if (r > 1e300)
            return 1e300;
    }
    return r;
}

/* Estimate the terms of a Puiseux polynomial raised to the m-th power. */
static double ppoly_power_terms(const tp_ppoly *p, unsigned long m)
{
    if (p->len <= 1)
        return 1;
    double t = multiset_count((double)m, (double)p->len);
    mpz_t L;
    mpz_init_set_ui(L, 1);
    for (size_t k = 0; k < p->len; k++)
        mpz_lcm(L, L, mpq_denref(p->exp[k]));
    mpq_t span;
    mpq_init(span);
    mpq_sub(span, p->exp[p->len - 1], p->exp[0]);
    mpz_mul(mpq_numref(span), mpq_numref(span), L);
    mpq_canonicalize(span);
    double box = mpq_get_d(span) * (double)m + 1;
    mpq_clear(span);
    mpz_clear(L);
    return box < t ? box : t;
}

/* Refuse coefficient powers whose size would explode. */
static tp_status check_coeff_power(parser *P, const tp_coeff *c, unsigned long m, int line,
                                   int col)
{
    double digits = coeff_digits(c, &P->F) * (double)m;
    if (digits > (double)P->max_digits)
        return tp_error_set(P->err, TP_ELIMIT, line, col,
                            "this power makes a number of about %.0f digits, more than the "
                            "limit of %zu (raise it with --max-digits N)", digits,
                            P->max_digits);
    if (P->F.kind == TP_FIELD_PUISEUX) {
        const tp_ppoly *pp[2] = {&c->num, &c->den};
        for (int s = 0; s < 2; s++) {
            if (pp[s]->len < 2)
                continue; /* a monomial stays one term */
            double t = ppoly_power_terms(pp[s], m);
            /* multinomial coefficients grow by about log10(len) digits per factor */
            double size = t * (double)m * (coeff_digits(c, &P->F) + log10((double)pp[s]->len) + 0.1);
            if (size > (double)WORK_FACTOR * (double)P->max_digits)
                return tp_error_set(P->err, TP_ELIMIT, line, col,
                                    "this power of a %zu-term expression in %s would hold "
                                    "about %.0f digits in all, too many (raise the limit "
                                    "with --max-digits N)", pp[s]->len, P->F.param, size);
            if (t > (double)P->max_terms ||
                t * (double)pp[s]->len * log2((double)m + 1) > (double)WORK_FACTOR * (double)P->max_terms)
                return tp_error_set(P->err, TP_ELIMIT, line, col,
                                    "this power of a %zu-term expression in %s has about "
                                    "%.0f terms, too many (raise the limit with --max-terms N)",
                                    pp[s]->len, P->F.param, t);
        }
    }
    return TP_OK;
}

/* ------------------------------------------------------------------ parser */

static void tok_describe(const parser *P, const token *t, char *buf, size_t size)
{
    switch (t->kind) {
    case T_END: snprintf(buf, size, "the end of the input"); break;
    case T_OP:
        if (t->op == ';')
            snprintf(buf, size, "';'");
        else
            snprintf(buf, size, "'%c'", t->op);
        break;
    default:
        snprintf(buf, size, "'%.*s'", (int)(t->len > 40 ? 40 : t->len), P->L.s + t->start);
        break;
    }
}

static tp_status advance(parser *P)
{
    return lex_next(&P->L, &P->cur, true);
}

static bool is_op(const parser *P, char op) { return P->cur.kind == T_OP && P->cur.op == op; }

static tp_status parse_expr(parser *P, pv *out, const char *ctx);

static tp_status expected_after(parser *P, const char *what, const char *ctx)
{
    char found[80];
    tok_describe(P, &P->cur, found, sizeof found);
    return tp_error_set(P->err, TP_ESYNTAX, P->cur.line, P->cur.col, "expected %s%s%s, found %s",
                        what, ctx[0] ? " " : "", ctx, found);
}

static tp_status parse_primary(parser *P, pv *out, const char *ctx)
{
    token *t = &P->cur;
    tp_status st;
    if (t->kind == T_NUM) {
        tp_coeff c;
        tp_coeff_init(&c);
        if (t->imag) {
            if (P->F.kind != TP_FIELD_COMPLEX) {
                tp_coeff_clear(&c);
                return tp_error_set(P->err, TP_EDOMAIN, t->line, t->col,
                                    "the imaginary number '%.*s' needs complex coefficients "
                                    "(--over C or an 'over: C' line)",
                                    (int)(t->len > 30 ? 30 : t->len), P->L.s + t->start);
            }
            tp_coeff_set_imag_q(&c, t->val, &P->F);
        } else {
            tp_coeff_set_q(&c, t->val, &P->F);
        }
        st = pv_set_const(P, out, &c);
        tp_coeff_clear(&c);
        if (st)
            return st;
        return advance(P);
    }
    if (t->kind == T_IDENT) {
        const char *name = P->L.s + t->start;
        size_t len = t->len;
        if (len == 4 && (memcmp(name, "over", 4) == 0 || memcmp(name, "vars", 4) == 0)) {
            size_t q = P->L.pos;
            while (q < P->L.len && (P->L.s[q] == ' ' || P->L.s[q] == '\t'))
                q++;
            if (q < P->L.len && P->L.s[q] == ':')
                return tp_error_set(P->err, TP_ESYNTAX, t->line, t->col,
                                    "header lines ('%.*s:') must come before the first "
                                    "polynomial", (int)len, name);
        }
        tp_coeff c;
        tp_coeff_init(&c);
        tp_coeff_set_si(&c, 1, &P->F);
        memset(P->tmpe, 0, P->nv * sizeof *P->tmpe);
        if (P->F.kind == TP_FIELD_PUISEUX && strlen(P->F.param) == len &&
            memcmp(P->F.param, name, len) == 0) {
            mpq_t one;
            mpq_init(one);
            mpq_set_ui(one, 1, 1);
            tp_coeff_set_param_pow(&c, one, &P->F);
            mpq_clear(one);
        } else if (P->F.kind == TP_FIELD_COMPLEX && len == 1 && name[0] == 'i') {
            mpq_t one;
            mpq_init(one);
            mpq_set_ui(one, 1, 1);
            tp_coeff_set_imag_q(&c, one, &P->F);
            mpq_clear(one);
        } else {
            size_t v = 0;
            while (v < P->nv && !(strlen(P->vars[v]) == len && memcmp(P->vars[v], name, len) == 0))
                v++;
            if (v == P->nv) {
                tp_coeff_clear(&c);
                char list[300];
                size_t o = 0;
                list[0] = 0;
                for (size_t k = 0; k < P->nv && o < sizeof list - 8; k++) {
                    int w = snprintf(list + o, sizeof list - o, "%s%s", k ? ", " : "", P->vars[k]);
                    if (w < 0 || (size_t)w >= sizeof list - o) {
                        snprintf(list + o, sizeof list - o, ", ...");
                        break;
                    }
                    o += (size_t)w;
                }
                if ((len == 4 && (memcmp(name, "over", 4) == 0 || memcmp(name, "vars", 4) == 0)) &&
                    P->L.pos < P->L.len && P->L.s[P->L.pos] == ':')
                    return tp_error_set(P->err, TP_ESYNTAX, t->line, t->col,
                                        "header lines ('%.*s:') must come before the first "
                                        "polynomial", (int)len, name);
                return tp_error_set(P->err, TP_ESYNTAX, t->line, t->col,
                                    "unknown variable '%.*s': expected one of %s (fixed by %s)",
                                    (int)(len > 40 ? 40 : len), name,
                                    P->nv ? list : "(none)", P->vars_from);
            }
            P->tmpe[v] = 1;
        }
        pv_clear(out);
        st = pv_add_term(P, out, P->tmpe, &c, 1, t->line, t->col);
        tp_coeff_clear(&c);
        if (st)
            return st;
        return advance(P);
    }
    if (is_op(P, '(')) {
        int line = t->line, col = t->col;
        if (P->depth >= P->max_depth)
            return tp_error_set(P->err, TP_ELIMIT, line, col,
                                "parentheses nested deeper than %zu (raise the limit with "
                                "--max-depth N)", P->max_depth);
        P->depth++;
        st = advance(P);
        if (!st)
            st = parse_expr(P, out, "after '('");
        P->depth--;
        if (st)
            return st;
        if (!is_op(P, ')')) {
            char found[80];
            tok_describe(P, &P->cur, found, sizeof found);
            return tp_error_set(P->err, TP_ESYNTAX, P->cur.line, P->cur.col,
                                "unbalanced '(' opened at %d:%d: expected ')', found %s",
                                line, col, found);
        }
        return advance(P);
    }
    return expected_after(P, "a number, a variable or '('", ctx);
}

/* Exponent after '^': [sign] INT, or '(' [sign] INT ['/' INT] ')' (also decimals). */
static tp_status parse_exponent(parser *P, mpq_t e)
{
    bool paren = false;
    int pline = 0, pcol = 0;
    tp_status st;
    if (is_op(P, '(')) {
        paren = true;
        pline = P->cur.line;
        pcol = P->cur.col;
        if ((st = advance(P)))
            return st;
    }
    bool neg = false;
    while (is_op(P, '-') || is_op(P, '+')) {
        if (P->cur.op == '-')
            neg = !neg;
        if ((st = advance(P)))
            return st;
        if (!paren)
            break;
    }
    if (P->cur.kind != T_NUM || P->cur.imag || (!paren && !P->cur.is_int))
        return expected_after(P, paren ? "a rational exponent such as 5/2" :
                                         "an integer exponent", "after '^'");
    mpq_set(e, P->cur.val);
    if ((st = advance(P)))
        return st;
    if (paren) {
        if (is_op(P, '/')) {
            if ((st = advance(P)))
                return st;
            if (P->cur.kind != T_NUM || !P->cur.is_int)
                return expected_after(P, "an integer denominator", "after '/' in the exponent");
            if (mpq_sgn(P->cur.val) == 0)
                return tp_error_set(P->err, TP_EDOMAIN, P->cur.line, P->cur.col,
                                    "division by zero in the exponent");
            mpq_div(e, e, P->cur.val);
            if ((st = advance(P)))
                return st;
        }
        if (!is_op(P, ')')) {
            char found[80];
            tok_describe(P, &P->cur, found, sizeof found);
            return tp_error_set(P->err, TP_ESYNTAX, P->cur.line, P->cur.col,
                                "unbalanced '(' opened at %d:%d: expected ')' after the "
                                "exponent, found %s", pline, pcol, found);
        }
        if ((st = advance(P)))
            return st;
    }
    if (neg)
        mpq_neg(e, e);
    return TP_OK;
}

static bool mpq_to_i64(const mpq_t q, int64_t *out)
{
    if (mpz_cmp_ui(mpq_denref(q), 1) != 0)
        return false;
    const mpz_srcptr z = mpq_numref(q);
    if (mpz_sizeinbase(z, 2) > 63)
        return false;
    /* |z| < 2^63 */
    mpz_t a;
    mpz_init(a);
    mpz_abs(a, z);
    uint64_t u = 0;
    size_t cnt = 0;
    mpz_export(&u, &cnt, -1, sizeof u, 0, 0, a);
    mpz_clear(a);
    *out = mpz_sgn(z) < 0 ? -(int64_t)u : (int64_t)u;
    return true;
}

/* out = base ^ e, base compacted; position of '^' for errors. */
static tp_status apply_power(parser *P, pv *base, const mpq_t e, int line, int col)
{
    size_t nv = P->nv;
    tp_status st;
    bool integer = mpz_cmp_ui(mpq_denref(e), 1) == 0;
    if (!integer) {
        bool vars = false;
        for (size_t k = 0; k < base->n; k++)
            for (size_t v = 0; v < nv; v++)
                if (base->e[k * nv + v])
                    vars = true;
        if (vars)
            return tp_error_set(P->err, TP_EDOMAIN, line, col,
                                "fractional exponent on a variable: expected an integer "
                                "exponent (only the parameter may have rational exponents)");
        mpq_t pe;
        mpq_init(pe);
        if (base->n != 1 || !tp_coeff_is_param_pow(&base->c[0], pe, &P->F)) {
            mpq_clear(pe);
            if (P->F.kind != TP_FIELD_PUISEUX)
                return tp_error_set(P->err, TP_EDOMAIN, line, col,
                                    "fractional exponent: expected an integer exponent "
                                    "(rational exponents need a parameter, e.g. --over t)");
            return tp_error_set(P->err, TP_EDOMAIN, line, col,
                                "fractional exponent on something other than a power of %s: "
                                "expected an integer exponent", P->F.param);
        }
        mpq_mul(pe, pe, e);
        tp_coeff_set_param_pow(&base->c[0], pe, &P->F);
        mpq_clear(pe);
        return TP_OK;
    }
    int64_t n;
    if (!mpq_to_i64(e, &n))
        return overflow_at(P, line, col);
    if (base->n == 0) {
        if (n < 0)
            return tp_error_set(P->err, TP_EDOMAIN, line, col,
                                "division by zero (negative power of zero)");
        if (n == 0) {
            tp_coeff one;
            tp_coeff_init(&one);
            tp_coeff_set_si(&one, 1, &P->F);
            st = pv_set_const(P, base, &one);
            tp_coeff_clear(&one);
            return st;
        }
        return TP_OK;
    }
    if (base->n == 1) {
        int64_t *ex = base->e;
        for (size_t v = 0; v < nv; v++)
            if (__builtin_mul_overflow(ex[v], n, &ex[v]) || ex[v] == INT64_MIN)
                return overflow_at(P, line, col);
        unsigned long m = n < 0 ? (unsigned long)(-(n + 1)) + 1 : (unsigned long)n;
        if ((st = check_coeff_power(P, &base->c[0], m, line, col)))
            return st;
        int sl = P->err->line, sc = P->err->col;
        P->err->line = line;
        P->err->col = col;
        st = tp_coeff_pow_si(&base->c[0], &base->c[0], (long)n, &P->F, P->err);
        if (!st) {
            P->err->line = sl;
            P->err->col = sc;
        }
        return st;
    }
    if (n < 0)
        return tp_error_set(P->err, TP_EDOMAIN, line, col,
                            "negative power of a polynomial with %zu terms in the variables: "
                            "only a single term can be inverted", base->n);
    if (n == 0) {
        tp_coeff one;
        tp_coeff_init(&one);
        tp_coeff_set_si(&one, 1, &P->F);
        st = pv_set_const(P, base, &one);
        tp_coeff_clear(&one);
        return st;
    }
    /* power of a sum: estimate the size first */
    double k = (double)base->n, m = (double)n;
    double terms = multiset_count(m, k);
    double box = 1;
    for (size_t v = 0; v < nv && box < 1e300; v++) {
        int64_t lo = base->e[v], hi = base->e[v];
        for (size_t t = 1; t < base->n; t++) {
            int64_t x = base->e[t * nv + v];
            if (x < lo)
                lo = x;
            if (x > hi)
                hi = x;
        }
        box *= ((double)hi - (double)lo) * m + 1;
    }
    if (box < terms)
        terms = box;
    if (terms > (double)P->max_terms || terms * k * m > (double)WORK_FACTOR * (double)P->max_terms)
        return tp_error_set(P->err, TP_ELIMIT, line, col,
                            "expanding this power of a %zu-term sum would give up to %.0f terms "
                            "(raise the limit with --max-terms N)", base->n, terms);
    double dig = 0;
    for (size_t t = 0; t < base->n; t++) {
        double d = coeff_digits(&base->c[t], &P->F);
        if (d > dig)
            dig = d;
    }
    if ((dig + log10(k) + 1) * m > (double)P->max_digits ||
        (dig + log10(k) + 0.1) * m * terms > (double)WORK_FACTOR * (double)P->max_digits)
        return tp_error_set(P->err, TP_ELIMIT, line, col,
                            "expanding this power makes numbers of about %.0f digits each, "
                            "%.0f in all, too many for --max-digits %zu (raise it with "
                            "--max-digits N)", (dig + log10(k) + 1) * m,
                            (dig + log10(k) + 0.1) * m * terms, P->max_digits);
    /* exponent range check: n * extreme exponent must fit */
    for (size_t t = 0; t < base->n * nv; t++) {
        int64_t r;
        if (__builtin_mul_overflow(base->e[t], n, &r) || r == INT64_MIN)
            return overflow_at(P, line, col);
    }
    pv acc, tmp;
    pv_init(&acc);
    pv_init(&tmp);
    st = pv_add(P, &acc, base, 1, line, col);
    for (int64_t i = 1; i < n && !st; i++) {
        st = pv_mul(P, &tmp, &acc, base, line, col);
        pv_swap(&acc, &tmp);
    }
    if (!st)
        pv_swap(base, &acc);
    pv_clear(&acc);
    pv_clear(&tmp);
    return st;
}

/* factor := ('+'|'-')* primary ['^' exponent] */
static tp_status parse_factor(parser *P, pv *out, const char *ctx)
{
    tp_status st;
    int sign = 1;
    while (is_op(P, '+') || is_op(P, '-')) {
        if (P->cur.op == '-')
            sign = -sign;
        if ((st = advance(P)))
            return st;
        ctx = sign < 0 ? "after '-'" : "after '+'";
    }
    if ((st = parse_primary(P, out, ctx)))
        return st;
    if (is_op(P, '^')) {
        int line = P->cur.line, col = P->cur.col;
        if ((st = advance(P)))
            return st;
        /* `x^ + 1` must not silently read as x^(+1): a sign right after '^' only */
        if ((is_op(P, '-') || is_op(P, '+')) && (P->cur.line != line || P->cur.col != col + 1))
            return tp_error_set(P->err, TP_ESYNTAX, P->cur.line, P->cur.col,
                                "expected an exponent right after '^', found '%c' after a "
                                "space (write x^-1 or x^(-1))", P->cur.op);
        mpq_t e;
        mpq_init(e);
        st = parse_exponent(P, e);
        if (!st)
            st = pv_compact(P, out);
        if (!st)
            st = apply_power(P, out, e, line, col);
        mpq_clear(e);
        if (st)
            return st;
        if (is_op(P, '^'))
            return tp_error_set(P->err, TP_ESYNTAX, P->cur.line, P->cur.col,
                                "expected an operator other than '^' after a power: write "
                                "(a^b)^c with parentheses");
    }
    if (sign < 0)
        for (size_t k = 0; k < out->n; k++)
            tp_coeff_neg(&out->c[k], &out->c[k], &P->F);
    return TP_OK;
}

/* term := factor (('*'|'/') factor)* */
static tp_status parse_term(parser *P, pv *out, const char *ctx)
{
    tp_status st = parse_factor(P, out, ctx);
    if (st)
        return st;
    pv rhs, prod;
    pv_init(&rhs);
    pv_init(&prod);
    while (!st && (is_op(P, '*') || is_op(P, '/'))) {
        char op = P->cur.op;
        int line = P->cur.line, col = P->cur.col;
        if ((st = advance(P)))
            break;
        if ((st = parse_factor(P, &rhs, op == '*' ? "after '*'" : "after '/'")))
            break;
        if ((st = pv_compact(P, out)) || (st = pv_compact(P, &rhs)))
            break;
        if (op == '/') {
            if (rhs.n == 0) {
                st = tp_error_set(P->err, TP_EDOMAIN, line, col, "division by zero");
                break;
            }
            if (rhs.n > 1) {
                st = tp_error_set(P->err, TP_EDOMAIN, line, col,
                                  "cannot divide by a polynomial with %zu terms in the "
                                  "variables: expected a single term after '/'", rhs.n);
                break;
            }
            for (size_t v = 0; v < P->nv; v++) {
                if (rhs.e[v] == INT64_MIN) {
                    st = overflow_at(P, line, col);
                    break;
                }
                rhs.e[v] = -rhs.e[v];
            }
            if (st)
                break;
            int sl = P->err->line, sc = P->err->col;
            P->err->line = line;
            P->err->col = col;
            st = tp_coeff_inv(&rhs.c[0], &rhs.c[0], &P->F, P->err);
            if (st)
                break;
            P->err->line = sl;
            P->err->col = sc;
        }
        if ((st = pv_mul(P, &prod, out, &rhs, line, col)))
            break;
        pv_swap(out, &prod);
    }
    pv_clear(&rhs);
    pv_clear(&prod);
    return st;
}

/* expr := term (('+'|'-') term)* */
static tp_status parse_expr(parser *P, pv *out, const char *ctx)
{
    pv_clear(out);
    pv t;
    pv_init(&t);
    tp_status st = parse_term(P, &t, ctx);
    if (!st)
        st = pv_add(P, out, &t, 1, P->cur.line, P->cur.col);
    while (!st && (is_op(P, '+') || is_op(P, '-'))) {
        int sign = P->cur.op == '-' ? -1 : 1;
        int line = P->cur.line, col = P->cur.col;
        if ((st = advance(P)))
            break;
        if ((st = parse_term(P, &t, sign < 0 ? "after '-'" : "after '+'")))
            break;
        st = pv_add(P, out, &t, sign, line, col);
    }
    pv_clear(&t);
    return st;
}

/* ----------------------------------------------------------- tp_poly, tp_input */

void tp_poly_init(tp_poly *f, size_t nvars)
{
    memset(f, 0, sizeof *f);
    f->nvars = nvars;
}

void tp_poly_clear(tp_poly *f)
{
    for (size_t k = 0; k < f->nterms; k++)
        tp_coeff_clear(&f->coeffs[k]);
    free(f->exps);
    free(f->coeffs);
    tp_poly_init(f, f->nvars);
}

tp_status tp_poly_copy(tp_poly *dst, const tp_poly *src, tp_error *err)
{
    tp_poly_init(dst, src->nvars);
    size_t n = src->nterms, nv = src->nvars;
    dst->exps = malloc((n * nv != 0 ? n * nv : 1) * sizeof *dst->exps);
    dst->coeffs = malloc((n ? n : 1) * sizeof *dst->coeffs);
    if (!dst->exps || !dst->coeffs) {
        free(dst->exps);
        free(dst->coeffs);
        tp_poly_init(dst, nv);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    if (n * nv != 0)
        memcpy(dst->exps, src->exps, n * nv * sizeof *dst->exps);
    for (size_t k = 0; k < n; k++) {
        tp_coeff_init(&dst->coeffs[k]);
        tp_coeff_set(&dst->coeffs[k], &src->coeffs[k]);
    }
    dst->nterms = dst->cap = n;
    dst->line = src->line;
    dst->col = src->col;
    return TP_OK;
}

void tp_input_init(tp_input *in)
{
    memset(in, 0, sizeof *in);
    tp_field_init(&in->field);
}

void tp_input_clear(tp_input *in)
{
    for (size_t k = 0; k < in->npolys; k++)
        tp_poly_clear(&in->polys[k]);
    free(in->polys);
    for (size_t k = 0; k < in->nvars; k++)
        free(in->vars[k]);
    free(in->vars);
    tp_field_clear(&in->field);
    tp_input_init(in);
}

/* Merge sort of term indices, decreasing lexicographic exponent order. */
static int cmp_exp_desc(const int64_t *a, const int64_t *b, size_t nv)
{
    for (size_t v = 0; v < nv; v++)
        if (a[v] != b[v])
            return a[v] > b[v] ? -1 : 1;
    return 0;
}
static void sort_terms(size_t *ix, size_t *tmp, size_t n, const int64_t *e, size_t nv)
{
    if (n < 2)
        return;
    size_t h = n / 2;
    sort_terms(ix, tmp, h, e, nv);
    sort_terms(ix + h, tmp, n - h, e, nv);
    size_t i = 0, j = h, k = 0;
    while (i < h && j < n)
        tmp[k++] = cmp_exp_desc(e + ix[j] * nv, e + ix[i] * nv, nv) < 0 ? ix[j++] : ix[i++];
    while (i < h)
        tmp[k++] = ix[i++];
    while (j < n)
        tmp[k++] = ix[j++];
    memcpy(ix, tmp, n * sizeof *ix);
}

/* Move a compacted accumulator into a sorted tp_poly. */
static tp_status pv_to_poly(parser *P, pv *a, tp_poly *f)
{
    size_t n = a->n, nv = P->nv;
    tp_poly_init(f, nv);
    size_t *ix = malloc((n ? n : 1) * sizeof *ix), *tmp = malloc((n ? n : 1) * sizeof *tmp);
    f->exps = malloc((n * nv != 0 ? n * nv : 1) * sizeof *f->exps);
    f->coeffs = malloc((n ? n : 1) * sizeof *f->coeffs);
    if (!ix || !tmp || !f->exps || !f->coeffs) {
        free(ix);
        free(tmp);
        free(f->exps);
        free(f->coeffs);
        tp_poly_init(f, nv);
        return tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t k = 0; k < n; k++)
        ix[k] = k;
    sort_terms(ix, tmp, n, a->e, nv);
    for (size_t k = 0; k < n; k++) {
        if (nv)
            memcpy(f->exps + k * nv, a->e + ix[k] * nv, nv * sizeof *f->exps);
        f->coeffs[k] = a->c[ix[k]]; /* move */
    }
    f->nterms = f->cap = n;
    a->n = 0; /* coefficients moved out */
    pv_clear(a);
    free(ix);
    free(tmp);
    return TP_OK;
}

/* --------------------------------------------------------------- headers */

typedef struct {
    bool has_over, has_vars;
    size_t over_at, over_len;   /* byte span of the over: value */
    int over_line, over_col;
    size_t vars_at, vars_len;
    int vars_line, vars_col;
} headers;

/* Scan header lines at the top of the text; L is left at the first body line. */
static tp_status scan_headers(lexer *L, headers *H)
{
    memset(H, 0, sizeof *H);
    for (;;) {
        size_t p = L->pos;
        while (p < L->len && (L->s[p] == ' ' || L->s[p] == '\t' || L->s[p] == '\r'))
            p++;
        if (p >= L->len)
            return TP_OK;
        if (L->s[p] == '\n' || L->s[p] == '#') {
            while (p < L->len && L->s[p] != '\n')
                p++;
            if (p >= L->len) {
                L->pos = p;
                return TP_OK;
            }
            L->pos = p + 1;
            L->line++;
            L->line_start = L->pos;
            continue;
        }
        size_t q = p;
        while (q < L->len && id_char((unsigned char)L->s[q]))
            q++;
        size_t r = q;
        while (r < L->len && (L->s[r] == ' ' || L->s[r] == '\t'))
            r++;
        bool over = q - p == 4 && memcmp(L->s + p, "over", 4) == 0;
        bool vars = q - p == 4 && memcmp(L->s + p, "vars", 4) == 0;
        if (!(over || vars) || r >= L->len || L->s[r] != ':')
            return TP_OK;
        if ((over && H->has_over) || (vars && H->has_vars))
            return tp_error_set(L->err, TP_ESYNTAX, L->line, lx_col(L, p),
                                "a second '%s:' line: expected at most one", over ? "over" : "vars");
        r++;
        while (r < L->len && (L->s[r] == ' ' || L->s[r] == '\t'))
            r++;
        size_t e = r;
        while (e < L->len && L->s[e] != '\n' && L->s[e] != '#')
            e++;
        size_t v = e;
        while (v > r && (L->s[v - 1] == ' ' || L->s[v - 1] == '\t' || L->s[v - 1] == '\r'))
            v--;
        if (over) {
            H->has_over = true;
            H->over_at = r;
            H->over_len = v - r;
            H->over_line = L->line;
            H->over_col = lx_col(L, r);
        } else {
            H->has_vars = true;
            H->vars_at = r;
            H->vars_len = v - r;
            H->vars_line = L->line;
            H->vars_col = lx_col(L, r);
        }
        while (e < L->len && L->s[e] != '\n')
            e++;
        if (e >= L->len) {
            L->pos = e;
            return TP_OK;
        }
        L->pos = e + 1;
        L->line++;
        L->line_start = L->pos;
    }
}

/* Parse a variable list "x y z" or "x, y, z" (len bytes) into vars. Errors at line,
 * col0 + offset (line 0: the --vars option). */
static tp_status parse_var_list(const char *s, size_t len, int line, int col0,
                                const tp_field *F, char ***vars_out, size_t *nv_out,
                                tp_error *err)
{
    char **vars = NULL;
    size_t nv = 0;
    size_t p = 0;
    tp_status st = TP_OK;
    bool need_name = false;
    while (p < len) {
        char c = s[p];
        if (c == ' ' || c == '\t') {
            p++;
            continue;
        }
        if (c == ',') {
            if (need_name || nv == 0) {
                st = tp_error_set(err, TP_ESYNTAX, line, col0 + (int)p,
                                  "expected a variable name before ','");
                goto fail;
            }
            need_name = true;
            p++;
            continue;
        }
        if (!id_start((unsigned char)c)) {
            st = tp_error_set(err, TP_ESYNTAX, line, col0 + (int)p,
                              "expected a variable name (letters, digits, '_'), found '%c'",
                              c >= 0x20 && c < 0x7f ? c : '?');
            goto fail;
        }
        size_t q = p;
        while (q < len && id_char((unsigned char)s[q]))
            q++;
        size_t n = q - p;
        if ((F->kind == TP_FIELD_PUISEUX && strlen(F->param) == n && memcmp(F->param, s + p, n) == 0) ||
            (F->kind == TP_FIELD_COMPLEX && n == 1 && s[p] == 'i')) {
            st = tp_error_set(err, TP_EDOMAIN, line, col0 + (int)p,
                              "'%.*s' is the field's %s, not a variable: expected another name",
                              (int)n, s + p, F->kind == TP_FIELD_COMPLEX ? "imaginary unit" : "parameter");
            goto fail;
        }
        for (size_t k = 0; k < nv; k++)
            if (strlen(vars[k]) == n && memcmp(vars[k], s + p, n) == 0) {
                st = tp_error_set(err, TP_ESYNTAX, line, col0 + (int)p,
                                  "variable '%.*s' is listed twice", (int)n, s + p);
                goto fail;
            }
        char **nvv = realloc(vars, (nv + 1) * sizeof *nvv);
        char *name = malloc(n + 1);
        if (!nvv || !name) {
            free(name);
            if (nvv)
                vars = nvv;
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
            goto fail;
        }
        vars = nvv;
        memcpy(name, s + p, n);
        name[n] = 0;
        vars[nv++] = name;
        need_name = false;
        p = q;
    }
    if (need_name) {
        st = tp_error_set(err, TP_ESYNTAX, line, col0 + (int)len,
                          "expected a variable name after ','");
        goto fail;
    }
    *vars_out = vars;
    *nv_out = nv;
    return TP_OK;
fail:
    for (size_t k = 0; k < nv; k++)
        free(vars[k]);
    free(vars);
    return st;
}

/* Pass 1: variables in order of first appearance. */
static tp_status collect_vars(parser *P)
{
    lexer L = P->L;
    token t;
    tp_status st = TP_OK;
    for (;;) {
        if (lex_next(&L, &t, false) != TP_OK)
            break; /* pass 2 reports the error at its place */
        if (t.kind == T_END)
            break;
        if (t.kind != T_IDENT)
            continue;
        const char *name = L.s + t.start;
        size_t n = t.len;
        if (P->F.kind == TP_FIELD_PUISEUX && strlen(P->F.param) == n && memcmp(P->F.param, name, n) == 0)
            continue;
        if (P->F.kind == TP_FIELD_COMPLEX && n == 1 && name[0] == 'i')
            continue;
        size_t k = 0;
        while (k < P->nv && !(strlen(P->vars[k]) == n && memcmp(P->vars[k], name, n) == 0))
            k++;
        if (k < P->nv)
            continue;
        char **nvv = realloc(P->vars, (P->nv + 1) * sizeof *nvv);
        char *s = malloc(n + 1);
        if (!nvv || !s) {
            free(s);
            if (nvv)
                P->vars = nvv;
            st = tp_error_set(P->err, TP_ENOMEM, 0, 0, "out of memory");
            break;
        }
        P->vars = nvv;
        memcpy(s, name, n);
        s[n] = 0;
        P->vars[P->nv++] = s;
    }
    /* lex_next may have written an error into err; pass 2 rewrites it */
    if (st == TP_OK && P->err) {
        P->err->code = TP_OK;
        P->err->line = P->err->col = 0;
        P->err->msg[0] = 0;
    }
    return st;
}

tp_status tp_input_parse(tp_input *in, const char *text, size_t len,
                         const tp_parse_options *opt, tp_error *err)
{
    tp_error dummy;
    if (!err) {
        tp_error_init(&dummy, NULL);
        err = &dummy;
    }
    tp_input_clear(in);
    parser P;
    memset(&P, 0, sizeof P);
    tp_field_init(&P.F);
    mpq_init(P.cur.val);
    P.err = err;
    P.max_terms = opt && opt->max_terms ? opt->max_terms : DEFAULT_MAX_TERMS;
    P.max_depth = opt && opt->max_depth ? opt->max_depth : DEFAULT_MAX_DEPTH;
    P.max_digits = opt && opt->max_digits ? opt->max_digits : DEFAULT_MAX_DIGITS;
    P.max_polys = opt && opt->max_polys ? opt->max_polys : DEFAULT_MAX_POLYS;
    P.L.s = text;
    P.L.len = len;
    P.L.line = 1;
    P.L.max_digits = P.max_digits;
    P.L.err = err;
    tp_status st;
    headers H;
    tp_poly *polys = NULL;
    size_t npolys = 0, pcap = 0;
    pv acc;
    pv_init(&acc);

    if ((st = scan_headers(&P.L, &H)))
        goto fail;
    /* the field: option wins over the header */
    if (opt && opt->over) {
        st = tp_field_parse(&P.F, opt->over, err);
        if (st) {
            char m[sizeof err->msg];
            snprintf(m, sizeof m, "%s", err->msg);
            tp_error_set(err, st, 0, 0, "option --over %s: %s", opt->over, m);
            goto fail;
        }
    } else if (H.has_over) {
        char spec[512];
        if (H.over_len >= sizeof spec) {
            st = tp_error_set(err, TP_ESYNTAX, H.over_line, H.over_col, "the over: value is too long");
            goto fail;
        }
        memcpy(spec, text + H.over_at, H.over_len);
        spec[H.over_len] = 0;
        st = tp_field_parse(&P.F, spec, err);
        if (st) {
            err->line = H.over_line;
            err->col = H.over_col + (err->col > 0 ? err->col - 1 : 0);
            goto fail;
        }
    }
    /* the variables: option wins over the header */
    if (opt && opt->vars) {
        st = parse_var_list(opt->vars, strlen(opt->vars), 0, 0, &P.F, &P.vars, &P.nv, err);
        if (st) {
            char m[sizeof err->msg];
            snprintf(m, sizeof m, "%s", err->msg);
            tp_error_set(err, st, 0, 0, "option --vars %s: %s", opt->vars, m);
            goto fail;
        }
        P.vars_from = "--vars";
    } else if (H.has_vars) {
        st = parse_var_list(text + H.vars_at, H.vars_len, H.vars_line, H.vars_col, &P.F,
                            &P.vars, &P.nv, err);
        if (st)
            goto fail;
        P.vars_from = "the vars: line";
    } else {
        if ((st = collect_vars(&P)))
            goto fail;
        P.vars_from = "the input";
    }
    P.tmpe = calloc(P.nv ? P.nv : 1, sizeof *P.tmpe);
    if (!P.tmpe) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        goto fail;
    }

    if ((st = advance(&P)))
        goto fail;
    for (;;) {
        if (is_op(&P, ';')) {
            if ((st = advance(&P)))
                goto fail;
            continue;
        }
        if (P.cur.kind == T_END)
            break;
        int line = P.cur.line, col = P.cur.col;
        if ((st = parse_expr(&P, &acc, "")))
            goto fail;
        if (!(P.cur.kind == T_END || is_op(&P, ';'))) {
            char found[80];
            tok_describe(&P, &P.cur, found, sizeof found);
            if (is_op(&P, ')'))
                st = tp_error_set(err, TP_ESYNTAX, P.cur.line, P.cur.col,
                                  "unmatched ')': expected an operator, ';' or the end of the "
                                  "polynomial");
            else
                st = tp_error_set(err, TP_ESYNTAX, P.cur.line, P.cur.col,
                                  "expected an operator such as '*' or '+', ';' or the end of "
                                  "the polynomial, found %s", found);
            goto fail;
        }
        if ((st = pv_compact(&P, &acc)))
            goto fail;
        if (acc.n == 0) {
            st = tp_error_set(err, TP_EDOMAIN, line, col,
                              "the polynomial is zero (all its terms cancel): expected a "
                              "nonzero polynomial");
            goto fail;
        }
        if (npolys >= P.max_polys) {
            st = tp_error_set(err, TP_ELIMIT, line, col,
                              "more than %zu polynomials in one input (raise the limit with "
                              "--max-polys N)", P.max_polys);
            goto fail;
        }
        if (npolys == pcap) {
            size_t nc = pcap ? 2 * pcap : 4;
            tp_poly *np = realloc(polys, nc * sizeof *np);
            if (!np) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                goto fail;
            }
            polys = np;
            pcap = nc;
        }
        if ((st = pv_to_poly(&P, &acc, &polys[npolys])))
            goto fail;
        polys[npolys].line = line;
        polys[npolys].col = col;
        npolys++;
    }
    if (npolys == 0) {
        st = tp_error_set(err, TP_EDOMAIN, P.cur.line, P.cur.col,
                          "empty input: expected a polynomial");
        goto fail;
    }
    tp_field_set(&in->field, &P.F);
    in->nvars = P.nv;
    in->vars = P.vars;
    in->npolys = npolys;
    in->polys = polys;
    tp_field_clear(&P.F);
    mpq_clear(P.cur.val);
    free(P.tmpe);
    pv_clear(&acc);
    return TP_OK;
fail:
    for (size_t k = 0; k < npolys; k++)
        tp_poly_clear(&polys[k]);
    free(polys);
    for (size_t k = 0; k < P.nv; k++)
        free(P.vars[k]);
    free(P.vars);
    free(P.tmpe);
    pv_clear(&acc);
    tp_field_clear(&P.F);
    mpq_clear(P.cur.val);
    tp_input_clear(in);
    return st;
}

/* ------------------------------------------------------------------ text */

typedef struct {
    char *s;
    size_t len, cap;
    bool bad;
} sbuf;

static void sb_puts(sbuf *b, const char *s)
{
    if (b->bad || !s) {
        b->bad = true;
        return;
    }
    size_t n = strlen(s);
    if (b->len + n + 1 > b->cap) {
        size_t nc = b->cap ? b->cap : 64;
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
    memcpy(b->s + b->len, s, n + 1);
    b->len += n;
}

static void put_monomial(sbuf *b, const int64_t *exp, size_t nvars, char *const *vars)
{
    bool first = true;
    char num[32];
    for (size_t v = 0; v < nvars; v++) {
        if (!exp[v])
            continue;
        if (!first)
            sb_puts(b, "*");
        first = false;
        sb_puts(b, vars[v]);
        if (exp[v] != 1) {
            snprintf(num, sizeof num, "^%lld", (long long)exp[v]);
            sb_puts(b, num);
        }
    }
    if (first)
        sb_puts(b, "1");
}

char *tp_monomial_to_str(const int64_t *exp, size_t nvars, char *const *vars)
{
    sbuf b = {0};
    put_monomial(&b, exp, nvars, vars);
    if (b.bad) {
        free(b.s);
        return NULL;
    }
    return b.s;
}

/* Is the printed coefficient a single signed factor (no top-level + or -)? */
static bool coeff_atomic(const tp_coeff *c, const tp_field *F)
{
    switch (F->kind) {
    case TP_FIELD_PUISEUX:
        return c->num.len == 1 && c->den.len == 1 && mpq_sgn(c->den.exp[0]) == 0 &&
               mpq_cmp_ui(c->den.coef[0], 1, 1) == 0;
    case TP_FIELD_COMPLEX: return mpq_sgn(c->q) == 0 || mpq_sgn(c->im) == 0;
    default: return true;
    }
}

char *tp_poly_to_str(const tp_poly *f, const tp_field *F, char *const *vars)
{
    sbuf b = {0};
    if (f->nterms == 0)
        sb_puts(&b, "0");
    for (size_t k = 0; k < f->nterms; k++) {
        const int64_t *e = f->exps + k * f->nvars;
        bool const_term = true;
        for (size_t v = 0; v < f->nvars; v++)
            if (e[v])
                const_term = false;
        char *cs = tp_coeff_to_str(&f->coeffs[k], F);
        if (!cs) {
            b.bad = true;
            break;
        }
        const char *body = cs;
        bool atomic = coeff_atomic(&f->coeffs[k], F);
        /* a quotient "(a)/(b)" reads correctly before "*x" and after " + " */
        bool quotient = F->kind == TP_FIELD_PUISEUX && !atomic &&
                        !(f->coeffs[k].den.len == 1 && mpq_sgn(f->coeffs[k].den.exp[0]) == 0);
        bool neg = atomic && cs[0] == '-';
        if (neg)
            body = cs + 1;
        if (k > 0)
            sb_puts(&b, neg ? " - " : " + ");
        else if (neg)
            sb_puts(&b, "-");
        if (const_term) {
            bool paren = !atomic && !quotient && f->nterms > 1;
            if (paren)
                sb_puts(&b, "(");
            sb_puts(&b, body);
            if (paren)
                sb_puts(&b, ")");
        } else {
            if (!(atomic && strcmp(body, "1") == 0)) {
                bool paren = !atomic && !quotient;
                if (paren)
                    sb_puts(&b, "(");
                sb_puts(&b, body);
                sb_puts(&b, paren ? ")*" : "*");
            }
            put_monomial(&b, e, f->nvars, vars);
        }
        free(cs);
    }
    if (b.bad) {
        free(b.s);
        return NULL;
    }
    return b.s;
}
