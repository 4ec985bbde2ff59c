/* fuzz_record.c - libFuzzer harness for the test-record reader (recordio.h):
 * the input is parsed as a whole record (not NUL-terminated, as libFuzzer
 * gives it), everything is released, and the reader's promises are checked:
 * a status always comes with a located first message, SG_OK with none, and
 * the same status whether or not a message list is kept. Seeds: demo/records,
 * tests/data/records, tests/data/malformed (fuzz/run.sh). */
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include "sedgrade/recordio.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct sg_record rec;
    struct sg_diag_list diags = {0};
    struct sg_error err;
    sg_record_init(&rec);
    const enum sg_status st = sg_recordio_parse((const char *)data, size, &rec, &diags, &err);
    if (st == SG_OK) {
        if (diags.n != 0 || err.code != SG_OK)
            __builtin_trap(); /* accepted, yet a problem was reported */
    } else {
        if (diags.n == 0 || err.code == SG_OK || err.msg[0] == '\0')
            __builtin_trap(); /* refused without saying why */
        if (diags.n > SG_RECORDIO_MAX_DIAGS + 1)
            __builtin_trap(); /* messages are capped (plus one closing note) */
        if (strcmp(diags.items[0].msg, err.msg) != 0)
            __builtin_trap(); /* err holds the first message */
    }
    if (st == SG_OK && rec.id[0] == '\0')
        __builtin_trap(); /* validation requires an id */
    sg_diag_release(&diags);
    sg_record_release(&rec);

    /* The same text without a message list and without err. */
    sg_record_init(&rec);
    if (sg_recordio_parse((const char *)data, size, &rec, NULL, NULL) != st)
        __builtin_trap();
    sg_record_release(&rec);
    return 0;
}
