/* reduce.c - the reduction pipeline: sieve -> sedimentation -> splice ->
 * curve -> summary -> QC. The only copy of the pipeline (SPEC, ARCHITECTURE). */
#include "sedgrade/reduce.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sedgrade/classify.h"
#include "sedgrade/hydrometer.h"
#include "sedgrade/pipette.h"
#include "sedgrade/plasticity.h"
#include "sedgrade/screens.h"
#include "sedgrade/sieve.h"

struct sg_reduce_options sg_reduce_options_default(void)
{
    struct sg_reduce_options o;
    memset(&o, 0, sizeof o);
    o.interp = SG_INTERP_LOGLINEAR;
    o.qc = sg_qc_limits_default();
    return o;
}

void sg_constants_from_record(const struct sg_record *rec, struct sg_constants *k)
{
    memset(k, 0, sizeof *k);
    if (rec->has_depth_line) {
        k->has_depth_line = true;
        k->depth_at_zero_mm = rec->depth_line_mm[0];
        k->depth_per_unit_mm = rec->depth_line_mm[1];
    }
    k->meniscus_correction = rec->has_meniscus ? rec->meniscus_correction : 0.0;
    if (rec->has_composite) {
        k->has_blank_const = true;
        k->blank_const = rec->composite_correction;
    }
    if (rec->has_pipette_volume) {
        k->has_pipette_volume = true;
        k->pipette_volume_ml = rec->pipette_volume_ml;
    }
    memcpy(k->calibration_used, "inline", sizeof "inline");
}

/* Sieve rows reduced without a heap allocation (a record has a dozen). */
#define SIEVE_LINES_ON_STACK 64

/* Copies src into dst of size n (n > 0), cut at n - 1 bytes like
 * snprintf(dst, n, "%s", src), without going through printf. */
static void copy_text(char *dst, size_t n, const char *src)
{
    size_t len = strlen(src);
    if (len > n - 1)
        len = n - 1;
    memcpy(dst, src, len);
    dst[len] = '\0';
}

/* Locates err at pos (the message was written without a location). */
static enum sg_status locate(struct sg_error *err, enum sg_status st, struct sg_srcpos pos)
{
    if (err != NULL && err->line == 0) {
        err->line = pos.line;
        err->col = pos.col;
    }
    return st;
}

/* Adds a point for each sieve of rows (not the pan) and lowers *finest_mm
 * to the finest aperture among them. */
static enum sg_status add_sieve_points(const struct sg_sieve_row *rows, size_t n, double mass_g,
                                       double scale_pct, enum sg_source src, bool values_only,
                                       struct sg_result *res, double *finest_mm, struct sg_error *err)
{
    if (n == 0)
        return SG_OK;
    struct sg_sieve_line local[SIEVE_LINES_ON_STACK];
    struct sg_sieve_line *lines = n <= SIEVE_LINES_ON_STACK ? local : malloc(n * sizeof *lines);
    if (lines == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reducing %zu sieve rows", n);
    enum sg_status st = sg_sieve_reduce(rows, n, mass_g, lines, err);
    for (size_t i = 0; st == SG_OK && i < n; i++) {
        if (lines[i].aperture_mm <= SG_SIEVE_PAN_MM)
            continue;
        struct sg_point *p = sg_result_new_point(res, src, lines[i].line);
        if (p == NULL) {
            st = SG_ENOMEM;
            break;
        }
        p->diameter_mm = lines[i].aperture_mm;
        if (p->diameter_mm < *finest_mm)
            *finest_mm = p->diameter_mm;
        p->percent_finer = lines[i].percent_passing * scale_pct / 100.0;
        p->on_curve = true;
        if (values_only)
            continue; /* the rest stays NaN (sg_reduce_options) */
        p->retained_g = lines[i].retained_g;
        p->cumulative_retained_g = lines[i].cumulative_retained_g;
        p->percent_specimen = lines[i].percent_passing;
    }
    if (lines != local)
        free(lines);
    return st;
}

/* Apertures that agree to this relative difference are the same sieve
 * (nominal apertures are written to three significant digits: common
 * practice). */
#define SAME_APERTURE_REL 1e-3

/* The percent passing the split sieve is measured only when that sieve is
 * one of the sieve rows (METHODS.md 5.5: the designated separating sieve
 * belongs to the coarse set); otherwise sg_sieve_percent_passing gives the
 * next coarser sieve's value (or 100 % with none at or above the split),
 * which the run says with a "split_sieve" warning instead of silently. */
static enum sg_status check_split_sieve(const struct sg_record *rec, struct sg_result *res, struct sg_error *err)
{
    const double split = rec->split_aperture_mm;
    double coarser = INFINITY;
    for (size_t i = 0; i < rec->n_sieve; i++) {
        const double a = rec->sieve[i].aperture_mm;
        if (a <= SG_SIEVE_PAN_MM)
            continue;
        if (fabs(a - split) <= SAME_APERTURE_REL * split)
            return SG_OK;
        if (a > split && a < coarser)
            coarser = a;
    }
    const unsigned line = rec->pos_split_aperture.line;
    enum sg_status st;
    if (isfinite(coarser))
        st = sg_result_add_flag(res, "split_sieve", SG_SEVERITY_WARNING, line,
                                "the split aperture %g mm is not one of the sieve rows: the percent passing it is "
                                "taken as that of the next coarser sieve, %g mm (add the %g mm sieve's retained "
                                "mass, or correct split_aperture_mm)",
                                split, coarser, split);
    else
        st = sg_result_add_flag(res, "split_sieve", SG_SEVERITY_WARNING, line,
                                "no sieve row at or above the split aperture %g mm: 100 %% of the sample is taken "
                                "to pass it (add the coarser sieves' retained masses, or correct "
                                "split_aperture_mm)",
                                split);
    return st == SG_OK ? SG_OK : sg_error_set(err, st, 0, 0, "out of memory");
}

/* Blank (composite) reading for a hydrometer row: the row's own, else the
 * register's line in temperature (no extrapolation), else the record's constant,
 * else 0 with *missing set. */
static enum sg_status blank_for(const struct sg_reading_row *r, double temp_c, const struct sg_constants *k,
                                double *blank, bool *missing, struct sg_error *err)
{
    if (r->has_blank) {
        *blank = r->blank_reading;
        return SG_OK;
    }
    if (k->has_blank_line) {
        if (temp_c < k->blank_tmin_c || temp_c > k->blank_tmax_c) {
            char corrected[64] = "";
            if (temp_c != r->temp_c)
                (void)snprintf(corrected, sizeof corrected, " (%g C read, thermometer correction %+g C)", r->temp_c,
                               k->thermometer_offset_c);
            return sg_error_set(err, SG_EDOM, r->pos.line, r->temp_col ? r->temp_col : r->pos.col,
                                "temperature %g C%s is outside %g-%g C, the range over which the blank "
                                "(composite) reading was calibrated (extend the calibration or give the "
                                "blank reading as the row's fifth field)",
                                temp_c, corrected, k->blank_tmin_c, k->blank_tmax_c);
        }
        *blank = k->blank_c0 + k->blank_c1 * temp_c;
        return SG_OK;
    }
    if (k->has_blank_const) {
        *blank = k->blank_const;
        return SG_OK;
    }
    /* No blank anywhere: the readings are taken as already corrected (blank 0)
     * and the run carries a "no_blank" warning (added by the caller). */
    *blank = 0.0;
    *missing = true;
    return SG_OK;
}

/* Appends a sedimentation point on the curve with its Stokes diameter and
 * percent of the whole sample (the fields a Monte Carlo draw reads); the
 * caller fills the rest. NULL when out of memory. */
static struct sg_point *sed_point(struct sg_result *res, enum sg_source source, unsigned line, double diameter_mm,
                                  double percent_finer)
{
    struct sg_point *p = sg_result_new_point(res, source, line);
    if (p != NULL) {
        p->diameter_mm = diameter_mm;
        p->percent_finer = percent_finer;
        p->on_curve = true;
    }
    return p;
}

static enum sg_status add_hydrometer_points(const struct sg_record *rec, const struct sg_constants *k,
                                            double scale_pct, bool values_only, struct sg_result *res,
                                            struct sg_error *err)
{
    if (!k->has_depth_line)
        return sg_error_set(err, SG_EINVAL, rec->pos_hydrometer.line ? rec->pos_hydrometer.line : 1, 1,
                            "no effective-depth line for hydrometer '%s' (calibrate it in the register "
                            "or give 'test,depth_line_mm,<depth at 0>,<change per unit>')",
                            rec->hydrometer);
    /* the test's part of the input once, each reading's part in the loop */
    struct sg_hydrometer_input in = {
        .scale = rec->scale,
        .standard = rec->standard,
        .meniscus_correction = k->meniscus_correction,
        .depth_at_zero_mm = k->depth_at_zero_mm,
        .depth_per_unit_mm = k->depth_per_unit_mm,
        .particle_density_mg_m3 = rec->particle_density_mg_m3,
        .specimen_dry_mass_g = rec->specimen_dry_mass_g,
        .suspension_volume_ml = rec->suspension_volume_ml,
    };
    struct sg_hydrometer_shared sh;
    enum sg_status st;
    if (rec->n_readings > 0 && (st = sg_hydrometer_prepare(&in, values_only, &sh, err)) != SG_OK)
        return locate(err, st, rec->readings[0].pos);
    size_t n_missing = 0;
    for (size_t i = 0; i < rec->n_readings; i++) {
        const struct sg_reading_row *r = &rec->readings[i];
        const double temp_c = r->temp_c + k->thermometer_offset_c;
        bool missing = false;
        in.reading = r->reading;
        in.temp_c = temp_c;
        in.elapsed_min = r->elapsed_min;
        st = blank_for(r, temp_c, k, &in.blank_reading, &missing, err);
        if (st != SG_OK)
            return st;
        n_missing += missing;
        struct sg_hydrometer_point hp;
        st = sg_hydrometer_reduce_shared(&in, &sh, &hp, err);
        if (st != SG_OK)
            return locate(err, st, r->pos);
        struct sg_point *p =
            sed_point(res, SG_SOURCE_HYDROMETER, r->pos.line, hp.diameter_mm, hp.percent_specimen * scale_pct / 100.0);
        if (p == NULL)
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
        if (values_only)
            continue; /* the rest stays NaN (sg_reduce_options) */
        p->percent_specimen = hp.percent_specimen;
        p->elapsed_min = r->elapsed_min;
        p->temp_c = temp_c;
        p->reading = r->reading;
        p->blank_reading = in.blank_reading;
        p->corrected_reading = hp.corrected_reading;
        p->depth_reading = hp.depth_reading;
        p->effective_depth_mm = hp.effective_depth_mm;
        p->concentration_g_l = hp.concentration_g_l;
        p->water_density_kg_m3 = hp.water_density_kg_m3;
        p->viscosity_mpa_s = hp.viscosity_pa_s * 1000.0;
        p->reynolds = hp.reynolds;
    }
    if (n_missing > 0 &&
        sg_result_add_flag(res, "no_blank", SG_SEVERITY_WARNING, rec->readings[0].pos.line,
                           "%zu reading%s had no blank (composite) reading and were taken as already corrected "
                           "(blank 0); give the blank in the row, as 'test,composite_correction' or in the "
                           "hydrometer's register entry",
                           n_missing, n_missing == 1 ? "" : "s") != SG_OK)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    return SG_OK;
}

static enum sg_status add_pipette_points(const struct sg_record *rec, const struct sg_constants *k,
                                         double scale_pct, bool values_only, struct sg_result *res,
                                         struct sg_error *err)
{
    if (!k->has_pipette_volume)
        return sg_error_set(err, SG_EINVAL, rec->pos_pipette_id.line ? rec->pos_pipette_id.line : 1, 1,
                            "no pipette volume for pipette '%s' (calibrate it in the register or give "
                            "'test,pipette_volume_ml,<mL>')",
                            rec->pipette_id);
    for (size_t i = 0; i < rec->n_pipettes; i++) {
        const struct sg_pipette_row *r = &rec->pipettes[i];
        const double temp_c = r->temp_c + k->thermometer_offset_c;
        const struct sg_pipette_input in = {
            .standard = rec->standard,
            .elapsed_min = r->elapsed_min,
            .temp_c = temp_c,
            .depth_mm = r->depth_mm,
            .solids_g = r->solids_g,
            .pipette_volume_ml = k->pipette_volume_ml,
            .suspension_volume_ml = rec->suspension_volume_ml,
            .dispersant_mass_g = rec->has_dispersant ? rec->dispersant_mass_g : 0.0,
            .particle_density_mg_m3 = rec->particle_density_mg_m3,
            .specimen_dry_mass_g = rec->specimen_dry_mass_g,
        };
        struct sg_pipette_point pp;
        enum sg_status st = sg_pipette_reduce(&in, &pp, err);
        if (st == SG_OK && i == 0 && !rec->has_dispersant)
            st = sg_result_add_flag(res, "no_dispersant_mass", SG_SEVERITY_WARNING, r->pos.line,
                                    "no 'test,dispersant_mass_g': the dispersant's share of the pipette "
                                    "solids was not subtracted (give 0 if none was used)");
        if (st != SG_OK)
            return locate(err, st, r->pos);
        struct sg_point *p =
            sed_point(res, SG_SOURCE_PIPETTE, r->pos.line, pp.diameter_mm, pp.percent_specimen * scale_pct / 100.0);
        if (p == NULL)
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
        if (values_only)
            continue; /* the rest stays NaN (sg_reduce_options) */
        p->percent_specimen = pp.percent_specimen;
        p->elapsed_min = r->elapsed_min;
        p->temp_c = temp_c;
        p->effective_depth_mm = r->depth_mm;
        p->solids_g = r->solids_g;
        p->net_solids_g = pp.net_solids_g;
        p->water_density_kg_m3 = pp.water_density_kg_m3;
        p->viscosity_mpa_s = pp.viscosity_pa_s * 1000.0;
        p->reynolds = pp.reynolds;
    }
    return SG_OK;
}

/* Curves have a few dozen points: gathered on the stack (a Monte Carlo draw
 * builds one). */
#define CURVE_POINTS_ON_STACK 128

/* Builds the curve from the points on it. Sedimentation points at or
 * coarser than the finest sieve (finest_sieve_mm, INFINITY when there is
 * none) are outside the Stokes range: they are flagged and kept off the
 * curve (METHODS.md 6.2), in the same pass. */
static enum sg_status build_curve(const struct sg_reduce_options *opt, double finest_sieve_mm,
                                  struct sg_result *res, struct sg_error *err)
{
    struct sg_curve_point local[CURVE_POINTS_ON_STACK];
    struct sg_curve_point *cp = res->n_points <= CURVE_POINTS_ON_STACK ? local : malloc(res->n_points * sizeof *cp);
    if (cp == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory building the curve");
    size_t n = 0;
    for (size_t i = 0; i < res->n_points; i++) {
        struct sg_point *p = &res->points[i];
        if ((p->source == SG_SOURCE_HYDROMETER || p->source == SG_SOURCE_PIPETTE) &&
            p->diameter_mm >= finest_sieve_mm) {
            p->flags |= SG_PF_COARSER_THAN_SIEVE;
            p->on_curve = false;
        }
        if (!p->on_curve)
            continue;
        cp[n].diameter_mm = p->diameter_mm;
        cp[n].percent_finer = p->percent_finer;
        cp[n].rank = p->source == SG_SOURCE_SIEVE ? 0 : p->source == SG_SOURCE_FINE_SIEVE ? 1 : 2;
        n++;
    }
    struct sg_error cerr;
    sg_error_clear(&cerr);
    enum sg_status st = sg_curve_build(&res->curve, cp, n, opt->interp, &cerr);
    if (cp != local)
        free(cp);
    if (st == SG_EDOM) {
        /* Too few points for a curve: results are still the points; the
         * summary says why each quantity is not determined. */
        (void)sg_result_add_flag(res, "curve", SG_SEVERITY_WARNING, 0, "%s", cerr.msg);
        return SG_OK;
    }
    if (st != SG_OK && err != NULL)
        *err = cerr;
    return st;
}

enum sg_status sg_reduce(const struct sg_record *rec, const struct sg_constants *k,
                         const struct sg_reduce_options *opt, struct sg_result *res, struct sg_error *err)
{
    struct sg_constants inline_k;
    struct sg_reduce_options def_opt;
    if (k == NULL) {
        sg_constants_from_record(rec, &inline_k);
        k = &inline_k;
    }
    if (opt == NULL) {
        def_opt = sg_reduce_options_default();
        opt = &def_opt;
    }
    sg_error_clear(err);
    sg_result_clear(res);
    copy_text(res->id, sizeof res->id, rec->id);
    copy_text(res->calibration_used, sizeof res->calibration_used,
              k->calibration_used[0] ? k->calibration_used : "inline");

    enum sg_status st = sg_record_validate(rec, NULL, err);
    if (st != SG_OK)
        return st;

    double pp_split = 100.0, finest_sieve_mm = INFINITY;
    if (rec->n_sieve > 0 && !opt->values_only && (st = check_split_sieve(rec, res, err)) != SG_OK)
        return st;
    if (rec->n_sieve == 0 && rec->pos_split_aperture.line != 0 && !opt->values_only &&
        sg_result_add_flag(res, "split_sieve", SG_SEVERITY_WARNING, rec->pos_split_aperture.line,
                           "split_aperture_mm %g mm is given but the record has no sieve rows: 100 %% of the "
                           "sample is taken to pass it, so the percentages are of the specimen (add the sieve "
                           "rows, or leave split_aperture_mm out)",
                           rec->split_aperture_mm) != SG_OK)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    if (rec->n_sieve > 0) {
        pp_split = sg_sieve_percent_passing(rec->sieve, rec->n_sieve, rec->sample_dry_mass_g,
                                            rec->split_aperture_mm);
        if ((st = add_sieve_points(rec->sieve, rec->n_sieve, rec->sample_dry_mass_g, 100.0, SG_SOURCE_SIEVE,
                                   opt->values_only, res, &finest_sieve_mm, err)) != SG_OK)
            return st;
    }
    res->pp_split = pp_split;
    if ((st = add_sieve_points(rec->fine_sieve, rec->n_fine_sieve, rec->specimen_dry_mass_g, pp_split,
                               SG_SOURCE_FINE_SIEVE, opt->values_only, res, &finest_sieve_mm, err)) != SG_OK)
        return st;
    if (rec->method == SG_METHOD_HYDROMETER)
        st = add_hydrometer_points(rec, k, pp_split, opt->values_only, res, err);
    else
        st = add_pipette_points(rec, k, pp_split, opt->values_only, res, err);
    if (st != SG_OK)
        return st;

    if ((st = build_curve(opt, finest_sieve_mm, res, err)) != SG_OK)
        return st;

    /* the row from a padded name, with no note in a draw (values_only):
     * sg_result_add_value's work without measuring and copying strings */
    SG_STATIC_QNAME(split_name, "split_passing_pct"); /* static: the row keeps its address */
    struct sg_quantity *q = sg_result_new_quantity_static(
        res, &split_name, SG_QUNIT("%"), opt->values_only ? NULL : "percent of the whole sample passing the split sieve");
    if (q == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    q->determined = isfinite(pp_split);
    q->value = pp_split;
    if ((st = sg_classify_summarise(&res->curve, rec, opt, res, err)) != SG_OK)
        return st;
    if ((st = sg_plasticity_summarise(rec, opt, res, err)) != SG_OK ||
        (st = sg_screens_summarise(rec, opt, res, err)) != SG_OK)
        return st;
    if (opt->values_only)
        return SG_OK; /* a Monte Carlo draw (mc.h): no QC rules, register notes or calibration row */
    if ((st = sg_result_add_text(res, "calibration_used", res->calibration_used,
                                 "register entries applied (instrument@date) or inline constants")) != SG_OK)
        return sg_error_set(err, st, 0, 0, "out of memory");
    for (size_t i = 0; i < k->n_notes && i < sizeof k->notes / sizeof k->notes[0]; i++)
        if ((st = sg_result_add_flag(res, k->notes[i].name, k->notes[i].severity, 0, "%s",
                                     k->notes[i].message)) != SG_OK)
            return sg_error_set(err, st, 0, 0, "out of memory");
    st = sg_qc_evaluate(rec, k, &opt->qc, res, err);
    if (opt->skip_notes) /* the summary formatted none; the few fixed ones go too */
        for (size_t i = 0; i < res->n_quantities; i++)
            res->quantities[i].note[0] = '\0';
    return st;
}
