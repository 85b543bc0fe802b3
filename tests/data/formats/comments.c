/* The parser reads one record at a time
 * and keeps the buffer small. */
#include <stdio.h>
#define LIMIT 64

// Count the records in a stream.
static int count(const char *s) {
    char quote = '"'; // a lone quote character
    const char *p = "text with // inside";
    return p[0] == '\'' ? 1 : 0; /* trailing block note */
}
