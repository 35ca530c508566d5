#include "pkarta/chem/water.h"

#include <cmath>

namespace pkarta {

double pkw(double temperature_C) {
  const double T = kelvin(temperature_C);
  return 4470.99 / T - 6.0875 + 0.01706 * T;
}

double water_density_kg_per_L(double temperature_C) {
  const double t = temperature_C;
  const double num = 999.83952 + 16.952577 * t - 7.9905127e-3 * t * t - 46.241757e-6 * t * t * t +
                     105.84601e-9 * t * t * t * t - 281.03006e-12 * t * t * t * t * t;
  return num / (1.0 + 16.887236e-3 * t) / 1000.0;
}

double water_dielectric_constant(double temperature_C) {
  const double t = temperature_C;
  return 87.740 - 0.40008 * t + 9.398e-4 * t * t - 1.410e-6 * t * t * t;
}

double davies_a(double temperature_C) {
  const double rho = water_density_kg_per_L(temperature_C);  // kg/L == g/cm3
  const double eps_t = water_dielectric_constant(temperature_C) * kelvin(temperature_C);
  return 1.82483e6 * std::sqrt(rho) / (eps_t * std::sqrt(eps_t));
}

double davies_bracket(double ionic_strength_mol_per_L) {
  const double s = std::sqrt(ionic_strength_mol_per_L > 0 ? ionic_strength_mol_per_L : 0.0);
  return s / (1.0 + s) - 0.3 * ionic_strength_mol_per_L;
}

double davies_gamma(int charge, double ionic_strength_mol_per_L, double temperature_C) {
  const double log_gamma = -davies_a(temperature_C) * charge * charge *
                           davies_bracket(ionic_strength_mol_per_L);
  return std::pow(10.0, log_gamma);
}

double pk_at_temperature(double pk_ref, double ref_temperature_C, double dH_kJ_per_mol,
                         double dCp_J_per_K_mol, double temperature_C) {
  const double T = kelvin(temperature_C);
  const double T0 = kelvin(ref_temperature_C);
  const double rl = kGasConstant * kLn10;
  return pk_ref + dH_kJ_per_mol * 1000.0 / rl * (1.0 / T - 1.0 / T0) -
         dCp_J_per_K_mol / rl * (T0 / T - 1.0 + std::log(T / T0));
}

}  // namespace pkarta
