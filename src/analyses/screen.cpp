#include "pkarta/analyses/screen.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <thread>

#include "pkarta/base/format.h"
#include "pkarta/analyses/dilute.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/chem/units.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kWalkStepDecades = 0.25;  // step of the downward walk before the bisection

// A titrant reagent: the strong ions one mole of it gives, and their net charge.
struct Titrant {
  std::string id;
  std::vector<IonAmount> ions;  // conc_mol_per_L holds the count per mole of reagent
  double net_charge = 0.0;      // sum count * charge
  double z2_sum = 0.0;          // sum count * charge^2 (ionic strength per mole)
};

Titrant titrant_of(const Library& library, const std::string& reagent_id, int sign,
                   const std::string& buffer_id) {
  Titrant t;
  t.id = reagent_id;
  const Reagent& r = library.reagent(reagent_id);
  for (const Contribution& c : r.gives) {
    if (c.kind == Contribution::Kind::kSystem) {
      throw InputError("titrant '" + reagent_id + "' of buffer '" + buffer_id +
                       "' gives an acid-base system; a titrant must give strong ions only");
    }
    const Ion& ion = library.ion(c.id);
    t.ions.push_back({ion.id, ion.charge, c.count});
    t.net_charge += c.count * ion.charge;
    t.z2_sum += c.count * ion.charge * ion.charge;
  }
  if (!(t.net_charge * sign > 0)) {
    throw InputError("titrant '" + reagent_id + "' of buffer '" + buffer_id + "' must give a net " +
                     (sign < 0 ? "anion (an acid titrant such as HCl)" : "cation (a base titrant such as NaOH)"));
  }
  return t;
}

bool within(double pH, double target, double tolerance) {
  return std::isfinite(pH) && std::fabs(pH - target) <= tolerance;
}

// One buffer and one dose: a mixture template whose buffer total and titrant amount are set
// for each concentration tried, so that the bisection builds no strings.
class BufferRun {
 public:
  BufferRun(const Library& library, const Buffer& buffer, const Compound* compound, double dose,
            const std::string& form, double temperature_C, ActivityModel activity)
      : buffer_(buffer),
        acid_(titrant_of(library, buffer.acid_titrant, -1, buffer.id)),
        base_(titrant_of(library, buffer.base_titrant, +1, buffer.id)),
        activity_(activity) {
    const AcidBaseSystem& sys = library.system(buffer.system);
    alone_.temperature_C = temperature_C;
    alone_.activity = activity;
    alone_.add_system(sys, 0.0);
    mix_ = alone_;
    for (const Titrant* t : {&acid_, &base_}) {
      for (const IonAmount& i : t->ions) mix_.add_ion(i.id, i.charge, 0.0);
    }
    if (compound && dose > 0) {
      add_drug(mix_, library, *compound, dose, form);
      dose0_ = dose;
    }
    base_ion_conc_.resize(mix_.ions.size());
    for (std::size_t k = 0; k < mix_.ions.size(); ++k) base_ion_conc_[k] = mix_.ions[k].conc_mol_per_L;
    // A salt's weak-acid or weak-base counterion enters as a system (the buffer's own, when
    // they are the same system: a maleate salt in a maleate buffer).
    base_sys_conc_.resize(mix_.systems.size());
    for (std::size_t k = 0; k < mix_.systems.size(); ++k) base_sys_conc_[k] = mix_.systems[k].total_mol_per_L;
  }

  const Buffer& buffer() const { return buffer_; }

  BufferPreparation prepare(double conc, double pH) {
    BufferPreparation p;
    p.conc_mol_per_L = conc;
    p.pH = pH;
    alone_.systems[0].total_mol_per_L = conc;
    EquilibriumModel model(alone_);
    p.converged = balance_charge_at_pH(model, pH, activity_ == ActivityModel::kIdeal, [&](double q) {
      // q > 0: anions (acid titrant) needed; < 0: cations
      const Titrant& t = q > 0 ? acid_ : base_;
      const double amount = -q / t.net_charge;
      p.titrant = amount > 0 ? t.id : "";
      p.titrant_mol_per_L = amount > 0 ? amount : 0.0;
      return 0.5 * t.z2_sum * p.titrant_mol_per_L;
    }, &p.ionic_strength_mol_per_L);
    return p;
  }

  // The buffer at `prep` plus the dose (scaled by dose_factor) in the template mixture, plus
  // `challenge` mol/L of strong acid (> 0, the acid titrant) or strong base (< 0).
  const Mixture& mixture(const BufferPreparation& prep, double dose_factor = 1.0, double challenge = 0.0) {
    mix_.systems[0].total_mol_per_L = prep.conc_mol_per_L;
    for (std::size_t k = 0; k < mix_.systems.size(); ++k) {
      if (base_sys_conc_[k] > 0) mix_.systems[k].total_mol_per_L += base_sys_conc_[k] * dose_factor;
    }
    const double acid = (prep.titrant == acid_.id ? prep.titrant_mol_per_L : 0.0) + std::max(challenge, 0.0);
    const double base = (prep.titrant == base_.id ? prep.titrant_mol_per_L : 0.0) + std::max(-challenge, 0.0);
    for (std::size_t k = 0; k < mix_.ions.size(); ++k) {
      double c = base_ion_conc_[k] * dose_factor;  // the drug's counterion scales with the dose
      for (const auto& [t, amount] : {std::pair<const Titrant*, double>{&acid_, acid}, {&base_, base}}) {
        if (amount <= 0) continue;
        for (const IonAmount& i : t->ions) {
          if (i.id == mix_.ions[k].id) c += i.conc_mol_per_L * amount;
        }
      }
      mix_.ions[k].conc_mol_per_L = c;
    }
    if (mix_.drug) mix_.drug->dose_mol_per_L = dose0_ * dose_factor;
    return mix_;
  }

  // The preparation at total conc: premade, the buffer alone at the target; adjusted, the
  // titrant that brings buffer plus dose to the target (Newton steps on the signed titrant
  // amount with the buffer capacity of the formulation as slope).
  BufferPreparation prepare_for(double conc, double target, ScreenPreparation how) {
    BufferPreparation p = prepare(conc, target);
    if (how == ScreenPreparation::kPremade || !p.converged || !mix_.drug) return p;
    // Signed strong charge of the titrant per litre (acid titrant negative, base positive).
    auto set = [&](double s) {
      p.titrant = s > 0 ? base_.id : (s < 0 ? acid_.id : "");
      p.titrant_mol_per_L = s > 0 ? s / base_.net_charge : (s < 0 ? s / acid_.net_charge : 0.0);
    };
    double signed_base = p.titrant == base_.id ? p.titrant_mol_per_L * base_.net_charge
                                        : p.titrant_mol_per_L * acid_.net_charge;
    set(signed_base);
    double guess = target;
    p.converged = false;
    for (int it = 0; it < 60; ++it) {
      const Mixture& m = mixture(p);
      EquilibriumModel model(m);
      const StateSummary s = model.solve(options_, guess);
      if (!s.converged) return p;
      guess = s.pH;
      if (std::fabs(s.pH - target) < 1e-7) {
        p.converged = true;
        p.ionic_strength_mol_per_L = s.ionic_strength_mol_per_L;
        break;
      }
      const double beta = std::max(buffer_capacity(m), 1e-12);
      double step = beta * (target - s.pH);
      // Newton on a sigmoid: keep each step within the capacity over one pH unit.
      const double cap = beta * 1.0;
      step = std::clamp(step, -cap, cap);
      signed_base += step;
      set(signed_base);
    }
    if (!p.converged) bisect_titrant(p, signed_base, target, set);
    return p;
  }

  // The adjusted titrant by bracketing and bisection on the signed amount, for the cases the
  // capacity-limited Newton steps do not reach (a dose far from the target with little buffer:
  // the pH rises monotonically with the strong base added).
  template <typename Set>
  void bisect_titrant(BufferPreparation& p, double start, double target, Set&& set) {
    auto ph_at = [&](double signed_base, double* pH) {
      set(signed_base);
      EquilibriumModel model(mixture(p));
      const StateSummary s = model.solve(options_, target);
      *pH = s.pH;
      if (s.converged) p.ionic_strength_mol_per_L = s.ionic_strength_mol_per_L;
      return s.converged;
    };
    double lo = start, hi = start, pH_lo = 0.0, pH_hi = 0.0;
    if (!ph_at(start, &pH_lo)) return;
    pH_hi = pH_lo;
    double width = std::max(1e-6, std::fabs(start));
    for (int it = 0; it < 80 && !(pH_lo <= target && target <= pH_hi); ++it) {
      if (pH_lo > target) {
        hi = lo;
        pH_hi = pH_lo;
        lo -= width;
        if (!ph_at(lo, &pH_lo)) return;
      } else {
        lo = hi;
        pH_lo = pH_hi;
        hi += width;
        if (!ph_at(hi, &pH_hi)) return;
      }
      width *= 2.0;
    }
    if (!(pH_lo <= target && target <= pH_hi)) return;
    for (int it = 0; it < 200; ++it) {
      const double mid = 0.5 * (lo + hi);
      double pH_mid = 0.0;
      if (!ph_at(mid, &pH_mid)) return;
      if (std::fabs(pH_mid - target) < 1e-7) {
        p.converged = true;
        return;
      }
      (pH_mid < target ? lo : hi) = mid;
      if (hi - lo <= 1e-15 * std::max(std::fabs(lo), std::fabs(hi))) break;
    }
  }

  // pH after the drug at total buffer concentration conc (NaN when a solve fails).
  double ph_after(double conc, double target, double guess, double dose_factor = 1.0,
                  ScreenPreparation how = ScreenPreparation::kPremade, double challenge = 0.0) {
    const BufferPreparation prep = prepare_for(conc, target, how);
    if (!prep.converged) return kNaN;
    return ph_of(prep, guess, dose_factor, challenge);
  }

  double ph_of(const BufferPreparation& prep, double guess, double dose_factor = 1.0, double challenge = 0.0) {
    EquilibriumModel model(mixture(prep, dose_factor, challenge));
    const StateSummary s = model.solve(options_, guess);
    return s.converged ? s.pH : kNaN;
  }

 private:
  const Buffer& buffer_;
  Titrant acid_;
  Titrant base_;
  ActivityModel activity_;
  Mixture alone_;
  Mixture mix_;
  std::vector<double> base_ion_conc_;
  std::vector<double> base_sys_conc_;  // mol/L of each system brought by the dose
  double dose0_ = 0.0;
  SolverOptions options_;
};

const std::vector<std::string>& known_routes() {
  static const std::vector<std::string> routes = {"any", "oral", "parenteral", "ophthalmic", "topical"};
  return routes;
}

}  // namespace

// ---------------------------------------------------------------------------------------------

bool ScreenOptions::is_valid(std::string* error) const {
  auto fail = [&](const std::string& field, double value, const char* rule) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%g", value);
    *error = "ScreenOptions::" + field + " = " + buf + ", must be " + rule;
    return false;
  };
  if (!(target_pH >= 0.0 && target_pH <= 14.0)) return fail("target_pH", target_pH, "within 0 to 14");
  if (!(tolerance_pH > 0.0) || !std::isfinite(tolerance_pH)) return fail("tolerance_pH", tolerance_pH, "> 0");
  if (!(temperature_C >= -10.0 && temperature_C <= 100.0)) {
    return fail("temperature_C", temperature_C, "within -10 to 100");
  }
  if (!(dose_range_fraction >= 0.0 && dose_range_fraction < 1.0)) {
    return fail("dose_range_fraction", dose_range_fraction, "within 0 to 1 (0.1 for +/-10 %)");
  }
  if (!(min_conc_mol_per_L > 0.0)) return fail("min_conc_mol_per_L", min_conc_mol_per_L, "> 0");
  if (!(rel_precision > 0.0 && rel_precision <= 1e-3)) {
    return fail("rel_precision", rel_precision, "within 0 to 1e-3");
  }
  if (!(pka_window_pH > 0.0)) return fail("pka_window_pH", pka_window_pH, "> 0");
  if (!(challenge_mol_per_L >= 0.0 && challenge_mol_per_L < 10.0)) {
    return fail("challenge_mol_per_L", challenge_mol_per_L, "within 0 to 10");
  }
  if (!(min_capacity_mol_per_L_per_pH >= 0.0 && std::isfinite(min_capacity_mol_per_L_per_pH))) {
    return fail("min_capacity_mol_per_L_per_pH", min_capacity_mol_per_L_per_pH, ">= 0");
  }
  if (max_drift_pH && !(*max_drift_pH > 0.0 && std::isfinite(*max_drift_pH))) {
    return fail("max_drift_pH", *max_drift_pH, "> 0");
  }
  if (!(round_step_mol_per_L >= 0.0 && std::isfinite(round_step_mol_per_L))) {
    return fail("round_step_mol_per_L", round_step_mol_per_L, ">= 0");
  }
  if (std::find(known_routes().begin(), known_routes().end(), route) == known_routes().end()) {
    *error = "ScreenOptions::route = \"" + route + "\", must be one of any, oral, parenteral, ophthalmic, topical";
    return false;
  }
  return true;
}

const char* screen_preparation_name(ScreenPreparation preparation) {
  return preparation == ScreenPreparation::kAdjusted ? "adjusted" : "premade";
}

const char* screen_status_name(ScreenStatus status) {
  switch (status) {
    case ScreenStatus::kOk: return "ok";
    case ScreenStatus::kNotAchievable: return "not-achievable";
    case ScreenStatus::kOutsideRange: return "outside-range";
    case ScreenStatus::kDoseNotSoluble: return "dose-not-soluble";
  }
  return "?";
}

BufferPreparation prepare_buffer(const Library& library, const Buffer& buffer, double conc_mol_per_L,
                                 double pH, double temperature_C, ActivityModel activity) {
  BufferRun run(library, buffer, nullptr, 0.0, "free", temperature_C, activity);
  return run.prepare(conc_mol_per_L, pH);
}

Mixture screen_mixture(const Library& library, const Buffer& buffer, const BufferPreparation& prep,
                       const Compound* compound, double dose_mol_per_L, const std::string& form,
                       double temperature_C, ActivityModel activity) {
  Mixture m;
  m.temperature_C = temperature_C;
  m.activity = activity;
  m.add_system(library.system(buffer.system), prep.conc_mol_per_L);
  if (!prep.titrant.empty() && prep.titrant_mol_per_L > 0) {
    add_reagent(m, library, prep.titrant, prep.titrant_mol_per_L);
  }
  if (compound && dose_mol_per_L > 0) add_drug(m, library, *compound, dose_mol_per_L, form);
  return m;
}

double ph_after_drug(const Library& library, const Buffer& buffer, double conc_mol_per_L,
                     const Compound& compound, double dose_mol_per_L, const std::string& form,
                     const ScreenOptions& options) {
  BufferRun run(library, buffer, &compound, dose_mol_per_L, form, options.temperature_C, options.activity);
  return run.ph_after(conc_mol_per_L, options.target_pH, options.target_pH, 1.0, options.preparation);
}

double screen_solubility_at_target(const Library& library, const Compound& compound,
                                   const ScreenOptions& options) {
  return solubility_at_pH(compound, library, options.target_pH,
                          ProfileConditions::in_water(options.temperature_C, options.activity))
      .solubility_mol_per_L;
}

std::vector<const Buffer*> screen_candidates(const Library& library, const ScreenOptions& options) {
  if (std::find(known_routes().begin(), known_routes().end(), options.route) == known_routes().end()) {
    throw InputError("unknown route '" + options.route + "', expected oral, parenteral, ophthalmic, topical or any");
  }
  std::vector<const Buffer*> out;
  if (options.buffers.empty()) {
    for (const auto& kv : library.buffers) out.push_back(&kv.second);
  } else {
    for (const std::string& id : options.buffers) {
      const Buffer* b = &library.buffer(id);
      if (std::find(out.begin(), out.end(), b) == out.end()) out.push_back(b);
    }
    std::sort(out.begin(), out.end(), [](const Buffer* a, const Buffer* b) { return a->id < b->id; });
  }
  out.erase(std::remove_if(out.begin(), out.end(),
                           [&](const Buffer* b) { return !b->allows_route(options.route); }),
            out.end());
  return out;
}

namespace {

// One criterion: a test of the formulation at total buffer concentration C.
struct CriterionTest {
  ScreenCriterion info;
  std::function<double(double conc)> value;  // NaN when a solve fails
};

bool passes(const ScreenCriterion& c, double v) {
  return std::isfinite(v) && v >= c.limit_low && v <= c.limit_high;
}

// Walk down from max-conc in steps of a quarter decade while the criterion holds, then bisect
// on log C between the last step inside and the first outside. The drift falls as the buffer
// grows for the protolytic effect of the dose, but the ionic strength a salt dose brings also
// shifts a charged buffer's apparent pKa, so |drift| can dip through zero at low C; the walk
// reports the lower end of the range that reaches up to max-conc, the one that holds when the
// buffer is made a little stronger.
void search_minimum(CriterionTest& test, double max_conc, const ScreenOptions& options) {
  ScreenCriterion& c = test.info;
  double hi = max_conc;
  if (!passes(c, test.value(hi))) return;
  const double floor = std::min(options.min_conc_mol_per_L, hi);
  const double step = std::pow(10.0, -kWalkStepDecades);
  double lo = hi;
  bool found_outside = false;
  while (lo > floor) {
    const double next = std::max(lo * step, floor);
    if (!passes(c, test.value(next))) {
      found_outside = true;
      hi = lo;
      lo = next;
      break;
    }
    lo = next;
  }
  if (!found_outside) {
    c.min_conc_mol_per_L = floor;
    c.min_conc_at_lower_bound = true;
    return;
  }
  while (hi / lo - 1.0 > options.rel_precision) {
    const double mid = std::sqrt(lo * hi);
    if (passes(c, test.value(mid))) hi = mid;
    else lo = mid;
  }
  c.min_conc_mol_per_L = hi;
}

ScreenCriterion make_criterion(const char* id, const char* quantity, double low, double high) {
  ScreenCriterion c;
  c.id = id;
  c.quantity = quantity;
  c.limit_low = low;
  c.limit_high = high;
  return c;
}

}  // namespace

BufferPreparation dose_titration(const Library& library, const Buffer& buffer, const ScreenJob& job,
                                 const ScreenOptions& options) {
  BufferRun run(library, buffer, &job.compound, job.dose_mol_per_L, job.form, options.temperature_C,
                options.activity);
  return run.prepare_for(0.0, options.target_pH, ScreenPreparation::kAdjusted);
}

const ScreenCriterion* ScreenResult::criterion(const std::string& id) const {
  for (const ScreenCriterion& c : criteria) {
    if (c.id == id) return &c;
  }
  return nullptr;
}

ScreenResult screen_buffer(const Library& library, const Buffer& buffer, const ScreenJob& job,
                           double solubility_at_target_mol_per_L, const ScreenOptions& options) {
  ScreenResult r;
  r.buffer = buffer.id;
  r.name = buffer.name;
  r.routes = buffer.routes;
  r.max_conc_mol_per_L = buffer.max_conc_mol_per_L;
  const double target = options.target_pH;
  const double tol = options.tolerance_pH;
  const double T = options.temperature_C;
  const ScreenPreparation how = options.preparation;

  const AcidBaseSystem& sys = library.system(buffer.system);
  double nearest = kNaN;
  for (const Pka& p : sys.pkas) {
    const double pk = p.at(T);
    if (!std::isfinite(nearest) || std::fabs(pk - target) < std::fabs(nearest - target)) nearest = pk;
  }
  r.nearest_pka = nearest;
  const bool outside = !(std::fabs(nearest - target) <= options.pka_window_pH);

  BufferRun run(library, buffer, &job.compound, job.dose_mol_per_L, job.form, T, options.activity);

  // The criteria, each a value of the formulation at total buffer concentration C.
  std::vector<CriterionTest> tests;
  tests.push_back({make_criterion("dose", "pH", target - tol, target + tol),
                   [&](double c) { return run.ph_after(c, target, target, 1.0, how); }});
  const double f = options.dose_range_fraction;
  auto worst_in_range = [&](double c) {
    const BufferPreparation prep = run.prepare_for(c, target, how);
    if (!prep.converged) return kNaN;
    const double nominal = run.ph_of(prep, target);
    double worst = nominal;
    for (double k : {-1.0, -0.5, 0.5, 1.0}) {
      const double ph = run.ph_of(prep, nominal, 1.0 + k * f);
      if (!std::isfinite(ph)) return kNaN;
      if (std::fabs(ph - target) > std::fabs(worst - target)) worst = ph;
    }
    return worst;
  };
  if (f > 0) tests.push_back({make_criterion("dose-range", "worst pH", target - tol, target + tol), worst_in_range});
  const double load = options.challenge_mol_per_L;
  auto challenged = [&](double c, double amount) {
    const BufferPreparation prep = run.prepare_for(c, target, how);
    if (!prep.converged) return kNaN;
    const double nominal = run.ph_of(prep, target);
    return std::isfinite(nominal) ? run.ph_of(prep, nominal, 1.0, amount) : kNaN;
  };
  if (load > 0) {
    tests.push_back({make_criterion("acid-challenge", "pH", target - tol, target + tol),
                     [&](double c) { return challenged(c, load); }});
    tests.push_back({make_criterion("base-challenge", "pH", target - tol, target + tol),
                     [&](double c) { return challenged(c, -load); }});
  }
  auto capacity = [&](double c) {
    const BufferPreparation prep = run.prepare_for(c, target, how);
    return prep.converged ? buffer_capacity(run.mixture(prep)) : kNaN;
  };
  if (options.min_capacity_mol_per_L_per_pH > 0) {
    tests.push_back({make_criterion("min-capacity", "mol/L per pH", options.min_capacity_mol_per_L_per_pH, kInf),
                     capacity});
  }
  auto storage_drift = [&](double c) {
    const BufferPreparation prep = run.prepare_for(c, target, how);
    if (!prep.converged) return kNaN;
    const double nominal = run.ph_of(prep, target);
    Mixture m = run.mixture(prep);
    double worst = 0.0;
    for (double temp : {options.low_temperature_C, options.high_temperature_C}) {
      m.temperature_C = temp;
      EquilibriumModel model(m);
      const StateSummary s = model.solve(SolverOptions{}, nominal);
      if (!s.converged) return kNaN;
      worst = std::max(worst, std::fabs(s.pH - target));
    }
    return worst;
  };
  if (options.max_drift_pH) {
    tests.push_back({make_criterion("storage-drift", "max |pH - target| at the storage ends", 0.0, *options.max_drift_pH),
                     storage_drift});
  }

  const double max_conc = buffer.max_conc_mol_per_L;
  bool achievable = true;
  double min_conc = 0.0;
  bool at_lower_bound = true;
  for (CriterionTest& t : tests) {
    search_minimum(t, max_conc, options);
    const ScreenCriterion& c = t.info;
    if (!c.min_conc_mol_per_L) {
      if (achievable) r.binding = c.id;  // the first criterion failing at max-conc
      achievable = false;
      continue;
    }
    if (achievable && (r.binding.empty() || *c.min_conc_mol_per_L > min_conc)) {
      r.binding = c.id;
      min_conc = *c.min_conc_mol_per_L;
    }
    at_lower_bound = at_lower_bound && c.min_conc_at_lower_bound;
  }
  if (!std::isfinite(tests.front().value(max_conc))) {
    r.warnings.push_back("the equilibrium did not converge at max-conc");
  }

  double used = max_conc;
  if (achievable) {
    r.min_conc_mol_per_L = min_conc;
    r.min_conc_at_lower_bound = at_lower_bound;
    // The recommended strength: rounded up; should a criterion not hold there (a criterion
    // need not be monotone in C), the next practical value up, max-conc at most.
    double rec = round_up_strength(min_conc, max_conc, options.round_step_mol_per_L);
    for (int k = 0; k < 40; ++k) {
      bool all = true;
      for (CriterionTest& t : tests) all = all && passes(t.info, t.value(rec));
      if (all || rec >= max_conc) break;
      rec = round_up_strength(rec * (1 + 1e-6), max_conc, options.round_step_mol_per_L);
    }
    r.recommended_conc_mol_per_L = rec;
    used = rec;
  }
  r.conc_used_mol_per_L = used;

  // Every criterion's value and verdict at the strength used.
  for (CriterionTest& t : tests) {
    t.info.value = t.value(used);
    t.info.pass = passes(t.info, t.info.value);
    r.criteria.push_back(t.info);
  }

  // The final solution at the concentration used.
  const BufferPreparation prep = run.prepare_for(used, target, how);
  r.titrant = prep.titrant;
  r.titrant_mol_per_L = prep.titrant_mol_per_L;
  const Mixture final_mix = run.mixture(prep);
  const Equilibrium e = solve(final_mix);
  if (e.usable()) {
    r.pH_after_drug = e.pH;
    r.ionic_strength_mol_per_L = e.ionic_strength_mol_per_L;
    r.osmolarity_mOsm_per_L = e.osmolarity_mOsm_per_L;
    if (e.drug) r.drug_solid = e.drug->solid;
    r.capacity_mol_per_L_per_pH = buffer_capacity(final_mix);
    for (const std::string& w : e.warnings) r.warnings.push_back(w);
  } else {
    r.pH_after_drug = kNaN;
    r.warnings.push_back("the final equilibrium did not converge");
  }
  r.pH_drift = r.pH_after_drug - target;
  // The same totals at a storage temperature: pH and the drug solid there.
  auto at_storage = [&](double temperature_C, double& pH, std::string& solid) {
    Mixture m = final_mix;
    m.temperature_C = temperature_C;
    EquilibriumModel model(m);
    const StateSummary s = model.solve(SolverOptions{}, r.pH_after_drug);
    pH = s.converged ? s.pH : kNaN;
    solid = s.converged && job.dose_mol_per_L > 0 ? to_string(s.solids, job.compound) : "none";
  };
  at_storage(options.low_temperature_C, r.pH_at_5C, r.drug_solid_at_5C);
  at_storage(options.high_temperature_C, r.pH_at_40C, r.drug_solid_at_40C);
  const double storage_limit = options.storage_limit_pH();
  r.holds_at_storage = within(r.pH_at_5C, target, storage_limit) && within(r.pH_at_40C, target, storage_limit) &&
                       !r.new_solid_in_storage(r.drug_solid_at_5C) && !r.new_solid_in_storage(r.drug_solid_at_40C);
  r.pH_after_acid_challenge = load > 0 ? challenged(used, load) : kNaN;
  r.pH_after_base_challenge = load > 0 ? challenged(used, -load) : kNaN;

  if (f > 0) {
    r.worst_pH_in_dose_range = worst_in_range(used);
    r.dose_range_within_tolerance = within(*r.worst_pH_in_dose_range, target, tol);
  }

  if (outside) r.status = ScreenStatus::kOutsideRange;
  else if (solubility_at_target_mol_per_L < job.dose_mol_per_L) r.status = ScreenStatus::kDoseNotSoluble;
  else if (!achievable) r.status = ScreenStatus::kNotAchievable;
  else r.status = ScreenStatus::kOk;
  if (r.status == ScreenStatus::kOk) r.route_flags = screen_route_flags(options.route, r, options.temperature_C);
  if (r.status == ScreenStatus::kOk && !options.dilution_medium.empty() && std::isfinite(r.pH_after_drug)) {
    DilutionOptions d;
    d.medium_id = options.dilution_medium;
    const DilutionResult dr = analyse_dilution(final_mix, library, d);
    if (dr.usable()) {
      r.dilution_max_supersaturation = 0.0;
      for (const DilutionPoint& p : dr.points) {
        if (p.supersaturation_ratio > r.dilution_max_supersaturation) {
          r.dilution_max_supersaturation = p.supersaturation_ratio;
          r.dilution_worst_ratio = p.ratio;
        }
      }
    } else {
      r.warnings.push_back("dilution into " + options.dilution_medium + ": " + dr.message);
    }
  }
  return r;
}

}  // namespace pkarta
