/* batch.c — JSON Lines jobs: parse one job line, run the pipeline, write one result
 * line. A small JSON reader (objects, arrays, strings, numbers, literals) that keeps
 * the column of every value, so errors point into the user's batch file.
 */
#include "trope/batch.h"

#include <ctype.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "trope/points.h"
#include "trope/poly.h"
#include "trope/trop.h"
#include "trope/write.h"

/* ---- a growable byte buffer ------------------------------------------------------ */

typedef struct {
    char *s;
    size_t len, cap;
    bool oom;
} sbuf;

static void sb_putn(sbuf *b, const char *p, size_t n)
{
    if (b->oom)
        return;
    if (b->len + n + 1 > b->cap) {
        size_t c = b->cap ? b->cap : 256;
        while (c < b->len + n + 1)
            c *= 2;
        char *t = realloc(b->s, c);
        if (!t) {
            b->oom = true;
            return;
        }
        b->s = t;
        b->cap = c;
    }
    memcpy(b->s + b->len, p, n);
    b->len += n;
    b->s[b->len] = '\0';
}

static void sb_puts(sbuf *b, const char *p) { sb_putn(b, p, strlen(p)); }

static void sb_printf(sbuf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void sb_printf(sbuf *b, const char *fmt, ...)
{
    char tmp[128];
    va_list ap;
    va_start(ap, fmt);
    int k = vsnprintf(tmp, sizeof tmp, fmt, ap);
    va_end(ap);
    if (k > 0)
        sb_putn(b, tmp, (size_t)k < sizeof tmp ? (size_t)k : sizeof tmp - 1);
}

/* JSON string literal of s (UTF-8 passed through, control characters escaped). */
static void sb_json_string(sbuf *b, const char *s)
{
    sb_putn(b, "\"", 1);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        if (*p == '"' || *p == '\\') {
            char e[2] = {'\\', (char)*p};
            sb_putn(b, e, 2);
        } else if (*p < 0x20) {
            sb_printf(b, "\\u%04x", *p);
        } else {
            sb_putn(b, (const char *)p, 1);
        }
    }
    sb_putn(b, "\"", 1);
}

/* ---- the JSON reader -------------------------------------------------------------- */

typedef struct {
    const char *s;
    size_t len, pos;
    long lineno;
    tp_error *err;
} jr;

static tp_status jerr(jr *J, size_t at, const char *fmt, ...) __attribute__((format(printf, 3, 4)));
static tp_status jerr(jr *J, size_t at, const char *fmt, ...)
{
    char msg[400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    return tp_error_set(J->err, TP_ESYNTAX, (int)J->lineno, (int)at + 1, "%s", msg);
}

static void ws(jr *J)
{
    while (J->pos < J->len && (J->s[J->pos] == ' ' || J->s[J->pos] == '\t' ||
                               J->s[J->pos] == '\r' || J->s[J->pos] == '\n'))
        J->pos++;
}

/* What is at the current position, for messages. */
static void found(const jr *J, char *buf, size_t size)
{
    if (J->pos >= J->len) {
        snprintf(buf, size, "the end of the line");
        return;
    }
    unsigned char c = (unsigned char)J->s[J->pos];
    if (c >= 0x20 && c < 0x7f)
        snprintf(buf, size, "'%c'", c);
    else
        snprintf(buf, size, "byte 0x%02x", c);
}

static tp_status expect(jr *J, char c, const char *what)
{
    ws(J);
    if (J->pos < J->len && J->s[J->pos] == c) {
        J->pos++;
        return TP_OK;
    }
    char f[32];
    found(J, f, sizeof f);
    return jerr(J, J->pos, "expected %s, found %s", what, f);
}

/* A string value: decoded into a malloc'ed *out; *raw tells whether it had no escape
 * (then decoded offsets map to columns one to one). */
static tp_status jstring(jr *J, char **out, size_t *outlen, bool *raw)
{
    ws(J);
    size_t start = J->pos;
    if (J->pos >= J->len || J->s[J->pos] != '"') {
        char f[32];
        found(J, f, sizeof f);
        return jerr(J, J->pos, "expected a string, found %s", f);
    }
    J->pos++;
    sbuf b = {0};
    *raw = true;
    for (;;) {
        if (J->pos >= J->len) {
            free(b.s);
            return jerr(J, start, "unterminated string");
        }
        unsigned char c = (unsigned char)J->s[J->pos];
        if (c == '"') {
            J->pos++;
            break;
        }
        if (c < 0x20) {
            free(b.s);
            return jerr(J, J->pos, "control character in a string (expected \\n, \\t, ...)");
        }
        if (c != '\\') {
            sb_putn(&b, (const char *)&J->s[J->pos], 1);
            J->pos++;
            continue;
        }
        *raw = false;
        if (J->pos + 1 >= J->len) {
            free(b.s);
            return jerr(J, J->pos, "unterminated escape sequence");
        }
        char e = J->s[J->pos + 1];
        const char *rep = NULL;
        switch (e) {
        case '"': rep = "\""; break;
        case '\\': rep = "\\"; break;
        case '/': rep = "/"; break;
        case 'b': rep = "\b"; break;
        case 'f': rep = "\f"; break;
        case 'n': rep = "\n"; break;
        case 'r': rep = "\r"; break;
        case 't': rep = "\t"; break;
        case 'u': break;
        default:
            free(b.s);
            return jerr(J, J->pos, "unknown escape '\\%c' (expected one of \\\" \\\\ \\/ \\b "
                                   "\\f \\n \\r \\t \\uXXXX)", isprint((unsigned char)e) ? e : '?');
        }
        if (rep) {
            sb_puts(&b, rep);
            J->pos += 2;
            continue;
        }
        /* \uXXXX (surrogate pairs combined), written as UTF-8 */
        unsigned long cp = 0;
        for (int k = 0; k < 4; k++) {
            size_t q = J->pos + 2 + (size_t)k;
            if (q >= J->len || !isxdigit((unsigned char)J->s[q])) {
                free(b.s);
                return jerr(J, J->pos, "expected four hexadecimal digits after \\u");
            }
            char h = J->s[q];
            cp = cp * 16 + (unsigned long)(isdigit((unsigned char)h) ? h - '0'
                                                                     : (tolower(h) - 'a' + 10));
        }
        J->pos += 6;
        if (cp >= 0xd800 && cp < 0xdc00 && J->pos + 6 <= J->len && J->s[J->pos] == '\\' &&
            J->s[J->pos + 1] == 'u') {
            unsigned long lo = 0;
            bool ok = true;
            for (int k = 0; k < 4 && ok; k++) {
                char h = J->s[J->pos + 2 + (size_t)k];
                ok = isxdigit((unsigned char)h);
                lo = lo * 16 + (unsigned long)(isdigit((unsigned char)h) ? h - '0'
                                                                        : (tolower(h) - 'a' + 10));
            }
            if (ok && lo >= 0xdc00 && lo < 0xe000) {
                cp = 0x10000 + ((cp - 0xd800) << 10) + (lo - 0xdc00);
                J->pos += 6;
            }
        }
        char u[4];
        size_t k;
        if (cp < 0x80) {
            u[0] = (char)cp;
            k = 1;
        } else if (cp < 0x800) {
            u[0] = (char)(0xc0 | (cp >> 6));
            u[1] = (char)(0x80 | (cp & 0x3f));
            k = 2;
        } else if (cp < 0x10000) {
            u[0] = (char)(0xe0 | (cp >> 12));
            u[1] = (char)(0x80 | ((cp >> 6) & 0x3f));
            u[2] = (char)(0x80 | (cp & 0x3f));
            k = 3;
        } else {
            u[0] = (char)(0xf0 | (cp >> 18));
            u[1] = (char)(0x80 | ((cp >> 12) & 0x3f));
            u[2] = (char)(0x80 | ((cp >> 6) & 0x3f));
            u[3] = (char)(0x80 | (cp & 0x3f));
            k = 4;
        }
        if (cp == 0) {
            free(b.s);
            return jerr(J, J->pos - 6, "\\u0000 is not allowed in a job");
        }
        sb_putn(&b, u, k);
    }
    if (b.oom) {
        free(b.s);
        return tp_error_set(J->err, TP_ENOMEM, 0, 0, "out of memory (batch)");
    }
    if (!b.s) {
        b.s = malloc(1);
        if (!b.s)
            return tp_error_set(J->err, TP_ENOMEM, 0, 0, "out of memory (batch)");
        b.s[0] = '\0';
    }
    *out = b.s;
    *outlen = b.len;
    return TP_OK;
}

/* A number token (JSON grammar); returns its span. *integer: no fraction/exponent. */
static tp_status jnumber(jr *J, size_t *start, size_t *end, bool *integer)
{
    ws(J);
    size_t p = J->pos;
    *start = p;
    *integer = true;
    if (p < J->len && J->s[p] == '-')
        p++;
    if (p >= J->len || !isdigit((unsigned char)J->s[p])) {
        char f[32];
        found(J, f, sizeof f);
        return jerr(J, J->pos, "expected a number, found %s", f);
    }
    if (J->s[p] == '0' && p + 1 < J->len && isdigit((unsigned char)J->s[p + 1]))
        return jerr(J, p, "expected a number without leading zeros");
    while (p < J->len && isdigit((unsigned char)J->s[p]))
        p++;
    if (p < J->len && J->s[p] == '.') {
        *integer = false;
        p++;
        if (p >= J->len || !isdigit((unsigned char)J->s[p]))
            return jerr(J, p, "expected a digit after the decimal point");
        while (p < J->len && isdigit((unsigned char)J->s[p]))
            p++;
    }
    if (p < J->len && (J->s[p] == 'e' || J->s[p] == 'E')) {
        *integer = false;
        size_t at = p;
        p++;
        if (p < J->len && (J->s[p] == '+' || J->s[p] == '-'))
            p++;
        if (p >= J->len || !isdigit((unsigned char)J->s[p]))
            return jerr(J, at, "expected digits in the exponent");
        while (p < J->len && isdigit((unsigned char)J->s[p]))
            p++;
    }
    *end = p;
    J->pos = p;
    return TP_OK;
}

static bool jlit(jr *J, const char *w)
{
    size_t k = strlen(w);
    if (J->pos + k <= J->len && memcmp(J->s + J->pos, w, k) == 0) {
        J->pos += k;
        return true;
    }
    return false;
}

/* Skip any JSON value (for error recovery we do not need it; unknown keys are errors). */

/* ---- a job ------------------------------------------------------------------------- */

typedef struct {
    char *poly;
    size_t polylen;
    bool poly_raw;
    size_t poly_at;      /* offset of the opening quote */
    char *over;
    size_t over_at;
    char *vars;
    bool has_max, max;
    bool has_points;
    size_t points_at;
    sbuf csv;            /* the points as CSV rows */
    size_t *field_at;    /* JSON offset of each CSV field */
    size_t nfields, capfields;
    size_t *row_field;   /* first field index of each row */
    size_t nrows, caprows;
} job;

static void job_clear(job *j)
{
    free(j->poly);
    free(j->over);
    free(j->vars);
    free(j->csv.s);
    free(j->field_at);
    free(j->row_field);
    memset(j, 0, sizeof *j);
}

static bool push_size(size_t **v, size_t *n, size_t *cap, size_t x)
{
    if (*n == *cap) {
        size_t c = *cap ? 2 * *cap : 64;
        size_t *t = realloc(*v, c * sizeof *t);
        if (!t)
            return false;
        *v = t;
        *cap = c;
    }
    (*v)[(*n)++] = x;
    return true;
}

static tp_status read_points(jr *J, job *j)
{
    tp_status st = expect(J, '[', "'[' starting the list of points");
    if (st != TP_OK)
        return st;
    ws(J);
    if (J->pos < J->len && J->s[J->pos] == ']')
        return jerr(J, J->pos, "expected at least one point [a1, ..., an, height]");
    size_t width = 0;
    for (;;) {
        ws(J);
        size_t row_at = J->pos;
        st = expect(J, '[', "'[' starting a point [a1, ..., an, height]");
        if (st != TP_OK)
            return st;
        if (!push_size(&j->row_field, &j->nrows, &j->caprows, j->nfields))
            return tp_error_set(J->err, TP_ENOMEM, 0, 0, "out of memory (batch)");
        size_t k = 0;
        for (;;) {
            ws(J);
            size_t at = J->pos;
            if (k > 0)
                sb_putn(&j->csv, ",", 1);
            if (!push_size(&j->field_at, &j->nfields, &j->capfields, at))
                return tp_error_set(J->err, TP_ENOMEM, 0, 0, "out of memory (batch)");
            if (J->pos < J->len && J->s[J->pos] == '"') {
                char *v;
                size_t vl;
                bool raw;
                st = jstring(J, &v, &vl, &raw);
                if (st != TP_OK)
                    return st;
                bool ok = vl > 0;
                for (size_t q = 0; q < vl && ok; q++)
                    ok = isdigit((unsigned char)v[q]) || strchr("+-./ ", v[q]) != NULL;
                if (ok)
                    sb_putn(&j->csv, v, vl);
                free(v);
                if (!ok)
                    return jerr(J, at, "expected a number, or a string holding an integer, a "
                                       "fraction p/q or a decimal");
            } else {
                size_t a = 0, b = 0;
                bool integer;
                st = jnumber(J, &a, &b, &integer);
                if (st != TP_OK)
                    return st;
                if (!integer && (memchr(J->s + a, 'e', b - a) || memchr(J->s + a, 'E', b - a)))
                    return jerr(J, at, "expected an integer, a fraction p/q or a plain "
                                       "decimal (no exponent)");
                sb_putn(&j->csv, J->s + a, b - a);
            }
            k++;
            ws(J);
            if (J->pos < J->len && J->s[J->pos] == ',') {
                J->pos++;
                continue;
            }
            st = expect(J, ']', "',' or ']' in a point");
            if (st != TP_OK)
                return st;
            break;
        }
        if (k < 2)
            return jerr(J, row_at, "expected a point [a1, ..., an, height] with at least one "
                                   "exponent and a height");
        if (width == 0)
            width = k;
        else if (k != width)
            return jerr(J, row_at, "expected %zu entries in this point like the first one, "
                                   "found %zu", width, k);
        /* exponents must be integers: the height is the only non-integer */
        for (size_t f = j->row_field[j->nrows - 1]; f + 1 < j->nfields; f++) {
            size_t at = j->field_at[f];
            if (J->s[at] == '"')
                return jerr(J, at, "expected an integer exponent, found a string");
            for (size_t q = at; q < J->len && (isdigit((unsigned char)J->s[q]) ||
                                               strchr("-.eE+", J->s[q])); q++)
                if (J->s[q] == '.' || J->s[q] == 'e' || J->s[q] == 'E')
                    return jerr(J, at, "expected an integer exponent");
        }
        sb_putn(&j->csv, "\n", 1);
        ws(J);
        if (J->pos < J->len && J->s[J->pos] == ',') {
            J->pos++;
            continue;
        }
        st = expect(J, ']', "',' or ']' after a point");
        if (st != TP_OK)
            return st;
        break;
    }
    if (j->csv.oom)
        return tp_error_set(J->err, TP_ENOMEM, 0, 0, "out of memory (batch)");
    return TP_OK;
}

static tp_status read_job(jr *J, job *j)
{
    tp_status st = expect(J, '{', "'{' starting a job object");
    if (st != TP_OK)
        return st;
    ws(J);
    bool first = true;
    while (!(J->pos < J->len && J->s[J->pos] == '}')) {
        if (!first) {
            st = expect(J, ',', "',' or '}' in the job object");
            if (st != TP_OK)
                return st;
        }
        first = false;
        ws(J);
        size_t key_at = J->pos;
        char *key;
        size_t kl;
        bool raw;
        st = jstring(J, &key, &kl, &raw);
        if (st != TP_OK)
            return st;
        st = expect(J, ':', "':' after the key");
        if (st != TP_OK) {
            free(key);
            return st;
        }
        ws(J);
        size_t val_at = J->pos;
        if (strcmp(key, "poly") == 0 && !j->poly) {
            j->poly_at = val_at;
            st = jstring(J, &j->poly, &j->polylen, &j->poly_raw);
        } else if (strcmp(key, "over") == 0 && !j->over) {
            size_t l;
            j->over_at = val_at;
            st = jstring(J, &j->over, &l, &raw);
        } else if (strcmp(key, "vars") == 0 && !j->vars) {
            size_t l;
            st = jstring(J, &j->vars, &l, &raw);
        } else if (strcmp(key, "max") == 0 && !j->has_max) {
            j->has_max = true;
            if (jlit(J, "true"))
                j->max = true;
            else if (jlit(J, "false"))
                j->max = false;
            else
                st = jerr(J, val_at, "expected true or false for \"max\"");
        } else if (strcmp(key, "points") == 0 && !j->has_points) {
            j->has_points = true;
            j->points_at = val_at;
            st = read_points(J, j);
        } else {
            bool known = strcmp(key, "poly") == 0 || strcmp(key, "over") == 0 ||
                         strcmp(key, "vars") == 0 || strcmp(key, "max") == 0 ||
                         strcmp(key, "points") == 0;
            st = known ? jerr(J, key_at, "the key \"%s\" appears twice", key)
                       : jerr(J, key_at, "unknown key (expected \"poly\", \"points\", "
                                         "\"over\", \"vars\" or \"max\")");
        }
        free(key);
        if (st != TP_OK)
            return st;
        ws(J);
    }
    J->pos++;
    ws(J);
    if (J->pos < J->len) {
        char f[32];
        found(J, f, sizeof f);
        return jerr(J, J->pos, "expected the end of the line after the job, found %s", f);
    }
    if (!j->poly && !j->has_points)
        return jerr(J, 0, "expected a \"poly\" or a \"points\" key in the job");
    if (j->poly && j->has_points)
        return jerr(J, j->points_at, "expected either \"poly\" or \"points\", not both");
    if (j->has_points && (j->over || j->vars))
        return jerr(J, j->over ? j->over_at : j->points_at,
                    "\"over\" and \"vars\" do not apply to \"points\" jobs");
    return TP_OK;
}

/* ---- running it -------------------------------------------------------------------- */

/* One line: drop white space outside strings (the writer's indentation). */
static void minify(sbuf *b)
{
    size_t w = 0;
    bool in = false, esc = false;
    for (size_t r = 0; r < b->len; r++) {
        char c = b->s[r];
        if (in) {
            if (esc)
                esc = false;
            else if (c == '\\')
                esc = true;
            else if (c == '"')
                in = false;
            b->s[w++] = c;
            continue;
        }
        if (c == ' ' || c == '\n' || c == '\t' || c == '\r')
            continue;
        if (c == '"')
            in = true;
        b->s[w++] = c;
    }
    b->len = w;
    if (b->s)
        b->s[w] = '\0';
}

static tp_status write_result(const tp_trop *T, sbuf *out, tp_error *err)
{
    char *mem = NULL;
    size_t size = 0;
    FILE *f = open_memstream(&mem, &size);
    if (!f)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (batch output)");
    tp_status st = tp_write_json(f, T, err);
    if (fclose(f) != 0 && st == TP_OK)
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (batch output)");
    if (st == TP_OK) {
        out->s = mem;
        out->len = size;
        out->cap = size + 1;
        minify(out);
        sb_putn(out, "\n", 1);
        if (out->oom)
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory (batch output)");
    } else {
        free(mem);
    }
    return st;
}

static void error_result(sbuf *out, long lineno, int col, const tp_error *e)
{
    sb_printf(out, "{\"error\":{\"line\":%ld,\"col\":%d,\"kind\":", lineno, col);
    sb_json_string(out, tp_status_name(e->code));
    sb_puts(out, ",\"message\":");
    sb_json_string(out, e->msg);
    sb_puts(out, "}}\n");
}

/* Column (1-based) in the batch line for a position inside the "poly" string. */
static int poly_col(const job *j, const tp_error *e)
{
    if (j->poly_raw && e->line == 1 && e->col >= 1)
        return (int)j->poly_at + 1 + e->col;
    return (int)j->poly_at + 1;
}

/* Column for a position (line = row, col) inside the generated CSV text. */
static int points_col(const job *j, const tp_error *e)
{
    if (e->line < 1 || (size_t)e->line > j->nrows)
        return (int)j->points_at + 1;
    size_t row = (size_t)e->line - 1;
    size_t f0 = j->row_field[row];
    size_t f1 = row + 1 < j->nrows ? j->row_field[row + 1] : j->nfields;
    /* find the CSV line's start and count commas before col */
    const char *s = j->csv.s;
    size_t p = 0;
    for (size_t r = 0; r < row; r++) {
        while (s[p] != '\n')
            p++;
        p++;
    }
    size_t field = f0;
    for (int c = 1; c < e->col && s[p] && s[p] != '\n'; c++, p++)
        if (s[p] == ',' && field + 1 < f1)
            field++;
    return (int)j->field_at[field] + 1;
}

bool tp_batch_line_is_blank(const char *line, size_t len)
{
    for (size_t i = 0; i < len; i++)
        if (!isspace((unsigned char)line[i]))
            return false;
    return true;
}

tp_status tp_batch_run_line(const char *line, size_t len, long lineno,
                            const tp_batch_options *opt, char **out, size_t *outlen,
                            bool *job_ok)
{
    *out = NULL;
    *outlen = 0;
    *job_ok = false;
    tp_error err;
    tp_error_init(&err, NULL);
    jr J = {.s = line, .len = len, .pos = 0, .lineno = lineno, .err = &err};
    job j;
    memset(&j, 0, sizeof j);
    sbuf res = {0};
    int col = 0;
    tp_status st = read_job(&J, &j);
    if (st == TP_OK) {
        tp_trop T;
        tp_trop_init(&T);
        tp_trop_options topt = {.max = j.has_max ? j.max : opt->max, .engine = opt->engine};
        if (j.has_points) {
            tp_points P;
            tp_points_init(&P);
            st = tp_points_read_csv(&P, j.csv.s, j.csv.len, &err);
            if (st != TP_OK)
                col = points_col(&j, &err);
            else {
                st = tp_trop_from_points(&T, &P, &topt, &err);
                if (st != TP_OK)
                    col = (int)j.points_at + 1;
            }
            tp_points_clear(&P);
        } else {
            tp_input in;
            tp_input_init(&in);
            tp_parse_options popt;
            memset(&popt, 0, sizeof popt);
            popt.over = j.over ? j.over : opt->over;
            popt.vars = j.vars;
            st = tp_input_parse(&in, j.poly, j.polylen, &popt, &err);
            if (st == TP_OK && in.npolys != 1)
                st = tp_error_set(&err, TP_ESYNTAX, 0, 0, "expected one polynomial in "
                                  "\"poly\", found %zu (put each on its own line)", in.npolys);
            if (st == TP_OK)
                st = tp_trop_from_poly(&T, &in, 0, &topt, &err);
            if (st != TP_OK)
                col = err.line > 0 ? poly_col(&j, &err)
                                   : (int)(j.over && err.code != TP_ENOMEM ? j.over_at
                                                                         : j.poly_at) + 1;
            tp_input_clear(&in);
        }
        if (st == TP_OK)
            st = write_result(&T, &res, &err);
        tp_trop_clear(&T);
    } else {
        col = err.col;
    }
    job_clear(&j);
    if (st == TP_ENOMEM) {
        free(res.s);
        return TP_ENOMEM;
    }
    if (st == TP_OK) {
        *job_ok = true;
    } else {
        free(res.s);
        memset(&res, 0, sizeof res);
        error_result(&res, lineno, col, &err);
        if (res.oom) {
            free(res.s);
            return TP_ENOMEM;
        }
    }
    *out = res.s;
    *outlen = res.len;
    return TP_OK;
}
