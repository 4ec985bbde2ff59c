/* utf8.h - UTF-8 well-formedness for the readers of text files (internal to
 * the I/O ring: the record reader and the calibration register reader). */
#ifndef SEDGRADE_IO_UTF8_H
#define SEDGRADE_IO_UTF8_H

#include <stddef.h>

/* Length of the well-formed UTF-8 sequence at s[0..n) (Unicode 15, table
 * 3-7: no overlong forms, no surrogates, nothing above U+10FFFF): 1 for an
 * ASCII byte, 2-4 for a multi-byte sequence, 0 if it is not well formed or
 * is cut short by n. n >= 1. */
size_t sg_utf8_len(const unsigned char *s, size_t n);

#endif
