/* cmd_amoeba.c — `trope amoeba`: the amoeba of a complex plane curve (area, complement
 * components with their orders, Ronkin coefficients, spine, Archimedean tropical curve),
 * a figure, and point queries (lopsidedness, Ronkin function, slices). For one variable:
 * the roots and their log-moduli (the amoeba of a univariate polynomial).
 */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "common.h"
#include "trope/amoeba.h"
#include "trope/figure.h"
#include "trope/trop.h"
#include "trope/write.h"

static const char help_text[] =
    "usage: trope amoeba [FILE|-] [options]\n"
    "\n"
    "The amoeba Log|V(f)| of a polynomial f(z,w) with complex coefficients (numbers with\n"
    "an i suffix, e.g. 2-3i; decimals are exact): its area, every component of its\n"
    "complement with its order (a lattice point of the Newton polygon), the Ronkin\n"
    "coefficient of each component, the spine (a tropical curve, max convention) and\n"
    "the Archimedean tropical curve max(log|c_a| + <a,x>). Coordinates are\n"
    "(log|z|, log|w|). For a polynomial in one variable: its roots and their\n"
    "log-moduli.\n"
    "\n"
    "options:\n"
    "  --format F        text (default) or json (\"format\": \"trope.amoeba/1\")\n"
    "  -o OUT            OUT.png or OUT.svg: a figure of the amoeba with its spine and\n"
    "                    the component orders; any other name: the report\n"
    "  --archimedean     also draw the Archimedean tropical curve (orange)\n"
    "  --box a,b,c,d     region x1 in [a,b], x2 in [c,d] for the figure and the sweep\n"
    "                    for components (default: around the Archimedean curve)\n"
    "  --size WxH        figure size in pixels (default 800x800)\n"
    "  --area-tol R      relative tolerance of the area (default 1e-6)\n"
    "  --columns N       slices in the component sweep (default 400)\n"
    "  --lopsided x1,x2  only say whether one term's modulus exceeds the sum of the\n"
    "                    others at (x1,x2) (then the point is outside the amoeba)\n"
    "  --ronkin x1,x2    only print the Ronkin function N_f(x1,x2) and its error\n"
    "  --slice x1        only print the amoeba's intervals over x1\n"
    "  --vars z,w        variable order; --over C is the default field\n"
    "  --timings         print the time of each stage on standard error\n"
    "\n"
    "Tolerances: roots to backward error 4 d eps; slice ends located to 1e-9 rad in the\n"
    "angle; Ronkin values to 1e-9 * max(1, |N|); the area's error estimate is printed.\n"
    "\n"
    "exit status: 0 success, 2 bad input or usage, 1 other failures\n";

static double now_ms(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec * 1e3 + (double)ts.tv_nsec / 1e6;
}

static const char *need_value(const char *cmd, int argc, char **argv, int *i)
{
    if (*i + 1 >= argc) {
        cli_usage_error(cmd, "%s: expected a value", argv[*i]);
        return NULL;
    }
    return argv[++*i];
}

/* "a,b" or "a" (n = 1 or 2) finite decimal numbers */
static bool parse_reals(const char *s, double *out, int n)
{
    const char *p = s;
    for (int k = 0; k < n; k++) {
        char *end;
        errno = 0;
        double v = strtod(p, &end);
        if (end == p || errno || !isfinite(v))
            return false;
        out[k] = v;
        p = end;
        if (k + 1 < n) {
            if (*p != ',')
                return false;
            p++;
        }
    }
    return *p == '\0';
}

static void json_str(FILE *f, const char *s) { tp_json_put_string(f, s); }

/* JSON numbers: shortest round-trip form would need more code; %.17g round-trips */
static void json_num(FILE *f, double x)
{
    if (isfinite(x))
        fprintf(f, "%.17g", x);
    else
        fputs(x > 0 ? "\"inf\"" : (x < 0 ? "\"-inf\"" : "\"nan\""), f);
}

/* a trope.complex/1 object with a "role" field first, indented under a key */
static tp_status put_complex(FILE *f, const char *role, const tp_trop *T, tp_error *err)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *mem = open_memstream(&buf, &len);
    if (!mem)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    tp_status st = tp_write_json(mem, T, err);
    if (fclose(mem) != 0 && st == TP_OK)
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    if (st == TP_OK) {
        while (len > 0 && buf[len - 1] == '\n')
            len--;
        size_t skip = (len > 2 && buf[0] == '{' && buf[1] == '\n') ? 2 : 1;
        fprintf(f, "{\n  \"role\": \"%s\",\n", role);
        fwrite(buf + skip, 1, len - skip, f);
    }
    free(buf);
    return st;
}

/* A plane tropical curve for people: vertices to 6 decimals (the exact rationals are
 * in --format json), then its edges and rays with their weights. */
static tp_status put_curve_decimal(FILE *f, const tp_trop *T, tp_error *err)
{
    (void)err;
    const tp_complex *C = &T->complex;
    size_t n = C->n;
    if (C->dim < 0) {
        fputs("    (empty)\n", f);
        return TP_OK;
    }
    fprintf(f, "    %zu vertices (coordinates to 6 decimals; exact values in --format json)\n",
            C->nverts);
    for (size_t v = 0; v < C->nverts; v++) {
        fprintf(f, "      v%-3zu (", v);
        for (size_t j = 0; j < n; j++)
            fprintf(f, "%s%.6f", j ? ", " : "", mpq_get_d(C->verts[v * n + j]));
        fputs(")\n", f);
    }
    fputs("    edges and rays (weight)\n", f);
    for (size_t i = 0; i < C->ncells; i++) {
        const tp_complex_cell *c = &C->cells[i];
        if (c->dim != (int)n - 1)
            continue;
        char b[160];
        int len = 0;
        for (size_t t = 0; t < c->nverts && len < 100; t++)
            len += snprintf(b + len, sizeof b - (size_t)len, "%sv%zu", t ? " - " : "",
                            (size_t)c->verts[t]);
        for (size_t t = 0; t < c->nrays && len < 100; t++) {
            const mpz_t *r = (const mpz_t *)&C->rays[tp_complex_cell_rays(c)[t] * n];
            len += snprintf(b + len, sizeof b - (size_t)len, " + ray (%ld, %ld)",
                            mpz_get_si(r[0]), n > 1 ? mpz_get_si(r[1]) : 0L);
        }
        fprintf(f, "      %-36s ", b);
        mpz_out_str(f, 10, c->weight);
        fputc('\n', f);
    }
    return TP_OK;
}

static void put_order(FILE *f, const int64_t *o)
{
    char b[64];
    snprintf(b, sizeof b, "(%lld,%lld)", (long long)o[0], (long long)o[1]);
    fprintf(f, "%-10s", b);
}

typedef struct {
    const char *cmd;
    bool json;
    bool archimedean_fig;
    bool have_box;
    double box[4];
    tp_figure_options fo;
    tp_amoeba_options ao;
    bool timings;
} amoeba_cli;

static int run_univariate(const amoeba_cli *A, FILE *out, const tp_amoeba_poly *P,
                          char *const *vars, tp_error *err)
{
    size_t d = (size_t)P->deg[0];
    double *lm = malloc(d * sizeof *lm), *ar = malloc(d * sizeof *ar);
    if (!lm || !ar) {
        free(lm);
        free(ar);
        tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        return -1;
    }
    tp_status st = tp_amoeba_poly_roots(P, lm, ar, err);
    if (st) {
        free(lm);
        free(ar);
        return -1;
    }
    if (A->json) {
        fprintf(out, "{\n  \"format\": \"trope.amoeba/1\",\n  \"convention\": \"max\",\n"
                     "  \"variables\": [");
        json_str(out, vars[0]);
        fputs("],\n  \"roots\": [", out);
        for (size_t k = 0; k < d; k++) {
            fprintf(out, "%s\n    {\"re\": ", k ? "," : "");
            json_num(out, exp(lm[k]) * cos(ar[k]));
            fputs(", \"im\": ", out);
            json_num(out, exp(lm[k]) * sin(ar[k]));
            fputs(", \"log_modulus\": ", out);
            json_num(out, lm[k]);
            fputs(", \"arg\": ", out);
            json_num(out, ar[k]);
            fputc('}', out);
        }
        fputs("\n  ]\n}\n", out);
    } else {
        fprintf(out, "amoeba of a polynomial in %s: the log-moduli of its %zu roots (Log|.|)\n\n",
                vars[0], d);
        fprintf(out, "  %-4s %-24s %-24s %-24s %s\n", "k", "log|root|", "re", "im", "arg");
        for (size_t k = 0; k < d; k++)
            fprintf(out, "  %-4zu %-24.17g %-24.17g %-24.17g %.17g\n", k + 1, lm[k],
                    exp(lm[k]) * cos(ar[k]), exp(lm[k]) * sin(ar[k]), ar[k]);
    }
    free(lm);
    free(ar);
    return 0;
}

int cmd_amoeba(int argc, char **argv)
{
    cli_opts o;
    cli_opts_init(&o);
    amoeba_cli A;
    memset(&A, 0, sizeof A);
    A.cmd = argv[0];
    tp_figure_options_init(&A.fo);
    A.fo.grid = true;   /* Log coordinates are the point of the picture */
    tp_amoeba_options_default(&A.ao);
    tp_error err;
    tp_error_init(&err, NULL);
    const char *v;
    enum { Q_NONE, Q_LOPSIDED, Q_RONKIN, Q_SLICE } query = Q_NONE;
    double qx[2] = {0, 0};
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            fputs(help_text, stdout);
            return fflush(stdout) == 0 ? 0 : 1;
        }
        int r = cli_common_option(&o, argc, argv, &i);
        if (r < 0)
            return 2;
        if (r > 0)
            continue;
        if (strcmp(a, "--archimedean") == 0) {
            A.archimedean_fig = true;
        } else if (strcmp(a, "--box") == 0) {
            if (!(v = need_value(argv[0], argc, argv, &i)))
                return 2;
            size_t nb = 0;
            double b[6];
            if (tp_figure_parse_box(v, b, &nb, &err) != TP_OK || nb != 4)
                return cli_usage_error(argv[0], "--box: expected x1min,x1max,x2min,x2max with "
                                                "each minimum below its maximum, found '%s'", v);
            if (!(b[0] < b[1] && b[2] < b[3]))
                return cli_usage_error(argv[0], "--box: expected each minimum below its "
                                                "maximum, found '%s'", v);
            memcpy(A.box, b, sizeof A.box);
            A.have_box = true;
        } else if (strcmp(a, "--size") == 0) {
            if (!(v = need_value(argv[0], argc, argv, &i)))
                return 2;
            if (tp_figure_parse_size(v, &A.fo.width, &A.fo.height, &err) != TP_OK)
                return cli_usage_error(argv[0], "--size: %s (found '%s')", err.msg, v);
        } else if (strcmp(a, "--area-tol") == 0) {
            if (!(v = need_value(argv[0], argc, argv, &i)))
                return 2;
            double t;
            if (!parse_reals(v, &t, 1) || !(t >= 1e-12 && t <= 0.5))
                return cli_usage_error(argv[0], "--area-tol: expected a number between 1e-12 "
                                                "and 0.5, found '%s'", v);
            A.ao.area_tol = t;
        } else if (strcmp(a, "--columns") == 0) {
            if (!(v = need_value(argv[0], argc, argv, &i)))
                return 2;
            double t;
            if (!parse_reals(v, &t, 1) || t != floor(t) || t < 3 || t > 100000)
                return cli_usage_error(argv[0], "--columns: expected an integer from 3 to "
                                                "100000, found '%s'", v);
            A.ao.sweep_columns = (int)t;
        } else if (strcmp(a, "--lopsided") == 0 || strcmp(a, "--ronkin") == 0 ||
                   strcmp(a, "--slice") == 0) {
            if (!(v = need_value(argv[0], argc, argv, &i)))
                return 2;
            int n = strcmp(a, "--slice") == 0 ? 1 : 2;
            if (!parse_reals(v, qx, n))
                return cli_usage_error(argv[0], "%s: expected %s, found '%s'", a,
                                       n == 1 ? "a number x1" : "two numbers x1,x2", v);
            if (query != Q_NONE)
                return cli_usage_error(argv[0], "expected at most one of --lopsided, "
                                                "--ronkin, --slice");
            query = a[2] == 'l' ? Q_LOPSIDED : (a[2] == 'r' ? Q_RONKIN : Q_SLICE);
        } else if (a[0] == '-' && a[1] != '\0') {
            return cli_usage_error(argv[0], "unknown option '%s' (see trope help %s)", a,
                                   argv[0]);
        } else if (o.input) {
            return cli_usage_error(argv[0], "expected one input file, found '%s' after '%s'",
                                   a, o.input);
        } else {
            o.input = a;
        }
    }
    if (o.points)
        return cli_usage_error(argv[0], "--points does not apply: an amoeba needs complex "
                                        "coefficients, not heights");
    if (o.max)
        return cli_usage_error(argv[0], "--max does not apply: amoeba output is always in the "
                                        "max convention (coordinates Log|.|)");
    A.timings = o.timings;
    bool figure = false;
    const char *ext = o.output ? cli_extension(o.output) : "";
    if (strcmp(ext, "png") == 0 || strcmp(ext, "svg") == 0)
        figure = true;
    if (o.format && strcmp(o.format, "text") != 0 && strcmp(o.format, "json") != 0)
        return cli_usage_error(argv[0], "--format: expected text or json, found '%s'",
                               o.format);
    A.json = o.format && strcmp(o.format, "json") == 0;
    if (figure && query != Q_NONE)
        return cli_usage_error(argv[0], "a figure (-o %s) and a point query do not go "
                                        "together", o.output);
    if (!o.over)
        o.over = "C";
    if (!A.fo.width)
        A.fo.width = 800;
    if (!A.fo.height)
        A.fo.height = A.fo.width;
    cli_protect_input(o.input);

    double t0 = now_ms();
    tp_input in;
    tp_input_init(&in);
    tp_status st = cli_parse_input(&o, &in, &err);
    if (st != TP_OK) {
        tp_input_clear(&in);
        return cli_report(&err);
    }
    double t_parse = now_ms() - t0;
    if (in.npolys != 1) {
        tp_error_set(&err, TP_EDOMAIN, in.polys[1].line, in.polys[1].col,
                     "expected one polynomial for the amoeba, found %zu", in.npolys);
        tp_input_clear(&in);
        return cli_report(&err);
    }
    tp_amoeba_poly P;
    tp_amoeba_poly_init(&P);
    st = tp_amoeba_poly_from_poly(&P, &in.polys[0], &in.field, &err);
    if (st != TP_OK) {
        tp_input_clear(&in);
        return cli_report(&err);
    }
    char *polystr = tp_poly_to_str(&in.polys[0], &in.field, in.vars);
    char source[256];
    snprintf(source, sizeof source, "%s", err.file);

    tp_trop spine, arch;
    tp_trop_init(&spine);
    tp_trop_init(&arch);
    tp_amoeba_component *comp = NULL;
    size_t ncomp = 0;
    tp_figure fig;
    tp_figure_init(&fig);
    double area = NAN, area_err = NAN;
    double t_area = 0, t_comp = 0, t_spine = 0, t_fig = 0;
    int rc = 0;
    cli_out out;
    memset(&out, 0, sizeof out);
    bool out_open = false;

    if (!polystr) {
        st = tp_error_set(&err, TP_ENOMEM, 0, 0, "out of memory");
        goto fail;
    }
    st = cli_out_open(&out, o.output, figure, &err);
    if (st)
        goto fail;
    out_open = true;
    FILE *f = out.f;

    if (P.nvars == 1) {
        if (query != Q_NONE || figure) {
            st = tp_error_set(&err, TP_EDOMAIN, in.polys[0].line, in.polys[0].col,
                              "expected a polynomial in 2 variables for %s",
                              figure ? "a figure" : "a point query");
            goto fail;
        }
        if (run_univariate(&A, f, &P, in.vars, &err) != 0) {
            st = err.code ? err.code : TP_EINTERNAL;
            goto fail;
        }
        goto commit;
    }

    if (query == Q_LOPSIDED) {
        size_t dom;
        double slack;
        bool lop = tp_amoeba_lopsided(&P, qx[0], qx[1], &dom, &slack);
        char *mono = tp_monomial_to_str(P.exps + 2 * dom, 2, in.vars);
        if (!mono) {
            st = tp_error_set(&err, TP_ENOMEM, 0, 0, "out of memory");
            goto fail;
        }
        if (A.json) {
            fputs("{\n  \"format\": \"trope.amoeba/1\",\n  \"query\": \"lopsided\",\n"
                  "  \"point\": [", f);
            json_num(f, qx[0]);
            fputs(", ", f);
            json_num(f, qx[1]);
            fprintf(f, "],\n  \"lopsided\": %s,\n  \"dominant\": {\"exponent\": [%lld, %lld], "
                       "\"monomial\": ", lop ? "true" : "false", (long long)P.exps[2 * dom],
                    (long long)P.exps[2 * dom + 1]);
            json_str(f, mono);
            fputs("},\n  \"slack\": ", f);
            json_num(f, slack);
            fprintf(f, ",\n  \"outside_amoeba\": %s\n}\n", lop ? "true" : "\"unknown\"");
        } else if (lop) {
            fprintf(f, "(%.10g, %.10g) is lopsided: the term in %s is larger than all the others "
                       "together (relative slack %.6g), so the point is outside the amoeba, "
                       "in the complement component of order (%lld,%lld).\n",
                    qx[0], qx[1], mono, slack, (long long)P.exps[2 * dom],
                    (long long)P.exps[2 * dom + 1]);
        } else {
            fprintf(f, "(%.10g, %.10g) is not lopsided: the largest term (in %s) is not larger "
                       "than the others together (relative slack %.6g); the test says nothing "
                       "about whether the point is on the amoeba.\n",
                    qx[0], qx[1], mono, slack);
        }
        free(mono);
        goto commit;
    }
    if (query == Q_RONKIN) {
        double N, Ne;
        st = tp_amoeba_ronkin(&P, qx[0], qx[1], &N, &Ne, &err);
        if (st)
            goto fail;
        int64_t ord[2];
        bool off = tp_amoeba_order_at(&P, qx[0], qx[1], ord);
        if (A.json) {
            fputs("{\n  \"format\": \"trope.amoeba/1\",\n  \"query\": \"ronkin\",\n"
                  "  \"point\": [", f);
            json_num(f, qx[0]);
            fputs(", ", f);
            json_num(f, qx[1]);
            fputs("],\n  \"ronkin\": {\"value\": ", f);
            json_num(f, N);
            fputs(", \"error\": ", f);
            json_num(f, Ne);
            fputs("},\n  \"order\": ", f);
            if (off)
                fprintf(f, "[%lld, %lld]", (long long)ord[0], (long long)ord[1]);
            else
                fputs("null", f);
            fputs("\n}\n", f);
        } else {
            fprintf(f, "N_f(%.10g, %.10g) = %.17g  (error estimate %.2g)\n", qx[0], qx[1], N, Ne);
            if (off)
                fprintf(f, "the point is off the amoeba, in the component of order (%lld,%lld): "
                           "N_f is affine there with that gradient\n",
                        (long long)ord[0], (long long)ord[1]);
            else
                fprintf(f, "the point is on the amoeba\n");
        }
        goto commit;
    }
    if (query == Q_SLICE) {
        size_t d = (size_t)P.deg[1];
        double *lo = malloc(d * sizeof *lo), *hi = malloc(d * sizeof *hi);
        if (!lo || !hi) {
            free(lo);
            free(hi);
            st = tp_error_set(&err, TP_ENOMEM, 0, 0, "out of memory");
            goto fail;
        }
        st = tp_amoeba_slice(&P, qx[0], &A.ao, lo, hi, &err);
        if (st == TP_OK) {
            if (A.json) {
                fputs("{\n  \"format\": \"trope.amoeba/1\",\n  \"query\": \"slice\",\n  \"x1\": ", f);
                json_num(f, qx[0]);
                fputs(",\n  \"intervals\": [", f);
                for (size_t k = 0; k < d; k++) {
                    fputs(k ? ", [" : "[", f);
                    json_num(f, lo[k]);
                    fputs(", ", f);
                    json_num(f, hi[k]);
                    fputc(']', f);
                }
                fputs("],\n  \"length\": ", f);
                json_num(f, tp_amoeba_slice_length(d, lo, hi));
                fputs("\n}\n", f);
            } else {
                fprintf(f, "slice of the amoeba over x1 = %.10g: log|%s| ranges over\n", qx[0],
                        in.vars[1]);
                for (size_t k = 0; k < d; k++)
                    fprintf(f, "  root %zu: [%.17g, %.17g]\n", k + 1, lo[k], hi[k]);
                fprintf(f, "total length %.17g\n", tp_amoeba_slice_length(d, lo, hi));
            }
        }
        free(lo);
        free(hi);
        if (st)
            goto fail;
        goto commit;
    }

    /* the full report */
    double t1 = now_ms();
    st = tp_amoeba_archimedean(&arch, &P, in.vars, &err);
    if (st)
        goto fail;
    double box[4];
    if (A.have_box)
        memcpy(box, A.box, sizeof box);
    else
        tp_amoeba_box(&P, &arch, box);
    if (!figure || A.json || o.format) {
        st = tp_amoeba_area(&P, &A.ao, &area, &area_err, &err);
        if (st)
            goto fail;
    }
    t_area = now_ms() - t1;
    t1 = now_ms();
    st = tp_amoeba_components(&P, &A.ao, box, &comp, &ncomp, &err);
    if (st)
        goto fail;
    t_comp = now_ms() - t1;
    t1 = now_ms();
    st = tp_amoeba_spine(&spine, comp, ncomp, in.vars, &err);
    if (st)
        goto fail;
    snprintf(spine.source, sizeof spine.source, "%s", source);
    snprintf(arch.source, sizeof arch.source, "%s", source);
    t_spine = now_ms() - t1;

    if (figure) {
        t1 = now_ms();
        A.fo.nbox = 4;
        memcpy(A.fo.box, box, sizeof box);
        st = tp_amoeba_figure(&fig, &P, &spine, A.archimedean_fig ? &arch : NULL, comp, ncomp,
                              &A.fo, &err);
        if (st == TP_OK)
            st = strcmp(ext, "png") == 0 ? tp_write_png(f, &fig, &err)
                                         : tp_write_svg(f, &fig, &err);
        if (st)
            goto fail;
        t_fig = now_ms() - t1;
        if (!o.format)
            goto commit;
        f = stdout;   /* a report was asked for as well */
    }
    double dmax = tp_amoeba_delta_area(&P) * 9.869604401089358;
    if (A.json) {
        fputs("{\n  \"format\": \"trope.amoeba/1\",\n  \"convention\": \"max\",\n"
              "  \"coordinates\": \"Log|.|\",\n  \"variables\": [", f);
        json_str(f, in.vars[0]);
        fputs(", ", f);
        json_str(f, in.vars[1]);
        fputs("],\n  \"polynomial\": ", f);
        json_str(f, polystr);
        fputs(",\n  \"area\": {\"value\": ", f);
        json_num(f, area);
        fputs(", \"error\": ", f);
        json_num(f, area_err);
        fputs(", \"maximum\": ", f);
        json_num(f, dmax);
        fputs("},\n  \"newton_polygon_area\": ", f);
        json_num(f, tp_amoeba_delta_area(&P));
        fputs(",\n  \"box\": [", f);
        for (int k = 0; k < 4; k++) {
            if (k)
                fputs(", ", f);
            json_num(f, box[k]);
        }
        fputs("],\n  \"components\": [", f);
        for (size_t k = 0; k < ncomp; k++) {
            const tp_amoeba_component *E = &comp[k];
            fprintf(f, "%s\n    {\"order\": [%lld, %lld], \"point\": [", k ? "," : "",
                    (long long)E->order[0], (long long)E->order[1]);
            json_num(f, E->point[0]);
            fputs(", ", f);
            json_num(f, E->point[1]);
            fprintf(f, "], \"bounded\": %s, \"vertex\": %s, \"ronkin\": ",
                    E->bounded ? "true" : "false", E->vertex ? "true" : "false");
            json_num(f, E->ronkin);
            fputs(", \"ronkin_error\": ", f);
            json_num(f, E->ronkin_error);
            fputc('}', f);
        }
        fputs("\n  ],\n  \"spine\": ", f);
        st = put_complex(f, "amoeba spine", &spine, &err);
        if (st)
            goto fail;
        fputs(",\n  \"archimedean\": ", f);
        st = put_complex(f, "Archimedean tropical curve", &arch, &err);
        if (st)
            goto fail;
        fputs("\n}\n", f);
    } else {
        fprintf(f, "amoeba of %s\n", polystr);
        fprintf(f, "coordinates (log|%s|, log|%s|): max convention\n\n", in.vars[0], in.vars[1]);
        if (isfinite(area))
            fprintf(f, "area            %.10g  (error estimate %.2g; at most pi^2 * area(Newton "
                       "polygon) = %.10g)\n", area, area_err, dmax);
        size_t nb = 0;
        for (size_t k = 0; k < ncomp; k++)
            nb += comp[k].bounded;
        fprintf(f, "complement      %zu components (%zu bounded, %zu unbounded)\n\n", ncomp, nb,
                ncomp - nb);
        fprintf(f, "  %-10s %-36s %-10s %s\n", "order", "point inside", "kind",
                "c = N_f - <order, x> there");
        for (size_t k = 0; k < ncomp; k++) {
            const tp_amoeba_component *E = &comp[k];
            char pt[80];
            snprintf(pt, sizeof pt, "(%.6f, %.6f)", E->point[0], E->point[1]);
            fputs("  ", f);
            put_order(f, E->order);
            /* values below the Ronkin tolerance print as 0, not -0.000000000000 */
            double cval = fabs(E->ronkin) < 5e-13 ? 0.0 : E->ronkin;
            fprintf(f, " %-36s %-10s %.12f\n", pt,
                    E->bounded ? "bounded" : (E->vertex ? "vertex" : "unbounded"), cval);
        }
        fputs("\nspine: the tropical curve max over components of (c + <order, x>)\n", f);
        st = put_curve_decimal(f, &spine, &err);
        if (st)
            goto fail;
        fputs("\nArchimedean tropical curve max(log|c_a| + <a, x>)\n", f);
        st = put_curve_decimal(f, &arch, &err);
        if (st)
            goto fail;
    }
commit:
    if (ferror(out.f) || (f == stdout && ferror(stdout))) {
        st = tp_error_set(&err, TP_EIO, 0, 0, "cannot write the output");
        goto fail;
    }
    st = cli_out_commit(&out, &err);
    out_open = false;
    if (st)
        goto fail;
    goto done;
fail:
    if (out_open)
        cli_out_abort(&out);
    if (err.file[0] == '\0')
        snprintf(err.file, sizeof err.file, "%s", source);
    rc = cli_report(&err);
done:
    if (A.timings)
        fprintf(stderr, "timings: parse %.3f ms, area %.3f ms, components %.3f ms, spine %.3f ms, "
                        "figure %.3f ms\n", t_parse, t_area, t_comp, t_spine, t_fig);
    free(polystr);
    free(comp);
    tp_figure_clear(&fig);
    tp_trop_clear(&spine);
    tp_trop_clear(&arch);
    tp_amoeba_poly_clear(&P);
    tp_input_clear(&in);
    return rc;
}
