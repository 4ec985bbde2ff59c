/* fuzz_calib.c - libFuzzer harness for the calibration register parser
 * (calibio.h) and the computations run on whatever it accepts (calib.h):
 * every part of every event is evaluated and the status taken on a few
 * dates. Seeds: the CSV files of the demo register (calibration/) and
 * tests/data/register. Build: clang -fsanitize=fuzzer,address,undefined. */
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stddef.h>
#include <stdint.h>

#include "sedgrade/calib.h"
#include "sedgrade/calibio.h"

static void exercise(const struct sg_cal_instrument *ins)
{
    static const struct sg_date dates[] = {{1900, 1, 1}, {2020, 6, 15}, {2026, 10, 14}, {2999, 12, 31}};
    struct sg_cal_result res;
    char label[96];
    for (size_t i = 0; i < ins->n_events; i++) {
        const unsigned parts = sg_cal_event_parts(&ins->events[i]);
        for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++)
            if (parts & (1u << p)) {
                (void)sg_cal_evaluate(ins, &ins->events[i], (enum sg_cal_part)p, 2780.0, &res, NULL);
                (void)sg_cal_evaluate(ins, &ins->events[i], (enum sg_cal_part)p, (double)NAN, &res, NULL);
            }
        sg_cal_entry_label(ins, i, label, sizeof label);
    }
    for (size_t d = 0; d < sizeof dates / sizeof dates[0]; d++) {
        struct sg_cal_status st;
        (void)sg_cal_status(ins, dates[d], 30, &st, NULL);
    }
    size_t idx = 0;
    (void)sg_cal_find_entry(ins, "2026-03-02", &idx, NULL);
    (void)sg_cal_find_entry(ins, "2020-01-10#2", &idx, NULL);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    gsl_set_error_handler_off();
    static const enum sg_calibio_mode modes[] = {SG_CALIBIO_REGISTER, SG_CALIBIO_EVENTS, SG_CALIBIO_STANDALONE};
    for (size_t m = 0; m < sizeof modes / sizeof modes[0]; m++) {
        struct sg_cal_instrument ins;
        struct sg_error err;
        if (sg_calibio_parse((const char *)data, size, modes[m], &ins, &err) == SG_OK)
            exercise(&ins);
        sg_cal_instrument_release(&ins);
    }
    return 0;
}
