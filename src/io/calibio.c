/* calibio.c - the calibration register on disk: instrument files read with
 * libcsv into calib.h structs (every fault located), events appended under a
 * lock by temp-file-and-rename, and the constants of a test's instruments
 * resolved for its date (doc/register.md). */
#include "sedgrade/calibio.h"

#include <csv.h>
#include <ctype.h>
#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "sedgrade/atomic.h"
#include "io/utf8.h"

/* ---- growable text buffer -------------------------------------------------- */

struct buf {
    char *p;
    size_t n, cap;
};

static bool buf_add(struct buf *b, const char *s, size_t len)
{
    if (len > SIZE_MAX / 2 - b->n) /* no size that large is real; keeps the sums below from wrapping */
        return false;
    if (b->n + len + 1 > b->cap) {
        size_t cap = b->cap ? b->cap : 256;
        while (cap < b->n + len + 1)
            cap *= 2;
        char *q = realloc(b->p, cap);
        if (q == NULL)
            return false;
        b->p = q;
        b->cap = cap;
    }
    memcpy(b->p + b->n, s, len);
    b->n += len;
    b->p[b->n] = '\0';
    return true;
}

static bool buf_str(struct buf *b, const char *s)
{
    return buf_add(b, s, strlen(s));
}

/* ---- text: UTF-8 checks and messages that show only text ------------------------- */


/* A control character (C0, DEL, or C1 U+0080-U+009F) at s[0..n). */
static bool is_control(const unsigned char *s, size_t n)
{
    return s[0] < 0x20 || s[0] == 0x7F || (n >= 2 && s[0] == 0xC2 && s[1] < 0xA0);
}

/* Rewrites err's message so that it holds only printable text: a byte that is
 * a control character or not part of valid UTF-8 (a file path given on the
 * command line, an instrument ID, a UTF-8 character cut by a length limit)
 * is shown as \xNN. Applied to every message that leaves this module. */
static void escape_message(struct sg_error *err)
{
    if (err == NULL)
        return;
    const unsigned char *m = (const unsigned char *)err->msg;
    const size_t n = strnlen(err->msg, sizeof err->msg);
    size_t i = 0;
    while (i < n && m[i] >= 0x20 && m[i] < 0x7F)
        i++;
    if (i == n)
        return; /* printable ASCII, nearly every message */
    char out[sizeof err->msg];
    const size_t room = sizeof out - 4; /* "..." and the NUL */
    size_t o = 0;
    for (i = 0; i < n;) {
        const size_t len = m[i] < 0x80 ? 1 : sg_utf8_len(m + i, n - i);
        const bool plain = len > 0 && !is_control(m + i, n - i);
        const size_t need = plain ? len : 4;
        if (o + need > room) {
            memcpy(out + o, "...", 3);
            o += 3;
            break;
        }
        if (plain)
            memcpy(out + o, m + i, len);
        else
            (void)snprintf(out + o, 5, "\\x%02X", m[i]);
        o += need;
        i += plain ? len : 1;
    }
    out[o] = '\0';
    memcpy(err->msg, out, o + 1);
}

/* ---- rows: CSV lines split into located fields ---------------------------------- */

struct field {
    char *text;
    unsigned col;
};

struct row {
    unsigned line;
    bool comment;
    char *raw; /* comment rows: the line as written */
    struct field *f;
    size_t nf, capf;
    unsigned numeric; /* bit i: field i was read as a number */
};

struct rowset {
    struct row *v;
    size_t n, cap;
    char delim;
};

static void rowset_release(struct rowset *rs)
{
    for (size_t i = 0; i < rs->n; i++) {
        struct row *r = &rs->v[i];
        for (size_t j = 0; j < r->nf; j++)
            free(r->f[j].text);
        free(r->f);
        free(r->raw);
    }
    free(rs->v);
    memset(rs, 0, sizeof *rs);
}

static struct row *rowset_push(struct rowset *rs, unsigned line)
{
    if (rs->n == rs->cap) {
        const size_t cap = rs->cap ? 2 * rs->cap : 64;
        struct row *v = realloc(rs->v, cap * sizeof *v);
        if (v == NULL)
            return NULL;
        rs->v = v;
        rs->cap = cap;
    }
    struct row *r = &rs->v[rs->n++];
    memset(r, 0, sizeof *r);
    r->line = line;
    return r;
}

/* libcsv callback state: the row being filled and the byte index being fed. */
struct csv_cb {
    struct row *row;
    size_t pos;         /* index in the line of the byte just fed */
    size_t field_start; /* index where the current field began */
    bool nomem;
};

static void on_field(void *data, size_t len, void *vcb)
{
    struct csv_cb *cb = vcb;
    struct row *r = cb->row;
    if (cb->nomem)
        return;
    if (r->nf == r->capf) {
        const size_t cap = r->capf ? 2 * r->capf : 8;
        struct field *f = realloc(r->f, cap * sizeof *f);
        if (f == NULL) {
            cb->nomem = true;
            return;
        }
        r->f = f;
        r->capf = cap;
    }
    char *t = malloc(len + 1);
    if (t == NULL) {
        cb->nomem = true;
        return;
    }
    if (len > 0 && data != NULL)
        memcpy(t, data, len);
    t[len] = '\0';
    r->f[r->nf].text = t;
    r->f[r->nf].col = (unsigned)cb->field_start + 1;
    r->nf++;
    cb->field_start = cb->pos + 1;
}

static void on_row(int c, void *vcb)
{
    (void)c;
    (void)vcb;
}

/* Splits one physical line (no line end) into fields with libcsv. */
static enum sg_status parse_line(const char *s, size_t n, char delim, struct row *r, struct sg_error *err)
{
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL) != 0)
        return sg_error_set(err, SG_ENOMEM, r->line, 1, "out of memory starting the CSV reader");
    csv_set_delim(&p, (unsigned char)delim);
    struct csv_cb cb = {.row = r, .pos = 0, .field_start = 0, .nomem = false};
    enum sg_status st = SG_OK;
    for (size_t i = 0; i < n && st == SG_OK; i++) {
        cb.pos = i;
        if (csv_parse(&p, s + i, 1, on_field, on_row, &cb) != 1)
            st = sg_error_set(err, SG_EPARSE, r->line, (unsigned)i + 1,
                              "malformed CSV: %s (a quote may only open or close a field; write a quote inside "
                              "a quoted field as two quotes)",
                              csv_strerror(csv_error(&p)));
    }
    cb.pos = n;
    if (st == SG_OK && csv_fini(&p, on_field, on_row, &cb) != 0)
        st = sg_error_set(err, SG_EPARSE, r->line, (unsigned)n,
                          "malformed CSV: a quoted field is not closed on this line (close the quote; a field "
                          "cannot span lines)");
    csv_free(&p);
    if (st == SG_OK && cb.nomem)
        st = sg_error_set(err, SG_ENOMEM, r->line, 1, "out of memory reading the register");
    return st;
}

/* The first ',' or ';' outside quotes, or 0. */
static char detect_delim(const char *s, size_t n)
{
    bool quoted = false;
    for (size_t i = 0; i < n; i++) {
        if (s[i] == '"')
            quoted = !quoted;
        else if (!quoted && (s[i] == ',' || s[i] == ';'))
            return s[i];
    }
    return 0;
}

/* Refuses a line that is not UTF-8 text (a byte that is not part of valid
 * UTF-8, or a control character other than tab), located at that byte and
 * naming it by its value: the byte itself is never copied into a message. */
static enum sg_status check_text(const char *line_text, size_t n, unsigned line, struct sg_error *err)
{
    const unsigned char *s = (const unsigned char *)line_text;
    for (size_t i = 0; i < n;) {
        if (s[i] >= 0x20 && s[i] < 0x7F) {
            i++;
            continue;
        }
        if (s[i] == '\t') {
            i++;
            continue;
        }
        if (s[i] < 0x80)
            return sg_error_set(err, SG_EPARSE, line, (unsigned)i + 1,
                                "control character 0x%02X in the line (the file is not plain text; save it as CSV)",
                                s[i]);
        const size_t len = sg_utf8_len(s + i, n - i);
        if (len == 0)
            return sg_error_set(err, SG_EPARSE, line, (unsigned)i + 1,
                                "byte 0x%02X is not UTF-8 text (save the file as UTF-8; a file written in Latin-1 "
                                "or Windows-1252 must be converted)",
                                s[i]);
        i += len;
    }
    return SG_OK;
}

static enum sg_status split_rows(const char *text, size_t len, struct rowset *rs, struct sg_error *err)
{
    memset(rs, 0, sizeof *rs);
    if (len > SG_CALIBIO_FILE_MAX)
        return sg_error_set(err, SG_ELIMIT, 0, 0, "file of %zu bytes is larger than the %u-byte limit", len,
                            SG_CALIBIO_FILE_MAX);
    if (len >= 2 && (((unsigned char)text[0] == 0xFF && (unsigned char)text[1] == 0xFE) ||
                     ((unsigned char)text[0] == 0xFE && (unsigned char)text[1] == 0xFF)))
        return sg_error_set(err, SG_EPARSE, 1, 1, "the file is UTF-16 text, not UTF-8 (save the file as UTF-8)");
    size_t at = 0;
    if (len >= 3 && (unsigned char)text[0] == 0xEF && (unsigned char)text[1] == 0xBB &&
        (unsigned char)text[2] == 0xBF)
        at = 3;
    unsigned line = 0;
    while (at < len) {
        line++;
        const char *nl = memchr(text + at, '\n', len - at);
        size_t end = nl ? (size_t)(nl - text) : len;
        const size_t next = nl ? end + 1 : len;
        if (end > at && text[end - 1] == '\r')
            end--;
        const char *s = text + at;
        const size_t n = end - at;
        at = next;
        if (memchr(s, '\0', n) != NULL)
            return sg_error_set(err, SG_EPARSE, line, (unsigned)((const char *)memchr(s, '\0', n) - s) + 1,
                                "the line contains a NUL byte (the file is not text; save it as CSV)");
        if (memchr(s, '\r', n) != NULL)
            return sg_error_set(err, SG_EPARSE, line, (unsigned)((const char *)memchr(s, '\r', n) - s) + 1,
                                "stray carriage return inside the line (save the file with LF or CRLF line ends)");
        const enum sg_status tst = check_text(s, n, line, err);
        if (tst != SG_OK)
            return tst;
        size_t k = 0;
        while (k < n && (s[k] == ' ' || s[k] == '\t'))
            k++;
        if (k == n)
            continue; /* blank line */
        struct row *r = rowset_push(rs, line);
        if (r == NULL)
            return sg_error_set(err, SG_ENOMEM, line, 1, "out of memory reading the register");
        if (s[k] == '#') {
            r->comment = true;
            r->raw = malloc(n + 1);
            if (r->raw == NULL)
                return sg_error_set(err, SG_ENOMEM, line, 1, "out of memory reading the register");
            memcpy(r->raw, s, n);
            r->raw[n] = '\0';
            continue;
        }
        if (rs->delim == 0) {
            rs->delim = detect_delim(s, n);
            if (rs->delim == 0)
                rs->delim = ',';
        }
        const enum sg_status st = parse_line(s, n, rs->delim, r, err);
        if (st != SG_OK)
            return st;
    }
    return SG_OK;
}

/* ---- field readers ------------------------------------------------------------------ */

struct reader {
    struct rowset rs;
    enum sg_calibio_mode mode;
    struct sg_cal_instrument *ins;
    struct sg_cal_event ev; /* the event being read */
    bool in_event;
    struct sg_error *err;
};

static const char *const known_rows[] = {
    "instrument", "kind",        "maker",      "model",          "serial",         "location",
    "note",       "scale",       "range",      "division",       "nominal_ml",     "event",
    "by",         "reviewed_by", "method",     "reference",      "cylinder",       "thermometer",
    "dispersant", "due",         "limit",      "water_temp_c",   "air_density_g_ml", "weights_density_g_ml",
    "expansion_per_k", "bulb_volume_ml", "bulb_length_mm", "neck_mm", "meniscus", "blank", "scale_ref",
    "scale_liquid", "graduation", "delivery", "ice_point", "comparison"};

static size_t edit_distance(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    if (la > 40 || lb > 40)
        return 99;
    size_t d[41][41];
    for (size_t i = 0; i <= la; i++)
        d[i][0] = i;
    for (size_t j = 0; j <= lb; j++)
        d[0][j] = j;
    for (size_t i = 1; i <= la; i++)
        for (size_t j = 1; j <= lb; j++) {
            size_t best = d[i - 1][j] + 1;
            if (d[i][j - 1] + 1 < best)
                best = d[i][j - 1] + 1;
            const size_t sub = d[i - 1][j - 1] + (tolower((unsigned char)a[i - 1]) != b[j - 1]);
            if (sub < best)
                best = sub;
            d[i][j] = best;
        }
    return d[la][lb];
}

static const char *nearest_row(const char *key)
{
    const char *best = known_rows[0];
    size_t bd = 99;
    for (size_t i = 0; i < sizeof known_rows / sizeof known_rows[0]; i++) {
        const size_t d = edit_distance(key, known_rows[i]);
        if (d < bd) {
            bd = d;
            best = known_rows[i];
        }
    }
    return best;
}

static enum sg_status want_fields(const struct reader *rd, const struct row *r, size_t lo, size_t hi,
                                  const char *shape)
{
    if (r->nf < lo || r->nf > hi) {
        const unsigned col = r->nf > hi ? r->f[hi].col : r->f[r->nf - 1].col;
        return sg_error_set(rd->err, SG_EPARSE, r->line, col,
                            "'%s' row has %zu fields, expected %s (write it as '%s'; quote a text that contains "
                            "the separator)",
                            r->f[0].text, r->nf, lo == hi ? (lo == 2 ? "2" : "3") : "2 or 3", shape);
    }
    return SG_OK;
}

static enum sg_status read_number(const struct reader *rd, struct row *r, size_t i, double lo, double hi,
                                  const char *unit, double *out)
{
    const struct field *f = &r->f[i];
    char tmp[64];
    const size_t n = strlen(f->text);
    bool ok = n > 0 && n < sizeof tmp;
    size_t commas = 0;
    for (size_t j = 0; ok && j < n; j++) {
        const char c = f->text[j];
        if (c == ',' && rd->rs.delim == ';') {
            commas++;
            tmp[j] = '.';
        } else if (isdigit((unsigned char)c) || c == '.' || c == '+' || c == '-' || c == 'e' || c == 'E') {
            tmp[j] = c;
        } else {
            ok = false;
        }
    }
    double v = 0.0;
    if (ok && commas <= 1) {
        tmp[n] = '\0';
        char *end = NULL;
        errno = 0;
        v = strtod(tmp, &end);
        ok = end == tmp + n && errno != ERANGE && isfinite(v);
    } else {
        ok = false;
    }
    if (!ok)
        return sg_error_set(rd->err, SG_EPARSE, r->line, f->col, "'%.40s' is not a number (write it as e.g. 12.5)",
                            f->text);
    if (v < lo || v > hi)
        return sg_error_set(rd->err, SG_EINVAL, r->line, f->col,
                            "%s %g %s is outside %g to %g %s (check the value and its unit)", r->f[0].text, v, unit,
                            lo, hi, unit);
    r->numeric |= 1u << i;
    *out = v;
    return SG_OK;
}

static enum sg_status read_text(const struct reader *rd, const struct row *r, size_t i, char *dst, size_t size)
{
    const struct field *f = &r->f[i];
    const size_t n = strlen(f->text);
    if (n == 0)
        return sg_error_set(rd->err, SG_EINVAL, r->line, f->col, "'%s' is empty (give a value or drop the row)",
                            r->f[0].text);
    if (n >= size)
        return sg_error_set(rd->err, SG_ELIMIT, r->line, f->col, "'%s' text of %zu characters is longer than %zu",
                            r->f[0].text, n, size - 1);
    memcpy(dst, f->text, n + 1);
    return SG_OK;
}

static enum sg_status read_date(const struct reader *rd, const struct row *r, size_t i, struct sg_date *out)
{
    struct sg_error e;
    if (sg_date_parse(r->f[i].text, out, &e) != SG_OK)
        return sg_error_set(rd->err, SG_EPARSE, r->line, r->f[i].col, "%s", e.msg);
    return SG_OK;
}

static bool valid_id(const char *id)
{
    const size_t n = strlen(id);
    if (n == 0 || n >= SG_NAME_MAX || id[0] == '.')
        return false;
    for (size_t i = 0; i < n; i++)
        if (!isalnum((unsigned char)id[i]) && id[i] != '.' && id[i] != '_' && id[i] != '-')
            return false;
    return true;
}

/* Once-only text rows: refuse a second one. */
static enum sg_status once_text(const struct reader *rd, const struct row *r, char *dst, size_t size)
{
    if (dst[0] != '\0')
        return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'%s' is given twice (keep one)", r->f[0].text);
    enum sg_status st = want_fields(rd, r, 2, 2, "key,text");
    return st != SG_OK ? st : read_text(rd, r, 1, dst, size);
}

/* ---- identity rows -------------------------------------------------------------------- */

static enum sg_status identity_row(struct reader *rd, struct row *r)
{
    struct sg_cal_instrument *ins = rd->ins;
    const char *key = r->f[0].text;
    enum sg_status st;
    if (strcmp(key, "instrument") == 0) {
        if (ins->id[0] != '\0')
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "a second 'instrument' row (one instrument per file)");
        if ((st = want_fields(rd, r, 2, 2, "instrument,<ID>")) != SG_OK)
            return st;
        if (!valid_id(r->f[1].text))
            return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[1].col,
                                "instrument ID '%.64s' must be 1-63 characters of A-Z a-z 0-9 . _ - and not start "
                                "with '.'",
                                r->f[1].text);
        ins->line = r->line;
        return read_text(rd, r, 1, ins->id, sizeof ins->id);
    }
    if (rd->mode == SG_CALIBIO_REGISTER && ins->id[0] == '\0')
        return sg_error_set(rd->err, SG_EINVAL, r->line, 1,
                            "the first row of a register file must be 'instrument,<ID>', found '%.40s'", key);
    if (strcmp(key, "kind") == 0) {
        if (ins->kind != SG_CAL_KIND_NONE)
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'kind' is given twice (keep one)");
        if ((st = want_fields(rd, r, 2, 2, "kind,hydrometer|cylinder|thermometer|pipette")) != SG_OK)
            return st;
        if (!sg_cal_kind_parse(r->f[1].text, &ins->kind))
            return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[1].col,
                                "unknown kind '%.40s' (use hydrometer, cylinder, thermometer or pipette)",
                                r->f[1].text);
        ins->pos_kind.line = r->line;
        ins->pos_kind.col = r->f[1].col;
        return SG_OK;
    }
    if (strcmp(key, "maker") == 0)
        return once_text(rd, r, ins->maker, sizeof ins->maker);
    if (strcmp(key, "model") == 0)
        return once_text(rd, r, ins->model, sizeof ins->model);
    if (strcmp(key, "serial") == 0)
        return once_text(rd, r, ins->serial, sizeof ins->serial);
    if (strcmp(key, "location") == 0)
        return once_text(rd, r, ins->location, sizeof ins->location);
    if (strcmp(key, "note") == 0)
        return once_text(rd, r, ins->note, sizeof ins->note);
    if (strcmp(key, "scale") == 0) {
        if (ins->scale != SG_SCALE_NONE)
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'scale' is given twice (keep one)");
        if ((st = want_fields(rd, r, 2, 2, "scale,g_per_l|density")) != SG_OK)
            return st;
        if (strcmp(r->f[1].text, "g_per_l") == 0)
            ins->scale = SG_SCALE_G_PER_L;
        else if (strcmp(r->f[1].text, "density") == 0)
            ins->scale = SG_SCALE_DENSITY;
        else
            return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[1].col,
                                "unknown scale '%.40s' (use g_per_l or density)", r->f[1].text);
        return SG_OK;
    }
    if (strcmp(key, "range") == 0) {
        if (ins->has_range)
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'range' is given twice (keep one)");
        if ((st = want_fields(rd, r, 3, 3, "range,<min>,<max>")) != SG_OK ||
            (st = read_number(rd, r, 1, -1e6, 1e6, "", &ins->range_min)) != SG_OK ||
            (st = read_number(rd, r, 2, -1e6, 1e6, "", &ins->range_max)) != SG_OK)
            return st;
        if (!(ins->range_min < ins->range_max))
            return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[2].col,
                                "range %g to %g is empty (give the lowest value first)", ins->range_min,
                                ins->range_max);
        ins->has_range = true;
        return SG_OK;
    }
    if (strcmp(key, "division") == 0) {
        if (ins->has_division)
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'division' is given twice (keep one)");
        if ((st = want_fields(rd, r, 2, 2, "division,<value>")) != SG_OK ||
            (st = read_number(rd, r, 1, 1e-9, 1e6, "", &ins->division)) != SG_OK)
            return st;
        ins->has_division = true;
        return SG_OK;
    }
    if (strcmp(key, "nominal_ml") == 0) {
        if (ins->has_nominal)
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'nominal_ml' is given twice (keep one)");
        if ((st = want_fields(rd, r, 2, 2, "nominal_ml,<mL>")) != SG_OK ||
            (st = read_number(rd, r, 1, 1e-6, 1e6, "mL", &ins->nominal_ml)) != SG_OK)
            return st;
        ins->has_nominal = true;
        return SG_OK;
    }
    return SG_ENOTFOUND;
}

/* ---- event rows ------------------------------------------------------------------------- */

struct obs_def {
    const char *shape;
    size_t lo, hi;      /* field counts */
    double xlo, xhi;    /* range of the first value */
    double ylo, yhi;    /* range of the second value */
    const char *xunit, *yunit;
};

/* Plausibility ranges: wide, to catch unit mistakes only (mm vs cm, g vs kg). */
static const struct obs_def obs_defs[SG_CAL_OBS_COUNT] = {
    [SG_CAL_OBS_BULB_VOLUME] = {"bulb_volume_ml,<mL>", 2, 2, 1.0, 1000.0, 0, 0, "mL", ""},
    [SG_CAL_OBS_BULB_LENGTH] = {"bulb_length_mm,<mm>", 2, 2, 10.0, 1000.0, 0, 0, "mm", ""},
    [SG_CAL_OBS_NECK] = {"neck_mm,<reading>,<distance mm>", 3, 3, -1000.0, 2000.0, 0.0, 1000.0, "", "mm"},
    [SG_CAL_OBS_MENISCUS] = {"meniscus,<top>,<bottom>", 3, 3, -1000.0, 2000.0, -1000.0, 2000.0, "", ""},
    [SG_CAL_OBS_BLANK] = {"blank,<temp C>,<reading>", 3, 3, 0.0, 40.0, -1000.0, 2000.0, "C", ""},
    [SG_CAL_OBS_SCALE_REF] = {"scale_ref,<reference>,<reading>", 3, 3, -1000.0, 2000.0, -1000.0, 2000.0, "", ""},
    [SG_CAL_OBS_SCALE_LIQUID] = {"scale_liquid,<density g/mL>,<reading>", 3, 3, 0.5, 2.0, -1000.0, 2000.0, "g/mL",
                                 ""},
    [SG_CAL_OBS_GRADUATION] = {"graduation,<mL>,<height mm>", 3, 3, 0.0, 1e5, -1e4, 1e4, "mL", "mm"},
    [SG_CAL_OBS_DELIVERY] = {"delivery,<net g> or delivery,<empty g>,<filled g>", 2, 3, 0.0, 1e5, 0.0, 1e5, "g",
                             "g"},
    [SG_CAL_OBS_ICE_POINT] = {"ice_point,<reading C>", 2, 2, -5.0, 5.0, 0, 0, "C", ""},
    [SG_CAL_OBS_COMPARISON] = {"comparison,<reference C>,<reading C>", 3, 3, -50.0, 150.0, -50.0, 150.0, "C",
                               "C"},
};

static enum sg_status obs_row(struct reader *rd, struct row *r, enum sg_cal_obs_kind kind)
{
    const struct obs_def *d = &obs_defs[kind];
    enum sg_status st = want_fields(rd, r, d->lo, d->hi, d->shape);
    if (st != SG_OK)
        return st;
    struct sg_cal_obs o = {.kind = kind, .x = 0.0, .y = 0.0, .pos = {r->line, 1}};
    if (kind == SG_CAL_OBS_ICE_POINT) {
        o.x = 0.0; /* the ice point is 0 C by definition (METHODS.md 10.5) */
        st = read_number(rd, r, 1, d->xlo, d->xhi, d->xunit, &o.y);
    } else if (kind == SG_CAL_OBS_DELIVERY) {
        st = read_number(rd, r, 1, d->xlo, d->xhi, d->xunit, &o.x);
        if (st == SG_OK && r->nf == 3) {
            double filled = 0.0;
            if ((st = read_number(rd, r, 2, d->ylo, d->yhi, d->yunit, &filled)) != SG_OK)
                return st;
            o.x = filled - o.x;
        }
        if (st == SG_OK && !(o.x > 0.0))
            return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[r->nf - 1].col,
                                "delivered mass %g g must be positive (net, or empty then filled)", o.x);
    } else {
        st = read_number(rd, r, 1, d->xlo, d->xhi, d->xunit, &o.x);
        if (st == SG_OK && d->lo == 3)
            st = read_number(rd, r, 2, d->ylo, d->yhi, d->yunit, &o.y);
    }
    if (st != SG_OK)
        return st;
    if ((kind == SG_CAL_OBS_BULB_VOLUME || kind == SG_CAL_OBS_BULB_LENGTH) && !(o.x > 0.0))
        return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[1].col, "%s %g must be positive", r->f[0].text, o.x);
    size_t count = 0;
    for (size_t i = 0; i < rd->ev.n_obs; i++)
        if (sg_cal_obs_part(rd->ev.obs[i].kind) == sg_cal_obs_part(kind))
            count++;
    if (count >= SG_CAL_OBS_MAX)
        return sg_error_set(rd->err, SG_ELIMIT, r->line, 1,
                            "more than %d %s observations in one event (split them over two events)",
                            SG_CAL_OBS_MAX, sg_cal_part_name(sg_cal_obs_part(kind)));
    return sg_cal_event_add_obs(&rd->ev, o, rd->err);
}

static enum sg_status once_number(struct reader *rd, struct row *r, double *dst, double lo, double hi,
                                  const char *unit)
{
    if (!isnan(*dst))
        return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'%s' is given twice in one event (keep one)",
                            r->f[0].text);
    enum sg_status st = want_fields(rd, r, 2, 2, "key,<value>");
    return st != SG_OK ? st : read_number(rd, r, 1, lo, hi, unit, dst);
}

static enum sg_status event_row(struct reader *rd, struct row *r)
{
    struct sg_cal_event *ev = &rd->ev;
    const char *key = r->f[0].text;
    enum sg_status st;
    if (strcmp(key, "by") == 0)
        return once_text(rd, r, ev->by, sizeof ev->by);
    if (strcmp(key, "reviewed_by") == 0)
        return once_text(rd, r, ev->reviewed_by, sizeof ev->reviewed_by);
    if (strcmp(key, "method") == 0)
        return once_text(rd, r, ev->method, sizeof ev->method);
    if (strcmp(key, "dispersant") == 0)
        return once_text(rd, r, ev->dispersant, sizeof ev->dispersant);
    if (strcmp(key, "location") == 0)
        return once_text(rd, r, ev->location, sizeof ev->location);
    if (strcmp(key, "cylinder") == 0 || strcmp(key, "thermometer") == 0) {
        char *dst = key[0] == 'c' ? ev->cylinder : ev->thermometer;
        const size_t size = key[0] == 'c' ? sizeof ev->cylinder : sizeof ev->thermometer;
        if ((st = once_text(rd, r, dst, size)) != SG_OK)
            return st;
        if (!valid_id(dst))
            return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[1].col,
                                "'%s' is not an instrument ID (1-63 characters of A-Z a-z 0-9 . _ -)", dst);
        struct sg_srcpos *pos = key[0] == 'c' ? &ev->pos_cylinder : &ev->pos_thermometer;
        pos->line = r->line;
        pos->col = r->f[1].col;
        return SG_OK;
    }
    if (strcmp(key, "reference") == 0 || strcmp(key, "note") == 0) {
        const bool ref = key[0] == 'r';
        size_t *n = ref ? &ev->n_refs : &ev->n_notes;
        if (*n >= (ref ? SG_CAL_REFS_MAX : SG_CAL_NOTES_MAX))
            return sg_error_set(rd->err, SG_ELIMIT, r->line, 1, "more than %d '%s' rows in one event",
                                ref ? SG_CAL_REFS_MAX : SG_CAL_NOTES_MAX, key);
        if ((st = want_fields(rd, r, 2, 2, "key,text")) != SG_OK ||
            (st = read_text(rd, r, 1, ref ? ev->refs[*n] : ev->notes[*n], SG_CAL_TEXT_MAX)) != SG_OK)
            return st;
        (*n)++;
        return SG_OK;
    }
    if (strcmp(key, "due") == 0) {
        if (ev->has_due)
            return sg_error_set(rd->err, SG_EINVAL, r->line, 1, "'due' is given twice in one event (keep one)");
        if ((st = want_fields(rd, r, 2, 2, "due,YYYY-MM-DD")) != SG_OK || (st = read_date(rd, r, 1, &ev->due)) != SG_OK)
            return st;
        ev->has_due = true;
        ev->pos_due.line = r->line;
        ev->pos_due.col = r->f[1].col;
        return SG_OK;
    }
    if (strcmp(key, "limit") == 0) {
        if (ev->n_limits >= SG_CAL_LIMITS_MAX)
            return sg_error_set(rd->err, SG_ELIMIT, r->line, 1, "more than %d limits in one event", SG_CAL_LIMITS_MAX);
        struct sg_cal_limit *l = &ev->limits[ev->n_limits];
        memset(l, 0, sizeof *l);
        if ((st = want_fields(rd, r, 3, 3, "limit,<name>,<value>")) != SG_OK ||
            (st = read_text(rd, r, 1, l->name, sizeof l->name)) != SG_OK ||
            (st = read_number(rd, r, 2, 0.0, 1e6, "", &l->value)) != SG_OK)
            return st;
        l->pos.line = r->line;
        l->pos.col = r->f[1].col;
        ev->n_limits++;
        return SG_OK;
    }
    if (strcmp(key, "water_temp_c") == 0) {
        ev->pos_water_temp.line = r->line;
        ev->pos_water_temp.col = 1;
        return once_number(rd, r, &ev->water_temp_c, 0.0, 40.0, "C");
    }
    if (strcmp(key, "air_density_g_ml") == 0)
        return once_number(rd, r, &ev->air_density_g_ml, 0.0, 0.01, "g/mL");
    if (strcmp(key, "weights_density_g_ml") == 0)
        return once_number(rd, r, &ev->weights_density_g_ml, 1.0, 25.0, "g/mL");
    if (strcmp(key, "expansion_per_k") == 0)
        return once_number(rd, r, &ev->expansion_per_k, 0.0, 1e-3, "/K");
    enum sg_cal_obs_kind kind;
    if (sg_cal_obs_parse(key, &kind))
        return obs_row(rd, r, kind);
    return SG_ENOTFOUND;
}

static enum sg_status finish_event(struct reader *rd)
{
    if (!rd->in_event)
        return SG_OK;
    rd->in_event = false;
    return sg_cal_instrument_add_event(rd->ins, &rd->ev, rd->err);
}

static enum sg_status start_event(struct reader *rd, struct row *r)
{
    enum sg_status st = finish_event(rd);
    if (st != SG_OK)
        return st;
    if (rd->mode == SG_CALIBIO_REGISTER && rd->ins->id[0] == '\0')
        return sg_error_set(rd->err, SG_EINVAL, r->line, 1,
                            "the first row of a register file must be 'instrument,<ID>', found 'event'");
    sg_cal_event_init(&rd->ev);
    rd->in_event = true;
    rd->ev.line = r->line;
    if ((st = want_fields(rd, r, 3, 3, "event,YYYY-MM-DD,<type>")) != SG_OK ||
        (st = read_date(rd, r, 1, &rd->ev.date)) != SG_OK)
        return st;
    if (!sg_cal_event_type_parse(r->f[2].text, &rd->ev.type))
        return sg_error_set(rd->err, SG_EINVAL, r->line, r->f[2].col,
                            "unknown event type '%.40s' (use calibration, verification, adjustment, repair, "
                            "out_of_service, retirement or relocation)",
                            r->f[2].text);
    return SG_OK;
}

static bool key_in(const char *key, const char *const *list, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (strcmp(key, list[i]) == 0)
            return true;
    return false;
}

/* Rows that only describe the instrument (location and note also occur in events). */
static bool is_identity_key(const char *key)
{
    static const char *const keys[] = {"instrument", "kind",     "maker",     "model",
                                       "serial",     "scale",    "range",     "division", "nominal_ml"};
    return key_in(key, keys, sizeof keys / sizeof keys[0]);
}

/* Rows that only occur inside an event. */
static bool is_event_key(const char *key)
{
    static const char *const keys[] = {"by",        "reviewed_by", "method",       "reference",
                                       "cylinder",  "thermometer", "dispersant",   "due",
                                       "limit",     "water_temp_c", "air_density_g_ml", "weights_density_g_ml",
                                       "expansion_per_k"};
    enum sg_cal_obs_kind k;
    return key_in(key, keys, sizeof keys / sizeof keys[0]) || sg_cal_obs_parse(key, &k);
}

static enum sg_status interpret(struct reader *rd)
{
    for (size_t i = 0; i < rd->rs.n; i++) {
        struct row *r = &rd->rs.v[i];
        if (r->comment)
            continue;
        const char *key = r->nf > 0 ? r->f[0].text : "";
        enum sg_status st;
        if (strcmp(key, "event") == 0) {
            st = start_event(rd, r);
        } else if (rd->in_event) {
            if (is_identity_key(key))
                st = sg_error_set(rd->err, SG_EINVAL, r->line, 1,
                                  "identity row '%s' after an event (identity rows come before the first event; to "
                                  "record a move, add a relocation event)",
                                  key);
            else
                st = event_row(rd, r);
        } else if (rd->mode == SG_CALIBIO_EVENTS) {
            st = sg_error_set(rd->err, SG_EINVAL, r->line, 1,
                              "an event file starts with 'event,YYYY-MM-DD,<type>', found '%.40s' (identity rows "
                              "belong to the register file)",
                              key);
        } else if (is_event_key(key)) {
            st = sg_error_set(rd->err, SG_EINVAL, r->line, 1,
                              "'%s' belongs to an event: it must follow an 'event,YYYY-MM-DD,<type>' row", key);
        } else {
            st = identity_row(rd, r);
        }
        if (st == SG_ENOTFOUND)
            st = sg_error_set(rd->err, SG_EPARSE, r->line, 1, "unknown row '%.40s' (did you mean '%s'?)", key,
                              nearest_row(key));
        if (st != SG_OK)
            return st;
    }
    return finish_event(rd);
}

/* Infers a standalone file's kind from its first observation. */
static void infer_kind(struct sg_cal_instrument *ins)
{
    if (ins->kind != SG_CAL_KIND_NONE)
        return;
    for (size_t i = 0; i < ins->n_events; i++)
        if (ins->events[i].n_obs > 0) {
            ins->kind = sg_cal_part_kind(sg_cal_obs_part(ins->events[i].obs[0].kind));
            return;
        }
}

/* Parses text into ins; keeps the rows in rs when rs is not NULL. */
static enum sg_status parse_rows(const char *text, size_t len, enum sg_calibio_mode mode,
                                 struct sg_cal_instrument *ins, struct rowset *keep_rows, struct sg_error *err)
{
    sg_cal_instrument_init(ins);
    sg_error_clear(err);
    struct reader rd;
    memset(&rd, 0, sizeof rd);
    rd.mode = mode;
    rd.ins = ins;
    rd.err = err;
    sg_cal_event_init(&rd.ev);
    enum sg_status st = split_rows(text, len, &rd.rs, err);
    if (st == SG_OK)
        st = interpret(&rd);
    if (rd.in_event)
        sg_cal_event_release(&rd.ev);
    if (st == SG_OK) {
        switch (mode) {
        case SG_CALIBIO_EVENTS:
            if (ins->n_events == 0)
                st = sg_error_set(err, SG_EINVAL, 1, 1, "no 'event,YYYY-MM-DD,<type>' row in the event file");
            break;
        case SG_CALIBIO_STANDALONE:
            if (ins->id[0] == '\0')
                (void)snprintf(ins->id, sizeof ins->id, "standalone");
            infer_kind(ins);
            st = sg_cal_validate_history(ins, err);
            break;
        case SG_CALIBIO_REGISTER:
            st = sg_cal_validate(ins, err);
            break;
        }
    }
    if (st == SG_OK && keep_rows != NULL)
        *keep_rows = rd.rs;
    else
        rowset_release(&rd.rs);
    return st;
}

enum sg_status sg_calibio_parse(const char *text, size_t len, enum sg_calibio_mode mode,
                                struct sg_cal_instrument *ins, struct sg_error *err)
{
    const enum sg_status st = parse_rows(text, len, mode, ins, NULL, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

/* ---- files --------------------------------------------------------------------------- */

/* Reads a whole file (at most SG_CALIBIO_FILE_MAX bytes) into *out (NUL-terminated). */
static enum sg_status slurp_fd(int fd, const char *path, char **out, size_t *len, struct sg_error *err)
{
    struct buf b = {0};
    char chunk[8192];
    for (;;) {
        const ssize_t n = read(fd, chunk, sizeof chunk);
        if (n < 0) {
            if (errno == EINTR)
                continue;
            free(b.p);
            return sg_error_set(err, SG_EIO, 0, 0, "cannot read '%s': %s", path, strerror(errno));
        }
        if (n == 0)
            break;
        if (b.n + (size_t)n > SG_CALIBIO_FILE_MAX) {
            free(b.p);
            return sg_error_set(err, SG_ELIMIT, 0, 0, "'%s' is larger than the %u-byte limit of a register file",
                                path, SG_CALIBIO_FILE_MAX);
        }
        if (!buf_add(&b, chunk, (size_t)n)) {
            free(b.p);
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reading '%s'", path);
        }
    }
    if (b.p == NULL && !buf_add(&b, "", 0))
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reading '%s'", path);
    *out = b.p;
    *len = b.n;
    return SG_OK;
}

static enum sg_status slurp(const char *path, char **out, size_t *len, struct sg_error *err)
{
    const int fd = open(path, O_RDONLY);
    if (fd < 0) {
        const int e = errno;
        return sg_error_set(err, e == ENOENT ? SG_ENOTFOUND : SG_EIO, 0, 0, "cannot open '%s': %s", path,
                            strerror(e));
    }
    const enum sg_status st = slurp_fd(fd, path, out, len, err);
    (void)close(fd);
    return st;
}

static enum sg_status read_input(const char *path, char **text, size_t *len, struct sg_error *err)
{
    *text = NULL;
    *len = 0;
    const int fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0) {
        const int e = errno;
        return sg_error_set(err, SG_EIO, 0, 0, "cannot open '%s': %s (check the path and its permissions)", path,
                            strerror(e));
    }
    struct stat sb;
    enum sg_status st = SG_OK;
    if (fstat(fd, &sb) == 0 && S_ISDIR(sb.st_mode))
        st = sg_error_set(err, SG_EIO, 0, 0, "cannot read '%s': it is a folder (give a file of register rows)",
                          path);
    else
        st = slurp_fd(fd, path, text, len, err);
    (void)close(fd);
    return st;
}

enum sg_status sg_calibio_read_input(const char *path, char **text, size_t *len, struct sg_error *err)
{
    const enum sg_status st = read_input(path, text, len, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

static enum sg_status read_register_file(const char *path, enum sg_calibio_mode mode,
                                         struct sg_cal_instrument *ins, struct sg_error *err)
{
    char *text = NULL;
    size_t len = 0;
    sg_cal_instrument_init(ins);
    enum sg_status st = slurp(path, &text, &len, err);
    if (st != SG_OK)
        return st;
    st = sg_calibio_parse(text, len, mode, ins, err);
    free(text);
    return st;
}

enum sg_status sg_calibio_read_file(const char *path, enum sg_calibio_mode mode, struct sg_cal_instrument *ins,
                                    struct sg_error *err)
{
    const enum sg_status st = read_register_file(path, mode, ins, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

bool sg_calibio_path(const char *register_dir, const char *id, char *buf, size_t size)
{
    if (!valid_id(id))
        return false;
    const int n = snprintf(buf, size, "%s/%s.csv", register_dir, id);
    return n > 0 && (size_t)n < size;
}

/* ---- the register folder ------------------------------------------------------------- */

/* What a register path names: a folder, nothing, something else (a file), or
 * a path that cannot be looked at (errnum says why). */
enum dir_kind { DIR_FOLDER = 1, DIR_MISSING = -1, DIR_NOT_FOLDER = -2, DIR_UNREADABLE = -3 };

static enum dir_kind dir_kind(const char *dir, int *errnum)
{
    struct stat sb;
    *errnum = 0;
    if (dir == NULL || dir[0] == '\0')
        return DIR_MISSING;
    if (stat(dir, &sb) == 0)
        return S_ISDIR(sb.st_mode) ? DIR_FOLDER : DIR_NOT_FOLDER;
    *errnum = errno;
    /* ENOTDIR: a component of the path is a file, so the folder cannot exist */
    return *errnum == ENOENT || *errnum == ENOTDIR ? DIR_MISSING : DIR_UNREADABLE;
}

/* The message for a register path that is not a usable folder: SG_ENOTFOUND
 * (missing), SG_EINVAL (a file: a usage mistake, not a missing folder),
 * SG_EIO (cannot be looked at). why (may be "") goes after the problem and
 * what_to_do inside the closing parentheses. */
static enum sg_status dir_problem(const char *dir, enum dir_kind kind, int errnum, unsigned line, unsigned col,
                                  const char *why, const char *what_to_do, struct sg_error *err)
{
    if (dir == NULL)
        dir = "";
    switch (kind) {
    case DIR_NOT_FOLDER:
        return sg_error_set(err, SG_EINVAL, line, col,
                            "the calibration register '%s' is a file, not a folder%s (give --calibration DIR, the "
                            "folder that holds the instrument files <ID>.csv%s)",
                            dir, why, what_to_do);
    case DIR_UNREADABLE:
        return sg_error_set(err, SG_EIO, line, col,
                            "cannot open the calibration register folder '%s': %s%s (check the path and its "
                            "permissions%s)",
                            dir, strerror(errnum), why, what_to_do);
    case DIR_MISSING:
    case DIR_FOLDER: break;
    }
    return sg_error_set(err, SG_ENOTFOUND, line, col,
                        "the calibration register folder '%s' does not exist%s (give --calibration DIR, the folder "
                        "that holds the instrument files <ID>.csv%s)",
                        dir, why, what_to_do);
}

/* SG_OK when register_dir is a folder, else dir_problem's message. */
static enum sg_status check_register_dir(const char *register_dir, struct sg_error *err)
{
    int errnum;
    const enum dir_kind k = dir_kind(register_dir, &errnum);
    return k == DIR_FOLDER ? SG_OK : dir_problem(register_dir, k, errnum, 0, 0, "", "", err);
}

/* Checks the file's instrument row names the ID its file name gives. */
static enum sg_status check_id(const struct sg_cal_instrument *ins, const char *id, const char *path,
                               struct sg_error *err)
{
    if (strcmp(ins->id, id) != 0)
        return sg_error_set(err, SG_EINVAL, ins->line, 1,
                            "'%s' describes instrument '%s', but its file name says '%s' (name the file "
                            "<ID>.csv)",
                            path, ins->id, id);
    return SG_OK;
}

static enum sg_status load_instrument(const char *register_dir, const char *id, struct sg_cal_instrument *ins,
                                      struct sg_error *err)
{
    char path[4096];
    sg_cal_instrument_init(ins);
    if (!sg_calibio_path(register_dir, id, path, sizeof path))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "'%.64s' is not an instrument ID (1-63 characters of A-Z a-z 0-9 . _ -)", id);
    enum sg_status st = sg_calibio_read_file(path, SG_CALIBIO_REGISTER, ins, err);
    /* The file could not be opened: say so of the folder when the folder is at fault
     * (looked at only then, so a load that works costs no extra call). */
    if (st == SG_ENOTFOUND || st == SG_EIO) {
        const enum sg_status dst = check_register_dir(register_dir, err);
        if (dst != SG_OK)
            return dst;
    }
    if (st == SG_ENOTFOUND)
        return sg_error_set(err, SG_ENOTFOUND, 0, 0,
                            "instrument '%s' is not in the calibration register '%s' (no file %s; check the ID, "
                            "or add the instrument's file)",
                            id, register_dir, path);
    if (st == SG_OK)
        st = check_id(ins, id, path, err);
    return st;
}

enum sg_status sg_calibio_load(const char *register_dir, const char *id, struct sg_cal_instrument *ins,
                               struct sg_error *err)
{
    const enum sg_status st = load_instrument(register_dir, id, ins, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

void sg_cal_register_init(struct sg_cal_register *reg)
{
    memset(reg, 0, sizeof *reg);
}

void sg_cal_register_release(struct sg_cal_register *reg)
{
    if (reg == NULL)
        return;
    for (size_t i = 0; i < reg->n; i++)
        sg_cal_instrument_release(&reg->items[i]);
    free(reg->items);
    sg_cal_register_init(reg);
}

static int cmp_str(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

static enum sg_status load_folder(const char *register_dir, struct sg_cal_register *reg, struct sg_diag_list *diags,
                                  struct sg_error *err)
{
    sg_cal_register_init(reg);
    DIR *dir = opendir(register_dir);
    if (dir == NULL) {
        const int e = errno;
        int errnum;
        enum dir_kind k = dir_kind(register_dir, &errnum);
        if (k == DIR_FOLDER) { /* a folder that cannot be listed */
            k = DIR_UNREADABLE;
            errnum = e;
        }
        return dir_problem(register_dir, k, errnum, 0, 0, "", "", err);
    }
    char **names = NULL;
    size_t n = 0, cap = 0;
    enum sg_status st = SG_OK, first = SG_OK;
    const struct dirent *de;
    while (st == SG_OK && (de = readdir(dir)) != NULL) {
        const size_t len = strlen(de->d_name);
        if (de->d_name[0] == '.' || len < 5 || strcmp(de->d_name + len - 4, ".csv") != 0)
            continue;
        if (n == cap) {
            cap = cap ? 2 * cap : 32;
            char **p = realloc(names, cap * sizeof *p);
            if (p == NULL) {
                st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory listing '%s'", register_dir);
                break;
            }
            names = p;
        }
        names[n] = malloc(len + 1);
        if (names[n] == NULL) {
            st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory listing '%s'", register_dir);
            break;
        }
        memcpy(names[n], de->d_name, len + 1);
        n++;
    }
    (void)closedir(dir);
    if (st == SG_OK && n > 0) {
        qsort(names, n, sizeof *names, cmp_str);
        reg->items = calloc(n, sizeof *reg->items);
        if (reg->items == NULL)
            st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory loading '%s'", register_dir);
    }
    for (size_t i = 0; st == SG_OK && i < n; i++) {
        char id[SG_NAME_MAX];
        const size_t len = strlen(names[i]) - 4;
        char path[4096];
        (void)snprintf(path, sizeof path, "%s/%s", register_dir, names[i]);
        struct sg_error e;
        sg_error_clear(&e);
        struct sg_cal_instrument *ins = &reg->items[reg->n];
        enum sg_status fst;
        if (len >= sizeof id) {
            sg_cal_instrument_init(ins);
            fst = sg_error_set(&e, SG_EINVAL, 0, 0, "file name is too long for an instrument ID");
        } else {
            memcpy(id, names[i], len);
            id[len] = '\0';
            fst = sg_calibio_read_file(path, SG_CALIBIO_REGISTER, ins, &e);
            if (fst == SG_OK)
                fst = check_id(ins, id, path, &e);
        }
        if (fst == SG_OK) {
            reg->n++;
            continue;
        }
        sg_cal_instrument_release(ins);
        struct sg_error d;
        sg_error_clear(&d);
        if (e.line > 0)
            (void)sg_error_set(&d, fst, 0, 0, "%s:%u:%u: %.300s", path, e.line, e.col ? e.col : 1, e.msg);
        else
            (void)sg_error_set(&d, fst, 0, 0, "%s: %.300s", path, e.msg);
        if (fst == SG_ENOMEM) {
            st = fst;
            if (err != NULL)
                *err = d;
            break;
        }
        escape_message(&d);
        (void)sg_diag_add(diags, &d);
        if (first == SG_OK) {
            first = fst;
            if (err != NULL)
                *err = d;
        }
    }
    for (size_t i = 0; i < n; i++)
        free(names[i]);
    free(names);
    return st != SG_OK ? st : first;
}

enum sg_status sg_calibio_load_register(const char *register_dir, struct sg_cal_register *reg,
                                        struct sg_diag_list *diags, struct sg_error *err)
{
    const enum sg_status st = load_folder(register_dir, reg, diags, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

/* ---- append ------------------------------------------------------------------------------ */

/* Writes one field, quoted when it must be, numbers with a decimal point. */
static bool put_field(struct buf *b, const char *text, bool numeric, char delim)
{
    const size_t n = strlen(text);
    bool quote = n > 0 && (text[0] == ' ' || text[0] == '\t' || text[n - 1] == ' ' || text[n - 1] == '\t');
    for (size_t i = 0; i < n; i++)
        if (text[i] == delim || text[i] == '"' || (!numeric && (text[i] == ',' || text[i] == ';')))
            quote = true;
    if (numeric) {
        for (size_t i = 0; i < n; i++) {
            const char c = text[i] == ',' ? '.' : text[i];
            if (!buf_add(b, &c, 1))
                return false;
        }
        return true;
    }
    if (!quote)
        return buf_add(b, text, n);
    if (!buf_add(b, "\"", 1))
        return false;
    for (size_t i = 0; i < n; i++) {
        if (text[i] == '"' && !buf_add(b, "\"", 1))
            return false;
        if (!buf_add(b, &text[i], 1))
            return false;
    }
    return buf_add(b, "\"", 1);
}

static bool serialize_rows(const struct rowset *rs, char delim, struct buf *b)
{
    for (size_t i = 0; i < rs->n; i++) {
        const struct row *r = &rs->v[i];
        if (r->comment) {
            if (!buf_str(b, r->raw) || !buf_add(b, "\n", 1))
                return false;
            continue;
        }
        for (size_t j = 0; j < r->nf; j++) {
            if (j > 0 && !buf_add(b, &delim, 1))
                return false;
            if (!put_field(b, r->f[j].text, j < 32 && (r->numeric & (1u << j)), delim))
                return false;
        }
        if (!buf_add(b, "\n", 1))
            return false;
    }
    return true;
}

/* Makes err's message name the file and drops the location (it is not in the event file). */
static enum sg_status relabel(struct sg_error *err, enum sg_status st, const char *path)
{
    if (err == NULL)
        return st;
    char msg[sizeof err->msg];
    (void)snprintf(msg, sizeof msg, "%s", err->msg);
    if (err->line > 0)
        (void)sg_error_set(err, st, 0, 0, "%s:%u:%u: %.300s", path, err->line, err->col ? err->col : 1, msg);
    else if (strstr(msg, path) == NULL)
        (void)sg_error_set(err, st, 0, 0, "%s: %.300s", path, msg);
    return st;
}

/* true when a and b are the same number or both not given (NaN). */
static bool same_value(double a, double b)
{
    return (isnan(a) && isnan(b)) || a == b; /* exact on purpose: both were read from text the same way */
}

/* true when event ev repeats the recorded event old: the same date and type,
 * the same observations (kinds and values, in the same order) with the same
 * gravimetric conditions, the same new location (relocation), and no note
 * that old lacks. A note of its own is how a genuine repeat is recorded. */
static bool repeats(const struct sg_cal_event *old, const struct sg_cal_event *ev)
{
    if (sg_date_days(old->date) != sg_date_days(ev->date) || old->type != ev->type || old->n_obs != ev->n_obs ||
        strcmp(old->location, ev->location) != 0 || !same_value(old->water_temp_c, ev->water_temp_c) ||
        !same_value(old->air_density_g_ml, ev->air_density_g_ml) ||
        !same_value(old->weights_density_g_ml, ev->weights_density_g_ml) ||
        !same_value(old->expansion_per_k, ev->expansion_per_k))
        return false;
    for (size_t i = 0; i < ev->n_obs; i++)
        if (old->obs[i].kind != ev->obs[i].kind || !same_value(old->obs[i].x, ev->obs[i].x) ||
            !same_value(old->obs[i].y, ev->obs[i].y))
            return false;
    for (size_t i = 0; i < ev->n_notes; i++) {
        bool found = false;
        for (size_t j = 0; j < old->n_notes && !found; j++)
            found = strcmp(old->notes[j], ev->notes[i]) == 0;
        if (!found)
            return false;
    }
    return true;
}

/* Refuses a new event (index first_new on) that repeats one recorded before
 * it (a command run twice would otherwise append the same event twice to
 * an append-only history). Located at the new event's row. */
static enum sg_status refuse_repeats(const struct sg_cal_instrument *ins, size_t first_new, const char *path,
                                     struct sg_error *err)
{
    for (size_t i = first_new; i < ins->n_events; i++) {
        const struct sg_cal_event *ev = &ins->events[i];
        for (size_t j = 0; j < i; j++) {
            if (!repeats(&ins->events[j], ev))
                continue;
            char date[11];
            sg_date_format(ev->date, date);
            return sg_error_set(err, SG_EINVAL, ev->line, 1,
                                "this %s of %s is already in the register (%.200s line %u: the same date, type "
                                "and observations), so it is not added again (history is append-only; to record "
                                "a genuine repeat, give the new event a note row saying why)",
                                sg_cal_event_type_name(ev->type), date, j < first_new ? path : "this file",
                                ins->events[j].line);
        }
    }
    return SG_OK;
}

static void sync_dir(const char *dir)
{
    const int fd = open(dir, O_RDONLY | O_DIRECTORY);
    if (fd >= 0) {
        (void)fsync(fd);
        (void)close(fd);
    }
}

/* Under the lock: merges, checks and writes. */
static enum sg_status append_locked(const char *register_dir, const char *id, const char *path,
                                    struct sg_cal_instrument *add, const struct rowset *rows,
                                    struct sg_error *err)
{
    char *old = NULL;
    size_t old_len = 0;
    struct sg_cal_instrument ins, check;
    sg_cal_instrument_init(&ins);
    sg_cal_instrument_init(&check);
    struct buf out = {0};
    struct sg_atomic_file af;
    memset(&af, 0, sizeof af);
    bool af_open = false;

    enum sg_status st = slurp(path, &old, &old_len, err);
    if (st == SG_ENOTFOUND) {
        st = sg_error_set(err, SG_ENOTFOUND, 0, 0,
                          "instrument '%s' has no register file %s (write its identity rows there first)", id, path);
        goto cleanup;
    }
    if (st != SG_OK)
        goto cleanup;
    /* the new file replaces the old one by a rename, which the folder's
     * permissions allow: a file the user may not write is refused here
     * instead of replaced (and its owner and mode with it) */
    if (access(path, W_OK) != 0) {
        const int e = errno;
        st = sg_error_set(err, SG_EIO, 0, 0,
                          "the register file %s is not writable for you: %s (ask whoever keeps the register, or "
                          "change its permissions)",
                          path, strerror(e));
        goto cleanup;
    }
    if ((st = sg_calibio_parse(old, old_len, SG_CALIBIO_REGISTER, &ins, err)) != SG_OK ||
        (st = check_id(&ins, id, path, err)) != SG_OK) {
        relabel(err, st, path);
        if (err != NULL) {
            char msg[sizeof err->msg];
            (void)snprintf(msg, sizeof msg, "%s", err->msg);
            (void)sg_error_set(err, st, 0, 0, "%.330s (the register file must be valid before anything is added)",
                               msg);
        }
        goto cleanup;
    }
    /* The new events, checked as part of the whole history. */
    const size_t first_new = ins.n_events;
    for (size_t i = 0; i < add->n_events; i++)
        if ((st = sg_cal_instrument_add_event(&ins, &add->events[i], err)) != SG_OK)
            goto cleanup;
    add->n_events = 0;
    if ((st = refuse_repeats(&ins, first_new, path, err)) != SG_OK || (st = sg_cal_validate(&ins, err)) != SG_OK)
        goto cleanup;
    /* the instruments a new event names (the cylinder of a depth
     * calibration, the thermometer of the observations) are register
     * instruments of that kind; and a new event has happened: it is not
     * dated after today (one mistyped year would otherwise block every
     * later event, since dates never decrease) */
    struct sg_date today = {0, 0, 0};
    {
        const time_t now = time(NULL);
        struct tm tm;
        if (now != (time_t)-1 && localtime_r(&now, &tm) != NULL)
            today = (struct sg_date){tm.tm_year + 1900, tm.tm_mon + 1, tm.tm_mday};
    }
    for (size_t i = first_new; i < ins.n_events; i++) {
        const struct sg_cal_event *ev = &ins.events[i];
        if (sg_date_is_set(today) && sg_date_days(ev->date) > sg_date_days(today) + 1) {
            char d[11], t[11];
            sg_date_format(ev->date, d);
            sg_date_format(today, t);
            st = sg_error_set(err, SG_EINVAL, ev->line, 1,
                              "event date %s is after today, %s: the register records what has happened (check "
                              "the date; an event in the future would block every later one)",
                              d, t);
            goto cleanup;
        }
        const struct {
            const char *id;
            struct sg_srcpos pos;
            enum sg_cal_kind kind;
            const char *what, *advice;
        } named[] = {
            {ev->cylinder, ev->pos_cylinder, SG_CAL_CYLINDER, "cylinder", "the cylinder the hydrometer was "
                                                                          "calibrated in"},
            {ev->thermometer, ev->pos_thermometer, SG_CAL_THERMOMETER, "thermometer", "the thermometer the "
                                                                                      "observations were read with"},
        };
        for (size_t j = 0; j < sizeof named / sizeof named[0]; j++) {
            if (named[j].id[0] == '\0')
                continue;
            struct sg_cal_instrument other;
            struct sg_error e;
            sg_error_clear(&e);
            const enum sg_status cst = sg_calibio_load(register_dir, named[j].id, &other, &e);
            const bool right_kind = cst == SG_OK && other.kind == named[j].kind;
            sg_cal_instrument_release(&other);
            if (cst != SG_OK && cst != SG_ENOTFOUND) {
                st = sg_error_set(err, SG_EINVAL, named[j].pos.line, named[j].pos.col, "%s '%s' cannot be read: %.300s",
                                  named[j].what, named[j].id, e.msg);
                goto cleanup;
            }
            if (!right_kind) {
                st = sg_error_set(err, SG_EINVAL, named[j].pos.line, named[j].pos.col,
                                  "'%s' is not a %s of the register '%s' (name %s, or add its file first)",
                                  named[j].id, named[j].what, register_dir, named[j].advice);
                goto cleanup;
            }
        }
    }
    /* Old bytes unchanged, then a blank line and the new rows. */
    char delim = ',';
    {
        struct rowset old_rows;
        struct sg_error e;
        if (split_rows(old, old_len, &old_rows, &e) == SG_OK && old_rows.delim != 0)
            delim = old_rows.delim;
        rowset_release(&old_rows);
    }
    if (!buf_add(&out, old, old_len) || (old_len > 0 && old[old_len - 1] != '\n' && !buf_add(&out, "\n", 1)) ||
        !buf_add(&out, "\n", 1) || !serialize_rows(rows, delim, &out)) {
        st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory adding to '%s'", path);
        goto cleanup;
    }
    /* What is written must read back as the history just checked. */
    if ((st = sg_calibio_parse(out.p, out.n, SG_CALIBIO_REGISTER, &check, err)) != SG_OK ||
        check.n_events != ins.n_events) {
        if (st == SG_OK)
            st = sg_error_set(err, SG_EINVAL, 0, 0, "the rows to add do not read back as %zu events",
                              ins.n_events - first_new);
        relabel(err, st, "(rows to be added)");
        goto cleanup;
    }
    if ((st = sg_atomic_open(&af, path, err)) != SG_OK)
        goto cleanup;
    af_open = true;
    af.durable = 1;
    {
        struct stat sb;
        if (stat(path, &sb) == 0)
            (void)fchmod(fileno(af.fp), sb.st_mode & 07777);
    }
    if (fwrite(out.p, 1, out.n, af.fp) != out.n) {
        st = sg_error_set(err, SG_EIO, 0, 0, "cannot write next to '%s': %s (nothing was changed)", path,
                          strerror(errno));
        goto cleanup;
    }
    st = sg_atomic_commit(&af, err);
    af_open = false;
    if (st == SG_OK)
        sync_dir(register_dir);
cleanup:
    if (af_open)
        sg_atomic_abort(&af);
    free(out.p);
    free(old);
    sg_cal_instrument_release(&ins);
    sg_cal_instrument_release(&check);
    return st;
}

static enum sg_status append_events(const char *register_dir, const char *id, const char *event_text, size_t len,
                                    struct sg_error *err)
{
    char path[4096], lock_path[4096];
    if (!sg_calibio_path(register_dir, id, path, sizeof path))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "'%.64s' is not an instrument ID (1-63 characters of A-Z a-z 0-9 . _ -)", id);
    const int n = snprintf(lock_path, sizeof lock_path, "%s/%s", register_dir, SG_CALIBIO_LOCK_NAME);
    if (n < 0 || (size_t)n >= sizeof lock_path)
        return sg_error_set(err, SG_EIO, 0, 0, "register path '%s' is too long", register_dir);
    enum sg_status st = check_register_dir(register_dir, err);
    if (st != SG_OK)
        return st;

    struct sg_cal_instrument add;
    struct rowset rows;
    memset(&rows, 0, sizeof rows);
    st = parse_rows(event_text, len, SG_CALIBIO_EVENTS, &add, &rows, err);
    if (st != SG_OK) {
        sg_cal_instrument_release(&add);
        return st;
    }
    const int fd = open(lock_path, O_RDWR | O_CREAT, 0644);
    if (fd < 0) {
        const int e = errno;
        st = sg_error_set(err, e == ENOENT ? SG_ENOTFOUND : SG_EIO, 0, 0,
                          "cannot open the register lock '%s': %s (check the register folder exists and is "
                          "writable)",
                          lock_path, strerror(e));
    } else {
        while (flock(fd, LOCK_EX) != 0) {
            if (errno != EINTR) {
                st = sg_error_set(err, SG_EIO, 0, 0, "cannot lock '%s': %s", lock_path, strerror(errno));
                break;
            }
        }
        if (st == SG_OK)
            st = append_locked(register_dir, id, path, &add, &rows, err);
        (void)close(fd); /* releases the lock */
    }
    sg_cal_instrument_release(&add);
    rowset_release(&rows);
    return st;
}

enum sg_status sg_calibio_append(const char *register_dir, const char *id, const char *event_text, size_t len,
                                 struct sg_error *err)
{
    const enum sg_status st = append_events(register_dir, id, event_text, len, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

/* ---- the register cache ------------------------------------------------------------------- */

/* FNV-1a, 64 bits (Fowler, Noll, Vo: the published offset basis and prime). */
#define FNV_OFFSET_BASIS UINT64_C(14695981039346656037)
#define FNV_PRIME UINT64_C(1099511628211)
/* 2^64 divided by the golden ratio (Knuth's multiplicative hashing). */
#define GOLDEN_RATIO_64 UINT64_C(0x9E3779B97F4A7C15)
#define CACHE_TABLE_MIN 16 /* first size of the cache's hash tables (a power of two) */

/* One evaluation of one part of one event, kept: area_mm2 is NaN but for a
 * depth line given its cylinder's cross-section. */
struct eval_memo {
    enum sg_cal_part part;
    double area_mm2;
    enum sg_status st;         /* of sg_cal_evaluate */
    struct sg_error *err;      /* st != SG_OK: its message */
    struct sg_cal_result *res; /* st == SG_OK */
};

/* What is kept of one event: its evaluations and its calibration_used label. */
struct event_memo {
    struct eval_memo *v;
    size_t n, cap;
    bool has_label;
    char label[96]; /* sg_cal_entry_label */
};

/* An instrument's status on one date, as resolution uses it (compact: a
 * batch meets thousands of dates). */
struct day_memo {
    struct sg_date date, due;
    int32_t entry[SG_CAL_PART_COUNT]; /* event indices (at most SG_CAL_EVENTS_MAX) or -1 */
    unsigned char st;                 /* enum sg_status of sg_cal_status */
    unsigned char state;              /* enum sg_cal_state */
    bool has_due;
    char *text; /* st != SG_OK: the error's message; out of service or retired: the reason; else NULL */
};

/* One instrument ID looked up: its file as loaded (or why it could not be),
 * and what was computed from it. */
struct sg_calibio_slot {
    char *id;
    enum sg_status st;            /* of sg_calibio_load; SG_ENOMEM: not loaded (tried again) */
    struct sg_error err;          /* its message when st != SG_OK */
    struct sg_cal_instrument ins; /* st == SG_OK */
    struct event_memo *events;    /* ins.n_events of them, from the first evaluation */
    struct day_memo *days;        /* in order of first use */
    size_t n_days, cap_days;
    uint32_t *day_index;          /* open addressing by date: position in days + 1; cap_day_index a power of two */
    size_t cap_day_index;
};

void sg_calibio_cache_init(struct sg_calibio_cache *cache, const char *register_dir)
{
    memset(cache, 0, sizeof *cache);
    cache->register_dir = register_dir;
}

static void slot_free(struct sg_calibio_slot *s)
{
    if (s == NULL)
        return;
    if (s->events != NULL) {
        for (size_t i = 0; i < s->ins.n_events; i++) {
            for (size_t j = 0; j < s->events[i].n; j++) {
                free(s->events[i].v[j].err);
                free(s->events[i].v[j].res);
            }
            free(s->events[i].v);
        }
        free(s->events);
    }
    for (size_t i = 0; i < s->n_days; i++)
        free(s->days[i].text);
    free(s->days);
    free(s->day_index);
    sg_cal_instrument_release(&s->ins);
    free(s->id);
    free(s);
}

void sg_calibio_cache_release(struct sg_calibio_cache *cache)
{
    if (cache == NULL)
        return;
    for (size_t i = 0; i < cache->n_slots; i++)
        slot_free(cache->slots[i]);
    free(cache->slots);
    free(cache->index);
    sg_calibio_cache_init(cache, cache->register_dir);
}

static uint64_t hash_id(const char *id)
{
    uint64_t h = FNV_OFFSET_BASIS;
    for (const unsigned char *p = (const unsigned char *)id; *p != '\0'; p++)
        h = (h ^ *p) * FNV_PRIME;
    return h;
}

/* Puts slot number i (stored as i + 1) into the index by its ID's hash. */
static void index_put(size_t *index, size_t cap, const char *id, size_t i)
{
    size_t at = (size_t)hash_id(id) & (cap - 1);
    while (index[at] != 0)
        at = (at + 1) & (cap - 1);
    index[at] = i + 1;
}

/* The slot of instrument id, made (and its file loaded) on first use.
 * SG_ENOMEM (err set) when the cache cannot grow; the slot's own st tells
 * how its file loaded. */
static enum sg_status cache_slot(struct sg_calibio_cache *c, const char *id, struct sg_calibio_slot **out,
                                 struct sg_error *err)
{
    struct sg_calibio_slot *s = NULL;
    if (c->cap_index > 0) {
        size_t at = (size_t)hash_id(id) & (c->cap_index - 1);
        while (c->index[at] != 0) {
            struct sg_calibio_slot *t = c->slots[c->index[at] - 1];
            if (strcmp(t->id, id) == 0) {
                s = t;
                break;
            }
            at = (at + 1) & (c->cap_index - 1);
        }
    }
    if (s == NULL) {
        if (2 * (c->n_slots + 1) > c->cap_index) {
            const size_t cap = c->cap_index ? 2 * c->cap_index : CACHE_TABLE_MIN;
            size_t *index = calloc(cap, sizeof *index);
            if (index == NULL)
                return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory keeping the calibration register");
            for (size_t i = 0; i < c->n_slots; i++)
                index_put(index, cap, c->slots[i]->id, i);
            free(c->index);
            c->index = index;
            c->cap_index = cap;
        }
        if (c->n_slots == c->cap_slots) {
            const size_t cap = c->cap_slots ? 2 * c->cap_slots : CACHE_TABLE_MIN;
            struct sg_calibio_slot **slots = realloc(c->slots, cap * sizeof *slots);
            if (slots == NULL)
                return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory keeping the calibration register");
            c->slots = slots;
            c->cap_slots = cap;
        }
        s = calloc(1, sizeof *s);
        const size_t len = strlen(id);
        if (s == NULL || (s->id = malloc(len + 1)) == NULL) {
            free(s);
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory keeping the calibration register");
        }
        memcpy(s->id, id, len + 1);
        sg_cal_instrument_init(&s->ins);
        s->st = SG_ENOMEM; /* not loaded yet */
        c->slots[c->n_slots] = s;
        index_put(c->index, c->cap_index, id, c->n_slots);
        c->n_slots++;
    }
    if (s->st == SG_ENOMEM) { /* first use, or the last load ran out of memory */
        sg_cal_instrument_release(&s->ins);
        sg_error_clear(&s->err);
        s->st = sg_calibio_load(c->register_dir, id, &s->ins, &s->err);
    }
    *out = s;
    return SG_OK;
}

static bool slot_events(struct sg_calibio_slot *s)
{
    if (s->events == NULL && s->ins.n_events > 0)
        s->events = calloc(s->ins.n_events, sizeof *s->events);
    return s->events != NULL;
}

static bool same_bits(double a, double b)
{
    return memcmp(&a, &b, sizeof a) == 0;
}

/* sg_cal_evaluate(ins, event, part, area_mm2), computed once per slot. *res
 * stays valid as long as the cache. */
static enum sg_status slot_eval(struct sg_calibio_slot *s, size_t event, enum sg_cal_part part, double area_mm2,
                                const struct sg_cal_result **res, struct sg_error *err)
{
    if (!slot_events(s))
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    struct event_memo *em = &s->events[event];
    for (size_t i = 0; i < em->n; i++) {
        const struct eval_memo *m = &em->v[i];
        if (m->part != part || !same_bits(m->area_mm2, area_mm2))
            continue;
        if (m->st != SG_OK) {
            if (err != NULL)
                *err = *m->err;
            return m->st;
        }
        *res = m->res;
        return SG_OK;
    }
    if (em->n == em->cap) {
        const size_t cap = em->cap ? 2 * em->cap : 4;
        struct eval_memo *v = realloc(em->v, cap * sizeof *v);
        if (v == NULL)
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
        em->v = v;
        em->cap = cap;
    }
    struct sg_cal_result *r = malloc(sizeof *r);
    if (r == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    struct sg_error e;
    sg_error_clear(&e);
    const enum sg_status st = sg_cal_evaluate(&s->ins, &s->ins.events[event], part, area_mm2, r, &e);
    struct eval_memo m = {.part = part, .area_mm2 = area_mm2, .st = st, .err = NULL, .res = r};
    if (st != SG_OK) {
        free(r);
        m.res = NULL;
        if (err != NULL)
            *err = e;
        if (st == SG_ENOMEM || (m.err = malloc(sizeof *m.err)) == NULL)
            return st; /* not kept: tried again next time */
        *m.err = e;
        em->v[em->n++] = m;
        return st;
    }
    em->v[em->n++] = m;
    *res = r;
    return SG_OK;
}

static enum sg_status status_eval(void *ctx, size_t event, enum sg_cal_part part, const struct sg_cal_result **res,
                                  struct sg_error *err)
{
    return slot_eval(ctx, event, part, (double)NAN, res, err);
}

static size_t day_hash(struct sg_date d, size_t cap)
{
    const uint64_t v = ((uint64_t)(unsigned)d.year << 9) ^ ((uint64_t)(unsigned)d.month << 5) ^ (unsigned)d.day;
    return (size_t)((v * GOLDEN_RATIO_64) >> 32) & (cap - 1);
}

static bool same_date(struct sg_date a, struct sg_date b)
{
    return a.year == b.year && a.month == b.month && a.day == b.day;
}

/* The index position of date d: where it is, or the empty one where it goes. */
static size_t day_find(const struct sg_calibio_slot *s, struct sg_date d)
{
    size_t at = day_hash(d, s->cap_day_index);
    while (s->day_index[at] != 0 && !same_date(s->days[s->day_index[at] - 1].date, d))
        at = (at + 1) & (s->cap_day_index - 1);
    return at;
}

static char *dup_text(const char *s)
{
    const size_t n = strlen(s);
    char *t = malloc(n + 1);
    if (t != NULL)
        memcpy(t, s, n + 1);
    return t;
}

/* Room for one more date in the slot's memo and index. */
static bool day_room(struct sg_calibio_slot *s)
{
    if (s->n_days == s->cap_days) {
        const size_t cap = s->cap_days ? 2 * s->cap_days : CACHE_TABLE_MIN;
        if (cap > UINT32_MAX - 1)
            return false;
        struct day_memo *days = realloc(s->days, cap * sizeof *days);
        if (days == NULL)
            return false;
        s->days = days;
        s->cap_days = cap;
    }
    if (2 * (s->n_days + 1) > s->cap_day_index) {
        const size_t cap = s->cap_day_index ? 2 * s->cap_day_index : 2 * CACHE_TABLE_MIN;
        uint32_t *index = calloc(cap, sizeof *index);
        if (index == NULL)
            return false;
        free(s->day_index);
        s->day_index = index;
        s->cap_day_index = cap;
        for (size_t i = 0; i < s->n_days; i++)
            s->day_index[day_find(s, s->days[i].date)] = (uint32_t)i + 1;
    }
    return true;
}

/* The slot's status on date d (sg_cal_status, evaluations from the slot),
 * computed once per date. SG_ENOMEM (err set) if it cannot be computed or
 * kept; otherwise SG_OK with *out (whose st is sg_cal_status's). */
static enum sg_status slot_day(struct sg_calibio_slot *s, struct sg_date d, const struct day_memo **out,
                               struct sg_error *err)
{
    if (s->cap_day_index > 0) {
        const uint32_t i = s->day_index[day_find(s, d)];
        if (i != 0) {
            *out = &s->days[i - 1];
            return SG_OK;
        }
    }
    if (!day_room(s))
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    struct sg_cal_status stat;
    struct sg_error e;
    sg_error_clear(&e);
    const enum sg_status st = sg_cal_status_with(&s->ins, d, 0, status_eval, s, &stat, &e);
    if (st == SG_ENOMEM) {
        if (err != NULL)
            *err = e;
        return st;
    }
    struct day_memo m = {.date = d, .due = stat.due, .st = (unsigned char)st, .state = (unsigned char)stat.state,
                         .has_due = stat.has_due, .text = NULL};
    for (size_t p = 0; p < SG_CAL_PART_COUNT; p++)
        m.entry[p] = (int32_t)stat.entry[p];
    const char *text = st != SG_OK                                                           ? e.msg
                       : stat.state == SG_CAL_OUT_OF_SERVICE || stat.state == SG_CAL_RETIRED ? stat.reason
                                                                                             : NULL;
    if (text != NULL && (m.text = dup_text(text)) == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    s->day_index[day_find(s, d)] = (uint32_t)s->n_days + 1;
    s->days[s->n_days] = m;
    *out = &s->days[s->n_days++];
    return SG_OK;
}

/* ---- resolution for a test record ------------------------------------------------------- */

struct resolver {
    struct sg_calibio_cache *cache;
    const struct sg_record *rec;
    const char *ov_id, *ov_entry;
    struct sg_constants *k;
    struct sg_error *err;
    char used[8][96];
    size_t n_used;
};

static void add_used(struct resolver *rv, struct sg_calibio_slot *s, long index)
{
    char own[96];
    const char *label = own;
    if (slot_events(s)) {
        struct event_memo *em = &s->events[index];
        if (!em->has_label) {
            sg_cal_entry_label(&s->ins, (size_t)index, em->label, sizeof em->label);
            em->has_label = true;
        }
        label = em->label;
    } else {
        sg_cal_entry_label(&s->ins, (size_t)index, own, sizeof own);
    }
    for (size_t i = 0; i < rv->n_used; i++)
        if (strcmp(rv->used[i], label) == 0)
            return;
    if (rv->n_used < sizeof rv->used / sizeof rv->used[0])
        memcpy(rv->used[rv->n_used++], label, sizeof own);
}

static void add_note(struct sg_constants *k, const char *name, enum sg_severity sev, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

static void add_note(struct sg_constants *k, const char *name, enum sg_severity sev, const char *fmt, ...)
{
    if (k->n_notes >= sizeof k->notes / sizeof k->notes[0])
        return;
    (void)snprintf(k->notes[k->n_notes].name, sizeof k->notes[k->n_notes].name, "%s", name);
    k->notes[k->n_notes].severity = sev;
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(k->notes[k->n_notes].message, sizeof k->notes[k->n_notes].message, fmt, ap);
    va_end(ap);
    k->n_notes++;
}

/* Looks up instrument id (named at pos in the record) of the expected kind
 * and finds its entries in force on the test date (or the override entry). */
static enum sg_status resolve_one(struct resolver *rv, const char *id, struct sg_srcpos pos, enum sg_cal_kind kind,
                                  const char *role, struct sg_calibio_slot **slot, long entry[SG_CAL_PART_COUNT])
{
    const unsigned line = pos.line ? pos.line : 1, col = pos.col ? pos.col : 1;
    struct sg_error e;
    sg_error_clear(&e);
    struct sg_calibio_slot *s = NULL;
    enum sg_status st = cache_slot(rv->cache, id, &s, &e);
    if (st != SG_OK)
        return sg_error_set(rv->err, st, line, col, "%s", e.msg);
    st = s->st;
    if (st == SG_ENOTFOUND || (st != SG_OK && s->err.line == 0))
        return sg_error_set(rv->err, st, line, col, "%s", s->err.msg);
    if (st != SG_OK) {
        char path[4096];
        (void)sg_calibio_path(rv->cache->register_dir, id, path, sizeof path);
        return sg_error_set(rv->err, st, line, col, "register file %s:%u:%u: %.300s (fix the register file)", path,
                            s->err.line, s->err.col ? s->err.col : 1, s->err.msg);
    }
    const struct sg_cal_instrument *ins = &s->ins;
    if (ins->kind != kind)
        return sg_error_set(rv->err, SG_EINVAL, line, col,
                            "'%s' is a %s in the calibration register, not a %s (check the record's '%s' row)", id,
                            sg_cal_kind_name(ins->kind), sg_cal_kind_name(kind), role);
    char date[11];
    sg_date_format(rv->rec->date, date);
    const struct day_memo *day = NULL;
    if ((st = slot_day(s, rv->rec->date, &day, &e)) != SG_OK)
        return sg_error_set(rv->err, st, line, col, "instrument '%s': %.300s", id, e.msg);
    if (day->st != SG_OK)
        return sg_error_set(rv->err, (enum sg_status)day->st, line, col, "instrument '%s': %.300s", id, day->text);
    for (size_t p = 0; p < SG_CAL_PART_COUNT; p++)
        entry[p] = day->entry[p];
    *slot = s;
    if (rv->ov_id != NULL && strcmp(rv->ov_id, id) == 0) {
        size_t idx = 0;
        if ((st = sg_cal_find_entry(ins, rv->ov_entry, &idx, &e)) != SG_OK)
            return sg_error_set(rv->err, st, line, col, "%s", e.msg);
        const unsigned parts = sg_cal_event_parts(&ins->events[idx]);
        for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++)
            if (parts & (1u << p)) {
                const struct sg_cal_result *res = NULL;
                if ((st = slot_eval(s, idx, (enum sg_cal_part)p, (double)NAN, &res, &e)) != SG_OK)
                    return sg_error_set(rv->err, st, line, col, "instrument '%s': %.300s", id, e.msg);
                /* a rejected entry is applied too, and said: the impact of
                 * an "as found" result on the tests done with the
                 * instrument is what an assessment of nonconforming
                 * equipment asks for */
                if (!res->accepted)
                    add_note(rv->k, "entry_rejected", SG_SEVERITY_WARNING,
                             "the %s entry %s@%s was %.120s: applied as asked, to assess its impact",
                             sg_cal_part_name((enum sg_cal_part)p), id, rv->ov_entry, res->decision);
                entry[p] = (long)idx;
            }
        return SG_OK;
    }
    if (day->state == SG_CAL_OUT_OF_SERVICE || day->state == SG_CAL_RETIRED)
        return sg_error_set(rv->err, SG_EINVAL, line, col,
                            "%s '%s' has no calibration in force on the test date %s: %.200s (%s)",
                            sg_cal_kind_name(kind), id, date, day->text,
                            day->state == SG_CAL_RETIRED ? "it is retired: name an instrument in service"
                                                         : "calibrate it, or use an instrument in service");
    if (day->state == SG_CAL_OVERDUE && day->has_due) {
        char due[11];
        sg_date_format(day->due, due);
        add_note(rv->k, "calibration_overdue", SG_SEVERITY_WARNING,
                 "%s '%s': calibration due %s, before the test date %s (recalibrate it)", sg_cal_kind_name(kind), id,
                 due, date);
    }
    return SG_OK;
}

static enum sg_status eval_in_force(struct resolver *rv, struct sg_calibio_slot *s,
                                    const long entry[SG_CAL_PART_COUNT], enum sg_cal_part part, double area_mm2,
                                    struct sg_srcpos pos, const struct sg_cal_result **res)
{
    const struct sg_cal_instrument *ins = &s->ins;
    struct sg_error e;
    if (entry[part] < 0)
        return sg_error_set(rv->err, SG_EINVAL, pos.line ? pos.line : 1, pos.col ? pos.col : 1,
                            "%s '%s' has no %s calibration to apply (calibrate it)", sg_cal_kind_name(ins->kind),
                            ins->id, sg_cal_part_name(part));
    const enum sg_status st = slot_eval(s, (size_t)entry[part], part, area_mm2, res, &e);
    if (st != SG_OK)
        return sg_error_set(rv->err, st, pos.line ? pos.line : 1, pos.col ? pos.col : 1,
                            "instrument '%s', %s entry: %.300s", ins->id, sg_cal_part_name(part), e.msg);
    add_used(rv, s, entry[part]);
    return SG_OK;
}

/* Whether the record may take a blank from the register's line: it has a
 * reading without a blank of its own, or no readings yet (a row's blank
 * comes first, so when every row has one the line is neither applied nor
 * named among the calibrations used). */
static bool reads_blank_line(const struct sg_record *rec)
{
    if (rec->n_readings == 0)
        return true;
    for (size_t i = 0; i < rec->n_readings; i++)
        if (!rec->readings[i].has_blank)
            return true;
    return false;
}

static enum sg_status resolve_cylinder(struct resolver *rv, const char *id, struct sg_srcpos pos, double *area_mm2)
{
    struct sg_calibio_slot *s = NULL;
    long entry[SG_CAL_PART_COUNT];
    enum sg_status st = resolve_one(rv, id, pos, SG_CAL_CYLINDER, "cylinder", &s, entry);
    if (st == SG_OK) {
        const struct sg_cal_result *res = NULL;
        st = eval_in_force(rv, s, entry, SG_CAL_PART_AREA, (double)NAN, pos, &res);
        if (st == SG_OK)
            *area_mm2 = res->value;
    }
    return st;
}

static enum sg_status resolve_hydrometer(struct resolver *rv)
{
    const struct sg_record *rec = rv->rec;
    struct sg_constants *k = rv->k;
    struct sg_calibio_slot *s = NULL;
    long entry[SG_CAL_PART_COUNT];
    const struct sg_cal_result *res = NULL;
    enum sg_status st = resolve_one(rv, rec->hydrometer, rec->pos_hydrometer, SG_CAL_HYDROMETER, "hydrometer", &s,
                                    entry);
    if (st != SG_OK)
        return st;
    const struct sg_cal_instrument *ins = &s->ins;
    const struct sg_srcpos pos = rec->pos_hydrometer;
    if (rec->scale != SG_SCALE_NONE && rec->scale != ins->scale)
        return sg_error_set(rv->err, SG_EINVAL, rec->pos_scale.line ? rec->pos_scale.line : 1, 1,
                            "reading_scale '%s' does not match hydrometer '%s', whose scale is '%s' in the register "
                            "(correct the record's reading_scale or its hydrometer)",
                            sg_scale_name(rec->scale), ins->id, sg_scale_name(ins->scale));
    if (entry[SG_CAL_PART_DEPTH] < 0 || entry[SG_CAL_PART_MENISCUS] < 0)
        return sg_error_set(rv->err, SG_EINVAL, pos.line ? pos.line : 1, pos.col ? pos.col : 1,
                            "hydrometer '%s' has no %s calibration to apply (calibrate it)", ins->id,
                            entry[SG_CAL_PART_DEPTH] < 0 ? "depth" : "meniscus");
    /* Depth: the hydrometer's line, with the cross-section of the cylinder in use. */
    const struct sg_cal_event *dev = &ins->events[entry[SG_CAL_PART_DEPTH]];
    const char *cyl = rec->cylinder[0] ? rec->cylinder : dev->cylinder;
    const struct sg_srcpos cpos = rec->cylinder[0] ? rec->pos_cylinder : pos;
    double area = (double)NAN;
    /* The hydrometer's entries are named before its cylinder's. */
    add_used(rv, s, entry[SG_CAL_PART_DEPTH]);
    add_used(rv, s, entry[SG_CAL_PART_MENISCUS]);
    if (entry[SG_CAL_PART_BLANK] >= 0 && reads_blank_line(rec))
        add_used(rv, s, entry[SG_CAL_PART_BLANK]);
    if ((st = resolve_cylinder(rv, cyl, cpos, &area)) != SG_OK ||
        (st = eval_in_force(rv, s, entry, SG_CAL_PART_DEPTH, area, pos, &res)) != SG_OK)
        return st;
    k->has_depth_line = true;
    k->depth_at_zero_mm = res->line.c0;
    k->depth_per_unit_mm = res->line.c1;
    k->depth_cov[0] = res->line.cov00;
    k->depth_cov[1] = res->line.cov01;
    k->depth_cov[2] = res->line.cov11;
    if (strcmp(cyl, dev->cylinder) != 0)
        add_note(k, "depth_cylinder_differs", SG_SEVERITY_INFO,
                 "hydrometer '%s' was calibrated in cylinder '%s'; its depth line uses the cross-section of '%s'",
                 ins->id, dev->cylinder, cyl);
    if ((st = eval_in_force(rv, s, entry, SG_CAL_PART_MENISCUS, (double)NAN, pos, &res)) != SG_OK)
        return st;
    k->meniscus_correction = res->value;
    k->meniscus_u = res->u;
    if (entry[SG_CAL_PART_BLANK] >= 0 && reads_blank_line(rec)) {
        if ((st = eval_in_force(rv, s, entry, SG_CAL_PART_BLANK, (double)NAN, pos, &res)) != SG_OK)
            return st;
        k->has_blank_line = true;
        k->blank_c0 = res->line.c0;
        k->blank_c1 = res->line.c1;
        k->blank_tmin_c = res->xmin;
        k->blank_tmax_c = res->xmax;
        k->blank_u = res->u;
        k->has_blank_const = false; /* the register's blank line replaces an inline composite correction */
    }
    if (ins->has_range) {
        k->has_scale_range = true;
        k->scale_min = ins->range_min;
        k->scale_max = ins->range_max;
    }
    if (ins->has_division && ins->division > 0.0)
        k->scale_division = ins->division;
    return SG_OK;
}

static enum sg_status resolve_simple(struct resolver *rv, const char *id, struct sg_srcpos pos, enum sg_cal_kind kind,
                                     const char *role, enum sg_cal_part part, const struct sg_cal_result **res)
{
    struct sg_calibio_slot *s = NULL;
    long entry[SG_CAL_PART_COUNT];
    enum sg_status st = resolve_one(rv, id, pos, kind, role, &s, entry);
    if (st == SG_OK)
        st = eval_in_force(rv, s, entry, part, (double)NAN, pos, res);
    return st;
}

/* k->calibration_used = the labels joined by ';', cut where snprintf would
 * cut them. */
static void join_used(const struct resolver *rv, struct sg_constants *k)
{
    char *out = k->calibration_used;
    size_t at = 0, room = sizeof k->calibration_used - 1; /* characters that still fit */
    for (size_t i = 0; i < rv->n_used; i++) {
        const char *piece[2] = {i ? ";" : "", rv->used[i]};
        const size_t room_before = room;
        size_t n = 0;
        for (size_t j = 0; j < 2; j++) {
            const size_t len = strlen(piece[j]), take = len < room ? len : room;
            memcpy(out + at, piece[j], take);
            at += take;
            room -= take;
            n += len;
        }
        out[at] = '\0';
        if (n > room_before)
            break;
    }
    out[at] = '\0';
}

/* Whether a constant the reduction applies comes from the record itself
 * after the register was consulted: the depth line, meniscus or composite
 * correction of a hydrometer test that names no hydrometer, a composite
 * correction that no register blank line replaced and some reading without
 * a blank of its own needs, or the pipette volume of
 * a pipette test that names no pipette. */
static bool uses_inline(const struct sg_record *rec, const struct sg_constants *k)
{
    if (rec->method == SG_METHOD_HYDROMETER)
        return (!rec->hydrometer[0] && (rec->has_depth_line || rec->has_meniscus || rec->has_composite)) ||
               (rec->has_composite && k->has_blank_const && reads_blank_line(rec));
    if (rec->method == SG_METHOD_PIPETTE)
        return !rec->pipette_id[0] && rec->has_pipette_volume;
    return false;
}

static enum sg_status resolve_cached(struct sg_calibio_cache *cache, const struct sg_record *rec,
                                     const char *override_id, const char *override_entry, struct sg_constants *k,
                                     struct sg_error *err)
{
    sg_constants_from_record(rec, k);
    sg_error_clear(err);
    struct resolver rv = {.cache = cache, .rec = rec, .ov_id = override_id, .ov_entry = override_entry, .k = k,
                          .err = err, .n_used = 0};
    const bool named = rec->hydrometer[0] || rec->cylinder[0] || rec->thermometer[0] || rec->pipette_id[0];
    if (!named)
        return SG_OK;
    struct sg_srcpos pos = rec->hydrometer[0]    ? rec->pos_hydrometer
                           : rec->cylinder[0]    ? rec->pos_cylinder
                           : rec->thermometer[0] ? rec->pos_thermometer
                                                 : rec->pos_pipette_id;
    const unsigned line = pos.line ? pos.line : 1, col = pos.col ? pos.col : 1;
    if (!sg_date_is_set(rec->date))
        return sg_error_set(err, SG_EINVAL, line, col,
                            "the record names register instruments but no test date (give test,date so the "
                            "calibration in force can be chosen)");
    const char *register_dir = cache->register_dir;
    if (cache->dir_state == 0)
        cache->dir_state = (int)dir_kind(register_dir, &cache->dir_errno);
    if (cache->dir_state != DIR_FOLDER)
        return dir_problem(register_dir, (enum dir_kind)cache->dir_state, cache->dir_errno, line, col,
                           ", and the record names register instruments",
                           ", or drop the instrument IDs and give the constants inline", err);
    enum sg_status st = SG_OK;
    const struct sg_cal_result *res = NULL;
    if (rec->hydrometer[0])
        st = resolve_hydrometer(&rv);
    else if (rec->cylinder[0]) {
        double area = (double)NAN;
        st = resolve_cylinder(&rv, rec->cylinder, rec->pos_cylinder, &area);
    }
    if (st == SG_OK && rec->thermometer[0]) {
        st = resolve_simple(&rv, rec->thermometer, rec->pos_thermometer, SG_CAL_THERMOMETER, "thermometer",
                            SG_CAL_PART_OFFSET, &res);
        if (st == SG_OK)
            k->thermometer_offset_c = res->value;
    }
    if (st == SG_OK && rec->pipette_id[0]) {
        st = resolve_simple(&rv, rec->pipette_id, rec->pos_pipette_id, SG_CAL_PIPETTE, "pipette_id",
                            SG_CAL_PART_VOLUME, &res);
        if (st == SG_OK) {
            k->has_pipette_volume = true;
            k->pipette_volume_ml = res->value;
            k->pipette_volume_u_ml = res->u;
        }
    }
    if (st != SG_OK)
        return st;
    /* constants the record still carries itself sit beside the register's
     * entries: the SPEC's "inline" is named too */
    if (rv.n_used > 0 && rv.n_used < sizeof rv.used / sizeof rv.used[0] && uses_inline(rec, k))
        memcpy(rv.used[rv.n_used++], "inline", sizeof "inline");
    if (rv.n_used > 0)
        join_used(&rv, k);
    return SG_OK;
}

enum sg_status sg_calibio_resolve_with_cached(struct sg_calibio_cache *cache, const struct sg_record *rec,
                                              const char *override_id, const char *override_entry,
                                              struct sg_constants *k, struct sg_error *err)
{
    const enum sg_status st = resolve_cached(cache, rec, override_id, override_entry, k, err);
    if (st != SG_OK)
        escape_message(err);
    return st;
}

enum sg_status sg_calibio_resolve_cached(struct sg_calibio_cache *cache, const struct sg_record *rec,
                                         struct sg_constants *k, struct sg_error *err)
{
    return sg_calibio_resolve_with_cached(cache, rec, NULL, NULL, k, err);
}

enum sg_status sg_calibio_resolve_with(const char *register_dir, const struct sg_record *rec,
                                       const char *override_id, const char *override_entry,
                                       struct sg_constants *k, struct sg_error *err)
{
    struct sg_calibio_cache cache;
    sg_calibio_cache_init(&cache, register_dir);
    const enum sg_status st = sg_calibio_resolve_with_cached(&cache, rec, override_id, override_entry, k, err);
    sg_calibio_cache_release(&cache);
    return st;
}

enum sg_status sg_calibio_resolve(const char *register_dir, const struct sg_record *rec, struct sg_constants *k,
                                  struct sg_error *err)
{
    return sg_calibio_resolve_with(register_dir, rec, NULL, NULL, k, err);
}
