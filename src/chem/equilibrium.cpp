// The equilibrium model: mixtures, solver options, construction and activity coefficients.
#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "equilibrium_internal.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/water.h"

namespace pkarta {

using equilibrium_detail::kGammaOffset;
using equilibrium_detail::kMaxComp;
using equilibrium_detail::ipow;

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
  for (const IonAmount& i : m.ions) {
    ions_.push_back({i.charge, i.conc_mol_per_L});
    ions_charge_ += i.charge * i.conc_mol_per_L;
    ions_abs_ += std::abs(i.charge) * i.conc_mol_per_L;
    ions_z2_ += i.charge * i.charge * i.conc_mol_per_L;
    ions_n_ += i.conc_mol_per_L;
  }
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
    comp_total_[0] = drug_.total;
    for (int c = 1; c < nc; ++c) {
      comp_total_[c] = comp_sys_[c] >= 0 ? systems_[comp_sys_[c]].total : ions_[comp_ion_[c]].conc;
    }
    // Listed by number of solids, each count in increasing mask order. A lone solid is always
    // independent; larger sets by elimination on their rows.
    double row[kMaxComp][kMaxComp] = {};
    row[0][0] = 1.0;
    for (int k = 0; k < ns; ++k) {
      row[k + 1][0] = salts_[k].m;
      row[k + 1][salts_[k].comp] = salts_[k].n;
    }
    std::uint32_t valid[std::size_t{1} << (kMaxSalts + 1)];
    int valid_count[std::size_t{1} << (kMaxSalts + 1)];
    int nvalid = 0;
    for (std::uint32_t mask = 1; mask < (1u << (ns + 1)); ++mask) {
      if ((mask & 1u) && !free_possible) continue;
      int rows = 0;
      for (std::uint32_t b = mask; b; b &= b - 1) ++rows;
      if (rows > nc) continue;
      if (rows > 1) {
        double a[kMaxComp][kMaxComp];
        int r0 = 0;
        for (int b = 0; b <= ns; ++b) {
          if ((mask >> b) & 1u) std::copy_n(row[b], nc, a[r0++]);
        }
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
        if (rank < rows) continue;
      }
      valid[nvalid] = mask;
      valid_count[nvalid++] = rows;
    }
    for (int want = 1; want <= nc; ++want) {
      for (int v = 0; v < nvalid; ++v) {
        if (valid_count[v] == want) subsets_.push_back(valid[v]);
      }
    }
  }
  per_species_ = m.activity == ActivityModel::kSit || m.activity == ActivityModel::kTruesdellJones;
  if (per_species_) prepare_activity_terms(m);
  ion_pair_model_ = m.activity == ActivityModel::kIonPairs;
  if (ion_pair_model_) prepare_ion_pairs(m);
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
  if (ion_pair_model_) {
    std::vector<IonPairSpecies> pairs;
    std::vector<double> free_ion;
    ion_pair_state(pH, &pairs, &free_ion);
    for (const IonPairSpecies& q : pairs) {
      if (q.ion == ion && q.system < 0) return q.conc_mol_per_L;
    }
    return 0.0;
  }
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
  if (ion_pair_model_) update_pair_constants();
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
  if (system >= 0 && !sys_pair_.empty() && sys_pair_[system] >= 0) {
    // Ion pairs: the fractions of each protonation state, free and paired together.
    PairWork w;
    const double h = std::pow(10.0, -pH);
    solve_pairs(pH, h, kw_ / (h * gamma_oh_), &w);
    const int p = sys_pair_[system];
    for (int j = 0; j <= systems_[system].n; ++j) alpha[j] = w.w[p][j];
    return;
  }
  double zb, z2;
  moments(system < 0 ? drug_ : systems_[system], std::pow(10.0, -pH), alpha, &zb, &z2);
}


}  // namespace pkarta
