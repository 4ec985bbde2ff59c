/* classify.h - what the engineer reads off the curve: D-values, Cu, Cc,
 * grading descriptions, size fractions by ISO 14688-1, ASTM D2487 (USCS),
 * AASHTO M 145 and USDA, and the USDA texture class. */
#ifndef SEDGRADE_CLASSIFY_H
#define SEDGRADE_CLASSIFY_H

#include "sedgrade/curve.h"
#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

struct sg_reduce_options;

/* Adds the summary quantities (SPEC: d10_mm ... usda_texture, and more) to
 * res from the curve. A quantity the curve cannot give is added as not
 * determined with the reason in its note. Returns SG_OK or SG_ENOMEM. */
enum sg_status sg_classify_summarise(const struct sg_curve *curve, const struct sg_record *rec,
                                     const struct sg_reduce_options *opt, struct sg_result *res,
                                     struct sg_error *err);

#endif
