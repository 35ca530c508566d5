#include "pkarta/profile.h"

#include <algorithm>
#include <cmath>

#include "pkarta/water.h"

namespace pkarta {

namespace {

// The strong ion a titrant reagent brings (HCl -> Cl-, NaOH -> Na+).
const Ion& titrant_ion(const Library& library, const std::string& reagent, int sign) {
  const Reagent& r = library.reagent(reagent);
  for (const Contribution& c : r.gives) {
    if (c.kind == Contribution::Kind::kIon) {
      const Ion& ion = library.ion(c.id);
      if ((sign < 0 && ion.charge < 0) || (sign > 0 && ion.charge > 0)) return ion;
    }
  }
  throw InputError("titrant '" + reagent + "' gives no strong " + (sign < 0 ? "anion" : "cation"));
}

double ion_in(const Mixture& m, const std::string& id) {
  for (const IonAmount& i : m.ions) {
    if (i.id == id) return i.conc_mol_per_L;
  }
  return 0.0;
}

}  // namespace

SolubilityAtPh solubility_at_pH(const Compound& compound, const Library& library, double pH,
                                const ProfileConditions& conditions) {
  SolubilityAtPh out;
  out.pH = pH;
  const Ion& acid_ion = titrant_ion(library, conditions.acid_titrant, -1);
  const Ion& base_ion = titrant_ion(library, conditions.base_titrant, +1);

  // The medium alone, prepared at the run temperature; the drug enters by its own fractions.
  Mixture med = conditions.medium;
  med.temperature_C = conditions.temperature_C;
  med.activity = conditions.activity;
  med.drug.reset();
  DrugAmount d;
  d.compound = compound;
  d.compound.salts.clear();  // the drug's solids are handled here, not by the model
  d.dose_mol_per_L = 0.0;
  d.allow_solids = false;
  med.drug = d;
  EquilibriumModel model(med);

  const AcidBaseSystem& sys = compound.system;
  const int n = static_cast<int>(sys.pkas.size());
  const int jn = compound.has_intrinsic_solubility ? sys.neutral_index() : -1;
  const double s0 = compound.s0_at(conditions.temperature_C);
  const double h = std::pow(10.0, -pH);
  double alpha[kMaxPka + 1];

  // Ideal Henderson-Hasselbalch curve: S0 * sum_j alpha_j / alpha_n with thermodynamic Ka.
  {
    Mixture ideal = med;
    ideal.activity = ActivityModel::kIdeal;
    EquilibriumModel im(ideal);
    im.fractions(-1, pH, alpha);
    out.ideal_solubility_mol_per_L =
        jn >= 0 ? std::min(s0 / alpha[jn], kSolubilityCap_mol_per_L) : kSolubilityCap_mol_per_L;
  }

  out.salt_saturation_at_free.assign(compound.salts.size(), 0.0);
  double ionic = model.ionic_strength();
  for (int iter = 0; iter < 100; ++iter) {
    // Activity coefficients from the current ionic strength (held below 1 mol/L: beyond it
    // the Davies equation has no meaning and the caller is warned through the ionic strength).
    model.set_ionic_strength(std::min(ionic, 1.0));
    const EquilibriumModel::Evaluation med_ev = model.evaluate(pH);  // drug at zero dose
    const double q_med = med_ev.charge;
    model.fractions(-1, pH, alpha);
    double zbar = 0.0, z2bar = 0.0;
    for (int j = 0; j <= n; ++j) {
      zbar += sys.charge_of(j) * alpha[j];
      z2bar += sys.charge_of(j) * sys.charge_of(j) * alpha[j];
    }
    const double g1sq = model.gamma(1) * model.gamma(-1);

    // Free form saturated (or nothing limits).
    double dissolved = jn >= 0 ? s0 / alpha[jn] : kSolubilityCap_mol_per_L;
    bool capped = false;
    if (!(dissolved < kSolubilityCap_mol_per_L)) {
      dissolved = kSolubilityCap_mol_per_L;
      capped = true;
    }
    std::string solid = jn >= 0 && !capped ? "free" : "none";
    double tau = -(q_med + dissolved * zbar);  // > 0: cation titrant; < 0: anion titrant
    auto counterion_conc = [&](const Ion& ion, double t) {
      double x = ion_in(conditions.medium, ion.id);
      if (t < 0 && ion.id == acid_ion.id) x += -t;
      if (t > 0 && ion.id == base_ion.id) x += t;
      return x;
    };
    // Salts: ion product at this free-form saturation; the lowest salt-limited solubility wins.
    for (std::size_t k = 0; k < compound.salts.size(); ++k) {
      const Salt& salt = compound.salts[k];
      if (!salt.ksp) continue;
      const Ion& x_ion = library.ion(salt.counterion);
      const int zx = x_ion.charge;
      const int js = sys.z0() + zx;
      if (js < 0 || js > n) continue;
      const double ksp = salt_ksp_at(salt, conditions.temperature_C) / g1sq;
      const double x_free = counterion_conc(x_ion, -(q_med + (jn >= 0 ? s0 / alpha[jn] : dissolved) * zbar));
      const double ratio = alpha[js] * (jn >= 0 ? s0 / alpha[jn] : dissolved) * x_free / ksp;
      out.salt_saturation_at_free[k] = ratio;
      if (!(ratio > 1.0)) continue;
      // Salt-limited: dissolved drug D = Ksp'/(alpha_js [X]).
      const double x_med = ion_in(conditions.medium, x_ion.id);
      const bool titrant_is_x = (zx < 0 && x_ion.id == acid_ion.id) || (zx > 0 && x_ion.id == base_ion.id);
      double u = x_med;
      double t_salt;
      if (titrant_is_x) {
        // Charge balance with the counterion as the balancing ion (u = [X]):
        // zx u^2 + (q_med - zx x_med) u + Ksp' zbar / alpha_js = 0.
        const double b = q_med - zx * x_med;
        const double c = ksp * zbar / alpha[js];
        const double disc = std::max(0.0, b * b - 4.0 * zx * c);
        u = 0.5 * (-zx * b + std::sqrt(disc));
      }
      if (!(u > x_med) || !titrant_is_x) u = std::max(x_med, 1e-300);
      const double d_salt = ksp / (alpha[js] * u);
      if (titrant_is_x && u > x_med) t_salt = zx * (u - x_med);
      else t_salt = -(q_med + d_salt * zbar);
      if (d_salt < dissolved) {
        dissolved = d_salt;
        solid = salt.id;
        tau = t_salt;
        capped = false;
      }
    }
    // Ionic strength of the saturated solution: medium + drug + titrant ion.
    const double tit_z2 = 1.0;  // both titrant ions are monovalent in the built-in library
    double i_new = med_ev.ionic_strength + 0.5 * dissolved * z2bar + 0.5 * tit_z2 * std::fabs(tau);
    (void)h;
    out.solubility_mol_per_L = dissolved;
    out.limiting_solid = solid;
    out.titrant_mol_per_L = tau;
    out.capped = capped;
    out.fractions.assign(alpha, alpha + n + 1);
    out.ionic_strength_mol_per_L = i_new;
    if (conditions.activity == ActivityModel::kIdeal ||
        std::fabs(i_new - ionic) <= 1e-12 * std::max(i_new, 1e-12)) {
      break;
    }
    ionic = i_new;
  }
  return out;
}

}  // namespace pkarta
