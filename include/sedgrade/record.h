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
    unsigned temp_col;    /* column of the temperature field on pos.line; 0 = unknown */
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

/* Parts of a record that a reader found in its input but refused (bits of
 * struct sg_record's "refused"): the problem was reported where it was
 * found, so sg_record_validate() does not report the part again as missing
 * ("required key 'id' is missing", "no 'reading' rows", ...). One mistake,
 * one message. */
enum sg_record_part {
    SG_PART_ID = 1 << 0,
    SG_PART_METHOD = 1 << 1,
    SG_PART_PARTICLE_DENSITY = 1 << 2,
    SG_PART_SAMPLE_MASS = 1 << 3,
    SG_PART_SPLIT_APERTURE = 1 << 4,
    SG_PART_SPECIMEN_MASS = 1 << 5,
    SG_PART_VOLUME = 1 << 6,
    SG_PART_SCALE = 1 << 7,
    SG_PART_HYDROMETER = 1 << 8,
    SG_PART_DEPTH_LINE = 1 << 9,
    SG_PART_PIPETTE_ID = 1 << 10,
    SG_PART_PIPETTE_VOLUME = 1 << 11,
    SG_PART_SIEVE = 1 << 12,      /* at least one 'sieve' row */
    SG_PART_FINE_SIEVE = 1 << 13, /* at least one 'fine_sieve' row */
    SG_PART_READING = 1 << 14,    /* at least one 'reading' row */
    SG_PART_PIPETTE = 1 << 15     /* at least one 'pipette' row */
};

/* Accepted ranges of record values (sg_record_check_value). They are
 * generous on purpose: no laboratory comes near them. They catch unit slips
 * (kilograms for grams, Kelvin for Celsius) and values that would overflow
 * or underflow in the reduction (a 1e-300 g specimen gives 1e+303 %). Where
 * no standard sets a limit the source is "common practice". */
#define SG_RECORD_MASS_MIN_G 1e-3 /* 1 mg: below what a soil balance resolves (common practice) */
#define SG_RECORD_MASS_MAX_G 1e6  /* 1000 kg: far above any sample a laboratory dries (common practice) */
#define SG_RECORD_APERTURE_MIN_MM 1e-3 /* 1 um; the finest woven test sieve is 0.020 mm (ASTM E11) */
#define SG_RECORD_APERTURE_MAX_MM 1000.0 /* 1 m; the coarsest test sieve is 125 mm (ASTM E11, ISO 3310) */
#define SG_RECORD_VOLUME_MIN_ML 1.0   /* suspensions are 500-1000 mL (common practice) */
#define SG_RECORD_VOLUME_MAX_ML 1e5   /* 100 L (common practice: no cylinder holds more) */
#define SG_RECORD_PIPETTE_VOLUME_MIN_ML 0.1  /* sampling pipettes hold 10-50 mL (common practice) */
#define SG_RECORD_PIPETTE_VOLUME_MAX_ML 1000.0
#define SG_RECORD_ELAPSED_MIN_MIN 1e-3 /* 0.06 s; the first readings are at 0.25-1 min (common practice) */
#define SG_RECORD_ELAPSED_MAX_MIN 1e5  /* about 69 days; the last readings are at 1-2 days (common practice) */
#define SG_RECORD_TEMP_MIN_C 0.0      /* water of the suspension, liquid */
#define SG_RECORD_TEMP_MAX_C 40.0     /* well above the 15-30 C of any laboratory (common practice) */
#define SG_RECORD_READING_ABS_MAX 1000.0 /* reading units; hydrometer scales span about -5 to 60 (ASTM 152H, 151H) */
#define SG_RECORD_DEPTH_MIN_MM 1.0    /* pipette sampling and effective depths, mm (common practice) */
#define SG_RECORD_DEPTH_MAX_MM 2000.0 /* 2 m; sedimentation cylinders are about 0.45 m tall (common practice) */
#define SG_RECORD_DEPTH_PER_UNIT_ABS_MAX_MM 100.0 /* effective-depth change per reading unit; about 1.6 mm for a 152H */
#define SG_RECORD_PARTICLE_DENSITY_MIN_MG_M3 1.5 /* organic soils (common practice) */
#define SG_RECORD_PARTICLE_DENSITY_MAX_MG_M3 5.0 /* heavy minerals (common practice) */
#define SG_RECORD_WATER_PCT_MAX 2000.0 /* liquid limit, moisture content, %; peats reach about 1500 % (common practice) */
/* A specimen may weigh more than the sample it was taken from only by
 * weighing error; this much (the 1 % of the sieving mass balance, METHODS.md
 * 5.3, common practice) is let through so that Monte Carlo draws of equal
 * nominal masses are not refused. */
#define SG_RECORD_SPECIMEN_OVER_SAMPLE_MAX_PCT 1.0

/* Record values with an accepted range (see sg_record_check_value). */
enum sg_record_value {
    SG_VALUE_SAMPLE_MASS,       /* sample_dry_mass_g, g */
    SG_VALUE_SPECIMEN_MASS,     /* specimen_dry_mass_g, g */
    SG_VALUE_SPLIT_APERTURE,    /* split_aperture_mm, mm */
    SG_VALUE_SUSPENSION_VOLUME, /* suspension_volume_ml, mL */
    SG_VALUE_PARTICLE_DENSITY,  /* particle_density_mg_m3, Mg/m3 */
    SG_VALUE_PIPETTE_VOLUME,    /* pipette_volume_ml, mL */
    SG_VALUE_DISPERSANT_MASS,   /* dispersant_mass_g, g (0 allowed) */
    SG_VALUE_DEPTH_AT_ZERO,     /* depth_line_mm, first value, mm */
    SG_VALUE_DEPTH_PER_UNIT,    /* depth_line_mm, second value, mm per reading unit */
    SG_VALUE_MENISCUS,          /* meniscus_correction, reading units */
    SG_VALUE_COMPOSITE,         /* composite_correction, reading units */
    SG_VALUE_SIEVE_APERTURE,    /* sieve or fine_sieve aperture, mm (not the pan) */
    SG_VALUE_RETAINED_MASS,     /* sieve or fine_sieve retained mass, g (0 allowed) */
    SG_VALUE_ELAPSED,           /* reading or pipette elapsed time, min */
    SG_VALUE_READING,           /* hydrometer reading, reading units */
    SG_VALUE_TEMP,              /* reading or pipette temperature, C */
    SG_VALUE_BLANK,             /* blank reading of a reading row, reading units */
    SG_VALUE_SAMPLING_DEPTH,    /* pipette sampling depth, mm */
    SG_VALUE_SOLIDS,            /* pipette solids, g (0 allowed) */
    SG_VALUE_COUNT
};

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

    unsigned refused; /* enum sg_record_part bits; 0 for a record built in code */

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

/* Checks value v of quantity which against its accepted range (the
 * SG_RECORD_* limits above; a mass, volume, aperture, time or depth must be
 * positive, a retained mass, dispersant mass or pipette solids not
 * negative). On failure writes err (may be NULL), located at pos, with the
 * value, its unit, the limit and what to do, and returns SG_EINVAL; else
 * SG_OK. A value that is not finite always fails. */
enum sg_status sg_record_check_value(enum sg_record_value which, double v, struct sg_srcpos pos,
                                     struct sg_error *err);

/* Checks that the record is complete and self-consistent for reduction:
 * required keys for its method; every value given within its accepted
 * range (sg_record_check_value); readings for the method; times strictly
 * increasing; split aperture and sample mass present when sieve rows are;
 * fine sieves no coarser than the split; a specimen no heavier than the
 * whole sample (beyond SG_RECORD_SPECIMEN_OVER_SAMPLE_MAX_PCT); a pipette
 * volume below the suspension volume; an id of [A-Za-z0-9._-] not starting
 * with '.'. Parts in rec->refused are not reported as missing. Every problem
 * found is added to diags (may be NULL); the first one is also written to
 * err. Returns SG_OK or SG_EINVAL. Does not check instrument names against a
 * register. */
/* Whether id (a NUL-terminated string) may name output files as a test
 * id: [A-Za-z0-9._-], not empty, not starting with '.' (a hidden file;
 * "." and ".."). sg_record_validate also refuses ids ending in ".report". */
bool sg_record_id_is_file_name(const char *id);

enum sg_status sg_record_validate(const struct sg_record *rec, struct sg_diag_list *diags,
                                  struct sg_error *err);

const char *sg_method_name(enum sg_method m);
const char *sg_scale_name(enum sg_scale s);
const char *sg_standard_name(enum sg_standard s);

#endif
