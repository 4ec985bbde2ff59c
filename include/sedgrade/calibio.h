/* calibio.h - the calibration register on disk: reading instrument files
 * (libcsv, located messages), appending events atomically under a lock, and
 * resolving the constants a test record's instruments give on its date.
 * File format: doc/register.md. The computations are calib.h's. */
#ifndef SEDGRADE_CALIBIO_H
#define SEDGRADE_CALIBIO_H

#include <stddef.h>

#include "sedgrade/calib.h"
#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"

/* Largest register or event file read, bytes (SG_ELIMIT beyond). */
#define SG_CALIBIO_FILE_MAX (16u * 1024u * 1024u)

/* Name of the lock file in a register folder (held with flock while an
 * event is appended; it is never removed). */
#define SG_CALIBIO_LOCK_NAME ".sedgrade-register.lock"

enum sg_calibio_mode {
    SG_CALIBIO_REGISTER,  /* a register file: "instrument" row first, identity, then events; validated */
    SG_CALIBIO_EVENTS,    /* events only (the file given to 'cal add'); checked row by row, not as a whole */
    SG_CALIBIO_STANDALONE /* identity rows optional (the kind is taken from the observations); the history
                             is validated (sg_cal_validate_history) */
};

/* Parses register text (len bytes, need not be NUL-terminated) into ins
 * (initialised here; release it with sg_cal_instrument_release even on
 * failure). Accepts a UTF-8 byte-order mark, CRLF line ends, '#' comment
 * lines, blank lines, and ',' or ';' as separator (the first data row
 * decides; with ';' a decimal comma is accepted in numbers). Returns SG_OK;
 * SG_EPARSE (bad CSV, number, date, unknown row) or SG_EINVAL (rules of
 * sg_cal_validate) with err->line/col in the text; SG_ELIMIT beyond a
 * documented size; SG_ENOMEM. */
enum sg_status sg_calibio_parse(const char *text, size_t len, enum sg_calibio_mode mode,
                                struct sg_cal_instrument *ins, struct sg_error *err);

/* Reads and parses a file. SG_EIO (with the path and the system's reason)
 * if it cannot be read, SG_ENOTFOUND if it does not exist; otherwise as
 * sg_calibio_parse, err->line/col locating the fault in that file. */
enum sg_status sg_calibio_read_file(const char *path, enum sg_calibio_mode mode, struct sg_cal_instrument *ins,
                                    struct sg_error *err);

/* Reads a file named on the command line (an event file for 'cal add', a
 * standalone observations file for 'cal fit') into *text (NUL-terminated,
 * *len bytes; the caller frees it; NULL on failure). A file that does not
 * exist or cannot be read is SG_EIO with the path, the system's reason and
 * what to do, as a missing test record is for 'reduce'; SG_ELIMIT beyond
 * SG_CALIBIO_FILE_MAX; SG_ENOMEM. */
enum sg_status sg_calibio_read_input(const char *path, char **text, size_t *len, struct sg_error *err);

/* Writes "<register_dir>/<id>.csv" into buf. false if it does not fit or id
 * is not a valid instrument ID ([A-Za-z0-9._-], 1-63 characters, not
 * starting with '.'). */
bool sg_calibio_path(const char *register_dir, const char *id, char *buf, size_t size);

/* Loads instrument id from the register folder (file <id>.csv, mode
 * REGISTER). SG_ENOTFOUND if there is no such file or no such folder;
 * SG_EINVAL if register_dir is a file rather than a folder (the message says
 * so) or if the file's "instrument" row names another ID; parse errors
 * located in that file. */
enum sg_status sg_calibio_load(const char *register_dir, const char *id, struct sg_cal_instrument *ins,
                               struct sg_error *err);

/* Every instrument of a register folder (files "*.csv", sorted by name). */
struct sg_cal_register {
    struct sg_cal_instrument *items;
    size_t n, cap;
};
void sg_cal_register_init(struct sg_cal_register *reg);
/* Frees every instrument. Accepts NULL. */
void sg_cal_register_release(struct sg_cal_register *reg);

/* Loads every instrument file of the folder. A file that cannot be loaded is
 * skipped and reported in diags (may be NULL) as "PATH:LINE:COL: message"
 * (line/col 0); the others are still loaded. Returns SG_OK when every file
 * loaded, the first file's status otherwise (err gets its message);
 * SG_ENOTFOUND if the folder does not exist, SG_EINVAL if register_dir is a
 * file, SG_EIO if the folder cannot be read. */
enum sg_status sg_calibio_load_register(const char *register_dir, struct sg_cal_register *reg,
                                        struct sg_diag_list *diags, struct sg_error *err);

/* Appends the event(s) in event_text (mode EVENTS rows) to instrument id's
 * file in register_dir. Under an exclusive flock on the folder's lock file:
 * reads the file, checks the whole history with the new events
 * (sg_cal_validate: date order, nothing after a retirement, computable
 * observations with their limits...) and that a named cylinder is a
 * cylinder of the register, then writes the old bytes unchanged followed by
 * the new rows to a temporary file in the same folder, syncs it and renames
 * it over the file, and syncs the folder. Earlier bytes are never changed; on
 * any failure the file is left as it was. The new rows are written with the
 * register file's separator and numbers with a decimal point.
 * Returns SG_OK; faults in event_text as SG_EPARSE/SG_EINVAL with
 * err->line/col in event_text; a fault of the register file itself or of a
 * referenced instrument with line/col 0 and the path in the message;
 * SG_ENOTFOUND if the instrument has no file or the folder does not exist;
 * SG_EINVAL if register_dir is a file; SG_EIO on a write failure. */
enum sg_status sg_calibio_append(const char *register_dir, const char *id, const char *event_text, size_t len,
                                 struct sg_error *err);

/* Resolves the instrument constants for a test record (struct sg_constants,
 * reduce.h): starts from sg_constants_from_record (inline values, "inline"),
 * then, for each instrument the record names (hydrometer, cylinder,
 * thermometer, pipette_id), loads its file from register_dir and applies the
 * entries in force on rec->date (sg_cal_status):
 *   hydrometer -> depth line (its intercept with the cross-section of the
 *     record's cylinder, or of the cylinder the hydrometer was calibrated in,
 *     as calibrated on the test date) with the fit's covariance; meniscus
 *     correction and its u; blank line vs temperature with its observed
 *     range and u (replacing an inline composite_correction); scale range;
 *   cylinder -> checked to be in force (its area enters the depth line);
 *   pipette -> volume and its u; thermometer -> thermometer_offset_c.
 * calibration_used becomes "ID@date;..." of the entries applied, or stays
 * "inline". A due date before the test date adds a note
 * "calibration_overdue" (warning). Register values replace inline ones for
 * the instruments the register holds.
 * Returns SG_OK; SG_EINVAL if the record names an instrument but has no date,
 * if an instrument has no entry in force on the date (out of service,
 * retired, never calibrated), if it is of another kind or another scale than
 * the record says, or if register_dir is a file rather than a folder;
 * SG_ENOTFOUND if the register folder or the instrument's file does not
 * exist; SG_EIO if the folder cannot be looked at. Messages name the instrument and the dates; err
 * line/col point at the record's instrument row; faults inside a register
 * file name that file, line and column in the message. */
enum sg_status sg_calibio_resolve(const char *register_dir, const struct sg_record *rec, struct sg_constants *k,
                                  struct sg_error *err);

/* A register cache, for resolving many records in one command: each
 * instrument file is read, parsed and validated at most once (a file that
 * does not exist or does not load is remembered with its status and
 * message), and each entry's evaluation and each instrument's status on a
 * date are computed once. The register must not change while a cache is in
 * use (a cache lives for one command invocation). Results and messages are
 * exactly those of sg_calibio_resolve. A cache belongs to one thread at a
 * time (no locks): give each worker its own. The fields are private. */
struct sg_calibio_slot; /* one instrument ID looked up (calibio.c) */
struct sg_calibio_cache {
    const char *register_dir;       /* as given to init: not copied, it must outlive the cache */
    int dir_state;                  /* 0 not yet looked at; 1 a folder; -1 missing; -2 a file or other
                                       non-folder; -3 cannot be looked at (dir_errno says why) */
    int dir_errno;
    struct sg_calibio_slot **slots; /* in order of first use */
    size_t n_slots, cap_slots;
    size_t *index; /* open-addressing table of slot numbers + 1 by ID hash; cap_index a power of two */
    size_t cap_index;
};

/* An empty cache for register_dir (may be NULL: every record that names an
 * instrument then fails as sg_calibio_resolve fails). Allocates nothing. */
void sg_calibio_cache_init(struct sg_calibio_cache *cache, const char *register_dir);
/* Frees everything the cache keeps; it is empty (same folder) afterwards. Accepts NULL. */
void sg_calibio_cache_release(struct sg_calibio_cache *cache);

/* sg_calibio_resolve through a cache: the same constants, notes, statuses
 * and messages. SG_ENOMEM when the cache cannot grow. */
enum sg_status sg_calibio_resolve_cached(struct sg_calibio_cache *cache, const struct sg_record *rec,
                                         struct sg_constants *k, struct sg_error *err);

/* sg_calibio_resolve_with through a cache. */
enum sg_status sg_calibio_resolve_with_cached(struct sg_calibio_cache *cache, const struct sg_record *rec,
                                              const char *override_id, const char *override_entry,
                                              struct sg_constants *k, struct sg_error *err);

/* As sg_calibio_resolve, but for instrument override_id the entry named by
 * override_entry ("YYYY-MM-DD" or "YYYY-MM-DD#n", sg_cal_find_entry) is
 * applied instead of the entry in force, whatever the test date (for "what
 * if" comparisons; no overdue note for it). A rejected entry is applied
 * too (the impact of an "as found" result), with the warning note
 * "entry_rejected" in k. override_id NULL: plain sg_calibio_resolve. */
enum sg_status sg_calibio_resolve_with(const char *register_dir, const struct sg_record *rec,
                                       const char *override_id, const char *override_entry,
                                       struct sg_constants *k, struct sg_error *err);

#endif
