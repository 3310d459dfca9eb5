/* csv.h - the psik tool's reader for small numeric CSV tables.
 *
 * Format: '#' starts a comment line (also after leading blanks); blank
 * lines are skipped; the first other line is the header, naming the
 * columns (letters, digits, '_', case-insensitive, trimmed); every later
 * line has one finite number per column, separated by commas. Line ends
 * may be LF or CRLF. Errors name the file, the line and the column (1-based).
 */
#ifndef PSIK_CLI_CSV_H
#define PSIK_CLI_CSV_H

#include <stddef.h>

#define CSV_MAXCOL 16
#define CSV_NAMELEN 32

typedef struct csv_table {
    int ncol;
    char name[CSV_MAXCOL][CSV_NAMELEN];  /* lower case */
    size_t nrow;
    double *v;      /* nrow x ncol, row-major */
    long *line;     /* file line of each row */
} csv_table;

/* Parse len bytes (not necessarily NUL-terminated). fname is used in
 * messages only. Returns 0, or -1 with err = "FILE:LINE:COL: what". The
 * table is empty (and needs no csv_free) after an error. */
int csv_parse(const char *buf, size_t len, const char *fname, csv_table *t,
              char *err, size_t cap);
/* Read and parse a file ("-" is standard input). Files above 64 MiB are refused. */
int csv_read_file(const char *path, csv_table *t, char *err, size_t cap);
void csv_free(csv_table *t);
/* Column index of name (lower case), or -1. */
int csv_col(const csv_table *t, const char *name);

#endif
