/* write_text.c — the report for people: what was read, the terms with their
 * valuations, the regular subdivision, the tropical hypersurface (exact vertices, rays,
 * lineality, cells) and its invariants, in aligned columns with exact rationals.
 * Reads a tp_trop, computes no geometry (the one piece of arithmetic is the sign flip
 * of subdivision normals under the max convention, which the complex has already
 * applied to its own coordinates).
 */
#include "trope/write.h"

#include <inttypes.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------- strings */

typedef struct {
    char *s;
    size_t len, cap;
    bool oom;
} sbuf;

static void sb_reserve(sbuf *b, size_t extra)
{
    if (b->oom || b->len + extra + 1 <= b->cap)
        return;
    size_t ncap = b->cap ? b->cap : 32;
    while (ncap < b->len + extra + 1)
        ncap *= 2;
    char *ns = realloc(b->s, ncap);
    if (!ns) {
        b->oom = true;
        return;
    }
    b->s = ns;
    b->cap = ncap;
}

static void sb_puts(sbuf *b, const char *s)
{
    size_t l = strlen(s);
    sb_reserve(b, l);
    if (b->oom)
        return;
    memcpy(b->s + b->len, s, l + 1);
    b->len += l;
}

static void sb_printf(sbuf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void sb_printf(sbuf *b, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int l = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (l < 0) {
        b->oom = true;
        return;
    }
    sb_reserve(b, (size_t)l);
    if (b->oom)
        return;
    va_start(ap, fmt);
    vsnprintf(b->s + b->len, (size_t)l + 1, fmt, ap);
    va_end(ap);
    b->len += (size_t)l;
}

static void sb_q(sbuf *b, const mpq_t q, bool negate)
{
    size_t need = mpz_sizeinbase(mpq_numref(q), 10) + mpz_sizeinbase(mpq_denref(q), 10) + 4;
    sb_reserve(b, need);
    if (b->oom)
        return;
    char *at = b->s + b->len;
    if (negate && mpq_sgn(q) != 0) {
        mpq_t t;
        mpq_init(t);
        mpq_neg(t, q);
        mpq_get_str(at, 10, t);
        mpq_clear(t);
    } else {
        mpq_get_str(at, 10, q);
    }
    b->len += strlen(at);
}

static void sb_z(sbuf *b, const mpz_t z)
{
    size_t need = mpz_sizeinbase(z, 10) + 3;
    sb_reserve(b, need);
    if (b->oom)
        return;
    char *at = b->s + b->len;
    mpz_get_str(at, 10, z);
    b->len += strlen(at);
}

static void sb_qvec(sbuf *b, mpq_t *v, size_t n, bool negate)
{
    sb_puts(b, "(");
    for (size_t k = 0; k < n; k++) {
        if (k)
            sb_puts(b, ", ");
        sb_q(b, v[k], negate);
    }
    sb_puts(b, ")");
}

static void sb_zvec(sbuf *b, mpz_t *v, size_t n)
{
    sb_puts(b, "(");
    for (size_t k = 0; k < n; k++) {
        if (k)
            sb_puts(b, ", ");
        sb_z(b, v[k]);
    }
    sb_puts(b, ")");
}

static void sb_ivec(sbuf *b, const int64_t *v, size_t n)
{
    sb_puts(b, "(");
    for (size_t k = 0; k < n; k++)
        sb_printf(b, "%s%" PRId64, k ? ", " : "", v[k]);
    sb_puts(b, ")");
}

/* "v0 v3 v5" style index lists; "-" when empty. */
static void sb_idx(sbuf *b, const char *prefix, const uint32_t *v, size_t n)
{
    if (n == 0) {
        sb_puts(b, "-");
        return;
    }
    for (size_t k = 0; k < n; k++)
        sb_printf(b, "%s%s%" PRIu32, k ? " " : "", prefix, v[k]);
}

/* ---------------------------------------------------------------- tables */

/* A table of strings printed with left-aligned columns (the last one unpadded). */
typedef struct {
    size_t ncols;
    size_t nrows, cap;   /* rows including the header */
    char **cell;         /* nrows * ncols, malloc'ed */
    bool oom;
} table;

static void table_init(table *t, size_t ncols)
{
    memset(t, 0, sizeof *t);
    t->ncols = ncols;
}

static void table_clear(table *t)
{
    for (size_t k = 0; k < t->nrows * t->ncols; k++)
        free(t->cell[k]);
    free(t->cell);
    memset(t, 0, sizeof *t);
}

/* Add a row; takes ownership of each sbuf's string (NULL strings are ""). */
static void table_row(table *t, sbuf *cols)
{
    if (!t->oom && t->nrows == t->cap) {
        size_t ncap = t->cap ? 2 * t->cap : 16;
        char **nc = realloc(t->cell, ncap * t->ncols * sizeof *nc);
        if (!nc)
            t->oom = true;
        else {
            t->cell = nc;
            t->cap = ncap;
        }
    }
    for (size_t c = 0; c < t->ncols; c++) {
        if (cols[c].oom)
            t->oom = true;
        if (t->oom) {
            free(cols[c].s);
        } else {
            t->cell[t->nrows * t->ncols + c] = cols[c].s;
        }
        memset(&cols[c], 0, sizeof cols[c]);
    }
    if (!t->oom)
        t->nrows++;
}

static void table_header(table *t, const char *const *names)
{
    sbuf cols[16];
    memset(cols, 0, sizeof cols);
    for (size_t c = 0; c < t->ncols && c < 16; c++)
        sb_puts(&cols[c], names[c]);
    table_row(t, cols);
}

static void table_print(FILE *f, const table *t, const char *indent)
{
    size_t width[16] = {0};
    for (size_t r = 0; r < t->nrows; r++)
        for (size_t c = 0; c < t->ncols && c < 16; c++) {
            const char *s = t->cell[r * t->ncols + c];
            size_t l = s ? strlen(s) : 0;
            if (l > width[c])
                width[c] = l;
        }
    for (size_t r = 0; r < t->nrows; r++) {
        fputs(indent, f);
        /* trailing empty columns are not padded */
        size_t last = 0;
        for (size_t c = 0; c < t->ncols; c++) {
            const char *s = t->cell[r * t->ncols + c];
            if (s && *s)
                last = c;
        }
        for (size_t c = 0; c <= last; c++) {
            const char *s = t->cell[r * t->ncols + c];
            if (!s)
                s = "";
            if (c == last)
                fputs(s, f);
            else
                fprintf(f, "%-*s  ", (int)width[c], s);
        }
        fputc('\n', f);
    }
}

/* ---------------------------------------------------------------- report */

static const char *var_name(const tp_trop *T, size_t k, char *buf, size_t size)
{
    if (T->vars && k < T->nvars && T->vars[k])
        return T->vars[k];
    snprintf(buf, size, "x%zu", k + 1);
    return buf;
}

static bool point_used(const tp_trop *T, size_t i)
{
    const tp_subdiv *S = &T->subdiv;
    size_t lo = 0, hi = S->nunused; /* unused is ascending */
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

/* "1 vertex", "2 vertices" */
static const char *pl(size_t n, const char *one, const char *many)
{
    return n == 1 ? one : many;
}

static tp_status oom(tp_error *err)
{
    return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory writing the report");
}

static tp_status write_header(FILE *f, const tp_trop *T)
{
    const tp_points *P = &T->points;
    size_t n = P->n;
    char buf[64];
    if (T->source[0])
        fprintf(f, "input        %s\n", T->source);
    fputs("variables    ", f);
    for (size_t k = 0; k < n; k++)
        fprintf(f, "%s%s", k ? ", " : "", var_name(T, k, buf, sizeof buf));
    fputc('\n', f);
    if (T->has_field) {
        char desc[128];
        tp_field_describe(&T->field, desc, sizeof desc);
        fprintf(f, "field        %s\n", desc);
    } else {
        fputs("field        none: lifted points read directly (exponents, height)\n", f);
    }
    if (T->has_poly)
        fprintf(f, "convention   %s\n",
                T->max ? "max: trop f(w) = max over terms c*x^a of -val(c) + <a, w>"
                       : "min: trop f(w) = min over terms c*x^a of val(c) + <a, w>");
    else
        fprintf(f, "convention   %s over points (a, h) of h + <a, w>\n",
                T->max ? "max: trop(w) = max" : "min: trop(w) = min");
    size_t unused = T->subdiv.nunused;
    fprintf(f, "%s       %zu (%zu used, %zu unused)\n", T->has_poly ? "terms " : "points",
            P->count, P->count - unused, unused);
    return TP_OK;
}

static tp_status write_terms(FILE *f, const tp_trop *T, tp_error *err)
{
    const tp_points *P = &T->points;
    size_t n = P->n;
    table t;
    table_init(&t, 5);
    sbuf cols[5];
    memset(cols, 0, sizeof cols);
    if (T->has_poly) {
        static const char *const head[] = {"#", "exponent", "coefficient", "valuation",
                                           "used"};
        table_header(&t, head);
        const tp_poly *p = &T->poly;
        mpq_t v;
        mpq_init(v);
        for (size_t i = 0; i < p->nterms; i++) {
            sb_printf(&cols[0], "%zu", i);
            sb_ivec(&cols[1], p->exps + i * p->nvars, p->nvars);
            char *c = tp_coeff_to_str(&p->coeffs[i], &T->field);
            if (!c)
                cols[2].oom = true;
            else
                sb_puts(&cols[2], c);
            free(c);
            tp_coeff_val(v, &p->coeffs[i], &T->field);
            sb_q(&cols[3], v, false);
            sb_puts(&cols[4], point_used(T, i) ? "yes" : "no");
            table_row(&t, cols);
        }
        mpq_clear(v);
    } else {
        static const char *const head[] = {"#", "exponent", "height", "used", ""};
        table_header(&t, head);
        for (size_t i = 0; i < P->count; i++) {
            sb_printf(&cols[0], "%zu", i);
            sb_ivec(&cols[1], P->exps + i * n, n);
            sb_q(&cols[2], P->heights[i], T->max);
            sb_puts(&cols[3], point_used(T, i) ? "yes" : (P->dup[i] ? "no (repeated exponent)" : "no"));
            table_row(&t, cols);
        }
    }
    if (t.oom) {
        table_clear(&t);
        return oom(err);
    }
    fputs(T->has_poly ? "\nterms\n" : "\npoints\n", f);
    table_print(f, &t, "  ");
    table_clear(&t);
    return TP_OK;
}

static tp_status write_subdivision(FILE *f, const tp_trop *T, tp_error *err)
{
    const tp_subdiv *S = &T->subdiv;
    const tp_hull *H = &S->hull;
    size_t n = T->points.n;
    table t;
    table_init(&t, 4);
    static const char *const head[] = {"#", "dim", "points", "normal"};
    table_header(&t, head);
    sbuf cols[4];
    memset(cols, 0, sizeof cols);
    /* When the complex took the facet normals (tp_complex_build_move), a maximal cell's
     * normal is the only vertex of its dual cell, already in the output convention. */
    const tp_complex *C = &T->complex;
    uint32_t *vert_of = NULL; /* vertex indices: fewer than 2^32 (complex.h) */
    if (H->nlower && !H->lower[0].w) {
        vert_of = malloc((S->ncells ? S->ncells : 1) * sizeof *vert_of);
        if (!vert_of) {
            table_clear(&t);
            return oom(err);
        }
        for (size_t c = 0; c < S->ncells; c++)
            vert_of[c] = UINT32_MAX;
        for (size_t k = 0; k < C->ncells; k++) {
            const tp_complex_cell *cc = &C->cells[k];
            if (cc->dual < S->ncells && S->cells[cc->dual].dim == H->dim && cc->nverts == 1)
                vert_of[cc->dual] = cc->verts[0];
        }
    }
    size_t nmax = 0;
    for (size_t c = 0; c < S->ncells; c++) {
        const tp_subdiv_cell *sc = &S->cells[c];
        if (sc->dim != H->dim)
            continue; /* lower faces: see the complex's dual points, or the JSON */
        nmax++;
        sb_printf(&cols[0], "%zu", c);
        sb_printf(&cols[1], "%d", sc->dim);
        sb_idx(&cols[2], "", sc->pts, sc->npts);
        if (sc->dim == H->dim && sc->nlower == 1 && sc->lower[0] < H->nlower) {
            if (H->lower[sc->lower[0]].w)
                sb_qvec(&cols[3], H->lower[sc->lower[0]].w, n, T->max);
            else if (vert_of && vert_of[c] != UINT32_MAX)
                sb_qvec(&cols[3], C->verts + (size_t)vert_of[c] * n, n, false);
        }
        table_row(&t, cols);
    }
    free(vert_of);
    if (t.oom) {
        table_clear(&t);
        return oom(err);
    }
    fprintf(f, "\nregular subdivision of the Newton polytope (dimension %d): %zu maximal "
               "%s, %zu %s in all\n", H->dim, nmax, pl(nmax, "cell", "cells"), S->ncells,
            pl(S->ncells, "face", "faces"));
    table_print(f, &t, "  ");
    if (S->nunused) {
        fputs("  unused points:", f);
        for (size_t k = 0; k < S->nunused; k++)
            fprintf(f, " %zu", S->unused[k]);
        fputc('\n', f);
    }
    table_clear(&t);
    return TP_OK;
}

static tp_status write_roots(FILE *f, const tp_trop *T, tp_error *err)
{
    const tp_complex *C = &T->complex;
    const tp_subdiv *S = &T->subdiv;
    table t;
    table_init(&t, 4);
    static const char *const head[] = {"valuation", "multiplicity", "dual points",
                                       "initial form"};
    table_header(&t, head);
    sbuf cols[4];
    memset(cols, 0, sizeof cols);
    size_t total = 0;
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cc = &C->cells[c];
        if (cc->dim != 0 || cc->nverts != 1)
            continue;
        /* the complex's coordinates are -valuation under max */
        sb_q(&cols[0], C->verts[cc->verts[0]], C->max);
        sb_z(&cols[1], cc->weight);
        total += mpz_get_ui(cc->weight);
        if (cc->dual < S->ncells)
            sb_idx(&cols[2], "", S->cells[cc->dual].pts, S->cells[cc->dual].npts);
        sb_puts(&cols[3], cc->initial_form ? cc->initial_form : "");
        table_row(&t, cols);
    }
    if (t.oom) {
        table_clear(&t);
        return oom(err);
    }
    fprintf(f, "\nroot valuations (%zu nonzero %s with multiplicity, in an algebraic "
               "closure)\n", total, pl(total, "root", "roots"));
    table_print(f, &t, "  ");
    if (C->max)
        fputs("  (max convention: the tropical roots are the negatives of these "
              "valuations)\n", f);
    table_clear(&t);
    return TP_OK;
}

static tp_status write_complex(FILE *f, const tp_trop *T, tp_error *err)
{
    const tp_complex *C = &T->complex;
    const tp_subdiv *S = &T->subdiv;
    size_t n = C->n;
    sbuf b = {0};
    fprintf(f, "\ntropical hypersurface: dimension %d in R^%zu\n", C->dim, n);
    fputs("  lineality  ", f);
    if (C->nlin == 0) {
        fputs("none\n", f);
    } else {
        for (size_t k = 0; k < C->nlin; k++) {
            if (k)
                sb_puts(&b, ", ");
            sb_zvec(&b, C->lin + k * n, n);
        }
        if (b.oom) {
            free(b.s);
            return oom(err);
        }
        fprintf(f, "span of %s (every cell contains it; coordinates are shown modulo "
                   "it)\n", b.s);
        free(b.s);
    }

    table t;
    sbuf cols[6];
    memset(cols, 0, sizeof cols);
    table_init(&t, 2);
    for (size_t k = 0; k < C->nverts; k++) {
        sb_printf(&cols[0], "v%zu", k);
        sb_qvec(&cols[1], C->verts + k * n, n, false);
        table_row(&t, cols);
    }
    for (size_t k = 0; k < C->nrays; k++) {
        sb_printf(&cols[0], "r%zu", k);
        sb_zvec(&cols[1], C->rays + k * n, n);
        table_row(&t, cols);
    }
    if (t.oom) {
        table_clear(&t);
        return oom(err);
    }
    fprintf(f, "  %zu %s, %zu %s\n", C->nverts, pl(C->nverts, "vertex", "vertices"),
            C->nrays, pl(C->nrays, "ray", "rays"));
    table_print(f, &t, "    ");
    table_clear(&t);

    table_init(&t, 6);
    static const char *const head[] = {"#", "dim", "spanned by", "weight", "dual points",
                                       "initial form"};
    table_header(&t, head);
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cc = &C->cells[c];
        sb_printf(&cols[0], "%zu", c);
        sb_printf(&cols[1], "%d", cc->dim);
        if (cc->nverts)
            sb_idx(&cols[2], "v", cc->verts, cc->nverts);
        if (cc->nrays) {
            if (cc->nverts)
                sb_puts(&cols[2], " + ");
            sb_idx(&cols[2], "r", tp_complex_cell_rays(cc), cc->nrays);
        }
        if (mpz_sgn(cc->weight) != 0)
            sb_z(&cols[3], cc->weight);
        else if (mpz_sgn(tp_complex_mult(C, c)) != 0) {
            sb_puts(&cols[3], "mult ");
            sb_z(&cols[3], tp_complex_mult(C, c));
        } else
            sb_puts(&cols[3], "-");
        if (cc->dual < S->ncells)
            sb_idx(&cols[4], "", S->cells[cc->dual].pts, S->cells[cc->dual].npts);
        sb_puts(&cols[5], cc->initial_form ? cc->initial_form : "");
        table_row(&t, cols);
    }
    if (t.oom) {
        table_clear(&t);
        return oom(err);
    }
    fprintf(f, "  %zu %s (weight on top cells; mult = multiplicity of a vertex)\n",
            C->ncells, pl(C->ncells, "cell", "cells"));
    table_print(f, &t, "    ");
    table_clear(&t);
    return TP_OK;
}

static tp_status write_invariants(FILE *f, const tp_trop *T, tp_error *err)
{
    const tp_complex *C = &T->complex;
    fputs("\ninvariants\n", f);
    fputs("  f-vector         (", f);
    if (C->f_vector)
        for (int k = 0; k <= C->dim; k++)
            fprintf(f, "%s%zu", k ? ", " : "", C->f_vector[k]);
    fputs(")  cells of dimension 0, 1, ...\n", f);
    if (C->balanced)
        fputs("  balanced         yes\n", f);
    else
        fprintf(f, "  balanced         NO (%zu cells fail the check)\n", C->nunbalanced);
    if (C->is_curve) {
        fprintf(f, "  genus            %ld\n", C->genus);
        if (C->smooth >= 0)
            fprintf(f, "  smooth           %s\n", C->smooth ? "yes (unimodular triangulation "
                                                            "using every lattice point)"
                                                          : "no");
        fprintf(f, "  bounded edges    %zu\n", C->nbounded);
        fprintf(f, "  unbounded edges  %zu\n", C->nunbounded);
        if (C->nraydeg) {
            table t;
            table_init(&t, 2);
            sbuf cols[2];
            memset(cols, 0, sizeof cols);
            static const char *const head[] = {"direction", "total weight"};
            table_header(&t, head);
            for (size_t k = 0; k < C->nraydeg; k++) {
                sb_zvec(&cols[0], C->raydeg[k].dir, C->n);
                sb_z(&cols[1], C->raydeg[k].weight);
                table_row(&t, cols);
            }
            if (t.oom) {
                table_clear(&t);
                return oom(err);
            }
            fputs("  rays by direction\n", f);
            table_print(f, &t, "    ");
            table_clear(&t);
        }
    }
    return TP_OK;
}

tp_status tp_write_text(FILE *out, const tp_trop *T, tp_error *err)
{
    tp_status st = write_header(out, T);
    if (st == TP_OK)
        st = write_terms(out, T, err);
    if (st == TP_OK)
        st = write_subdivision(out, T, err);
    if (st != TP_OK)
        return st;
    const tp_complex *C = &T->complex;
    if (C->dim < 0 || C->ncells == 0) {
        fprintf(out, "\ntropical hypersurface: empty\n  The %s a single %s: a monomial "
                     "vanishes nowhere on the torus, so\n  there is no cell to show.\n",
                T->has_poly ? "polynomial has" : "input has", T->has_poly ? "term" : "point");
    } else if (C->n == 1) {
        st = write_roots(out, T, err);
    } else {
        st = write_complex(out, T, err);
        if (st == TP_OK)
            st = write_invariants(out, T, err);
    }
    if (st != TP_OK)
        return st;
    if (ferror(out))
        return tp_error_set(err, TP_EIO, 0, 0, "cannot write the report");
    return TP_OK;
}
