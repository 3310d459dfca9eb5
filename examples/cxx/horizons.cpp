// horizons.cpp - retention and conductivity of two soil horizons, side by side.
//
// Scenario (invented): the Farnwick drainage trial logs pressure heads in a
// sandy topsoil over a clay-loam subsoil and wants, for each logged head, the
// water content and conductivity of both horizons and the head-based flux
// limit K(h) of the slower one. Units: cm and cm/day.
// Parameters: van Genuchten-Mualem class values (Carsel & Parrish 1988,
// from memory) for loamy sand and clay loam, l = 0.5.
//
// Build:  c++ -std=c++11 horizons.cpp $(pkg-config --cflags --libs psik)
#include "psik.hpp"

#include <cstdio>
#include <vector>

int main()
{
    try {
        const psik::Model top("vgm", {0.057, 0.41, 0.124, 2.28, 350.2, 0.5});
        const psik::Model sub("vgm", {0.095, 0.41, 0.019, 1.31, 6.24, 0.5});
        const std::vector<double> heads = {-1.0, -10.0, -30.0, -100.0, -300.0, -1000.0, -15000.0};
        const std::vector<double> k_top = top.k(heads), k_sub = sub.k(heads);

        std::printf("%10s %10s %12s %10s %12s %12s\n", "h (cm)", "theta top", "K top",
                    "theta sub", "K sub", "limit");
        for (size_t i = 0; i < heads.size(); i++) {
            double lim = k_top[i] < k_sub[i] ? k_top[i] : k_sub[i];
            std::printf("%10.1f %10.6f %12.5e %10.6f %12.5e %12.5e\n", heads[i],
                        top.theta(heads[i]), k_top[i], sub.theta(heads[i]), k_sub[i], lim);
        }
        // a wrong entry is reported with the library's sentence
        try {
            psik::Model bad("vgm", {0.095, 0.41, 0.019, 0.8, 6.24, 0.5});
        } catch (const psik::Error &e) {
            std::printf("refused: %s\n", e.what());
        }
    } catch (const psik::Error &e) {
        std::fprintf(stderr, "horizons: %s\n", e.what());
        return 1;
    }
    return 0;
}
