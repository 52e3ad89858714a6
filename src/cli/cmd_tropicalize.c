/* cmd_tropicalize.c — `trope tropicalize`: parse, run the pipeline on each polynomial
 * (or on a --points set), write a report (text) or the interchange format (json).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "common.h"
#include "trope/figure.h"
#include "trope/points.h"
#include "trope/trop.h"
#include "trope/write.h"

typedef tp_status (*writer_fn)(FILE *out, const tp_trop *T, tp_error *err);

/* Output formats. `multi` says how several results share one output:
 *   MULTI_SECTIONS  each result in turn, a heading line between them (text);
 *   MULTI_ARRAY     a JSON array of the per-result objects (json).
 * New formats (e.g. obj, from the figures module) are one line here. */
typedef enum { MULTI_SECTIONS, MULTI_ARRAY } multi_mode;
typedef struct {
    const char *name;
    writer_fn write;
    multi_mode multi;
    bool binary;
} format_entry;

static const format_entry formats[] = {
    {"text", tp_write_text, MULTI_SECTIONS, false},
    {"json", tp_write_json, MULTI_ARRAY, false},
    {"obj", NULL, MULTI_SECTIONS, false},   /* surfaces; written by emit() with --box */
};
#define NFORMATS (sizeof formats / sizeof formats[0])

static const char help_text[] =
    "usage: trope tropicalize [FILE|-] [options]\n"
    "\n"
    "Read polynomials (FILE, or standard input for - or no FILE) and print, for each,\n"
    "the regular subdivision of its Newton polytope induced by the valuations of the\n"
    "coefficients and the dual tropical hypersurface as an exact polyhedral complex.\n"
    "\n"
    "options:\n"
    "  --over F          valued field: p=PRIME (p-adic), t or another name (series in\n"
    "                    that parameter), Q (trivial valuation), C (complex numbers,\n"
    "                    trivial valuation); wins over an `over:` line in the file\n"
    "  --vars x,y,z      variable order; wins over a `vars:` line\n"
    "  --max             max convention (every output point w becomes -w)\n"
    "  --format F        text (default), json (schema: trope.complex/1) or obj (a\n"
    "                    surface in 3 variables: its 2-cells clipped to a box)\n"
    "  --box a,b,c,d,e,f obj: the box xmin,xmax,ymin,ymax,zmin,zmax (default: the\n"
    "                    vertices with a margin of 30%)\n"
    "  -o OUT            write to OUT (atomically) instead of standard output\n"
    "  --points F.csv    take lifted points `a1,...,an,height` instead of a polynomial\n"
    "  --engine E        hull engine: auto (default), cdd or fast\n"
    "  --timings         print the CPU time of each stage on standard error\n"
    "  --max-terms N     refuse inputs with more than N terms (default 1000000)\n"
    "  --max-depth N     refuse parentheses nested deeper than N (default 200)\n"
    "  --max-digits N    refuse numbers longer than N digits (default 1000000)\n"
    "  --max-polys N     refuse inputs with more than N polynomials (default 100000)\n"
    "  --max-cdd-points N  refuse inputs that only the cddlib engine can take (more\n"
    "                    than 3 variables, lower-dimensional Newton polytopes) with\n"
    "                    more than N distinct points (default 3000)\n"
    "  --max-cells N     refuse subdivisions with more than N faces (default 5000000)\n"
    "\n"
    "exit status: 0 success, 2 bad input or usage, 1 other failures\n";

static double now_ms(void)   /* CPU time: --timings stays meaningful on a busy machine */
{
    struct timespec ts;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return (double)ts.tv_sec * 1e3 + (double)ts.tv_nsec / 1e6;
}

/* Write one result in format fmt; for arrays, `first` tells whether a comma is due.
 * JSON objects are written through a memory stream so their final newline can be
 * dropped inside an array. */
static tp_status emit(FILE *out, const format_entry *fmt, const tp_trop *T, size_t index,
                      size_t count, const double *box, tp_error *err)
{
    if (!fmt->write)   /* obj: one mesh per file */
        return count == 1 ? tp_write_obj(out, T, box, err)
                          : tp_error_set(err, TP_EDOMAIN, 0, 0, "--format obj: expected one "
                                         "polynomial, the input has %zu", count);
    if (count == 1)
        return fmt->write(out, T, err);
    if (fmt->multi == MULTI_SECTIONS) {
        if (index > 0)
            fputc('\n', out);
        fprintf(out, "=== polynomial %zu of %zu", index + 1, count);
        if (T->has_poly && T->poly.line > 0)
            fprintf(out, " (line %d)", T->poly.line);
        fputs(" ===\n\n", out);
        return fmt->write(out, T, err);
    }
    char *buf = NULL;
    size_t len = 0;
    FILE *mem = open_memstream(&buf, &len);
    if (!mem)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    tp_status st = fmt->write(mem, T, err);
    if (fclose(mem) != 0 && st == TP_OK)
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    if (st == TP_OK) {
        while (len > 0 && buf[len - 1] == '\n')
            len--;
        fputs(index == 0 ? "[\n" : ",\n", out);
        fwrite(buf, 1, len, out);
        if (index + 1 == count)
            fputs("\n]\n", out);
    }
    free(buf);
    return st;
}

int cmd_tropicalize(int argc, char **argv)
{
    cli_opts o;
    cli_opts_init(&o);
    double box[6];
    size_t nbox = 0;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--box") == 0 && i + 1 < argc) {
            tp_error be;
            tp_error_init(&be, NULL);
            if (tp_figure_parse_box(argv[++i], box, &nbox, &be) != TP_OK || nbox != 6)
                return cli_usage_error(argv[0], "--box: expected 6 numbers "
                                       "xmin,xmax,ymin,ymax,zmin,zmax with min < max%s%s",
                                       be.msg[0] ? ": " : "", be.msg);
            continue;
        }
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            fputs(help_text, stdout);
            return fflush(stdout) == 0 ? 0 : 1;
        }
        int r = cli_common_option(&o, argc, argv, &i);
        if (r < 0)
            return 2;
        if (r > 0)
            continue;
        if (a[0] == '-' && a[1] != '\0')
            return cli_usage_error(argv[0], "unknown option '%s' (see trope help %s)", a,
                                   argv[0]);
        if (o.input)
            return cli_usage_error(argv[0], "expected one input file, found '%s' after "
                                            "'%s'", a, o.input);
        o.input = a;
    }

    const format_entry *fmt = NULL;
    const char *fname = o.format ? o.format : "text";
    for (size_t k = 0; k < NFORMATS; k++)
        if (strcmp(formats[k].name, fname) == 0)
            fmt = &formats[k];
    if (!fmt) {
        fprintf(stderr, "trope %s: --format: expected", argv[0]);
        for (size_t k = 0; k < NFORMATS; k++)
            fprintf(stderr, "%s %s", k == 0 ? "" : (k + 1 == NFORMATS ? " or" : ","),
                    formats[k].name);
        fprintf(stderr, ", found '%s'\n", fname);
        return 2;
    }
    if (nbox && fmt->write)
        return cli_usage_error(argv[0], "--box applies to --format obj only");
    if (o.points && o.input)
        return cli_usage_error(argv[0], "expected either FILE or --points, not both");
    if (o.points && (o.over || o.vars))
        return cli_usage_error(argv[0], "%s does not apply to --points input (the CSV "
                                        "holds exponents and heights)",
                               o.over ? "--over" : "--vars");
    cli_protect_input(o.input);
    cli_protect_input(o.points);

    tp_trop_options topt = {.max = o.max, .engine = o.engine, .max_cdd_points = o.max_cdd_points,
                             .max_cells = o.max_cells};
    tp_error err;
    tp_error_init(&err, NULL);
    double t0 = now_ms(), t_parse = 0, t_trop = 0, t_write = 0;
    double t_hull = 0, t_subdiv = 0, t_complex = 0;
    int rc = 0;

    if (o.points) {
        tp_points P;
        tp_points_init(&P);
        tp_error_init(&err, strcmp(o.points, "-") == 0 ? "<stdin>" : o.points);
        char *text;
        size_t len;
        tp_status st = cli_read_all(o.points, &text, &len, 0, &err);
        if (st == TP_OK) {
            st = tp_points_read_csv(&P, text, len, &err);
            free(text);
        }
        if (st != TP_OK) {
            tp_points_clear(&P);
            return cli_report(&err);
        }
        t_parse = now_ms() - t0;
        tp_trop T;
        tp_trop_init(&T);
        double t1 = now_ms();
        st = tp_trop_from_points(&T, &P, &topt, &err);
        tp_points_clear(&P);
        t_trop = now_ms() - t1;
        t_hull = T.ms_hull, t_subdiv = T.ms_subdiv, t_complex = T.ms_complex;
        if (st == TP_OK && T.source[0] == '\0')
            snprintf(T.source, sizeof T.source, "%s", err.file);
        cli_out out;
        if (st == TP_OK)
            st = cli_out_open(&out, o.output, fmt->binary, &err);
        if (st == TP_OK) {
            t1 = now_ms();
            st = emit(out.f, fmt, &T, 0, 1, nbox ? box : NULL, &err);
            if (st == TP_OK)
                st = cli_out_commit(&out, &err);
            else
                cli_out_abort(&out);
            t_write = now_ms() - t1;
        }
        tp_trop_clear(&T);
        if (st != TP_OK)
            return cli_report(&err);
    } else {
        tp_input in;
        tp_input_init(&in);
        tp_status st = cli_parse_input(&o, &in, &err);
        if (st != TP_OK) {
            tp_input_clear(&in);
            return cli_report(&err);
        }
        t_parse = now_ms() - t0;
        char source[256];
        snprintf(source, sizeof source, "%s", err.file);
        cli_out out;
        st = cli_out_open(&out, o.output, fmt->binary, &err);
        if (st != TP_OK) {
            tp_input_clear(&in);
            return cli_report(&err);
        }
        for (size_t k = 0; k < in.npolys && st == TP_OK; k++) {
            tp_trop T;
            tp_trop_init(&T);
            tp_error_init(&err, source);
            double t1 = now_ms();
            st = tp_trop_from_poly(&T, &in, k, &topt, &err);
            t_trop += now_ms() - t1;
            t_hull += T.ms_hull, t_subdiv += T.ms_subdiv, t_complex += T.ms_complex;
            if (st == TP_OK) {
                if (T.source[0] == '\0')
                    snprintf(T.source, sizeof T.source, "%s", source);
                t1 = now_ms();
                st = emit(out.f, fmt, &T, k, in.npolys, nbox ? box : NULL, &err);
                t_write += now_ms() - t1;
            }
            tp_trop_clear(&T);
        }
        tp_input_clear(&in);
        if (st == TP_OK)
            st = cli_out_commit(&out, &err);
        else
            cli_out_abort(&out);
        if (st != TP_OK)
            rc = cli_report(&err);
    }
    if (o.timings)
        fprintf(stderr, "timings (CPU): parse %.3f ms, hull %.3f ms, subdivision %.3f ms, "
                        "complex %.3f ms, write %.3f ms (tropicalize %.3f ms)\n",
                t_parse, t_hull, t_subdiv, t_complex, t_write, t_trop);
    return rc;
}
