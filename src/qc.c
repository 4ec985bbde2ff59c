/* qc.c - quality-control rules for a reduced run (METHODS.md 2.6, 3.7, 6.3). */
#include "sedgrade/qc.h"

#include <math.h>

#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

struct sg_qc_limits sg_qc_limits_default(void)
{
    struct sg_qc_limits l = {
        .reynolds_max = 0.2,
        .diameter_min_mm = 0.0002,
        .concentration_max_g_l = 50.0,
        .temp_min_c = 15.0,
        .temp_max_c = 30.0,
        .temp_drift_max_c = 1.0,
        .percent_tolerance = 1.0,
        .monotone_tolerance_pct = 1.0,
        .junction_gap_max_pct = 5.0,
        .mass_balance_max_pct = 1.0,
        .strict = false,
    };
    return l;
}

enum sg_status sg_qc_evaluate(const struct sg_record *rec, const struct sg_constants *k,
                              const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err)
{
    (void)rec;
    (void)k;
    for (size_t i = 0; i < res->n_points; i++) {
        struct sg_point *p = &res->points[i];
        if (p->source == SG_SOURCE_HYDROMETER || p->source == SG_SOURCE_PIPETTE) {
            if (p->reynolds > lim->reynolds_max)
                p->flags |= SG_PF_REYNOLDS;
        }
    }
    (void)err;
    return SG_OK;
}
