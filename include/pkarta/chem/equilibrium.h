// Closed-system acid-base equilibrium with activity corrections and drug solid phases.
//
// Given totals (acid-base systems, strong ions, a drug dose in a stated form), finds the pH,
// the ionic strength and which drug solids remain: any set of the free form and the salts
// whose counterion is present, as many as the phase rule allows (an active-set solve).
// Model: docs/model.md. Concentrations are mol/L; pH = -log10 a(H+).
#ifndef PKARTA_EQUILIBRIUM_H_
#define PKARTA_EQUILIBRIUM_H_

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "pkarta/chem/activity.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// Maximum number of pKa values of one system.
inline constexpr int kMaxPka = 8;

/// Maximum number of salts of one compound.
inline constexpr int kMaxSalts = 8;
/// Components of the solid partition: the drug and up to one counterion per salt.
inline constexpr int kMaxSolidComponents = 1 + kMaxSalts;

/// The drug solids present in a state: the free form and any of the compound's salts.
struct SolidSet {
  bool free = false;
  std::uint32_t salts = 0;             ///< bit k: the compound's salt k
  bool empty() const { return !free && salts == 0; }
  bool has_salt(int k) const { return (salts >> k) & 1u; }
  int count() const;
  bool operator==(const SolidSet& o) const { return free == o.free && salts == o.salts; }
  bool operator!=(const SolidSet& o) const { return !(*this == o); }
};

/// The solids as text: "none", "free", a salt id, "free+SALT", and for several salts their ids
/// in the compound's order joined by '+' (after "free" when it is present).
std::string to_string(const SolidSet& solids, const Compound& compound);

/// A system at a total concentration.
struct SystemAmount {
  AcidBaseSystem system;
  double total_mol_per_L = 0.0;
};

/// A strong ion (or non-electrolyte solute) at a concentration.
struct IonAmount {
  std::string id;
  int charge = 0;
  double conc_mol_per_L = 0.0;
};

/// The drug: its compound, the dose (all of it, dissolved or not), and which solids may form.
struct DrugAmount {
  Compound compound;                  ///< salts must have ksp resolved (see resolve_salt_ksp)
  double dose_mol_per_L = 0.0;
  std::string form = "free";          ///< "free" or a salt id (its counterion is in the ions)
  bool allow_solids = true;           ///< false: everything dissolves (for saturation ratios)
};

/// Everything in the solution.
struct Mixture {
  double temperature_C = 25.0;
  ActivityModel activity = kDefaultActivityModel;
  std::vector<SystemAmount> systems;
  std::vector<IonAmount> ions;
  std::optional<DrugAmount> drug;

  /// Adds `amount` mol/L of a strong ion (merging with an existing entry of the same id).
  void add_ion(const std::string& id, int charge, double amount_mol_per_L);
  /// Adds `amount` mol/L of a system (merging with an existing entry of the same id).
  void add_system(const AcidBaseSystem& system, double amount_mol_per_L);
};

/// Options of the solver. Defaults are what every command uses.
struct SolverOptions {
  int max_ph_iterations = 200;              ///< safeguarded-Newton steps per inner solve
  int max_ionic_strength_iterations = 200;  ///< outer fixed-point steps on I
  double ph_tolerance = 1e-14;              ///< on the pH step
  double ionic_strength_rel_tolerance = 1e-12;
  bool is_valid(std::string* error) const;
};

enum class Termination { kConverged, kMaxIterations, kNumericalFailure };

/// One dissolved species.
struct Species {
  std::string name;        ///< e.g. "phosphate H2A-", "Na+", "H+"
  std::string system;      ///< system id, or "" for strong ions, H+ and OH-
  int charge = 0;
  double conc_mol_per_L = 0.0;
  double activity_coefficient = 1.0;
};

/// The drug's share of an equilibrium state.
struct DrugState {
  double dose_mol_per_L = 0.0;
  double dissolved_mol_per_L = 0.0;
  double dissolved_mg_per_mL = 0.0;       ///< as the free form
  double dose_mg_per_mL = 0.0;            ///< the whole dose, as the free form
  SolidSet solids;                        ///< the solids present
  std::string solid = "none";             ///< to_string(solids, compound)
  double free_solid_mol_per_L = 0.0;      ///< undissolved free form
  double salt_solid_mol_per_L = 0.0;      ///< drug held in undissolved salts (all of them)
  /// Undissolved salt k of the compound, mol/L of m:n formula units (0 when absent).
  std::vector<double> salt_solids_mol_per_L;
  double neutral_mol_per_L = 0.0;         ///< dissolved net-neutral species
  /// Largest of c_neutral/S0 and a(ion)^m a(X)^n/Ksp with the whole dose dissolved.
  double saturation_ratio = 0.0;
  std::vector<double> fractions;          ///< dissolved species fractions, j = 0..n
};

/// Result of solve(): a value type; check usable() before using the numbers.
struct Equilibrium {
  Termination termination = Termination::kNumericalFailure;
  std::string message = "solve() was not called";
  int evaluations = -1;                   ///< charge-balance evaluations
  double pH = 0.0;
  double temperature_C = 25.0;
  ActivityModel activity = kDefaultActivityModel;  ///< the model the state was solved with
  double ionic_strength_mol_per_L = 0.0;
  double osmolarity_mOsm_per_L = 0.0;     ///< ideal: sum of all dissolved species
  double charge_residual_rel = 0.0;       ///< |sum z c| / sum |z c|
  double mass_residual_rel = 0.0;         ///< worst system or drug mass balance
  std::vector<Species> species;
  std::optional<DrugState> drug;
  std::vector<std::string> warnings;
  bool usable() const { return termination == Termination::kConverged; }
};

/// Compact summary of a solve, without strings (for hot loops).
struct StateSummary {
  bool converged = false;
  double pH = 0.0;
  double ionic_strength_mol_per_L = 0.0;
  double drug_dissolved_mol_per_L = 0.0;
  SolidSet solids;                        ///< the drug solids present
  double charge_residual_rel = 0.0;
  int evaluations = 0;
};

/// The prepared model: temperature-corrected constants and the charge-balance function.
/// Construct once per mixture; cheap (no strings kept).
class EquilibriumModel {
 public:
  explicit EquilibriumModel(const Mixture& mixture);

  /// Drug partition between solution and solids at a fixed pH (current activity coefficients).
  struct Partition {
    SolidSet solids;          ///< present solids (salts by the compound's index)
    double dissolved = 0.0;   ///< mol/L of drug in solution
    double salt_drug = 0.0;   ///< mol/L of drug held in salts
    double free_solid = 0.0;
    /// Formula units of each model salt precipitated, mol/L (they also remove counterion).
    std::array<double, kMaxSalts> salt_solid{};
  };
  struct Evaluation {
    double charge = 0.0;       ///< sum z c (mol/L); decreasing in pH
    double dcharge_dpH = 0.0;  ///< its derivative (negative)
    double abs_sum = 0.0;      ///< sum |z c| (for the relative residual)
    double ionic_strength = 0.0;
    double osmolarity = 0.0;   ///< mol/L of dissolved particles
    Partition drug;
  };

  /// Sets the ionic strength used for activity coefficients (no effect when ideal).
  void set_ionic_strength(double ionic_strength_mol_per_L);
  double ionic_strength() const { return ionic_strength_; }
  /// The activity coefficient of an ion of this charge without specific terms (the model's
  /// form for a species it has no parameters for); Davies: every ion of the charge.
  double gamma(int charge) const;
  /// Activity coefficient of species j of system k (drug: k = -1), of strong ion t of the
  /// mixture, of H+ and of OH-, under the current ionic strength.
  double species_gamma(int system, int j) const;
  double ion_gamma(int ion) const { return ions_[ion].gamma; }
  /// Strong ion t held in its hydroxo complex (CaOH+, MgOH+; models with specific terms) at
  /// pH, mol/L; 0 for other ions and models.
  double hydroxo_paired(int ion, double pH) const;
  /// The ion-pair model: one ion pair (or hydroxo complex) of a state, metal ion t of the
  /// mixture with species j of system k (k = -1, j = -1: the hydroxo complex MOH), mol/L.
  struct IonPairSpecies {
    int ion = -1;
    int system = -1;
    int j = -1;
    int charge = 0;
    double conc_mol_per_L = 0.0;
  };
  /// Whether the model carries ion pairs (the ion-pair model with a metal and a partner present).
  bool has_ion_pairs() const { return !pair_metals_.empty(); }
  /// The ion pairs at pH under the current activity coefficients, and the free concentration of
  /// each strong ion of the mixture (its total where it forms no pair), mol/L.
  void ion_pair_state(double pH, std::vector<IonPairSpecies>* pairs, std::vector<double>* free_ion) const;
  double h_gamma() const { return gamma_h_; }
  double oh_gamma() const { return gamma_oh_; }
  double kw() const { return kw_; }

  /// Charge balance and everything derived at pH, under the current activity coefficients.
  Evaluation evaluate(double pH) const;

  /// Solves charge balance and ionic strength self-consistently.
  StateSummary solve(const SolverOptions& options, double pH_guess = 7.0);

  /// Effective (activity-corrected) Ka of step i of system k (drug: k = -1).
  double effective_ka(int system, int step) const;
  /// Species fractions of system k (drug: k = -1) at pH under current coefficients.
  void fractions(int system, double pH, double* alpha) const;

  /// The drug's solubility at pH, mol/L, with every counterion at its total in the mixture and
  /// the current activity coefficients: the least of the free form's S0/alpha_n and each model
  /// salt's (Ksp'/x^n)^(1/m)/alpha_j. `limiting` (may be null) gets -1 for the free form, the
  /// compound's salt index for a salt, or -2 when nothing limits (infinity returned).
  double solubility_limit(double pH, int* limiting) const;

  int num_systems() const { return static_cast<int>(systems_.size()); }
  /// Model salts (those whose counterion is present): the compound's index of each.
  int num_salts() const { return static_cast<int>(salts_.size()); }
  int salt_compound_index(int k) const { return salts_[k].index; }
  /// Counterion removed from solution by the partition, mol/L, for ion t of the mixture.
  double ion_removed(const Partition& p, int ion) const;
  /// Total of system k removed from solution by salts whose counterion is its species, mol/L.
  double system_removed(const Partition& p, int system) const;
  bool has_drug() const { return has_drug_; }

 private:
  struct Sys {
    int n = 0;
    int z0 = 0;
    double total = 0.0;
    std::array<double, kMaxPka> ka{};      // thermodynamic
    std::array<double, kMaxPka> ka_eff{};  // activity-corrected
    std::array<LogGammaTerms, kMaxPka + 1> act{};  // per-species activity terms
    std::array<double, kMaxPka + 1> gamma{};        // per-species activity coefficients
    std::array<double, kMaxPka + 1> fixed{};        // 10^c where the form is the generic one
    std::array<bool, kMaxPka + 1> generic_form{};   // Ba and b as generic_act_: no pow needed
  };
  struct SaltPhase {
    int index = -1;          // the compound's salt index
    int ion = -1;            // index into ions_ (strong counterion), else -1
    int sys = -1;            // index into systems_ (counterion a species of a system), else -1
    int cj = -1;             // that species of the system
    int comp = -1;           // component of the partition (1.. : distinct counterions)
    int species = -1;        // drug species j with charge z_d (z_d m + z_X n = 0)
    int m = 1, n = 1;        // drug : counterion
    int zd = 0, zx = 0;
    double ksp = 0.0;        // thermodynamic, at T
    double ksp_eff = 0.0;    // divided by gamma(drug ion)^m gamma(X)^n
  };
  /// Concentration solubility products of the model salts at [H+] = h: Ksp over the activity
  /// coefficients, and for a counterion that is a species of a system also over that
  /// species' fraction (the component's amount is then the system's dissolved total).
  void salt_products(double h, double* kq) const;
  bool try_subset(std::uint32_t subset, const double* alpha, const double* kq, double dose,
                  Partition* out) const;
  bool undersaturated_except(std::uint32_t subset, const double* alpha, const double* kq, double d,
                             const double* x, double slack) const;
  /// Total of component c (c >= 1): the counterion ion's concentration or the system's total.
  double component_total(int c) const { return comp_total_[c]; }
  struct IonC {
    IonC(int z, double c) : charge(z), conc(c) {}
    int charge = 0;
    double conc = 0.0;
    LogGammaTerms act;
    double gamma = 1.0;
    double fixed = 1.0;
    bool generic_form = true;
  };
  void update_effective_constants();
  void prepare_activity_terms(const Mixture& mixture);
  void prepare_ion_pairs(const Mixture& mixture);
  void update_pair_constants();
  static double moments(const Sys& s, double h, double* alpha, double* zbar, double* z2bar);
  Partition partition(const double* alpha, double h, double dose) const;
  /// d/d ln[H+] of the drug's share of the charge (dissolved drug charge less the counterion
  /// its salts hold) with the partition's solids kept present: implicit differentiation of the
  /// solids' solubility products and the mass balances (the Newton matrix of the dual).
  /// zb, z2: the drug's mean charge and mean squared charge at h. False when singular.
  bool partition_slope(const Partition& p, double h, double zb, double z2, double* slope) const;
  /// Charge, |charge|, z^2 and particle sums of the counterion taken out of solution by the
  /// partition's salts (strong ions by their charge, system species by the system's moments).
  void removed_moments(const Partition& p, double h, double* charge, double* abs_charge, double* z2,
                       double* particles) const;

  bool ideal_ = false;
  bool per_species_ = false;  // an activity model with specific terms (not Davies, not ideal)
  double temperature_C_ = 25.0;
  double a_davies_ = 0.5108;
  double kw_ = 1e-14;
  double ionic_strength_ = 0.0;
  // Sums over the strong ions: charge, |charge|, z^2 and particles (mol/L).
  double ions_charge_ = 0.0, ions_abs_ = 0.0, ions_z2_ = 0.0, ions_n_ = 0.0;
  std::array<double, 33> gamma_{};  // index z + 16, charges -16..16
  LogGammaTerms generic_act_[33];   // per-species models: terms of a species without parameters
  struct HydroxoPair {
    int ion = -1;        // index into ions_
    int z = 2;           // charge of the metal ion
    double k = 0.0;      // thermodynamic formation constant at T
    double k_eff = 0.0;  // k gamma(M) gamma(OH) / gamma(MOH)
    LogGammaTerms act;   // of MOH+
  };
  std::vector<HydroxoPair> pairs_;
  // The ion-pair model (docs/model.md, "Activities"): metal ions held in pairs (index a), each
  // with its hydroxo complex where one is modelled, and per system the pairs of its species.
  static constexpr int kMaxPairMetals = 8;
  static constexpr int kMaxPairSystems = 8;
  struct PairMetal {
    int ion = -1;          // index into ions_
    int z = 1;
    double k_oh = 0.0;     // hydroxo complex MOH, thermodynamic at T (0: none)
    double k_oh_eff = 0.0;
  };
  struct PairTerm {
    int metal = -1;        // index into pair_metals_
    int j = 0;             // species of the system
    int zl = 0;            // its charge
    double k = 0.0;        // thermodynamic at T
    double k_eff = 0.0;    // k gamma(M) gamma(L) / gamma(ML)
  };
  struct PairSystem {
    int sys = -1;          // index into systems_
    int n = 0;             // its pKa count
    double total = 0.0;    // its total, mol/L
    std::vector<PairTerm> terms;
    /// K'_aj by metal and species (0: no pair), the terms as a dense table for the hot loops.
    std::array<std::array<double, kMaxPka + 1>, kMaxPairMetals> k_eff{};
  };
  /// Work of one ion-pair state at [H+] = h: free metals, hydroxide and per pair system the
  /// weights beta_j P_j (beta_j = prod ka_eff / h^j, P_j = 1 + sum K_eff m) and their sum.
  struct PairWork {
    double m[kMaxPairMetals];
    double oh = 0.0;
    double inv_jacobian = 0.0;  // one metal: 1/(dF/dm) of the last Newton step (0: not known)
    double w[kMaxPairSystems][kMaxPka + 1];     // beta_j P_j / S: fractions of species j (free and paired)
    double beta_s[kMaxPairSystems][kMaxPka + 1];  // beta_j / S: the free species' share, per unit total
  };
  /// Solves the metals' mass balances at pH ([H+] = h) by Newton from the last solution,
  /// carried to this pH along its slope dm/dpH, and fills `out`.
  void solve_pairs(double pH, double h, double oh, PairWork* out) const;
  /// Adds the ion-pair model's systems and pairs to the sums of evaluate() at pH.
  void evaluate_pairs(double pH, double h, double oh, double* charge, double* dsum,
                      double* abs_sum, double* i2, double* osm) const;
  bool ion_pair_model_ = false;
  std::vector<PairMetal> pair_metals_;
  std::vector<PairSystem> pair_systems_;
  std::vector<int> sys_pair_;              // per system: index into pair_systems_, or -1
  mutable std::array<double, kMaxPairMetals> free_metal_{};  // last solution (warm start) ...
  mutable std::array<double, kMaxPairMetals> free_metal_slope_{};  // ... its dm/dpH ...
  mutable double free_metal_pH_ = 0.0;                            // ... and its pH
  LogGammaTerms h_act_, oh_act_;
  double gamma_h_ = 1.0, gamma_oh_ = 1.0;
  bool h_generic_ = false, oh_generic_ = false;  // H+ and OH- terms of the generic form
  double h_fixed_ = 1.0, oh_fixed_ = 1.0;        // ... and their factors 10^c
  double generic_ba_ = 1.0;         // per-species models: Ba of the generic form
  double generic_b1_ = 0.0;         // ... and its b for charge 1 (b_z = b_1 z^2)
  std::vector<Sys> systems_;
  std::vector<IonC> ions_;
  bool has_drug_ = false;
  bool drug_solids_ = true;
  Sys drug_;
  int drug_neutral_ = -1;
  double s0_ = 0.0;
  /// At most N elements held in the model itself: constructing a model allocates nothing for
  /// its salts, components and active sets (only the first `count` items are ever read, and
  /// the rest are left unset).
  template <typename T, std::size_t N>
  struct Bounded {
    std::array<T, N> items;
    std::size_t count = 0;
    std::size_t size() const { return count; }
    void push_back(const T& v) { items[count++] = v; }
    T& operator[](std::size_t i) { return items[i]; }
    const T& operator[](std::size_t i) const { return items[i]; }
    T* begin() { return items.data(); }
    T* end() { return items.data() + count; }
    const T* begin() const { return items.data(); }
    const T* end() const { return items.data() + count; }
  };
  Bounded<SaltPhase, kMaxSalts> salts_;
  Bounded<int, kMaxSolidComponents> comp_ion_;  // ion index of component c >= 1 (comp_ion_[0] = -1)
  Bounded<int, kMaxSolidComponents> comp_sys_;  // system index of component c, or -1 (an ion)
  // Total of each component (the drug's dose at 0), fixed with the model.
  std::array<double, kMaxSolidComponents> comp_total_{};
  // Candidate active sets (bit 0 free, bit k+1 salt k), fewest solids first.
  Bounded<std::uint32_t, std::size_t{1} << (kMaxSalts + 1)> subsets_;
  mutable std::uint32_t last_subset_ = 0;    // the active set found last (tried first)
  mutable std::uint32_t warm_subset_ = 0;    // active set of warm_mu_ (general solve)
  mutable std::array<double, kMaxSolidComponents> warm_mu_{};
  // Per model salt, the amount solved for in its last lone-salt partition (NaN: none yet).
  mutable std::array<double, kMaxSalts> lone_warm_ = filled_nan();
  static constexpr std::array<double, kMaxSalts> filled_nan() {
    std::array<double, kMaxSalts> a{};
    for (double& v : a) v = std::numeric_limits<double>::quiet_NaN();
    return a;
  }
};

/// Solves a mixture and returns the full state (species list, drug state, warnings).
Equilibrium solve(const Mixture& mixture, const SolverOptions& options = {});

/// Buffer capacity d(strong base)/d(pH) of the closed system at fixed totals, activity
/// coefficients recomputed and solids kept in equilibrium (central numerical derivative).
double buffer_capacity(const Mixture& mixture, const SolverOptions& options = {});

/// Ideal van Slyke (1922) buffer capacity of the state's dissolved species:
/// ln10 ([H+] + [OH-] + sum_sys C (sum j^2 alpha_j - (sum j alpha_j)^2)).
double van_slyke_capacity(const Mixture& mixture, double pH);

/// Derives each salt's Ksp from its solubility in water, self-consistently: the salt dissolved
/// in pure water at that concentration (at the salt's temperature), Ksp = a(drug ion) a(X).
/// Throws InputError when the salt would disproportionate (its own pH lies beyond pHmax).
void resolve_salt_ksp(Compound& compound, const Library& library);

/// The salt's Ksp at temperature T (van 't Hoff with its dH of dissolution, else constant).
double salt_ksp_at(const Salt& salt, double temperature_C);

/// Titration at a fixed pH, the one loop of the buffer screen and the recipes: the charge of
/// the model's species at pH (mol/L; > 0 when anions must be added) is balanced by strong ions
/// the caller adds, `added(q)` returning their share of the ionic strength, and the ionic
/// strength is iterated to self-consistency (fixed point, 1e-13 relative, at most 200 steps;
/// one step when `ideal`). Returns whether it converged; `ionic_strength` (may be null) gets the
/// last ionic strength computed, mol/L.
template <typename F>
bool balance_charge_at_pH(EquilibriumModel& model, double pH, bool ideal, F&& added,
                          double* ionic_strength = nullptr) {
  double ionic = 0.0;
  for (int it = 0; it < 200; ++it) {
    model.set_ionic_strength(ionic);
    const EquilibriumModel::Evaluation ev = model.evaluate(pH);
    const double i_new = ev.ionic_strength + added(ev.charge);
    if (ionic_strength) *ionic_strength = i_new;
    if (ideal || std::fabs(i_new - ionic) <= 1e-13 * std::max(i_new, 1e-30)) return true;
    ionic = i_new;
  }
  return false;
}

/// Dissolved drug (mol/L) with an m:n salt at saturation: D from (alpha_j D)^m x^n = Ksp', with
/// Ksp' the concentration product, alpha_j the fraction of the drug species in the salt and x
/// the counterion species' concentration (mol/L). The one formula of every salt-limited
/// solubility (the solver's solubility_limit, the profile and the dilution).
inline double salt_limited_solubility(double ksp_conc, int m, int n, double alpha_j, double x) {
  if (m == 1 && n == 1) return ksp_conc / (alpha_j * x);
  double xn = 1.0;
  for (int i = 0; i < n; ++i) xn *= x;
  return std::pow(ksp_conc / xn, 1.0 / m) / alpha_j;
}

/// The molar mass of a drug form: the free form, or a salt (given, or free + counterion).
double form_molar_mass(const Compound& compound, const std::string& form, const Library& library);
/// The molar mass of m:n formula units of a salt: given, or m free form + n counterion (for a
/// counterion of a system, n of its neutral parent reagent; InputError when there is none).
double salt_molar_mass(const Compound& compound, const Salt& salt, const Library& library);

}  // namespace pkarta

#endif  // PKARTA_EQUILIBRIUM_H_
