/* error.c - status strings and error-detail helpers. */
#include "sedgrade/error.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

const char *sg_strerror(enum sg_status code)
{
    switch (code) {
    case SG_OK: return "success";
    case SG_EINVAL: return "invalid input";
    case SG_EDOM: return "value outside the computable range";
    case SG_EPARSE: return "parse error";
    case SG_EIO: return "input/output error";
    case SG_ENOMEM: return "out of memory";
    case SG_ENOTFOUND: return "not found";
    case SG_ENUMERIC: return "numerical method failed";
    case SG_ELIMIT: return "size limit exceeded";
    }
    return "unknown status";
}

enum sg_status sg_error_set(struct sg_error *err, enum sg_status code, unsigned line, unsigned col,
                            const char *fmt, ...)
{
    if (err == NULL)
        return code;
    err->code = code;
    err->line = line;
    err->col = col;
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(err->msg, sizeof err->msg, fmt, ap);
    va_end(ap);
    return code;
}

void sg_error_clear(struct sg_error *err)
{
    if (err == NULL)
        return;
    err->code = SG_OK;
    err->line = 0;
    err->col = 0;
    err->msg[0] = '\0';
}

enum sg_status sg_diag_add(struct sg_diag_list *list, const struct sg_error *e)
{
    if (list == NULL)
        return SG_OK;
    if (list->n == list->cap) {
        size_t cap = list->cap ? 2 * list->cap : 8;
        struct sg_error *p = realloc(list->items, cap * sizeof *p);
        if (p == NULL)
            return SG_ENOMEM;
        list->items = p;
        list->cap = cap;
    }
    list->items[list->n++] = *e;
    return SG_OK;
}

void sg_diag_release(struct sg_diag_list *list)
{
    if (list == NULL)
        return;
    free(list->items);
    list->items = NULL;
    list->n = 0;
    list->cap = 0;
}
