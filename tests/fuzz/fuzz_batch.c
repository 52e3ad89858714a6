/* fuzz_batch.c — libFuzzer target: one batch JSON-lines job on arbitrary bytes (the
 * JSON reader, both job kinds, and the whole pipeline on what parses). */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "trope/batch.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (size > 2048)
        return 0;
    tp_batch_options opt;
    memset(&opt, 0, sizeof opt);
    char *out = NULL;
    size_t outlen = 0;
    bool ok = false;
    if (tp_batch_run_line((const char *)data, size, 1, &opt, &out, &outlen, &ok) == TP_OK) {
        /* one result line, newline-terminated, no newline inside */
        if (!out || outlen == 0 || out[outlen - 1] != '\n' || memchr(out, '\n', outlen - 1))
            abort();
    }
    free(out);
    return 0;
}
