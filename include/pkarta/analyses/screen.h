// Buffer screening: the weakest buffer that holds a target pH once the dose is dissolved.
//
// For each candidate buffer of the library (docs/commands.md, `pkarta screen`): the buffer
// system at total concentration C in its net-neutral form (H3PO4, acetic acid, citric acid,
// tris base, histidine), plus the one titrant (the buffer's acid-titrant or base-titrant
// reagent, HCl or NaOH in the built-in library) that brings the buffer alone to the target pH
// at the run temperature (Davies activities, solved exactly for the titrant amount). Then the
// dose, with its salt's counterion, is added and the closed system equilibrated (solids
// allowed). min_conc is the smallest C in [1e-6 M, max-conc] for which
// |pH_after_drug - target| <= tolerance, found by bisection on log C (relative precision 1e-4).
//
// The drift caused by the dose's own acid or base falls as the buffer grows, but a salt dose
// also raises the ionic strength, which shifts the apparent pKa of a charged buffer (phosphate
// pK2 by -3 A df(I)); the two effects can cancel at one low C, so |drift| need not be monotone
// there. The search therefore walks down from max-conc in quarter-decade steps while the drift
// stays within the tolerance and bisects between the last step inside and the first outside:
// min_conc is the lower end of the range of C that reaches up to max-conc, so that a slightly
// stronger buffer also holds the target. A narrower window at lower C, where the pH merely
// crosses the target, is not reported.
//
// The same search is made for each criterion a formulation must meet (ScreenCriterion): the
// dose (above); the whole dose range (worst pH over dose x (1 +/- f, 1 +/- f/2)); an acid and a
// base challenge (strong acid, then strong base, added to the finished formulation: pH within
// the tolerance; for small loads the shift is about challenge / beta, van Slyke 1922, J. Biol.
// Chem. 52:525); an optional minimum capacity; optionally the pH at the storage temperatures.
// min_conc is the largest of their minima (the criterion giving it is `binding`), and the
// recommended strength is that rounded up to a practical value (round_up_strength). With
// preparation "adjusted" the titrant is solved with the dose in, so the dose criterion holds by
// construction and the others are judged on that formulation.
#ifndef PKARTA_SCREEN_H_
#define PKARTA_SCREEN_H_

#include <cstddef>
#include <functional>
#include <limits>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// How a formulation is made (see ScreenOptions::preparation).
enum class ScreenPreparation { kPremade, kAdjusted };

/// "premade" or "adjusted".
const char* screen_preparation_name(ScreenPreparation preparation);

/// What a screen is asked.
struct ScreenOptions {
  double target_pH = 7.0;              ///< pH to hold (0-14)
  double tolerance_pH = 0.1;           ///< allowed |pH after drug - target| (> 0)
  double temperature_C = 25.0;         ///< run temperature: buffer prepared and dose added here
  std::vector<std::string> buffers;    ///< buffer ids; empty: every buffer of the library
  std::string route = "any";           ///< oral, parenteral, ophthalmic, topical or any
  double dose_range_fraction = 0.0;    ///< 0.1: report the worst pH for dose +/-10 %; 0: not asked
  double min_conc_mol_per_L = 1e-6;    ///< lower end of the search
  double rel_precision = 1e-4;         ///< bisection stops when hi/lo - 1 is below this
  double pka_window_pH = 1.0;          ///< "outside-range" when no pKa(T) lies within target +/- this
  double low_temperature_C = 5.0;      ///< storage temperature re-equilibrated (pH_at_5C)
  double high_temperature_C = 40.0;    ///< accelerated-condition temperature (pH_at_40C)
  ActivityModel activity = ActivityModel::kDavies;
  /// How the formulation is made: kPremade, the buffer brought to the target pH alone and the
  /// dose dissolved in it; kAdjusted, buffer system and dose dissolved together and the pH
  /// brought to the target with the buffer's titrant (so the dose itself moves no pH).
  ScreenPreparation preparation = ScreenPreparation::kPremade;
  /// Strong acid (the buffer's acid titrant) and, separately, strong base added to the finished
  /// formulation must leave its pH within the tolerance; 0 turns the two criteria off. 1 mM is a
  /// default of the tool, not a rule.
  double challenge_mol_per_L = 1e-3;
  /// Buffer capacity the formulation must have at least (mol/L per pH); 0: not a criterion.
  double min_capacity_mol_per_L_per_pH = 0.0;
  /// With a value: the pH at low_ and high_temperature_C (storage ends) must lie within this of
  /// the target. Without: the storage pH is reported only.
  std::optional<double> max_drift_pH;
  /// How far from the target the pH may be at the storage temperatures for a buffer to hold
  /// there: max_drift_pH when given, else the tolerance.
  double storage_limit_pH() const { return max_drift_pH ? *max_drift_pH : tolerance_pH; }
  /// Recommended strength: the minimum rounded up to a multiple of this (mol/L); 0: to the
  /// 1-2-5 series in mM starting at 1 mM.
  double round_step_mol_per_L = 0.0;
  /// Library medium each ok formulation is diluted into (analyse_dilution with its default ratios
  /// 1:1 to 1:100, 37 °C for a physiological medium): the highest supersaturation ratio is
  /// reported, not a criterion. Empty: no dilution (the command line sets plasma-7.4 for the
  /// parenteral route).
  std::string dilution_medium;
  /// False with a message naming the field ("ScreenOptions::tolerance_pH = 0, must be > 0").
  bool is_valid(std::string* error) const;
};

/// Outcome of one buffer, first match wins in this order of the checks:
/// kOutsideRange, kDoseNotSoluble, kNotAchievable, else kOk.
enum class ScreenStatus { kOk, kNotAchievable, kOutsideRange, kDoseNotSoluble };

/// "ok", "not-achievable", "outside-range", "dose-not-soluble" (the JSON values).
const char* screen_status_name(ScreenStatus status);

/// The buffer alone at a total concentration, brought to a pH by one titrant.
struct BufferPreparation {
  double conc_mol_per_L = 0.0;       ///< total of the buffer system
  std::string titrant;               ///< reagent id (acid- or base-titrant); "" when none needed
  double titrant_mol_per_L = 0.0;    ///< amount of that reagent (>= 0)
  double pH = 0.0;                   ///< the pH the buffer alone sits at (the target)
  double ionic_strength_mol_per_L = 0.0;
  bool converged = false;
};

/// The buffer system at `conc_mol_per_L` in its net-neutral form plus the titrant amount that
/// puts the buffer alone at `pH` (Davies activities unless `activity` is ideal), solved from the
/// charge balance at fixed pH with the ionic strength iterated to self-consistency.
/// Throws InputError when the buffer's titrants are not strong-ion reagents of the library.
BufferPreparation prepare_buffer(const Library& library, const Buffer& buffer, double conc_mol_per_L,
                                 double pH, double temperature_C,
                                 ActivityModel activity = ActivityModel::kDavies);

/// The mixture of a prepared buffer plus a dose of the drug in a form (the salt's counterion
/// included), at the preparation temperature. A dose of 0 (or no compound) gives the buffer alone.
Mixture screen_mixture(const Library& library, const Buffer& buffer, const BufferPreparation& prep,
                       const Compound* compound, double dose_mol_per_L, const std::string& form,
                       double temperature_C, ActivityModel activity = ActivityModel::kDavies);

/// pH after the drug for the buffer at one concentration (the quantity the bisection works on).
/// Returns NaN when the equilibrium does not converge.
double ph_after_drug(const Library& library, const Buffer& buffer, double conc_mol_per_L,
                     const Compound& compound, double dose_mol_per_L, const std::string& form,
                     const ScreenOptions& options);

/// One criterion of the screen for one buffer: the smallest buffer concentration that meets it
/// (as for the dose, the lower end of the range reaching up to max-conc), and its value and
/// verdict at the recommended strength (at max-conc when no strength is recommended).
struct ScreenCriterion {
  std::string id;              ///< dose, dose-range, acid-challenge, base-challenge, min-capacity, storage-drift
  std::string quantity;        ///< what `value` is ("pH", "worst pH", "mol/L per pH", "max |pH - target|")
  std::optional<double> min_conc_mol_per_L;  ///< absent when even max-conc fails it
  bool min_conc_at_lower_bound = false;
  double value = 0.0;          ///< at the concentration used
  double limit_low = 0.0;      ///< pass when limit_low <= value <= limit_high
  double limit_high = 0.0;
  bool pass = false;
};

/// One buffer's line of the screen.
struct ScreenResult {
  std::string buffer;                    ///< buffer id
  std::string name;
  ScreenStatus status = ScreenStatus::kNotAchievable;
  std::vector<std::string> routes;       ///< routes the library lists for the buffer
  double max_conc_mol_per_L = 0.0;
  std::optional<double> min_conc_mol_per_L;  ///< largest over the criteria; absent when one fails at max-conc
  bool min_conc_at_lower_bound = false;  ///< the dose alone holds the target (min_conc = 1e-6 M)
  double conc_used_mol_per_L = 0.0;      ///< the recommended strength, or max-conc when none is found
  std::string titrant;                   ///< reagent bringing the buffer to the target
  double titrant_mol_per_L = 0.0;        ///< at conc_used
  double nearest_pka = 0.0;              ///< pKa(T) of the buffer nearest the target
  double pH_after_drug = 0.0;            ///< at conc_used, run temperature
  double pH_drift = 0.0;                 ///< pH_after_drug - target
  double capacity_mol_per_L_per_pH = 0.0;  ///< of the final solution (drug included)
  double ionic_strength_mol_per_L = 0.0;
  double osmolarity_mOsm_per_L = 0.0;    ///< ideal, all dissolved species
  double pH_at_5C = 0.0;                 ///< same totals re-equilibrated at low_temperature_C
  double pH_at_40C = 0.0;                ///< ... and at high_temperature_C
  std::string drug_solid = "none";       ///< solid left at conc_used ("none", "free", salt id, ...)
  std::string drug_solid_at_5C = "none";   ///< solid at low_temperature_C (same totals)
  std::string drug_solid_at_40C = "none";  ///< ... and at high_temperature_C
  /// The formulation also holds at both storage temperatures: pH within the storage limit of the
  /// target (max_drift_pH when given, else the tolerance) and no drug solid there that is not
  /// present at the run temperature.
  bool holds_at_storage = true;
  /// A drug solid at a storage temperature (drug_solid_at_5C or _40C) that the run temperature
  /// does not have.
  bool new_solid_in_storage(const std::string& solid) const { return solid != "none" && solid != drug_solid; }
  /// With ScreenOptions::dilution_medium, for ok results: the highest supersaturation ratio of the
  /// drug over the dilution ratios (above 1: it may precipitate) and the ratio where it is; NaN and
  /// 0 when not computed.
  double dilution_max_supersaturation = std::numeric_limits<double>::quiet_NaN();
  double dilution_worst_ratio = 0.0;
  std::optional<double> worst_pH_in_dose_range;  ///< when dose_range_fraction > 0
  bool dose_range_within_tolerance = true;
  std::string binding;                   ///< criterion setting min_conc (or failing at max-conc)
  std::optional<double> recommended_conc_mol_per_L;  ///< min_conc rounded up, at most max-conc
  double pH_after_acid_challenge = 0.0;  ///< at conc_used (NaN when the challenge is off)
  double pH_after_base_challenge = 0.0;
  std::vector<ScreenCriterion> criteria; ///< every active criterion, in the order of the ids above
  std::vector<std::string> route_flags;  ///< strengths or osmolality beyond the route's common practice
  std::vector<std::string> warnings;
  /// The criterion of `criteria` with this id, or nullptr.
  const ScreenCriterion* criterion(const std::string& id) const;
  /// pH_at_40C - pH_at_5C: the temperature drift used in the ranking.
  double temperature_drift_pH() const { return pH_at_40C - pH_at_5C; }
};

/// What a formulator does next when no buffer holds the target with the buffer made first
/// (preparation premade): the strong acid or base the dose itself needs to reach the target in
/// water, and the same screen with the pH adjusted after the dose.
struct ScreenFallback {
  std::string dose_titrant;              ///< reagent (a buffer titrant, e.g. NaOH); "" when none is needed
  double dose_titrant_mol_per_L = 0.0;   ///< amount bringing the dose alone in water to the target pH
  double dose_titrant_mg_per_mL = 0.0;   ///< the same as mass of the reagent as listed in the library
  bool dose_titrant_found = false;       ///< false when that titration did not converge
  std::vector<ScreenResult> adjusted;    ///< ok results of the screen made "adjusted", ranked
};

/// How the screen's warning that the leading buffer is below the usual osmolality of its route
/// begins (a report whose recipe is made isotonic leaves it out: the recipe answers it).
inline constexpr const char* kLowOsmolalityWarningStart = "the leading buffer's osmolality estimate, ";

/// A screen of one compound: ranked results (achievable first, those that also hold at both
/// storage temperatures before those that hold at the run temperature only, each by
/// concentration needed, then by |pH drift over 5-40 °C|; then not-achievable,
/// dose-not-soluble, outside-range).
struct ScreenReport {
  std::string compound_id;
  std::string compound_name;
  std::string compound_file;
  std::string form = "free";
  /// The dose as the user gave it ("0.5mg/mL") and its basis ("weighed" or "free"), for the
  /// recipe command of the text output; empty when the screen was not run from the command line.
  std::string dose_text;
  std::string dose_basis = "weighed";
  std::vector<std::string> library_files;  ///< the --library files the screen was run with
  std::string dilution_medium;             ///< ScreenOptions::dilution_medium
  std::string dilution_label;              ///< how it was diluted ("plasma, open CO2, 37 °C"); empty without
  double target_pH = 0.0;
  double tolerance_pH = 0.0;
  double temperature_C = 25.0;
  ActivityModel activity = kDefaultActivityModel;
  double low_temperature_C = 5.0;
  double high_temperature_C = 40.0;
  double dose_mol_per_L = 0.0;
  double dose_range_fraction = 0.0;
  double solubility_at_target_mol_per_L = 0.0;  ///< in water at the target pH (profile)
  /// When the dose exceeds that solubility: the pH ranges (within pH 1-13, at the run
  /// temperature, in water held by HCl or NaOH) in which the dose does dissolve; empty otherwise.
  std::vector<std::pair<double, double>> dose_soluble_pH_ranges;
  std::string route = "any";
  ScreenPreparation preparation = ScreenPreparation::kPremade;
  double challenge_mol_per_L = 0.0;
  double min_capacity_mol_per_L_per_pH = 0.0;
  std::optional<double> max_drift_pH;
  /// As ScreenOptions::storage_limit_pH().
  double storage_limit_pH() const { return max_drift_pH ? *max_drift_pH : tolerance_pH; }
  double round_step_mol_per_L = 0.0;
  std::vector<ScreenResult> results;
  /// Set when preparation is premade and no result is ok (see ScreenFallback).
  std::optional<ScreenFallback> fallback;
  std::vector<std::string> warnings;
};

/// One compound to screen.
struct ScreenJob {
  Compound compound;              ///< salts with Ksp resolved (load_compound_file does it)
  double dose_mol_per_L = 0.0;    ///< of drug (> 0)
  std::string form = "free";      ///< "free" or a salt id of the compound
};

/// Screens one buffer for one compound. `solubility_at_target_mol_per_L` is the drug's
/// solubility in water at the target pH (see screen_solubility_at_target).
ScreenResult screen_buffer(const Library& library, const Buffer& buffer, const ScreenJob& job,
                           double solubility_at_target_mol_per_L, const ScreenOptions& options);

/// The buffer's own titrant (acid or base) that brings the dose alone, dissolved in water
/// without the buffer system, to the target pH at the run temperature (closed system, the
/// salt's counterion included). `converged` is false when no amount does.
BufferPreparation dose_titration(const Library& library, const Buffer& buffer, const ScreenJob& job,
                                 const ScreenOptions& options);

/// The drug's solubility in water at the target pH and run temperature (solubility_at_pH).
double screen_solubility_at_target(const Library& library, const Compound& compound,
                                   const ScreenOptions& options);

/// The pH ranges within pH 1-13 in which `dose_mol_per_L` of the drug dissolves in water (held
/// by HCl or NaOH) at the run temperature: the profile on a 0.05 pH grid, each end refined by
/// bisection to 1e-4 pH. An end at 1 or 13 is the end of the scan, not a limit.
std::vector<std::pair<double, double>> dose_soluble_pH_ranges(const Library& library, const Compound& compound,
                                                              double dose_mol_per_L, const ScreenOptions& options);

/// The buffers a screen covers: options.buffers (or all), filtered by route, in id order.
/// Throws InputError for an unknown buffer id or an unknown route.
std::vector<const Buffer*> screen_candidates(const Library& library, const ScreenOptions& options);

/// Orders results in place by the ranking rule of ScreenReport.
void rank_screen_results(std::vector<ScreenResult>& results);

/// Screens one compound (serially). Throws InputError on invalid options, an unknown buffer or
/// form, or a dose <= 0.
ScreenReport screen(const Library& library, const ScreenJob& job, const ScreenOptions& options);

/// How a batch runs.
struct BatchOptions {
  int threads = 0;  ///< 0: std::thread::hardware_concurrency(); 1: serial
  /// Called after each finished (compound, buffer) pair with (done, total); calls are
  /// serialised, so the callback needs no locking. May be empty.
  std::function<void(std::size_t done, std::size_t total)> progress;
};

/// Screens many compounds, in parallel over (compound, buffer) pairs. The results are
/// identical to screen() run on each job in turn (every pair is computed independently).
std::vector<ScreenReport> screen_batch(const Library& library, const std::vector<ScreenJob>& jobs,
                                       const ScreenOptions& options, const BatchOptions& batch = {});

/// The recommended strength for a minimum: rounded up to a multiple of step_mol_per_L (> 0), or
/// to the 1-2-5 series in mM from 1 mM (step 0); never below the minimum, never above max-conc.
double round_up_strength(double min_conc_mol_per_L, double max_conc_mol_per_L, double step_mol_per_L = 0.0);

/// Strengths above a route's common practice and osmolality estimates above its usual range
/// (parenteral, ophthalmic: 50 mM, 600 mOsm/kg; common practice, not rules), as sentences.
std::vector<std::string> screen_route_flags(const std::string& route, const ScreenResult& result,
                                            double temperature_C);

/// A criterion's value as text ("pH 4.927", "14.1 mM/pH", "0.040 pH").
std::string screen_criterion_value_text(const ScreenCriterion& criterion);

/// Parses a dose range: "10%", "+/-10%", "±10%" or "0.1" give 0.1. Throws InputError (without
/// location) unless the result lies in [0, 1).
double parse_dose_range(std::string_view text);

/// When no buffer is ok: the closest candidates (pH deviation at max-conc, criteria failing);
/// nothing otherwise.
void write_screen_near_misses(const ScreenReport& rep, std::ostream& out);
// The text, CSV and JSON writers of the screen: pkarta/writers/screen_writer.h.

}  // namespace pkarta

#endif  // PKARTA_SCREEN_H_
