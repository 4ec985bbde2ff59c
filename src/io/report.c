/* report.c - PLACEHOLDER until the report module lands. */
#include "sedgrade/report.h"

enum sg_status sg_report_write(const struct sg_result *res, const struct sg_record *rec, const char *path,
                               struct sg_error *err)
{
    (void)res;
    (void)rec;
    return sg_error_set(err, SG_EINVAL, 0, 0, "'%s': reports are not available in this build", path);
}
