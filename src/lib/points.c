/* points.c — the lifted point set (see trope/points.h). */
#include "trope/points.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void tp_points_init(tp_points *P) { memset(P, 0, sizeof *P); }

void tp_points_clear(tp_points *P)
{
    if (P->heights && !P->heights_view)
        for (size_t k = 0; k < P->count; k++)
            mpq_clear(P->heights[k]);
    tp_arena_free(&P->hmem);
    if (P->residue)
        for (size_t k = 0; k < P->count; k++)
            free(P->residue[k]);
    for (size_t k = 0; k < P->nnames; k++)
        free(P->names[k]);
    free(P->names);
    free(P->residue);
    free(P->heights);
    free(P->exps);
    free(P->dup);
    tp_points_init(P);
}

/* Allocate room for count points of dimension n (heights initialised to 0). */
static tp_status alloc_points(tp_points *P, size_t n, size_t count, tp_error *err)
{
    tp_points_init(P);
    if (n && count > SIZE_MAX / n / sizeof(int64_t))
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    P->exps = malloc((n * count != 0 ? n * count : 1) * sizeof *P->exps);
    P->heights = malloc((count ? count : 1) * sizeof *P->heights);
    P->dup = calloc(count ? count : 1, sizeof *P->dup);
    if (!P->exps || !P->heights || !P->dup) {
        free(P->exps);
        free(P->heights);
        free(P->dup);
        tp_points_init(P);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t k = 0; k < count; k++)
        mpq_init(P->heights[k]);
    P->n = n;
    P->count = count;
    return TP_OK;
}

tp_status tp_points_from_poly(tp_points *P, const tp_poly *f, const tp_field *F, tp_error *err)
{
    size_t n = f->nvars, m = f->nterms;
    tp_status st = alloc_points(P, n, m, err);
    if (st)
        return st;
    P->residue = calloc(m ? m : 1, sizeof *P->residue);
    if (!P->residue) {
        tp_points_clear(P);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    if (n * m != 0)
        memcpy(P->exps, f->exps, n * m * sizeof *P->exps);
    for (size_t k = 0; k < m; k++) {
        if (tp_coeff_is_zero(&f->coeffs[k], F)) {
            tp_points_clear(P);
            return tp_error_set(err, TP_EINTERNAL, f->line, f->col,
                                "internal: a term of the polynomial has coefficient zero");
        }
        tp_coeff_val(P->heights[k], &f->coeffs[k], F);
        P->residue[k] = tp_coeff_residue_str(&f->coeffs[k], F);
        if (!P->residue[k]) {
            tp_points_clear(P);
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        }
    }
    /* the heights as read-only values in one arena (half the memory) */
    mpq_t *views = malloc((m ? m : 1) * sizeof *views);
    if (!views || !tp_arena_qview(&P->hmem, views, (const mpq_t *)P->heights, m)) {
        free(views);
        tp_points_clear(P);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t k = 0; k < m; k++)
        mpq_clear(P->heights[k]);
    free(P->heights);
    P->heights = views;
    P->heights_view = true;
    tp_points_mark_dups(P);
    return TP_OK;
}

/* ------------------------------------------------------------- dup marks */

static int cmp_point(const tp_points *P, size_t a, size_t b)
{
    const int64_t *x = P->exps + a * P->n, *y = P->exps + b * P->n;
    for (size_t j = 0; j < P->n; j++)
        if (x[j] != y[j])
            return x[j] < y[j] ? -1 : 1;
    int c = mpq_cmp(P->heights[a], P->heights[b]);
    if (c)
        return c < 0 ? -1 : 1;
    return a < b ? -1 : a > b ? 1 : 0;
}

/* A point is a duplicate when another point has the same exponents and a smaller
 * height (ties: the smaller index); the survivor of each exponent is the minimum of
 * cmp_point. Expected linear time: exponents are hashed into an open-addressing table
 * holding each exponent's current survivor. */
static uint64_t hash_exps(const int64_t *x, size_t n)
{
    uint64_t h = 0x74726f7065u;
    for (size_t j = 0; j < n; j++) {
        h ^= (uint64_t)x[j];
        h *= 0x9e3779b97f4a7c15u;
        h ^= h >> 29;
    }
    return h;
}

void tp_points_mark_dups(tp_points *P)
{
    size_t m = P->count, n = P->n;
    if (!P->dup)
        return;
    if (n == 0) {
        /* no exponents: every point is the same monomial; keep the minimum */
        size_t best = 0;
        for (size_t k = 1; k < m; k++)
            if (cmp_point(P, k, best) < 0)
                best = k;
        for (size_t k = 0; k < m; k++)
            P->dup[k] = k != best;
        return;
    }
    /* exponents strictly increasing in input order (generated grids): nothing to do */
    bool increasing = true;
    for (size_t k = 1; k < m && increasing; k++) {
        const int64_t *x = P->exps + (k - 1) * n, *y = P->exps + k * n;
        size_t j = 0;
        while (j < n && x[j] == y[j])
            j++;
        increasing = j < n && x[j] < y[j];
    }
    if (increasing) {
        for (size_t k = 0; k < m; k++)
            P->dup[k] = false;
        return;
    }
    size_t cap = 16;
    while (cap < 2 * m)
        cap *= 2;
    size_t *tab = malloc(cap * sizeof *tab);
    if (!tab) {
        /* quadratic fallback without memory */
        for (size_t a = 0; a < m; a++) {
            P->dup[a] = false;
            for (size_t b = 0; b < m && !P->dup[a]; b++) {
                if (b == a || memcmp(P->exps + a * n, P->exps + b * n, n * sizeof *P->exps) != 0)
                    continue;
                if (cmp_point(P, b, a) < 0)
                    P->dup[a] = true;
            }
        }
        return;
    }
    for (size_t k = 0; k < cap; k++)
        tab[k] = SIZE_MAX;
    for (size_t a = 0; a < m; a++) {
        const int64_t *x = P->exps + a * n;
        P->dup[a] = false;
        for (size_t i = (size_t)hash_exps(x, n) & (cap - 1);; i = (i + 1) & (cap - 1)) {
            size_t r = tab[i];
            if (r == SIZE_MAX) {
                tab[i] = a;
                break;
            }
            if (memcmp(P->exps + r * n, x, n * sizeof *x) == 0) {
                if (cmp_point(P, a, r) < 0) {
                    P->dup[r] = true;
                    tab[i] = a;
                } else {
                    P->dup[a] = true;
                }
                break;
            }
        }
    }
    free(tab);
}

void tp_points_negate_heights(tp_points *P)
{
    for (size_t k = 0; k < P->count; k++)
        if (P->heights_view)
            tp_qview_neg(P->heights[k]);
        else
            mpq_neg(P->heights[k], P->heights[k]);
    tp_points_mark_dups(P);
}

/* ------------------------------------------------------------------- CSV */

typedef struct {
    size_t start, len;   /* trimmed span */
    int col;             /* 1-based column of the field's first non-space byte */
} field_span;

static bool is_digit(char c) { return c >= '0' && c <= '9'; }

/* Integer with optional sign into int64. 0 ok, 1 syntax, 2 overflow. */
static int parse_i64(const char *s, size_t len, int64_t *out)
{
    size_t p = 0;
    bool neg = false;
    if (p < len && (s[p] == '+' || s[p] == '-')) {
        neg = s[p] == '-';
        p++;
    }
    if (p == len)
        return 1;
    uint64_t v = 0;
    bool over = false;
    for (; p < len; p++) {
        if (!is_digit(s[p]))
            return 1;
        unsigned d = (unsigned)(s[p] - '0');
        if (v > (UINT64_MAX - d) / 10)
            over = true;
        else
            v = v * 10 + d;
    }
    if (over || v > (uint64_t)INT64_MAX)
        return 2;
    *out = neg ? -(int64_t)v : (int64_t)v;
    return 0;
}

/* Unsigned decimal "123", "1.5", ".5", "2e-3" into q. Returns false on bad syntax. */
static bool parse_udecimal(const char *s, size_t len, mpq_t q)
{
    size_t p = 0, nd = 0;
    long frac = 0;
    bool point = false;
    char *digits = malloc(len + 1);
    if (!digits)
        return false;
    for (; p < len; p++) {
        if (is_digit(s[p])) {
            digits[nd++] = s[p];
            if (point)
                frac++;
        } else if (s[p] == '.' && !point) {
            point = true;
        } else {
            break;
        }
    }
    digits[nd] = 0;
    long e10 = 0;
    if (nd == 0) {
        free(digits);
        return false;
    }
    if (p < len && (s[p] == 'e' || s[p] == 'E')) {
        p++;
        bool neg = false;
        if (p < len && (s[p] == '+' || s[p] == '-')) {
            neg = s[p] == '-';
            p++;
        }
        size_t q0 = p;
        while (p < len && is_digit(s[p]) && p - q0 < 7)
            e10 = e10 * 10 + (s[p++] - '0');
        if (p == q0 || p != len) {
            free(digits);
            return false;
        }
        if (neg)
            e10 = -e10;
    }
    if (p != len) {
        free(digits);
        return false;
    }
    mpz_set_str(mpq_numref(q), digits, 10);
    free(digits);
    mpz_set_ui(mpq_denref(q), 1);
    long scale = frac - e10;
    mpz_t t;
    mpz_init(t);
    mpz_ui_pow_ui(t, 10, (unsigned long)(scale < 0 ? -scale : scale));
    if (scale > 0)
        mpz_set(mpq_denref(q), t);
    else
        mpz_mul(mpq_numref(q), mpq_numref(q), t);
    mpz_clear(t);
    mpq_canonicalize(q);
    return true;
}

/* Height: [sign] decimal [ '/' [sign] decimal ]. 0 ok, 1 syntax, 3 division by zero. */
static int parse_height(const char *s, size_t len, mpq_t h)
{
    int64_t v;
    if (parse_i64(s, len, &v) == 0) {   /* the common case, without temporaries */
        mpq_set_si(h, (long)v, 1);
        return 0;
    }
    size_t slash = len;
    for (size_t k = 0; k < len; k++)
        if (s[k] == '/') {
            slash = k;
            break;
        }
    mpq_t a, b;
    mpq_init(a);
    mpq_init(b);
    int rc = 0;
    const char *parts[2] = {s, s + slash + 1};
    size_t lens[2] = {slash, slash < len ? len - slash - 1 : 0};
    mpq_ptr outs[2] = {a, b};
    int nparts = slash < len ? 2 : 1;
    for (int i = 0; i < nparts && !rc; i++) {
        const char *x = parts[i];
        size_t n = lens[i];
        while (n && (*x == ' ' || *x == '\t')) {
            x++;
            n--;
        }
        while (n && (x[n - 1] == ' ' || x[n - 1] == '\t'))
            n--;
        bool neg = false;
        if (n && (*x == '+' || *x == '-')) {
            neg = *x == '-';
            x++;
            n--;
        }
        if (!parse_udecimal(x, n, outs[i]))
            rc = 1;
        else if (neg)
            mpq_neg(outs[i], outs[i]);
    }
    if (!rc && nparts == 2) {
        if (mpq_sgn(b) == 0)
            rc = 3;
        else
            mpq_div(a, a, b);
    }
    if (!rc)
        mpq_set(h, a);
    mpq_clear(a);
    mpq_clear(b);
    return rc;
}

static void show_field(const char *s, size_t len, char *buf, size_t size)
{
    size_t o = 0;
    for (size_t k = 0; k < len && o + 5 < size; k++) {
        unsigned char c = (unsigned char)s[k];
        if (c >= 0x20 && c < 0x7f)
            buf[o++] = (char)c;
        else
            o += (size_t)snprintf(buf + o, size - o, "\\x%02X", c);
        if (k == 40) {
            snprintf(buf + o, size - o, "...");
            return;
        }
    }
    buf[o < size ? o : size - 1] = 0;
}

tp_status tp_points_read_csv(tp_points *P, const char *text, size_t len, tp_error *err)
{
    tp_points_init(P);
    size_t nfields = 0;      /* fields per row, from the first row */
    int first_line = 0;
    size_t count = 0, cap = 0;
    int64_t *exps = NULL;
    mpq_t *heights = NULL;   /* read-only values in hmem */
    tp_arena hmem;
    tp_arena_init(&hmem);
    mpq_t h;
    mpq_init(h);
    char **names = NULL;
    size_t nnames = 0;
    field_span *fs = NULL;
    size_t fscap = 0;
    tp_status st = TP_OK;
    int line = 0;
    size_t pos = 0;
    while (pos < len) {
        line++;
        size_t ls = pos, le = pos;
        while (le < len && text[le] != '\n')
            le++;
        pos = le < len ? le + 1 : le;
        /* strip comment and trailing CR / spaces */
        size_t ce = ls;
        while (ce < le && text[ce] != '#')
            ce++;
        while (ce > ls && (text[ce - 1] == '\r' || text[ce - 1] == ' ' || text[ce - 1] == '\t'))
            ce--;
        size_t p = ls;
        while (p < ce && (text[p] == ' ' || text[p] == '\t'))
            p++;
        if (p == ce)
            continue; /* blank or comment */
        /* split on commas */
        size_t nf = 0;
        size_t fstart = ls;
        for (size_t q = ls;; q++) {
            if (q == ce || text[q] == ',') {
                if (nf == fscap) {
                    size_t nc = fscap ? 2 * fscap : 8;
                    field_span *n2 = realloc(fs, nc * sizeof *n2);
                    if (!n2) {
                        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                        goto fail;
                    }
                    fs = n2;
                    fscap = nc;
                }
                size_t a = fstart, b = q;
                while (a < b && (text[a] == ' ' || text[a] == '\t'))
                    a++;
                while (b > a && (text[b - 1] == ' ' || text[b - 1] == '\t'))
                    b--;
                fs[nf].start = a;
                fs[nf].len = b - a;
                fs[nf].col = (int)(a - ls) + 1;
                nf++;
                fstart = q + 1;
                if (q == ce)
                    break;
            }
        }
        if (nfields == 0) {
            if (nf < 2) {
                st = tp_error_set(err, TP_ESYNTAX, line, (int)(ce - ls) + 1,
                                  "expected at least 2 fields (exponents, then a height), "
                                  "found %zu", nf);
                goto fail;
            }
            nfields = nf;
            first_line = line;
            /* header line: some field that is not a number */
            bool header = false;
            for (size_t k = 0; k < nf; k++) {
                if (fs[k].len && !(is_digit(text[fs[k].start]) || text[fs[k].start] == '-' ||
                                   text[fs[k].start] == '+' || text[fs[k].start] == '.')) {
                    header = true;
                }
            }
            if (header) {
                names = calloc(nf, sizeof *names);
                if (!names) {
                    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                    goto fail;
                }
                for (size_t k = 0; k < nf; k++) {
                    for (size_t c = 0; c < fs[k].len; c++) {
                        unsigned char ch = (unsigned char)text[fs[k].start + c];
                        if (ch < 0x20 || ch == 0x7f) {
                            st = tp_error_set(err, TP_ESYNTAX, line, fs[k].col + (int)c,
                                              "unexpected character (control byte 0x%02X) in "
                                              "the header: expected a column name", ch);
                            goto fail;
                        }
                    }
                    if (fs[k].len == 0) {
                        st = tp_error_set(err, TP_ESYNTAX, line, fs[k].col,
                                          "expected a column name, found an empty field");
                        goto fail;
                    }
                    names[k] = malloc(fs[k].len + 1);
                    if (!names[k]) {
                        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                        goto fail;
                    }
                    memcpy(names[k], text + fs[k].start, fs[k].len);
                    names[k][fs[k].len] = 0;
                }
                nnames = nf;
                continue;
            }
        }
        if (nf != nfields) {
            int col = nf > nfields ? fs[nfields].col : (int)(ce - ls) + 1;
            st = tp_error_set(err, TP_ESYNTAX, line, col,
                              "expected %zu fields as on line %d, found %zu", nfields,
                              first_line, nf);
            goto fail;
        }
        if (count == cap) {
            size_t nc = cap ? 2 * cap : 16;
            int64_t *ne = realloc(exps, nc * (nfields - 1) * sizeof *ne);
            if (!ne) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                goto fail;
            }
            exps = ne;
            mpq_t *nh = realloc(heights, nc * sizeof *nh);
            if (!nh) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                goto fail;
            }
            heights = nh;
            cap = nc;
        }
        for (size_t k = 0; k + 1 < nfields; k++) {
            int rc = parse_i64(text + fs[k].start, fs[k].len, &exps[count * (nfields - 1) + k]);
            if (rc) {
                char shown[200];
                show_field(text + fs[k].start, fs[k].len, shown, sizeof shown);
                if (rc == 2)
                    st = tp_error_set(err, TP_EOVERFLOW, line, fs[k].col,
                                      "the exponent %s does not fit in 64 bits", shown);
                else
                    st = tp_error_set(err, TP_ESYNTAX, line, fs[k].col,
                                      "expected an integer exponent in field %zu, found %s%s%s",
                                      k + 1, fs[k].len ? "'" : "an empty field",
                                      shown, fs[k].len ? "'" : "");
                goto fail;
            }
        }
        field_span *hf = &fs[nfields - 1];
        int rc = parse_height(text + hf->start, hf->len, h);
        if (rc) {
            char shown[200];
            show_field(text + hf->start, hf->len, shown, sizeof shown);
            if (rc == 3)
                st = tp_error_set(err, TP_EDOMAIN, line, hf->col, "division by zero in the height");
            else
                st = tp_error_set(err, TP_ESYNTAX, line, hf->col,
                                  "expected a height (integer, fraction p/q or decimal), "
                                  "found %s%s%s", hf->len ? "'" : "an empty field", shown,
                                  hf->len ? "'" : "");
            goto fail;
        }
        if (!tp_arena_qview(&hmem, &heights[count], (const mpq_t *)&h, 1)) {
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
            goto fail;
        }
        count++;
    }
    if (count == 0) {
        st = tp_error_set(err, TP_EDOMAIN, 1, 1,
                          "empty point file: expected rows 'a1,...,an,h' (exponents, then a "
                          "height)");
        goto fail;
    }
    P->n = nfields - 1;
    P->count = count;
    P->exps = exps;
    P->heights = heights;
    P->heights_view = true;
    P->hmem = hmem;
    tp_arena_init(&hmem);
    P->dup = calloc(count, sizeof *P->dup);
    if (!P->dup) {
        tp_points_clear(P);
        exps = NULL;
        heights = NULL;
        count = 0;
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        goto fail;
    }
    if (nnames) {
        /* names of the exponent columns: the first n header fields */
        free(names[nnames - 1]);
        P->names = names;
        P->nnames = nnames - 1;
    }
    free(fs);
    mpq_clear(h);
    tp_points_mark_dups(P);
    return TP_OK;
fail:
    tp_arena_free(&hmem);
    mpq_clear(h);
    free(heights);
    free(exps);
    if (names)
        for (size_t k = 0; k < nfields; k++)
            free(names[k]);
    free(names);
    free(fs);
    tp_points_init(P);
    return st;
}
