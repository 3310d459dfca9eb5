/* presets.c - class-average van Genuchten-Mualem parameters for the twelve
 * USDA texture classes (psik_preset, psik_preset_name).
 *
 * Values: the texture-class means of Carsel & Parrish (1988), written from
 * memory (as listed in MODELS.md); units cm and cm/day. The tests check
 * that every preset initialises and behaves as a soil of its class should
 * (tests/unit/test_models.c).
 */
#include "psik_internal.h"

#include <string.h>

typedef struct preset {
    const char *name;
    double theta_r, theta_s, alpha, n, ks;   /* alpha 1/cm, ks cm/day */
} preset;

/* Carsel & Parrish (1988) class means (from memory). */
static const preset presets[] = {
    {"sand",            0.045, 0.43, 0.145, 2.68, 712.8},
    {"loamy sand",      0.057, 0.41, 0.124, 2.28, 350.2},
    {"sandy loam",      0.065, 0.41, 0.075, 1.89, 106.1},
    {"loam",            0.078, 0.43, 0.036, 1.56, 24.96},
    {"silt",            0.034, 0.46, 0.016, 1.37, 6.00},
    {"silt loam",       0.067, 0.45, 0.020, 1.41, 10.80},
    {"sandy clay loam", 0.100, 0.39, 0.059, 1.48, 31.44},
    {"clay loam",       0.095, 0.41, 0.019, 1.31, 6.24},
    {"silty clay loam", 0.089, 0.43, 0.010, 1.23, 1.68},
    {"sandy clay",      0.100, 0.38, 0.027, 1.23, 2.88},
    {"silty clay",      0.070, 0.36, 0.005, 1.09, 0.48},
    {"clay",            0.068, 0.38, 0.008, 1.09, 4.80},
};

#define NPRESETS ((int)(sizeof presets / sizeof presets[0]))

/* Case-insensitive match with '_' and '-' standing for ' '. */
static int same_name(const char *a, const char *b)
{
    for (;; a++, b++) {
        int ca = (unsigned char)*a, cb = (unsigned char)*b;
        if (ca == '_' || ca == '-')
            ca = ' ';
        if (ca >= 'A' && ca <= 'Z')
            ca += 'a' - 'A';
        if (ca != cb)
            return 0;
        if (ca == '\0')
            return 1;
    }
}

PSIK_API const char *psik_preset_name(int i)
{
    if (i < 0 || i >= NPRESETS)
        return NULL;
    return presets[i].name;
}

PSIK_API psik_status psik_preset(psik_model *m, const char *texture)
{
    int i;
    if (m == NULL)
        return PSIK_EINVAL;
    if (texture != NULL)
        for (i = 0; i < NPRESETS; i++)
            if (same_name(texture, presets[i].name)) {
                const preset *p = &presets[i];
                return psik_vgm(m, p->theta_r, p->theta_s, p->alpha, p->n, p->ks);
            }
    memset(m, 0, sizeof *m);
    return PSIK_EINVAL;
}
