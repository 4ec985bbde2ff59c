/* recordio.h - reading test records (SPEC "Test record (input), format 1"):
 * text -> struct sg_record, with every problem located by line and column. */
#ifndef SEDGRADE_RECORDIO_H
#define SEDGRADE_RECORDIO_H

#include <stddef.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Largest test record accepted, bytes (16 MiB; a record of one test is a few kB). */
#define SG_RECORDIO_MAX_BYTES ((size_t)16 * 1024 * 1024)

/* Largest number of data rows (comments and blank lines not counted) in one record. */
#define SG_RECORDIO_MAX_ROWS 100000u

/* Problem messages collected from one record before parsing stops; one closing
 * note ("too many problems") may follow them. */
#define SG_RECORDIO_MAX_DIAGS 100u

/* Parses a whole test record held in text[0..len) (need not be NUL-terminated).
 *
 * rec must have been initialised by the caller (sg_record_init); it is filled
 * as far as the text allows and, whatever the status, the caller releases it
 * (sg_record_release). Every problem found is appended to diags (may be NULL)
 * with its line and column (1-based; the column counts characters, not bytes,
 * after a leading byte-order mark; the column of the field that is wrong);
 * the first problem also goes to err (may be NULL; cleared on entry).
 *
 * A row with a problem (unknown kind or key, wrong number of fields, a value
 * that is not a number or is outside its accepted range, a broken quote) is
 * reported and left out, and reading goes on; the parts of the record such
 * rows would have given are noted in rec->refused. The record is then
 * checked with sg_record_validate(), so every problem of the file is listed
 * in one pass, without a refused part being called missing as well. Only a
 * text that is not UTF-8 (one message), the size and row limits and
 * SG_RECORDIO_MAX_DIAGS problems stop the reading early.
 *
 * Accepted text: UTF-8 (a leading BOM is skipped), LF or CRLF line ends,
 * comment lines starting with '#' after optional blanks, blank lines. The
 * separator is ',' or ';', whichever comes first on the first data row; with
 * ';' a decimal comma is accepted in numbers. Keys, row kinds and the words
 * of method/reading_scale/standard/'pan' are matched without regard to case.
 * Empty fields at the end of a row (a spreadsheet's padding) are ignored, and
 * a row of empty fields counts as blank; an empty field before a value is an
 * error. A quoted field must close on the line where it opens. Numbers are
 * plain decimals (sign, digits, optional fraction and exponent) in the C
 * locale's notation; the program must not change LC_NUMERIC. A number too
 * large for a double, or not zero but nearer zero than the smallest normal
 * double (about 2.2e-308), is refused as out of range rather than read as
 * infinity, 0 or a subnormal.
 *
 * Returns SG_OK; SG_EPARSE when the text has syntax, format or value-text
 * problems (whatever else was found); SG_EINVAL when it parsed but has value
 * or completeness problems; SG_ELIMIT when len exceeds
 * SG_RECORDIO_MAX_BYTES or the rows exceed SG_RECORDIO_MAX_ROWS; SG_ENOMEM. */
enum sg_status sg_recordio_parse(const char *text, size_t len, struct sg_record *rec,
                                 struct sg_diag_list *diags, struct sg_error *err);

/* Reads the whole file at path into a malloc'd, NUL-terminated buffer
 * (*text, owned by the caller: free()) of *len bytes (the NUL not counted).
 * Returns SG_OK; SG_ELIMIT, before reading anything, when the file is larger
 * than SG_RECORDIO_MAX_BYTES (the message gives its size and the limit);
 * SG_EIO when it is missing, unreadable or a directory (message with the
 * system's reason); SG_ENOMEM. On failure *text is NULL and *len 0. */
enum sg_status sg_recordio_read_file(const char *path, char **text, size_t *len, struct sg_error *err);

/* sg_recordio_read_file() then sg_recordio_parse(). A failure to read is also
 * appended to diags (at line 0). Same statuses as the two; rec as for parse. */
enum sg_status sg_recordio_load(const char *path, struct sg_record *rec, struct sg_diag_list *diags,
                                struct sg_error *err);

#endif
