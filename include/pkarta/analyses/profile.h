// pH-solubility of a drug with excess solid: free form, salt limits, pHmax.
//
// At each pH the drug's excess free form is equilibrated in a medium, the pH being held by a
// strong acid (HCl by default: its anion comes with it) or a strong base (NaOH by default). A
// salt precipitates where its ion product would exceed Ksp, its counterion coming from the
// titrant and the medium; the solubility is then the salt-limited one (docs/model.md, "Salts").
//
// Conventions, stated once here and in the output:
// - The medium's own ions are not depleted by a precipitating salt (the amount of excess solid
//   is small against the medium); the titrant ion is whatever the charge balance needs.
// - A compound without a net-neutral form (a permanent cation without acid groups, say) has no
//   free form: the excess solid is then a salt itself, whose counterion enters the solution
//   with the dissolved drug. pHmax does not apply to it.
// - Solubilities above kSolubilityCap_mol_per_L are reported at the cap (nothing limits there).
#ifndef PKARTA_PROFILE_H_
#define PKARTA_PROFILE_H_

#include <memory>
#include <string>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// How the profile is made.
struct ProfileConditions {
  double temperature_C = 25.0;
  ActivityModel activity = ActivityModel::kDavies;
  Mixture medium;                    ///< systems and ions of the medium (no drug); its
                                     ///< temperature and activity fields are ignored
  std::string acid_titrant = "HCl";  ///< library reagent giving the strong anion
  std::string base_titrant = "NaOH"; ///< library reagent giving the strong cation
  /// Water held at each pH by HCl or NaOH, at a temperature, with an activity model.
  static ProfileConditions in_water(double temperature_C, ActivityModel activity) {
    ProfileConditions c;
    c.temperature_C = temperature_C;
    c.activity = activity;
    return c;
  }
};

/// Solubility at one pH.
struct SolubilityAtPh {
  double pH = 7.0;
  double solubility_mol_per_L = 0.0;        ///< total dissolved drug
  double ideal_solubility_mol_per_L = 0.0;  ///< Henderson-Hasselbalch: S0 sum_j alpha_j/alpha_n, activities 1
                                            ///< (held at kSolubilityCap_mol_per_L for charts)
  /// The same without the cap: it may exceed any real solution (or be infinite where the
  /// neutral fraction underflows); ideal_above_cap says it lies above the cap.
  double ideal_solubility_unbounded_mol_per_L = 0.0;
  bool ideal_above_cap = false;
  std::string limiting_solid = "free";      ///< "free", a salt id, or "none" (nothing limits)
  double ionic_strength_mol_per_L = 0.0;
  std::vector<double> fractions;            ///< species fractions j = 0..n at this pH
  double titrant_mol_per_L = 0.0;           ///< > 0: base titrant added; < 0: acid titrant
                                            ///< (equivalents of charge per litre)
  /// For each compound salt (same order as compound.salts): ion product at free-form saturation
  /// over Ksp (> 1: the salt limits); 0 when its counterion is absent. For a compound without a
  /// net-neutral form: the ion product over Ksp in the state reported (1 for the limiting salt).
  std::vector<double> salt_saturation_at_free;
  /// For each compound salt: the dissolved drug were that salt the limiting solid (mol/L; 0
  /// where the salt does not limit). Where two salts limit, the lower one is the profile's.
  std::vector<double> salt_limited_mol_per_L;
  bool capped = false;                      ///< solubility above kSolubilityCap_mol_per_L
};

/// pHmax is searched over this range whatever the grid shown (the aqueous pH range, common
/// practice).
inline constexpr double kPhMaxScanFrom = 0.0;
inline constexpr double kPhMaxScanTo = 14.0;

/// Solubilities above this are reported at the cap (no solid limits; outside any real medium).
inline constexpr double kSolubilityCap_mol_per_L = 10.0;

/// Equilibrium solubility with excess solid at a fixed pH (activity coefficients iterated to
/// self-consistency with the ionic strength of the saturated solution, titrant included).
/// The compound's salts must have ksp resolved (load_compound_file does it).
/// Throws InputError when a titrant is not a library reagent giving a single strong ion.
SolubilityAtPh solubility_at_pH(const Compound& compound, const Library& library, double pH,
                                const ProfileConditions& conditions);

/// The same computation prepared once for many pH values (the models are built once).
/// Not thread-safe: one instance per thread.
///
/// Example: `SolubilityScanner s(c, lib, cond); double s4 = s.at(4.0).solubility_mol_per_L;`
class SolubilityScanner {
 public:
  SolubilityScanner(const Compound& compound, const Library& library,
                    const ProfileConditions& conditions);
  ~SolubilityScanner();
  SolubilityScanner(SolubilityScanner&&) noexcept;
  SolubilityScanner& operator=(SolubilityScanner&&) noexcept;

  SolubilityAtPh at(double pH);
  /// True when salt k (index into compound.salts) can limit in this medium: its counterion is
  /// in the medium or is the titrant ion (always, for a compound without a free form).
  bool salt_can_limit(std::size_t k) const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

/// The strong ion a titrant reagent gives: `sign` < 0 for an acid (anion), > 0 for a base
/// (cation). Throws InputError (no location) unless the reagent gives exactly one strong ion
/// of that sign and nothing else (no acid-base system, no ion of the other sign).
const Ion& titrant_strong_ion(const Library& library, const std::string& reagent, int sign);

/// Which pH values a profile covers: an even grid, or an explicit list.
struct ProfileGrid {
  double from_pH = 1.0;
  double to_pH = 13.0;
  double step_pH = 0.05;
  std::vector<double> points_pH;  ///< non-empty: these pH values (sorted, duplicates dropped)
  /// From from_pH to to_pH in steps of step_pH.
  static ProfileGrid range(double from_pH, double to_pH, double step_pH) {
    ProfileGrid g;
    g.from_pH = from_pH;
    g.to_pH = to_pH;
    g.step_pH = step_pH;
    return g;
  }
  /// "ProfileGrid::step_pH = 0, must be > 0" style messages; pH values must lie in [-1, 15].
  bool is_valid(std::string* error) const;
  /// The pH values, ascending: from, from + step, ... up to to (within 1e-9 of a step).
  std::vector<double> values() const;
};

/// Largest number of pH values a profile computes.
inline constexpr std::size_t kMaxProfilePoints = 100001;

/// One point of a profile.
struct ProfilePoint : SolubilityAtPh {
  double solubility_mg_per_mL = 0.0;  ///< as the free form (free-form molar mass)
};

/// pHmax of one salt: where its ion product at free-form saturation equals Ksp, i.e. where the
/// free-form and salt-limited curves cross in this medium (Kramer and Flynn 1972,
/// J. Pharm. Sci. 61, 1896; Serajuddin 2007, Adv. Drug Deliv. Rev. 59, 603).
struct PhMax {
  std::string salt;
  std::string counterion;
  double pH = 0.0;                    ///< refined to 1e-9 pH
  double solubility_mol_per_L = 0.0;  ///< where both solids coexist
  /// True when the profile's limiting solid changes there (no other salt is less soluble).
  bool on_profile = true;
};

/// Where the profile's limiting solid changes from one salt to another (for example a
/// dihydrochloride below and a hydrochloride above): both salts coexist with the solution
/// there, at the free form's undersaturation.
struct SaltTransition {
  std::string below;                  ///< the salt limiting on the acid (low-pH) side
  std::string above;                  ///< the salt limiting on the high-pH side
  double pH = 0.0;                    ///< refined to 1e-9 pH
  double solubility_mol_per_L = 0.0;  ///< where both salts coexist
};

/// A salt's Ksp derived from its solubility in water (docs/model.md, "Salts").
struct DerivedKsp {
  std::string salt;
  std::string solubility_in_water;            ///< as written in the compound file
  double solubility_in_water_mol_per_L = 0.0;
  double reference_temperature_C = 25.0;
  double ksp = 0.0;                           ///< activity product, (mol/L)^2, at the reference T
  double ksp_at_run_temperature = 0.0;        ///< (mol/L)^2, at the profile's temperature
};

/// A pH-solubility profile and what goes with it.
struct Profile {
  std::string compound_id;
  std::string compound_name;
  double molar_mass_g_per_mol = 0.0;          ///< free form
  double temperature_C = 25.0;
  ActivityModel activity = ActivityModel::kDavies;
  std::string acid_titrant, acid_ion;         ///< reagent id and the ion it gives
  std::string base_titrant, base_ion;
  std::vector<std::string> medium_contents;   ///< readable, e.g. "NaCl 154 mM"; empty: water
  double s0_mol_per_L = 0.0;                  ///< at the run temperature (0: no free form)
  std::vector<std::string> species;           ///< labels of the fractions, j = 0..n
  std::vector<double> pka_at_temperature;     ///< thermodynamic pKa at the run temperature
  std::vector<ProfilePoint> points;
  std::vector<PhMax> ph_max;
  std::vector<SaltTransition> salt_transitions;  ///< salt-to-salt changes along the profile
  std::vector<DerivedKsp> derived_ksp;
  std::vector<std::string> notes;
  std::vector<std::string> warnings;
};

/// The profile on a grid, with pHmax of every salt that can limit in this medium (searched on
/// the grid, or on a 0.05-step scan of its span when the grid is coarser, and refined by
/// Brent's method to 1e-9 pH), the derived Ksp of salts given by solubility in water, notes
/// (S0 or pKa used as measured at another temperature, salts that cannot limit) and warnings
/// (ionic strength above 0.5 mol/L, capped points, temperature outside 0-60 °C).
/// Throws InputError for an invalid grid or titrant.
Profile compute_profile(const Compound& compound, const Library& library,
                        const ProfileConditions& conditions, const ProfileGrid& grid,
                        std::vector<std::string> medium_contents = {});

}  // namespace pkarta

#endif  // PKARTA_PROFILE_H_
