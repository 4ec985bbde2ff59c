/* recordio.c - the test-record reader: a text check (binary, UTF-8), field
 * splitting by libcsv with our own line/column tracking, interpretation of the
 * rows and keys, then sg_record_validate() for completeness. */
#include "sedgrade/recordio.h"

#include <csv.h>
#include <errno.h>
#include <fcntl.h>
#include <float.h>
#include <math.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "sedgrade/sieve.h"
#include "io/utf8.h"

/* Bytes of a field kept for interpretation (longer fields are never valid:
 * names stop at 63 characters, numbers at NUMBER_TEXT_MAX). */
#define FIELD_TEXT_MAX 256
/* Fields of one row kept; the longest valid row (reading) has 5. */
#define ROW_FIELDS_MAX 8
/* Characters of an offending value quoted in a message. */
#define SHOW_CHARS 40
#define SHOW_BUF (SHOW_CHARS * 4 + 4)
/* Longest text accepted as a number (a double needs at most 17 significant digits). */
#define NUMBER_TEXT_MAX 64
/* libcsv grows its field buffer by this much at least (its own default). */
#define CSV_BLOCK_MIN 128
/* Longest key or row kind compared for "did you mean". */
#define NAME_CMP_MAX 63
/* Size of the buffer reads grow by for files whose size fstat cannot tell. */
#define READ_CHUNK ((size_t)64 * 1024)

/* ---- keys of 'test' rows ---------------------------------------------------------- */

enum vtype { V_ID, V_NAME, V_METHOD, V_SCALE, V_STANDARD, V_DATE, V_NUM, V_NUM2 };

/* How a number is described in messages: "<what> 'x' is not a number (write
 * <unit_words> as a decimal number, e.g. <example>)". */
struct numspec {
    const char *what;
    const char *unit_words;
    const char *example;
};

enum key {
    K_ID, K_METHOD, K_DATE, K_PARTICLE_DENSITY, K_SAMPLE_MASS, K_SPLIT_APERTURE, K_SPECIMEN_MASS,
    K_VOLUME, K_HYDROMETER, K_CYLINDER, K_THERMOMETER, K_PIPETTE_ID, K_SCALE, K_DEPTH_LINE,
    K_MENISCUS, K_COMPOSITE, K_PIPETTE_VOLUME, K_DISPERSANT, K_LIQUID_LIMIT, K_PLASTIC_LIMIT,
    K_NATURAL_MOISTURE, K_STANDARD, K_U_READING, K_U_TEMP, K_U_ELAPSED, K_U_MASS,
    K_U_PARTICLE_DENSITY, K_U_BLANK, K_U_MENISCUS, K_U_PIPETTE_VOLUME, K_U_SOLIDS, K_U_DEPTH,
    K_COUNT
};

struct keyinfo {
    const char *name;
    enum vtype type;
    /* the value must be >= 0 and at most max (checked here: the record keeps
     * no position for these keys, so validation could not locate a problem) */
    bool nonneg;
    struct numspec num;
    double max;
    unsigned part; /* enum sg_record_part refused with the row, 0 if validation does not need to know */
};

/* Upper limits of the keys checked here: an uncertainty is at most the
 * accepted range of its quantity (record.h). */
#define U_TEMP_MAX_C (SG_RECORD_TEMP_MAX_C - SG_RECORD_TEMP_MIN_C)
#define U_READING_MAX (2.0 * SG_RECORD_READING_ABS_MAX)

static const struct keyinfo KEYS[K_COUNT] = {
    [K_ID] = {"id", V_ID, false, {0}, 0, SG_PART_ID},
    [K_METHOD] = {"method", V_METHOD, false, {0}, 0, SG_PART_METHOD},
    [K_DATE] = {"date", V_DATE, false, {0}, 0, 0},
    [K_PARTICLE_DENSITY] = {"particle_density_mg_m3", V_NUM, false,
                            {"particle density", "Mg/m3", "2.65"}, 0, SG_PART_PARTICLE_DENSITY},
    [K_SAMPLE_MASS] = {"sample_dry_mass_g", V_NUM, false, {"sample dry mass", "grams", "1523.4"}, 0,
                       SG_PART_SAMPLE_MASS},
    [K_SPLIT_APERTURE] = {"split_aperture_mm", V_NUM, false, {"split aperture", "millimetres", "2"}, 0,
                          SG_PART_SPLIT_APERTURE},
    [K_SPECIMEN_MASS] = {"specimen_dry_mass_g", V_NUM, false, {"specimen dry mass", "grams", "50.12"}, 0,
                         SG_PART_SPECIMEN_MASS},
    [K_VOLUME] = {"suspension_volume_ml", V_NUM, false, {"suspension volume", "millilitres", "1000"}, 0,
                  SG_PART_VOLUME},
    [K_HYDROMETER] = {"hydrometer", V_NAME, false, {0}, 0, SG_PART_HYDROMETER},
    [K_CYLINDER] = {"cylinder", V_NAME, false, {0}, 0, 0},
    [K_THERMOMETER] = {"thermometer", V_NAME, false, {0}, 0, 0},
    [K_PIPETTE_ID] = {"pipette_id", V_NAME, false, {0}, 0, SG_PART_PIPETTE_ID},
    [K_SCALE] = {"reading_scale", V_SCALE, false, {0}, 0, SG_PART_SCALE},
    [K_DEPTH_LINE] = {"depth_line_mm", V_NUM2, false, {"effective depth line", "millimetres", "163.2"}, 0,
                      SG_PART_DEPTH_LINE},
    [K_MENISCUS] = {"meniscus_correction", V_NUM, false,
                    {"meniscus correction", "reading units", "0.5"}, 0, 0},
    [K_COMPOSITE] = {"composite_correction", V_NUM, false,
                     {"composite correction", "reading units", "5.5"}, 0, 0},
    [K_PIPETTE_VOLUME] = {"pipette_volume_ml", V_NUM, false, {"pipette volume", "millilitres", "25"}, 0,
                          SG_PART_PIPETTE_VOLUME},
    [K_DISPERSANT] = {"dispersant_mass_g", V_NUM, false, {"dispersant mass", "grams", "2.5"}, 0, 0},
    [K_LIQUID_LIMIT] = {"liquid_limit_pct", V_NUM, true, {"liquid limit", "percent", "42"},
                        SG_RECORD_WATER_PCT_MAX, 0},
    [K_PLASTIC_LIMIT] = {"plastic_limit_pct", V_NUM, true, {"plastic limit", "percent", "21"},
                         SG_RECORD_WATER_PCT_MAX, 0},
    [K_NATURAL_MOISTURE] = {"natural_moisture_pct", V_NUM, true,
                            {"natural moisture content", "percent", "18.5"}, SG_RECORD_WATER_PCT_MAX, 0},
    [K_STANDARD] = {"standard", V_STANDARD, false, {0}, 0, 0},
    [K_U_READING] = {"u_reading", V_NUM, true, {"reading uncertainty", "reading units", "0.25"}, U_READING_MAX,
                     0},
    [K_U_TEMP] = {"u_temp_c", V_NUM, true, {"temperature uncertainty", "degrees Celsius", "0.2"}, U_TEMP_MAX_C,
                  0},
    [K_U_ELAPSED] = {"u_elapsed_min", V_NUM, true, {"elapsed-time uncertainty", "minutes", "0.05"},
                     SG_RECORD_ELAPSED_MAX_MIN, 0},
    [K_U_MASS] = {"u_mass_g", V_NUM, true, {"mass uncertainty", "grams", "0.01"}, SG_RECORD_MASS_MAX_G, 0},
    [K_U_PARTICLE_DENSITY] = {"u_particle_density_mg_m3", V_NUM, true,
                              {"particle density uncertainty", "Mg/m3", "0.02"},
                              SG_RECORD_PARTICLE_DENSITY_MAX_MG_M3, 0},
    [K_U_BLANK] = {"u_blank_reading", V_NUM, true, {"blank reading uncertainty", "reading units", "0.25"},
                   U_READING_MAX, 0},
    [K_U_MENISCUS] = {"u_meniscus_correction", V_NUM, true,
                      {"meniscus correction uncertainty", "reading units", "0.1"}, U_READING_MAX, 0},
    [K_U_PIPETTE_VOLUME] = {"u_pipette_volume_ml", V_NUM, true,
                            {"pipette volume uncertainty", "millilitres", "0.03"},
                            SG_RECORD_PIPETTE_VOLUME_MAX_ML, 0},
    [K_U_SOLIDS] = {"u_solids_g", V_NUM, true, {"pipette solids uncertainty", "grams", "0.0002"},
                    SG_RECORD_MASS_MAX_G, 0},
    [K_U_DEPTH] = {"u_depth_mm", V_NUM, true, {"sampling depth uncertainty", "millimetres", "1"},
                   SG_RECORD_DEPTH_MAX_MM, 0},
};

/* ---- row kinds ------------------------------------------------------------------- */

enum kind { R_TEST, R_SIEVE, R_FINE_SIEVE, R_READING, R_PIPETTE, R_COUNT };

struct kindinfo {
    const char *name;
    size_t min_fields, max_fields; /* the kind included */
    const char *expected;          /* "expected ..." in the field-count message */
    unsigned part;                 /* enum sg_record_part of a refused row (test rows: by key) */
};

static const struct kindinfo KINDS[R_COUNT] = {
    [R_TEST] = {"test", 3, (size_t)-1, "3 or more (key, value[, value])", 0},
    [R_SIEVE] = {"sieve", 3, 3, "3 (aperture_mm, retained_g)", SG_PART_SIEVE},
    [R_FINE_SIEVE] = {"fine_sieve", 3, 3, "3 (aperture_mm, retained_g)", SG_PART_FINE_SIEVE},
    [R_READING] = {"reading", 4, 5, "4 or 5 (elapsed_min, reading, temp_c[, blank_reading])", SG_PART_READING},
    [R_PIPETTE] = {"pipette", 5, 5, "5 (elapsed_min, temp_c, depth_mm, solids_g)", SG_PART_PIPETTE},
};

static const struct numspec NS_ELAPSED = {"elapsed time", "minutes", "2.5"};
static const struct numspec NS_READING = {"hydrometer reading", "the reading in scale units", "24.5"};
static const struct numspec NS_TEMP = {"temperature", "degrees Celsius", "20.5"};
static const struct numspec NS_BLANK = {"blank reading", "the reading in scale units", "5.5"};
static const struct numspec NS_APERTURE = {"sieve aperture", "millimetres", "0.425"};
static const struct numspec NS_RETAINED = {"retained mass", "grams", "12.37"};
static const struct numspec NS_DEPTH = {"sampling depth", "millimetres", "100"};
static const struct numspec NS_SOLIDS = {"pipette solids", "grams", "0.2483"};

/* ---- parser state ---------------------------------------------------------------- */

/* A position in the text: byte index and the line/column of that byte. */
struct cursor {
    size_t i;
    unsigned line, col;
};

struct field {
    char text[FIELD_TEXT_MAX]; /* trimmed of blanks, truncated */
    size_t len;                /* trimmed length before truncation */
    unsigned line, col;
};

struct rp {
    const unsigned char *s;
    size_t n;
    struct cursor cur;
    struct csv_parser csv;
    unsigned char delim, other;
    unsigned delim_line;

    bool row_open;
    bool fpending; /* the next non-blank byte starts the current field */
    unsigned fline, fcol;
    struct field f[ROW_FIELDS_MAX];
    size_t nf;     /* fields in the current row (all, not only those kept) */
    size_t nf_eff; /* fields up to the last non-blank one */

    struct sg_record *rec;
    struct sg_diag_list *diags;
    struct sg_error *err;
    size_t nprob;
    size_t rows;
    bool syntax;    /* a syntax, format or value-text problem was found */
    bool value_bad; /* a value problem was found */
    bool stop;
    enum sg_status fatal; /* SG_ENOMEM or SG_ELIMIT, else SG_OK */
    unsigned key_line[K_COUNT];
};

/* ---- small helpers --------------------------------------------------------------- */

static bool is_blank(unsigned char c)
{
    return c == ' ' || c == '\t';
}

static int lower(int c)
{
    return c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c;
}

static bool same_word(const char *a, const char *b)
{
    for (; *a != '\0' && *b != '\0'; a++, b++)
        if (lower((unsigned char)*a) != lower((unsigned char)*b))
            return false;
    return *a == *b;
}

/* Moves the cursor over one byte, keeping line and column (columns count
 * characters: UTF-8 continuation bytes do not advance it; CR LF is one line end). */
static void step(struct cursor *c, const unsigned char *s, size_t n)
{
    const unsigned char b = s[c->i];
    if (b == '\n' || (b == '\r' && (c->i + 1 >= n || s[c->i + 1] != '\n'))) {
        c->line++;
        c->col = 1;
    } else if ((b & 0xC0u) != 0x80u && b != '\r') {
        c->col++;
    }
    c->i++;
}

/* Moves the cursor past the end of the current line. */
static void skip_line(struct cursor *c, const unsigned char *s, size_t n)
{
    const unsigned line = c->line;
    while (c->i < n && c->line == line)
        step(c, s, n);
}

/* Copies text for a message: at most SHOW_CHARS characters, "..." if cut. */
static const char *show(const char *text, char out[SHOW_BUF])
{
    size_t i = 0, chars = 0;
    while (text[i] != '\0' && chars < SHOW_CHARS) {
        i++;
        while ((text[i] & 0xC0) == 0x80)
            i++;
        chars++;
    }
    memcpy(out, text, i);
    if (text[i] != '\0') {
        memcpy(out + i, "...", 4);
    } else {
        out[i] = '\0';
    }
    return out;
}

/* Case-insensitive Levenshtein distance over the first NAME_CMP_MAX bytes. */
static size_t edit_distance(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    if (la > NAME_CMP_MAX)
        la = NAME_CMP_MAX;
    if (lb > NAME_CMP_MAX)
        lb = NAME_CMP_MAX;
    size_t prev[NAME_CMP_MAX + 1], cur[NAME_CMP_MAX + 1];
    for (size_t j = 0; j <= lb; j++)
        prev[j] = j;
    for (size_t i = 1; i <= la; i++) {
        cur[0] = i;
        for (size_t j = 1; j <= lb; j++) {
            const size_t sub = prev[j - 1] + (lower((unsigned char)a[i - 1]) != lower((unsigned char)b[j - 1]));
            const size_t del = prev[j] + 1, ins = cur[j - 1] + 1;
            cur[j] = sub < del ? (sub < ins ? sub : ins) : (del < ins ? del : ins);
        }
        memcpy(prev, cur, (lb + 1) * sizeof *prev);
    }
    return prev[lb];
}

/* ---- problems -------------------------------------------------------------------- */

static void add_problem(struct rp *p, const struct sg_error *e)
{
    if (p->stop)
        return;
    if (e->code == SG_EPARSE)
        p->syntax = true;
    else
        p->value_bad = true;
    if (p->nprob == 0 && p->err != NULL)
        *p->err = *e;
    p->nprob++;
    if (sg_diag_add(p->diags, e) != SG_OK) {
        p->fatal = SG_ENOMEM;
        p->stop = true;
        return;
    }
    if (p->nprob >= SG_RECORDIO_MAX_DIAGS) {
        struct sg_error note;
        sg_error_set(&note, e->code, e->line, 0,
                     "too many problems: stopped after %u (fix these and check the file again)",
                     SG_RECORDIO_MAX_DIAGS);
        if (sg_diag_add(p->diags, &note) != SG_OK)
            p->fatal = SG_ENOMEM;
        p->stop = true;
    }
}

#if defined(__GNUC__)
__attribute__((format(printf, 5, 6)))
#endif
static void problem(struct rp *p, enum sg_status code, unsigned line, unsigned col, const char *fmt, ...)
{
    if (p->stop)
        return;
    struct sg_error e;
    e.code = code;
    e.line = line;
    e.col = col;
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(e.msg, sizeof e.msg, fmt, ap);
    va_end(ap);
    add_problem(p, &e);
}

static void fatal(struct rp *p, enum sg_status code)
{
    if (p->fatal == SG_OK)
        p->fatal = code;
    p->stop = true;
}

/* ---- numbers --------------------------------------------------------------------- */

enum numerr {
    NUM_OK, NUM_EMPTY, NUM_WORD, NUM_HEX, NUM_UNIT, NUM_GROUPING, NUM_COMMA,
    NUM_TOO_LARGE, /* beyond the largest double: would be read as infinity */
    NUM_TOO_SMALL, /* not zero, but nearer to zero than the smallest normal double: would be read as 0 or lose its digits */
    NUM_BAD
};

static bool is_digit(unsigned char c)
{
    return c >= '0' && c <= '9';
}

static bool is_letter(unsigned char c)
{
    return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z');
}

/* Length of the longest prefix of s matching [+-]?(d+(.d*)?|.d+)([eE][+-]?d+)?,
 * 0 if none; *digits tells whether a mantissa digit was seen. */
static size_t number_prefix(const char *s, bool *digits)
{
    size_t i = 0, nd = 0;
    if (s[i] == '+' || s[i] == '-')
        i++;
    while (is_digit((unsigned char)s[i]))
        i++, nd++;
    if (s[i] == '.') {
        size_t j = i + 1;
        while (is_digit((unsigned char)s[j]))
            j++, nd++;
        if (nd > 0)
            i = j;
    }
    *digits = nd > 0;
    if (nd == 0)
        return 0;
    if (s[i] == 'e' || s[i] == 'E') {
        size_t j = i + 1;
        if (s[j] == '+' || s[j] == '-')
            j++;
        if (is_digit((unsigned char)s[j])) {
            while (is_digit((unsigned char)s[j]))
                j++;
            i = j;
        }
    }
    return i;
}

/* A space-like separator inside a number: blank, apostrophe, U+00A0, U+202F. */
static size_t group_mark_len(const char *s)
{
    const unsigned char *u = (const unsigned char *)s;
    if (u[0] == ' ' || u[0] == '\t' || u[0] == '\'')
        return 1;
    if (u[0] == 0xC2 && u[1] == 0xA0)
        return 2;
    if (u[0] == 0xE2 && u[1] == 0x80 && u[2] == 0xAF)
        return 3;
    return 0;
}

/* A plain decimal [+-]?(d+(.d*)?|.d+)([eE][+-]?d+)?, the whole of s, read
 * by Clinger's fast path (W. D. Clinger, "How to read floating point
 * numbers accurately", PLDI 1990): at most 15 significant digits make an
 * exact double, as is every power of ten up to 1e22, so one multiplication
 * or division gives the correctly rounded value, which is what strtod()
 * returns. false for anything else (other text, more digits, a larger
 * exponent): the full checks and strtod() then decide. */
#define FAST_DIGITS_MAX 15
#define FAST_POW10_MAX 22
#define FAST_EXP_DIGITS_MAX 4
static bool fast_decimal(const char *s, double *out)
{
    static const double pow10[FAST_POW10_MAX + 1] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                                     1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                                     1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
    const bool neg = *s == '-';
    if (*s == '+' || *s == '-')
        s++;
    unsigned long long m = 0;
    int sig = 0, e10 = 0, nd = 0;
    bool point = false;
    for (;; s++) {
        if (*s == '.' && !point) {
            point = true;
            continue;
        }
        if (!is_digit((unsigned char)*s))
            break;
        nd++;
        if (m != 0 || *s != '0') {
            if (++sig > FAST_DIGITS_MAX)
                return false;
            m = 10 * m + (unsigned)(*s - '0');
        }
        e10 -= point;
    }
    if (nd == 0)
        return false;
    if (*s == 'e' || *s == 'E') {
        s++;
        const bool eneg = *s == '-';
        if (*s == '+' || *s == '-')
            s++;
        int x = 0, xd = 0;
        for (; is_digit((unsigned char)*s); s++, xd++) {
            if (xd >= FAST_EXP_DIGITS_MAX)
                return false;
            x = 10 * x + (*s - '0');
        }
        if (xd == 0)
            return false;
        e10 += eneg ? -x : x;
    }
    if (*s != '\0')
        return false;
    double v = (double)m;
    if (m != 0) {
        if (e10 < -FAST_POW10_MAX || e10 > FAST_POW10_MAX)
            return false;
        v = e10 < 0 ? v / pow10[-e10] : v * pow10[e10];
    }
    *out = neg ? -v : v;
    return true;
}

/* Whether the mantissa of a number's text (before any exponent) has a digit
 * other than 0. */
static bool nonzero_mantissa(const char *s)
{
    for (; *s != '\0' && *s != 'e' && *s != 'E'; s++)
        if (*s >= '1' && *s <= '9')
            return true;
    return false;
}

/* Parses a plain decimal number (field already trimmed). With decimal_comma
 * one ',' is taken as the decimal mark. */
static enum numerr parse_number(const struct field *f, bool decimal_comma, double *out)
{
    if (f->len == 0)
        return NUM_EMPTY;
    if (f->len >= NUMBER_TEXT_MAX)
        return NUM_BAD;
    /* a plain decimal passes every check below: read it at once */
    if (fast_decimal(f->text, out))
        return NUM_OK;
    char buf[NUMBER_TEXT_MAX];
    memcpy(buf, f->text, f->len + 1);

    const char *q = buf + (buf[0] == '+' || buf[0] == '-');
    if (is_letter((unsigned char)q[0]) && (same_word(q, "nan") || same_word(q, "inf") || same_word(q, "infinity")))
        return NUM_WORD;
    if (q[0] == '0' && (q[1] == 'x' || q[1] == 'X'))
        return NUM_HEX;

    size_t dots = 0, commas = 0;
    for (const char *c = buf; *c != '\0'; c++) {
        dots += *c == '.';
        commas += *c == ',';
    }
    if (commas > 0 && !decimal_comma)
        return dots == 0 && commas == 1 ? NUM_COMMA : NUM_GROUPING;
    if (dots + commas > 1)
        return NUM_GROUPING;
    if (commas == 1)
        *strchr(buf, ',') = '.';

    bool digits = false;
    const size_t k = number_prefix(buf, &digits);
    if (k == 0 || buf[k] != '\0') {
        if (k == 0)
            return NUM_BAD;
        const char *rest = buf + k;
        const size_t g = group_mark_len(rest);
        if (g > 0 && is_digit((unsigned char)rest[g]))
            return NUM_GROUPING;
        const char *r = rest + g;
        while (*r == ' ' || *r == '\t')
            r++;
        const unsigned char u0 = (unsigned char)r[0], u1 = (unsigned char)r[1];
        if ((is_letter(u0) && !(rest == r && (u0 == 'e' || u0 == 'E'))) || u0 == '%' ||
            (u0 == 0xC2 && (u1 == 0xB0 || u1 == 0xB5)))
            return NUM_UNIT;
        return NUM_BAD;
    }

    char *end = NULL;
    const double v = strtod(buf, &end);
    if (end != buf + k)
        return NUM_BAD;
    if (!isfinite(v))
        return NUM_TOO_LARGE;
    if (fabs(v) < DBL_MIN && nonzero_mantissa(buf))
        return NUM_TOO_SMALL; /* 1e-400 would silently be 0, 1e-320 a subnormal */
    *out = v;
    return NUM_OK;
}

/* Parses field f as a number described by ns; reports and returns false on failure. */
static bool number(struct rp *p, const struct field *f, const struct numspec *ns, double *out)
{
    const enum numerr e = parse_number(f, p->delim == ';', out);
    if (e == NUM_OK)
        return true;
    char t[SHOW_BUF];
    show(f->text, t);
    switch (e) {
    case NUM_EMPTY:
        problem(p, SG_EPARSE, f->line, f->col, "%s is empty (write %s as a decimal number, e.g. %s)", ns->what,
                ns->unit_words, ns->example);
        break;
    case NUM_HEX:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' is not a number: hexadecimal is not accepted (write %s as a decimal number, e.g. %s)",
                ns->what, t, ns->unit_words, ns->example);
        break;
    case NUM_UNIT:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' is not a number (remove the unit or text after it: write %s as a plain "
                "number, e.g. %s)",
                ns->what, t, ns->unit_words, ns->example);
        break;
    case NUM_GROUPING:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' is not a number (remove thousands separators and use one decimal mark: "
                "write %s as a decimal number, e.g. %s)",
                ns->what, t, ns->unit_words, ns->example);
        break;
    case NUM_COMMA:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' is not a number (with ',' as the field separator a number has '.' as its decimal "
                "mark and no thousands separator, e.g. %s; or separate the fields with ';')",
                ns->what, t, ns->example);
        break;
    case NUM_TOO_LARGE:
    case NUM_TOO_SMALL:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' is out of range: %s to be held as a number (check the exponent; write %s as a "
                "decimal number, e.g. %s)",
                ns->what, t, e == NUM_TOO_LARGE ? "too large" : "too near zero", ns->unit_words, ns->example);
        break;
    case NUM_WORD:
    case NUM_BAD:
    case NUM_OK:
        problem(p, SG_EPARSE, f->line, f->col, "%s '%s' is not a number (write %s as a decimal number, e.g. %s)",
                ns->what, t, ns->unit_words, ns->example);
        break;
    }
    return false;
}

/* ---- names and words ------------------------------------------------------------- */

/* 0 ok, 1 empty, 2 too long, 3 a character outside [A-Za-z0-9._-], 4 a
 * leading '.' (only where file_name asks for it). */
static int check_name(const struct field *f, bool file_name)
{
    if (f->len == 0)
        return 1;
    if (f->len >= SG_NAME_MAX)
        return 2;
    for (size_t i = 0; i < f->len; i++) {
        const unsigned char c = (unsigned char)f->text[i];
        if (!(is_letter(c) || is_digit(c) || c == '.' || c == '_' || c == '-'))
            return 3;
    }
    return file_name && f->text[0] == '.' ? 4 : 0;
}

/* file_name: the name is used for output files (the test id), so a leading
 * '.' is refused: ".", ".." and ".x" would give hidden files such as
 * "...points.csv", or name a folder. */
static bool name_value(struct rp *p, const struct field *f, const char *what, const char *hint, bool file_name,
                       char *dst)
{
    char t[SHOW_BUF];
    switch (check_name(f, file_name)) {
    case 0:
        memcpy(dst, f->text, f->len + 1); /* f->len < SG_NAME_MAX == SG_ID_MAX */
        return true;
    case 1:
        problem(p, SG_EPARSE, f->line, f->col, "%s is empty (%s)", what, hint);
        return false;
    case 2:
        problem(p, SG_EPARSE, f->line, f->col, "%s '%s' is %zu characters long, at most %d are allowed (%s)",
                what, show(f->text, t), f->len, SG_NAME_MAX - 1, hint);
        return false;
    case 4:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' starts with '.' (it names the output files, which would be hidden: start it with a "
                "letter or digit, then letters, digits, '.', '_' or '-', e.g. BH1-2.5)",
                what, show(f->text, t));
        return false;
    default:
        problem(p, SG_EPARSE, f->line, f->col,
                "%s '%s' has characters other than letters, digits, '.', '_' and '-' (%s)", what,
                show(f->text, t), hint);
        return false;
    }
}

/* ---- rows ------------------------------------------------------------------------ */

static struct sg_srcpos pos_of(const struct field *f)
{
    return (struct sg_srcpos){f->line, f->col};
}

static void key_slot(struct sg_record *r, enum key k, double **num, bool **has, struct sg_srcpos **pos)
{
    *num = NULL;
    *has = NULL;
    *pos = NULL;
    switch (k) {
    case K_ID: *pos = &r->pos_id; break;
    case K_METHOD: *pos = &r->pos_method; break;
    case K_DATE: *pos = &r->pos_date; break;
    case K_PARTICLE_DENSITY: *num = &r->particle_density_mg_m3; *pos = &r->pos_particle_density; break;
    case K_SAMPLE_MASS: *num = &r->sample_dry_mass_g; *pos = &r->pos_sample_mass; break;
    case K_SPLIT_APERTURE: *num = &r->split_aperture_mm; *pos = &r->pos_split_aperture; break;
    case K_SPECIMEN_MASS: *num = &r->specimen_dry_mass_g; *pos = &r->pos_specimen_mass; break;
    case K_VOLUME: *num = &r->suspension_volume_ml; *pos = &r->pos_volume; break;
    case K_HYDROMETER: *pos = &r->pos_hydrometer; break;
    case K_CYLINDER: *pos = &r->pos_cylinder; break;
    case K_THERMOMETER: *pos = &r->pos_thermometer; break;
    case K_PIPETTE_ID: *pos = &r->pos_pipette_id; break;
    case K_SCALE: *pos = &r->pos_scale; break;
    case K_DEPTH_LINE: *num = r->depth_line_mm; *has = &r->has_depth_line; *pos = &r->pos_depth_line; break;
    case K_MENISCUS: *num = &r->meniscus_correction; *has = &r->has_meniscus; *pos = &r->pos_meniscus; break;
    case K_COMPOSITE:
        *num = &r->composite_correction; *has = &r->has_composite; *pos = &r->pos_composite; break;
    case K_PIPETTE_VOLUME:
        *num = &r->pipette_volume_ml; *has = &r->has_pipette_volume; *pos = &r->pos_pipette_volume; break;
    case K_DISPERSANT:
        *num = &r->dispersant_mass_g; *has = &r->has_dispersant; *pos = &r->pos_dispersant; break;
    case K_LIQUID_LIMIT: *num = &r->liquid_limit_pct; *has = &r->has_liquid_limit; break;
    case K_PLASTIC_LIMIT: *num = &r->plastic_limit_pct; *has = &r->has_plastic_limit; break;
    case K_NATURAL_MOISTURE: *num = &r->natural_moisture_pct; *has = &r->has_natural_moisture; break;
    case K_STANDARD: *pos = &r->pos_standard; break;
    case K_U_READING: *num = &r->u.reading; break;
    case K_U_TEMP: *num = &r->u.temp_c; break;
    case K_U_ELAPSED: *num = &r->u.elapsed_min; break;
    case K_U_MASS: *num = &r->u.mass_g; break;
    case K_U_PARTICLE_DENSITY: *num = &r->u.particle_density_mg_m3; break;
    case K_U_BLANK: *num = &r->u.blank_reading; break;
    case K_U_MENISCUS: *num = &r->u.meniscus_correction; break;
    case K_U_PIPETTE_VOLUME: *num = &r->u.pipette_volume_ml; break;
    case K_U_SOLIDS: *num = &r->u.solids_g; break;
    case K_U_DEPTH: *num = &r->u.depth_mm; break;
    case K_COUNT: break;
    }
}

/* The name of entry i of a table whose entries (stride bytes each) begin
 * with their name (struct keyinfo, struct kindinfo). */
static const char *name_at(const void *table, size_t stride, size_t i)
{
    return *(const char *const *)(const void *)((const char *)table + i * stride);
}

/* Looks a word up in a table of names (case-insensitive; the names are
 * lower case); returns its index or n, with *nearest the index of the
 * closest name by edit distance. */
static size_t lookup(const char *word, const void *table, size_t stride, size_t n, size_t *nearest)
{
    /* the names differ even ignoring case, so the one written exactly (as
     * nearly always) is the only match and is looked for first */
    for (size_t i = 0; i < n; i++) {
        const char *name = name_at(table, stride, i);
        if (name[0] == word[0] && strcmp(word, name) == 0)
            return i;
    }
    const int first = lower((unsigned char)word[0]);
    for (size_t i = 0; i < n; i++) {
        const char *name = name_at(table, stride, i);
        if (name[0] == first && same_word(word, name))
            return i;
    }
    size_t best = 0, best_d = (size_t)-1;
    for (size_t i = 0; i < n; i++) {
        const size_t d = edit_distance(word, name_at(table, stride, i));
        if (d < best_d) {
            best_d = d;
            best = i;
        }
    }
    *nearest = best;
    return n;
}

/* The current row, its problem reported, is left out of the record: notes
 * the part of the record it would have given (from its kind and, for a test
 * row, its key, as far as they were read) so that validation does not also
 * call that part missing. An unknown kind or key notes nothing: then the
 * part the row was meant to give is reported missing too, which is true. */
static void refuse_row(struct rp *p)
{
    if (p->nf == 0 || p->f[0].len == 0)
        return;
    size_t near = 0;
    const size_t ki = lookup(p->f[0].text, KINDS, sizeof KINDS[0], R_COUNT, &near);
    if (ki == R_COUNT)
        return;
    if (ki != R_TEST) {
        p->rec->refused |= KINDS[ki].part;
        return;
    }
    if (p->nf < 2 || p->f[1].len == 0)
        return;
    const size_t k = lookup(p->f[1].text, KEYS, sizeof KEYS[0], K_COUNT, &near);
    if (k < K_COUNT)
        p->rec->refused |= KEYS[k].part;
}

/* Checks a row's value against its accepted range (record.h), reporting a
 * problem at the value's own field. */
static bool in_range(struct rp *p, enum sg_record_value which, double v, const struct field *f)
{
    struct sg_error e;
    if (sg_record_check_value(which, v, pos_of(f), &e) == SG_OK)
        return true;
    add_problem(p, &e);
    return false;
}

static void test_row(struct rp *p)
{
    const struct field *fk = &p->f[1];
    char t[SHOW_BUF];
    if (fk->len == 0) {
        problem(p, SG_EPARSE, fk->line, fk->col, "key is empty (write 'test,<key>,<value>', e.g. 'test,id,BH1-2.5')");
        return;
    }
    size_t near = 0;
    const size_t ki = lookup(fk->text, KEYS, sizeof KEYS[0], K_COUNT, &near);
    if (ki == K_COUNT) {
        problem(p, SG_EPARSE, fk->line, fk->col, "unknown key '%s' (did you mean '%s'?)", show(fk->text, t),
                KEYS[near].name);
        return;
    }
    const enum key k = (enum key)ki;
    const struct keyinfo *ko = &KEYS[k];
    if (p->key_line[k] != 0) {
        problem(p, SG_EPARSE, fk->line, fk->col, "key '%s' is given twice (first on line %u; keep one)", ko->name,
                p->key_line[k]);
        return;
    }
    p->key_line[k] = fk->line;

    const size_t want = ko->type == V_NUM2 ? 2 : 1, nvals = p->nf_eff - 2;
    if (nvals < want) {
        problem(p, SG_EPARSE, fk->line, fk->col,
                "key '%s' needs two values, 1 given (write 'test,depth_line_mm,<depth at reading 0 in mm>,"
                "<change per reading unit in mm>')",
                ko->name);
        p->rec->refused |= ko->part;
        return;
    }
    if (nvals > want) {
        const struct field *fx = &p->f[2 + want];
        problem(p, SG_EPARSE, fx->line, fx->col, "key '%s' takes %s value, %zu given (remove the extra fields)",
                ko->name, want == 1 ? "one" : "two", nvals);
        p->rec->refused |= ko->part;
        return;
    }

    struct sg_record *r = p->rec;
    const struct field *fv = &p->f[2];
    double *num = NULL;
    bool *has = NULL;
    struct sg_srcpos *pos = NULL;
    key_slot(r, k, &num, &has, &pos);
    bool ok = false;
    switch (ko->type) {
    case V_ID:
        ok = name_value(p, fv, "test id", "it names the output files; e.g. BH1-2.5", true, r->id);
        break;
    case V_NAME: {
        static const char *const what[] = {"hydrometer ID", "cylinder ID", "thermometer ID", "pipette ID"};
        char *const dst[] = {r->hydrometer, r->cylinder, r->thermometer, r->pipette_id};
        const size_t w = k == K_HYDROMETER ? 0 : k == K_CYLINDER ? 1 : k == K_THERMOMETER ? 2 : 3;
        ok = name_value(p, fv, what[w], "use the instrument's ID in the calibration register", false, dst[w]);
        break;
    }
    case V_METHOD:
        if (same_word(fv->text, "hydrometer"))
            r->method = SG_METHOD_HYDROMETER, ok = true;
        else if (same_word(fv->text, "pipette"))
            r->method = SG_METHOD_PIPETTE, ok = true;
        else
            problem(p, SG_EPARSE, fv->line, fv->col, "method '%s' is not known (write hydrometer or pipette)",
                    show(fv->text, t));
        break;
    case V_SCALE:
        if (same_word(fv->text, "g_per_l"))
            r->scale = SG_SCALE_G_PER_L, ok = true;
        else if (same_word(fv->text, "density"))
            r->scale = SG_SCALE_DENSITY, ok = true;
        else
            problem(p, SG_EPARSE, fv->line, fv->col,
                    "reading scale '%s' is not known (write g_per_l for grams of soil per litre or density "
                    "for (density - 1) x 1000)",
                    show(fv->text, t));
        break;
    case V_STANDARD:
        for (int s = SG_STANDARD_ASTM_D7928; s <= SG_STANDARD_ISO17892_4 && !ok; s++)
            if (same_word(fv->text, sg_standard_name((enum sg_standard)s)))
                r->standard = (enum sg_standard)s, ok = true;
        if (!ok)
            problem(p, SG_EPARSE, fv->line, fv->col,
                    "standard '%s' is not known (write astm-d7928, bs1377-2 or iso17892-4, or leave the key "
                    "out for exact physics)",
                    show(fv->text, t));
        break;
    case V_DATE: {
        struct sg_error de;
        if (sg_date_parse(fv->text, &r->date, &de) == SG_OK)
            ok = true;
        else
            problem(p, SG_EPARSE, fv->line, fv->col, "%s", de.msg);
        break;
    }
    case V_NUM2: {
        double v[2];
        const bool a = number(p, &p->f[2], &ko->num, &v[0]);
        const bool b = number(p, &p->f[3], &ko->num, &v[1]);
        if (a && b) {
            num[0] = v[0];
            num[1] = v[1];
            ok = true;
        }
        break;
    }
    case V_NUM: {
        double v = 0.0;
        if (number(p, fv, &ko->num, &v)) {
            if (ko->nonneg && v < 0.0) {
                problem(p, SG_EINVAL, fv->line, fv->col,
                        "%s %g %s must not be negative (give it in %s, 0 or more, e.g. %s)", ko->num.what, v,
                        ko->num.unit_words, ko->num.unit_words, ko->num.example);
            } else if (ko->nonneg && v > ko->max) {
                problem(p, SG_EINVAL, fv->line, fv->col,
                        "%s %g %s is above %g %s, the largest accepted (give it in %s, e.g. %s)", ko->num.what, v,
                        ko->num.unit_words, ko->max, ko->num.unit_words, ko->num.unit_words, ko->num.example);
            } else {
                *num = v;
                ok = true;
            }
        }
        break;
    }
    }
    if (ok) {
        if (has != NULL)
            *has = true;
        if (pos != NULL)
            *pos = pos_of(fv);
    } else {
        p->rec->refused |= ko->part;
    }
}

/* Row values are checked against their accepted ranges here, where each
 * field's column is known, so that a problem is located at the value that
 * is wrong; a row with a problem is left out (and noted as refused).
 * sg_record_validate() checks the same ranges for records built in code. */
static void sieve_row(struct rp *p, bool fine)
{
    const struct field *fa = &p->f[1], *fm = &p->f[2];
    struct sg_sieve_row row = {.pos = pos_of(fa)};
    bool ok = true;
    if (same_word(fa->text, "pan"))
        row.aperture_mm = SG_SIEVE_PAN_MM;
    else
        ok = number(p, fa, &NS_APERTURE, &row.aperture_mm) &&
             in_range(p, SG_VALUE_SIEVE_APERTURE, row.aperture_mm, fa);
    ok = number(p, fm, &NS_RETAINED, &row.retained_g) && in_range(p, SG_VALUE_RETAINED_MASS, row.retained_g, fm) &&
         ok;
    if (!ok)
        p->rec->refused |= fine ? SG_PART_FINE_SIEVE : SG_PART_SIEVE;
    else if ((fine ? sg_record_add_fine_sieve(p->rec, row) : sg_record_add_sieve(p->rec, row)) != SG_OK)
        fatal(p, SG_ENOMEM);
}

static void reading_row(struct rp *p)
{
    struct sg_reading_row row = {.pos = pos_of(&p->f[1])};
    bool ok = number(p, &p->f[1], &NS_ELAPSED, &row.elapsed_min) &&
              in_range(p, SG_VALUE_ELAPSED, row.elapsed_min, &p->f[1]);
    ok = number(p, &p->f[2], &NS_READING, &row.reading) && in_range(p, SG_VALUE_READING, row.reading, &p->f[2]) &&
         ok;
    ok = number(p, &p->f[3], &NS_TEMP, &row.temp_c) && in_range(p, SG_VALUE_TEMP, row.temp_c, &p->f[3]) && ok;
    row.temp_col = p->f[3].col;
    if (p->nf_eff == 5) {
        row.has_blank = true;
        ok = number(p, &p->f[4], &NS_BLANK, &row.blank_reading) &&
             in_range(p, SG_VALUE_BLANK, row.blank_reading, &p->f[4]) && ok;
    }
    if (!ok)
        p->rec->refused |= SG_PART_READING;
    else if (sg_record_add_reading(p->rec, row) != SG_OK)
        fatal(p, SG_ENOMEM);
}

static void pipette_row(struct rp *p)
{
    struct sg_pipette_row row = {.pos = pos_of(&p->f[1])};
    bool ok = number(p, &p->f[1], &NS_ELAPSED, &row.elapsed_min) &&
              in_range(p, SG_VALUE_ELAPSED, row.elapsed_min, &p->f[1]);
    ok = number(p, &p->f[2], &NS_TEMP, &row.temp_c) && in_range(p, SG_VALUE_TEMP, row.temp_c, &p->f[2]) && ok;
    ok = number(p, &p->f[3], &NS_DEPTH, &row.depth_mm) &&
         in_range(p, SG_VALUE_SAMPLING_DEPTH, row.depth_mm, &p->f[3]) && ok;
    ok = number(p, &p->f[4], &NS_SOLIDS, &row.solids_g) && in_range(p, SG_VALUE_SOLIDS, row.solids_g, &p->f[4]) &&
         ok;
    if (!ok)
        p->rec->refused |= SG_PART_PIPETTE;
    else if (sg_record_add_pipette(p->rec, row) != SG_OK)
        fatal(p, SG_ENOMEM);
}

static void process_row(struct rp *p)
{
    const size_t n = p->nf_eff;
    if (n == 0)
        return; /* a row of empty fields: a blank line from a spreadsheet */
    const struct field *f0 = &p->f[0];
    if (f0->text[0] == '#')
        return; /* a comment that a spreadsheet put in quotes */
    if (++p->rows > SG_RECORDIO_MAX_ROWS) {
        problem(p, SG_ELIMIT, f0->line, f0->col, "more than %u data rows (a test record holds one test; check the file)",
                SG_RECORDIO_MAX_ROWS);
        fatal(p, SG_ELIMIT);
        return;
    }
    /* Mixed separators: the other separator shows up inside a field. With ';'
     * a comma may be a decimal comma, so only the row kind is looked at. */
    const size_t look = p->delim == ',' ? (n < ROW_FIELDS_MAX ? n : ROW_FIELDS_MAX) : 1;
    for (size_t i = 0; i < look; i++) {
        const size_t kept = p->f[i].len < FIELD_TEXT_MAX - 1 ? p->f[i].len : FIELD_TEXT_MAX - 1; /* = strlen */
        const char *o = memchr(p->f[i].text, p->other, kept);
        if (o != NULL) {
            problem(p, SG_EPARSE, p->f[i].line, p->f[i].col,
                    "line %u uses '%c' as the separator but line %u set '%c' (the first data row decides; "
                    "use one separator in the whole file)",
                    p->f[i].line, p->other, p->delim_line, p->delim);
            refuse_row(p);
            return;
        }
    }
    if (n == 1 && strchr(f0->text, '\t') != NULL) {
        problem(p, SG_EPARSE, f0->line, f0->col,
                "line %u separates its fields with tabs (separate them with ',' or ';')", f0->line);
        return;
    }
    char t[SHOW_BUF];
    if (f0->len == 0) {
        problem(p, SG_EPARSE, f0->line, f0->col,
                "row kind is empty (the first field of a row is test, sieve, fine_sieve, reading or pipette)");
        return;
    }
    size_t near = 0;
    const size_t ki = lookup(f0->text, KINDS, sizeof KINDS[0], R_COUNT, &near);
    if (ki == R_COUNT) {
        problem(p, SG_EPARSE, f0->line, f0->col,
                "unknown row kind '%s' (did you mean '%s'? rows are test, sieve, fine_sieve, reading and pipette)",
                show(f0->text, t), KINDS[near].name);
        return;
    }
    const struct kindinfo *kd = &KINDS[ki];
    if (n < kd->min_fields || n > kd->max_fields) {
        const struct field *at = n > kd->max_fields && kd->max_fields < ROW_FIELDS_MAX ? &p->f[kd->max_fields] : f0;
        problem(p, SG_EPARSE, at->line, at->col, "row '%s' has %zu field%s, expected %s", kd->name, n,
                n == 1 ? "" : "s", kd->expected);
        refuse_row(p);
        return;
    }
    switch ((enum kind)ki) {
    case R_TEST: test_row(p); break;
    case R_SIEVE: sieve_row(p, false); break;
    case R_FINE_SIEVE: sieve_row(p, true); break;
    case R_READING: reading_row(p); break;
    case R_PIPETTE: pipette_row(p); break;
    case R_COUNT: break;
    }
}

/* ---- libcsv callbacks ------------------------------------------------------------ */

static void cb_field(void *data, size_t len, void *ctx)
{
    struct rp *p = ctx;
    const unsigned char *b = data;
    size_t k = p->nf++;
    while (len > 0 && is_blank(b[0]))
        b++, len--;
    while (len > 0 && is_blank(b[len - 1]))
        len--;
    if (len > 0)
        p->nf_eff = k + 1;
    if (k < ROW_FIELDS_MAX) {
        struct field *f = &p->f[k];
        const size_t keep = len < FIELD_TEXT_MAX - 1 ? len : FIELD_TEXT_MAX - 1;
        if (keep > 0)
            memcpy(f->text, b, keep);
        f->text[keep] = '\0';
        f->len = len;
        f->line = p->fline;
        f->col = p->fcol;
    }
    /* The next field starts after this byte (a separator). */
    p->fpending = true;
    p->fline = p->cur.line;
    p->fcol = p->cur.col + 1;
}

static void cb_row(int c, void *ctx)
{
    (void)c;
    struct rp *p = ctx;
    if (!p->stop)
        process_row(p);
    p->nf = 0;
    p->nf_eff = 0;
    p->row_open = false;
}

/* ---- the text as a whole --------------------------------------------------------- */


/* Refuses binary and non-UTF-8 text with one located message. */
static bool check_text(struct rp *p)
{
    if (p->n >= 2 && ((p->s[0] == 0xFF && p->s[1] == 0xFE) || (p->s[0] == 0xFE && p->s[1] == 0xFF))) {
        problem(p, SG_EPARSE, 1, 1, "the file is UTF-16 text, not UTF-8; save the file as UTF-8");
        return false;
    }
    /* One pass over the bytes without line and column tracking; the
     * position is worked out only for a byte that is refused. */
    const unsigned char *s = p->s;
    size_t i = p->cur.i, chunk_end = i;
    while (i < p->n) {
        if (i >= chunk_end && i + sizeof(uint64_t) <= p->n) {
            /* eight bytes at a time while all are printable ASCII (0x20-0x7E):
             * no high bit, none below 0x20, none equal to 0x7F (the usual
             * "has a byte less than n" word tests, no false negatives) */
            uint64_t w;
            memcpy(&w, s + i, sizeof w);
            const uint64_t ones = 0x0101010101010101ull, high = 0x8080808080808080ull;
            const uint64_t del = w ^ (0x7F * ones);
            if (((w | ((w - 0x20 * ones) & ~w) | ((del - ones) & ~del)) & high) == 0) {
                i += sizeof w;
                continue;
            }
            chunk_end = i + sizeof w; /* byte by byte up to there */
        }
        const unsigned char b = s[i];
        if (b >= 0x20 && b < 0x7F) { /* printable ASCII, nearly every byte */
            i++;
            continue;
        }
        const bool control = b == 0 || (b < 0x20 && b != '\t' && b != '\n' && b != '\r') || b == 0x7F;
        const size_t len = control ? 0 : sg_utf8_len(s + i, p->n - i);
        if (len == 0) {
            struct cursor c = p->cur;
            while (c.i < i)
                step(&c, s, p->n);
            if (control)
                problem(p, SG_EPARSE, c.line, c.col,
                        "not a text file (byte 0x%02X at line %u, column %u): give a test record saved as CSV text",
                        b, c.line, c.col);
            else
                problem(p, SG_EPARSE, c.line, c.col,
                        "byte 0x%02X at line %u, column %u is not UTF-8 text; save the file as UTF-8%s", b, c.line,
                        c.col, b == 0xB0 ? " (0xB0 is the degree sign in Latin-1 and Windows-1252)" : "");
            return false;
        }
        i += len;
    }
    return true;
}

/* If the line at c is blank or a comment, moves c past it and returns true. */
static bool skip_if_comment(struct cursor *c, const unsigned char *s, size_t n)
{
    size_t j = c->i;
    while (j < n && is_blank(s[j]))
        j++;
    if (j < n && s[j] != '#' && s[j] != '\r' && s[j] != '\n')
        return false;
    skip_line(c, s, n);
    return true;
}

/* The separator: the first ',' or ';' on the first data row that has one
 * (rows of separators alone, a spreadsheet's blank rows, are passed over). */
static void choose_separator(struct rp *p)
{
    struct cursor c = p->cur;
    p->delim = ',';
    p->other = ';';
    p->delim_line = 0;
    while (c.i < p->n) {
        if (skip_if_comment(&c, p->s, p->n))
            continue;
        unsigned char sep = 0;
        bool content = false;
        for (size_t j = c.i; j < p->n && p->s[j] != '\n' && p->s[j] != '\r'; j++) {
            const unsigned char b = p->s[j];
            if ((b == ',' || b == ';') && sep == 0)
                sep = b;
            else if (b != ',' && b != ';' && !is_blank(b))
                content = true;
            if (sep != 0 && content)
                break;
        }
        if (sep != 0 && content) {
            p->delim = sep;
            p->other = sep == ',' ? ';' : ',';
            p->delim_line = c.line;
            return;
        }
        skip_line(&c, p->s, p->n);
    }
}

static void reset_csv(struct rp *p)
{
    csv_free(&p->csv);
    (void)csv_init(&p->csv, CSV_STRICT | CSV_STRICT_FINI);
    csv_set_delim(&p->csv, p->delim);
    p->nf = 0;
    p->nf_eff = 0;
    p->row_open = false;
}

/* Feeds s[from, from + len) to libcsv. at is the cursor at s[from]. On a
 * syntax error reports it, skips the rest of the line and returns false. */
static bool feed(struct rp *p, struct cursor at, size_t len)
{
    const size_t have = csv_get_buffer_size(&p->csv);
    csv_set_blk_size(&p->csv, have > CSV_BLOCK_MIN ? have : CSV_BLOCK_MIN); /* geometric growth */
    const size_t done = csv_parse(&p->csv, p->s + at.i, len, cb_field, cb_row, p);
    const int e = csv_error(&p->csv);
    if (done == len && e == CSV_SUCCESS)
        return true;
    if (e != CSV_EPARSE) {
        fatal(p, SG_ENOMEM);
        return false;
    }
    for (size_t k = 0; k < done; k++)
        step(&at, p->s, p->n);
    if (p->csv.quoted)
        problem(p, SG_EPARSE, at.line, at.col,
                "text after the closing quote of a field (put the whole field inside the quotes, or remove them)");
    else
        problem(p, SG_EPARSE, at.line, at.col,
                "quote character inside a field (remove it, or quote the whole field and double the quotes inside)");
    refuse_row(p);
    p->cur = at;
    skip_line(&p->cur, p->s, p->n);
    reset_csv(p);
    return false;
}

static bool special(const struct rp *p, unsigned char c)
{
    return c == p->delim || c == '"' || c == '\r' || c == '\n';
}

static void split_rows(struct rp *p)
{
    while (p->cur.i < p->n && !p->stop) {
        if (p->cur.col == 1 && !p->row_open) {
            if (skip_if_comment(&p->cur, p->s, p->n))
                continue;
            p->fpending = true;
            p->fline = p->cur.line;
            p->fcol = 1;
        }
        /* A run of ordinary bytes: no line end inside, so the column moves
         * by one per character (UTF-8 continuation bytes do not count). */
        const struct cursor at = p->cur;
        size_t j = at.i;
        unsigned col = at.col;
        while (j < p->n && !special(p, p->s[j])) {
            if (p->fpending && !is_blank(p->s[j])) {
                p->fline = at.line;
                p->fcol = col;
                p->fpending = false;
                p->row_open = true;
            }
            col += (p->s[j] & 0xC0u) != 0x80u;
            j++;
        }
        p->cur.i = j;
        p->cur.col = col;
        if (j == p->n) {
            if (j > at.i)
                (void)feed(p, at, j - at.i);
            break;
        }
        const unsigned char c = p->s[j];
        if (c == '"') { /* the run, then the quote on its own (it may open a field) */
            if (j > at.i && !feed(p, at, j - at.i))
                continue;
            if (p->fpending) {
                p->fline = p->cur.line;
                p->fcol = p->cur.col;
                p->fpending = false;
            }
            p->row_open = true;
            if (!feed(p, p->cur, 1))
                continue;
            step(&p->cur, p->s, p->n);
            continue;
        }
        /* The run and the separator or line end that closes it in one
         * call: libcsv reports the field (and row) at that last byte, with
         * the cursor on it as the field callback expects. */
        if (c != '\r' && c != '\n')
            p->row_open = true;
        if (!feed(p, at, j + 1 - at.i))
            continue;
        step(&p->cur, p->s, p->n);
        if ((c == '\r' || c == '\n') && p->csv.quoted) {
            problem(p, SG_EPARSE, p->fline, p->fcol,
                    "quoted field is not closed on line %u (add the closing '\"', or remove the quote)", p->fline);
            refuse_row(p);
            reset_csv(p);
        }
    }
    if (p->stop)
        return;
    if (csv_fini(&p->csv, cb_field, cb_row, p) != 0) {
        problem(p, SG_EPARSE, p->fline, p->fcol,
                "the file ends inside a quoted field opened at line %u, column %u (add the closing '\"')", p->fline,
                p->fcol);
        refuse_row(p);
    }
}

/* ---- checks after parsing -------------------------------------------------------- */

struct aperture_at {
    double mm;
    unsigned line, col;
};

static int by_mm_then_line(const void *a, const void *b)
{
    const struct aperture_at *x = a, *y = b;
    if (x->mm != y->mm)
        return (x->mm < y->mm) - (x->mm > y->mm);
    return (x->line > y->line) - (x->line < y->line);
}

static void duplicate_apertures(struct rp *p, const struct sg_sieve_row *rows, size_t n, const char *kind)
{
    if (n < 2)
        return;
    struct aperture_at *a = malloc(n * sizeof *a);
    if (a == NULL) {
        fatal(p, SG_ENOMEM);
        return;
    }
    for (size_t i = 0; i < n; i++)
        a[i] = (struct aperture_at){rows[i].aperture_mm, rows[i].pos.line, rows[i].pos.col};
    qsort(a, n, sizeof *a, by_mm_then_line);
    for (size_t i = 1; i < n; i++) {
        if (a[i].mm != a[i - 1].mm)
            continue;
        if (a[i].mm == SG_SIEVE_PAN_MM)
            problem(p, SG_EINVAL, a[i].line, a[i].col, "the %s pan is listed twice (first on line %u; merge the rows)",
                    kind, a[i - 1].line);
        else
            problem(p, SG_EINVAL, a[i].line, a[i].col,
                    "%s aperture %g mm is listed twice (first on line %u; merge the rows)", kind, a[i].mm,
                    a[i - 1].line);
    }
    free(a);
}

/* Checks that sg_record_validate() leaves out: the same aperture twice
 * (validation has no order of rows to name the first). */
static void extra_checks(struct rp *p)
{
    const struct sg_record *r = p->rec;
    duplicate_apertures(p, r->sieve, r->n_sieve, "sieve");
    duplicate_apertures(p, r->fine_sieve, r->n_fine_sieve, "fine_sieve");
}

static void validate(struct rp *p)
{
    struct sg_diag_list vd = {0};
    struct sg_error first;
    sg_error_clear(&first);
    if (sg_record_validate(p->rec, &vd, &first) != SG_OK) {
        if (vd.n == 0) /* the list could not grow: keep the first problem at least */
            add_problem(p, &first);
        for (size_t i = 0; i < vd.n && !p->stop; i++)
            add_problem(p, &vd.items[i]);
    }
    sg_diag_release(&vd);
}

/* ---- entry points ---------------------------------------------------------------- */

enum sg_status sg_recordio_parse(const char *text, size_t len, struct sg_record *rec, struct sg_diag_list *diags,
                                 struct sg_error *err)
{
    sg_error_clear(err);
    struct rp *p = calloc(1, sizeof *p);
    if (p == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reading the test record");
    p->s = (const unsigned char *)(text != NULL ? text : "");
    p->n = text != NULL ? len : 0;
    p->cur = (struct cursor){0, 1, 1};
    p->rec = rec;
    p->diags = diags;
    p->err = err;
    (void)csv_init(&p->csv, CSV_STRICT | CSV_STRICT_FINI);

    if (p->n > SG_RECORDIO_MAX_BYTES) {
        problem(p, SG_ELIMIT, 0, 0, "test record is %zu bytes, larger than the limit of %zu bytes (16 MiB)", p->n,
                SG_RECORDIO_MAX_BYTES);
        fatal(p, SG_ELIMIT);
        goto cleanup;
    }
    if (p->n >= 3 && p->s[0] == 0xEF && p->s[1] == 0xBB && p->s[2] == 0xBF)
        p->cur.i = 3; /* UTF-8 byte-order mark */
    if (!check_text(p))
        goto cleanup;
    choose_separator(p);
    csv_set_delim(&p->csv, p->delim);
    split_rows(p);
    if (p->stop)
        goto cleanup;
    if (p->rows == 0) {
        if (!p->syntax)
            problem(p, SG_EPARSE, 1, 1,
                    "no data rows: the file is empty or holds only comments (a test record has rows such as "
                    "'test,id,<test id>')");
        goto cleanup;
    }
    /* Rows with problems were reported and left out (rec->refused says
     * which parts they were): the rest of the record is still checked, so
     * that one problem does not hide the others. */
    extra_checks(p);
    if (!p->stop)
        validate(p);

cleanup:
    csv_free(&p->csv);
    enum sg_status st = p->fatal != SG_OK ? p->fatal : p->syntax ? SG_EPARSE : p->value_bad ? SG_EINVAL : SG_OK;
    if (st == SG_ENOMEM && err != NULL && (err->code == SG_OK || p->nprob == 0))
        sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reading the test record");
    free(p);
    return st;
}

static enum sg_status io_error(struct sg_error *err, const char *what, const char *path, int errnum)
{
    char reason[128];
    if (strerror_r(errnum, reason, sizeof reason) != 0)
        snprintf(reason, sizeof reason, "error %d", errnum);
    return sg_error_set(err, SG_EIO, 0, 0, "cannot %s '%s': %s (check the path and its permissions)", what, path,
                        reason);
}

enum sg_status sg_recordio_read_file(const char *path, char **text, size_t *len, struct sg_error *err)
{
    *text = NULL;
    *len = 0;
    enum sg_status st = SG_OK;
    char *buf = NULL;
    size_t n = 0;
    int fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0)
        return io_error(err, "open", path, errno);
    struct stat sb;
    if (fstat(fd, &sb) != 0) {
        st = io_error(err, "read", path, errno);
        goto cleanup;
    }
    if (S_ISDIR(sb.st_mode)) {
        st = io_error(err, "read", path, EISDIR);
        goto cleanup;
    }
    if (S_ISREG(sb.st_mode) && (unsigned long long)sb.st_size > SG_RECORDIO_MAX_BYTES) {
        st = sg_error_set(err, SG_ELIMIT, 0, 0,
                          "file '%s' is %lld bytes (%.1f MiB), larger than the %zu-byte (16 MiB) limit for a test "
                          "record (give the record of one test)",
                          path, (long long)sb.st_size, (double)sb.st_size / (1024.0 * 1024.0), SG_RECORDIO_MAX_BYTES);
        goto cleanup;
    }
    /* Regular files: their size plus one byte to see the end; others grow as they go. */
    size_t cap = S_ISREG(sb.st_mode) ? (size_t)sb.st_size + 1 : READ_CHUNK;
    buf = malloc(cap + 1);
    if (buf == NULL) {
        st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reading '%s'", path);
        goto cleanup;
    }
    for (;;) {
        if (n == cap) {
            if (cap > SG_RECORDIO_MAX_BYTES) {
                st = sg_error_set(err, SG_ELIMIT, 0, 0,
                                  "file '%s' is larger than the %zu-byte (16 MiB) limit for a test record (give "
                                  "the record of one test)",
                                  path, SG_RECORDIO_MAX_BYTES);
                goto cleanup;
            }
            size_t ncap = cap * 2 > SG_RECORDIO_MAX_BYTES + 1 ? SG_RECORDIO_MAX_BYTES + 1 : cap * 2;
            char *nb = realloc(buf, ncap + 1);
            if (nb == NULL) {
                st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory reading '%s'", path);
                goto cleanup;
            }
            buf = nb;
            cap = ncap;
        }
        const ssize_t got = read(fd, buf + n, cap - n);
        if (got < 0) {
            if (errno == EINTR)
                continue;
            st = io_error(err, "read", path, errno);
            goto cleanup;
        }
        if (got == 0)
            break;
        n += (size_t)got;
        if (S_ISREG(sb.st_mode) && n == (size_t)sb.st_size)
            break; /* all the bytes the file held when opened: no read just to see the end */
    }
    if (n > SG_RECORDIO_MAX_BYTES) {
        st = sg_error_set(err, SG_ELIMIT, 0, 0,
                          "file '%s' is larger than the %zu-byte (16 MiB) limit for a test record (give the record "
                          "of one test)",
                          path, SG_RECORDIO_MAX_BYTES);
        goto cleanup;
    }
    buf[n] = '\0';
    *text = buf;
    *len = n;
    buf = NULL;
cleanup:
    free(buf);
    close(fd);
    return st;
}

enum sg_status sg_recordio_load(const char *path, struct sg_record *rec, struct sg_diag_list *diags,
                                struct sg_error *err)
{
    char *text = NULL;
    size_t len = 0;
    struct sg_error e;
    enum sg_status st = sg_recordio_read_file(path, &text, &len, &e);
    if (st != SG_OK) {
        if (err != NULL)
            *err = e;
        (void)sg_diag_add(diags, &e);
        return st;
    }
    st = sg_recordio_parse(text, len, rec, diags, err);
    free(text);
    return st;
}
