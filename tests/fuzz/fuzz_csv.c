/* fuzz_csv.c — libFuzzer target: the CSV point reader, then the whole pipeline on
 * small point sets. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include "trope/trop.h"
#include "trope/write.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    tp_points P;
    tp_points_init(&P);
    tp_error err;
    tp_error_init(&err, "fuzz.csv");
    if (tp_points_read_csv(&P, (const char *)data, size, &err) != TP_OK) {
        if (err.msg[0] == 0)
            abort();
        tp_points_clear(&P);
        return 0;
    }
    if (P.count > 40 || P.n > 4) {
        tp_points_clear(&P);
        return 0;
    }
    tp_trop T;
    tp_trop_init(&T);
    tp_trop_options opt = {.max = size % 2 == 1, .engine = TP_ENGINE_AUTO};
    if (tp_trop_from_points(&T, &P, &opt, &err) == TP_OK) {
        if (tp_complex_check(&T.complex, &err) != TP_OK)
            abort(); /* an unbalanced or malformed complex is a bug */
        FILE *f = fopen("/dev/null", "w");
        if (f) {
            if (tp_write_json(f, &T, &err) != TP_OK || tp_write_text(f, &T, &err) != TP_OK)
                abort();
            fclose(f);
        }
    }
    tp_trop_clear(&T);
    tp_points_clear(&P);
    return 0;
}
