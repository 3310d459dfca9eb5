/* impl.c - the one file that holds the implementation (PSIK_IMPLEMENTATION). */
#define PSIK_IMPLEMENTATION
#include "psik_single.h"
