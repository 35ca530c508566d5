#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "pkarta/base/format.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {
constexpr int kGammaOffset = 16;  // gamma_ table covers charges -16..+16
constexpr double kPhLow = -3.0;   // bracket of every solve: charge balance > 0 here ...
constexpr double kPhHigh = 17.0;  // ... and < 0 here, for totals up to 10 mol/L
constexpr double kEps = 1e-12;    // relative slack of the phase-consistency checks
// Largest relative charge residual of a returned state (docs/model.md, "Solver").
constexpr double kMaxChargeResidual = 1e-10;
constexpr int kMaxComp = 1 + kMaxSalts;  // partition components: the drug and each counterion

/// x^k for a small positive integer k, by multiplication (x^1 is x itself).
inline double ipow(double x, int k) {
  double r = x;
  for (int i = 1; i < k; ++i) r *= x;
  return r;
}

/// Solves the dense system a x = b (n <= 2 kMaxComp) by Gaussian elimination with partial
/// pivoting; false when it is singular.
bool solve_dense(int n, double (*a)[2 * kMaxComp + 1], double* x) {
  for (int c = 0; c < n; ++c) {
    int piv = c;
    for (int r = c + 1; r < n; ++r) {
      if (std::fabs(a[r][c]) > std::fabs(a[piv][c])) piv = r;
    }
    if (!(std::fabs(a[piv][c]) > 1e-300)) return false;
    if (piv != c) {
      for (int k = c; k <= n; ++k) std::swap(a[piv][k], a[c][k]);
    }
    for (int r = c + 1; r < n; ++r) {
      const double f = a[r][c] / a[c][c];
      if (f == 0.0) continue;
      for (int k = c; k <= n; ++k) a[r][k] -= f * a[c][k];
    }
  }
  for (int r = n - 1; r >= 0; --r) {
    double v = a[r][n];
    for (int k = r + 1; k < n; ++k) v -= a[r][k] * x[k];
    x[r] = v / a[r][r];
  }
  return true;
}
}  // namespace

int SolidSet::count() const {
  int k = free ? 1 : 0;
  for (std::uint32_t b = salts; b; b &= b - 1) ++k;
  return k;
}

std::string to_string(const SolidSet& solids, const Compound& compound) {
  if (solids.empty()) return "none";
  std::string out = solids.free ? "free" : "";
  for (std::size_t k = 0; k < compound.salts.size() && k < 32; ++k) {
    if (!solids.has_salt(static_cast<int>(k))) continue;
    if (!out.empty()) out += "+";
    out += compound.salts[k].id;
  }
  return out;
}

void Mixture::add_ion(const std::string& id, int charge, double amount_mol_per_L) {
  for (IonAmount& i : ions) {
    if (i.id == id) {
      i.conc_mol_per_L += amount_mol_per_L;
      return;
    }
  }
  ions.push_back({id, charge, amount_mol_per_L});
}

void Mixture::add_system(const AcidBaseSystem& system, double amount_mol_per_L) {
  for (SystemAmount& s : systems) {
    if (s.system.id == system.id) {
      s.total_mol_per_L += amount_mol_per_L;
      return;
    }
  }
  systems.push_back({system, amount_mol_per_L});
}

bool SolverOptions::is_valid(std::string* error) const {
  if (max_ph_iterations < 1) {
    *error = "SolverOptions::max_ph_iterations = " + std::to_string(max_ph_iterations) + ", must be >= 1";
    return false;
  }
  if (max_ionic_strength_iterations < 1) {
    *error = "SolverOptions::max_ionic_strength_iterations must be >= 1";
    return false;
  }
  if (!(ph_tolerance > 0) || !(ionic_strength_rel_tolerance > 0)) {
    *error = "SolverOptions tolerances must be > 0";
    return false;
  }
  return true;
}

double salt_ksp_at(const Salt& salt, double temperature_C) {
  const double ksp = salt.ksp.value_or(0.0);
  if (salt.dH_kJ_per_mol == 0.0) return ksp;
  const double T = kelvin(temperature_C);
  const double T0 = kelvin(salt.ref_temperature_C);
  return ksp * std::exp(-salt.dH_kJ_per_mol * 1000.0 / kGasConstant * (1.0 / T - 1.0 / T0));
}

// ---------------------------------------------------------------------------------------------
// EquilibriumModel

EquilibriumModel::EquilibriumModel(const Mixture& m) {
  ideal_ = m.activity == ActivityModel::kIdeal;
  temperature_C_ = m.temperature_C;
  a_davies_ = davies_a(temperature_C_);
  kw_ = std::pow(10.0, -pkw(temperature_C_));
  auto make_sys = [&](const AcidBaseSystem& s, double total) {
    if (static_cast<int>(s.pkas.size()) > kMaxPka) {
      throw InputError("system '" + s.id + "' has " + std::to_string(s.pkas.size()) +
                       " pKa values; at most " + std::to_string(kMaxPka) + " are supported");
    }
    Sys out;
    out.n = static_cast<int>(s.pkas.size());
    out.z0 = s.z0();
    out.total = total;
    for (int i = 0; i < out.n; ++i) out.ka[i] = std::pow(10.0, -s.pkas[i].at(temperature_C_));
    return out;
  };
  systems_.reserve(m.systems.size());
  for (const SystemAmount& s : m.systems) systems_.push_back(make_sys(s.system, s.total_mol_per_L));
  ions_.reserve(m.ions.size());
  for (const IonAmount& i : m.ions) ions_.push_back({i.charge, i.conc_mol_per_L});
  if (m.drug) {
    const DrugAmount& d = *m.drug;
    has_drug_ = true;
    drug_solids_ = d.allow_solids;
    drug_ = make_sys(d.compound.system, d.dose_mol_per_L);
    drug_neutral_ = d.compound.has_intrinsic_solubility ? d.compound.system.neutral_index() : -1;
    s0_ = d.compound.has_intrinsic_solubility ? d.compound.s0_at(temperature_C_)
                                              : std::numeric_limits<double>::infinity();
    comp_ion_.push_back(-1);
    comp_sys_.push_back(-1);
    for (std::size_t idx = 0; idx < d.compound.salts.size(); ++idx) {
      const Salt& salt = d.compound.salts[idx];
      int ion = -1, sys = -1;
      if (salt.counterion_is_system) {
        for (std::size_t k = 0; k < m.systems.size(); ++k) {
          if (m.systems[k].system.id == salt.counterion) sys = static_cast<int>(k);
        }
      } else {
        for (std::size_t k = 0; k < m.ions.size(); ++k) {
          if (m.ions[k].id == salt.counterion) ion = static_cast<int>(k);
        }
      }
      if ((ion < 0 && sys < 0) || !salt.ksp) continue;  // no counterion present: cannot form
      const int zc = sys >= 0 ? salt.counterion_charge : m.ions[ion].charge;
      const int cj = sys >= 0 ? systems_[sys].z0 - zc : -1;  // the counterion's species
      const int balance = -zc * salt.counterion_count;
      const int zd = salt.drug_count > 0 ? balance / salt.drug_count : 0;
      const int j = drug_.z0 - zd;  // species of charge zd
      if (sys >= 0 && (cj < 0 || cj > systems_[sys].n)) {
        throw InputError("salt '" + salt.id + "' of '" + d.compound.id + "': the system '" +
                         salt.counterion + "' has no species of charge " + std::to_string(zc));
      }
      if (zc == 0 || salt.drug_count < 1 || salt.counterion_count < 1 ||
          zd * salt.drug_count != balance || j < 0 || j > drug_.n) {
        throw InputError("salt '" + salt.id + "' of '" + d.compound.id +
                         "': the compound has no species of charge " +
                         (zd * salt.drug_count == balance ? std::to_string(zd) : std::to_string(balance) + "/" + std::to_string(salt.drug_count)) +
                         " to pair " + salt.stoichiometry() + " with " + salt.counterion);
      }
      if (static_cast<int>(salts_.size()) >= kMaxSalts || idx >= 32) {
        throw InputError("compound '" + d.compound.id + "' has more than " +
                         std::to_string(kMaxSalts) + " salts whose counterion is present");
      }
      SaltPhase p;
      p.index = static_cast<int>(idx);
      p.ion = ion;
      p.sys = sys;
      p.cj = cj;
      p.species = j;
      p.m = salt.drug_count;
      p.n = salt.counterion_count;
      p.zd = zd;
      p.zx = zc;
      p.ksp = salt_ksp_at(salt, temperature_C_);
      for (std::size_t c = 1; c < comp_ion_.size(); ++c) {
        if (comp_ion_[c] == ion && comp_sys_[c] == sys) p.comp = static_cast<int>(c);
      }
      if (p.comp < 0) {
        p.comp = static_cast<int>(comp_ion_.size());
        comp_ion_.push_back(ion);
        comp_sys_.push_back(sys);
      }
      salts_.push_back(p);
    }
    // Candidate active sets: bit 0 the free form, bit k+1 model salt k. A set is a candidate
    // when its solids' stoichiometric vectors (over the drug and the counterions) are
    // independent: at fixed pH at most as many solids as components coexist (phase rule).
    const bool free_possible = drug_neutral_ >= 0 && std::isfinite(s0_);
    const int ns = static_cast<int>(salts_.size());
    const int nc = static_cast<int>(comp_ion_.size());
    std::vector<std::pair<int, std::uint32_t>> sets;
    for (std::uint32_t mask = 1; mask < (1u << (ns + 1)); ++mask) {
      if ((mask & 1u) && !free_possible) continue;
      double a[kMaxComp][kMaxComp] = {};
      int rows = 0;
      for (int b = 0; b <= ns; ++b) {
        if (!((mask >> b) & 1u)) continue;
        if (b == 0) {
          a[rows][0] = 1.0;
        } else {
          a[rows][0] = salts_[b - 1].m;
          a[rows][salts_[b - 1].comp] = salts_[b - 1].n;
        }
        ++rows;
      }
      if (rows > nc) continue;
      int rank = 0;
      for (int c = 0; c < nc && rank < rows; ++c) {
        int piv = -1;
        for (int r = rank; r < rows; ++r) {
          if (std::fabs(a[r][c]) > 1e-9 && (piv < 0 || std::fabs(a[r][c]) > std::fabs(a[piv][c]))) piv = r;
        }
        if (piv < 0) continue;
        for (int k = 0; k < nc; ++k) std::swap(a[piv][k], a[rank][k]);
        for (int r = rank + 1; r < rows; ++r) {
          const double f = a[r][c] / a[rank][c];
          for (int k = 0; k < nc; ++k) a[r][k] -= f * a[rank][k];
        }
        ++rank;
      }
      if (rank == rows) sets.push_back({rows, mask});
    }
    std::stable_sort(sets.begin(), sets.end(),
                     [](const auto& x, const auto& y) { return x.first < y.first; });
    for (const auto& st : sets) subsets_.push_back(st.second);
  }
  per_species_ = m.activity == ActivityModel::kSit || m.activity == ActivityModel::kTruesdellJones;
  if (per_species_) prepare_activity_terms(m);
  double i0 = 0.0;
  for (const IonC& i : ions_) i0 += 0.5 * i.charge * i.charge * i.conc;
  set_ionic_strength(i0);
}

// Terms of every species under a model with specific terms (docs/model.md, "Activities"):
// the strong ions of the mixture make the medium; a species whose terms have the generic
// form (Ba and b of a species without parameters) needs no power of its own at each I, only
// the generic coefficient of its charge times the constant factor 10^c.
void EquilibriumModel::prepare_activity_terms(const Mixture& m) {
  ActivityMedium medium(m.activity, temperature_C_);
  for (const IonAmount& i : m.ions) medium.add_ion(i.id, i.charge, i.conc_mol_per_L);
  const LogGammaTerms g1 = medium.terms("", 1);
  generic_ba_ = g1.ba;
  generic_b1_ = g1.b;
  auto generic = [&](const LogGammaTerms& t, int z) {
    return z == 0 || (t.ba == generic_ba_ && t.b == generic_b1_ * z * z);
  };
  auto prepare = [&](Sys& s, const std::string& key) {
    for (int j = 0; j <= s.n; ++j) {
      const int z = s.z0 - j;
      s.act[j] = medium.terms(key, z);
      s.generic_form[j] = generic(s.act[j], z);
      s.fixed[j] = s.act[j].c == 0.0 ? 1.0 : std::pow(10.0, s.act[j].c);
    }
  };
  for (std::size_t k = 0; k < systems_.size(); ++k) prepare(systems_[k], m.systems[k].system.id);
  if (has_drug_) prepare(drug_, "");  // a drug has no published terms: the generic form
  for (std::size_t t = 0; t < ions_.size(); ++t) {
    IonC& i = ions_[t];
    i.act = medium.terms(m.ions[t].id, i.charge);
    i.generic_form = generic(i.act, i.charge);
    i.fixed = i.act.c == 0.0 ? 1.0 : std::pow(10.0, i.act.c);
  }
  h_act_ = medium.terms("H+", 1);
  oh_act_ = medium.terms("OH-", -1);
  h_generic_ = generic(h_act_, 1);
  oh_generic_ = generic(oh_act_, -1);
  h_fixed_ = h_act_.c == 0.0 ? 1.0 : std::pow(10.0, h_act_.c);
  oh_fixed_ = oh_act_.c == 0.0 ? 1.0 : std::pow(10.0, oh_act_.c);
  for (std::size_t t = 0; t < ions_.size(); ++t) {
    const std::optional<HydroxoComplex> hc = hydroxo_complex(m.ions[t].id, ions_[t].charge);
    if (!hc || !(ions_[t].conc > 0)) continue;
    HydroxoPair q;
    q.ion = static_cast<int>(t);
    q.z = ions_[t].charge;
    q.k = hc->k_at(temperature_C_);
    q.act = medium.terms(m.ions[t].id + "OH", q.z - 1);
    pairs_.push_back(q);
  }
}

double EquilibriumModel::hydroxo_paired(int ion, double pH) const {
  for (const HydroxoPair& q : pairs_) {
    if (q.ion != ion) continue;
    const double kx = q.k_eff * kw_ / (std::pow(10.0, -pH) * gamma_oh_);
    return ions_[ion].conc * kx / (1.0 + kx);
  }
  return 0.0;
}

void EquilibriumModel::set_ionic_strength(double I) {
  ionic_strength_ = I;
  if (ideal_) {
    gamma_.fill(1.0);
  } else {
    // gamma_z = gamma_1^(z^2), built by multiplication: z^2 - (z-1)^2 = 2z - 1.
    double g1;
    double sqrt_i = 0.0;
    if (per_species_) {
      sqrt_i = std::sqrt(I > 0 ? I : 0.0);
      g1 = std::pow(10.0, log10_gamma({generic_ba_, generic_b1_, 0.0}, 1, a_davies_, I, sqrt_i));
    } else {
      g1 = std::pow(10.0, -a_davies_ * davies_bracket(I));
    }
    const double g1sq = g1 * g1;
    double g = 1.0, factor = g1;
    gamma_[kGammaOffset] = 1.0;
    for (int z = 1; z <= kGammaOffset; ++z) {
      g *= factor;
      factor *= g1sq;
      gamma_[kGammaOffset + z] = g;
      gamma_[kGammaOffset - z] = g;
    }
    if (per_species_) {
      auto coefficient = [&](const LogGammaTerms& t, bool generic_form, double fixed, int z) {
        if (generic_form) return gamma(z) * fixed;
        return std::pow(10.0, log10_gamma(t, z, a_davies_, I, sqrt_i));
      };
      for (Sys& s : systems_) {
        for (int j = 0; j <= s.n; ++j) s.gamma[j] = coefficient(s.act[j], s.generic_form[j], s.fixed[j], s.z0 - j);
      }
      if (has_drug_) {
        for (int j = 0; j <= drug_.n; ++j) drug_.gamma[j] = gamma(drug_.z0 - j) * drug_.fixed[j];
      }
      for (IonC& i : ions_) i.gamma = coefficient(i.act, i.generic_form, i.fixed, i.charge);
      gamma_h_ = coefficient(h_act_, h_generic_, h_fixed_, 1);
      gamma_oh_ = coefficient(oh_act_, oh_generic_, oh_fixed_, -1);
      for (HydroxoPair& q : pairs_) {
        const double g_pair = coefficient(q.act, false, 1.0, q.z - 1);
        q.k_eff = q.k * ions_[q.ion].gamma * gamma_oh_ / g_pair;
      }
      update_effective_constants();
      return;
    }
  }
  gamma_h_ = gamma_oh_ = gamma_[kGammaOffset + 1];
  for (IonC& i : ions_) i.gamma = gamma(i.charge);
  update_effective_constants();
}

double EquilibriumModel::species_gamma(int system, int j) const {
  const Sys& s = system < 0 ? drug_ : systems_[system];
  return per_species_ ? s.gamma[j] : gamma(s.z0 - j);
}

double EquilibriumModel::gamma(int charge) const {
  if (charge < -kGammaOffset || charge > kGammaOffset) {
    return ideal_ ? 1.0
                  : std::pow(10.0, -a_davies_ * charge * charge * davies_bracket(ionic_strength_));
  }
  return gamma_[charge + kGammaOffset];
}

void EquilibriumModel::update_effective_constants() {
  if (per_species_) {
    for (Sys& s : systems_) {
      for (int i = 0; i < s.n; ++i) s.ka_eff[i] = s.ka[i] * s.gamma[i] / s.gamma[i + 1];
    }
    if (has_drug_) {
      for (int i = 0; i < drug_.n; ++i) drug_.ka_eff[i] = drug_.ka[i] * drug_.gamma[i] / drug_.gamma[i + 1];
      for (SaltPhase& p : salts_) {
        const double gx = p.ion >= 0 ? ions_[p.ion].gamma : systems_[p.sys].gamma[p.cj];
        p.ksp_eff = p.ksp / (ipow(drug_.gamma[p.species], p.m) * ipow(gx, p.n));
      }
    }
    return;
  }
  auto update = [&](Sys& s) {
    for (int i = 0; i < s.n; ++i) {
      const int z_acid = s.z0 - i;  // charge of the protonated side of step i
      s.ka_eff[i] = s.ka[i] * gamma(z_acid) / gamma(z_acid - 1);
    }
  };
  for (Sys& s : systems_) update(s);
  if (has_drug_) {
    update(drug_);
    for (SaltPhase& p : salts_) p.ksp_eff = p.ksp / (ipow(gamma(p.zd), p.m) * ipow(gamma(p.zx), p.n));
  }
}

double EquilibriumModel::effective_ka(int system, int step) const {
  const Sys& s = system < 0 ? drug_ : systems_[system];
  return s.ka_eff[step];
}

double EquilibriumModel::moments(const Sys& s, double h, double* alpha, double* zbar, double* z2bar) {
  double beta = 1.0;
  double sum = 1.0;
  alpha[0] = 1.0;
  const double inv_h = 1.0 / h;
  for (int i = 0; i < s.n; ++i) {
    beta *= s.ka_eff[i] * inv_h;
    alpha[i + 1] = beta;
    sum += beta;
  }
  const double inv = 1.0 / sum;
  double zb = 0.0, z2 = 0.0, za = 0.0;
  for (int j = 0; j <= s.n; ++j) {
    alpha[j] *= inv;
    const double z = s.z0 - j;
    zb += z * alpha[j];
    z2 += z * z * alpha[j];
    za += std::fabs(z) * alpha[j];
  }
  *zbar = zb;
  *z2bar = z2;
  return za;
}

void EquilibriumModel::fractions(int system, double pH, double* alpha) const {
  double zb, z2;
  moments(system < 0 ? drug_ : systems_[system], std::pow(10.0, -pH), alpha, &zb, &z2);
}

double EquilibriumModel::ion_removed(const Partition& p, int ion) const {
  double removed = 0.0;
  for (std::size_t k = 0; k < salts_.size(); ++k) {
    if (salts_[k].ion == ion && p.salt_solid[k] != 0.0) removed += salts_[k].n * p.salt_solid[k];
  }
  return removed;
}

double EquilibriumModel::system_removed(const Partition& p, int system) const {
  double removed = 0.0;
  for (std::size_t k = 0; k < salts_.size(); ++k) {
    if (salts_[k].sys == system && p.salt_solid[k] != 0.0) removed += salts_[k].n * p.salt_solid[k];
  }
  return removed;
}

double EquilibriumModel::component_total(int c) const {
  return comp_sys_[c] >= 0 ? systems_[comp_sys_[c]].total : ions_[comp_ion_[c]].conc;
}

void EquilibriumModel::salt_products(double h, double* kq) const {
  for (std::size_t k = 0; k < salts_.size(); ++k) {
    const SaltPhase& s = salts_[k];
    kq[k] = s.ksp_eff;
    if (s.sys >= 0) {
      double a[kMaxPka + 1], zb, z2;
      moments(systems_[s.sys], h, a, &zb, &z2);
      // A species fraction that underflows leaves this salt unable to form at this pH.
      kq[k] = a[s.cj] > 0 ? s.ksp_eff / ipow(a[s.cj], s.n) : std::numeric_limits<double>::infinity();
    }
  }
}

void EquilibriumModel::removed_moments(const Partition& p, double h, double* charge,
                                       double* abs_charge, double* z2, double* particles) const {
  double q_charge = 0.0, q_abs = 0.0, q_z2 = 0.0, q_n = 0.0;
  for (std::size_t k = 0; k < salts_.size(); ++k) {
    if (p.salt_solid[k] == 0.0) continue;
    const SaltPhase& s = salts_[k];
    const double q = s.n == 1 ? p.salt_solid[k] : s.n * p.salt_solid[k];
    if (s.sys >= 0) {
      // The system's dissolved total falls by q, spread over its species by their fractions.
      double a[kMaxPka + 1], zb, zz;
      const double za = moments(systems_[s.sys], h, a, &zb, &zz);
      q_charge += zb * q;
      q_abs += za * q;
      q_z2 += zz * q;
    } else {
      const int zc = s.zx;
      q_charge += zc * q;
      q_abs += std::abs(zc) * q;
      q_z2 += zc * zc * q;
    }
    q_n += q;
  }
  *charge = q_charge;
  *abs_charge = q_abs;
  *z2 = q_z2;
  *particles = q_n;
}

double EquilibriumModel::solubility_limit(double pH, int* limiting) const {
  double best = std::numeric_limits<double>::infinity();
  int which = -2;
  if (has_drug_) {
    const double h = std::pow(10.0, -pH);
    double alpha[kMaxPka + 1], zb, z2, kq[kMaxSalts] = {};
    moments(drug_, h, alpha, &zb, &z2);
    if (drug_neutral_ >= 0 && std::isfinite(s0_) && alpha[drug_neutral_] > 0) {
      best = s0_ / alpha[drug_neutral_];
      which = -1;
    }
    salt_products(h, kq);
    for (std::size_t k = 0; k < salts_.size(); ++k) {
      const SaltPhase& p = salts_[k];
      const double x = component_total(p.comp);
      if (!(x > 0) || !(alpha[p.species] > 0) || !std::isfinite(kq[k])) continue;
      const double limit = (p.m == 1 && p.n == 1)
                               ? kq[k] / (alpha[p.species] * x)
                               : std::pow(kq[k] / ipow(x, p.n), 1.0 / p.m) / alpha[p.species];
      if (limit < best) {
        best = limit;
        which = p.index;
      }
    }
  }
  if (limiting) *limiting = which;
  return best;
}

bool EquilibriumModel::partition_slope(const Partition& p, double h, double zb, double z2,
                                       double* slope) const {
  // Unknowns: dmu_l (l: the drug and the counterions of the salts present) and dlambda_r (the
  // solids present). Rows: c_l dmu_l + sum_r nu_rl dlambda_r = 0 (totals fixed);
  // sum_l nu_rl dmu_l = dlogk_r, with d ln alpha_j / d ln h = z_j - zbar.
  const int nc = static_cast<int>(comp_ion_.size());
  int local_of[kMaxComp], comps[kMaxComp], ncl = 0;
  for (int c = 0; c < nc; ++c) local_of[c] = -1;
  local_of[0] = 0;
  comps[ncl++] = 0;
  int salt_of[kMaxComp];  // -1 free form, else model salt
  int ns = 0;
  if (p.solids.free) salt_of[ns++] = -1;
  for (int k = 0; k < static_cast<int>(salts_.size()); ++k) {
    if (!p.solids.has_salt(salts_[k].index)) continue;
    salt_of[ns++] = k;
    if (local_of[salts_[k].comp] < 0) {
      local_of[salts_[k].comp] = ncl;
      comps[ncl++] = salts_[k].comp;
    }
  }
  double conc[kMaxComp];
  conc[0] = p.dissolved;
  for (int l = 1; l < ncl; ++l) {
    const int c = comps[l];
    double left = component_total(c);
    for (int k = 0; k < static_cast<int>(salts_.size()); ++k) {
      if (salts_[k].comp == c) left -= salts_[k].n * p.salt_solid[k];
    }
    conc[l] = left;
  }
  double sys_zb[kMaxSalts] = {}, sys_var[kMaxSalts] = {};
  const int dim = ncl + ns;
  double a[2 * kMaxComp][2 * kMaxComp + 1] = {};
  for (int l = 0; l < ncl; ++l) {
    if (!(conc[l] > 0)) return false;
    a[l][l] = conc[l];
  }
  for (int r = 0; r < ns; ++r) {
    double dlogk;
    if (salt_of[r] < 0) {
      a[0][ncl + r] = 1.0;
      a[ncl + r][0] = 1.0;
      dlogk = zb;  // ln(S0 / alpha_neutral), the neutral species of charge 0
    } else {
      const SaltPhase& s = salts_[salt_of[r]];
      const int l = local_of[s.comp];
      a[0][ncl + r] = s.m;
      a[ncl + r][0] = s.m;
      a[l][ncl + r] = s.n;
      a[ncl + r][l] = s.n;
      dlogk = -s.m * (s.zd - zb);
      if (s.sys >= 0) {
        double al[kMaxPka + 1], szb, sz2;
        moments(systems_[s.sys], h, al, &szb, &sz2);
        sys_zb[salt_of[r]] = szb;
        sys_var[salt_of[r]] = sz2 - szb * szb;
        dlogk -= s.n * (s.zx - szb);
      }
    }
    a[ncl + r][dim] = dlogk;
  }
  double sol[2 * kMaxComp];
  if (!solve_dense(dim, a, sol)) return false;
  double g = p.dissolved * (sol[0] * zb + (z2 - zb * zb));
  for (int r = 0; r < ns; ++r) {
    if (salt_of[r] < 0) continue;
    const int k = salt_of[r];
    const SaltPhase& s = salts_[k];
    const double zq = s.sys >= 0 ? sys_zb[k] : s.zx;
    g -= s.n * sol[ncl + r] * zq;
    if (s.sys >= 0) g -= s.n * p.salt_solid[k] * sys_var[k];
  }
  if (!std::isfinite(g)) return false;
  *slope = g;
  return true;
}

// True when every candidate solid outside `subset` is undersaturated (within `slack`), at
// dissolved drug d and dissolved counterion x[c] of each component.
bool EquilibriumModel::undersaturated_except(std::uint32_t subset, const double* alpha,
                                             const double* kq, double d, const double* x,
                                             double slack) const {
  if (!(subset & 1u) && drug_neutral_ >= 0 && std::isfinite(s0_) &&
      alpha[drug_neutral_] * d > s0_ * (1.0 + slack)) {
    return false;
  }
  for (std::size_t k = 0; k < salts_.size(); ++k) {
    if ((subset >> (k + 1)) & 1u) continue;
    const SaltPhase& s = salts_[k];
    const double q = (s.m == 1 && s.n == 1) ? alpha[s.species] * d * x[s.comp]
                                            : ipow(alpha[s.species] * d, s.m) * ipow(x[s.comp], s.n);
    if (q > kq[k] * (1.0 + slack)) return false;
  }
  return true;
}

// The partition with exactly the solids of `subset` present (bit 0 free, bit k+1 model salt k):
// false when it does not exist, a solid amount would be negative, or another solid would be
// supersaturated. Closed forms for the free form, one 1:1 salt, and the free form with one
// salt; otherwise Newton's method on the equality-constrained dual (component potentials
// mu = ln c, minimize sum c - T mu subject to the solids' solubility products).
bool EquilibriumModel::try_subset(std::uint32_t subset, const double* alpha, const double* kq,
                                  double dose, Partition* out) const {
  const int nc = static_cast<int>(comp_ion_.size());
  double total[kMaxComp], x[kMaxComp];
  total[0] = dose;
  for (int c = 1; c < nc; ++c) total[c] = component_total(c);
  for (int c = 0; c < nc; ++c) x[c] = total[c];
  Partition p;
  const bool with_free = subset & 1u;
  const std::uint32_t salt_bits = subset >> 1;
  int single = -1;  // the only salt, when there is one
  if (salt_bits && !(salt_bits & (salt_bits - 1))) {
    single = 0;
    while (!((salt_bits >> single) & 1u)) ++single;
  }
  const double an = drug_neutral_ >= 0 ? alpha[drug_neutral_] : 0.0;
  if (with_free && !(an > 0)) return false;
  for (int k = 0; k < static_cast<int>(salts_.size()); ++k) {
    if (((salt_bits >> k) & 1u) && !(alpha[salts_[k].species] > 0 && std::isfinite(kq[k]))) return false;
  }
  double d = dose;
  if (with_free && !salt_bits) {
    d = s0_ / an;
    p.free_solid = dose - d;
    if (!(p.free_solid >= 0)) return false;
  } else if (single >= 0 && !with_free && salts_[single].m == 1 && salts_[single].n == 1) {
    const SaltPhase& s = salts_[single];
    const double xt = total[s.comp];
    const double a = alpha[s.species];
    const double kq1 = kq[single] / a;
    const double c = dose * xt - kq1;
    if (!(c > 0)) return false;
    const double disc = (dose - xt) * (dose - xt) + 4.0 * kq1;
    const double sq = std::sqrt(disc);
    const double precip = 2.0 * c / ((dose + xt) + sq);  // smaller root, stable form
    // The dissolved drug solves d^2 + (x - dose) d - kq = 0; its stable form keeps it positive
    // where nearly all the dose precipitates (dose - precip would cancel to below zero).
    const double b = xt - dose;
    d = b > 0 ? 2.0 * kq1 / (b + sq) : 0.5 * (sq - b);
    p.salt_solid[single] = precip;
    p.salt_drug = precip;
    x[s.comp] = xt - precip;
  } else if (single >= 0 && with_free) {
    const SaltPhase& s = salts_[single];
    d = s0_ / an;
    const double x_left = (s.m == 1 && s.n == 1)
                              ? kq[single] / (alpha[s.species] * d)
                              : std::pow(kq[single] / ipow(alpha[s.species] * d, s.m), 1.0 / s.n);
    const double precip = (s.n == 1) ? total[s.comp] - x_left : (total[s.comp] - x_left) / s.n;
    const double free_solid = (s.m == 1) ? dose - precip - d : dose - s.m * precip - d;
    if (precip < 0 || free_solid < 0) return false;
    p.salt_solid[single] = precip;
    p.salt_drug = s.m * precip;
    p.free_solid = free_solid;
    x[s.comp] = x_left;
  } else {
    // Components involved: the drug (local 0) and the counterions of the salts present.
    int comps[kMaxComp], ncl = 0, local_of[kMaxComp];
    for (int c = 0; c < nc; ++c) local_of[c] = -1;
    local_of[0] = 0;
    comps[ncl++] = 0;
    for (int k = 0; k < static_cast<int>(salts_.size()); ++k) {
      if (((salt_bits >> k) & 1u) && local_of[salts_[k].comp] < 0) {
        local_of[salts_[k].comp] = ncl;
        comps[ncl++] = salts_[k].comp;
      }
    }
    // Constraints: nu . mu = logk for each solid present.
    double nu[kMaxComp][kMaxComp] = {};
    double logk[kMaxComp];
    int solid_of[kMaxComp];  // -1 free, else model salt
    int ns = 0;
    if (with_free) {
      nu[ns][0] = 1.0;
      logk[ns] = std::log(s0_ / an);
      solid_of[ns++] = -1;
    }
    for (int k = 0; k < static_cast<int>(salts_.size()); ++k) {
      if (!((salt_bits >> k) & 1u)) continue;
      const SaltPhase& s = salts_[k];
      nu[ns][0] = s.m;
      nu[ns][local_of[s.comp]] = s.n;
      logk[ns] = std::log(kq[k]) - s.m * std::log(alpha[s.species]);
      solid_of[ns++] = k;
    }
    double mu[kMaxComp], tot[kMaxComp], lam[kMaxComp];
    for (int l = 0; l < ncl; ++l) {
      tot[l] = total[comps[l]];
      if (!(tot[l] > 0)) return false;
      mu[l] = std::log(tot[l]);
    }
    // Warm start from the last solution of the same active set (the previous evaluation).
    if (subset == warm_subset_) {
      for (int l = 0; l < ncl; ++l) mu[l] = std::min(warm_mu_[l], mu[l] + 1.0);
    }
    const int dim = ncl + ns;
    bool converged = false;
    for (int it = 0; it < 60 && !converged; ++it) {
      double a[2 * kMaxComp][2 * kMaxComp + 1] = {};
      double c[kMaxComp];
      for (int l = 0; l < ncl; ++l) {
        c[l] = std::exp(mu[l]);
        a[l][l] = c[l];
        a[l][dim] = tot[l] - c[l];
      }
      for (int r = 0; r < ns; ++r) {
        double lhs = 0.0;
        for (int l = 0; l < ncl; ++l) {
          a[l][ncl + r] = nu[r][l];
          a[ncl + r][l] = nu[r][l];
          lhs += nu[r][l] * mu[l];
        }
        a[ncl + r][dim] = logk[r] - lhs;
      }
      double sol[2 * kMaxComp];
      if (!solve_dense(dim, a, sol)) return false;
      double big = 0.0, t = 1.0;
      for (int l = 0; l < ncl; ++l) {
        big = std::max(big, std::fabs(sol[l]));
        // A dissolved amount never exceeds its total: keep c below e times it.
        const double room = std::log(tot[l]) + 1.0 - mu[l];
        if (sol[l] > room && sol[l] > 0) t = std::min(t, std::max(room, 0.0) / sol[l]);
      }
      if (big * t > 30.0) t = 30.0 / big;
      if (!(t > 0)) t = 0.5;
      for (int l = 0; l < ncl; ++l) mu[l] += t * sol[l];
      for (int r = 0; r < ns; ++r) lam[r] = sol[ncl + r];
      converged = t == 1.0 && big <= 1e-9;
    }
    if (!converged) return false;
    for (int r = 0; r < ns; ++r) {
      if (!(lam[r] >= 0)) return false;
      if (solid_of[r] < 0) {
        p.free_solid = lam[r];
      } else {
        p.salt_solid[solid_of[r]] = lam[r];
        p.salt_drug += salts_[solid_of[r]].m * lam[r];
      }
    }
    d = std::exp(mu[0]);
    for (int l = 1; l < ncl; ++l) x[comps[l]] = std::exp(mu[l]);
    if (undersaturated_except(subset, alpha, kq, d, x, kEps)) {
      warm_subset_ = subset;
      for (int l = 0; l < ncl; ++l) warm_mu_[l] = mu[l];
    }
  }
  if (!undersaturated_except(subset, alpha, kq, d, x, kEps)) return false;
  p.dissolved = d;
  p.solids.free = with_free;
  for (int k = 0; k < static_cast<int>(salts_.size()); ++k) {
    if ((salt_bits >> k) & 1u) p.solids.salts |= 1u << salts_[k].index;
  }
  *out = p;
  return true;
}

EquilibriumModel::Partition EquilibriumModel::partition(const double* alpha, double h,
                                                        double dose) const {
  Partition p;
  p.dissolved = dose;
  if (!drug_solids_ || !(dose > 0)) return p;
  double x[kMaxComp], kq[kMaxSalts];
  x[0] = dose;
  for (int c = 1; c < static_cast<int>(comp_ion_.size()); ++c) x[c] = component_total(c);
  salt_products(h, kq);
  if (undersaturated_except(0, alpha, kq, dose, x, 0.0)) return p;
  if (last_subset_ && try_subset(last_subset_, alpha, kq, dose, &p)) return p;
  for (const std::uint32_t subset : subsets_) {
    if (subset != last_subset_ && try_subset(subset, alpha, kq, dose, &p)) {
      last_subset_ = subset;
      return p;
    }
  }
  // Rounding at a phase boundary: fall back on the free form alone, clamped.
  p = Partition();
  p.dissolved = dose;
  const bool free_possible = drug_neutral_ >= 0 && std::isfinite(s0_);
  if (free_possible && alpha[drug_neutral_] * dose / s0_ > 1.0) {
    p.solids.free = true;
    p.dissolved = s0_ / alpha[drug_neutral_];
    p.free_solid = dose - p.dissolved;
  }
  return p;
}

EquilibriumModel::Evaluation EquilibriumModel::evaluate(double pH) const {
  Evaluation ev;
  const double h = std::pow(10.0, -pH);
  double alpha[kMaxPka + 1];
  double charge = 0.0, dsum = 0.0, abs_sum = 0.0, i2 = 0.0, osm = 0.0;
  for (const Sys& s : systems_) {
    double zb, z2;
    const double za = moments(s, h, alpha, &zb, &z2);
    charge += s.total * zb;
    dsum += s.total * (z2 - zb * zb);
    abs_sum += s.total * za;
    i2 += s.total * z2;
    osm += s.total;
  }
  for (const IonC& i : ions_) {
    charge += i.charge * i.conc;
    abs_sum += std::abs(i.charge) * i.conc;
    i2 += i.charge * i.charge * i.conc;
    osm += i.conc;
  }
  if (has_drug_) {
    double zb, z2;
    const double za = moments(drug_, h, alpha, &zb, &z2);
    ev.drug = partition(alpha, h, drug_.total);
    const Partition& p = ev.drug;
    const double d = p.dissolved;
    // Precipitated salts also take their counterions out of solution.
    double q_charge = 0.0, q_abs = 0.0, q_z2 = 0.0, q_n = 0.0;
    if (p.salt_drug != 0.0) removed_moments(p, h, &q_charge, &q_abs, &q_z2, &q_n);
    charge += d * zb - q_charge;
    abs_sum += d * za - q_abs;
    i2 += d * z2 - q_z2;
    osm += d - q_n;
    if (p.solids.empty()) {
      dsum += d * (z2 - zb * zb);
    } else if (p.solids.free && p.solids.salts == 0) {
      dsum += d * z2;  // c_j = S0 alpha_j/alpha_n grows as h^z_j: d(sum z c)/d ln h = sum z^2 c
    } else if (double slope = 0.0; partition_slope(p, h, zb, z2, &slope)) {
      dsum += slope;  // salts present: the slope at fixed solids, by implicit differentiation
    } else {
      // Singular at fixed solids (a solid at zero amount): differentiate numerically.
      const double step = 1e-6;
      auto drug_charge = [&](double x) {
        double a2[kMaxPka + 1], zb2, z22;
        const double h2 = std::pow(10.0, -x);
        moments(drug_, h2, a2, &zb2, &z22);
        const Partition q = partition(a2, h2, drug_.total);
        double removed = 0.0, r_abs, r_z2, r_n;
        removed_moments(q, h2, &removed, &r_abs, &r_z2, &r_n);
        return q.dissolved * zb2 - removed;
      };
      const double deriv = (drug_charge(pH + step) - drug_charge(pH - step)) / (2 * step);
      dsum += -deriv / kLn10;
    }
  }
  const double hc = h / gamma_h_;
  const double oh = kw_ / (h * gamma_oh_);
  if (pairs_.empty()) {
    charge += hc - oh;
    dsum += hc + oh;
    abs_sum += hc + oh;
    i2 += hc + oh;
  } else {
    // Hydroxo complexes MOH+: hydroxide held by the metal ions is charge taken from them; the
    // complex counts at charge z - 1 in I, and its particles replace M and OH.
    double paired = 0.0, dpaired = 0.0;
    for (const HydroxoPair& q : pairs_) {
      const double kx = q.k_eff * oh;
      const double c = ions_[q.ion].conc * kx / (1.0 + kx);
      paired += c;
      dpaired += c / (1.0 + kx);
      i2 -= 2.0 * q.z * c;
    }
    charge += hc - oh - paired;
    dsum += hc + oh + dpaired;
    abs_sum += hc + oh - paired;
    i2 += hc + oh + paired;
  }
  osm += hc + oh;
  ev.charge = charge;
  ev.dcharge_dpH = -kLn10 * dsum;
  ev.abs_sum = abs_sum;
  ev.ionic_strength = 0.5 * i2;
  ev.osmolarity = osm;
  return ev;
}

namespace {
/// The activity model in a message: "Davies equation" (the text of every earlier release),
/// else the model's label followed by "model".
std::string model_words(ActivityModel a) {
  return a == ActivityModel::kDavies ? "Davies equation" : activity_model_label(a) + " model";
}

// Safeguarded Newton on the charge balance, which is decreasing in pH, inside [kPhLow, kPhHigh].
// On return, *last holds the evaluation at the returned pH when it was the last evaluated
// point (*have_last true); otherwise the caller evaluates again.
template <typename F, typename E>
double solve_charge_balance(F&& eval, double x0, double tol, int max_iter, int* count, bool* ok,
                            E* last, bool* have_last) {
  double lo = kPhLow, hi = kPhHigh;
  double x = std::min(std::max(x0, lo + 1e-9), hi - 1e-9);
  double last_step = hi - lo;
  *ok = false;
  *have_last = false;
  for (int it = 0; it < max_iter; ++it) {
    *last = eval(x);
    ++*count;
    const double f = last->charge;
    if (f == 0.0) {
      *ok = true;
      *have_last = true;
      return x;
    }
    if (f > 0) lo = x; else hi = x;
    double xn;
    const double df = last->dcharge_dpH;
    const double step = (df < 0) ? -f / df : std::numeric_limits<double>::infinity();
    if (std::fabs(step) <= tol * (1.0 + std::fabs(x))) {  // converged (step below rounding)
      *ok = true;
      *have_last = true;
      return x;
    }
    xn = x + step;
    if (!(xn > lo && xn < hi) || std::fabs(step) > 0.75 * last_step) {
      xn = 0.5 * (lo + hi);
    }
    last_step = std::fabs(xn - x);
    if (last_step <= tol * (1.0 + std::fabs(x)) || hi - lo <= tol) {
      *ok = true;
      return xn;
    }
    x = xn;
  }
  return x;
}
}  // namespace

StateSummary EquilibriumModel::solve(const SolverOptions& options, double pH_guess) {
  StateSummary out;
  auto eval = [this](double x) { return evaluate(x); };
  bool ok = false, have = false;
  Evaluation ev;
  auto inner = [&](double x0) {
    const double x1 = solve_charge_balance(eval, x0, options.ph_tolerance, options.max_ph_iterations,
                                           &out.evaluations, &ok, &ev, &have);
    if (!have) {
      ev = evaluate(x1);
      ++out.evaluations;
    }
    return x1;
  };
  double x = inner(pH_guess);
  bool converged = ok;
  bool diverged = false;
  if (!ideal_ && ok) {
    // Fixed point I = I(pH(I)), accelerated by the secant method on g(I) = I(pH(I)) - I.
    double i_prev = ionic_strength_, g_prev = ev.ionic_strength - ionic_strength_;
    double i_cur = ev.ionic_strength;
    // Bracket of the root of g: g(i_lo) > 0 > g(i_hi). Where I(pH(I)) falls steeply (many
    // highly charged species) the fixed point oscillates; steps then stay in the bracket and,
    // after 100 steps, bisect it.
    double i_lo = 0.0, i_hi = std::numeric_limits<double>::infinity(), g_lo = g_prev;
    double up_step = 0.0;
    converged = false;
    for (int k = 0; k < options.max_ionic_strength_iterations; ++k) {
      set_ionic_strength(i_cur);
      x = inner(x);
      if (!std::isfinite(ev.ionic_strength) || !std::isfinite(ev.charge)) {
        // The activity coefficients overflow at this I: step back towards i_lo.
        diverged = true;
        i_hi = std::min(i_hi, i_cur);
        if (!(i_hi - i_lo > 1e-12 * i_hi)) break;
        i_cur = 0.5 * (i_lo + i_hi);
        x = pH_guess;
        continue;
      }
      diverged = false;
      if (!ok) break;
      const double g = ev.ionic_strength - i_cur;
      // Where solids pin the pH (free form and salt together), I(pH) is as uncertain as the
      // charge balance itself: accept a change of I within a few times the charge residual.
      if (std::fabs(g) <= options.ionic_strength_rel_tolerance * i_cur + 4.0 * std::fabs(ev.charge) + 1e-300) {
        converged = true;
        break;
      }
      double i_next = ev.ionic_strength;
      if (g != g_prev) {
        const double sec = i_cur - g * (i_cur - i_prev) / (g - g_prev);
        // Where I(pH(I)) rises almost as fast as I the plain step is tiny and the secant step
        // many times longer; it is still bounded, and kept in the bracket below.
        if (sec > 0 && std::fabs(sec - i_cur) <= 1000.0 * std::fabs(g)) i_next = sec;
      }
      if (g > 0) {
        if (i_cur >= i_lo) {
          i_lo = i_cur;
          g_lo = g;
        }
      } else {
        i_hi = std::min(i_hi, i_cur);
      }
      if (std::isfinite(i_hi)) {
        if (k >= 100 || !(i_next > i_lo && i_next < i_hi)) i_next = 0.5 * (i_lo + i_hi);
      } else if (!(i_next > i_lo) || k >= 20) {
        // No I above the root known yet: search upwards from the highest I known to lie below
        // it, with steps that double (I(pH(I)) may rise faster than I over a stretch).
        up_step = std::max(g_lo, 2.0 * up_step);
        i_next = i_lo + up_step;
      }
      i_prev = i_cur;
      g_prev = g;
      i_cur = i_next;
    }
  }
  // Ideal activities: the coefficients stay 1, but the ionic strength reported is still the
  // real one of the solved state, counting every ion (I = 1/2 sum z^2 c).
  if (ideal_ && std::isfinite(ev.ionic_strength)) set_ionic_strength(ev.ionic_strength);
  out.pH = x;
  out.ionic_strength_mol_per_L =
      diverged ? std::numeric_limits<double>::infinity() : ionic_strength_;
  out.drug_dissolved_mol_per_L = ev.drug.dissolved;
  out.solids = ev.drug.solids;
  out.charge_residual_rel = ev.abs_sum > 0 ? std::fabs(ev.charge) / ev.abs_sum : 0.0;
  out.converged = converged && std::isfinite(x) && std::isfinite(ionic_strength_) &&
                  out.charge_residual_rel <= kMaxChargeResidual;
  return out;
}

// ---------------------------------------------------------------------------------------------
// Full solve with species, drug state and warnings.

Equilibrium solve(const Mixture& mixture, const SolverOptions& options) {
  Equilibrium r;
  std::string err;
  if (!options.is_valid(&err)) {
    r.message = err;
    return r;
  }
  r.temperature_C = mixture.temperature_C;
  r.activity = mixture.activity;
  EquilibriumModel model(mixture);
  const StateSummary s = model.solve(options);
  r.evaluations = s.evaluations;
  r.pH = s.pH;
  r.ionic_strength_mol_per_L = s.ionic_strength_mol_per_L;
  r.charge_residual_rel = s.charge_residual_rel;
  if (!s.converged) {
    r.termination = Termination::kMaxIterations;
    r.message = "the equilibrium did not converge";
    if (!std::isfinite(s.ionic_strength_mol_per_L) || !std::isfinite(s.pH) ||
        !std::isfinite(s.charge_residual_rel)) {
      r.termination = Termination::kNumericalFailure;
      r.message = "the activity corrections diverge: the ionic strength grows beyond the range of "
                  "the " + model_words(mixture.activity) + " (the mixture is too concentrated for the model)";
      r.pH = 0.0;
      r.ionic_strength_mol_per_L = 0.0;
    } else if (!(s.charge_residual_rel <= kMaxChargeResidual) &&
               (s.pH <= kPhLow + 1e-6 || s.pH >= kPhHigh - 1e-6)) {
      r.message = "the pH would lie outside " + std::to_string(static_cast<int>(kPhLow)) + " to " +
                  std::to_string(static_cast<int>(kPhHigh)) +
                  " (the mixture is too concentrated for the model)";
    } else if (mixture.activity == ActivityModel::kDavies && s.ionic_strength_mol_per_L > 0.5) {
      r.termination = Termination::kNumericalFailure;
      r.message = "the activity corrections diverge: at ionic strength " +
                  std::to_string(s.ionic_strength_mol_per_L).substr(0, 5) +
                  " mol/L the Davies equation is far outside its range (0.5 mol/L); the mixture "
                  "is too concentrated for the model";
    }
    return r;
  }
  const EquilibriumModel::Evaluation ev = model.evaluate(s.pH);
  r.osmolarity_mOsm_per_L = ev.osmolarity * 1000.0;

  double alpha[kMaxPka + 1];
  double mass_res = 0.0;
  for (int k = 0; k < model.num_systems(); ++k) {
    const SystemAmount& sa = mixture.systems[k];
    model.fractions(k, s.pH, alpha);
    // Dissolved: the total less what salts of a system counterion hold (clamped at zero).
    const double removed = model.system_removed(ev.drug, k);
    const double dissolved = std::max(0.0, sa.total_mol_per_L - removed);
    double sum = 0.0;
    for (int j = 0; j <= static_cast<int>(sa.system.pkas.size()); ++j) {
      const int z = sa.system.charge_of(j);
      const double c = dissolved * alpha[j];
      sum += c;
      r.species.push_back({sa.system.id + " " + sa.system.species_label(j), sa.system.id, z, c,
                           model.species_gamma(k, j)});
    }
    if (sa.total_mol_per_L > 0) {
      mass_res = std::max(mass_res, std::fabs(sum + removed - sa.total_mol_per_L) / sa.total_mol_per_L);
    }
  }
  const EquilibriumModel::Partition& p = ev.drug;
  for (std::size_t t = 0; t < mixture.ions.size(); ++t) {
    const IonAmount& i = mixture.ions[t];
    // Clamped: a counterion precipitated to exhaustion may round to just below zero.
    const double paired = model.hydroxo_paired(static_cast<int>(t), s.pH);
    const double c = std::max(0.0, i.conc_mol_per_L - model.ion_removed(p, static_cast<int>(t)) - paired);
    r.species.push_back({i.id, "", i.charge, c, model.ion_gamma(static_cast<int>(t))});
    if (paired > 0) {
      r.species.push_back({i.id.substr(0, i.id.size() - 2) + "OH+", "", i.charge - 1, paired,
                           model.gamma(i.charge - 1)});
    }
  }
  const double h = std::pow(10.0, -s.pH);
  r.species.push_back({"H+", "", 1, h / model.h_gamma(), model.h_gamma()});
  r.species.push_back({"OH-", "", -1, model.kw() / (h * model.oh_gamma()), model.oh_gamma()});

  if (mixture.drug) {
    const DrugAmount& d = *mixture.drug;
    const AcidBaseSystem& sys = d.compound.system;
    DrugState ds;
    ds.dose_mol_per_L = d.dose_mol_per_L;
    ds.dissolved_mol_per_L = p.dissolved;
    ds.dissolved_mg_per_mL = p.dissolved * d.compound.molar_mass_g_per_mol;
    ds.dose_mg_per_mL = d.dose_mol_per_L * d.compound.molar_mass_g_per_mol;
    ds.free_solid_mol_per_L = p.free_solid;
    ds.salt_solid_mol_per_L = p.salt_drug;
    ds.salt_solids_mol_per_L.assign(d.compound.salts.size(), 0.0);
    for (int k = 0; k < model.num_salts(); ++k) {
      ds.salt_solids_mol_per_L[model.salt_compound_index(k)] = p.salt_solid[k];
    }
    model.fractions(-1, s.pH, alpha);
    const int n = static_cast<int>(sys.pkas.size());
    ds.fractions.assign(alpha, alpha + n + 1);
    const int jn = sys.neutral_index();
    ds.neutral_mol_per_L = jn >= 0 ? alpha[jn] * p.dissolved : 0.0;
    for (int j = 0; j <= n; ++j) {
      const int z = sys.charge_of(j);
      r.species.push_back({d.compound.id + " " + sys.species_label(j), d.compound.id, z,
                           p.dissolved * alpha[j], model.species_gamma(-1, j)});
    }
    ds.solids = p.solids;
    ds.solid = to_string(p.solids, d.compound);
    const double mass = p.dissolved + p.free_solid + p.salt_drug;
    if (d.dose_mol_per_L > 0) {
      mass_res = std::max(mass_res, std::fabs(mass - d.dose_mol_per_L) / d.dose_mol_per_L);
    }
    // Saturation ratio with the whole dose dissolved.
    Mixture all = mixture;
    all.drug->allow_solids = false;
    EquilibriumModel m2(all);
    const bool any_solid = !p.solids.empty();
    StateSummary s2 = !any_solid ? s : m2.solve(options, s.pH);
    // When the fully dissolved state itself cannot be solved (e.g. its activity corrections
    // diverge), estimate the ratio at the equilibrium state instead, and say so.
    const bool dissolved_state = any_solid && s2.converged;
    if (any_solid && !s2.converged) {
      s2 = s;
      r.warnings.push_back("the saturation ratio is estimated at the equilibrium pH: the state "
                           "with the whole dose dissolved could not be solved");
    }
    if (dissolved_state) m2.set_ionic_strength(s2.ionic_strength_mol_per_L);
    EquilibriumModel& mm = dissolved_state ? m2 : model;
    mm.fractions(-1, s2.pH, alpha);
    double sat = 0.0;
    const double s0 = d.compound.s0_at(mixture.temperature_C);
    if (d.compound.has_intrinsic_solubility && jn >= 0) sat = alpha[jn] * d.dose_mol_per_L / s0;
    for (const Salt& salt : d.compound.salts) {
      if (!salt.ksp) continue;
      for (std::size_t k = 0; salt.counterion_is_system && k < mixture.systems.size(); ++k) {
        const SystemAmount& sa = mixture.systems[k];
        if (sa.system.id != salt.counterion || !(sa.total_mol_per_L > 0)) continue;
        const int zc = salt.counterion_charge;
        const int zd = salt.drug_charge(zc);
        const int j = sys.z0() - zd, cj = sa.system.z0() - zc;
        if (j < 0 || j > n || cj < 0 || cj > static_cast<int>(sa.system.pkas.size())) continue;
        double ac[kMaxPka + 1];
        mm.fractions(static_cast<int>(k), s2.pH, ac);
        const double ip =
            ipow(mm.species_gamma(-1, j) * alpha[j] * d.dose_mol_per_L, salt.drug_count) *
            ipow(mm.species_gamma(static_cast<int>(k), cj) * ac[cj] * sa.total_mol_per_L, salt.counterion_count);
        sat = std::max(sat, ip / salt_ksp_at(salt, mixture.temperature_C));
      }
      for (std::size_t t = 0; !salt.counterion_is_system && t < mixture.ions.size(); ++t) {
        const IonAmount& i = mixture.ions[t];
        if (i.id != salt.counterion || i.charge == 0) continue;
        const int zd = salt.drug_charge(i.charge);
        const int j = sys.z0() - zd;
        if (j < 0 || j > n) continue;
        const int sm = salt.drug_count, sn = salt.counterion_count;
        const double gd = mm.species_gamma(-1, j);
        const double gx = mm.ion_gamma(static_cast<int>(t));
        const double ip =
            (sm == 1 && sn == 1)
                ? (gd * gx) * alpha[j] * d.dose_mol_per_L * i.conc_mol_per_L
                : ipow(gd * alpha[j] * d.dose_mol_per_L, sm) * ipow(gx * i.conc_mol_per_L, sn);
        sat = std::max(sat, ip / salt_ksp_at(salt, mixture.temperature_C));
      }
    }
    ds.saturation_ratio = sat;
    r.drug = ds;
  }
  r.mass_residual_rel = mass_res;

  if (mixture.temperature_C < 0.0 || mixture.temperature_C > 60.0) {
    r.warnings.push_back("temperature " + std::to_string(mixture.temperature_C).substr(0, 5) +
                         " C is outside 0-60 C, the validity range of the water and pKa(T) data");
  }
  if (mixture.activity == ActivityModel::kDavies && r.ionic_strength_mol_per_L > 0.5) {
    r.warnings.push_back("ionic strength above 0.5 mol/L: the Davies equation is outside its range");
  }
  if ((mixture.activity == ActivityModel::kSit || mixture.activity == ActivityModel::kTruesdellJones) &&
      r.ionic_strength_mol_per_L > 0.6) {
    r.warnings.push_back("ionic strength above 0.6 mol/L: beyond the range in which the " +
                         model_words(mixture.activity) + " was checked against published buffer tables");
  }
  if (r.drug && r.drug->solid != "none") {
    r.warnings.push_back("the dose does not dissolve completely: solid " + r.drug->solid + " remains");
  }
  // Last guard of "never NaN or infinity in any output": far beyond the Davies range the
  // coefficient of a highly charged species can overflow even where the balances converge.
  bool finite = std::isfinite(r.osmolarity_mOsm_per_L);
  for (const Species& sp : r.species) {
    finite = finite && std::isfinite(sp.conc_mol_per_L) && std::isfinite(sp.activity_coefficient);
  }
  if (r.drug) {
    finite = finite && std::isfinite(r.drug->saturation_ratio) && std::isfinite(r.drug->dissolved_mol_per_L);
  }
  if (!finite) {
    Equilibrium refused;
    refused.termination = Termination::kNumericalFailure;
    refused.temperature_C = mixture.temperature_C;
    refused.evaluations = r.evaluations;
    refused.message = "the activity corrections diverge: at ionic strength " +
                      std::to_string(r.ionic_strength_mol_per_L).substr(0, 5) +
                      " mol/L the " + model_words(mixture.activity) + " is far outside its range (" +
                      (mixture.activity == ActivityModel::kDavies ? "0.5" : "0.6") +
                      " mol/L); the mixture is too concentrated for the model";
    return refused;
  }
  r.termination = Termination::kConverged;
  r.message = "converged";
  return r;
}

double van_slyke_capacity(const Mixture& mixture, double pH) {
  Mixture ideal = mixture;
  ideal.activity = ActivityModel::kIdeal;
  EquilibriumModel m(ideal);
  const double h = std::pow(10.0, -pH);
  double beta = h + m.kw() / h;
  double alpha[kMaxPka + 1];
  for (int k = 0; k < m.num_systems(); ++k) {
    m.fractions(k, pH, alpha);
    double s1 = 0, s2 = 0;
    for (int j = 0; j <= static_cast<int>(mixture.systems[k].system.pkas.size()); ++j) {
      s1 += j * alpha[j];
      s2 += j * j * alpha[j];
    }
    beta += mixture.systems[k].total_mol_per_L * (s2 - s1 * s1);
  }
  if (mixture.drug) {
    m.fractions(-1, pH, alpha);
    double s1 = 0, s2 = 0;
    for (int j = 0; j <= static_cast<int>(mixture.drug->compound.system.pkas.size()); ++j) {
      s1 += j * alpha[j];
      s2 += j * j * alpha[j];
    }
    beta += mixture.drug->dose_mol_per_L * (s2 - s1 * s1);
  }
  return kLn10 * beta;
}

double buffer_capacity(const Mixture& mixture, const SolverOptions& options) {
  EquilibriumModel m0(mixture);
  const StateSummary s0 = m0.solve(options);
  const double delta = std::max(1e-5 * van_slyke_capacity(mixture, s0.pH), 1e-13);
  auto ph_with = [&](double added_base) {
    Mixture m = mixture;
    m.add_ion("(added strong base)", +1, 0.0);
    m.ions.back().conc_mol_per_L = added_base;  // a negative amount is added acid
    EquilibriumModel model(m);
    return model.solve(options, s0.pH).pH;
  };
  const double up = ph_with(delta);
  const double down = ph_with(-delta);
  return 2.0 * delta / (up - down);
}

double form_molar_mass(const Compound& compound, const std::string& form, const Library& library) {
  if (form.empty() || form == "free") return compound.molar_mass_g_per_mol;
  const Salt* s = compound.salt(form);
  if (!s) {
    std::string known;
    for (const Salt& x : compound.salts) known += ", " + x.id;
    throw InputError("compound '" + compound.id + "' has no salt '" + form + "' (forms: free" + known + ")");
  }
  return salt_molar_mass(compound, *s, library);
}

double salt_molar_mass(const Compound& compound, const Salt& salt, const Library& library) {
  const Salt* s = &salt;
  if (s->molar_mass_g_per_mol > 0) return s->molar_mass_g_per_mol;
  if (s->counterion_is_system) {
    // Proton transfer from the counterion's neutral parent (maleic acid, tromethamine) to the
    // drug: m free form + n parent, the parent being the library reagent that gives the system
    // alone (m z_drug + n z_counterion = 0, so the protons balance).
    for (const auto& [id, r] : library.reagents) {
      if (r.gives.size() == 1 && r.gives[0].kind == Contribution::Kind::kSystem &&
          r.gives[0].id == s->counterion && r.gives[0].count == 1.0 && r.molar_mass_g_per_mol > 0) {
        const AcidBaseSystem& sys = library.system(s->counterion);
        if (sys.neutral_index() < 0 || compound.system.permanent_charge != 0) break;
        return s->drug_count * compound.molar_mass_g_per_mol +
               s->counterion_count * r.molar_mass_g_per_mol;
      }
    }
    throw InputError(s->where, "salt '" + s->id + "': give its molar-mass (no library reagent is the "
                               "neutral parent of the counterion system '" + s->counterion + "')");
  }
  const Ion& ion = library.ion(s->counterion);
  const double h = molar_mass_g_per_mol("H");
  // BH+ X-: free base + H + X; M+ A-: free acid - H + M.
  if (s->drug_count == 1 && s->counterion_count == 1 && (ion.charge == 1 || ion.charge == -1)) {
    return compound.molar_mass_g_per_mol + ion.molar_mass_g_per_mol + (ion.charge < 0 ? h : -h);
  }
  // (B H_z)_m X_n: m (free form + z H) + n X, z the drug's charge in the salt.
  const int zd = s->drug_charge(ion.charge);
  return s->drug_count * (compound.molar_mass_g_per_mol + zd * h) +
         s->counterion_count * ion.molar_mass_g_per_mol;
}

void resolve_salt_ksp(Compound& compound, const Library& library) {
  for (Salt& salt : compound.salts) {
    if (salt.ksp || !salt.solubility_in_water_mol_per_L) continue;
    const int zc = counterion_charge_of(salt, library);
    Mixture m;
    m.temperature_C = salt.ref_temperature_C;
    const double s = *salt.solubility_in_water_mol_per_L;  // formula units
    const int sm = salt.drug_count, sn = salt.counterion_count;
    DrugAmount d;
    d.compound = compound;
    d.compound.salts.clear();
    d.dose_mol_per_L = sm == 1 ? s : sm * s;
    d.form = salt.id;
    d.allow_solids = false;
    m.drug = d;
    if (salt.counterion_is_system) {
      m.add_system(library.system(salt.counterion), sn == 1 ? s : sn * s);
    } else {
      const Ion& ion = library.ion(salt.counterion);
      m.add_ion(ion.id, ion.charge, sn == 1 ? s : sn * s);
    }
    const Equilibrium e = solve(m);
    if (!e.usable()) {
      throw InputError(salt.where, "salt '" + salt.id + "': could not solve its solution in water");
    }
    const int zd = salt.drug_charge(zc);
    const int j = compound.system.z0() - zd;
    if (j < 0 || j > static_cast<int>(compound.system.pkas.size())) {
      throw InputError(salt.where, "salt '" + salt.id + "': the compound has no species of charge " +
                                       std::to_string(zd) + " to pair " + salt.stoichiometry() +
                                       " with " + salt.counterion);
    }
    if (compound.has_intrinsic_solubility && compound.system.neutral_index() >= 0 &&
        e.drug->neutral_mol_per_L > compound.s0_at(m.temperature_C)) {
      throw InputError(salt.where, "salt '" + salt.id + "' would disproportionate in water: at its own pH " +
                                       fixed(e.pH, 2) + " the free form exceeds its intrinsic solubility; "
                                       "give ksp instead of solubility-in-water");
    }
    // The counterion's concentration: all of it for a strong ion, the one species of a system.
    double x = sn * s;
    if (salt.counterion_is_system) {
      x = 0.0;
      for (const Species& sp : e.species) {
        if (sp.system == salt.counterion && sp.charge == zc) x = sp.conc_mol_per_L;
      }
    }
    if (sm == 1 && sn == 1 && !salt.counterion_is_system) {
      const double g = davies_gamma(1, e.ionic_strength_mol_per_L, m.temperature_C);
      const double ion_conc = s * e.drug->fractions[j];
      salt.ksp = g * g * ion_conc * s;
    } else {
      const double gd = davies_gamma(zd, e.ionic_strength_mol_per_L, m.temperature_C);
      const double gx = davies_gamma(zc, e.ionic_strength_mol_per_L, m.temperature_C);
      salt.ksp = ipow(gd * sm * s * e.drug->fractions[j], sm) *
                 (salt.counterion_is_system ? ipow(gx * x, sn) : ipow(gx * sn * s, sn));
    }
  }
}

}  // namespace pkarta
