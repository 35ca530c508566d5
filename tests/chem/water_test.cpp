// Water properties and the Davies model against the published tables (Marshall and Franck 1981; Kell 1975; Malmberg and Maryott 1956).
#include "pkarta/chem/water.h"

#include <gtest/gtest.h>

#include <cmath>

namespace pkarta {
namespace {

TEST(Water, PkwMatchesEvaluatedTables) {
  // Marshall & Franck 1981 (CRC Handbook 85th ed., p. 8-79): 25 °C 13.995; tolerance 0.002
  // at 25 °C and 0.015 elsewhere in 0-60 °C (spread between evaluations).
  EXPECT_NEAR(pkw(25), 13.995, 0.002);
  EXPECT_NEAR(pkw(0), 14.938, 0.015);
  EXPECT_NEAR(pkw(5), 14.727, 0.015);
  EXPECT_NEAR(pkw(37), 13.628, 0.015);
  EXPECT_NEAR(pkw(50), 13.275, 0.015);
  EXPECT_NEAR(pkw(60), 13.034, 0.02);
}

TEST(Water, DensityFollowsKell) {
  // Kell (1975) on ITS-90 (Bettin & Spieweck), kg/m3: 999.840 (0), 999.964 (5), 997.043 (25),
  // 993.325 (37), 988.030 (50); tabulated 997.0479 at 25 °C.
  EXPECT_NEAR(water_density_kg_per_L(0) * 1000, 999.840, 0.01);
  EXPECT_NEAR(water_density_kg_per_L(5) * 1000, 999.964, 0.01);
  EXPECT_NEAR(water_density_kg_per_L(25) * 1000, 997.043, 0.01);
  EXPECT_NEAR(water_density_kg_per_L(37) * 1000, 993.325, 0.01);
  EXPECT_NEAR(water_density_kg_per_L(50) * 1000, 988.030, 0.01);
}

TEST(Water, DielectricConstantMalmbergMaryott) {
  // Malmberg & Maryott 1956 (J. Res. NBS 56, 1): 78.30 at 25 °C.
  EXPECT_NEAR(water_dielectric_constant(25), 78.30, 0.01);
  EXPECT_NEAR(water_dielectric_constant(0), 87.74, 0.01);
}

TEST(Davies, AAt25And37) {
  // A = 1.82483e6 sqrt(rho)/(eps T)^1.5: 0.5108 at 25 °C, 0.5215 at 37 °C (Malmberg and Maryott 1956 permittivity, Kell 1975 density).
  EXPECT_NEAR(davies_a(25), 0.5108, 0.0005);
  EXPECT_NEAR(davies_a(37), 0.5215, 0.001);
  EXPECT_NEAR(davies_a(0), 0.4918, 0.001);
}

TEST(Davies, ActivityCoefficientsAtA05108) {
  // Davies (1962) with A = 0.5108 (computed): z=1: 0.9018 (I=0.01),
  // 0.8209 (0.05), 0.7809 (0.10), 0.7461 (0.20); z=2: 0.6613, 0.4542, 0.3719; z=3 0.1080 (0.1).
  auto g = [](int z, double I) { return std::pow(10.0, -0.5108 * z * z * davies_bracket(I)); };
  EXPECT_NEAR(g(1, 0.01), 0.9018, 2e-4);
  EXPECT_NEAR(g(1, 0.05), 0.8209, 2e-4);
  EXPECT_NEAR(g(1, 0.10), 0.7809, 2e-4);
  EXPECT_NEAR(g(1, 0.20), 0.7461, 2e-4);
  EXPECT_NEAR(g(2, 0.01), 0.6613, 2e-4);
  EXPECT_NEAR(g(2, 0.05), 0.4542, 2e-4);
  EXPECT_NEAR(g(2, 0.10), 0.3719, 2e-4);
  EXPECT_NEAR(g(3, 0.10), 0.1080, 2e-4);
  EXPECT_DOUBLE_EQ(davies_gamma(0, 0.1, 25), 1.0);
}

TEST(VantHoff, TrisAndPhosphate) {
  // Goldberg, Kishore & Lennen 2002 inputs (recalled from J. Phys. Chem. Ref. Data 31, 231, to be verified), computed pK:
  // Tris 8.072, dH 47.45, dCp -59: 8.677 (5 °C), 7.753 (37 °C); tolerance 0.02.
  EXPECT_NEAR(pk_at_temperature(8.072, 25, 47.45, -59, 5), 8.677, 0.02);
  EXPECT_NEAR(pk_at_temperature(8.072, 25, 47.45, -59, 37), 7.753, 0.02);
  EXPECT_NEAR(pk_at_temperature(7.198, 25, 3.6, -230, 0), 7.303, 0.02);
  EXPECT_NEAR(pk_at_temperature(7.198, 25, 3.6, -230, 50), 7.187, 0.02);
  // Slope at 25 °C: dpK/dT = -dH/(R T^2 ln10) = -47.45/1701.8 = -0.0279 per K.
  const double slope = (pk_at_temperature(8.072, 25, 47.45, 0, 25.01) -
                        pk_at_temperature(8.072, 25, 47.45, 0, 24.99)) / 0.02;
  EXPECT_NEAR(slope, -0.0279, 0.0003);
  // Classic emf values (Bates and Hetzer 1961, J. Phys. Chem. 65, 667; recalled, to be verified): TrisH+ 8.850 at 0 °C.
  EXPECT_NEAR(pk_at_temperature(8.072, 25, 47.45, -59, 0), 8.850, 0.02);
}

}  // namespace
}  // namespace pkarta
