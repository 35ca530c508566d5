// Activity-coefficient models of the solver: Davies, specific ion interaction (SIT), the
// extended Debye-Hückel equation with ion-size and b parameters (Truesdell-Jones), and Davies
// with explicit ion pairs of the metal ions with the anions of the acid-base systems.
//
// Every model is written in one form per species i of charge z (I the ionic strength):
//   log10 gamma_i = -A z^2 sqrt(I) / (1 + Ba_i sqrt(I)) + b_i I + c_i
// Davies: Ba = 1, b = 0.3 A z^2, c = 0. SIT: Ba = 1.5 (kg/mol)^1/2, b = 0, c = sum_k eps(i,k)
// m_k over the strong ions k of opposite charge. Truesdell-Jones: Ba = B(T) a_i (a_i the ion
// size, Kielland 1937), b_i from Truesdell and Jones 1974 (0 where they give none), c = 0;
// species without published parameters take the Davies form. Ion pairs: every species (pairs
// too) takes the Davies form, and the association constants below make the pairs species of
// the mass balances of both the metal and the system. Model and sources:
// docs/model.md, "Activities"; docs/data-sources.md.
#ifndef PKARTA_ACTIVITY_H_
#define PKARTA_ACTIVITY_H_

#include <optional>
#include <string>
#include <vector>

namespace pkarta {

enum class ActivityModel { kDavies, kIdeal, kSit, kTruesdellJones, kIonPairs };

/// The command-line and JSON name of a model: "davies", "ideal", "sit", "truesdell-jones",
/// "ion-pairs".
std::string activity_model_id(ActivityModel model);
/// A model named in words for notes and reports, e.g. "specific ion interaction (SIT)".
std::string activity_model_label(ActivityModel model);
/// The model in a method note: "Davies activities", "ideal activities (coefficients 1)",
/// "specific ion interaction (SIT) activities", ...
std::string activity_words(ActivityModel model);
/// The model of a name as activity_model_id() gives it; nullopt for an unknown name.
std::optional<ActivityModel> parse_activity_model(const std::string& name);
/// The names accepted by parse_activity_model(), joined by '|'.
std::string activity_model_names();

/// The activity model of every command that does not name one.
inline constexpr ActivityModel kDefaultActivityModel = ActivityModel::kDavies;

/// Terms of log10 gamma = -A z^2 sqrt(I)/(1 + ba sqrt(I)) + b I + c for one species.
struct LogGammaTerms {
  double ba = 1.0;
  double b = 0.0;
  double c = 0.0;
};

/// log10 gamma of a species of charge z with terms t at ionic strength I (A the Debye-Hückel
/// constant, sqrt_i = sqrt(I)). Neutral species: 0.
inline double log10_gamma(const LogGammaTerms& t, int z, double a, double ionic_strength,
                          double sqrt_i) {
  if (z == 0) return 0.0;
  return -a * z * z * sqrt_i / (1.0 + t.ba * sqrt_i) + t.b * ionic_strength + t.c;
}

/// The strong-ion medium of one mixture as an activity model sees it, and the terms of each
/// species in it. A species is named by its key and charge: a strong ion by its id ("Na+"), a
/// species of an acid-base system by the system id ("phosphate", charge -2 for HPO4 2-),
/// hydrogen and hydroxide ions by "H+" and "OH-".
class ActivityMedium {
 public:
  ActivityMedium(ActivityModel model, double temperature_C);
  /// Adds a strong ion of the mixture (concentration in mol/L; a non-electrolyte is ignored).
  void add_ion(const std::string& id, int charge, double conc_mol_per_L);
  /// The terms of a species in this medium (the Davies terms for the ideal model, whose
  /// coefficients the solver sets to 1 without asking).
  LogGammaTerms terms(const std::string& key, int charge) const;
  ActivityModel model() const { return model_; }

 private:
  struct MediumIon {
    std::string id;
    int charge = 0;
    double molal = 0.0;
  };
  ActivityModel model_;
  double a_;      // Debye-Hückel A
  double b_dh_;   // Debye-Hückel B, 1/angstrom
  double rho_;    // water density, kg/L (molality of the medium ions: c / rho)
  std::vector<MediumIon> ions_;
};

/// An association constant M + L = ML: log10 K at 25 °C and I = 0 (K in L/mol), and the
/// enthalpy of association (kJ/mol, 0 when not known: K held at every temperature).
struct AssociationConstant {
  double log10_k = 0.0;
  double dH_kJ_per_mol = 0.0;
  /// K at temperature T (van 't Hoff, constant dH).
  double k_at(double temperature_C) const;
};
/// A metal ion's first hydroxo complex M(2+) + OH- = MOH+, which the models with specific terms
/// and the ion-pair model carry with the water equilibrium. Sources: docs/data-sources.md,
/// "Activity coefficients".
using HydroxoComplex = AssociationConstant;
/// The hydroxo complex of a strong ion (by id and charge), or nullopt when none is modelled.
std::optional<HydroxoComplex> hydroxo_complex(const std::string& ion, int charge);
/// The ion pair of the ion-pair model between a metal ion (by id and charge, e.g. "Na+", 1)
/// and the species of charge `ligand_charge` of an acid-base system (by id, e.g. "phosphate",
/// -2 for HPO4 2-), or nullopt when the model has none. Sources: docs/data-sources.md,
/// "Activity coefficients".
std::optional<AssociationConstant> ion_pair_constant(const std::string& metal, int metal_charge,
                                                     const std::string& system, int ligand_charge);

/// Debye-Hückel B (1/angstrom) at temperature T: 50.29 sqrt(rho / (eps T)), rho in g/cm3;
/// about 0.3288 at 25 °C.
double debye_huckel_b(double temperature_C);

/// SIT interaction coefficient eps(cation, anion) in kg/mol from the built-in table, or
/// nullopt when the pair is not tabulated (docs/data-sources.md, "Activity coefficients").
std::optional<double> sit_epsilon(const std::string& cation, int cation_charge,
                                  const std::string& anion, int anion_charge);

}  // namespace pkarta

#endif  // PKARTA_ACTIVITY_H_
