/* calib.h - the instrument calibration register's core: an instrument's
 * identity and dated history in memory, the fits and acceptance decisions
 * computed from raw calibration observations (GSL least squares), which
 * entry is in force on a date, and an instrument's status on a date.
 * Pure computation: the register files are read and written by calibio.h.
 * Format and rules: doc/register.md; formulas: METHODS.md 3.3, 3.4, 10. */
#ifndef SEDGRADE_CALIB_H
#define SEDGRADE_CALIB_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/date.h"
#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Defaults of the gravimetric (ISO 4787 / ISO 8655-6 style) pipette
 * calibration, used when the event does not give its own value
 * (METHODS.md 10.6). */
#define SG_CAL_AIR_DENSITY_G_ML 0.0012      /* air density, ~20 C, 101.3 kPa, 50 % RH (METHODS.md 10.6) */
#define SG_CAL_WEIGHTS_DENSITY_G_ML 8.0     /* conventional density of balance weights (OIML R 111) */
#define SG_CAL_GLASS_EXPANSION_PER_K 9.9e-6 /* cubical expansion, borosilicate 3.3 glass (METHODS.md 10.6) */
#define SG_CAL_GLASS_REF_TEMP_C 20.0        /* reference temperature of volumetric glassware (ISO 4787) */

/* Size limits of one register file (exceeding one is SG_ELIMIT). */
#define SG_CAL_TEXT_MAX 160    /* free-text fields (maker, method, note, ...), bytes incl. NUL */
#define SG_CAL_OBS_MAX 100     /* observation rows of one part of one event */
#define SG_CAL_REFS_MAX 8      /* reference rows of one event */
#define SG_CAL_NOTES_MAX 8     /* note rows of one event */
#define SG_CAL_LIMITS_MAX 12   /* limit rows of one event */
#define SG_CAL_EVENTS_MAX 10000 /* events of one instrument */

enum sg_cal_kind {
    SG_CAL_KIND_NONE = 0,
    SG_CAL_HYDROMETER,
    SG_CAL_CYLINDER,   /* sedimentation cylinder */
    SG_CAL_THERMOMETER,
    SG_CAL_PIPETTE     /* sampling pipette */
};

enum sg_cal_event_type {
    SG_CAL_EV_CALIBRATION = 0, /* observations -> results, decision, due date */
    SG_CAL_EV_VERIFICATION,    /* the same, recorded as an intermediate check */
    SG_CAL_EV_ADJUSTMENT,      /* instrument adjusted: earlier entries no longer apply */
    SG_CAL_EV_REPAIR,          /* repaired: earlier entries no longer apply */
    SG_CAL_EV_OUT_OF_SERVICE,  /* withdrawn (damage, suspicion): earlier entries no longer apply */
    SG_CAL_EV_RETIREMENT,      /* withdrawn for good: nothing may follow */
    SG_CAL_EV_RELOCATION       /* moved: a new location */
};

/* What a calibration determines. An event carries one or more parts,
 * recognised by its observation rows. */
enum sg_cal_part {
    SG_CAL_PART_DEPTH = 0, /* hydrometer effective depth line H = c0 + c1 R, mm */
    SG_CAL_PART_MENISCUS,  /* hydrometer meniscus correction, reading units */
    SG_CAL_PART_BLANK,     /* hydrometer blank (composite) reading vs temperature */
    SG_CAL_PART_SCALE,     /* hydrometer scale verification against references */
    SG_CAL_PART_AREA,      /* cylinder cross-section from graduation spacing, mm2 */
    SG_CAL_PART_VOLUME,    /* pipette volume by weighing delivered water, mL */
    SG_CAL_PART_OFFSET,    /* thermometer correction (ice point / comparison), C */
    SG_CAL_PART_COUNT
};

/* Observation rows (raw data; doc/register.md gives the row layouts). */
enum sg_cal_obs_kind {
    SG_CAL_OBS_BULB_VOLUME = 0, /* x = bulb volume, mL (depth) */
    SG_CAL_OBS_BULB_LENGTH,     /* x = bulb length neck to tip, mm (depth) */
    SG_CAL_OBS_NECK,            /* x = graduation reading, y = neck-to-graduation distance, mm (depth) */
    SG_CAL_OBS_MENISCUS,        /* x = reading at the top, y = at the bottom of the meniscus (meniscus) */
    SG_CAL_OBS_BLANK,           /* x = temperature C, y = blank reading (blank) */
    SG_CAL_OBS_SCALE_REF,       /* x = reference value in reading units, y = reading (scale) */
    SG_CAL_OBS_SCALE_LIQUID,    /* x = liquid density g/mL, y = reading (scale) */
    SG_CAL_OBS_GRADUATION,      /* x = graduation mL, y = its height above a datum, mm (area) */
    SG_CAL_OBS_DELIVERY,        /* x = net mass of water delivered, g (volume) */
    SG_CAL_OBS_ICE_POINT,       /* x = 0 C (reference), y = thermometer reading, C (offset) */
    SG_CAL_OBS_COMPARISON,      /* x = reference temperature, y = thermometer reading, C (offset) */
    SG_CAL_OBS_COUNT
};

struct sg_cal_obs {
    enum sg_cal_obs_kind kind;
    double x, y;
    struct sg_srcpos pos;
};

/* An acceptance limit named by the event (limit,<name>,<value>). */
struct sg_cal_limit {
    char name[32];
    double value;
    struct sg_srcpos pos;
};

struct sg_cal_event {
    struct sg_date date;
    enum sg_cal_event_type type;
    unsigned line;                      /* line of the "event" row (0 if built in memory) */
    char by[SG_CAL_TEXT_MAX];           /* who did it */
    char reviewed_by[SG_CAL_TEXT_MAX];  /* who authorised it ("" if not given) */
    char method[SG_CAL_TEXT_MAX];       /* procedure followed, with its revision */
    char cylinder[SG_NAME_MAX];         /* depth: the cylinder the hydrometer was calibrated in */
    char thermometer[SG_NAME_MAX];      /* thermometer used for the observations (record only) */
    char dispersant[SG_CAL_TEXT_MAX];   /* blank: dispersant and its concentration */
    char location[SG_CAL_TEXT_MAX];     /* relocation: new location */
    bool has_due;
    struct sg_date due;                 /* the next calibration is due on this date */
    struct sg_srcpos pos_due, pos_cylinder, pos_thermometer;
    char refs[SG_CAL_REFS_MAX][SG_CAL_TEXT_MAX];   /* reference standards / certificates */
    size_t n_refs;
    char notes[SG_CAL_NOTES_MAX][SG_CAL_TEXT_MAX];
    size_t n_notes;
    struct sg_cal_limit limits[SG_CAL_LIMITS_MAX];
    size_t n_limits;
    /* volume (gravimetric) conditions; NaN = not given (defaults apply) */
    double water_temp_c, air_density_g_ml, weights_density_g_ml, expansion_per_k;
    struct sg_srcpos pos_water_temp;
    struct sg_cal_obs *obs;
    size_t n_obs, cap_obs;
};

struct sg_cal_instrument {
    char id[SG_NAME_MAX];
    enum sg_cal_kind kind;
    char maker[SG_CAL_TEXT_MAX], model[SG_CAL_TEXT_MAX], serial[SG_CAL_TEXT_MAX];
    char location[SG_CAL_TEXT_MAX];
    char note[SG_CAL_TEXT_MAX];
    enum sg_scale scale;                /* hydrometers */
    bool has_range;
    double range_min, range_max;        /* scale range: reading units (hydrometer), C (thermometer), mL */
    bool has_division;
    double division;                    /* smallest scale division, same units */
    bool has_nominal;
    double nominal_ml;                  /* nominal capacity (pipette; cylinder) */
    unsigned line;                      /* line of the "instrument" row */
    struct sg_srcpos pos_kind;
    struct sg_cal_event *events;        /* in file order (dates never decrease) */
    size_t n_events, cap_events;
};

/* A straight line y = c0 + c1 x fitted by least squares (gsl_fit_linear),
 * with the covariance of (c0, c1) estimated from the scatter about the line
 * (zero when n = 2), the residual sum of squares and s = sqrt(sumsq / (n - 2)). */
struct sg_cal_line {
    double c0, c1;
    double cov00, cov01, cov11;
    double sumsq;
    double s;          /* residual standard deviation; 0 when n = 2 */
    size_t n;
};

/* Results of one part of one event, computed from its observations. */
struct sg_cal_result {
    enum sg_cal_part part;
    bool accepted;             /* every limit the event names for this part is met */
    char decision[240];        /* "accepted: ..." / "rejected: ..." with the figures */
    size_t n;                  /* points */
    double x[SG_CAL_OBS_MAX];  /* per point: reading, temperature, reference, volume... */
    double y[SG_CAL_OBS_MAX];  /* the quantity fitted or averaged at that point */
    double residual[SG_CAL_OBS_MAX]; /* y - fitted value (or - mean) */
    struct sg_cal_line line;   /* depth (H vs R, mm), blank (reading vs C), scale (reading vs ref), area (mm vs mL) */
    double value;              /* meniscus Cm; area mm2; volume mL; thermometer correction C */
    double u;                  /* standard uncertainty of value (or of a blank reading) */
    double sd;                 /* sample standard deviation of the points (0 when n = 1) */
    double xmin, xmax;         /* observed range of x (blank: temperatures) */
    double worst;              /* the largest |residual| or |error| compared with a limit */
    /* depth only */
    bool has_intercept;        /* false when no cylinder area was given */
    double bulb_volume_ml, bulb_length_mm, area_mm2, neck_c0_mm, rise_term_mm;
    /* volume only */
    double z_ml_g, water_temp_c, mean_mass_g;
};

/* Status of an instrument on a date (doc/register.md "Status"). */
enum sg_cal_state {
    SG_CAL_IN_SERVICE = 0,
    SG_CAL_DUE_SOON,       /* in service, due within the given number of days */
    SG_CAL_OVERDUE,        /* the due date of an entry in force has passed */
    SG_CAL_OUT_OF_SERVICE, /* no accepted entry in force (never calibrated, rejected, withdrawn) */
    SG_CAL_RETIRED
};

struct sg_cal_status {
    enum sg_cal_state state;
    long entry[SG_CAL_PART_COUNT]; /* index in events of the entry in force per part; -1 none */
    bool has_due;
    struct sg_date due;            /* earliest due date among the entries in force */
    long days_to_due;              /* due - date (negative when overdue) */
    long last_event;               /* last event on or before the date; -1 none */
    char location[SG_CAL_TEXT_MAX];
    char reason[240];              /* why out of service, or which entry is due */
};

void sg_cal_instrument_init(struct sg_cal_instrument *ins);
/* Frees the events; ins is re-initialised. Accepts NULL. */
void sg_cal_instrument_release(struct sg_cal_instrument *ins);
void sg_cal_event_init(struct sg_cal_event *ev);
/* Frees the observations; ev is re-initialised. Accepts NULL. */
void sg_cal_event_release(struct sg_cal_event *ev);
/* Appends ev to ins, taking ownership of its observations (ev is left empty).
 * SG_ENOMEM, or SG_ELIMIT beyond SG_CAL_EVENTS_MAX. */
enum sg_status sg_cal_instrument_add_event(struct sg_cal_instrument *ins, struct sg_cal_event *ev,
                                           struct sg_error *err);
/* Appends one observation. SG_ENOMEM. */
enum sg_status sg_cal_event_add_obs(struct sg_cal_event *ev, struct sg_cal_obs obs, struct sg_error *err);

/* Names (as written in the register) and their inverses (false if unknown). */
const char *sg_cal_kind_name(enum sg_cal_kind k);
const char *sg_cal_event_type_name(enum sg_cal_event_type t);
const char *sg_cal_part_name(enum sg_cal_part p);
const char *sg_cal_obs_name(enum sg_cal_obs_kind k);
const char *sg_cal_state_name(enum sg_cal_state s);
bool sg_cal_kind_parse(const char *text, enum sg_cal_kind *out);
bool sg_cal_event_type_parse(const char *text, enum sg_cal_event_type *out);
bool sg_cal_obs_parse(const char *text, enum sg_cal_obs_kind *out);

/* The part an observation kind belongs to. */
enum sg_cal_part sg_cal_obs_part(enum sg_cal_obs_kind k);
/* The instrument kind a part belongs to. */
enum sg_cal_kind sg_cal_part_kind(enum sg_cal_part p);
/* true when a reduction cannot use the instrument without this part in force
 * (hydrometer: depth and meniscus; cylinder: area; pipette: volume;
 * thermometer: offset). */
bool sg_cal_part_required(enum sg_cal_part p);
/* Bit (1u << part) set for every part the event's observations carry. */
unsigned sg_cal_event_parts(const struct sg_cal_event *ev);
/* true for calibration and verification (events that carry observations). */
bool sg_cal_event_is_entry(enum sg_cal_event_type t);

/* Least-squares straight line through (x[i], y[i]), i < n, by
 * gsl_fit_linear; residual[i] = y[i] - (c0 + c1 x[i]) when residual is not
 * NULL. n >= 2 and at least two distinct x, all finite; else SG_EINVAL.
 * SG_ENUMERIC if GSL fails. */
enum sg_status sg_cal_fit_line(const double *x, const double *y, size_t n, struct sg_cal_line *line,
                               double *residual, struct sg_error *err);

/* Value of the line at x. */
double sg_cal_line_eval(const struct sg_cal_line *line, double x);

/* Standard uncertainty of the line's value at x from the covariance:
 * sqrt(cov00 + 2 x cov01 + x^2 cov11). */
double sg_cal_line_u(const struct sg_cal_line *line, double x);

/* The constant term of the effective depth that the bulb adds to every
 * neck-to-graduation distance, mm: 0.5 (h - V/A) with V in mL (1000 mm3)
 * and A in mm2 (METHODS.md 3.3, 10.1: H_R = H + 0.5 (h - V_h/A)).
 * bulb_volume_ml > 0, bulb_length_mm > 0, area_mm2 > 0; NaN otherwise. */
double sg_cal_depth_rise_term_mm(double bulb_volume_ml, double bulb_length_mm, double area_mm2);

/* Gravimetric conversion factor Z = (1 / (rho_w - rho_a)) (1 - rho_a / rho_b),
 * mL/g, with rho_w the water density at temp_c (Tanaka 2001, water.h), rho_a
 * the air density and rho_b the density of the balance weights, g/mL
 * (ISO 4787 / ISO 8655-6; METHODS.md 10.6). NaN if temp_c is outside 0-40 C
 * or the densities are not positive. */
double sg_cal_pipette_z_ml_g(double temp_c, double air_density_g_ml, double weights_density_g_ml);

/* Volume at 20 C delivered by mass_g of water weighed at temp_c:
 * V20 = m Z [1 - gamma (t - 20)] (METHODS.md 10.6). NaN on bad input. */
double sg_cal_pipette_volume_ml(double mass_g, double temp_c, double air_density_g_ml,
                                double weights_density_g_ml, double expansion_per_k);

/* The reading a perfect hydrometer of the given scale shows in a liquid of
 * density rho_g_ml at 20 C: density scale (rho - 1) 1000; g_per_l scale
 * (rho / rho_w(20 C) - 1) 1000 Gs / (Gs - 1) with Gs = 2.65 (METHODS.md 3.1:
 * R152 = 1606.06 (r151 - 1), r151 the specific gravity 20/20). NaN for
 * SG_SCALE_NONE or rho_g_ml <= 0. */
double sg_cal_scale_reference(enum sg_scale scale, double rho_g_ml);

/* Computes one part of event ev of instrument ins from its observations and
 * decides acceptance against the limits the event names for that part.
 * area_mm2 is the cylinder cross-section for the depth part (NaN when
 * unknown: then the slope, residuals and decision are computed but not the
 * intercept, has_intercept = false); ignored for other parts. The rules
 * (counts, limits, formulas) are those of doc/register.md.
 * Returns SG_OK (accepted or not: see res->accepted); SG_ENOTFOUND if the
 * event carries no observations of that part; SG_EINVAL with the event's
 * line when the observations cannot give a result (too few points, no
 * limit, no nominal volume...); SG_ENUMERIC if GSL fails. */
enum sg_status sg_cal_evaluate(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                               enum sg_cal_part part, double area_mm2, struct sg_cal_result *res,
                               struct sg_error *err);

/* Checks an instrument as a whole: identity present and consistent with its
 * kind (hydrometers name a scale, pipettes a nominal volume), event dates
 * never decrease, nothing after a retirement, calibration and verification
 * events name who, the method, a due date after the event date and carry
 * observations of parts of the instrument's kind, each part computable and
 * with the limits it needs, other events carry no observations, relocation
 * names a location. Returns SG_OK or SG_EINVAL with the line and column of
 * the first problem. */
enum sg_status sg_cal_validate(const struct sg_cal_instrument *ins, struct sg_error *err);

/* The history part of sg_cal_validate alone (no identity requirements), for
 * standalone observation files: a part that needs an identity value (a
 * liquid's reference reading needs the scale, a volume decision the nominal
 * volume) still fails in sg_cal_evaluate with its own message. */
enum sg_status sg_cal_validate_history(const struct sg_cal_instrument *ins, struct sg_error *err);

/* Status of the instrument on date `on` (doc/register.md "Status"): the
 * entry in force for each part is the latest calibration or verification on
 * or before the date that carries that part and follows the last
 * adjustment, repair or out-of-service event; any such entry rejected, a
 * required part without an entry, or no entry at all -> out of service; a
 * retirement on or before the date -> retired; otherwise overdue if the
 * earliest due date of the entries in force is before `on`, due soon if it
 * is within within_days, else in service. Returns SG_OK, or the status of a
 * failed evaluation (the instrument was not validated). */
enum sg_status sg_cal_status(const struct sg_cal_instrument *ins, struct sg_date on, long within_days,
                             struct sg_cal_status *out, struct sg_error *err);

/* Supplies sg_cal_status_with with the result of
 * sg_cal_evaluate(ins, &ins->events[event], part, NaN, ...) for an entry in
 * force, from wherever the caller keeps it: *res points at a result that
 * stays valid until sg_cal_status_with returns. Returns what sg_cal_evaluate
 * returned, with its message in err (may be NULL). */
typedef enum sg_status (*sg_cal_evaluator)(void *ctx, size_t event, enum sg_cal_part part,
                                           const struct sg_cal_result **res, struct sg_error *err);

/* As sg_cal_status, with each entry in force evaluated by eval(ctx, ...)
 * instead of sg_cal_evaluate (a cache of results: calibio.h); eval NULL is
 * sg_cal_status itself. The status, reason and errors are those
 * sg_cal_status gives when eval returns what sg_cal_evaluate would. */
enum sg_status sg_cal_status_with(const struct sg_cal_instrument *ins, struct sg_date on, long within_days,
                                  sg_cal_evaluator eval, void *ctx, struct sg_cal_status *out,
                                  struct sg_error *err);

/* Name of event i as used in calibration_used: "ID@YYYY-MM-DD", or
 * "ID@YYYY-MM-DD#n" when more than one calibration or verification of the
 * instrument is dated that day (n = 1, 2, ... in file order). buf >= 96 bytes. */
void sg_cal_entry_label(const struct sg_cal_instrument *ins, size_t i, char *buf, size_t size);

/* Index of the calibration or verification event that `label_date` names
 * ("YYYY-MM-DD" or "YYYY-MM-DD#n"; a bare date picks the last entry of that
 * day). SG_OK, SG_EPARSE for a malformed text, SG_ENOTFOUND if none. */
enum sg_status sg_cal_find_entry(const struct sg_cal_instrument *ins, const char *label_date, size_t *index,
                                 struct sg_error *err);

#endif
