// The pH-solubility profile: the grid, the scan of each point, salt-to-salt transitions, pHmax
// and the warnings of a profile.
#include "pkarta/analyses/profile.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

#include "pkarta/base/limits.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

// Brent's method (zeroin) for f(a), f(b) of opposite sign; absolute tolerance tol in x.
template <typename F>
double brent_root(F&& f, double a, double b, double fa, double fb, double tol) {
  double c = a, fc = fa, d = b - a, e = d;
  for (int it = 0; it < 200; ++it) {
    if ((fb > 0) == (fc > 0)) {
      c = a;
      fc = fa;
      d = e = b - a;
    }
    if (std::fabs(fc) < std::fabs(fb)) {
      a = b; b = c; c = a;
      fa = fb; fb = fc; fc = fa;
    }
    const double tol1 = 2.0 * std::numeric_limits<double>::epsilon() * std::fabs(b) + 0.5 * tol;
    const double xm = 0.5 * (c - b);
    if (std::fabs(xm) <= tol1 || fb == 0.0) return b;
    if (std::fabs(e) >= tol1 && std::fabs(fa) > std::fabs(fb)) {
      double p, q, r;
      const double s = fb / fa;
      if (a == c) {
        p = 2.0 * xm * s;
        q = 1.0 - s;
      } else {
        q = fa / fc;
        r = fb / fc;
        p = s * (2.0 * xm * q * (q - r) - (b - a) * (r - 1.0));
        q = (q - 1.0) * (r - 1.0) * (s - 1.0);
      }
      if (p > 0) q = -q;
      p = std::fabs(p);
      if (2.0 * p < std::min(3.0 * xm * q - std::fabs(tol1 * q), std::fabs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += std::fabs(d) > tol1 ? d : (xm > 0 ? tol1 : -tol1);
    fb = f(b);
  }
  return b;
}

std::string ph_text(double pH) { return fixed(pH, 2); }

std::string temp_text(double t) { return fixed(t, 1) + " °C"; }

}  // namespace

// ---------------------------------------------------------------------------------------------
// Grid

namespace {
constexpr double kPhMin = -1.0, kPhMax = 15.0;
std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}
}  // namespace

bool ProfileGrid::is_valid(std::string* error) const {
  auto in_range = [](double v) { return std::isfinite(v) && v >= kPhMin && v <= kPhMax; };
  if (!points_pH.empty()) {
    if (points_pH.size() > kMaxProfilePoints) {
      *error = "ProfileGrid::points_pH has " + std::to_string(points_pH.size()) + " values, at most " +
               std::to_string(kMaxProfilePoints);
      return false;
    }
    for (double v : points_pH) {
      if (!in_range(v)) {
        *error = "ProfileGrid::points_pH holds " + num(v) + ", must lie in -1 to 15";
        return false;
      }
    }
    return true;
  }
  if (!in_range(from_pH)) {
    *error = "ProfileGrid::from_pH = " + num(from_pH) + ", must lie in -1 to 15";
    return false;
  }
  if (!in_range(to_pH)) {
    *error = "ProfileGrid::to_pH = " + num(to_pH) + ", must lie in -1 to 15";
    return false;
  }
  if (to_pH < from_pH) {
    *error = "ProfileGrid::to_pH = " + num(to_pH) + " is below from_pH = " + num(from_pH) +
             ": the pH range is empty";
    return false;
  }
  if (!(std::isfinite(step_pH) && step_pH > 0)) {
    *error = "ProfileGrid::step_pH = " + num(step_pH) + ", must be > 0";
    return false;
  }
  if ((to_pH - from_pH) / step_pH + 1.0 > static_cast<double>(kMaxProfilePoints)) {
    *error = "ProfileGrid::step_pH = " + num(step_pH) + " gives more than " +
             std::to_string(kMaxProfilePoints) + " points";
    return false;
  }
  return true;
}

std::vector<double> ProfileGrid::values() const {
  std::vector<double> v;
  if (!points_pH.empty()) {
    v = points_pH;
    std::sort(v.begin(), v.end());
    v.erase(std::unique(v.begin(), v.end()), v.end());
    return v;
  }
  const long count = static_cast<long>(std::floor((to_pH - from_pH) / step_pH + 1e-9)) + 1;
  v.reserve(static_cast<std::size_t>(count));
  for (long i = 0; i < count; ++i) {
    // Rounded to 1e-10 so that 1 + 3 * 0.05 prints and compares as 1.15.
    v.push_back(std::round((from_pH + i * step_pH) * 1e10) / 1e10);
  }
  return v;
}

// ---------------------------------------------------------------------------------------------
// Profile

namespace {

// A reagent of the library that could hold the pH while giving `ion` (for a note).
std::string titrant_giving(const Library& library, const Ion& ion) {
  for (const auto& kv : library.reagents) {
    try {
      if (titrant_strong_ion(library, kv.first, ion.charge < 0 ? -1 : +1).id == ion.id) return kv.first;
    } catch (const InputError&) {
    }
  }
  return "";
}

// "pH a to b" of the points where pred holds (a count and the span).
template <typename P>
std::string where_points(const std::vector<ProfilePoint>& pts, P pred, int* count) {
  double lo = 0, hi = 0;
  int c = 0;
  for (const ProfilePoint& p : pts) {
    if (!pred(p)) continue;
    if (c == 0) lo = p.pH;
    hi = p.pH;
    ++c;
  }
  *count = c;
  return c == 1 ? "pH " + ph_text(lo) : "pH " + ph_text(lo) + " to " + ph_text(hi);
}

}  // namespace

Profile compute_profile(const Compound& compound, const Library& library,
                        const ProfileConditions& conditions, const ProfileGrid& grid,
                        std::vector<std::string> medium_contents) {
  std::string err;
  if (!grid.is_valid(&err)) throw InputError(err);
  SolubilityScanner scanner(compound, library, conditions);
  const double T = conditions.temperature_C;
  {
    // Without a free form and without a salt that can form here nothing limits the solubility:
    // every point would be the 10 mol/L cap, and its ionic strength meaningless.
    const bool free_form = compound.has_intrinsic_solubility && compound.system.neutral_index() >= 0;
    bool salt = false;
    for (std::size_t k = 0; k < compound.salts.size(); ++k) salt = salt || scanner.salt_can_limit(k);
    if (!free_form && !salt) {
      throw InputError(SourceLocation{compound.file.empty() ? compound.id : compound.file, 0, 0},
                       "nothing limits the solubility of '" + compound.id +
                           "' in this medium: it has no net-neutral form and no salt whose "
                           "counterion is present, so every point would be the " +
                           fixed(kSolubilityCap_mol_per_L, 0) + " mol/L cap of the model");
    }
  }

  Profile p;
  p.compound_id = compound.id;
  p.compound_name = compound.name;
  p.molar_mass_g_per_mol = compound.molar_mass_g_per_mol;
  p.temperature_C = T;
  p.activity = conditions.activity;
  p.acid_titrant = conditions.acid_titrant;
  p.acid_ion = titrant_strong_ion(library, conditions.acid_titrant, -1).id;
  p.base_titrant = conditions.base_titrant;
  p.base_ion = titrant_strong_ion(library, conditions.base_titrant, +1).id;
  p.medium_contents = std::move(medium_contents);
  const AcidBaseSystem& sys = compound.system;
  const int n = static_cast<int>(sys.pkas.size());
  const int jn = compound.has_intrinsic_solubility ? sys.neutral_index() : -1;
  p.s0_mol_per_L = jn >= 0 ? compound.s0_at(T) : 0.0;
  for (int j = 0; j <= n; ++j) p.species.push_back(sys.species_label(j));
  for (const Pka& k : sys.pkas) p.pka_at_temperature.push_back(k.at(T));

  const std::vector<double> values = grid.values();
  p.points.reserve(values.size());
  for (double v : values) {
    ProfilePoint pt;
    static_cast<SolubilityAtPh&>(pt) = scanner.at(v);
    pt.solubility_mg_per_mL = pt.solubility_mol_per_L * compound.molar_mass_g_per_mol;
    p.points.push_back(std::move(pt));
  }

  // pHmax: a property of the compound in the medium, so found over the whole aqueous range
  // pH 0-14 whatever the grid shown: sign changes of log(saturation ratio at free-form
  // saturation) on a scan of 0.05 pH spacing, refined by Brent's method.
  const double lo = kPhMaxScanFrom, hi = kPhMaxScanTo;
  if (jn >= 0 && !compound.salts.empty()) {
    std::vector<double> scan_ph;
    std::vector<std::vector<double>> scan_ratio;
    const int m = static_cast<int>(std::lround((hi - lo) / 0.05));
    for (int i = 0; i <= m; ++i) {
      const double x = lo + (hi - lo) * i / m;
      scan_ph.push_back(x);
      scan_ratio.push_back(scanner.at(x).salt_saturation_at_free);
    }
    auto lg = [](double r) { return std::log(std::max(r, 1e-300)); };
    for (std::size_t k = 0; k < compound.salts.size(); ++k) {
      const Salt& salt = compound.salts[k];
      if (!scanner.salt_can_limit(k) && salt.counterion_is_system) {
        p.notes.push_back("salt " + salt.id + " cannot limit in this medium: its counterion " +
                          counterion_label(salt, library) + " is a species of the " + salt.counterion +
                          " system, which the medium does not hold (add it to the medium, e.g. a " +
                          salt.counterion + " buffer, to include it)");
        continue;
      }
      if (!scanner.salt_can_limit(k)) {
        const Ion& x = library.ion(salt.counterion);
        const std::string t = titrant_giving(library, x);
        p.notes.push_back("salt " + salt.id + " cannot limit in this medium: its counterion " + salt.counterion +
                          " is neither in the medium nor given by the titrants" +
                          (t.empty() ? std::string() : " (hold the pH with " + t + " to include it)"));
        continue;
      }
      const std::size_t before = p.ph_max.size();
      for (std::size_t i = 0; i + 1 < scan_ph.size(); ++i) {
        const double fa = lg(scan_ratio[i][k]), fb = lg(scan_ratio[i + 1][k]);
        if (!(std::isfinite(fa) && std::isfinite(fb))) continue;
        double root;
        if (fa == 0.0) {
          root = scan_ph[i];
        } else if ((fa > 0) != (fb > 0) && fb != 0.0) {
          auto f = [&](double x) { return lg(scanner.at(x).salt_saturation_at_free[k]); };
          root = brent_root(f, scan_ph[i], scan_ph[i + 1], fa, fb, 1e-10);
        } else {
          continue;
        }
        const SolubilityAtPh at = scanner.at(root);
        PhMax m;
        m.salt = salt.id;
        m.counterion = counterion_label(salt, library);
        m.pH = root;
        m.solubility_mol_per_L = jn >= 0 ? std::min(p.s0_mol_per_L / at.fractions[jn], kSolubilityCap_mol_per_L)
                                         : at.solubility_mol_per_L;
        for (std::size_t o = 0; o < compound.salts.size(); ++o) {
          if (o != k && at.salt_saturation_at_free[o] > 1.0 + 1e-9 &&
              at.salt_saturation_at_free[o] > at.salt_saturation_at_free[k]) {
            m.on_profile = false;
          }
        }
        p.ph_max.push_back(m);
      }
      if (p.ph_max.size() == before) {
        const bool limits = scan_ratio.front()[k] > 1.0;
        p.notes.push_back("salt " + salt.id + ": no pHmax between pH " + ph_text(lo) + " and " + ph_text(hi) +
                          (limits ? " (its ion product exceeds Ksp across the whole range)"
                                  : " (it does not limit anywhere in that range)"));
      }
    }
  } else if (jn < 0 && !compound.salts.empty()) {
    p.notes.push_back("the compound has no net-neutral form: the excess solid is a salt itself, its "
                      "counterion entering with the dissolved drug; pHmax does not apply");
  }

  // Salt-to-salt transitions: where the limiting solid changes between two salts, refined by
  // Brent's method on log(D_a / D_b), the two salts' limited solubilities.
  auto salt_index = [&](const std::string& id) {
    for (std::size_t k = 0; k < compound.salts.size(); ++k) {
      if (compound.salts[k].id == id) return static_cast<int>(k);
    }
    return -1;
  };
  for (std::size_t i = 0; i + 1 < p.points.size(); ++i) {
    const ProfilePoint& a = p.points[i];
    const ProfilePoint& b = p.points[i + 1];
    const int ka = salt_index(a.limiting_solid), kb = salt_index(b.limiting_solid);
    if (ka < 0 || kb < 0 || ka == kb) continue;
    auto gap = [&](const SolubilityAtPh& x) {
      const double da = x.salt_limited_mol_per_L[ka], db = x.salt_limited_mol_per_L[kb];
      return da > 0 && db > 0 ? std::log(da / db) : std::numeric_limits<double>::quiet_NaN();
    };
    const double fa = gap(a), fb = gap(b);
    SaltTransition t;
    t.below = a.limiting_solid;
    t.above = b.limiting_solid;
    if (std::isfinite(fa) && std::isfinite(fb) && (fa > 0) != (fb > 0)) {
      auto f = [&](double x) {
        const double v = gap(scanner.at(x));
        return std::isfinite(v) ? v : 0.0;
      };
      t.pH = fa == 0.0 ? a.pH : brent_root(f, a.pH, b.pH, fa, fb, 1e-10);
    } else {
      t.pH = 0.5 * (a.pH + b.pH);  // one of them stops limiting in between: the grid's midpoint
    }
    t.solubility_mol_per_L = scanner.at(t.pH).solubility_mol_per_L;
    p.salt_transitions.push_back(t);
  }

  for (const Salt& salt : compound.salts) {
    if (!salt.solubility_in_water_mol_per_L || !salt.ksp) continue;
    DerivedKsp d;
    d.salt = salt.id;
    d.solubility_in_water = salt.solubility_in_water_text;
    d.solubility_in_water_mol_per_L = *salt.solubility_in_water_mol_per_L;
    d.reference_temperature_C = salt.ref_temperature_C;
    d.ksp = *salt.ksp;
    d.ksp_at_run_temperature = salt_ksp_at(salt, T);
    p.derived_ksp.push_back(d);
  }

  // Apparent pKa (and a stated S0 ionic strength) converted when the file was read.
  for (const std::string& note : compound.convention_notes()) p.notes.push_back(note);
  // Notes on temperature: constants used as measured.
  auto differs = [&](double t0) { return std::fabs(t0 - T) > 1e-9; };
  if (jn >= 0 && !compound.s0_dH_kJ_per_mol && differs(compound.s0_ref_temperature_C)) {
    p.notes.push_back("S0 used as measured at " + temp_text(compound.s0_ref_temperature_C) +
                      ": the compound file gives no enthalpy of solution (the profile is at " + temp_text(T) + ")");
  }
  for (int i = 0; i < n; ++i) {
    const Pka& k = sys.pkas[i];
    if (k.dH_kJ_per_mol == 0.0 && k.dCp_J_per_K_mol == 0.0 && differs(k.ref_temperature_C)) {
      p.notes.push_back("pKa " + fixed(k.value, 2) + " used as measured at " + temp_text(k.ref_temperature_C) +
                        ": the compound file gives no enthalpy of ionization");
    }
  }
  for (const Salt& salt : compound.salts) {
    if (salt.ksp && salt.dH_kJ_per_mol == 0.0 && differs(salt.ref_temperature_C)) {
      p.notes.push_back("Ksp of " + salt.id + " used as at " + temp_text(salt.ref_temperature_C) +
                        ": the compound file gives no enthalpy of dissolution");
    }
  }
  p.notes.push_back("the medium's own ions are taken as not depleted by a precipitating salt; the "
                    "titrant (" + p.acid_titrant + " or " + p.base_titrant + ") is what holds each pH");
  if (conditions.activity == ActivityModel::kIdeal) {
    p.notes.push_back("activity coefficients taken as 1 (ideal solution)");
  }

  int count = 0;
  std::string span;
  if (conditions.activity == ActivityModel::kDavies) {
    span = where_points(p.points, [](const ProfilePoint& x) { return x.ionic_strength_mol_per_L > kDaviesMaxIonicStrength; }, &count);
    if (count > 0) {
      p.warnings.push_back("ionic strength above " + fixed(kDaviesMaxIonicStrength, 1) + " mol/L at " + std::to_string(count) + " of " +
                           std::to_string(p.points.size()) + " points (" + span +
                           "): the Davies equation is outside its range there");
    }
  }
  span = where_points(p.points, [](const ProfilePoint& x) { return x.capped; }, &count);
  if (count > 0) {
    p.warnings.push_back("solubility above " + fixed(kSolubilityCap_mol_per_L, 0) + " mol/L at " +
                         std::to_string(count) + " of " + std::to_string(p.points.size()) + " points (" +
                         span + "): nothing limits there; reported at the cap");
  }
  if (T < kDataMinTemperatureC || T > kDataMaxTemperatureC) {
    p.warnings.push_back("temperature " + temp_text(T) +
                         " is outside 0-60 °C, the validity range of the water and pKa(T) data");
  }
  return p;
}

}  // namespace pkarta
