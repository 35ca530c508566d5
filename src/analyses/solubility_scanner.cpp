// The drug's solubility at a fixed pH in a titrated medium: free form and salt limits, with
// the charge balance fixing a titrant-borne counterion (SolubilityScanner).
#include "pkarta/analyses/profile.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

#include "pkarta/base/limits.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

const Ion& titrant_strong_ion(const Library& library, const std::string& reagent, int sign) {
  const Reagent& r = library.reagent(reagent);
  const Ion* found = nullptr;
  bool other = false;
  for (const Contribution& c : r.gives) {
    if (c.kind == Contribution::Kind::kSystem) {
      other = true;
      continue;
    }
    const Ion& ion = library.ion(c.id);
    const bool wanted = sign < 0 ? ion.charge < 0 : ion.charge > 0;
    if (wanted && !found) found = &ion;
    else other = true;
  }
  if (!found || other) {
    throw InputError("reagent '" + reagent + "' is not a strong " + (sign < 0 ? "acid" : "base") +
                     ": a titrant must give one strong " + (sign < 0 ? "anion" : "cation") +
                     " and nothing else (e.g. " +
                     (sign < 0 ? "HCl, methanesulfonic-acid" : "NaOH, KOH") + ")");
  }
  return *found;
}

namespace {

double ion_in(const Mixture& m, const std::string& id) {
  double x = 0.0;
  for (const IonAmount& i : m.ions) {
    if (i.id == id) x += i.conc_mol_per_L;
  }
  return x;
}

// The medium alone at the run temperature, with the drug at zero dose so that the model knows
// its temperature-corrected constants; the drug's solids are handled by the scanner.
Mixture medium_with_drug(const Compound& compound, const ProfileConditions& c, ActivityModel activity) {
  Mixture med = c.medium;
  med.temperature_C = c.temperature_C;
  med.activity = activity;
  DrugAmount d;
  d.compound = compound;
  d.compound.salts.clear();
  d.compound.measured.clear();
  d.dose_mol_per_L = 0.0;
  d.allow_solids = false;
  med.drug = d;
  return med;
}

// Positive root of zx u^2 + b u + c = 0 (zx = +-1), or a value <= 0 when there is none.
double positive_root(int zx, double b, double c) {
  const double p = zx * b, q = zx * c;  // u^2 + p u + q = 0
  const double disc = p * p - 4.0 * q;
  if (disc < 0) return -1.0;
  const double sq = std::sqrt(disc);
  return p > 0 ? (-2.0 * q) / (p + sq) : 0.5 * (-p + sq);
}

}  // namespace


// ---------------------------------------------------------------------------------------------
// SolubilityScanner

struct SolubilityScanner::Impl {
  struct SaltData {
    bool usable = false;       // Ksp known, a drug species to pair with, a counterion model
    bool can_limit = false;
    bool simple = false;       // 1:1 with a monovalent strong counterion (closed forms)
    int js = -1;               // drug species paired with the counterion
    int zx = 0;                // counterion charge
    int zd = 0;                // drug charge in the salt
    int m = 1, n = 1;          // drug : counterion
    int sys = -1;              // weak counterion: index of its system in the medium, else -1
    int cj = -1;               // weak counterion: its species in that system
    double ksp = 0.0;          // thermodynamic, at the run temperature
    double x_med = 0.0;        // counterion in the medium, mol/L (a weak one: its system's total)
    bool titrant_is_x = false; // the titrant of the counterion's sign gives this very ion
    std::string id;
  };

  Impl(const Compound& compound, const Library& library, const ProfileConditions& c)
      : model(medium_with_drug(compound, c, c.activity)),
        ideal(medium_with_drug(compound, c, ActivityModel::kIdeal)) {
    const Ion& a = titrant_strong_ion(library, c.acid_titrant, -1);
    const Ion& b = titrant_strong_ion(library, c.base_titrant, +1);
    acid_ion = a.id;
    acid_charge = a.charge;
    base_ion = b.id;
    base_charge = b.charge;
    davies = c.activity != ActivityModel::kIdeal;  // activity corrections on
    const AcidBaseSystem& sys = compound.system;
    n = static_cast<int>(sys.pkas.size());
    jn = compound.has_intrinsic_solubility ? sys.neutral_index() : -1;
    s0 = jn >= 0 ? compound.s0_at(c.temperature_C) : 0.0;
    for (int j = 0; j <= n; ++j) charge[j] = sys.charge_of(j);
    i0 = model.ionic_strength();
    for (const Salt& salt : compound.salts) {
      SaltData s;
      s.id = salt.id;
      s.m = salt.drug_count;
      s.n = salt.counterion_count;
      if (salt.ksp && !salt.counterion_is_system) {
        auto it = library.ions.find(salt.counterion);
        if (it != library.ions.end() && it->second.charge != 0) {
          s.zx = it->second.charge;
          s.simple = s.m == 1 && s.n == 1 && (s.zx == 1 || s.zx == -1);
          s.zd = salt.drug_charge(s.zx);
          s.js = sys.z0() - s.zd;
          s.usable = s.js >= 0 && s.js <= n && s.zd * s.m + s.zx * s.n == 0 &&
                     (s.simple || jn >= 0);  // m:n salts: with a free form in excess
          s.ksp = salt_ksp_at(salt, c.temperature_C);
          s.x_med = ion_in(c.medium, salt.counterion);
          s.titrant_is_x = (s.zx < 0 && salt.counterion == acid_ion) || (s.zx > 0 && salt.counterion == base_ion);
        }
      } else if (salt.ksp && jn >= 0) {
        // A weak-acid or weak-base counterion: only the medium can bring it (the titrants are
        // strong); its species fraction at each pH comes from its system's equilibria.
        s.zx = salt.counterion_charge;
        s.zd = salt.drug_charge(s.zx);
        s.js = sys.z0() - s.zd;
        for (std::size_t k = 0; k < c.medium.systems.size(); ++k) {
          const AcidBaseSystem& cs = c.medium.systems[k].system;
          if (cs.id != salt.counterion) continue;
          s.sys = static_cast<int>(k);
          s.cj = cs.z0() - s.zx;
          s.x_med = c.medium.systems[k].total_mol_per_L;
        }
        s.usable = s.js >= 0 && s.js <= n && s.zd * s.m + s.zx * s.n == 0 && s.sys >= 0 &&
                   s.cj >= 0 && s.cj <= static_cast<int>(c.medium.systems[s.sys].system.pkas.size());
        s.ksp = salt_ksp_at(salt, c.temperature_C);
      }
      s.can_limit = s.usable && (jn < 0 || s.x_med > 0 || s.titrant_is_x);
      salts.push_back(s);
    }
  }

  // Concentration product Ksp / (gamma_d^m gamma_x^n) under the model's current coefficients.
  double ksp_conc(const SaltData& s, double g1sq) const {
    if (s.simple) return s.ksp / g1sq;
    double g = 1.0;
    for (int i = 0; i < s.m; ++i) g *= model.gamma(s.zd);
    for (int i = 0; i < s.n; ++i) g *= model.gamma(s.zx);
    return s.ksp / g;
  }

  // The counterion's concentration as its species: the ion itself, or the species fraction of
  // a weak counterion's system at pH times x.
  double species_share(const SaltData& s, double pH) const {
    if (s.sys < 0) return 1.0;
    double a[kMaxPka + 1];
    model.fractions(s.sys, pH, a);
    return a[s.cj];
  }

  // Dissolved drug with salt s limiting and its counterion at x (mol/L): (alpha_js D)^m x^n = Ksp'.
  static double salt_limited(const SaltData& s, double ksp, double alpha_js, double x) {
    return salt_limited_solubility(ksp, s.m, s.n, alpha_js, x);
  }

  SolubilityAtPh at(double pH);

  EquilibriumModel model;
  EquilibriumModel ideal;
  std::string acid_ion, base_ion;
  int acid_charge = -1, base_charge = 1;
  bool davies = true;  // any model but ideal: iterate the ionic strength
  int n = 0;
  int jn = -1;
  double s0 = 0.0;
  double i0 = 0.0;
  int charge[kMaxPka + 1] = {};
  std::vector<SaltData> salts;
};

SolubilityAtPh SolubilityScanner::Impl::at(double pH) {
  SolubilityAtPh out;
  out.pH = pH;
  double alpha[kMaxPka + 1];

  // Ideal Henderson-Hasselbalch curve: S0 * sum_j alpha_j / alpha_n with thermodynamic Ka.
  ideal.fractions(-1, pH, alpha);
  out.ideal_solubility_unbounded_mol_per_L =
      jn >= 0 && alpha[jn] > 0 ? s0 / alpha[jn] : std::numeric_limits<double>::infinity();
  out.ideal_above_cap = !(out.ideal_solubility_unbounded_mol_per_L < kSolubilityCap_mol_per_L);
  out.ideal_solubility_mol_per_L = jn >= 0 ? std::min(s0 / alpha[jn], kSolubilityCap_mol_per_L)
                                           : kSolubilityCap_mol_per_L;
  out.salt_saturation_at_free.assign(salts.size(), 0.0);
  out.salt_limited_mol_per_L.assign(salts.size(), 0.0);

  double ionic = i0;
  for (int iter = 0; iter < 200; ++iter) {
    // Activity coefficients from the current ionic strength (held below 1 mol/L: beyond it
    // the Davies equation has no meaning and the caller is warned through the ionic strength).
    model.set_ionic_strength(std::min(ionic, 1.0));
    const EquilibriumModel::Evaluation med = model.evaluate(pH);  // medium, drug at zero dose
    const double q_med = med.charge;
    model.fractions(-1, pH, alpha);
    double zbar = 0.0, z2bar = 0.0;
    for (int j = 0; j <= n; ++j) {
      zbar += charge[j] * alpha[j];
      z2bar += charge[j] * charge[j] * alpha[j];
    }
    const double g1sq = model.gamma(1) * model.gamma(-1);

    double dissolved = kSolubilityCap_mol_per_L;
    bool capped = true;
    std::string solid = "none";
    double salt_counterion = 0.0;  // counterion brought by a dissolving salt (no free form)
    double tau;                    // titrant, equivalents per litre: > 0 base, < 0 acid
    if (jn >= 0) {
      // Excess free form; the salts precipitate from it where their ion product exceeds Ksp.
      const double d_free = s0 / alpha[jn];
      if (d_free < kSolubilityCap_mol_per_L) {
        dissolved = d_free;
        capped = false;
        solid = "free";
      }
      tau = -(q_med + dissolved * zbar);
      const double tau_free = -(q_med + d_free * zbar);
      for (std::size_t k = 0; k < salts.size(); ++k) {
        const SaltData& s = salts[k];
        if (!s.usable) continue;
        const double ksp = ksp_conc(s, g1sq);  // concentration product
        const double share = species_share(s, pH);
        const double x_free =
            share * (s.x_med + (s.titrant_is_x && tau_free * s.zx > 0 ? std::fabs(tau_free) : 0.0));
        const double ratio = s.simple ? alpha[s.js] * d_free * x_free / ksp
                                      : std::pow(alpha[s.js] * d_free, s.m) * std::pow(x_free, s.n) / ksp;
        out.salt_saturation_at_free[k] = ratio;
        if (!(ratio > 1.0)) continue;
        // Salt-limited: dissolved drug D from (alpha_js D)^m [X]^n = Ksp'. When the titrant
        // gives X, the charge balance fixes [X] = u; for 1:1 that is the quadratic
        // zx u^2 + (q_med - zx x_med) u + Ksp' zbar / alpha_js = 0, for m:n a bisection on
        // log u of q_med - zx x_med + D(u) zbar + zx u = 0 (monotone in u).
        double d_salt = 0.0, t_salt = 0.0;
        bool done = false;
        if (s.titrant_is_x && s.simple) {
          const double u = positive_root(s.zx, q_med - s.zx * s.x_med, ksp * zbar / alpha[s.js]);
          if (u > s.x_med) {
            d_salt = ksp / (alpha[s.js] * u);
            t_salt = s.zx * (u - s.x_med);
            done = true;
          }
        } else if (s.titrant_is_x) {
          auto balance = [&](double u) {
            return q_med - s.zx * s.x_med + salt_limited(s, ksp, alpha[s.js], u) * zbar + s.zx * u;
          };
          double lo = std::max(s.x_med, 1e-30), hi = 100.0;
          const double f_lo = balance(lo), f_hi = balance(hi);
          if ((f_lo > 0) != (f_hi > 0)) {
            for (int it = 0; it < 200 && hi / lo > 1.0 + 1e-15; ++it) {
              const double mid = std::sqrt(lo * hi);
              ((balance(mid) > 0) == (f_lo > 0) ? lo : hi) = mid;
            }
            const double u = std::sqrt(lo * hi);
            if (u > s.x_med) {
              d_salt = salt_limited(s, ksp, alpha[s.js], u);
              t_salt = s.zx * (u - s.x_med);
              done = true;
            }
          }
        }
        if (!done) {
          if (!(s.x_med > 0) || !(share > 0)) continue;
          d_salt = salt_limited(s, ksp, alpha[s.js], share * s.x_med);
          t_salt = -(q_med + d_salt * zbar);
        }
        out.salt_limited_mol_per_L[k] = d_salt;
        if (d_salt < dissolved) {
          dissolved = d_salt;
          solid = s.id;
          tau = t_salt;
          capped = false;
        }
      }
    } else {
      // No free form: the excess solid is a salt, whose counterion enters with the drug.
      tau = -(q_med + dissolved * zbar);
      for (const SaltData& s : salts) {
        if (!s.usable || !s.simple) continue;
        const double ksp = s.ksp / g1sq;
        const double c = ksp / alpha[s.js];
        double d = 0.0, t = 0.0;
        bool done = false;
        if (s.titrant_is_x) {  // [X] = u from the charge balance; titrant X = u - x_med - D >= 0
          const double u = positive_root(s.zx, q_med - s.zx * s.x_med, c * zbar);
          if (u > 0) {
            d = c / u;
            if (u - s.x_med - d >= 0) {
              t = s.zx * (u - s.x_med - d);
              done = true;
            }
          }
        }
        if (!done) {  // [X] = x_med + D: D (x_med + D) = Ksp'/alpha_js
          d = 2.0 * c / (s.x_med + std::sqrt(s.x_med * s.x_med + 4.0 * c));
          t = -(q_med + d * zbar + s.zx * d);
        }
        if (d < dissolved) {
          dissolved = d;
          solid = s.id;
          tau = t;
          capped = false;
          salt_counterion = d;
        }
      }
      // Each salt's ion product over Ksp in the state found (1 for the limiting one).
      for (std::size_t k = 0; k < salts.size(); ++k) {
        const SaltData& s = salts[k];
        if (!s.usable || !s.simple) continue;
        double x = s.x_med + (s.titrant_is_x && tau * s.zx > 0 ? std::fabs(tau) : 0.0);
        if (s.id == solid) x += salt_counterion;
        out.salt_saturation_at_free[k] = alpha[s.js] * dissolved * x * g1sq / s.ksp;
      }
    }
    // Ionic strength of the saturated solution: medium + drug + titrant ion (+ salt counterion).
    const double tit_z = tau > 0 ? base_charge : -acid_charge;
    const double i_new = med.ionic_strength + 0.5 * dissolved * z2bar + 0.5 * tit_z * std::fabs(tau) +
                         0.5 * salt_counterion;
    out.solubility_mol_per_L = dissolved;
    out.limiting_solid = solid;
    out.titrant_mol_per_L = tau;
    out.capped = capped;
    out.ionic_strength_mol_per_L = i_new;
    out.fractions.assign(alpha, alpha + n + 1);
    if (!davies || std::fabs(i_new - ionic) <= 1e-13 * std::max(i_new, 1e-10) ||
        (ionic >= 1.0 && i_new >= 1.0)) {
      break;
    }
    ionic = i_new;
  }
  return out;
}

SolubilityScanner::SolubilityScanner(const Compound& compound, const Library& library,
                                     const ProfileConditions& conditions)
    : impl_(std::make_unique<Impl>(compound, library, conditions)) {}
SolubilityScanner::~SolubilityScanner() = default;
SolubilityScanner::SolubilityScanner(SolubilityScanner&&) noexcept = default;
SolubilityScanner& SolubilityScanner::operator=(SolubilityScanner&&) noexcept = default;

SolubilityAtPh SolubilityScanner::at(double pH) { return impl_->at(pH); }

bool SolubilityScanner::salt_can_limit(std::size_t k) const {
  return k < impl_->salts.size() && impl_->salts[k].can_limit;
}

SolubilityAtPh solubility_at_pH(const Compound& compound, const Library& library, double pH,
                                const ProfileConditions& conditions) {
  SolubilityScanner scanner(compound, library, conditions);
  return scanner.at(pH);
}

}  // namespace pkarta
