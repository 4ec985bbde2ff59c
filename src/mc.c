/* mc.c - PLACEHOLDER until the Monte Carlo module lands. */
#include "sedgrade/mc.h"

enum sg_status sg_mc_run(const struct sg_record *rec, const struct sg_constants *k,
                         const struct sg_reduce_options *opt, const struct sg_mc_options *mc,
                         struct sg_result *res, struct sg_error *err)
{
    (void)rec;
    (void)k;
    (void)opt;
    (void)mc;
    (void)res;
    return sg_error_set(err, SG_EINVAL, 0, 0, "Monte Carlo uncertainty is not available in this build");
}
