/* write_json.c — the interchange format "trope.complex/1" (data/schema/
 * trope.complex-1.schema.json). Exact rationals are strings "p/q" (integral ones too:
 * "-3"); integers (exponents, indices, ray coordinates, weights) are JSON numbers.
 * The layout (indentation, one array item a line) is fixed, so the same tp_trop always
 * gives the same bytes. This file reads a tp_trop and computes no geometry: the only
 * arithmetic is the sign flip of subdivision normals under the max convention, which
 * the complex (complex.h) already applies to its own coordinates.
 */
#include "trope/write.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <inttypes.h>
#include <stdarg.h>
#include <stdio.h>

/* A buffered writer: output is collected in a fixed buffer and handed to the FILE in
 * large blocks, and numbers are formatted by hand (int64 fast paths, GMP beyond). */
typedef struct {
    FILE *out;
    size_t len;
    bool fail;
    char buf[1 << 16];
} jw;

static void jw_flush(jw *w)
{
    if (w->len && fwrite(w->buf, 1, w->len, w->out) != w->len)
        w->fail = true;
    w->len = 0;
}

static void jw_write(jw *w, const char *s, size_t m)
{
    if (w->len + m > sizeof w->buf) {
        jw_flush(w);
        if (m > sizeof w->buf) {
            if (fwrite(s, 1, m, w->out) != m)
                w->fail = true;
            return;
        }
    }
    memcpy(w->buf + w->len, s, m);
    w->len += m;
}

static void jw_puts(jw *w, const char *s)
{
    jw_write(w, s, strlen(s));
}

static void jw_putc(jw *w, int c)
{
    if (w->len + 1 > sizeof w->buf)
        jw_flush(w);
    w->buf[w->len++] = (char)c;
}

static void jw_printf(jw *w, const char *fmt, ...)
{
    char tmp[256];
    va_list ap;
    va_start(ap, fmt);
    int m = vsnprintf(tmp, sizeof tmp, fmt, ap);
    va_end(ap);
    if (m < 0) {
        w->fail = true;
        return;
    }
    if ((size_t)m < sizeof tmp) {
        jw_write(w, tmp, (size_t)m);
        return;
    }
    char *big = malloc((size_t)m + 1);
    if (!big) {
        w->fail = true;
        return;
    }
    va_start(ap, fmt);
    vsnprintf(big, (size_t)m + 1, fmt, ap);
    va_end(ap);
    jw_write(w, big, (size_t)m);
    free(big);
}

/* Decimal digits of an unsigned value into the end of tmp; returns the start. */
static char *fmt_u64(char *end, uint64_t v)
{
    char *p = end;
    do {
        *--p = (char)('0' + v % 10);
        v /= 10;
    } while (v);
    return p;
}

static void jw_u64(jw *w, uint64_t v)
{
    char tmp[24];
    char *p = fmt_u64(tmp + sizeof tmp, v);
    jw_write(w, p, (size_t)(tmp + sizeof tmp - p));
}

static void jw_i64(jw *w, int64_t v)
{
    if (v < 0) {
        jw_putc(w, '-');
        jw_u64(w, (uint64_t)0 - (uint64_t)v);
    } else {
        jw_u64(w, (uint64_t)v);
    }
}

/* An integer as decimal digits (as mpz_out_str would print it). */
static void jw_mpz(jw *w, const mpz_t z)
{
    int64_t v;
    if (tp_z_get64(z, &v)) {
        jw_i64(w, v);
        return;
    }
    char *s = mpz_get_str(NULL, 10, z);
    if (!s) {
        w->fail = true;
        return;
    }
    jw_puts(w, s);
    void (*freefunc)(void *, size_t);
    mp_get_memory_functions(NULL, NULL, &freefunc);
    freefunc(s, strlen(s) + 1);
}

/* JSON string with escapes; bytes that are not valid UTF-8 become U+FFFD. */
static void put_str(jw *f, const char *s)
{
    const unsigned char *p = (const unsigned char *)s;
    jw_putc(f, '"');
    while (*p) {
        unsigned char c = *p;
        if (c == '"' || c == '\\') {
            jw_putc(f, '\\');
            jw_putc(f, c);
            p++;
        } else if (c == '\n') {
            jw_puts(f, "\\n");
            p++;
        } else if (c == '\t') {
            jw_puts(f, "\\t");
            p++;
        } else if (c == '\r') {
            jw_puts(f, "\\r");
            p++;
        } else if (c < 0x20 || c == 0x7f) {
            jw_printf(f, "\\u%04x", c);
            p++;
        } else if (c < 0x80) {
            jw_putc(f, c);
            p++;
        } else {
            /* validate one UTF-8 sequence */
            int len = (c >= 0xc2 && c <= 0xdf) ? 2 : (c >= 0xe0 && c <= 0xef) ? 3
                    : (c >= 0xf0 && c <= 0xf4) ? 4 : 0;
            bool ok = len > 0;
            for (int k = 1; ok && k < len; k++)
                ok = (p[k] & 0xc0) == 0x80;
            if (ok && len == 3 && ((c == 0xe0 && p[1] < 0xa0) || (c == 0xed && p[1] > 0x9f)))
                ok = false;
            if (ok && len == 4 && ((c == 0xf0 && p[1] < 0x90) || (c == 0xf4 && p[1] > 0x8f)))
                ok = false;
            if (ok) {
                jw_write(f, (const char *)p, (size_t)len);
                p += len;
            } else {
                jw_puts(f, "\\ufffd");
                p++;
            }
        }
    }
    jw_putc(f, '"');
}

static mpq_t *qvec_new(size_t n)
{
    mpq_t *v = malloc((n ? n : 1) * sizeof *v);
    if (v)
        for (size_t j = 0; j < n; j++)
            mpq_init(v[j]);
    return v;
}

static void qvec_free(mpq_t *v, size_t n)
{
    if (!v)
        return;
    for (size_t j = 0; j < n; j++)
        mpq_clear(v[j]);
    free(v);
}

/* Exact rational as a JSON string, optionally negated ("p/q", or "p" when integral,
 * as mpq_out_str prints it). */
static void put_rat(jw *f, const mpq_t q, bool negate)
{
    jw_putc(f, '"');
    int64_t a, b;
    if (tp_z_get64(mpq_numref(q), &a) && tp_z_get64(mpq_denref(q), &b)) {
        /* the common case: both fit int64 */
        if (negate && a < 0) {
            jw_u64(f, (uint64_t)0 - (uint64_t)a);
        } else {
            if (negate && a > 0)
                jw_putc(f, '-');
            jw_i64(f, a);
        }
        if (b != 1) {
            jw_putc(f, '/');
            jw_i64(f, b);
        }
        jw_putc(f, '"');
        return;
    }
    bool neg = (mpq_sgn(q) < 0) != negate && mpq_sgn(q) != 0;
    if (neg)
        jw_putc(f, '-');
    mpz_t abs_num; /* |numerator| as a read-only alias */
    mpz_roinit_n(abs_num, mpz_limbs_read(mpq_numref(q)),
                 (mp_size_t)mpz_size(mpq_numref(q)));
    jw_mpz(f, abs_num);
    if (mpz_cmp_ui(mpq_denref(q), 1) != 0) {
        jw_putc(f, '/');
        jw_mpz(f, mpq_denref(q));
    }
    jw_putc(f, '"');
}

static void put_rat_vec(jw *f, mpq_t *v, size_t n, bool negate)
{
    jw_putc(f, '[');
    for (size_t k = 0; k < n; k++) {
        if (k)
            jw_puts(f, ", ");
        put_rat(f, v[k], negate);
    }
    jw_putc(f, ']');
}

static void put_z_vec(jw *f, mpz_t *v, size_t n)
{
    jw_putc(f, '[');
    for (size_t k = 0; k < n; k++) {
        if (k)
            jw_puts(f, ", ");
        jw_mpz(f, v[k]);
    }
    jw_putc(f, ']');
}

static void put_i64_vec(jw *f, const int64_t *v, size_t n)
{
    jw_putc(f, '[');
    for (size_t k = 0; k < n; k++) {
        if (k)
            jw_write(f, ", ", 2);
        jw_i64(f, v[k]);
    }
    jw_putc(f, ']');
}

static void put_idx_vec(jw *f, const uint32_t *v, size_t n)
{
    jw_putc(f, '[');
    for (size_t k = 0; k < n; k++) {
        if (k)
            jw_write(f, ", ", 2);
        jw_u64(f, (uint64_t)v[k]);
    }
    jw_putc(f, ']');
}

/* the unused points (a size_t list) */
static void put_size_vec(jw *f, const size_t *v, size_t n)
{
    jw_putc(f, '[');
    for (size_t k = 0; k < n; k++) {
        if (k)
            jw_write(f, ", ", 2);
        jw_u64(f, (uint64_t)v[k]);
    }
    jw_putc(f, ']');
}

static void put_over(jw *f, const tp_trop *T)
{
    if (!T->has_field) {
        jw_puts(f, "null");
        return;
    }
    switch (T->field.kind) {
    case TP_FIELD_PADIC:
        jw_puts(f, "{\"kind\": \"p-adic\", \"p\": ");
        jw_mpz(f, T->field.p);
        jw_putc(f, '}');
        break;
    case TP_FIELD_PUISEUX:
        jw_puts(f, "{\"kind\": \"puiseux\", \"parameter\": ");
        put_str(f, T->field.param);
        jw_putc(f, '}');
        break;
    case TP_FIELD_COMPLEX:
        jw_puts(f, "{\"kind\": \"complex\"}");
        break;
    case TP_FIELD_TRIVIAL:
    default:
        jw_puts(f, "{\"kind\": \"trivial\"}");
        break;
    }
}

static bool point_used(const tp_trop *T, size_t i)
{
    const tp_subdiv *S = &T->subdiv;
    /* unused is ascending: binary search */
    size_t lo = 0, hi = S->nunused;
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        if (S->unused[mid] == i)
            return false;
        if (S->unused[mid] < i)
            lo = mid + 1;
        else
            hi = mid;
    }
    return true;
}

/* Variable name k: the trop's own names, or x1, x2, ... when it has none. */
static void put_var(jw *f, const tp_trop *T, size_t k)
{
    if (T->vars && k < T->nvars && T->vars[k]) {
        put_str(f, T->vars[k]);
    } else {
        jw_printf(f, "\"x%zu\"", k + 1);
    }
}

static tp_status write_terms(jw *f, const tp_trop *T, tp_error *err)
{
    const tp_points *P = &T->points;
    size_t n = P->n;
    jw_puts(f, "  \"terms\": [");
    if (T->has_poly) {
        const tp_poly *p = &T->poly;
        mpq_t v;
        mpq_init(v);
        for (size_t i = 0; i < p->nterms; i++) {
            jw_puts(f, i ? ",\n    " : "\n    ");
            jw_puts(f, "{\"exponent\": ");
            put_i64_vec(f, p->exps + i * p->nvars, p->nvars);
            char *c = tp_coeff_to_str(&p->coeffs[i], &T->field);
            if (!c) {
                mpq_clear(v);
                return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory writing JSON");
            }
            jw_puts(f, ", \"coefficient\": ");
            put_str(f, c);
            free(c);
            tp_coeff_val(v, &p->coeffs[i], &T->field);
            jw_puts(f, ", \"valuation\": ");
            put_rat(f, v, false);
            jw_puts(f, i < P->count && point_used(T, i) ? ", \"used\": true}" : ", \"used\": false}");
        }
        mpq_clear(v);
    } else {
        for (size_t i = 0; i < P->count; i++) {
            jw_puts(f, i ? ",\n    " : "\n    ");
            jw_puts(f, "{\"exponent\": ");
            put_i64_vec(f, P->exps + i * n, n);
            /* heights are stored as the lower hull sees them: negated under --max */
            jw_puts(f, ", \"height\": ");
            put_rat(f, P->heights[i], T->max);
            jw_puts(f, point_used(T, i) ? ", \"used\": true}" : ", \"used\": false}");
        }
    }
    jw_puts(f, "\n  ],\n");
    return TP_OK;
}

static bool write_subdivision(jw *f, const tp_trop *T)
{
    const tp_subdiv *S = &T->subdiv;
    const tp_hull *H = &S->hull;
    size_t n = T->points.n;
    /* subdivision cell -> complex cell dual to it. The complex is built with cell k
     * dual to subdivision cell k (complex.c): then no table is needed. Otherwise (the
     * complex sorts its cells) the table is 32-bit (complex cells are fewer than 2^32,
     * complex.h) and covers only the subdivision cells that have a dual (they come
     * first: cells are sorted by dimension, descending), since it is allocated at the
     * peak of the run. */
    const tp_complex *C = &T->complex;
    bool same = true;
    size_t ndual = 0; /* 1 + the largest dual index */
    for (size_t k = 0; k < C->ncells; k++) {
        same = same && C->cells[k].dual == k;
        if (C->cells[k].dual < S->ncells && C->cells[k].dual >= ndual)
            ndual = (size_t)C->cells[k].dual + 1;
    }
    uint32_t *dual_of = same ? NULL : malloc((ndual ? ndual : 1) * sizeof *dual_of);
    mpq_t *ipt = qvec_new(n);
    if ((!same && !dual_of) || !ipt) {
        free(dual_of);
        qvec_free(ipt, n);
        return false;
    }
    if (dual_of) {
        for (size_t c = 0; c < ndual; c++)
            dual_of[c] = UINT32_MAX;
        for (size_t k = 0; k < C->ncells; k++)
            if (C->cells[k].dual < S->ncells)
                dual_of[C->cells[k].dual] = (uint32_t)k;
    }
    jw_puts(f, "  \"subdivision\": {\n    \"cells\": [");
    for (size_t c = 0; c < S->ncells; c++) {
        const tp_subdiv_cell *sc = &S->cells[c];
        size_t dual = !dual_of ? (c < C->ncells ? c : SIZE_MAX)
                      : c < ndual && dual_of[c] != UINT32_MAX ? dual_of[c] : SIZE_MAX;
        jw_puts(f, c ? ",\n      " : "\n      ");
        jw_puts(f, "{\"points\": ");
        put_idx_vec(f, sc->pts, sc->npts);
        jw_puts(f, ", \"dim\": ");
        jw_i64(f, sc->dim);
        jw_puts(f, ", \"normal\": ");
        /* a maximal cell lies on exactly one lower facet: its normal is that facet's;
         * a smaller cell's normal is the relative interior point of its dual cell
         * (already in the output convention); a vertex has none */
        if (sc->dim == H->dim && sc->nlower == 1 && sc->lower[0] < H->nlower &&
            H->lower[sc->lower[0]].w)
            put_rat_vec(f, H->lower[sc->lower[0]].w, n, T->max);
        else if (sc->dim == H->dim && dual != SIZE_MAX) {
            /* the complex took the facet normals: the dual cell's only vertex, already
             * in the output convention */
            const tp_complex_cell *cc = &C->cells[dual];
            put_rat_vec(f, T->complex.verts + cc->verts[0] * n, n, false);
        }
        else if (dual != SIZE_MAX) {
            tp_complex_interior(C, dual, ipt);
            put_rat_vec(f, ipt, n, false);
        }
        else
            jw_puts(f, "null");
        jw_putc(f, '}');
    }
    jw_puts(f, S->ncells ? "\n    ],\n" : "],\n");
    jw_puts(f, "    \"unused\": ");
    put_size_vec(f, S->unused, S->nunused);
    jw_puts(f, "\n  },\n");
    free(dual_of);
    qvec_free(ipt, n);
    return true;
}

static bool write_complex(jw *f, const tp_trop *T)
{
    const tp_complex *C = &T->complex;
    const tp_subdiv *S = &T->subdiv;
    size_t n = C->n;
    mpq_t *ipt = qvec_new(n);
    if (!ipt)
        return false;
    jw_printf(f, "  \"complex\": {\n    \"ambient_dim\": %zu,\n    \"dim\": %d,\n", n, C->dim);
    jw_puts(f, "    \"lineality\": [");
    for (size_t k = 0; k < C->nlin; k++) {
        if (k)
            jw_puts(f, ", ");
        put_z_vec(f, C->lin + k * n, n);
    }
    jw_puts(f, "],\n    \"vertices\": [");
    for (size_t k = 0; k < C->nverts; k++) {
        jw_puts(f, k ? ",\n      " : "\n      ");
        put_rat_vec(f, C->verts + k * n, n, false);
    }
    jw_puts(f, C->nverts ? "\n    ],\n" : "],\n");
    jw_puts(f, "    \"rays\": [");
    for (size_t k = 0; k < C->nrays; k++) {
        jw_puts(f, k ? ",\n      " : "\n      ");
        put_z_vec(f, C->rays + k * n, n);
    }
    jw_puts(f, C->nrays ? "\n    ],\n" : "],\n");
    jw_puts(f, "    \"cells\": [");
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cc = &C->cells[c];
        jw_puts(f, c ? ",\n      " : "\n      ");
        jw_puts(f, "{\"dim\": ");
        jw_i64(f, cc->dim);
        jw_puts(f, ", \"vertices\": ");
        put_idx_vec(f, cc->verts, cc->nverts);
        jw_puts(f, ", \"rays\": ");
        put_idx_vec(f, tp_complex_cell_rays(cc), cc->nrays);
        jw_puts(f, ", \"weight\": ");
        jw_mpz(f, cc->weight);
        jw_puts(f, ", \"dual\": ");
        if (cc->dual < S->ncells)
            put_idx_vec(f, S->cells[cc->dual].pts, S->cells[cc->dual].npts);
        else
            jw_puts(f, "[]");
        jw_puts(f, ", \"dual_cell\": ");
        jw_u64(f, (uint64_t)cc->dual);
        jw_puts(f, ", \"interior\": ");
        tp_complex_interior(C, c, ipt);
        put_rat_vec(f, ipt, n, false);
        jw_puts(f, ", \"initial_form\": ");
        if (cc->initial_form)
            put_str(f, cc->initial_form);
        else
            jw_puts(f, "null");
        if (mpz_sgn(tp_complex_mult(C, c)) != 0) {
            jw_puts(f, ", \"multiplicity\": ");
            jw_mpz(f, tp_complex_mult(C, c));
        }
        jw_putc(f, '}');
    }
    qvec_free(ipt, n);
    jw_puts(f, C->ncells ? "\n    ]\n  },\n" : "]\n  },\n");
    return true;
}

static void write_invariants(jw *f, const tp_trop *T)
{
    const tp_complex *C = &T->complex;
    jw_puts(f, "  \"invariants\": {\n    \"f_vector\": [");
    if (C->f_vector)
        for (int k = 0; k <= C->dim; k++)
            jw_printf(f, "%s%zu", k ? ", " : "", C->f_vector[k]);
    jw_printf(f, "],\n    \"balanced\": %s,\n", C->balanced ? "true" : "false");
    jw_printf(f, "    \"unbalanced\": %zu,\n", C->nunbalanced);
    jw_printf(f, "    \"is_curve\": %s,\n", C->is_curve ? "true" : "false");
    if (C->is_curve && C->genus >= 0)
        jw_printf(f, "    \"genus\": %ld,\n", C->genus);
    else
        jw_puts(f, "    \"genus\": null,\n");
    if (C->smooth >= 0)
        jw_printf(f, "    \"smooth\": %s,\n", C->smooth ? "true" : "false");
    else
        jw_puts(f, "    \"smooth\": null,\n");
    if (C->is_curve) {
        jw_printf(f, "    \"bounded_edges\": %zu,\n", C->nbounded);
        jw_printf(f, "    \"unbounded_edges\": %zu,\n", C->nunbounded);
    } else {
        jw_puts(f, "    \"bounded_edges\": null,\n    \"unbounded_edges\": null,\n");
    }
    jw_puts(f, "    \"rays\": [");
    for (size_t k = 0; k < C->nraydeg; k++) {
        jw_puts(f, k ? ",\n      " : "\n      ");
        jw_puts(f, "{\"direction\": ");
        put_z_vec(f, C->raydeg[k].dir, C->n);
        jw_puts(f, ", \"weight\": ");
        jw_mpz(f, C->raydeg[k].weight);
        jw_putc(f, '}');
    }
    jw_puts(f, C->nraydeg ? "\n    ]\n  }\n" : "]\n  }\n");
}

tp_status tp_write_json(FILE *out, const tp_trop *T, tp_error *err)
{
    jw *f = malloc(sizeof *f);
    if (!f)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory writing JSON");
    f->out = out;
    f->len = 0;
    f->fail = false;
    size_t n = T->points.n;
    jw_puts(f, "{\n  \"format\": \"trope.complex/1\",\n");
    jw_printf(f, "  \"convention\": \"%s\",\n", T->max ? "max" : "min");
    jw_puts(f, "  \"over\": ");
    put_over(f, T);
    jw_puts(f, ",\n  \"variables\": [");
    for (size_t k = 0; k < n; k++) {
        if (k)
            jw_puts(f, ", ");
        put_var(f, T, k);
    }
    jw_puts(f, "],\n");
    tp_status st = write_terms(f, T, err);
    if (st != TP_OK) {
        jw_flush(f);
        free(f);
        return st;
    }
    if (!write_subdivision(f, T) || !write_complex(f, T)) {
        jw_flush(f);
        free(f);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory writing JSON");
    }
    write_invariants(f, T);
    jw_puts(f, "}\n");
    jw_flush(f);
    bool fail = f->fail;
    free(f);
    if (fail || ferror(out))
        return tp_error_set(err, TP_EIO, 0, 0, "cannot write the JSON output");
    return TP_OK;
}
