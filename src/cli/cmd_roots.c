/* cmd_roots.c — `trope roots POLY|FILE --over F [--terms K]`: the Newton polygon of a
 * univariate polynomial, its residual polynomials and the leading terms (Puiseux
 * series in t) or p-adic digits of its roots. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "common.h"
#include "trope/roots.h"

static const char help_text[] =
    "usage: trope roots POLY|FILE --over F [options]\n"
    "\n"
    "Roots of a polynomial in one variable over a valued field: the segments of its\n"
    "Newton polygon (valuation and number of roots of each), the residual polynomial of\n"
    "each segment over the residue field, factored, and the roots themselves:\n"
    "  --over t       as Puiseux series in t (Newton-Puiseux), exact rational exponents,\n"
    "                 coefficients exact while rational, else complex to 16 digits;\n"
    "  --over p=P     as p-adic numbers: digits by Hensel lifting for the roots in Q_p.\n"
    "POLY is the polynomial itself (\"x^3 - t^2\") unless a file of that name exists;\n"
    "- reads standard input; `--` before POLY ends the options.\n"
    "\n"
    "options:\n"
    "  --over F          t (or another parameter name) or p=PRIME; wins over an `over:`\n"
    "                    line in the file\n"
    "  --terms K         series terms or p-adic digits per root (default 3; 0 = polygon\n"
    "                    and residual polynomials only; at most 10000)\n"
    "  --format F        text (default) or json (schema: trope.roots/1)\n"
    "  -o OUT            write to OUT (atomically) instead of standard output\n"
    "  --vars x          name the variable (when the input could be read otherwise)\n"
    "  --max-terms N, --max-depth N, --max-digits N   input limits (see tropicalize)\n"
    "\n"
    "exit status: 0 success, 2 bad input or usage, 1 other failures\n";

/* strictly parse a non-negative decimal integer */
static bool parse_count(const char *s, size_t max, size_t *out)
{
    if (!s || !*s)
        return false;
    size_t v = 0;
    for (const char *p = s; *p; p++) {
        if (*p < '0' || *p > '9')
            return false;
        v = v * 10 + (size_t)(*p - '0');
        if (v > max)
            return false;
    }
    *out = v;
    return true;
}

static bool is_file(const char *path)
{
    struct stat st;
    return strcmp(path, "-") == 0 || (stat(path, &st) == 0 && !S_ISDIR(st.st_mode));
}

int cmd_roots(int argc, char **argv)
{
    cli_opts o;
    cli_opts_init(&o);
    size_t terms = 3;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            fputs(help_text, stdout);
            return fflush(stdout) == 0 ? 0 : 1;
        }
        if (strcmp(a, "--terms") == 0) {
            if (i + 1 >= argc)
                return cli_usage_error(argv[0], "--terms: expected a number of terms");
            if (!parse_count(argv[i + 1], 10000, &terms))
                return cli_usage_error(argv[0], "--terms: expected an integer from 0 to "
                                                "10000, found '%s'", argv[i + 1]);
            i++;
            continue;
        }
        int r = cli_common_option(&o, argc, argv, &i);
        if (r < 0)
            return 2;
        if (r > 0) {
            if (o.points)
                return cli_usage_error(argv[0], "--points does not apply to roots");
            if (o.max)
                return cli_usage_error(argv[0], "--max does not apply to roots (valuations "
                                                "are reported in the min convention)");
            continue;
        }
        if (strcmp(a, "--") == 0 && i + 1 < argc && !o.input) {
            o.input = argv[++i];
            continue;
        }
        /* "-x^2 + 1" is a polynomial, "--foo" or "-q" an unknown option */
        bool poly_like = a[0] == '-' && a[1] != '-' && a[1] != '\0' && a[2] != '\0';
        if (a[0] == '-' && a[1] != '\0' && !poly_like)
            return cli_usage_error(argv[0], "unknown option '%s' (see trope help %s)", a,
                                   argv[0]);
        if (o.input)
            return cli_usage_error(argv[0], "expected one polynomial or file, found '%s' "
                                            "after '%s'", a, o.input);
        o.input = a;
    }
    if (!o.input)
        return cli_usage_error(argv[0], "expected a polynomial or a file (see trope help "
                                        "roots)");
    const char *fmt = o.format ? o.format : "text";
    bool json = strcmp(fmt, "json") == 0;
    if (!json && strcmp(fmt, "text") != 0)
        return cli_usage_error(argv[0], "--format: expected text or json, found '%s'", fmt);

    tp_error err;
    tp_input in;
    tp_input_init(&in);
    tp_status st;
    if (is_file(o.input)) {
        cli_protect_input(o.input);
        st = cli_parse_input(&o, &in, &err);
    } else {
        tp_error_init(&err, "<argument>");
        tp_parse_options popt = o.limits;
        popt.over = o.over;
        popt.vars = o.vars;
        st = tp_input_parse(&in, o.input, strlen(o.input), &popt, &err);
    }
    if (st != TP_OK) {
        tp_input_clear(&in);
        return cli_report(&err);
    }
    tp_roots_options ropt = {.terms = terms, .max_steps = 0};
    tp_roots *R = calloc(in.npolys ? in.npolys : 1, sizeof *R);
    if (!R) {
        tp_input_clear(&in);
        tp_error_set(&err, TP_ENOMEM, 0, 0, "out of memory");
        return cli_report(&err);
    }
    size_t done = 0;
    for (size_t k = 0; k < in.npolys && st == TP_OK; k++) {
        tp_roots_init(&R[k]);
        done++;
        st = tp_roots_compute(&R[k], &in.polys[k], &in.field, in.vars, &ropt, &err);
    }
    cli_out out;
    if (st == TP_OK)
        st = cli_out_open(&out, o.output, false, &err);
    if (st == TP_OK) {
        for (size_t k = 0; k < in.npolys && st == TP_OK; k++) {
            if (in.npolys > 1) {
                if (json)
                    fputs(k ? ",\n" : "[\n", out.f);
                else
                    fprintf(out.f, "%s=== polynomial %zu of %zu (line %d) ===\n\n",
                            k ? "\n" : "", k + 1, in.npolys, in.polys[k].line);
            }
            st = json ? tp_roots_write_json(out.f, &R[k], &err)
                      : tp_roots_write_text(out.f, &R[k], &err);
        }
        if (st == TP_OK && json && in.npolys > 1)
            fputs("]\n", out.f);
        if (st == TP_OK)
            st = cli_out_commit(&out, &err);
        else
            cli_out_abort(&out);
    }
    for (size_t k = 0; k < done; k++)
        tp_roots_clear(&R[k]);
    free(R);
    tp_input_clear(&in);
    if (st != TP_OK)
        return cli_report(&err);
    return 0;
}
