/* classify.c - PLACEHOLDER; to be replaced by the full module. */
#include "sedgrade/classify.h"

enum sg_status sg_classify_summarise(const struct sg_curve *curve, const struct sg_record *rec,
                                     const struct sg_reduce_options *opt, struct sg_result *res,
                                     struct sg_error *err)
{
    (void)curve;
    (void)rec;
    (void)opt;
    (void)res;
    (void)err;
    return SG_OK;
}
