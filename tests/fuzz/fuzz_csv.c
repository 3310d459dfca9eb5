/* fuzz_csv.c - libFuzzer target for the psik tool's CSV reader
 * (examples/cli/csv.c): arbitrary bytes must give a table or an error
 * message naming file:line, never a crash, leak or out-of-bounds access.
 * Invariants checked on success: at least one named column, every value
 * finite, row lines increasing. Build and run: make fuzz. */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include "csv.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    csv_table t;
    char err[512];
    size_t r;
    int c;
    if (csv_parse((const char *)data, size, "fuzz.csv", &t, err, sizeof err) != 0) {
        if (strncmp(err, "fuzz.csv:", 9) != 0)
            __builtin_trap();          /* every error names the file */
        return 0;
    }
    if (t.ncol < 1 || t.ncol > CSV_MAXCOL)
        __builtin_trap();
    for (c = 0; c < t.ncol; c++)
        if (t.name[c][0] == '\0' || strlen(t.name[c]) >= CSV_NAMELEN)
            __builtin_trap();
    for (r = 0; r < t.nrow; r++) {
        for (c = 0; c < t.ncol; c++)
            if (!isfinite(t.v[r * (size_t)t.ncol + (size_t)c]))
                __builtin_trap();
        if (r > 0 && t.line[r] <= t.line[r - 1])
            __builtin_trap();
    }
    csv_free(&t);
    return 0;
}
