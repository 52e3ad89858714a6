/* cmd_draw.c — `trope draw`: a figure of one polynomial's tropical hypersurface as PNG,
 * SVG or TikZ. Layout lives in the library (figure.c); this file parses options.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "common.h"
#include "trope/figure.h"
#include "trope/points.h"
#include "trope/trop.h"

static const char help_text[] =
    "usage: trope draw [FILE|-] -o FIGURE.png|.svg|.tex [options]\n"
    "\n"
    "Draw the tropical hypersurface of a polynomial (the first one in FILE, or the one\n"
    "chosen with --poly): a plane curve (2 variables, or a homogeneous polynomial in 3\n"
    "variables drawn in the chart where the last coordinate is 0), the root valuations\n"
    "of a polynomial in one variable, or a shaded view of a surface (3 variables).\n"
    "Rays are clipped to the box and end in an arrowhead (they go on); weights above 1\n"
    "are written beside their edges.\n"
    "\n"
    "options:\n"
    "  -o OUT              output file; its extension picks the format (png, svg, tex)\n"
    "  --format F          png, svg or tikz (needed with -o - for standard output)\n"
    "  --with-subdivision  draw the dual regular subdivision beside a plane curve:\n"
    "                      filled dots are its vertices, rings are terms it does not\n"
    "                      use, small grey dots are lattice points without a term\n"
    "  --heights           write each point's height (valuation) beside it\n"
    "  --grid              a light lattice grid with tick labels\n"
    "  --box a,b,c,d       the region shown: xmin,xmax,ymin,ymax (curves), xmin,xmax\n"
    "                      (one variable), xmin,xmax,ymin,ymax,zmin,zmax (surfaces);\n"
    "                      it grows to the image's proportions (equal scale on the axes)\n"
    "  --size WxH          image size in pixels (default: 720 on the long side)\n"
    "  --transparent       no background (for slides)\n"
    "  --standalone        TikZ: a complete LaTeX document (pdflatex compiles it)\n"
    "  --poly K            draw the K-th polynomial of the input (default 1)\n"
    "  --over F, --vars x,y, --max, --points F.csv, --engine E   as for tropicalize\n"
    "\n"
    "exit status: 0 success, 2 bad input or usage, 1 other failures\n";

typedef enum { FMT_NONE, FMT_PNG, FMT_SVG, FMT_TIKZ } draw_format;

static draw_format format_named(const char *s)
{
    if (strcmp(s, "png") == 0)
        return FMT_PNG;
    if (strcmp(s, "svg") == 0)
        return FMT_SVG;
    if (strcmp(s, "tikz") == 0 || strcmp(s, "tex") == 0)
        return FMT_TIKZ;
    return FMT_NONE;
}

static const char *need_value(int argc, char **argv, int *i)
{
    if (*i + 1 >= argc) {
        fprintf(stderr, "trope %s: %s: expected a value after it\n", argv[0], argv[*i]);
        return NULL;
    }
    return argv[++*i];
}

int cmd_draw(int argc, char **argv)
{
    cli_opts o;
    cli_opts_init(&o);
    tp_figure_options fo;
    tp_figure_options_init(&fo);
    bool standalone = false;
    unsigned long poly_index = 1;
    tp_error err;
    tp_error_init(&err, NULL);
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i], *v;
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            fputs(help_text, stdout);
            return fflush(stdout) == 0 ? 0 : 1;
        }
        int r = cli_common_option(&o, argc, argv, &i);
        if (r < 0)
            return 2;
        if (r > 0)
            continue;
        if (strcmp(a, "--with-subdivision") == 0) {
            fo.with_subdivision = true;
        } else if (strcmp(a, "--heights") == 0) {
            fo.heights = true;
        } else if (strcmp(a, "--grid") == 0) {
            fo.grid = true;
        } else if (strcmp(a, "--transparent") == 0) {
            fo.transparent = true;
        } else if (strcmp(a, "--standalone") == 0) {
            standalone = true;
        } else if (strcmp(a, "--box") == 0) {
            if (!(v = need_value(argc, argv, &i)))
                return 2;
            if (tp_figure_parse_box(v, fo.box, &fo.nbox, &err) != TP_OK)
                return err.col > 0 ? cli_usage_error(argv[0], "%s (column %d of '%s')", err.msg,
                                                     err.col, v)
                                   : cli_usage_error(argv[0], "%s", err.msg);
        } else if (strcmp(a, "--size") == 0) {
            if (!(v = need_value(argc, argv, &i)))
                return 2;
            if (tp_figure_parse_size(v, &fo.width, &fo.height, &err) != TP_OK)
                return cli_usage_error(argv[0], "%s (column %d of '%s')", err.msg, err.col, v);
        } else if (strcmp(a, "--poly") == 0) {
            if (!(v = need_value(argc, argv, &i)))
                return 2;
            char *end;
            poly_index = strtoul(v, &end, 10);
            if (*v < '1' || *v > '9' || *end != '\0')
                return cli_usage_error(argv[0], "--poly: expected a positive integer, found '%s'",
                                       v);
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
    draw_format fmt = FMT_NONE;
    if (o.format) {
        fmt = format_named(o.format);
        if (fmt == FMT_NONE)
            return cli_usage_error(argv[0], "--format: expected png, svg or tikz, found '%s'",
                                   o.format);
    } else if (o.output && strcmp(o.output, "-") != 0) {
        fmt = format_named(cli_extension(o.output));
        if (fmt == FMT_NONE)
            return cli_usage_error(argv[0], "-o %s: expected a file name ending in .png, .svg "
                                            "or .tex (or give --format)", o.output);
    } else {
        return cli_usage_error(argv[0], "expected -o FIGURE.png|.svg|.tex, or --format "
                                        "png|svg|tikz with -o -");
    }
    if (fmt == FMT_PNG && !o.output)
        return cli_usage_error(argv[0], "PNG is binary: give -o FILE.png or -o - explicitly");
    if (o.points && o.input)
        return cli_usage_error(argv[0], "expected either FILE or --points, not both");
    if (fo.heights && !fo.with_subdivision)
        return cli_usage_error(argv[0], "--heights labels the subdivision: add "
                                        "--with-subdivision");
    cli_protect_input(o.input);
    cli_protect_input(o.points);

    tp_trop_options topt = {.max = o.max, .engine = o.engine, .max_cdd_points = o.max_cdd_points,
                             .max_cells = o.max_cells};
    tp_trop T;
    tp_trop_init(&T);
    tp_status st;
    if (o.points) {
        tp_points P;
        tp_points_init(&P);
        tp_error_init(&err, strcmp(o.points, "-") == 0 ? "<stdin>" : o.points);
        char *text;
        size_t len;
        st = cli_read_all(o.points, &text, &len, 0, &err);
        if (st == TP_OK) {
            st = tp_points_read_csv(&P, text, len, &err);
            free(text);
        }
        if (st == TP_OK)
            st = tp_trop_from_points(&T, &P, &topt, &err);
        tp_points_clear(&P);
    } else {
        tp_input in;
        tp_input_init(&in);
        st = cli_parse_input(&o, &in, &err);
        if (st == TP_OK && poly_index > in.npolys)
            st = tp_error_set(&err, TP_EDOMAIN, 0, 0,
                              "--poly %lu: expected at most %zu (the polynomials in the input)",
                              poly_index, in.npolys);
        if (st == TP_OK)
            st = tp_trop_from_poly(&T, &in, poly_index - 1, &topt, &err);
        tp_input_clear(&in);
    }
    tp_figure F;
    tp_figure_init(&F);
    if (st == TP_OK)
        st = tp_figure_build(&F, &T, &fo, &err);
    if (st == TP_OK) {
        cli_out out;
        st = cli_out_open(&out, o.output, fmt == FMT_PNG, &err);
        if (st == TP_OK) {
            st = fmt == FMT_PNG   ? tp_write_png(out.f, &F, &err)
                 : fmt == FMT_SVG ? tp_write_svg(out.f, &F, &err)
                                  : tp_write_tikz(out.f, &F, standalone, &err);
            if (st == TP_OK)
                st = cli_out_commit(&out, &err);
            else
                cli_out_abort(&out);
        }
    }
    tp_figure_clear(&F);
    tp_trop_clear(&T);
    return st == TP_OK ? 0 : cli_report(&err);
}
