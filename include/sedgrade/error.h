/* error.h - status codes and caller-owned error detail for every sedgrade module.
 * Every function that can fail returns an enum sg_status and, when given a
 * non-NULL struct sg_error, writes a message that says what, where and how to fix. */
#ifndef SEDGRADE_ERROR_H
#define SEDGRADE_ERROR_H

#include <stddef.h>

enum sg_status {
    SG_OK = 0,     /* success */
    SG_EINVAL,     /* an argument or input value is invalid (bad input, exit 2) */
    SG_EDOM,       /* a value lies outside the domain where it can be computed (e.g. no extrapolation) */
    SG_EPARSE,     /* text could not be parsed (bad input, exit 2) */
    SG_EIO,        /* reading or writing a file failed (exit 3) */
    SG_ENOMEM,     /* memory allocation failed */
    SG_ENOTFOUND,  /* a named item (instrument, calibration entry) does not exist */
    SG_ENUMERIC,   /* a numerical method failed (GSL status translated) */
    SG_ELIMIT      /* an input exceeds a documented size limit */
};

/* Error detail, owned by the caller. line/col locate the fault in an input
 * text (1-based; 0 when unknown). msg is lower case, problem first, with the
 * offending value and its unit and, in parentheses, what to do. */
struct sg_error {
    enum sg_status code;
    unsigned line;
    unsigned col;
    char msg[400];
};

/* Short fixed description of a status ("invalid input", ...). Never NULL. */
const char *sg_strerror(enum sg_status code);

/* Fills err (may be NULL) and returns code. fmt is printf-style. */
enum sg_status sg_error_set(struct sg_error *err, enum sg_status code, unsigned line, unsigned col,
                            const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

/* Clears err (may be NULL) to SG_OK with an empty message. */
void sg_error_clear(struct sg_error *err);

/* A growable list of errors, for commands that report every problem in an
 * input rather than the first ("sedgrade check"). */
struct sg_diag_list {
    struct sg_error *items;
    size_t n;
    size_t cap;
};

/* Appends a copy of e. Returns SG_ENOMEM if the list cannot grow (the list is
 * left as it was). list may be NULL (then nothing is stored, SG_OK). */
enum sg_status sg_diag_add(struct sg_diag_list *list, const struct sg_error *e);

/* Releases the items; the list is empty and reusable afterwards. Accepts NULL. */
void sg_diag_release(struct sg_diag_list *list);

#endif
