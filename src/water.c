/* water.c - water density (Tanaka et al. 2001) and viscosity (IAPWS 2008). */
#include "sedgrade/water.h"

#include <math.h>

#include "sedgrade/constants.h"

double sg_water_density_kg_m3(double temp_c)
{
    /* Tanaka, Girard, Davis, Peuto, Bignell, Metrologia 38 (2001) 301, eq. 1. */
    static const double a1 = -3.983035, a2 = 301.797, a3 = 522528.9, a4 = 69.34881,
                        a5 = 999.974950;
    const double t = temp_c;
    return a5 * (1.0 - (t + a1) * (t + a1) * (t + a2) / (a3 * (t + a4)));
}

double sg_water_viscosity_iapws_pa_s(double temp_k, double density_kg_m3)
{
    /* IAPWS R12-08 (2008), eqs. 11 and 12 with Tables 1 and 2. */
    static const double h0[4] = {1.67752, 2.20462, 0.6366564, -0.241605};
    static const double h1[6][7] = {
        {5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0.0, 0.0},
        {8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0.0, 0.0, 0.0},
        {-1.08374, 1.88797, -7.72479e-1, 0.0, 0.0, 0.0, 0.0},
        {-2.89555e-1, 1.26613, -4.89837e-1, 0.0, 6.98452e-2, 0.0, -4.35673e-3},
        {0.0, 0.0, -2.57040e-1, 0.0, 0.0, 8.72102e-3, 0.0},
        {0.0, 1.20573e-1, 0.0, 0.0, 0.0, 0.0, -5.93264e-4},
    };
    const double tr = temp_k / SG_IAPWS_T_STAR_K;
    const double rr = density_kg_m3 / SG_IAPWS_RHO_STAR_KG_M3;

    /* sum of H_i / Tr^i, the powers built by multiplication (Tr^0, Tr^1
     * and Tr^2 are exactly what pow() gives, Tr^3 within an ulp) */
    double s0 = 0.0, tri = 1.0;
    for (int i = 0; i < 4; i++) {
        s0 += h0[i] / tri;
        tri *= tr;
    }
    const double mu0 = 100.0 * sqrt(tr) / s0;

    const double x = 1.0 / tr - 1.0;
    const double y = rr - 1.0;
    /* The rows of the table as sums of their non-zero terms, in the
     * table's order, with (rho_r - 1)^j built by the same products as a
     * running power: adding the table's exact zeros changes no bit, so the
     * sum is the full table's. */
    const double y2 = y * y, y3 = y2 * y, y4 = y3 * y, y5 = y4 * y, y6 = y5 * y;
    const double inner[6] = {
        h1[0][0] + h1[0][1] * y + h1[0][2] * y2 + h1[0][3] * y3 + h1[0][4] * y4,
        h1[1][0] + h1[1][1] * y + h1[1][2] * y2 + h1[1][3] * y3,
        h1[2][0] + h1[2][1] * y + h1[2][2] * y2,
        h1[3][0] + h1[3][1] * y + h1[3][2] * y2 + h1[3][4] * y4 + h1[3][6] * y6,
        h1[4][2] * y2 + h1[4][5] * y5,
        h1[5][1] * y + h1[5][6] * y6,
    };
    /* sum of (1/Tr - 1)^i times row i, written out (a loop costs a third
     * of the function's instructions; it runs a dozen times per Monte
     * Carlo draw) with the same running power and the same order of
     * additions as the loop from 0, so the same bits */
    const double x2 = x * x, x3 = x2 * x, x4 = x3 * x, x5 = x4 * x;
    const double s1 = inner[0] + x * inner[1] + x2 * inner[2] + x3 * inner[3] + x4 * inner[4] + x5 * inner[5];
    const double mu1 = exp(rr * s1);
    return mu0 * mu1 * SG_IAPWS_MU_STAR_PA_S;
}

double sg_water_viscosity_pa_s(double temp_c)
{
    return sg_water_viscosity_iapws_pa_s(temp_c + SG_KELVIN_OFFSET, sg_water_density_kg_m3(temp_c));
}

enum sg_status sg_water_properties(double temp_c, double *density_kg_m3, double *viscosity_pa_s,
                                   struct sg_error *err)
{
    if (!isfinite(temp_c) || temp_c < SG_WATER_TEMP_MIN_C || temp_c > SG_WATER_TEMP_MAX_C)
        return sg_error_set(err, SG_EDOM, 0, 0,
                            "temperature %g C is outside %g-%g C where water properties are defined "
                            "(check the thermometer reading and its units)",
                            temp_c, SG_WATER_TEMP_MIN_C, SG_WATER_TEMP_MAX_C);
    const double rho = sg_water_density_kg_m3(temp_c);
    if (density_kg_m3 != NULL)
        *density_kg_m3 = rho;
    if (viscosity_pa_s != NULL)
        *viscosity_pa_s = sg_water_viscosity_iapws_pa_s(temp_c + SG_KELVIN_OFFSET, rho);
    return SG_OK;
}
