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

// The ion-pair model (docs/model.md, "Activities"): every strong cation of the mixture with a
// hydroxo complex or a pair with a species of a system present becomes a metal of the pair
// mass balances; every system with a pair gets its terms.
void EquilibriumModel::prepare_ion_pairs(const Mixture& m) {
  auto metal_index = [&](int t) {
    for (std::size_t a = 0; a < pair_metals_.size(); ++a) {
      if (pair_metals_[a].ion == t) return static_cast<int>(a);
    }
    if (static_cast<int>(pair_metals_.size()) >= kMaxPairMetals) {
      throw InputError("more than " + std::to_string(kMaxPairMetals) +
                       " metal ions form ion pairs; the ion-pair model supports that many");
    }
    PairMetal pm;
    pm.ion = t;
    pm.z = ions_[t].charge;
    pair_metals_.push_back(pm);
    return static_cast<int>(pair_metals_.size()) - 1;
  };
  for (std::size_t t = 0; t < ions_.size(); ++t) {
    if (ions_[t].charge <= 0 || !(ions_[t].conc > 0)) continue;
    const std::optional<HydroxoComplex> hc = hydroxo_complex(m.ions[t].id, ions_[t].charge);
    if (hc) pair_metals_[metal_index(static_cast<int>(t))].k_oh = hc->k_at(temperature_C_);
  }
  sys_pair_.assign(systems_.size(), -1);
  for (std::size_t k = 0; k < systems_.size(); ++k) {
    if (!(systems_[k].total > 0)) continue;
    PairSystem ps;
    ps.sys = static_cast<int>(k);
    ps.n = systems_[k].n;
    ps.total = systems_[k].total;
    for (int j = 0; j <= systems_[k].n; ++j) {
      const int zl = systems_[k].z0 - j;
      if (zl >= 0) continue;
      for (std::size_t t = 0; t < ions_.size(); ++t) {
        if (ions_[t].charge <= 0 || !(ions_[t].conc > 0)) continue;
        const std::optional<AssociationConstant> c =
            ion_pair_constant(m.ions[t].id, ions_[t].charge, m.systems[k].system.id, zl);
        if (!c) continue;
        PairTerm term;
        term.metal = metal_index(static_cast<int>(t));
        term.j = j;
        term.zl = zl;
        term.k = c->k_at(temperature_C_);
        ps.terms.push_back(term);
      }
    }
    if (ps.terms.empty()) continue;
    if (static_cast<int>(pair_systems_.size()) >= kMaxPairSystems) {
      throw InputError("more than " + std::to_string(kMaxPairSystems) +
                       " acid-base systems form ion pairs; the ion-pair model supports that many");
    }
    sys_pair_[k] = static_cast<int>(pair_systems_.size());
    pair_systems_.push_back(std::move(ps));
  }
  for (std::size_t a = 0; a < pair_metals_.size(); ++a) free_metal_[a] = ions_[pair_metals_[a].ion].conc;
}

void EquilibriumModel::update_pair_constants() {
  for (PairMetal& a : pair_metals_) a.k_oh_eff = a.k_oh * gamma(a.z) * gamma(-1) / gamma(a.z - 1);
  for (PairSystem& ps : pair_systems_) {
    for (PairTerm& t : ps.terms) {
      const int z = pair_metals_[t.metal].z;
      t.k_eff = t.k * gamma(z) * gamma(t.zl) / gamma(z + t.zl);
      ps.k_eff[t.metal][t.j] = t.k_eff;
    }
  }
}

// Free metals m_a from the mass balances F_a = m_a (1 + K_OH' [OH-] + sum_p T_p G_ap) - M_a = 0,
// G_ap = sum_j K'_aj beta_j / S_p, S_p = sum_j beta_j P_j, P_j = 1 + sum_a K'_aj m_a, by Newton
// with J_ab = delta_ab (1 + K_OH' [OH-] + sum_p T_p G_ap) - m_a sum_p T_p G_ap G_bp.
void EquilibriumModel::solve_pairs(double pH, double h, double oh, PairWork* out) const {
  const int na = static_cast<int>(pair_metals_.size());
  const int np = static_cast<int>(pair_systems_.size());
  out->oh = oh;
  out->inv_jacobian = 0.0;
  const double inv_h = 1.0 / h;
  double beta[kMaxPairSystems][kMaxPka + 1];  // rows 0..n filled for each system (n as the system's)
  for (int p = 0; p < np; ++p) {
    const Sys& s = systems_[pair_systems_[p].sys];
    double b = 1.0;
    beta[p][0] = 1.0;
    for (int i = 0; i < s.n; ++i) {
      b *= s.ka_eff[i] * inv_h;
      beta[p][i + 1] = b;
    }
  }
  double m[kMaxPairMetals] = {}, total[kMaxPairMetals] = {}, diag0[kMaxPairMetals] = {};
  for (int a = 0; a < na; ++a) {
    total[a] = ions_[pair_metals_[a].ion].conc;
    diag0[a] = 1.0 + pair_metals_[a].k_oh_eff * oh;
    const double guess = free_metal_[a] + free_metal_slope_[a] * (pH - free_metal_pH_);
    m[a] = guess > 0 && guess <= total[a] ? guess
           : free_metal_[a] > 0 && free_metal_[a] <= total[a] ? free_metal_[a] : total[a];
  }
  free_metal_pH_ = pH;
  // The weights at m: per system the fractions w and free shares bs, and G_ap.
  double (&w)[kMaxPairSystems][kMaxPka + 1] = out->w;
  double (&bs)[kMaxPairSystems][kMaxPka + 1] = out->beta_s;
  double G[kMaxPairMetals][kMaxPairSystems];
  if (na == 1 && np == 1) {
    // One metal and one system (the common case): with S = B0 + B1 m (B0 = sum beta_j,
    // B1 = sum K'_j beta_j) and D = 1 + K'_OH [OH-], the balance m (D + T B1/S) = M is the
    // quadratic D B1 m^2 + (D B0 + (T - M) B1) m - M B0 = 0: its positive root, no iteration.
    const PairSystem& ps = pair_systems_[0];
    const double* k = ps.k_eff[0].data();
    const int n = ps.n;
    double b0 = 0.0, b1 = 0.0;
    for (int j = 0; j <= n; ++j) {
      b0 += beta[0][j];  // NOLINT(clang-analyzer-core.uninitialized.Assign): filled to n above
      b1 += k[j] * beta[0][j];
    }
    const double T = ps.total, M = total[0], D = diag0[0];
    // Multiplied through by B0 (divided by it first where B0 is large, against overflow).
    const double scale = b0 > 1e100 ? 1.0 / b0 : 1.0;
    const double qa = D * b1 * scale, qb = (D * b0 + (T - M) * b1) * scale, qc = M * b0 * scale;
    const double sq = std::sqrt(qb * qb + 4.0 * qa * qc);
    double mm = qb >= 0 ? 2.0 * qc / (qb + sq) : (sq - qb) / (2.0 * qa);
    mm = std::min(mm, M);
    const double inv = 1.0 / (b0 + b1 * mm);
    double g = 0.0;
    for (int j = 0; j <= n; ++j) {
      bs[0][j] = beta[0][j] * inv;
      w[0][j] = bs[0][j] * (1.0 + k[j] * mm);
      g += k[j] * bs[0][j];
    }
    out->inv_jacobian = 1.0 / (D + T * g - mm * T * g * g);
    free_metal_[0] = mm;
    out->m[0] = mm;
    return;
  }
  auto weights = [&]() {
    for (int p = 0; p < np; ++p) {
      const PairSystem& ps = pair_systems_[p];
      const int n = ps.n;
      double P[kMaxPka + 1];
      double sum = 0.0;
      if (na == 1) {  // one metal: P_j = 1 + K'_j m, G = sum_j K'_j bs_j
        const double* k = ps.k_eff[0].data();
        for (int j = 0; j <= n; ++j) {
          P[j] = 1.0 + k[j] * m[0];
          sum += beta[p][j] * P[j];
        }
        const double inv = 1.0 / sum;
        double g = 0.0;
        for (int j = 0; j <= n; ++j) {
          bs[p][j] = beta[p][j] * inv;
          w[p][j] = bs[p][j] * P[j];
          g += k[j] * bs[p][j];
        }
        G[0][p] = g;
        continue;
      }
      for (int j = 0; j <= n; ++j) {
        double pj = 1.0;
        for (int a = 0; a < na; ++a) pj += ps.k_eff[a][j] * m[a];
        P[j] = pj;
        sum += beta[p][j] * pj;  // NOLINT(clang-analyzer-core.UndefinedBinaryOperatorResult): filled to n above
      }
      const double inv = 1.0 / sum;
      for (int j = 0; j <= n; ++j) {
        bs[p][j] = beta[p][j] * inv;
        w[p][j] = bs[p][j] * P[j];
      }
      for (int a = 0; a < na; ++a) {
        double g = 0.0;
        for (int j = 0; j <= n; ++j) g += ps.k_eff[a][j] * bs[p][j];
        G[a][p] = g;
      }
    }
  };
  // The last step, when it is below kStepTol of the total, is carried into the weights to first
  // order (dw_j/dm_a = K'_aj bs_j - w_j G_a, dbs_j/dm_a = -bs_j G_a) instead of a new pass: what
  // is left after it, of both the metal balance (quadratic convergence) and the weights, is of
  // the order of its square, below rounding.
  constexpr double kStepTol = 1e-8;
  auto carry = [&](const double* dm) {
    for (int p = 0; p < np; ++p) {
      const PairSystem& ps = pair_systems_[p];
      double gd = 0.0;
      for (int a = 0; a < na; ++a) gd += G[a][p] * dm[a];
      for (int j = 0; j <= ps.n; ++j) {
        double kd = 0.0;
        for (int a = 0; a < na; ++a) kd += ps.k_eff[a][j] * dm[a];
        w[p][j] += bs[p][j] * kd - w[p][j] * gd;  // NOLINT(clang-analyzer-core.UndefinedBinaryOperatorResult): set by weights()
        bs[p][j] -= bs[p][j] * gd;
      }
    }
    for (int a = 0; a < na; ++a) m[a] += dm[a];
  };
  bool current = false;  // the weights are those of m
  for (int it = 0; it < 100; ++it) {
    weights();
    double dm[kMaxPairMetals];
    if (na == 1) {  // one metal (the common case): scalar Newton
      double diag = diag0[0], off = 0.0;
      for (int p = 0; p < np; ++p) {
        const double tg = pair_systems_[p].total * G[0][p];
        diag += tg;
        off += tg * G[0][p];
      }
      out->inv_jacobian = 1.0 / (diag - m[0] * off);
      dm[0] = (total[0] - m[0] * diag) * out->inv_jacobian;
    } else {
      double a[2 * equilibrium_detail::kMaxComp][2 * equilibrium_detail::kMaxComp + 1] = {};
      for (int r = 0; r < na; ++r) {
        double diag = diag0[r];
        for (int p = 0; p < np; ++p) diag += pair_systems_[p].total * G[r][p];
        for (int c = 0; c < na; ++c) {
          double off = 0.0;
          for (int p = 0; p < np; ++p) off += pair_systems_[p].total * G[r][p] * G[c][p];
          a[r][c] = (r == c ? diag : 0.0) - m[r] * off;
        }
        a[r][na] = total[r] - m[r] * diag;  // -F
      }
      if (!equilibrium_detail::solve_dense(na, a, dm)) {
        current = true;
        break;
      }
    }
    bool small = true;
    for (int r = 0; r < na; ++r) {
      double next = m[r] + dm[r];
      if (!(next > 0)) next = 0.1 * m[r];
      if (next > total[r]) next = total[r];
      dm[r] = next - m[r];
      if (std::fabs(dm[r]) > kStepTol * total[r]) small = false;
    }
    if (small) {
      carry(dm);
      current = true;
      break;
    }
    for (int r = 0; r < na; ++r) m[r] += dm[r];
  }
  if (!current) weights();
  for (int a = 0; a < na; ++a) {
    free_metal_[a] = m[a];
    out->m[a] = m[a];
  }
}

void EquilibriumModel::ion_pair_state(double pH, std::vector<IonPairSpecies>* pairs,
                                      std::vector<double>* free_ion) const {
  pairs->clear();
  free_ion->resize(ions_.size());
  for (std::size_t t = 0; t < ions_.size(); ++t) (*free_ion)[t] = ions_[t].conc;
  if (pair_metals_.empty()) return;
  PairWork w;
  const double h = std::pow(10.0, -pH);
  solve_pairs(pH, h, kw_ / (h * gamma_oh_), &w);
  for (std::size_t a = 0; a < pair_metals_.size(); ++a) {
    const PairMetal& pm = pair_metals_[a];
    (*free_ion)[pm.ion] = w.m[a];
    if (pm.k_oh > 0) pairs->push_back({pm.ion, -1, -1, pm.z - 1, w.m[a] * pm.k_oh_eff * w.oh});
  }
  for (std::size_t p = 0; p < pair_systems_.size(); ++p) {
    const PairSystem& ps = pair_systems_[p];
    const double total = systems_[ps.sys].total;
    for (const PairTerm& t : ps.terms) {
      const PairMetal& pm = pair_metals_[t.metal];
      pairs->push_back({pm.ion, ps.sys, t.j, pm.z + t.zl,
                        total * t.k_eff * w.beta_s[p][t.j] * w.m[t.metal]});
    }
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
