/* qc.c - quality-control rules for a reduced run (METHODS.md 2.6, 3.7, 6.3). */
#include "sedgrade/qc.h"

#include <math.h>
#include <stdio.h>

#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

const char *sg_qc_point_flag_name(enum sg_point_flag bit)
{
    switch (bit) {
    case SG_PF_REYNOLDS: return "reynolds";
    case SG_PF_BROWNIAN: return "brownian";
    case SG_PF_COARSER_THAN_SIEVE: return "coarser_than_sieve";
    case SG_PF_CONCENTRATION: return "concentration";
    case SG_PF_NOT_FALLING: return "not_falling";
    case SG_PF_TEMP_RANGE: return "temperature_range";
    case SG_PF_TEMP_DRIFT: return "temperature_drift";
    case SG_PF_OFF_SCALE: return "off_scale";
    case SG_PF_OVER_100: return "over_100";
    case SG_PF_NEGATIVE: return "negative";
    case SG_PF_NON_MONOTONE: return "non_monotone";
    case SG_PF_BLANK_EXTRAPOLATED: return "blank_extrapolated";
    }
    return "";
}

void sg_qc_point_flags_format(unsigned flags, char *buf, size_t size)
{
    if (size == 0)
        return;
    buf[0] = '\0';
    size_t used = 0;
    for (unsigned bit = 1; bit != 0 && bit <= flags; bit <<= 1) {
        if (!(flags & bit))
            continue;
        const char *name = sg_qc_point_flag_name((enum sg_point_flag)bit);
        const int n = snprintf(buf + used, size - used, "%s%s", used ? "|" : "", name);
        if (n < 0 || (size_t)n >= size - used)
            break;
        used += (size_t)n;
    }
}

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
