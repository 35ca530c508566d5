// The equilibrium model's charge balance, its solution in pH and ionic strength, the full state
// with species and warnings, and buffer capacity.
#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "equilibrium_internal.h"
#include "pkarta/base/limits.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/water.h"

namespace pkarta {

using equilibrium_detail::kPhLow;
using equilibrium_detail::kPhHigh;
using equilibrium_detail::kMaxChargeResidual;
using equilibrium_detail::kMaxMassResidual;
using equilibrium_detail::ipow;

namespace {
// With activity corrections, the pH solved at the strong ions' I only starts the iteration on
// I: it is solved to this relative step. Each pH solved at an intermediate I ends at a Newton
// step below kStepShare times the distance moved at that I (quadratic convergence puts the pH
// then far closer than the next change of I moves it); the last I is always solved to the
// full tolerance.
constexpr double kFirstPhTolerance = 1e-4;
constexpr double kStepShare = 1e-3;
}  // namespace

EquilibriumModel::Evaluation EquilibriumModel::evaluate(double pH) const {
  Evaluation ev;
  const double h = std::pow(10.0, -pH);
  double alpha[kMaxPka + 1];
  // The strong ions' sums are fixed with the model.
  double charge = ions_charge_, dsum = 0.0, abs_sum = ions_abs_, i2 = ions_z2_, osm = ions_n_;
  for (std::size_t k = 0; k < systems_.size(); ++k) {
    if (!sys_pair_.empty() && sys_pair_[k] >= 0) continue;  // below, with its ion pairs
    const Sys& s = systems_[k];
    double zb, z2;
    const double za = moments(s, h, alpha, &zb, &z2);
    charge += s.total * zb;
    dsum += s.total * (z2 - zb * zb);
    abs_sum += s.total * za;
    i2 += s.total * z2;
    osm += s.total;
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
  if (!pair_metals_.empty()) {
    evaluate_pairs(pH, h, oh, &charge, &dsum, &abs_sum, &i2, &osm);
    charge += hc - oh;
    dsum += hc + oh;
    abs_sum += hc + oh;
    i2 += hc + oh;
  } else if (pairs_.empty()) {
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
// `stop_tol` (>= tol) ends the iteration at an evaluated point whose Newton step is below it,
// and so does a step below `stop_share` times the distance moved from the start.
template <typename F, typename E>
double solve_charge_balance(F&& eval, double x0, double tol, double stop_tol, double stop_share,
                            int max_iter, int* count, bool* ok, E* last, bool* have_last) {
  double lo = kPhLow, hi = kPhHigh;
  double x = std::min(std::max(x0, lo + 1e-9), hi - 1e-9);
  const double start = x;
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
    if (std::fabs(step) <= stop_tol * (1.0 + std::fabs(x)) ||
        std::fabs(step) <= stop_share * std::fabs(x - start)) {  // converged, or close enough
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
  auto inner = [&](double x0, double stop_tol, double stop_share) {
    const double x1 = solve_charge_balance(eval, x0, options.ph_tolerance, stop_tol, stop_share,
                                           options.max_ph_iterations, &out.evaluations, &ok, &ev, &have);
    if (!have) {
      ev = evaluate(x1);
      ++out.evaluations;
    }
    return x1;
  };
  const double first_tol = ideal_ ? options.ph_tolerance : std::max(options.ph_tolerance, kFirstPhTolerance);
  double x = inner(pH_guess, first_tol, 0.0);
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
    // Each solve starts where the line through the last two solved (I, pH) points puts the pH
    // at the new I (from the second step on), which saves about one Newton step per I.
    double i_solved = i_prev, x_solved = x, x_at_prev = x, i_at_prev = i_prev;
    bool have_line = false;
    bool exact = false;
    converged = false;
    for (int k = 0; k < options.max_ionic_strength_iterations; ++k) {
      set_ionic_strength(i_cur);
      double x_start = x;
      if (have_line && i_solved != i_at_prev) {
        const double shift = (x_solved - x_at_prev) / (i_solved - i_at_prev) * (i_cur - i_solved);
        if (std::fabs(shift) < 0.1) x_start = x + shift;
      }
      const bool last_try = k + 1 >= options.max_ionic_strength_iterations;
      x = inner(x_start, options.ph_tolerance, exact || last_try ? 0.0 : kStepShare);
      if (!std::isfinite(ev.ionic_strength) || !std::isfinite(ev.charge)) {
        // The activity coefficients overflow at this I: step back towards i_lo.
        diverged = true;
        i_hi = std::min(i_hi, i_cur);
        if (!(i_hi - i_lo > 1e-12 * i_hi)) break;
        i_cur = 0.5 * (i_lo + i_hi);
        x = pH_guess;
        have_line = false;
        continue;
      }
      diverged = false;
      x_at_prev = x_solved;
      i_at_prev = i_solved;
      x_solved = x;
      i_solved = i_cur;
      have_line = true;
      if (!ok) break;
      const double g = ev.ionic_strength - i_cur;
      // Where solids pin the pH (free form and salt together), I(pH) is as uncertain as the
      // charge balance itself: accept a change of I within a few times the charge residual.
      if (std::fabs(g) <= options.ionic_strength_rel_tolerance * i_cur + 4.0 * std::fabs(ev.charge) + 1e-300) {
        if (exact || ev.charge == 0.0 ||
            std::fabs(ev.charge / ev.dcharge_dpH) <= options.ph_tolerance * (1.0 + std::fabs(x))) {
          converged = true;
          break;
        }
        exact = true;  // the pH was not solved to the tolerance: again at this I, to the end
        continue;
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
// Full solve with species, drug state and warnings, in named steps.

namespace {

/// The reason a state could not be reached, in words, on the partly filled result `r`.
Equilibrium not_converged(const Mixture& mixture, const StateSummary& s, Equilibrium r) {
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
  } else if (mixture.activity == ActivityModel::kDavies && s.ionic_strength_mol_per_L > kDaviesMaxIonicStrength) {
    r.termination = Termination::kNumericalFailure;
    r.message = "the activity corrections diverge: at ionic strength " +
                std::to_string(s.ionic_strength_mol_per_L).substr(0, 5) +
                " mol/L the Davies equation is far outside its range (" + fixed(kDaviesMaxIonicStrength, 1) + " mol/L); the mixture "
                "is too concentrated for the model";
  }
  return r;
}

/// Species of every acid-base system and strong ion, H+ and OH- at the solved pH, appended to
/// r->species; returns the largest relative mass residual of the systems.
double add_solution_species(const Mixture& mixture, const EquilibriumModel& model,
                            const EquilibriumModel::Partition& p, double pH, Equilibrium* r) {
  double alpha[kMaxPka + 1];
  double mass_res = 0.0;
  std::vector<EquilibriumModel::IonPairSpecies> pairs;
  std::vector<double> free_ion;
  if (model.has_ion_pairs()) model.ion_pair_state(pH, &pairs, &free_ion);
  for (int k = 0; k < model.num_systems(); ++k) {
    const SystemAmount& sa = mixture.systems[k];
    model.fractions(k, pH, alpha);
    // Dissolved: the total less what salts of a system counterion hold (clamped at zero).
    const double removed = model.system_removed(p, k);
    const double dissolved = std::max(0.0, sa.total_mol_per_L - removed);
    double sum = 0.0;
    for (int j = 0; j <= static_cast<int>(sa.system.pkas.size()); ++j) {
      const int z = sa.system.charge_of(j);
      const double c = dissolved * alpha[j];
      sum += c;
      double paired = 0.0;  // ion pairs of this species, listed with their metals
      for (const EquilibriumModel::IonPairSpecies& q : pairs) {
        if (q.system == k && q.j == j) paired += q.conc_mol_per_L;
      }
      r->species.push_back({sa.system.id + " " + sa.system.species_label(j), sa.system.id, z,
                            std::max(0.0, c - paired), model.species_gamma(k, j)});
    }
    if (sa.total_mol_per_L > 0) {
      mass_res = std::max(mass_res, std::fabs(sum + removed - sa.total_mol_per_L) / sa.total_mol_per_L);
    }
  }
  for (std::size_t t = 0; t < mixture.ions.size(); ++t) {
    const IonAmount& i = mixture.ions[t];
    // Clamped: a counterion precipitated to exhaustion may round to just below zero.
    if (model.has_ion_pairs()) {
      // The free ion, then each of its pairs: "CaOH+", and e.g. "Na.phosphate HA-" for
      // Na+ + phosphate HA2-.
      const double c = std::max(0.0, free_ion[t] - model.ion_removed(p, static_cast<int>(t)));
      r->species.push_back({i.id, "", i.charge, c, model.ion_gamma(static_cast<int>(t))});
      const std::string metal = i.id.substr(0, i.id.find_first_of("+0123456789"));
      for (const EquilibriumModel::IonPairSpecies& q : pairs) {
        if (q.ion != static_cast<int>(t)) continue;
        std::string name = metal + "OH+";
        if (q.system >= 0) {
          const AcidBaseSystem& sys = mixture.systems[q.system].system;
          const int hn = static_cast<int>(sys.pkas.size()) - q.j;
          name = metal + "." + sys.id + " " + (hn > 1 ? "H" + std::to_string(hn) : hn == 1 ? "H" : "") + "A";
          const int m = std::abs(q.charge);
          if (q.charge != 0) name += (m > 1 ? std::to_string(m) : "") + (q.charge < 0 ? "-" : "+");
        }
        r->species.push_back({name, "", q.charge, q.conc_mol_per_L, model.gamma(q.charge)});
      }
      continue;
    }
    const double paired = model.hydroxo_paired(static_cast<int>(t), pH);
    const double c = std::max(0.0, i.conc_mol_per_L - model.ion_removed(p, static_cast<int>(t)) - paired);
    r->species.push_back({i.id, "", i.charge, c, model.ion_gamma(static_cast<int>(t))});
    if (paired > 0) {
      r->species.push_back({i.id.substr(0, i.id.size() - 2) + "OH+", "", i.charge - 1, paired,
                            model.gamma(i.charge - 1)});
    }
  }
  const double h = std::pow(10.0, -pH);
  r->species.push_back({"H+", "", 1, h / model.h_gamma(), model.h_gamma()});
  r->species.push_back({"OH-", "", -1, model.kw() / (h * model.oh_gamma()), model.oh_gamma()});
  return mass_res;
}

/// The largest saturation ratio of the free form and every salt with the whole dose dissolved
/// at pH, under the model's current activity coefficients.
double saturation_ratio(const Mixture& mixture, const EquilibriumModel& mm, double pH) {
  const DrugAmount& d = *mixture.drug;
  const AcidBaseSystem& sys = d.compound.system;
  const int n = static_cast<int>(sys.pkas.size());
  const int jn = sys.neutral_index();
  double alpha[kMaxPka + 1];
  mm.fractions(-1, pH, alpha);
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
      mm.fractions(static_cast<int>(k), pH, ac);
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
  return sat;
}

/// The drug's state at the solved pH: dissolved amount and solids, its species (appended to
/// r->species) and its saturation ratio; returns the relative mass residual of the drug.
double add_drug_state(const Mixture& mixture, EquilibriumModel& model, const StateSummary& s,
                      const EquilibriumModel::Partition& p, const SolverOptions& options, Equilibrium* r) {
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
  double alpha[kMaxPka + 1];
  model.fractions(-1, s.pH, alpha);
  const int n = static_cast<int>(sys.pkas.size());
  ds.fractions.assign(alpha, alpha + n + 1);
  const int jn = sys.neutral_index();
  ds.neutral_mol_per_L = jn >= 0 ? alpha[jn] * p.dissolved : 0.0;
  for (int j = 0; j <= n; ++j) {
    const int z = sys.charge_of(j);
    r->species.push_back({d.compound.id + " " + sys.species_label(j), d.compound.id, z,
                          p.dissolved * alpha[j], model.species_gamma(-1, j)});
  }
  ds.solids = p.solids;
  ds.solid = to_string(p.solids, d.compound);
  const double mass = p.dissolved + p.free_solid + p.salt_drug;
  const double mass_res =
      d.dose_mol_per_L > 0 ? std::fabs(mass - d.dose_mol_per_L) / d.dose_mol_per_L : 0.0;
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
    r->warnings.push_back("the saturation ratio is estimated at the equilibrium pH: the state "
                          "with the whole dose dissolved could not be solved");
  }
  if (dissolved_state) m2.set_ionic_strength(s2.ionic_strength_mol_per_L);
  ds.saturation_ratio = saturation_ratio(mixture, dissolved_state ? m2 : model, s2.pH);
  r->drug = ds;
  return mass_res;
}

/// Warnings on the ranges of the data and models, and on a dose that does not dissolve.
void add_range_warnings(const Mixture& mixture, Equilibrium* r) {
  if (mixture.temperature_C < kDataMinTemperatureC || mixture.temperature_C > kDataMaxTemperatureC) {
    r->warnings.push_back("temperature " + std::to_string(mixture.temperature_C).substr(0, 5) +
                          " C is outside 0-60 C, the validity range of the water and pKa(T) data");
  }
  if (mixture.activity == ActivityModel::kDavies && r->ionic_strength_mol_per_L > kDaviesMaxIonicStrength) {
    r->warnings.push_back("ionic strength above " + fixed(kDaviesMaxIonicStrength, 1) +
                          " mol/L: the Davies equation is outside its range");
  }
  if ((mixture.activity == ActivityModel::kSit || mixture.activity == ActivityModel::kTruesdellJones ||
       mixture.activity == ActivityModel::kIonPairs) &&
      r->ionic_strength_mol_per_L > kCheckedMaxIonicStrength) {
    r->warnings.push_back("ionic strength above " + fixed(kCheckedMaxIonicStrength, 1) + " mol/L: beyond the range in which the " +
                          model_words(mixture.activity) + " was checked against published buffer tables");
  }
  if (r->drug && r->drug->solid != "none") {
    r->warnings.push_back("the dose does not dissolve completely: solid " + r->drug->solid + " remains");
  }
}

/// Last guard of "never NaN or infinity in any output": far beyond the Davies range the
/// coefficient of a highly charged species can overflow even where the balances converge.
bool all_finite(const Equilibrium& r) {
  bool finite = std::isfinite(r.osmolarity_mOsm_per_L);
  for (const Species& sp : r.species) {
    finite = finite && std::isfinite(sp.conc_mol_per_L) && std::isfinite(sp.activity_coefficient);
  }
  if (r.drug) {
    finite = finite && std::isfinite(r.drug->saturation_ratio) && std::isfinite(r.drug->dissolved_mol_per_L);
  }
  return finite;
}

Equilibrium refused_as_diverging(const Mixture& mixture, const Equilibrium& r) {
  Equilibrium refused;
  refused.termination = Termination::kNumericalFailure;
  refused.temperature_C = mixture.temperature_C;
  refused.evaluations = r.evaluations;
  refused.message = "the activity corrections diverge: at ionic strength " +
                    std::to_string(r.ionic_strength_mol_per_L).substr(0, 5) +
                    " mol/L the " + model_words(mixture.activity) + " is far outside its range (" +
                    fixed(mixture.activity == ActivityModel::kDavies ? kDaviesMaxIonicStrength : kCheckedMaxIonicStrength, 1) +
                    " mol/L); the mixture is too concentrated for the model";
  return refused;
}

}  // namespace

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
  if (!s.converged) return not_converged(mixture, s, std::move(r));

  const EquilibriumModel::Evaluation ev = model.evaluate(s.pH);
  r.osmolarity_mOsm_per_L = ev.osmolarity * 1000.0;
  double mass_res = add_solution_species(mixture, model, ev.drug, s.pH, &r);
  if (mixture.drug) {
    mass_res = std::max(mass_res, add_drug_state(mixture, model, s, ev.drug, options, &r));
  }
  r.mass_residual_rel = mass_res;
  add_range_warnings(mixture, &r);
  // Far beyond the activity model's range the coefficients of highly charged species can also
  // underflow a system's species fractions to zero, which shows as a lost mass balance.
  const bool beyond_range =
      (mixture.activity == ActivityModel::kDavies && r.ionic_strength_mol_per_L > kDaviesMaxIonicStrength) ||
      (mixture.activity != ActivityModel::kIdeal && r.ionic_strength_mol_per_L > kCheckedMaxIonicStrength);
  if (!all_finite(r) || (beyond_range && !(mass_res <= kMaxMassResidual))) {
    return refused_as_diverging(mixture, r);
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

}  // namespace pkarta
