// main.cpp - the single header from C++: the same values as check.c.
// With PSIK_STATIC (or IMPL) the implementation is compiled here as C++20;
// otherwise it comes from impl.c compiled as C.
#if defined(IMPL) && !defined(PSIK_STATIC)
#  define PSIK_IMPLEMENTATION
#endif
#include "psik_single.h"
#include <cstdio>
#include "values.h"

int main()
{
    int n = psik_values_print(stdout);
    std::fprintf(stderr, "%d lines\n", n);
    return n > 0 ? 0 : 1;
}
