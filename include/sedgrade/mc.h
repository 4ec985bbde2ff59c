/* mc.h - Monte Carlo propagation of input uncertainties through the whole
 * reduction (JCGM 101:2008, GUM Supplement 1): every draw re-runs sg_reduce. */
#ifndef SEDGRADE_MC_H
#define SEDGRADE_MC_H

#include <stddef.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

struct sg_mc_options {
    size_t draws;        /* number of Monte Carlo trials M */
    unsigned long seed;  /* RNG seed: the same seed gives the same output */
    unsigned threads;    /* worker threads (>= 1) */
};

/* Runs the draws for the record and adds to res (the nominal result of
 * sg_reduce with the same rec, k, opt): u/low95/high95 for every numeric
 * quantity, percent_finer_u for every point, and class probabilities for
 * categorical quantities. */
enum sg_status sg_mc_run(const struct sg_record *rec, const struct sg_constants *k,
                         const struct sg_reduce_options *opt, const struct sg_mc_options *mc,
                         struct sg_result *res, struct sg_error *err);

#endif
