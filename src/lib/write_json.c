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

/* JSON string with escapes; bytes that are not valid UTF-8 become U+FFFD. */
static void put_str(FILE *f, const char *s)
{
    const unsigned char *p = (const unsigned char *)s;
    fputc('"', f);
    while (*p) {
        unsigned char c = *p;
        if (c == '"' || c == '\\') {
            fputc('\\', f);
            fputc(c, f);
            p++;
        } else if (c == '\n') {
            fputs("\\n", f);
            p++;
        } else if (c == '\t') {
            fputs("\\t", f);
            p++;
        } else if (c == '\r') {
            fputs("\\r", f);
            p++;
        } else if (c < 0x20 || c == 0x7f) {
            fprintf(f, "\\u%04x", c);
            p++;
        } else if (c < 0x80) {
            fputc(c, f);
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
                fwrite(p, 1, (size_t)len, f);
                p += len;
            } else {
                fputs("\\ufffd", f);
                p++;
            }
        }
    }
    fputc('"', f);
}

/* Exact rational as a JSON string, optionally negated. */
static void put_rat(FILE *f, const mpq_t q, bool negate)
{
    mpq_t t;
    mpq_init(t);
    if (negate)
        mpq_neg(t, q);
    else
        mpq_set(t, q);
    fputc('"', f);
    mpq_out_str(f, 10, t);
    fputc('"', f);
    mpq_clear(t);
}

static void put_rat_vec(FILE *f, mpq_t *v, size_t n, bool negate)
{
    fputc('[', f);
    for (size_t k = 0; k < n; k++) {
        if (k)
            fputs(", ", f);
        put_rat(f, v[k], negate);
    }
    fputc(']', f);
}

static void put_z_vec(FILE *f, mpz_t *v, size_t n)
{
    fputc('[', f);
    for (size_t k = 0; k < n; k++) {
        if (k)
            fputs(", ", f);
        mpz_out_str(f, 10, v[k]);
    }
    fputc(']', f);
}

static void put_i64_vec(FILE *f, const int64_t *v, size_t n)
{
    fputc('[', f);
    for (size_t k = 0; k < n; k++)
        fprintf(f, "%s%" PRId64, k ? ", " : "", v[k]);
    fputc(']', f);
}

static void put_idx_vec(FILE *f, const size_t *v, size_t n)
{
    fputc('[', f);
    for (size_t k = 0; k < n; k++)
        fprintf(f, "%s%zu", k ? ", " : "", v[k]);
    fputc(']', f);
}

static void put_over(FILE *f, const tp_trop *T)
{
    if (!T->has_field) {
        fputs("null", f);
        return;
    }
    switch (T->field.kind) {
    case TP_FIELD_PADIC:
        fputs("{\"kind\": \"p-adic\", \"p\": ", f);
        mpz_out_str(f, 10, T->field.p);
        fputc('}', f);
        break;
    case TP_FIELD_PUISEUX:
        fputs("{\"kind\": \"puiseux\", \"parameter\": ", f);
        put_str(f, T->field.param);
        fputc('}', f);
        break;
    case TP_FIELD_COMPLEX:
        fputs("{\"kind\": \"complex\"}", f);
        break;
    case TP_FIELD_TRIVIAL:
    default:
        fputs("{\"kind\": \"trivial\"}", f);
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
static void put_var(FILE *f, const tp_trop *T, size_t k)
{
    if (T->vars && k < T->nvars && T->vars[k]) {
        put_str(f, T->vars[k]);
    } else {
        fprintf(f, "\"x%zu\"", k + 1);
    }
}

static tp_status write_terms(FILE *f, const tp_trop *T, tp_error *err)
{
    const tp_points *P = &T->points;
    size_t n = P->n;
    fputs("  \"terms\": [", f);
    if (T->has_poly) {
        const tp_poly *p = &T->poly;
        mpq_t v;
        mpq_init(v);
        for (size_t i = 0; i < p->nterms; i++) {
            fputs(i ? ",\n    " : "\n    ", f);
            fputs("{\"exponent\": ", f);
            put_i64_vec(f, p->exps + i * p->nvars, p->nvars);
            char *c = tp_coeff_to_str(&p->coeffs[i], &T->field);
            if (!c) {
                mpq_clear(v);
                return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory writing JSON");
            }
            fputs(", \"coefficient\": ", f);
            put_str(f, c);
            free(c);
            tp_coeff_val(v, &p->coeffs[i], &T->field);
            fputs(", \"valuation\": ", f);
            put_rat(f, v, false);
            fprintf(f, ", \"used\": %s}", i < P->count && point_used(T, i) ? "true" : "false");
        }
        mpq_clear(v);
    } else {
        for (size_t i = 0; i < P->count; i++) {
            fputs(i ? ",\n    " : "\n    ", f);
            fputs("{\"exponent\": ", f);
            put_i64_vec(f, P->exps + i * n, n);
            /* heights are stored as the lower hull sees them: negated under --max */
            fputs(", \"height\": ", f);
            put_rat(f, P->heights[i], T->max);
            fprintf(f, ", \"used\": %s}", point_used(T, i) ? "true" : "false");
        }
    }
    fputs("\n  ],\n", f);
    return TP_OK;
}

static void write_subdivision(FILE *f, const tp_trop *T)
{
    const tp_subdiv *S = &T->subdiv;
    const tp_hull *H = &S->hull;
    size_t n = T->points.n;
    /* subdivision cell -> complex cell dual to it */
    size_t *dual_of = malloc((S->ncells ? S->ncells : 1) * sizeof *dual_of);
    if (dual_of) {
        for (size_t c = 0; c < S->ncells; c++)
            dual_of[c] = SIZE_MAX;
        for (size_t k = 0; k < T->complex.ncells; k++)
            if (T->complex.cells[k].dual < S->ncells)
                dual_of[T->complex.cells[k].dual] = k;
    }
    fputs("  \"subdivision\": {\n    \"cells\": [", f);
    for (size_t c = 0; c < S->ncells; c++) {
        const tp_subdiv_cell *sc = &S->cells[c];
        fputs(c ? ",\n      " : "\n      ", f);
        fputs("{\"points\": ", f);
        put_idx_vec(f, sc->pts, sc->npts);
        fprintf(f, ", \"dim\": %d, \"normal\": ", sc->dim);
        /* a maximal cell lies on exactly one lower facet: its normal is that facet's;
         * a smaller cell's normal is the relative interior point of its dual cell
         * (already in the output convention); a vertex has none */
        if (sc->dim == H->dim && sc->nlower == 1 && sc->lower[0] < H->nlower)
            put_rat_vec(f, H->lower[sc->lower[0]].w, n, T->max);
        else if (dual_of && dual_of[c] != SIZE_MAX)
            put_rat_vec(f, T->complex.cells[dual_of[c]].interior, n, false);
        else
            fputs("null", f);
        fputc('}', f);
    }
    fputs(S->ncells ? "\n    ],\n" : "],\n", f);
    fputs("    \"unused\": ", f);
    put_idx_vec(f, S->unused, S->nunused);
    fputs("\n  },\n", f);
    free(dual_of);
}

static void write_complex(FILE *f, const tp_trop *T)
{
    const tp_complex *C = &T->complex;
    const tp_subdiv *S = &T->subdiv;
    size_t n = C->n;
    fprintf(f, "  \"complex\": {\n    \"ambient_dim\": %zu,\n    \"dim\": %d,\n", n, C->dim);
    fputs("    \"lineality\": [", f);
    for (size_t k = 0; k < C->nlin; k++) {
        if (k)
            fputs(", ", f);
        put_z_vec(f, C->lin + k * n, n);
    }
    fputs("],\n    \"vertices\": [", f);
    for (size_t k = 0; k < C->nverts; k++) {
        fputs(k ? ",\n      " : "\n      ", f);
        put_rat_vec(f, C->verts + k * n, n, false);
    }
    fputs(C->nverts ? "\n    ],\n" : "],\n", f);
    fputs("    \"rays\": [", f);
    for (size_t k = 0; k < C->nrays; k++) {
        fputs(k ? ",\n      " : "\n      ", f);
        put_z_vec(f, C->rays + k * n, n);
    }
    fputs(C->nrays ? "\n    ],\n" : "],\n", f);
    fputs("    \"cells\": [", f);
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cc = &C->cells[c];
        fputs(c ? ",\n      " : "\n      ", f);
        fprintf(f, "{\"dim\": %d, \"vertices\": ", cc->dim);
        put_idx_vec(f, cc->verts, cc->nverts);
        fputs(", \"rays\": ", f);
        put_idx_vec(f, cc->rays, cc->nrays);
        fputs(", \"weight\": ", f);
        mpz_out_str(f, 10, cc->weight);
        fputs(", \"dual\": ", f);
        if (cc->dual < S->ncells)
            put_idx_vec(f, S->cells[cc->dual].pts, S->cells[cc->dual].npts);
        else
            fputs("[]", f);
        fprintf(f, ", \"dual_cell\": %zu", cc->dual);
        fputs(", \"interior\": ", f);
        if (cc->interior)
            put_rat_vec(f, cc->interior, n, false);
        else
            fputs("null", f);
        fputs(", \"initial_form\": ", f);
        if (cc->initial_form)
            put_str(f, cc->initial_form);
        else
            fputs("null", f);
        if (mpz_sgn(cc->mult) != 0) {
            fputs(", \"multiplicity\": ", f);
            mpz_out_str(f, 10, cc->mult);
        }
        fputc('}', f);
    }
    fputs(C->ncells ? "\n    ]\n  },\n" : "]\n  },\n", f);
}

static void write_invariants(FILE *f, const tp_trop *T)
{
    const tp_complex *C = &T->complex;
    fputs("  \"invariants\": {\n    \"f_vector\": [", f);
    if (C->f_vector)
        for (int k = 0; k <= C->dim; k++)
            fprintf(f, "%s%zu", k ? ", " : "", C->f_vector[k]);
    fprintf(f, "],\n    \"balanced\": %s,\n", C->balanced ? "true" : "false");
    fprintf(f, "    \"unbalanced\": %zu,\n", C->nunbalanced);
    fprintf(f, "    \"is_curve\": %s,\n", C->is_curve ? "true" : "false");
    if (C->is_curve && C->genus >= 0)
        fprintf(f, "    \"genus\": %ld,\n", C->genus);
    else
        fputs("    \"genus\": null,\n", f);
    if (C->smooth >= 0)
        fprintf(f, "    \"smooth\": %s,\n", C->smooth ? "true" : "false");
    else
        fputs("    \"smooth\": null,\n", f);
    if (C->is_curve) {
        fprintf(f, "    \"bounded_edges\": %zu,\n", C->nbounded);
        fprintf(f, "    \"unbounded_edges\": %zu,\n", C->nunbounded);
    } else {
        fputs("    \"bounded_edges\": null,\n    \"unbounded_edges\": null,\n", f);
    }
    fputs("    \"rays\": [", f);
    for (size_t k = 0; k < C->nraydeg; k++) {
        fputs(k ? ",\n      " : "\n      ", f);
        fputs("{\"direction\": ", f);
        put_z_vec(f, C->raydeg[k].dir, C->n);
        fputs(", \"weight\": ", f);
        mpz_out_str(f, 10, C->raydeg[k].weight);
        fputc('}', f);
    }
    fputs(C->nraydeg ? "\n    ]\n  }\n" : "]\n  }\n", f);
}

tp_status tp_write_json(FILE *out, const tp_trop *T, tp_error *err)
{
    FILE *f = out;
    size_t n = T->points.n;
    fputs("{\n  \"format\": \"trope.complex/1\",\n", f);
    fprintf(f, "  \"convention\": \"%s\",\n", T->max ? "max" : "min");
    fputs("  \"over\": ", f);
    put_over(f, T);
    fputs(",\n  \"variables\": [", f);
    for (size_t k = 0; k < n; k++) {
        if (k)
            fputs(", ", f);
        put_var(f, T, k);
    }
    fputs("],\n", f);
    tp_status st = write_terms(f, T, err);
    if (st != TP_OK)
        return st;
    write_subdivision(f, T);
    write_complex(f, T);
    write_invariants(f, T);
    fputs("}\n", f);
    if (ferror(f))
        return tp_error_set(err, TP_EIO, 0, 0, "cannot write the JSON output");
    return TP_OK;
}
