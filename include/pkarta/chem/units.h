// Amounts with units, as accepted on the command line and in files.
#ifndef PKARTA_UNITS_H_
#define PKARTA_UNITS_H_

#include <string>
#include <string_view>

namespace pkarta {

/// Units of amount accepted everywhere: mol/L, mmol/L, mol/kg (molality), mg/mL, g/L,
/// ug/mL (µg/mL also accepted), %w/v (g per 100 mL).
enum class AmountUnit { kMolar, kMillimolar, kMicromolar, kMolal, kMgPerMl, kGPerL, kUgPerMl, kPercentWv };

/// A value with its unit, as written by the user.
struct Amount {
  double value = 0.0;
  AmountUnit unit = AmountUnit::kMolar;
  bool is_mass_based() const;
  /// Converts to mol/L. Mass units need the molar mass (g/mol); molality is converted with
  /// c = m * rho_water(T) (dilute approximation: the solutes' own volume is ignored).
  /// Throws InputError when a mass unit is used without a molar mass.
  double to_mol_per_L(double molar_mass_g_per_mol, double temperature_C) const;
};

/// Parses "25mM", "0.025 M", "0.025mol/kg", "10mg/mL", "1.5g/L", "5ug/mL", "0.9%w/v".
/// The number is read locale-independently and must be finite, >= 0 and at most 1e9.
/// Throws InputError (without location; callers add it) naming the problem.
Amount parse_amount(std::string_view text);

/// The highest concentration of one reagent, dose or solubility the model covers, mol/L: the
/// solver's pH bracket (-3 to 17) holds for totals up to this. More is a typing error.
inline constexpr double kMaxConc_mol_per_L = 10.0;

/// A unit alone, as a file gives it beside a separate value (a compound file's 'unit'
/// attribute, the 'unit' column of a solubility CSV). Text that starts like a number is
/// refused ("e3M" or "0mM" would otherwise read as the amount 1e3 M or 10 mM). Throws
/// InputError whose message starts with `what` ("attribute 'unit'", "column 'unit'").
AmountUnit parse_unit(std::string_view text, std::string_view what);

/// Parses a finite number (whole string, locale-independent). Throws InputError.
double parse_number(std::string_view text, std::string_view what);

/// The unit as written in output and as the file schemas spell it ("mM", "mg/mL", "ug/mL", ...).
std::string unit_symbol(AmountUnit unit);

}  // namespace pkarta

#endif  // PKARTA_UNITS_H_
