/* sieve.c - sieve analysis reduction (METHODS.md 5.2). */
#include "sedgrade/sieve.h"

#include <math.h>
#include <stdlib.h>

static int by_aperture_desc(const void *a, const void *b)
{
    const struct sg_sieve_line *x = a, *y = b;
    /* the pan (aperture 0) sorts last */
    return (x->aperture_mm < y->aperture_mm) - (x->aperture_mm > y->aperture_mm);
}

enum sg_status sg_sieve_reduce(const struct sg_sieve_row *rows, size_t n, double total_mass_g,
                               struct sg_sieve_line *out, struct sg_error *err)
{
    if (!isfinite(total_mass_g) || total_mass_g <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "dry mass %g g must be positive (give the oven-dry mass in grams that the "
                            "percentages refer to)",
                            total_mass_g);
    for (size_t i = 0; i < n; i++) {
        const struct sg_sieve_row *r = &rows[i];
        if (!isfinite(r->aperture_mm) || r->aperture_mm < 0.0)
            return sg_error_set(err, SG_EINVAL, r->pos.line, r->pos.col,
                                "sieve aperture %g mm must be positive (write 'pan' for the pan)",
                                r->aperture_mm);
        if (!isfinite(r->retained_g) || r->retained_g < 0.0)
            return sg_error_set(err, SG_EINVAL, r->pos.line, r->pos.col,
                                "retained mass %g g must not be negative (give the dry mass retained on the "
                                "sieve in grams, 0 if it held nothing)",
                                r->retained_g);
        out[i] = (struct sg_sieve_line){.aperture_mm = r->aperture_mm,
                                        .retained_g = r->retained_g,
                                        .line = r->pos.line,
                                        .col = r->pos.col};
    }
    /* records list the stack from the top; sort only when they do not
     * (by_aperture_desc(a, b) <= 0 written out: it runs in every Monte
     * Carlo draw) */
    bool sorted = true;
    for (size_t i = 1; i < n && sorted; i++)
        sorted = !(out[i - 1].aperture_mm < out[i].aperture_mm);
    if (!sorted)
        qsort(out, n, sizeof *out, by_aperture_desc);
    double cmr = 0.0;
    for (size_t i = 0; i < n; i++) {
        if (i > 0 && out[i].aperture_mm == out[i - 1].aperture_mm)
            return sg_error_set(err, SG_EINVAL, out[i].line, out[i].col,
                                "sieve aperture %g mm appears twice (also on line %u; merge the rows)",
                                out[i].aperture_mm, out[i - 1].line);
        cmr += out[i].retained_g;
        out[i].cumulative_retained_g = cmr;
        out[i].percent_retained = 100.0 * out[i].retained_g / total_mass_g;
        out[i].percent_passing = 100.0 * (total_mass_g - cmr) / total_mass_g;
        if (out[i].aperture_mm > SG_SIEVE_PAN_MM && cmr > total_mass_g * (1.0 + 1e-9))
            return sg_error_set(err, SG_EINVAL, out[i].line, out[i].col,
                                "cumulative retained mass %g g on the %g mm sieve exceeds the dry mass "
                                "%g g (check the masses and the dry mass)",
                                cmr, out[i].aperture_mm, total_mass_g);
    }
    return SG_OK;
}

double sg_sieve_percent_passing(const struct sg_sieve_row *rows, size_t n, double total_mass_g,
                                double split_mm)
{
    double retained = 0.0;
    for (size_t i = 0; i < n; i++)
        if (rows[i].aperture_mm > SG_SIEVE_PAN_MM && rows[i].aperture_mm >= split_mm)
            retained += rows[i].retained_g;
    return 100.0 * (total_mass_g - retained) / total_mass_g;
}

double sg_sieve_total_retained(const struct sg_sieve_row *rows, size_t n)
{
    double s = 0.0;
    for (size_t i = 0; i < n; i++)
        s += rows[i].retained_g;
    return s;
}
