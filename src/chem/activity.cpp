#include "pkarta/chem/activity.h"

#include <cmath>
#include <string_view>

#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

// Specific ion interaction coefficients eps(cation, anion), kg/mol, at 25 °C (taken as
// independent of temperature, as the compilation does between about 10 and 40 °C). Sources in
// docs/data-sources.md, "Activity coefficients": NEA-TDB, Grenthe, Fuger, Konings, Lemire,
// Muller, Nguyen-Trung and Wanner 1992, Chemical Thermodynamics of Uranium, Appendix B, and
// Guillaumont, Fanghänel, Fuger, Grenthe, Neck, Palmer and Rand 2003, Update on the Chemical
// Thermodynamics of U, Np, Pu, Am and Tc, Appendix B, Tables B-3 and B-4; acetate and citrate
// from Hummel, Anderegg, Puigdomènech, Rao and Tochiyama 2005, Chemical Thermodynamics of
// Compounds and Complexes of U, Np, Pu, Am, Tc, Se, Ni and Zr with Selected Organic Ligands.
// All recalled from those tables, to be verified. A system's species is keyed by the system id
// and its charge.
struct SitPair {
  std::string_view cation;
  int zc;
  std::string_view anion;
  int za;
  double eps;
};
constexpr SitPair kSit[] = {
    // hydrogen ion and metal ions with chloride, nitrate, bromide
    {"H+", 1, "Cl-", -1, 0.12},
    {"H+", 1, "NO3-", -1, 0.07},
    {"H+", 1, "Br-", -1, 0.17},
    {"Li+", 1, "Cl-", -1, 0.10},
    {"Na+", 1, "Cl-", -1, 0.03},
    {"K+", 1, "Cl-", -1, 0.00},
    {"Ca2+", 2, "Cl-", -1, 0.14},
    {"Mg2+", 2, "Cl-", -1, 0.19},
    {"Na+", 1, "NO3-", -1, -0.04},
    {"K+", 1, "NO3-", -1, -0.11},
    {"Na+", 1, "Br-", -1, 0.05},
    // hydroxide
    {"Li+", 1, "OH-", -1, -0.02},
    {"Na+", 1, "OH-", -1, 0.04},
    {"K+", 1, "OH-", -1, 0.09},
    // phosphate
    {"Na+", 1, "phosphate", -1, -0.08},
    {"Na+", 1, "phosphate", -2, -0.15},
    {"Na+", 1, "phosphate", -3, -0.25},
    {"K+", 1, "phosphate", -1, -0.14},
    {"K+", 1, "phosphate", -2, -0.10},
    {"K+", 1, "phosphate", -3, -0.09},
    // carbonate
    {"Na+", 1, "carbonate", -1, 0.00},
    {"Na+", 1, "carbonate", -2, -0.08},
    {"K+", 1, "carbonate", -2, 0.02},
    // sulfate (the strong ion and the system's species)
    {"Na+", 1, "SO4--", -2, -0.12},
    {"K+", 1, "SO4--", -2, -0.06},
    {"Na+", 1, "sulfate", -2, -0.12},
    {"K+", 1, "sulfate", -2, -0.06},
    {"Na+", 1, "sulfate", -1, -0.01},
    // borate
    {"Na+", 1, "borate", -1, -0.07},
    // acetate and citrate
    {"Na+", 1, "acetate", -1, 0.08},
    {"Na+", 1, "citrate", -1, -0.05},
    {"Na+", 1, "citrate", -2, -0.04},
    {"Na+", 1, "citrate", -3, -0.076},
};

// Ion-size parameters a (angstrom) and b (L/mol) of the extended Debye-Hückel equation:
// a from Kielland 1937, J. Am. Chem. Soc. 59, 1675, Table I; a and b together, where given,
// from Truesdell and Jones 1974, J. Res. U.S. Geol. Surv. 2, 233, Table 1. Recalled from those
// tables, to be verified.
struct IonSize {
  std::string_view key;
  int z;
  double a;
  double b;
};
constexpr IonSize kIonSize[] = {
    {"H+", 1, 9.0, 0.0},         {"OH-", -1, 3.5, 0.0},       {"Li+", 1, 6.0, 0.0},
    {"Na+", 1, 4.0, 0.075},      {"K+", 1, 3.5, 0.015},       {"Ca2+", 2, 5.0, 0.165},
    {"Mg2+", 2, 5.5, 0.20},      {"Cl-", -1, 3.5, 0.015},     {"Br-", -1, 3.0, 0.0},
    {"I-", -1, 3.0, 0.0},        {"NO3-", -1, 3.0, 0.0},      {"SO4--", -2, 5.0, -0.04},
    {"sulfate", -2, 5.0, -0.04}, {"sulfate", -1, 4.0, 0.0},   {"carbonate", -1, 5.4, 0.0},
    {"carbonate", -2, 5.4, 0.0}, {"phosphate", -1, 4.0, 0.0}, {"phosphate", -2, 4.0, 0.0},
    {"phosphate", -3, 4.0, 0.0}, {"acetate", -1, 4.5, 0.0},   {"citrate", -1, 3.5, 0.0},
    {"citrate", -2, 4.5, 0.0},   {"citrate", -3, 5.0, 0.0},
};

// First hydroxo complexes of Ca2+ and Mg2+ (log10 K at I = 0, 25 °C): recalled from Smith and
// Martell, Critical Stability Constants, vol. 4 (Inorganic Complexes), Plenum 1976, to be
// verified; their enthalpies are not given here (0: K held at every temperature).
struct Hydroxo {
  std::string_view ion;
  int z;
  double log10_k;
  double dH;
};
constexpr Hydroxo kHydroxo[] = {{"Ca2+", 2, 1.30, 0.0}, {"Mg2+", 2, 2.58, 0.0}};

// Ion pairs of the ion-pair model, M + L = ML: log10 K at 25 °C and I = 0 (L/mol) and dH of
// association (kJ/mol; 0 where the source gives none: K held at every temperature). A system's
// species is keyed by the system id and its charge. Sources (docs/data-sources.md, "Activity
// coefficients"):
//  [MF88]  Migneault and Forcé 1988, J. Solution Chem. 17, 987 (abstract): K(NaHPO4-) =
//          1.3 +/- 0.3 and K(NaH2PO4) = 0.49 +/- 0.07 L/mol at I = 0.7 mol/L, 25 °C; put at
//          I = 0 here with the Davies equation (A = 0.5108, log gamma_1 = -0.1254 at I = 0.7):
//          log K0 = log K' - A (z_ML^2 - z_M^2 - z_L^2) (sqrt(I)/(1 + sqrt(I)) - 0.3 I).
//  [N90]   Nordstrom, Plummer, Langmuir, Busenberg, May, Jones and Parkhurst 1990, Revised
//          chemical equilibrium data for major water-mineral reactions, ACS Symp. Ser. 416,
//          398, the table of aqueous association reactions (carbonate and sulfate pairs; dH
//          from kcal/mol x 4.184; the table number not recalled); recalled,
//          to be verified.
//  [SM76]  Smith and Martell, Critical Stability Constants, vol. 4 (Inorganic Complexes),
//          Plenum 1976, phosphoric acid, I = 0; recalled, to be verified.
//  [SM77]  Smith and Martell, Critical Stability Constants, vol. 3 (Other Organic Ligands),
//          Plenum 1977, citric acid, I = 0.1 mol/L; recalled, to be verified; put at I = 0
//          with the Davies equation as for [MF88] (A br = 0.1074 at I = 0.1).
//  [A]     dH of NaHPO4-: no measured value read; NaSO4-'s 4.69 kJ/mol [N90], the pair of the
//          same charge type with an oxyanion, taken as an estimate (ion pairs of this kind form
//          with heat taken up, so K rises with temperature). It moves the phosphate primary
//          standards by +0.004 at 5 °C and -0.005 at 50 °C (K unchanged at 25 °C).
// Not carried (no constant read or recalled): K+ with the phosphate species ([MF88] take its
// pairing as negligible), Na+ and K+ with PO4 3- and with HCit 2-, K+ with carbonate. Nor
// Na+ with carbonate: [N90]'s NaCO3- (log K 1.27, dH 37.3 kJ/mol) and NaHCO3 (-0.25), used
// with Davies coefficients, put the carbonate primary standard (Buck et al. 2002) 0.152 pH
// low at 25 °C and 0.337 low at 50 °C, where Davies alone is within 0.009: Davies' 0.3 I term
// already stands for them (docs/model.md, "Activities").
struct PairConstant {
  std::string_view metal;
  int zm;
  std::string_view system;
  int zl;
  double log10_k;
  double dH;
};
constexpr PairConstant kIonPairs[] = {
    {"Na+", 1, "phosphate", -2, 0.62, 4.69},  // [MF88] 1.3 L/mol at I = 0.7: 0.114 + 4 x 0.1254; dH: see [A]
    {"Na+", 1, "phosphate", -1, -0.06, 0.0},  // [MF88] 0.49 L/mol at I = 0.7: -0.310 + 2 x 0.1254
    {"Na+", 1, "citrate", -3, 1.34, 0.0},     // [SM77] 0.70 at I = 0.1: + 6 x 0.1074
    {"K+", 1, "citrate", -3, 1.24, 0.0},      // [SM77] 0.60 at I = 0.1: + 6 x 0.1074
    {"Na+", 1, "sulfate", -2, 0.70, 4.69},    // [N90] dH 1.12 kcal/mol
    {"K+", 1, "sulfate", -2, 0.85, 9.41},     // [N90] dH 2.25 kcal/mol
    {"Ca2+", 2, "carbonate", -2, 3.224, 14.83},  // [N90] dH 3.545 kcal/mol
    {"Ca2+", 2, "carbonate", -1, 1.106, 11.26},  // [N90] dH 2.69 kcal/mol
    {"Mg2+", 2, "carbonate", -2, 2.98, 11.35},   // [N90] dH 2.713 kcal/mol
    {"Mg2+", 2, "carbonate", -1, 1.07, 3.31},    // [N90] dH 0.79 kcal/mol
    {"Ca2+", 2, "sulfate", -2, 2.30, 6.90},      // [N90] dH 1.65 kcal/mol
    {"Mg2+", 2, "sulfate", -2, 2.37, 19.04},     // [N90] dH 4.55 kcal/mol
    {"Ca2+", 2, "phosphate", -3, 6.46, 0.0},     // [SM76]
    {"Ca2+", 2, "phosphate", -2, 2.74, 0.0},     // [SM76]
    {"Ca2+", 2, "phosphate", -1, 1.41, 0.0},     // [SM76]
    {"Mg2+", 2, "phosphate", -2, 2.87, 0.0},     // [SM76]
    {"Mg2+", 2, "phosphate", -1, 1.51, 0.0},     // [SM76]
    {"Ca2+", 2, "citrate", -3, 4.79, 0.0},       // [SM77] 3.50 at I = 0.1: + 12 x 0.1074
    {"Mg2+", 2, "citrate", -3, 4.66, 0.0},       // [SM77] 3.37 at I = 0.1: + 12 x 0.1074
};

/// SIT's Ba, kg^1/2 mol^-1/2, the same at every temperature.
constexpr double kSitBa = 1.5;

}  // namespace

std::string activity_model_id(ActivityModel model) {
  switch (model) {
    case ActivityModel::kDavies: return "davies";
    case ActivityModel::kIdeal: return "ideal";
    case ActivityModel::kSit: return "sit";
    case ActivityModel::kTruesdellJones: return "truesdell-jones";
    case ActivityModel::kIonPairs: return "ion-pairs";
  }
  return "davies";
}

std::string activity_model_label(ActivityModel model) {
  switch (model) {
    case ActivityModel::kDavies: return "Davies";
    case ActivityModel::kIdeal: return "ideal (activity coefficients 1)";
    case ActivityModel::kSit: return "specific ion interaction (SIT)";
    case ActivityModel::kTruesdellJones: return "extended Debye-Hückel (Truesdell-Jones)";
    case ActivityModel::kIonPairs: return "Davies with ion pairs";
  }
  return "Davies";
}

std::string activity_words(ActivityModel model) {
  if (model == ActivityModel::kIdeal) return "ideal activities (coefficients 1)";
  return activity_model_label(model) + " activities";
}

std::optional<ActivityModel> parse_activity_model(const std::string& name) {
  for (ActivityModel m : {ActivityModel::kDavies, ActivityModel::kSit,
                          ActivityModel::kTruesdellJones, ActivityModel::kIonPairs,
                          ActivityModel::kIdeal}) {
    if (name == activity_model_id(m)) return m;
  }
  return std::nullopt;
}

std::string activity_model_names() { return "davies|sit|truesdell-jones|ion-pairs|ideal"; }

double AssociationConstant::k_at(double temperature_C) const {
  const double k = std::pow(10.0, log10_k);
  if (dH_kJ_per_mol == 0.0) return k;
  const double T = kelvin(temperature_C);
  return k * std::exp(-dH_kJ_per_mol * 1000.0 / kGasConstant * (1.0 / T - 1.0 / kelvin(25.0)));
}

std::optional<HydroxoComplex> hydroxo_complex(const std::string& ion, int charge) {
  for (const Hydroxo& h : kHydroxo) {
    if (h.z == charge && ion == h.ion) return HydroxoComplex{h.log10_k, h.dH};
  }
  return std::nullopt;
}

std::optional<AssociationConstant> ion_pair_constant(const std::string& metal, int metal_charge,
                                                     const std::string& system, int ligand_charge) {
  for (const PairConstant& p : kIonPairs) {
    if (p.zm == metal_charge && p.zl == ligand_charge && metal == p.metal && system == p.system) {
      return AssociationConstant{p.log10_k, p.dH};
    }
  }
  return std::nullopt;
}

double debye_huckel_b(double temperature_C) {
  const double rho = water_density_kg_per_L(temperature_C);
  return 50.29 * std::sqrt(rho / (water_dielectric_constant(temperature_C) * kelvin(temperature_C)));
}

std::optional<double> sit_epsilon(const std::string& cation, int cation_charge,
                                  const std::string& anion, int anion_charge) {
  for (const SitPair& p : kSit) {
    if (p.zc == cation_charge && p.za == anion_charge && cation == p.cation && anion == p.anion) {
      return p.eps;
    }
  }
  return std::nullopt;
}

ActivityMedium::ActivityMedium(ActivityModel model, double temperature_C)
    : model_(model),
      a_(davies_a(temperature_C)),
      b_dh_(debye_huckel_b(temperature_C)),
      rho_(water_density_kg_per_L(temperature_C)) {}

void ActivityMedium::add_ion(const std::string& id, int charge, double conc_mol_per_L) {
  if (charge == 0 || !(conc_mol_per_L > 0)) return;
  for (MediumIon& i : ions_) {
    if (i.id == id && i.charge == charge) {
      i.molal += conc_mol_per_L / rho_;
      return;
    }
  }
  ions_.push_back({id, charge, conc_mol_per_L / rho_});
}

LogGammaTerms ActivityMedium::terms(const std::string& key, int charge) const {
  LogGammaTerms t;
  const LogGammaTerms davies{1.0, 0.3 * a_ * charge * charge, 0.0};
  switch (model_) {
    case ActivityModel::kIdeal:  // the solver sets every coefficient to 1 and does not ask
    case ActivityModel::kDavies:
    case ActivityModel::kIonPairs:
      return davies;
    case ActivityModel::kSit:
      t.ba = kSitBa;
      if (charge == 0) return t;
      // Each pair of the table naming this species, with every medium ion of opposite charge
      // it names (one pass over the table: this runs for every species of every mixture).
      for (const SitPair& p : kSit) {
        const bool cation = charge > 0;
        if ((cation ? p.zc : p.za) != charge) continue;
        const std::string_view name = cation ? p.cation : p.anion;
        if (key.size() != name.size() || key[0] != name[0] || key != name) continue;
        const std::string_view partner = cation ? p.anion : p.cation;
        const int partner_charge = cation ? p.za : p.zc;
        for (const MediumIon& k : ions_) {
          if (k.charge == partner_charge && k.id == partner) t.c += p.eps * k.molal;
        }
      }
      return t;
    case ActivityModel::kTruesdellJones:
      for (const IonSize& s : kIonSize) {
        if (s.z == charge && key == s.key) {
          t.ba = b_dh_ * s.a;
          t.b = s.b;
          return t;
        }
      }
      return davies;
  }
  return davies;
}

}  // namespace pkarta
