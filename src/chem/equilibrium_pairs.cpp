// The ion-pair activity model's part of the equilibrium model (docs/model.md, "Activities"):
// the metals and systems with pairs, their constants at the current ionic strength, the metal
// mass balances solved at each pH, and the pairs' share of the charge balance.
#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "equilibrium_internal.h"
#include "pkarta/chem/water.h"

namespace pkarta {

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

// The ion-pair model's share of the charge balance (docs/model.md, "Activities"): the systems
// with pairs, at the free metals of their mass balances at h, and the hydroxo complexes. Each
// system counts at its ligand charges (a pair's metal is in the metal's total), so a pair
// changes the charge balance only through the distribution; it changes I by 2 z_M z_L c and
// takes one particle. The slope is that at fixed free metals plus E . dm/dln h, where
// E_a = d(charge)/dm_a = sum_p T_p sum_j K'_aj beta_j/S_p (z_j - zbar_p) - K_OH' [OH-] is also
// dF_a/dln h over m_a, so dm/dln h = -J^-1 (m E).
void EquilibriumModel::evaluate_pairs(double pH, double h, double oh, double* charge, double* dsum,
                                      double* abs_sum, double* i2, double* osm) const {
  PairWork w;
  solve_pairs(pH, h, oh, &w);
  const int na = static_cast<int>(pair_metals_.size());
  const int np = static_cast<int>(pair_systems_.size());
  double e[kMaxPairMetals];
  double g[kMaxPairMetals][kMaxPairSystems];
  for (int r = 0; r < na; ++r) {
    e[r] = 0.0;
    for (int p = 0; p < np; ++p) g[r][p] = 0.0;
  }
  for (int p = 0; p < np; ++p) {
    const PairSystem& ps = pair_systems_[p];
    const Sys& s = systems_[ps.sys];
    const double total = s.total;
    double zb = 0.0, z2 = 0.0, za = 0.0;
    for (int j = 0; j <= s.n; ++j) {
      const double z = s.z0 - j;
      zb += z * w.w[p][j];  // NOLINT(clang-analyzer-core.UndefinedBinaryOperatorResult): solve_pairs fills j <= n
      z2 += z * z * w.w[p][j];
      za += std::fabs(z) * w.w[p][j];
    }
    *charge += total * zb;
    *dsum += total * (z2 - zb * zb);
    *abs_sum += total * za;
    *i2 += total * z2;
    *osm += total;
    // The pairs of each metal with this system, from the dense table of K' (0: no pair):
    // c_aj = T K'_aj bs_j m_a.
    for (int a = 0; a < na; ++a) {
      const int zm = pair_metals_[a].z;
      const double* k = ps.k_eff[a].data();
      double gsum = 0.0, hsum = 0.0, asum = 0.0;
      for (int j = 0; j <= s.n; ++j) {
        const double kb = k[j] * w.beta_s[p][j];  // NOLINT(clang-analyzer-core.UndefinedBinaryOperatorResult): as above
        const int zl = s.z0 - j;
        gsum += kb;
        hsum += kb * zl;
        asum += kb * (std::abs(zm) + std::abs(zl) - std::abs(zm + zl));
      }
      const double tm = total * w.m[a];  // NOLINT(clang-analyzer-core.UndefinedBinaryOperatorResult): solve_pairs sets m
      g[a][p] = gsum;
      e[a] += total * (hsum - zb * gsum);
      *i2 += 2.0 * zm * tm * hsum;
      *osm -= tm * gsum;
      *abs_sum -= tm * asum;
    }
  }
  for (int r = 0; r < na; ++r) {
    const PairMetal& pm = pair_metals_[r];
    const double koh = pm.k_oh_eff * w.oh;
    const double c_oh = w.m[r] * koh;  // NOLINT(clang-analyzer-core.UndefinedBinaryOperatorResult): MOH, its OH- not in [OH-]
    *charge -= c_oh;
    *dsum += c_oh;
    *abs_sum -= c_oh;
    *i2 += (1.0 - 2.0 * pm.z) * c_oh;
    e[r] -= koh;
  }
  double x[kMaxPairMetals];
  bool have_x = false;
  if (na == 1 && w.inv_jacobian != 0.0) {
    // One metal: J is the Newton derivative of the last step (at m within 1e-8 of the total).
    x[0] = w.m[0] * e[0] * w.inv_jacobian;
    have_x = true;
  } else {
    double a[2 * equilibrium_detail::kMaxComp][2 * equilibrium_detail::kMaxComp + 1];
    for (int r = 0; r < na; ++r) {
      double diag = 1.0 + pair_metals_[r].k_oh_eff * w.oh;
      for (int p = 0; p < np; ++p) diag += pair_systems_[p].total * g[r][p];
      for (int c = 0; c < na; ++c) {
        double off = 0.0;
        for (int p = 0; p < np; ++p) off += pair_systems_[p].total * g[r][p] * g[c][p];
        a[r][c] = (r == c ? diag : 0.0) - w.m[r] * off;
      }
      a[r][na] = w.m[r] * e[r];
    }
    have_x = equilibrium_detail::solve_dense(na, a, x);
  }
  if (have_x) {
    for (int r = 0; r < na; ++r) {
      *dsum -= e[r] * x[r];
      free_metal_slope_[r] = kLn10 * x[r];  // dm/dpH = -ln10 dm/dln h = ln10 x
    }
  }
}

}  // namespace pkarta
