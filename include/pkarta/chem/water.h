// Properties of water and the Davies activity model, as functions of temperature.
#ifndef PKARTA_WATER_H_
#define PKARTA_WATER_H_

namespace pkarta {

/// Absolute temperature in K of a Celsius temperature.
inline double kelvin(double temperature_C) { return temperature_C + 273.15; }

/// Gas constant, J/(K mol) (CODATA 2018, exact).
inline constexpr double kGasConstant = 8.314462618;
/// ln(10).
inline constexpr double kLn10 = 2.302585092994046;

/// pKw(T) = 4470.99/T - 6.0875 + 0.01706 T, T in K (Harned and Robinson 1940, Trans. Faraday
/// Soc. 36, 973; valid 0-60 °C; 13.995 at 25 °C).
double pkw(double temperature_C);

/// Density of air-free water at 0.1 MPa, kg/L: Kell's equation on ITS-90 (Kell 1975,
/// J. Chem. Eng. Data 20, 97, as recalculated by Bettin and Spieweck). Tanaka et al. 2001
/// (Metrologia 38, 301) agree within 0.003 kg/m3 over 0-40 °C. 0.997043 at 25 °C.
double water_density_kg_per_L(double temperature_C);

/// Static relative permittivity of water (Malmberg and Maryott 1956, J. Res. NBS 56, 1):
/// 87.740 - 0.40008 t + 9.398e-4 t^2 - 1.410e-6 t^3, t in °C; 78.30 at 25 °C.
double water_dielectric_constant(double temperature_C);

/// Debye-Hückel A (log10 basis, (L/mol)^1/2): A = 1.82483e6 sqrt(rho) / (eps T)^1.5, with
/// rho in g/cm3; about 0.5108 at 25 °C.
double davies_a(double temperature_C);

/// Davies (1962) bracket f(I) = sqrt(I)/(1 + sqrt(I)) - 0.3 I, so that
/// log10 gamma_z = -A z^2 f(I) (C. W. Davies, Ion Association, Butterworths 1962).
double davies_bracket(double ionic_strength_mol_per_L);

/// Davies activity coefficient of an ion of charge z at ionic strength I (mol/L) and
/// temperature T. Neutral species: 1.
double davies_gamma(int charge, double ionic_strength_mol_per_L, double temperature_C);

/// van 't Hoff with constant heat capacity (Goldberg, Kishore and Lennen 2002,
/// J. Phys. Chem. Ref. Data 31, 231):
/// pK(T) = pK(T0) + dH/(R ln10) (1/T - 1/T0) - dCp/(R ln10) (T0/T - 1 + ln(T/T0)).
/// dH in kJ/mol, dCp in J/(K mol), temperatures in °C.
double pk_at_temperature(double pk_ref, double ref_temperature_C, double dH_kJ_per_mol,
                         double dCp_J_per_K_mol, double temperature_C);

}  // namespace pkarta

#endif  // PKARTA_WATER_H_
