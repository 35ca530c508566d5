// Solubility classification for biowaivers after ICH M9 (2019), section 2.1: a drug substance
// is highly soluble when its highest single therapeutic dose dissolves completely in 250 mL or
// less of aqueous media over pH 1.2-6.8 at 37 ± 1 °C; the lowest solubility in that range
// decides.
//
// Convention of pkarta (stated in every output): the whole range is scanned on a fine grid
// (0.01 pH by default) and the lowest point refined to 1e-6 pH, with the equilibrium
// solubility of profile.h, i.e. excess solid in water with the pH held by HCl or NaOH (salts
// limit where their counterion comes with the titrant). The dose number is
// D0 = (dose / volume) / S, both as moles of drug; the verdict is "high" when D0 <= 1 at the
// minimum. Beside it the dose is dissolved in the pharmacopeial media of the library
// (hcl-1.2, acetate-4.5, phosphate-6.8) as closed systems, to show the pH after the dose;
// those checks inform, the scan decides.
#ifndef PKARTA_CLASSIFY_H_
#define PKARTA_CLASSIFY_H_

#include <string>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// What to classify and how.
struct ClassifyOptions {
  double dose_mg = 0.0;              ///< highest single therapeutic dose, mg of `form`
  std::string form = "free";         ///< "free" or a salt id of the compound
  double volume_mL = 250.0;          ///< ICH M9: 250 mL
  double temperature_C = 37.0;       ///< ICH M9: 37 ± 1 °C
  double from_pH = 1.2;              ///< ICH M9 range
  double to_pH = 6.8;
  double scan_step_pH = 0.01;        ///< grid of the scan (the minimum is then refined)
  std::string acid_titrant = "HCl";
  std::string base_titrant = "NaOH";
  ActivityModel activity = ActivityModel::kDavies;
  bool check_media = true;           ///< also dissolve the dose in the pharmacopeial media
  /// "ClassifyOptions::dose_mg = 0, must be > 0" style messages.
  bool is_valid(std::string* error) const;
};

/// One reported pH: an anchor (1.2, 4.5, 6.8), a pKa inside the range, or the minimum.
struct ClassifyPoint {
  std::string label;                 ///< "pH 1.2", "pKa 6.07", "minimum"
  double pH = 0.0;
  double solubility_mol_per_L = 0.0;
  double solubility_mg_per_mL = 0.0; ///< as the form dosed (its molar mass)
  double dose_number = 0.0;          ///< D0 = (dose / volume) / S
  std::string limiting_solid;
};

/// The dose dissolved in one pharmacopeial medium (closed system, no titrant).
struct MediumCheck {
  std::string medium;                ///< library id
  std::string name;
  std::string nominal_pH;
  bool usable = false;               ///< false: the equilibrium did not converge
  double pH_after = 0.0;
  double dissolved_fraction = 0.0;   ///< dissolved / dose
  std::string solid = "none";        ///< "none", "free", salt id or "free+SALT"
};

/// The classification and what it rests on.
struct ClassifyResult {
  std::string verdict = "low";       ///< "high" | "low"
  std::string guideline;
  std::string convention;
  std::string compound_id, compound_name;
  std::string form = "free";
  double form_molar_mass_g_per_mol = 0.0;
  double dose_mg = 0.0;
  double volume_mL = 250.0;
  double temperature_C = 37.0;
  double from_pH = 1.2, to_pH = 6.8;
  double dose_mol_per_L = 0.0;       ///< dose / volume
  double dose_mg_per_mL = 0.0;       ///< as the form dosed
  double min_solubility_mol_per_L = 0.0;
  double min_solubility_mg_per_mL = 0.0;  ///< as the form dosed
  double min_at_pH = 0.0;
  double dose_solubility_volume_mL = 0.0; ///< dose / lowest solubility (M9: <= 250 mL)
  std::vector<ClassifyPoint> points;
  std::vector<MediumCheck> media;
  std::vector<std::string> notes;
  std::vector<std::string> warnings;
};

/// Pharmacopeial media dissolved into by classify(), when present in the library.
inline const char* const kClassifyMedia[] = {"hcl-1.2", "acetate-4.5", "phosphate-6.8"};

/// Classifies the compound's solubility at the dose. Throws InputError for invalid options
/// (naming the field), an unknown form, or a titrant that is not a strong acid or base.
ClassifyResult classify(const Compound& compound, const Library& library, const ClassifyOptions& options);

}  // namespace pkarta

#endif  // PKARTA_CLASSIFY_H_
