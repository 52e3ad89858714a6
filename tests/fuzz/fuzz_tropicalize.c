/* fuzz_tropicalize.c — libFuzzer target: parse, then the whole tropicalize path (hull,
 * subdivision, complex, both writers) on small polynomials. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include "trope/trop.h"
#include "trope/write.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static const char *fields[] = {"Q", "p=3", "t", "C", NULL};
    if (size == 0)
        return 0;
    tp_parse_options opt = {0};
    opt.over = fields[data[0] % 5];
    opt.max_terms = 200;
    opt.max_digits = 200;
    opt.max_depth = 50;
    opt.max_polys = 4;
    tp_input in;
    tp_input_init(&in);
    tp_error err;
    tp_error_init(&err, "fuzz");
    if (tp_input_parse(&in, (const char *)data + 1, size - 1, &opt, &err) != TP_OK) {
        tp_input_clear(&in);
        return 0;
    }
    for (size_t i = 0; i < in.npolys; i++) {
        if (in.polys[i].nterms > 40 || in.nvars > 4)
            continue;
        tp_trop T;
        tp_trop_init(&T);
        tp_trop_options to = {.max = (data[0] & 8) != 0, .engine = TP_ENGINE_AUTO};
        if (tp_trop_from_poly(&T, &in, i, &to, &err) == TP_OK) {
            if (tp_complex_check(&T.complex, &err) != TP_OK)
                abort();
            FILE *f = fopen("/dev/null", "w");
            if (f) {
                if (tp_write_json(f, &T, &err) != TP_OK || tp_write_text(f, &T, &err) != TP_OK)
                    abort();
                fclose(f);
            }
        }
        tp_trop_clear(&T);
    }
    tp_input_clear(&in);
    return 0;
}
