#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "pkarta/chem/formula.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {
constexpr int kGammaOffset = 16;  // gamma_ table covers charges -16..+16
constexpr double kPhLow = -3.0;   // bracket of every solve: charge balance > 0 here ...
constexpr double kPhHigh = 17.0;  // ... and < 0 here, for totals up to 10 mol/L
constexpr double kEps = 1e-12;    // relative slack of the phase-consistency checks
// Largest relative charge residual of a returned state (docs/model.md, "Solver"). The bracketed
// solve also stops where the charge balance jumps across zero without a root, which happens
// where no set of solids the model covers (free form and at most one salt) is consistent.
constexpr double kMaxChargeResidual = 1e-10;
}  // namespace

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
    for (const Salt& salt : d.compound.salts) {
      int ion = -1;
      for (std::size_t k = 0; k < m.ions.size(); ++k) {
        if (m.ions[k].id == salt.counterion) ion = static_cast<int>(k);
      }
      if (ion < 0 || !salt.ksp) continue;  // no counterion present: this salt cannot form
      const int zc = m.ions[ion].charge;
      const int j = drug_.z0 + zc;  // species of charge -zc
      if (j < 0 || j > drug_.n || (zc != 1 && zc != -1)) {
        throw InputError("salt '" + salt.id + "' of '" + d.compound.id +
                         "': the compound has no species of charge " + std::to_string(-zc) +
                         " to pair 1:1 with " + salt.counterion);
      }
      SaltPhase p;
      p.ion = ion;
      p.species = j;
      p.ksp = salt_ksp_at(salt, temperature_C_);
      salts_.push_back(p);
    }
  }
  double i0 = 0.0;
  for (const IonC& i : ions_) i0 += 0.5 * i.charge * i.charge * i.conc;
  set_ionic_strength(i0);
}

void EquilibriumModel::set_ionic_strength(double I) {
  ionic_strength_ = I;
  if (ideal_) {
    gamma_.fill(1.0);
  } else {
    // gamma_z = gamma_1^(z^2), built by multiplication: z^2 - (z-1)^2 = 2z - 1.
    const double g1 = std::pow(10.0, -a_davies_ * davies_bracket(I));
    const double g1sq = g1 * g1;
    double g = 1.0, factor = g1;
    gamma_[kGammaOffset] = 1.0;
    for (int z = 1; z <= kGammaOffset; ++z) {
      g *= factor;
      factor *= g1sq;
      gamma_[kGammaOffset + z] = g;
      gamma_[kGammaOffset - z] = g;
    }
  }
  update_effective_constants();
}

double EquilibriumModel::gamma(int charge) const {
  if (charge < -kGammaOffset || charge > kGammaOffset) {
    return ideal_ ? 1.0
                  : std::pow(10.0, -a_davies_ * charge * charge * davies_bracket(ionic_strength_));
  }
  return gamma_[charge + kGammaOffset];
}

void EquilibriumModel::update_effective_constants() {
  auto update = [&](Sys& s) {
    for (int i = 0; i < s.n; ++i) {
      const int z_acid = s.z0 - i;  // charge of the protonated side of step i
      s.ka_eff[i] = s.ka[i] * gamma(z_acid) / gamma(z_acid - 1);
    }
  };
  for (Sys& s : systems_) update(s);
  if (has_drug_) {
    update(drug_);
    for (SaltPhase& p : salts_) p.ksp_eff = p.ksp / (gamma(1) * gamma(-1));
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

EquilibriumModel::Partition EquilibriumModel::partition(const double* alpha, double dose) const {
  Partition p;
  p.dissolved = dose;
  if (!drug_solids_ || !(dose > 0)) return p;
  const bool free_possible = drug_neutral_ >= 0 && std::isfinite(s0_);
  const double an = free_possible ? alpha[drug_neutral_] : 0.0;
  const double sat_free = free_possible ? an * dose / s0_ : 0.0;
  bool any_salt = false;
  for (const SaltPhase& s : salts_) {
    if (alpha[s.species] * dose * ions_[s.ion].conc > s.ksp_eff) any_salt = true;
  }
  if (sat_free <= 1.0 && !any_salt) return p;

  // Are the other salts undersaturated, given the dissolved drug and the counterion left?
  auto salts_ok = [&](double dissolved, int except, int except_ion, double ion_left) {
    for (std::size_t t = 0; t < salts_.size(); ++t) {
      if (static_cast<int>(t) == except) continue;
      const SaltPhase& s = salts_[t];
      const double x = s.ion == except_ion ? ion_left : ions_[s.ion].conc;
      if (alpha[s.species] * dissolved * x > s.ksp_eff * (1.0 + kEps)) return false;
    }
    return true;
  };

  if (sat_free > 1.0) {  // free form only
    const double d = s0_ / an;
    if (salts_ok(d, -1, -1, 0.0)) {
      p.phase = 1;
      p.dissolved = d;
      p.free_solid = dose - d;
      return p;
    }
  }
  for (std::size_t k = 0; k < salts_.size(); ++k) {  // one salt only
    const SaltPhase& s = salts_[k];
    const double x = ions_[s.ion].conc;
    const double a = alpha[s.species];
    const double kq = s.ksp_eff / a;
    const double c = dose * x - kq;
    if (!(c > 0)) continue;
    const double disc = (dose - x) * (dose - x) + 4.0 * kq;
    const double sq = std::sqrt(disc);
    const double precip = 2.0 * c / ((dose + x) + sq);  // smaller root, stable form
    // The dissolved drug solves d^2 + (x - dose) d - kq = 0; its stable form keeps it positive
    // where nearly all the dose precipitates (dose - precip would cancel to below zero).
    const double b = x - dose;
    const double d = b > 0 ? 2.0 * kq / (b + sq) : 0.5 * (sq - b);
    if (free_possible && an * d > s0_ * (1.0 + kEps)) continue;
    if (!salts_ok(d, static_cast<int>(k), s.ion, x - precip)) continue;
    p.phase = 2;
    p.salt = static_cast<int>(k);
    p.dissolved = d;
    p.salt_solid = precip;
    return p;
  }
  if (free_possible) {  // free form and one salt together
    const double d = s0_ / an;
    for (std::size_t k = 0; k < salts_.size(); ++k) {
      const SaltPhase& s = salts_[k];
      const double x_left = s.ksp_eff / (alpha[s.species] * d);
      const double precip = ions_[s.ion].conc - x_left;
      const double free_solid = dose - precip - d;
      if (precip < 0 || free_solid < 0) continue;
      if (!salts_ok(d, static_cast<int>(k), s.ion, x_left)) continue;
      p.phase = 3;
      p.salt = static_cast<int>(k);
      p.dissolved = d;
      p.salt_solid = precip;
      p.free_solid = free_solid;
      return p;
    }
  }
  // Rounding at a phase boundary: fall back on the free form alone, clamped.
  if (free_possible && sat_free > 1.0) {
    p.phase = 1;
    p.dissolved = s0_ / an;
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
    ev.drug = partition(alpha, drug_.total);
    const Partition& p = ev.drug;
    const double d = p.dissolved;
    // Precipitated salt also takes its counterion out of solution.
    const int zc = p.salt >= 0 ? ions_[salts_[p.salt].ion].charge : 0;
    charge += d * zb - zc * p.salt_solid;
    abs_sum += d * za - std::abs(zc) * p.salt_solid;
    i2 += d * z2 - zc * zc * p.salt_solid;
    osm += d - p.salt_solid;
    if (p.phase == 0) {
      dsum += d * (z2 - zb * zb);
    } else if (p.phase == 1) {
      dsum += d * z2;  // c_j = S0 alpha_j/alpha_n grows as h^z_j: d(sum z c)/d ln h = sum z^2 c
    } else {
      // Salt present: differentiate the drug's share numerically (rare branch).
      const double step = 1e-6;
      auto drug_charge = [&](double x) {
        double a2[kMaxPka + 1], zb2, z22;
        moments(drug_, std::pow(10.0, -x), a2, &zb2, &z22);
        const Partition q = partition(a2, drug_.total);
        const int zq = q.salt >= 0 ? ions_[salts_[q.salt].ion].charge : 0;
        return q.dissolved * zb2 - zq * q.salt_solid;
      };
      const double deriv = (drug_charge(pH + step) - drug_charge(pH - step)) / (2 * step);
      dsum += -deriv / kLn10;
    }
  }
  const double g1 = gamma(1);
  const double hc = h / g1;
  const double oh = kw_ / (h * g1);
  charge += hc - oh;
  dsum += hc + oh;
  abs_sum += hc + oh;
  i2 += hc + oh;
  osm += hc + oh;
  ev.charge = charge;
  ev.dcharge_dpH = -kLn10 * dsum;
  ev.abs_sum = abs_sum;
  ev.ionic_strength = 0.5 * i2;
  ev.osmolarity = osm;
  return ev;
}

namespace {
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
  out.pH = x;
  out.ionic_strength_mol_per_L =
      diverged ? std::numeric_limits<double>::infinity() : ionic_strength_;
  out.drug_dissolved_mol_per_L = ev.drug.dissolved;
  out.phase = ev.drug.phase;
  out.salt_index = ev.drug.salt;
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
                  "the Davies equation (the mixture is too concentrated for the model)";
      r.pH = 0.0;
      r.ionic_strength_mol_per_L = 0.0;
    } else if (!(s.charge_residual_rel <= kMaxChargeResidual) &&
               (s.pH <= kPhLow + 1e-6 || s.pH >= kPhHigh - 1e-6)) {
      r.message = "the pH would lie outside " + std::to_string(static_cast<int>(kPhLow)) + " to " +
                  std::to_string(static_cast<int>(kPhHigh)) +
                  " (the mixture is too concentrated for the model)";
    } else if (mixture.drug && mixture.drug->allow_solids && mixture.drug->compound.salts.size() > 1 &&
        !(s.charge_residual_rel <= kMaxChargeResidual)) {
      r.termination = Termination::kNumericalFailure;
      r.message = "no equilibrium with the solids the model covers (the free form and at most one "
                  "salt): more than one salt of '" + mixture.drug->compound.id +
                  "' would precipitate in this mixture";
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
    double sum = 0.0;
    for (int j = 0; j <= static_cast<int>(sa.system.pkas.size()); ++j) {
      const int z = sa.system.charge_of(j);
      const double c = sa.total_mol_per_L * alpha[j];
      sum += c;
      r.species.push_back({sa.system.id + " " + sa.system.species_label(j), sa.system.id, z, c,
                           model.gamma(z)});
    }
    if (sa.total_mol_per_L > 0) {
      mass_res = std::max(mass_res, std::fabs(sum - sa.total_mol_per_L) / sa.total_mol_per_L);
    }
  }
  const EquilibriumModel::Partition& p = ev.drug;
  int precip_ion = -1;
  if (mixture.drug && p.salt >= 0) {
    // Map the model's salt index back to the compound's salt (same order, skipping absent ions).
    int k = -1;
    for (const Salt& salt : mixture.drug->compound.salts) {
      bool present = false;
      for (const IonAmount& i : mixture.ions) present = present || (i.id == salt.counterion);
      if (present && salt.ksp) ++k;
      if (k == p.salt) {
        for (std::size_t t = 0; t < mixture.ions.size(); ++t) {
          if (mixture.ions[t].id == salt.counterion) precip_ion = static_cast<int>(t);
        }
        break;
      }
    }
  }
  for (std::size_t t = 0; t < mixture.ions.size(); ++t) {
    const IonAmount& i = mixture.ions[t];
    // Clamped: a counterion precipitated to exhaustion may round to just below zero.
    const double c = std::max(0.0, i.conc_mol_per_L - (static_cast<int>(t) == precip_ion ? p.salt_solid : 0.0));
    r.species.push_back({i.id, "", i.charge, c, model.gamma(i.charge)});
  }
  const double h = std::pow(10.0, -s.pH);
  r.species.push_back({"H+", "", 1, h / model.gamma(1), model.gamma(1)});
  r.species.push_back({"OH-", "", -1, model.kw() / (h * model.gamma(1)), model.gamma(1)});

  if (mixture.drug) {
    const DrugAmount& d = *mixture.drug;
    const AcidBaseSystem& sys = d.compound.system;
    DrugState ds;
    ds.dose_mol_per_L = d.dose_mol_per_L;
    ds.dissolved_mol_per_L = p.dissolved;
    ds.dissolved_mg_per_mL = p.dissolved * d.compound.molar_mass_g_per_mol;
    ds.free_solid_mol_per_L = p.free_solid;
    ds.salt_solid_mol_per_L = p.salt_solid;
    model.fractions(-1, s.pH, alpha);
    const int n = static_cast<int>(sys.pkas.size());
    ds.fractions.assign(alpha, alpha + n + 1);
    const int jn = sys.neutral_index();
    ds.neutral_mol_per_L = jn >= 0 ? alpha[jn] * p.dissolved : 0.0;
    for (int j = 0; j <= n; ++j) {
      const int z = sys.charge_of(j);
      r.species.push_back({d.compound.id + " " + sys.species_label(j), d.compound.id, z,
                           p.dissolved * alpha[j], model.gamma(z)});
    }
    std::string salt_id;
    if (precip_ion >= 0) {
      for (const Salt& salt : d.compound.salts) {
        if (salt.counterion == mixture.ions[precip_ion].id) salt_id = salt.id;
      }
    }
    switch (p.phase) {
      case 0: ds.solid = "none"; break;
      case 1: ds.solid = "free"; break;
      case 2: ds.solid = salt_id; break;
      default: ds.solid = "free+" + salt_id; break;
    }
    const double mass = p.dissolved + p.free_solid + p.salt_solid;
    if (d.dose_mol_per_L > 0) {
      mass_res = std::max(mass_res, std::fabs(mass - d.dose_mol_per_L) / d.dose_mol_per_L);
    }
    // Saturation ratio with the whole dose dissolved.
    Mixture all = mixture;
    all.drug->allow_solids = false;
    EquilibriumModel m2(all);
    StateSummary s2 = p.phase == 0 ? s : m2.solve(options, s.pH);
    // When the fully dissolved state itself cannot be solved (e.g. its activity corrections
    // diverge), estimate the ratio at the equilibrium state instead, and say so.
    const bool dissolved_state = p.phase != 0 && s2.converged;
    if (p.phase != 0 && !s2.converged) {
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
    const double g1sq = mm.gamma(1) * mm.gamma(-1);
    for (const Salt& salt : d.compound.salts) {
      if (!salt.ksp) continue;
      for (const IonAmount& i : mixture.ions) {
        if (i.id != salt.counterion || (i.charge != 1 && i.charge != -1)) continue;
        const int j = sys.z0() + i.charge;
        if (j < 0 || j > n) continue;
        const double ip = g1sq * alpha[j] * d.dose_mol_per_L * i.conc_mol_per_L;
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
                      " mol/L the Davies equation is far outside its range (0.5 mol/L); the "
                      "mixture is too concentrated for the model";
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
  if (s->molar_mass_g_per_mol > 0) return s->molar_mass_g_per_mol;
  const Ion& ion = library.ion(s->counterion);
  const double h = molar_mass_g_per_mol("H");
  // BH+ X-: free base + H + X; M+ A-: free acid - H + M.
  return compound.molar_mass_g_per_mol + ion.molar_mass_g_per_mol + (ion.charge < 0 ? h : -h);
}

void resolve_salt_ksp(Compound& compound, const Library& library) {
  for (Salt& salt : compound.salts) {
    if (salt.ksp || !salt.solubility_in_water_mol_per_L) continue;
    const Ion& ion = library.ion(salt.counterion);
    Mixture m;
    m.temperature_C = salt.ref_temperature_C;
    const double s = *salt.solubility_in_water_mol_per_L;
    DrugAmount d;
    d.compound = compound;
    d.compound.salts.clear();
    d.dose_mol_per_L = s;
    d.form = salt.id;
    d.allow_solids = false;
    m.drug = d;
    m.add_ion(ion.id, ion.charge, s);
    const Equilibrium e = solve(m);
    if (!e.usable()) {
      throw InputError(salt.where, "salt '" + salt.id + "': could not solve its solution in water");
    }
    const int j = compound.system.z0() + ion.charge;
    if (j < 0 || j > static_cast<int>(compound.system.pkas.size())) {
      throw InputError(salt.where, "salt '" + salt.id + "': the compound has no species of charge " +
                                       std::to_string(-ion.charge) + " to pair 1:1 with " + ion.id);
    }
    const double g = davies_gamma(1, e.ionic_strength_mol_per_L, m.temperature_C);
    const double ion_conc = s * e.drug->fractions[j];
    if (compound.has_intrinsic_solubility && compound.system.neutral_index() >= 0 &&
        e.drug->neutral_mol_per_L > compound.s0_at(m.temperature_C)) {
      char buf[160];
      std::snprintf(buf, sizeof buf,
                    "salt '%s' would disproportionate in water: at its own pH %.2f the free form "
                    "exceeds its intrinsic solubility; give ksp instead of solubility-in-water",
                    salt.id.c_str(), e.pH);
      throw InputError(salt.where, buf);
    }
    salt.ksp = g * g * ion_conc * s;
  }
}

}  // namespace pkarta
