// The equilibrium model's solids: which of the free form and the salts are present at a trial pH
// (active sets by the phase rule) and the drug's partition between solution and solids.
#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "equilibrium_internal.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/water.h"

namespace pkarta {

using equilibrium_detail::kEps;
using equilibrium_detail::kMaxComp;
using equilibrium_detail::ipow;
using equilibrium_detail::solve_dense;
using equilibrium_detail::zero_augmented;

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
      const double limit = salt_limited_solubility(kq[k], p.m, p.n, alpha[p.species], x);
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
  // Small cases by hand over the drug (d) and one counterion (x): a lone salt, or two solids
  // (the free form and a salt, or two salts of one counterion).
  int present[2], np = 0;
  for (int j = 0; j < static_cast<int>(salts_.size()); ++j) {
    if (!p.solids.has_salt(salts_[j].index)) continue;
    if (np == 2) {
      np = 3;
      break;
    }
    present[np++] = j;
  }
  const int nsolid = np + (p.solids.free ? 1 : 0);
  if (np >= 1 && np <= 2 && nsolid <= 2 && (np == 1 || salts_[present[0]].comp == salts_[present[1]].comp)) {
    const int comp = salts_[present[0]].comp;
    double left = component_total(comp);
    for (int j = 0; j < static_cast<int>(salts_.size()); ++j) {
      if (salts_[j].comp == comp) left -= salts_[j].n * p.salt_solid[j];
    }
    if (!(p.dissolved > 0) || !(left > 0)) return false;
    // Row of each solid: nu = (m, n), dlogk; the free form (1, 0), zb.
    double rm[2], rn[2], dlogk[2], zq[2] = {}, var[2] = {};
    int r = 0;
    if (p.solids.free) {
      rm[r] = 1.0;
      rn[r] = 0.0;
      dlogk[r++] = zb;
    }
    for (int t = 0; t < np; ++t, ++r) {
      const SaltPhase& s = salts_[present[t]];
      rm[r] = s.m;
      rn[r] = s.n;
      dlogk[r] = -s.m * (s.zd - zb);
      zq[r] = s.zx;
      if (s.sys >= 0) {
        double al[kMaxPka + 1], szb, sz2;
        moments(systems_[s.sys], h, al, &szb, &sz2);
        zq[r] = szb;
        var[r] = sz2 - szb * szb;
        dlogk[r] -= s.n * (s.zx - szb);
      }
    }
    const double d = p.dissolved;
    double dmu_d, dlam[2] = {};
    if (nsolid == 1) {
      // d dmu_d + m dlam = 0, x dmu_x + n dlam = 0, m dmu_d + n dmu_x = dlogk.
      dlam[0] = -dlogk[0] / (rm[0] * rm[0] / d + rn[0] * rn[0] / left);
      dmu_d = -rm[0] * dlam[0] / d;
    } else {
      // As many solids as components: nu dmu = dlogk fixes dmu, nu^T dlam = -c dmu the rest.
      const double det = rm[0] * rn[1] - rm[1] * rn[0];
      if (!(std::fabs(det) > 1e-300)) return false;
      dmu_d = (dlogk[0] * rn[1] - dlogk[1] * rn[0]) / det;
      const double dmu_x = (rm[0] * dlogk[1] - rm[1] * dlogk[0]) / det;
      const double bd = -d * dmu_d, bx = -left * dmu_x;
      dlam[0] = (bd * rn[1] - bx * rm[1]) / det;
      dlam[1] = (rm[0] * bx - rn[0] * bd) / det;
    }
    double g = d * (dmu_d * zb + (z2 - zb * zb));
    const int first_salt = p.solids.free ? 1 : 0;
    for (int t = 0; t < np; ++t) {
      const int rr = first_salt + t;
      g -= rn[rr] * dlam[rr] * zq[rr] + rn[rr] * p.salt_solid[present[t]] * var[rr];
    }
    if (!std::isfinite(g)) return false;
    *slope = g;
    return true;
  }
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
  double a[2 * kMaxComp][2 * kMaxComp + 1];
  zero_augmented(dim, a);
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
  // Totals (the dose, then each counterion's) and the dissolved amounts, copied whole (a fixed
  // size: no call to copy two or three numbers).
  double total[kMaxComp], x[kMaxComp];
  std::copy_n(comp_total_.data(), kMaxComp, total);
  total[0] = dose;
  std::copy_n(total, kMaxComp, x);
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
  } else if (single >= 0 && !with_free) {
    // A lone m:n salt: one unknown. The product fixes m ln d + n ln x = L (L = ln kq
    // - m ln alpha), and the mass balances d + m s = dose, x + n s = X leave n d - m x = E with
    // E = n dose - m X. Unknown w: ln x where the drug is in excess (E > 0, d = (E + m x)/n),
    // else ln d (x = (n d - E)/m), so the other amount is a sum of positive terms. Then
    // psi(w) = a w + b ln y - L = 0 with y = (c e^w + e0)/q is convex and increasing, its slope
    // between a and a + b: Newton's iterates lie above the root after the first step and fall
    // to it monotonically.
    const SaltPhase& s = salts_[single];
    const double xt = total[s.comp];
    if (!(xt > 0)) return false;
    const double m = s.m, n = s.n;
    // The salt precipitates (s > 0) only from a supersaturated fully dissolved state.
    const double k_drug = kq[single] / ipow(alpha[s.species], s.m);  // K = d^m x^n
    if (!(ipow(dose, s.m) * ipow(xt, s.n) > k_drug)) return false;
    const double excess = n * dose - m * xt;
    const bool drug_excess = excess > 0;
    const double a = drug_excess ? n : m, b = drug_excess ? m : n;
    const int ai = drug_excess ? s.n : s.m, bi = drug_excess ? s.m : s.n;
    const double e0 = drug_excess ? excess : -excess, q = a;
    const double c = b;
    // Newton's error after a step of length t is at most psi''/(2 psi') t^2 <= b/(8a) t^2
    // (psi'' <= b/4, psi' >= a): a step below `tiny` leaves an error below 1e-17 in w.
    const double tiny = std::sqrt(8e-17 * a / b);
    // Warm start from this salt's last solution: Newton on the product itself, P^a y^b = K in
    // P = e^w (increasing and convex in P as well), which needs no logarithm or exponential;
    // the step test is the same on the relative step. Cold, or where that fails: in w.
    double primary = lone_warm_[single];
    bool converged = false;
    for (int it = 0; it < 20 && primary > 0; ++it) {
      const double cp = c * primary;
      const double g = ipow(primary, ai) * ipow((cp + e0) / q, bi);
      const double rel = -(1.0 - k_drug / g) / (a + b * cp / (cp + e0));
      if (!std::isfinite(rel) || !(rel > -1.0)) break;
      primary *= 1.0 + rel;
      if (std::fabs(rel) <= tiny) {
        converged = true;
        break;
      }
    }
    if (!converged) {
      const double big_l = std::log(k_drug);
      double w;
      if (lone_warm_[single] > 0) {
        w = std::log(lone_warm_[single]);
      } else {
        // The root with e0 dropped (above the root), or with c e^w dropped where that is lower.
        w = (big_l - b * std::log(c / q)) / (a + b);
        if (e0 > 0) w = std::min(w, (big_l - b * std::log(e0 / q)) / a);
      }
      for (int it = 0; it < 100; ++it) {
        const double ce = c * std::exp(w);
        const double f = a * w + b * std::log((ce + e0) / q) - big_l;
        const double step = -f / (a + b * ce / (ce + e0));
        if (!std::isfinite(step)) return false;
        w += step;
        if (std::fabs(step) <= tiny) {
          converged = true;
          break;
        }
      }
      if (!converged) return false;
      primary = std::exp(w);
    }
    const double other = (c * primary + e0) / q;
    const double dd = drug_excess ? other : primary, xx = drug_excess ? primary : other;
    // The precipitate from the balance that cancels less.
    const double precip = dd / dose <= xx / xt ? (dose - dd) / m : (xt - xx) / n;
    if (!(precip >= 0)) return false;
    d = dd;
    p.salt_solid[single] = precip;
    p.salt_drug = m * precip;
    x[s.comp] = xx;
    lone_warm_[single] = primary;  // E, and so the unknown's kind, is fixed per model
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
    double nu[kMaxComp][kMaxComp];
    for (int r = 0; r <= static_cast<int>(salts_.size()); ++r) std::fill(nu[r], nu[r] + ncl, 0.0);
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
    }
    // As many solids as components (the phase rule's limit): the solubility products alone fix
    // the potentials, nu mu = logk, and the mass balances the solid amounts, nu^T lam = T - c.
    const int dim = ncl + ns;
    bool converged = false;
    double direct_c[kMaxComp];  // e^mu of the direct solve, kept
    if (ns == ncl) {
      double a[2 * kMaxComp][2 * kMaxComp + 1];
      zero_augmented(ncl, a);
      double sol[2 * kMaxComp];
      for (int r = 0; r < ns; ++r) {
        for (int l = 0; l < ncl; ++l) a[r][l] = nu[r][l];
        a[r][ncl] = logk[r];
      }
      if (!solve_dense(ncl, a, sol)) return false;
      for (int l = 0; l < ncl; ++l) {
        mu[l] = sol[l];
        direct_c[l] = std::exp(mu[l]);
      }
      for (int l = 0; l < ncl; ++l) {
        for (int r = 0; r < ns; ++r) a[l][r] = nu[r][l];
        a[l][ns] = tot[l] - direct_c[l];
      }
      if (!solve_dense(ns, a, lam)) return false;
      converged = true;
    } else {
      for (int l = 0; l < ncl; ++l) mu[l] = std::log(tot[l]);
    }
    // Warm start from the last solution of the same active set (the previous evaluation).
    if (!converged && subset == warm_subset_) {
      for (int l = 0; l < ncl; ++l) mu[l] = std::min(warm_mu_[l], mu[l] + 1.0);
    }
    for (int it = 0; it < 60 && !converged; ++it) {
      double a[2 * kMaxComp][2 * kMaxComp + 1];
      zero_augmented(dim, a);
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
    if (ns == ncl) {
      d = direct_c[0];
      for (int l = 1; l < ncl; ++l) x[comps[l]] = direct_c[l];
    } else {
      d = std::exp(mu[0]);
      for (int l = 1; l < ncl; ++l) x[comps[l]] = std::exp(mu[l]);
    }
    if (ns != ncl && undersaturated_except(subset, alpha, kq, d, x, kEps)) {
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
  double x[kMaxComp], kq[kMaxSalts] = {};
  std::copy_n(comp_total_.data(), kMaxComp, x);
  x[0] = dose;
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


}  // namespace pkarta
