/* fuzz_parse.c — libFuzzer target: the polynomial parser on arbitrary bytes.
 * The first byte picks the field (Q, p=5, t, C), the rest is the input text. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "trope/poly.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static const char *fields[] = {"Q", "p=5", "t", "C", NULL};
    if (size == 0)
        return 0;
    tp_parse_options opt = {0};
    opt.over = fields[data[0] % 5];
    opt.max_terms = 5000;
    opt.max_digits = 5000;
    opt.max_depth = 100;
    tp_input in;
    tp_input_init(&in);
    tp_error err;
    tp_error_init(&err, "fuzz");
    if (tp_input_parse(&in, (const char *)data + 1, size - 1, &opt, &err) == TP_OK) {
        for (size_t i = 0; i < in.npolys; i++) {
            char *s = tp_poly_to_str(&in.polys[i], &in.field, in.vars);
            free(s);
        }
    } else {
        /* every error carries a message */
        if (err.msg[0] == 0)
            abort();
    }
    tp_input_clear(&in);
    return 0;
}
