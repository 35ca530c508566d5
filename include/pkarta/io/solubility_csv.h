// Measured solubilities (points for the fit) and their CSV reader.
#ifndef PKARTA_IO_SOLUBILITY_CSV_H_
#define PKARTA_IO_SOLUBILITY_CSV_H_

#include <string>
#include <vector>

#include "pkarta/base/error.h"

namespace pkarta {

/// One measured solubility used by the fit.
struct FitPoint {
  double pH = 7.0;
  double solubility_mol_per_L = 0.0;  ///< > 0
  double temperature_C = 25.0;
  double log10_sd = 0.0;              ///< standard uncertainty of log10 S; 0: unweighted (1)
  SourceLocation where;               ///< file:line of the point, for messages
};

/// Smallest standard uncertainty of a measured log10 S accepted as a weight (log10 units): a
/// measured solubility is never known to 0.02 %, and 1/sd^2 must stay a finite weight.
inline constexpr double kMinFitLog10Sd = 1e-4;
/// Lowest measured solubility accepted, mol/L (as an intrinsic solubility in a compound file).
inline constexpr double kMinMeasuredSolubility_mol_per_L = 1e-15;

/// Empty when a measured solubility (mol/L) is one the fit can use, else the reason, to follow
/// the value as the user wrote it: "is 3.3e-323 mol/L, expected 1e-15 to 10 mol/L".
std::string measured_solubility_problem(double solubility_mol_per_L);

/// Reads measured solubilities from CSV text (RFC 4180 fields, '#' comment lines and blank
/// lines ignored). A header row is required, naming the columns in any order, case-insensitive:
///   pH, value, unit                      required (unit as in compound files: mg/mL, ug/mL, M, mM...)
///   temperature (or temperature_C)       optional, °C, default 25
///   log_sd (or sd_log10)                 optional, standard uncertainty of log10 S (weights 1/sd^2)
/// Unknown columns give a located warning. Mass units use the compound's molar mass.
/// Throws InputError naming name:line:column for a missing column, a non-numeric cell, a
/// solubility <= 0 or outside 1e-15 to 10 mol/L, a log_sd outside 1e-4 to 5, a pH outside -1..15,
/// an unknown unit or a row of the wrong length.
/// Example: parse_solubility_csv("pH,value,unit\n2.0,25,mg/mL\n", "data.csv", 311.4, nullptr)
std::vector<FitPoint> parse_solubility_csv(const std::string& text, const std::string& name,
                                           double molar_mass_g_per_mol,
                                           std::vector<std::string>* warnings);
/// Reads a CSV file (see parse_solubility_csv). Throws InputError naming the file.
std::vector<FitPoint> read_solubility_csv(const std::string& path, double molar_mass_g_per_mol,
                                          std::vector<std::string>* warnings);

}  // namespace pkarta

#endif  // PKARTA_IO_SOLUBILITY_CSV_H_
