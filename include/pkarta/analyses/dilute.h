// Precipitation risk of a formulation diluted into a medium (infusion bag, injection, transfer
// from stomach to intestine).
//
// Dilution ratio r = total volume / formulation volume: 1 volume of formulation made up to r
// volumes with the medium (r = 1 is the formulation itself; r = 10 is 1 + 9 volumes). Volumes
// are additive, so every total of the mixture is  c = c_formulation / r + c_medium (1 - 1/r).
//
// For each ratio:
//  - pH: of the closed-system mixture with all its totals and the drug fully dissolved;
//  - drug_mol_per_L: the dose / r, the concentration if nothing precipitates;
//  - solubility_mol_per_L: the equilibrium solubility of the drug in that mixture, at the pH,
//    ionic strength and counterion concentrations held by the mixture's own composition: the
//    free form saturated at S0 (S0 / alpha_neutral) or a salt at its Ksp (Ksp / (gamma+ gamma-
//    alpha_ion [X])), whichever is lower;
//  - supersaturation_ratio = drug / solubility (equal to the mixture's saturation ratio of
//    docs/model.md); risk = ratio > 1 (a thermodynamic driving force for precipitation;
//    nucleation and growth rates are not modelled);
//  - and, for reference, the state after precipitation to equilibrium (solids allowed).
#ifndef PKARTA_DILUTE_H_
#define PKARTA_DILUTE_H_

#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// How the bicarbonate of a physiological medium (blood, plasma) is treated.
///  - kOpen: open to a fixed arterial pCO2, as in the body (lungs hold pCO2): dissolved CO2 =
///    solubility x pCO2, and the total carbonate follows (an outer 1-D solve on it);
///  - kClosed: the medium's carbonate total is kept (a sealed tube);
///  - kAuto: open for a physiological medium, closed (nothing to do) otherwise.
enum class BloodModel { kAuto, kOpen, kClosed };

/// Which non-bicarbonate buffering a physiological medium is given (proteins, mainly albumin,
/// and phosphate of plasma; with haemoglobin for whole blood). The Van Slyke equation as given by
/// Siggaard-Andersen (1977, Scand. J. Clin. Lab. Invest. 37 Suppl 146, 15-20) has the
/// non-bicarbonate buffer value beta = 7.7 mmol/L per pH for plasma and 1.43 cHb + 7.7 for whole
/// blood (cHb in mmol/L of monomer; 9.3 mmol/L for 15 g/dL) (recalled from Siggaard-Andersen
/// 1977, to be verified). It is modelled as a lumped ampholyte (see docs/model.md).
enum class BloodKind { kPlasma, kWhole };

/// What to dilute into, and how far.
struct DilutionOptions {
  std::string medium_id;              ///< library medium (water, saline-0.9, plasma-7.4, ...)
  std::vector<double> ratios{1, 2, 5, 10, 20, 50, 100};  ///< total / formulation volume, >= 1
  std::optional<double> temperature_C;  ///< of the diluted mixture; default: the formulation's,
                                        ///< 37 °C for a physiological medium
  BloodModel blood_model = BloodModel::kAuto;
  /// Arterial pCO2 and CO2 solubility in plasma at 37 °C: 40 mmHg and 0.0307 mmol/L per mmHg
  /// (Siggaard-Andersen, The Acid-Base Status of the Blood, 4th ed. 1974; Guyton and Hall,
  /// Textbook of Medical Physiology), so dissolved CO2 = 1.228 mmol/L.
  double pco2_mmHg = 40.0;
  double co2_solubility_mM_per_mmHg = 0.0307;
  BloodKind blood = BloodKind::kPlasma;
  double plasma_buffer_mM_per_pH = 7.7;       ///< non-bicarbonate buffer value of plasma
  double haemoglobin_mmol_per_L = 9.3;        ///< cHb (monomer) of whole blood, 15 g/dL
  double haemoglobin_buffer_per_mmol = 1.43;  ///< mmol/L per pH per mmol/L of haemoglobin
  /// The non-bicarbonate buffer value of the undiluted medium, mmol/L per pH: 7.7 for plasma,
  /// 1.43 x 9.3 + 7.7 = 21.0 for whole blood.
  double non_bicarbonate_buffer_mM_per_pH() const;
  bool is_valid(std::string* error) const;
};

/// One dilution ratio.
struct DilutionPoint {
  double ratio = 1.0;
  double pH = 7.0;                        ///< drug fully dissolved
  double ionic_strength_mol_per_L = 0.0;
  double osmolarity_mOsm_per_L = 0.0;     ///< ideal
  bool has_drug = false;
  double drug_mol_per_L = 0.0;            ///< dose / ratio
  double drug_mg_per_mL = 0.0;            ///< as the free form
  double solubility_mol_per_L = 0.0;      ///< lowest over the solids; +inf when none can form
  std::string limiting_solid = "none";    ///< the solid of that lowest solubility
  double supersaturation_ratio = 0.0;     ///< drug / solubility
  bool risk = false;                      ///< supersaturation_ratio > 1
  double equilibrium_pH = 7.0;            ///< after precipitation to equilibrium
  double equilibrium_dissolved_mol_per_L = 0.0;
  std::string equilibrium_solid = "none";
  double mass_residual_rel = 0.0;         ///< worst of both solves
  double charge_residual_rel = 0.0;
};

/// Result of analyse_dilution(): check usable().
struct DilutionResult {
  bool converged = false;
  std::string message = "analyse_dilution() was not called";
  std::string medium_id;
  std::string medium_name;
  double temperature_C = 25.0;
  std::string drug_name;                  ///< empty without a drug
  std::vector<std::string> inputs;        ///< readable contents of the formulation
  std::vector<DilutionPoint> points;
  std::string blood_model;                ///< "open", "closed" or "" (no physiological medium)
  std::string blood;                      ///< "plasma", "whole" or "" (no physiological medium)
  /// Non-bicarbonate buffer value of the undiluted medium (0 without a physiological medium).
  double non_bicarbonate_buffer_mM_per_pH = 0.0;
  /// Of it, the buffer value at pH 7.4 of the medium's own non-carbonate systems (phosphate),
  /// which the solver carries explicitly, and the rest, carried by the lumped buffer.
  double medium_explicit_buffer_mM_per_pH = 0.0;
  double lumped_buffer_mM_per_pH = 0.0;
  /// One line naming the model, e.g. "open CO2 at pCO2 40 mmHg with plasma non-bicarbonate
  /// buffer 7.7 mmol/L/pH"; empty without a physiological medium.
  std::string blood_description;
  std::vector<std::string> notes;         ///< the simplifications behind the numbers
  std::vector<std::string> warnings;
  bool usable() const { return converged; }
};

/// The formulation diluted to `ratio` with a library medium: every system, ion and drug total
/// times 1/ratio plus the medium's times (1 - 1/ratio). Throws InputError for an unknown medium
/// or a ratio below 1.
Mixture diluted_mixture(const Mixture& formulation, const Library& library, const std::string& medium_id,
                        double ratio);

/// True for a medium holding the carbonate system whose id or name says plasma or blood.
bool is_physiological_medium(const Library& library, const std::string& medium_id);

/// How analyse_dilution dilutes a formulation made at `formulation_temperature_C` with these
/// options: whether the medium is physiological, the temperature of the diluted mixture
/// (options.temperature_C, else 37 °C for a physiological medium, else the formulation's) and
/// whether CO2 is open (held at options.pco2_mmHg).
struct DilutionConditions {
  bool physiological = false;
  double temperature_C = 25.0;
  bool open_co2 = false;
  /// "plasma-7.4 (plasma-like electrolyte (simplified)), open CO2 at pCO2 40 mmHg, 37 °C"
  std::string words;
};
DilutionConditions dilution_conditions(const Library& library, const DilutionOptions& options,
                                       double formulation_temperature_C);

/// The mixture with its carbonate total adjusted so that dissolved CO2 (the carbonate species
/// with no proton removed) equals `co2_mol_per_L`, strong ions unchanged: an outer 1-D solve on
/// the total carbonate around the closed-system solver (bisection on log C_T; [CO2] rises with
/// C_T). `state` (may be null) receives the equilibrium of the returned mixture. Throws
/// InputError when the mixture has no carbonate or no solution is found.
Mixture open_carbonate_mixture(const Mixture& mixture, double co2_mol_per_L, const SolverOptions& solver,
                               Equilibrium* state);

/// The lumped non-bicarbonate buffer of blood as an acid-base system: an ampholyte (charges +1,
/// 0, -1) whose two conditional pK' are both 7.4 at `ionic_strength_mol_per_L` (Davies), so its
/// net charge is zero at pH 7.4 and its buffer value there is (2/3) ln(10) C.
AcidBaseSystem blood_buffer_system(double ionic_strength_mol_per_L, double temperature_C);

/// Total (mol/L) of blood_buffer_system() giving the buffer value `beta_mol_per_L_per_pH` at pH 7.4.
double blood_buffer_total(double beta_mol_per_L_per_pH);

/// Buffer value (mol/L per pH) at pH 7.4 of a medium's acid-base systems other than carbonate
/// (phosphate in plasma), at the medium's ionic strength under its activity model:
/// ln(10) C (mean z^2 - (mean z)^2) per system, van Slyke 1922 with conditional constants.
double explicit_medium_buffer_value(const Mixture& medium, double ionic_strength_mol_per_L);

/// What the formulation was diluted into, in words: the medium's name, or for a plasma or blood
/// medium the model used, e.g. "plasma (open CO2 at pCO2 40.0 mmHg with plasma non-bicarbonate
/// buffer 7.70 mmol/L/pH, ...; electrolytes of plasma-7.4)"; `brief`: "plasma, open CO2" only.
std::string dilution_medium_label(const DilutionResult& result, bool brief = false);

/// Analyses every ratio of `options`. Throws InputError for invalid options or medium.
DilutionResult analyse_dilution(const Mixture& formulation, const Library& library,
                                const DilutionOptions& options, std::vector<std::string> inputs = {});


}  // namespace pkarta

#endif  // PKARTA_DILUTE_H_
