/* sieve.h - sieve analysis: retained masses -> cumulative retained and
 * percent passing (ASTM D6913 / BS 1377-2 reduction, METHODS.md 5.2). */
#ifndef SEDGRADE_SIEVE_H
#define SEDGRADE_SIEVE_H

#include <stddef.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Aperture value that marks the pan in a sieve row. */
#define SG_SIEVE_PAN_MM 0.0

struct sg_sieve_line {
    double aperture_mm;            /* SG_SIEVE_PAN_MM for the pan */
    double retained_g;
    double cumulative_retained_g;  /* this sieve and all coarser ones */
    double percent_retained;       /* of the total mass */
    double percent_passing;        /* 100 (M - CMR) / M */
    unsigned line, col;            /* input line, and column of the aperture */
};

/* Reduces n rows (any order) against total_mass_g (the dry mass the
 * percentages refer to). out (n entries, caller-owned) is sorted coarse to
 * fine with the pan last. Returns SG_EINVAL (located at the row) for a
 * non-positive aperture (other than the pan), a negative mass, a duplicate
 * aperture, or a total below the sum retained on the sieves. */
enum sg_status sg_sieve_reduce(const struct sg_sieve_row *rows, size_t n, double total_mass_g,
                               struct sg_sieve_line *out, struct sg_error *err);

/* Percent of total_mass_g passing the aperture split_mm: everything not
 * retained on sieves with aperture >= split_mm. */
double sg_sieve_percent_passing(const struct sg_sieve_row *rows, size_t n, double total_mass_g,
                                double split_mm);

/* Sum of all retained masses including the pan, g. */
double sg_sieve_total_retained(const struct sg_sieve_row *rows, size_t n);

#endif
