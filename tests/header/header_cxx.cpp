// The public header compiles as C++ and links against the C library.
#include "psik.h"
#include <cstdio>

int main()
{
    psik_model m;
    // loam, Carsel & Parrish (1988) class mean (from memory), cm and cm/day
    if (psik_vgm(&m, 0.078, 0.43, 0.036, 1.56, 24.96) != PSIK_OK) {
        std::printf("cxx_header: 0 passed, 1 failed\n");
        return 1;
    }
    double th = psik_theta(&m, -100.0);
    bool ok = th > 0.078 && th < 0.43 && psik_theta(&m, 0.0) == 0.43;
    std::printf("cxx_header: %d passed, %d failed\n", ok ? 1 : 0, ok ? 0 : 1);
    return ok ? 0 : 1;
}
