/* write_obj.c — the 2-cells of a tropical surface, clipped to a box, as Wavefront OBJ.
 *
 * One object per polygon, named "cell<k>_weight<w>" (k: the complex cell index, as in the
 * JSON output; w: its weight). Vertices are written per polygon (no sharing), so a face
 * uses the vertices written just before it. Numbers use %.12g; output is deterministic.
 */
#include "trope/figure.h"

#include <stdlib.h>

tp_status tp_write_obj(FILE *f, const tp_trop *T, const double *box, tp_error *err)
{
    tp_surface_mesh M;
    tp_surface_mesh_init(&M);
    tp_status st = tp_surface_mesh_build(&M, T, box, err);
    if (st != TP_OK)
        return st;
    fprintf(f, "# trope: tropical surface, 2-cells clipped to the box\n");
    fprintf(f, "# box %.12g %.12g %.12g %.12g %.12g %.12g\n", M.box[0], M.box[1], M.box[2],
            M.box[3], M.box[4], M.box[5]);
    fprintf(f, "# convention %s; %zu polygons\n", T->complex.max ? "max" : "min", M.npolys);
    size_t base = 1;
    for (size_t k = 0; k < M.npolys; k++) {
        char *w = mpz_get_str(NULL, 10, T->complex.cells[M.cell[k]].weight);
        if (!w) {
            tp_surface_mesh_clear(&M);
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while writing OBJ");
        }
        fprintf(f, "o cell%zu_weight%s\n", M.cell[k], w);
        free(w);
        size_t a = M.start[k], b = M.start[k + 1];
        for (size_t i = a; i < b; i++)
            fprintf(f, "v %.12g %.12g %.12g\n", M.xyz[3 * i], M.xyz[3 * i + 1], M.xyz[3 * i + 2]);
        fputc('f', f);
        for (size_t i = a; i < b; i++)
            fprintf(f, " %zu", base + (i - a));
        fputc('\n', f);
        base += b - a;
    }
    tp_surface_mesh_clear(&M);
    if (ferror(f))
        return tp_error_set(err, TP_EIO, 0, 0, "write error while writing OBJ");
    return TP_OK;
}
