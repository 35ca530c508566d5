// Model objects read from files: acid-base systems, ions, reagents, buffers, media, compounds.
#ifndef PKARTA_MODEL_H_
#define PKARTA_MODEL_H_

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "pkarta/base/error.h"

namespace pkarta {

/// Whether a dissociable group is neutral when protonated (acid, COOH -> COO-) or positively
/// charged when protonated (base, R-NH3+ -> R-NH2).
enum class GroupType { kAcid, kBase };

/// How a pKa was measured: thermodynamic (activities, I -> 0), or apparent at a stated ionic
/// strength on the concentration scale (pKc = -log [H+][B]/[A]) or the mixed scale (pKmix =
/// -log aH+ [B]/[A]: pH measured as an activity with a glass electrode, species as
/// concentrations).
enum class PkaScale { kThermodynamic, kConcentration, kMixed };

/// One macroscopic ionization constant, with its temperature dependence.
struct Pka {
  double value = 0.0;                 ///< thermodynamic pKa (I -> 0) at ref_temperature_C
  GroupType type = GroupType::kAcid;
  double dH_kJ_per_mol = 0.0;         ///< enthalpy of ionization
  double dCp_J_per_K_mol = 0.0;       ///< heat capacity of ionization
  double ref_temperature_C = 25.0;
  double sd = 0.0;                    ///< standard uncertainty, pKa units (0: not given)
  SourceLocation where;
  /// As stated in the file: the scale, the ionic strength (mol/L, 0 for thermodynamic), the
  /// background electrolyte (may be empty) and the value before conversion. `value` always
  /// holds the thermodynamic pKa (see to_thermodynamic()).
  PkaScale stated_scale = PkaScale::kThermodynamic;
  double stated_ionic_strength_mol_per_L = 0.0;
  std::string stated_electrolyte;
  double stated_value = 0.0;
  bool is_apparent() const { return stated_scale != PkaScale::kThermodynamic; }
  /// pKa at temperature T by van 't Hoff (see pk_at_temperature).
  double at(double temperature_C) const;
};

/// Thermodynamic pKa of step `step` of a system (species step -> step+1, charges zA and zB =
/// zA - 1) from an apparent one, with Davies activities at the stated ionic strength and the
/// constant's reference temperature (log10 gamma_z = -A z^2 f(I), D = A f(I)):
///   concentration scale: pKa = pKc + D (1 + zB^2 - zA^2)
///   mixed scale:         pKa = pKmix + D (zB^2 - zA^2)
double thermodynamic_pka(PkaScale scale, double apparent, double ionic_strength_mol_per_L, int zA,
                         double temperature_C);

/// An acid-base system: n macroscopic pKa values in ascending order. Species j (j protons
/// removed from the most protonated form) has charge z0 - j + permanent_charge, where z0 is
/// the number of base groups.
struct AcidBaseSystem {
  std::string id;
  std::string name;
  std::string source;               ///< where the constants come from
  std::vector<Pka> pkas;
  int permanent_charge = 0;         ///< e.g. +1 for a quaternary ammonium
  int z0() const;                   ///< charge of the most protonated form
  int charge_of(int j) const { return z0() - j; }
  /// Index of the net-neutral species, or -1 when there is none.
  int neutral_index() const;
  /// Label of species j, e.g. "H2A-" for phosphate j=1.
  std::string species_label(int j) const;
  /// Replaces every apparent pKa's value by its thermodynamic value (stated_value kept); the
  /// charges of each step follow from the group types, so call once all pKa are read.
  void to_thermodynamic();
};

/// Notes saying which pKa (and S0) of a system were stated as apparent constants and how they
/// were converted; empty when all are thermodynamic.
std::vector<std::string> pka_convention_notes(const AcidBaseSystem& system);

/// A strong (fully dissociated) ion, or a non-electrolyte solute (charge 0).
struct Ion {
  std::string id;
  std::string name;
  int charge = 0;
  double molar_mass_g_per_mol = 0.0;
};

/// What one mole of a reagent puts into solution.
struct Contribution {
  enum class Kind { kSystem, kIon } kind = Kind::kIon;
  std::string id;
  double count = 1.0;
};

/// A weighable reagent (or a titrant solution). Neutral as a whole.
struct Reagent {
  std::string id;
  std::string name;
  std::string formula;
  std::string state = "solid";      ///< solid | liquid | solution
  double molar_mass_g_per_mol = 0.0;
  std::vector<Contribution> gives;
};

/// A buffer choice for screening and recipes.
struct Buffer {
  std::string id;
  std::string name;
  std::string system;
  std::vector<std::string> routes;  ///< oral, parenteral, ophthalmic, topical
  double max_conc_mol_per_L = 0.1;
  std::string acid_titrant = "HCl";
  std::string base_titrant = "NaOH";
  std::string acid_reagent;         ///< e.g. NaH2PO4.2H2O (may be empty)
  std::string base_reagent;         ///< e.g. Na2HPO4.12H2O (may be empty)
  bool allows_route(const std::string& route) const;
};

/// A medium: a named mixture of reagents (water, saline, pharmacopeial buffers).
struct Medium {
  std::string id;
  std::string name;
  std::string source;
  std::string nominal_pH;
  std::vector<std::pair<std::string, double>> reagents_mol_per_L;  ///< reagent id, conc
};

/// The library: everything the equilibrium may refer to by id.
struct Library {
  std::string id;
  std::string version;
  std::string name;
  std::vector<std::string> files;   ///< files it was read from ("<built-in>" for the embedded one)
  std::map<std::string, Ion> ions;
  std::map<std::string, AcidBaseSystem> systems;
  std::map<std::string, Reagent> reagents;
  std::map<std::string, Buffer> buffers;
  std::map<std::string, Medium> media;

  const Ion& ion(const std::string& id) const;          ///< throws InputError if unknown
  const AcidBaseSystem& system(const std::string& id) const;
  const Reagent& reagent(const std::string& id) const;
  const Buffer& buffer(const std::string& id) const;
  const Medium& medium(const std::string& id) const;
  /// Adds or overrides every entry of `other`.
  void merge(const Library& other);
};

/// A salt form of a drug: m drug ions to n counterions, written "m:n" (drug : counterion; 1:1
/// by default). The counterion is a strong ion of the library (Cl-, Na+) or one species of a
/// library acid-base system (hydrogen maleate of the maleate system, the tromethamine cation),
/// whose own equilibria then enter the balances. The drug species in the salt has the charge
/// that balances: z(drug) m + z(counterion) n = 0.
struct Salt {
  std::string id;
  std::string counterion;           ///< library ion id, or library system id (see below)
  /// True when `counterion` names an acid-base system of the library; its species of charge
  /// `counterion_charge` is the counterion (the file's attribute counterion-charge).
  bool counterion_is_system = false;
  int counterion_charge = 0;        ///< charge of the system species (system counterions only)
  int drug_count = 1;               ///< m
  int counterion_count = 1;         ///< n
  /// Activity product a(drug ion)^m a(X)^n in (mol/L)^(m+n), at ref_temperature_C.
  std::optional<double> ksp;
  std::optional<double> solubility_in_water_mol_per_L;  ///< alternative to ksp
  std::string solubility_in_water_text;
  double molar_mass_g_per_mol = 0.0;  ///< of m:n formula units; 0 when not given (then derived)
  double ref_temperature_C = 25.0;
  double dH_kJ_per_mol = 0.0;       ///< enthalpy of dissolution; 0 = Ksp constant
  SourceLocation where;
  /// "m:n", e.g. "1:2" for a dihydrochloride.
  std::string stoichiometry() const;
  /// Charge of the drug species in the salt, z(drug) = -z(counterion) n / m (it must divide).
  int drug_charge(int z_counterion) const;
};

/// Charge of a salt's counterion: the library ion's, or the chosen species' of a system.
int counterion_charge_of(const Salt& salt, const Library& library);
/// The counterion as text: "Cl-", or "maleate HA-" for a species of a system.
std::string counterion_label(const Salt& salt, const Library& library);

/// A measured solubility point (shake-flask).
struct MeasuredPoint {
  double pH = 7.0;
  double solubility_mol_per_L = 0.0;
  double temperature_C = 25.0;
  double log10_sd = 0.0;  ///< standard uncertainty of log10 S (the fit's weight 1/sd^2); 0: unweighted
  SourceLocation where;
};

/// A drug substance read from a compound file.
struct Compound {
  std::string id;
  std::string name;
  std::string description;
  std::string file;                 ///< the file it was read from
  double molar_mass_g_per_mol = 0.0;
  AcidBaseSystem system;            ///< the drug's own acid-base system (id = compound id)
  bool has_intrinsic_solubility = false;
  double s0_mol_per_L = 0.0;        ///< intrinsic solubility of the net-neutral form
  double s0_ref_temperature_C = 25.0;
  std::optional<double> s0_dH_kJ_per_mol;  ///< enthalpy of solution (absent: S0 as measured)
  double s0_log_sd = 0.0;
  /// Ionic strength of the buffer S0 was measured in (mol/L; 0: not stated). With Davies the
  /// neutral species has gamma = 1, so S0 needs no correction; the value is recorded.
  double s0_stated_ionic_strength_mol_per_L = 0.0;
  std::string s0_stated_electrolyte;
  std::vector<Salt> salts;
  std::vector<MeasuredPoint> measured;

  const Salt* salt(const std::string& id) const;   ///< nullptr when unknown
  /// S0 at temperature T (van 't Hoff with the enthalpy of solution when given).
  double s0_at(double temperature_C) const;
  /// pka_convention_notes() of the compound's system plus a note on a stated S0 ionic strength.
  std::vector<std::string> convention_notes() const;
};

}  // namespace pkarta

#endif  // PKARTA_MODEL_H_
