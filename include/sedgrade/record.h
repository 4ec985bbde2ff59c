/* record.h - one sedimentation test as parsed from a test record: identity,
 * specimen data, instrument names, inline constants and the measured rows.
 * Plain data: the parser (recordio.h) fills it, sg_reduce() reads it. */
#ifndef SEDGRADE_RECORD_H
#define SEDGRADE_RECORD_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/date.h"
#include "sedgrade/error.h"

enum sg_method { SG_METHOD_NONE = 0, SG_METHOD_HYDROMETER, SG_METHOD_PIPETTE };

/* Hydrometer reading scales (SPEC "reading_scale"). */
enum sg_scale {
    SG_SCALE_NONE = 0,
    SG_SCALE_G_PER_L, /* grams of soil (Gs 2.65) per litre, 152H type */
    SG_SCALE_DENSITY  /* (rho - 1) x 1000, rho in g/mL: BS 1377 / 151H type in reading units */
};

/* Standard whose conventions apply where standards differ (SPEC "standard"). */
enum sg_standard {
    SG_STANDARD_NONE = 0, /* exact physics: rho_s - rho_w(T), IAPWS water */
    SG_STANDARD_ASTM_D7928,
    SG_STANDARD_BS1377_2,
    SG_STANDARD_ISO17892_4
};

/* Where a value came from in the input text (1-based; 0 = unknown). */
struct sg_srcpos {
    unsigned line;
    unsigned col;
};

/* A "sieve" or "fine_sieve" row. */
struct sg_sieve_row {
    double aperture_mm;
    double retained_g;
    struct sg_srcpos pos;
};

/* A "reading" row (hydrometer). */
struct sg_reading_row {
    double elapsed_min;
    double reading; /* as read, top of meniscus, in scale units */
    double temp_c;
    bool has_blank;
    double blank_reading; /* control-cylinder reading at this temperature, scale units */
    struct sg_srcpos pos;
};

/* A "pipette" row. */
struct sg_pipette_row {
    double elapsed_min;
    double temp_c;
    double depth_mm;
    double solids_g; /* net dry solids in the pipette sample (dispersant included) */
    struct sg_srcpos pos;
};

/* Per-record standard uncertainties for Monte Carlo (test,u_<input>,value).
 * A negative value means "not given: use the documented default". */
struct sg_record_u {
    double reading;            /* scale units */
    double temp_c;             /* C */
    double elapsed_min;        /* min */
    double mass_g;             /* g, balance */
    double particle_density_mg_m3;
    double blank_reading;      /* scale units */
    double meniscus_correction; /* scale units */
    double pipette_volume_ml;  /* mL */
    double solids_g;           /* g */
    double depth_mm;           /* mm (pipette sampling depth) */
};

#define SG_ID_MAX 64
#define SG_NAME_MAX 64

struct sg_record {
    char id[SG_ID_MAX];
    enum sg_method method;
    struct sg_date date;
    enum sg_standard standard;
    enum sg_scale scale;

    double particle_density_mg_m3; /* 0 = not given */
    double sample_dry_mass_g;      /* 0 = not given */
    double split_aperture_mm;      /* 0 = not given */
    double specimen_dry_mass_g;    /* 0 = not given */
    double suspension_volume_ml;   /* default 1000 */

    char hydrometer[SG_NAME_MAX];
    char cylinder[SG_NAME_MAX];
    char thermometer[SG_NAME_MAX];
    char pipette_id[SG_NAME_MAX];

    bool has_depth_line;
    double depth_line_mm[2]; /* effective depth at reading 0, mm; change per reading unit, mm */
    bool has_meniscus;
    double meniscus_correction;
    bool has_composite;
    double composite_correction; /* blank reading, scale units */
    bool has_pipette_volume;
    double pipette_volume_ml;
    bool has_dispersant;
    double dispersant_mass_g;

    bool has_liquid_limit, has_plastic_limit, has_natural_moisture;
    double liquid_limit_pct, plastic_limit_pct, natural_moisture_pct;

    struct sg_record_u u;

    /* Where each test key was given (for located messages); 0 if absent. */
    struct sg_srcpos pos_id, pos_method, pos_date, pos_particle_density, pos_sample_mass,
        pos_split_aperture, pos_specimen_mass, pos_volume, pos_hydrometer, pos_cylinder,
        pos_thermometer, pos_pipette_id, pos_scale, pos_depth_line, pos_meniscus, pos_composite,
        pos_pipette_volume, pos_dispersant, pos_standard;

    struct sg_sieve_row *sieve;
    size_t n_sieve, cap_sieve;
    struct sg_sieve_row *fine_sieve;
    size_t n_fine_sieve, cap_fine_sieve;
    struct sg_reading_row *readings;
    size_t n_readings, cap_readings;
    struct sg_pipette_row *pipettes;
    size_t n_pipettes, cap_pipettes;
};

/* Sets every field to its default (empty record, volume 1000 mL, u_* unset). */
void sg_record_init(struct sg_record *rec);

/* Frees the row arrays; the record is re-initialised. Accepts NULL. */
void sg_record_release(struct sg_record *rec);

/* Deep copy (rows included). dst must not be initialised; on failure dst is
 * left released. Returns SG_OK or SG_ENOMEM. */
enum sg_status sg_record_copy(struct sg_record *dst, const struct sg_record *src);

/* Row appenders (grow the arrays). Return SG_OK or SG_ENOMEM. */
enum sg_status sg_record_add_sieve(struct sg_record *rec, struct sg_sieve_row row);
enum sg_status sg_record_add_fine_sieve(struct sg_record *rec, struct sg_sieve_row row);
enum sg_status sg_record_add_reading(struct sg_record *rec, struct sg_reading_row row);
enum sg_status sg_record_add_pipette(struct sg_record *rec, struct sg_pipette_row row);

/* Checks that the record is complete and self-consistent for reduction:
 * required keys for its method, positive masses/volumes/times, particle
 * density 1.5-5 Mg/m3, readings for the method, times strictly increasing,
 * split aperture present when sieve rows are. Every problem found is added to
 * diags (may be NULL); the first one is also written to err. Returns SG_OK or
 * SG_EINVAL. Does not check instrument names against a register. */
enum sg_status sg_record_validate(const struct sg_record *rec, struct sg_diag_list *diags,
                                  struct sg_error *err);

const char *sg_method_name(enum sg_method m);
const char *sg_scale_name(enum sg_scale s);
const char *sg_standard_name(enum sg_standard s);

#endif
