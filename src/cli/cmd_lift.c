/* cmd_lift.c — `trope lift [FILE|-] --at w1,...,wn [--terms K]`: a zero of f over
 * Puiseux series (or Q_p) whose valuations are the point w of the tropical
 * hypersurface (a Kapranov witness), with the valuation of f at the truncated witness. */
#include <ctype.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "trope/lift.h"

static const char help_text[] =
    "usage: trope lift [FILE|-] --at w1,...,wn [options]\n"
    "\n"
    "Check that the rational point w lies on the tropical hypersurface of the\n"
    "polynomial (at least two terms attain min val(c) + <a, w>) and build a zero z of\n"
    "the polynomial with val(z_i) = w_i: every coordinate but one is fixed to c_i*t^w_i\n"
    "with a small coefficient c_i, the remaining one (chosen from the initial form) is a\n"
    "root series computed as in `trope roots`. Prints the witness and the valuation of\n"
    "f at the witness truncated to K terms, which exceeds trop(f)(w).\n"
    "\n"
    "options:\n"
    "  --at W            the point: rationals separated by commas (1/2,-3,0.25), one\n"
    "                    per variable in order\n"
    "  --over F          t (or another parameter name) or p=PRIME (then w integral)\n"
    "  --terms K         terms (or p-adic digits) of the solved coordinate (default 3,\n"
    "                    from 1 to 10000)\n"
    "  --format F        text (default) or json (format trope.lift/1)\n"
    "  -o OUT            write to OUT (atomically) instead of standard output\n"
    "  --vars x,y,z      variable order; wins over a `vars:` line\n"
    "  --max-terms N, --max-depth N, --max-digits N   input limits (see tropicalize)\n"
    "\n"
    "exit status: 0 success, 2 bad input or usage (also: w not on the hypersurface),\n"
    "1 other failures\n";

/* one rational: [+-]digits[.digits] or [+-]digits/digits */
static bool parse_rational(const char *s, size_t len, mpq_t out)
{
    size_t i = 0;
    bool neg = false;
    if (i < len && (s[i] == '+' || s[i] == '-'))
        neg = s[i++] == '-';
    size_t d0 = i;
    while (i < len && isdigit((unsigned char)s[i]))
        i++;
    if (i == d0 || i - d0 > 4000)
        return false;
    mpz_t num, den;
    mpz_init(num);
    mpz_init_set_ui(den, 1);
    char buf[4100];
    memcpy(buf, s + d0, i - d0);
    buf[i - d0] = 0;
    mpz_set_str(num, buf, 10);
    bool ok = true;
    if (i < len && s[i] == '.') {
        i++;
        size_t f0 = i;
        while (i < len && isdigit((unsigned char)s[i]))
            i++;
        if (i == f0 || i - f0 > 4000)
            ok = false;
        else {
            memcpy(buf, s + f0, i - f0);
            buf[i - f0] = 0;
            mpz_t frac;
            mpz_init_set_str(frac, buf, 10);
            mpz_ui_pow_ui(den, 10, (unsigned long)(i - f0));
            mpz_mul(num, num, den);
            mpz_add(num, num, frac);
            mpz_clear(frac);
        }
    } else if (i < len && s[i] == '/') {
        i++;
        size_t f0 = i;
        while (i < len && isdigit((unsigned char)s[i]))
            i++;
        if (i == f0 || i - f0 > 4000)
            ok = false;
        else {
            memcpy(buf, s + f0, i - f0);
            buf[i - f0] = 0;
            mpz_set_str(den, buf, 10);
            if (mpz_sgn(den) == 0)
                ok = false;
        }
    }
    if (i != len)
        ok = false;
    if (ok) {
        if (neg)
            mpz_neg(num, num);
        mpq_set_num(out, num);
        mpq_set_den(out, den);
        mpq_canonicalize(out);
    }
    mpz_clear(num);
    mpz_clear(den);
    return ok;
}

int cmd_lift(int argc, char **argv)
{
    cli_opts o;
    cli_opts_init(&o);
    size_t terms = 3;
    const char *at = NULL;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            fputs(help_text, stdout);
            return fflush(stdout) == 0 ? 0 : 1;
        }
        if (strcmp(a, "--terms") == 0 || strcmp(a, "--at") == 0) {
            if (i + 1 >= argc)
                return cli_usage_error(argv[0], "%s: expected a value", a);
            if (a[2] == 'a') {
                at = argv[++i];
                continue;
            }
            const char *v = argv[++i];
            char *end;
            unsigned long long k = strtoull(v, &end, 10);
            if (!isdigit((unsigned char)v[0]) || *end || k < 1 || k > 10000)
                return cli_usage_error(argv[0], "--terms: expected an integer from 1 to "
                                                "10000, found '%s'", v);
            terms = (size_t)k;
            continue;
        }
        int r = cli_common_option(&o, argc, argv, &i);
        if (r < 0)
            return 2;
        if (r > 0) {
            if (o.points)
                return cli_usage_error(argv[0], "--points does not apply to lift");
            if (o.max)
                return cli_usage_error(argv[0], "--max does not apply to lift (give w in "
                                                "the min convention)");
            continue;
        }
        if (a[0] == '-' && a[1] != '\0')
            return cli_usage_error(argv[0], "unknown option '%s' (see trope help %s)", a,
                                   argv[0]);
        if (o.input)
            return cli_usage_error(argv[0], "expected one input file, found '%s' after "
                                            "'%s'", a, o.input);
        o.input = a;
    }
    if (!at)
        return cli_usage_error(argv[0], "expected --at w1,...,wn (the point to lift)");
    const char *fmt = o.format ? o.format : "text";
    bool json = strcmp(fmt, "json") == 0;
    if (!json && strcmp(fmt, "text") != 0)
        return cli_usage_error(argv[0], "--format: expected text or json, found '%s'", fmt);

    /* the point */
    size_t nw = 1;
    for (const char *p = at; *p; p++)
        nw += *p == ',';
    mpq_t *w = malloc(nw * sizeof *w);
    if (!w)
        return cli_usage_error(argv[0], "out of memory");
    for (size_t k = 0; k < nw; k++)
        mpq_init(w[k]);
    const char *p = at;
    for (size_t k = 0; k < nw; k++) {
        const char *q = strchr(p, ',');
        size_t len = q ? (size_t)(q - p) : strlen(p);
        while (len && isspace((unsigned char)*p))
            p++, len--;
        while (len && isspace((unsigned char)p[len - 1]))
            len--;
        if (!parse_rational(p, len, w[k])) {
            for (size_t j = 0; j < nw; j++)
                mpq_clear(w[j]);
            free(w);
            return cli_usage_error(argv[0], "--at: coordinate %zu: expected a rational "
                                            "number (3, -1/2 or 0.25), found '%.*s'",
                                   k + 1, (int)(len > 60 ? 60 : len), p);
        }
        p = q ? q + 1 : p + len;
    }

    tp_error err;
    tp_input in;
    tp_input_init(&in);
    cli_protect_input(o.input);
    tp_status st = cli_parse_input(&o, &in, &err);
    int rc = 0;
    if (st == TP_OK && in.npolys != 1) {
        tp_error_set(&err, TP_EDOMAIN, in.polys[1].line, in.polys[1].col,
                     "expected one polynomial; lift takes a single hypersurface");
        st = TP_EDOMAIN;
    }
    tp_lift L;
    tp_lift_init(&L);
    if (st == TP_OK) {
        tp_lift_options lo = {.terms = terms};
        st = tp_lift_compute(&L, &in.polys[0], &in.field, in.vars, (const mpq_t *)w, nw,
                             &lo, &err);
    }
    if (st == TP_OK) {
        cli_out out;
        st = cli_out_open(&out, o.output, false, &err);
        if (st == TP_OK) {
            st = json ? tp_lift_write_json(out.f, &L, &err) : tp_lift_write_text(out.f, &L, &err);
            if (st == TP_OK)
                st = cli_out_commit(&out, &err);
            else
                cli_out_abort(&out);
        }
    }
    if (st != TP_OK)
        rc = cli_report(&err);
    tp_lift_clear(&L);
    tp_input_clear(&in);
    for (size_t k = 0; k < nw; k++)
        mpq_clear(w[k]);
    free(w);
    return rc;
}
