#include "pkarta/analyses/classify.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "pkarta/base/format.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/analyses/profile.h"

namespace pkarta {

namespace {

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

constexpr double kMinimumTolerance_pH = 1e-6;

}  // namespace

bool ClassifyOptions::is_valid(std::string* error) const {
  auto fail = [&](const std::string& field, double v, const std::string& rule) {
    *error = "ClassifyOptions::" + field + " = " + num(v) + ", " + rule;
    return false;
  };
  if (!(std::isfinite(dose_mg) && dose_mg > 0)) return fail("dose_mg", dose_mg, "must be > 0");
  if (!(std::isfinite(volume_mL) && volume_mL > 0)) return fail("volume_mL", volume_mL, "must be > 0");
  if (!(std::isfinite(temperature_C) && temperature_C >= -10 && temperature_C <= 100)) {
    return fail("temperature_C", temperature_C, "must lie in -10 to 100");
  }
  if (!(std::isfinite(from_pH) && from_pH >= -1 && from_pH <= 15)) return fail("from_pH", from_pH, "must lie in -1 to 15");
  if (!(std::isfinite(to_pH) && to_pH >= from_pH && to_pH <= 15)) {
    return fail("to_pH", to_pH, "must lie in from_pH to 15");
  }
  if (!(std::isfinite(scan_step_pH) && scan_step_pH > 0 && scan_step_pH <= 0.1)) {
    return fail("scan_step_pH", scan_step_pH, "must lie in (0, 0.1]");
  }
  return true;
}

ClassifyResult classify(const Compound& compound, const Library& library, const ClassifyOptions& o) {
  std::string err;
  if (!o.is_valid(&err)) throw InputError(err);
  ClassifyResult r;
  r.guideline = "ICH M9 (2019), Biopharmaceutics Classification System-based Biowaivers, section 2.1: "
                "highly soluble when the highest single therapeutic dose dissolves completely in "
                "250 mL or less of aqueous media over pH 1.2-6.8 at 37 ± 1 °C";
  r.compound_id = compound.id;
  r.compound_name = compound.name;
  r.form = o.form.empty() ? "free" : o.form;
  r.form_molar_mass_g_per_mol = form_molar_mass(compound, r.form, library);
  r.dose_mg = o.dose_mg;
  r.volume_mL = o.volume_mL;
  r.temperature_C = o.temperature_C;
  r.from_pH = o.from_pH;
  r.to_pH = o.to_pH;
  const double mf = r.form_molar_mass_g_per_mol;
  r.dose_mol_per_L = o.dose_mg / mf / o.volume_mL;  // mmol per mL
  r.dose_mg_per_mL = o.dose_mg / o.volume_mL;

  ProfileConditions cond = ProfileConditions::in_water(o.temperature_C, o.activity);
  cond.acid_titrant = o.acid_titrant;
  cond.base_titrant = o.base_titrant;
  const Profile scan = compute_profile(compound, library, cond, ProfileGrid::range(o.from_pH, o.to_pH, o.scan_step_pH));
  SolubilityScanner scanner(compound, library, cond);

  // Lowest point of the scan (the last grid point may fall short of to_pH: add it).
  std::vector<std::pair<double, double>> s;  // pH, solubility
  for (const ProfilePoint& p : scan.points) s.emplace_back(p.pH, p.solubility_mol_per_L);
  if (s.back().first < o.to_pH - 1e-9) s.emplace_back(o.to_pH, scanner.at(o.to_pH).solubility_mol_per_L);
  std::size_t imin = 0;
  for (std::size_t i = 1; i < s.size(); ++i) {
    if (s[i].second < s[imin].second) imin = i;
  }
  // Golden-section refinement between the neighbours of the lowest grid point.
  double a = s[imin > 0 ? imin - 1 : 0].first, b = s[std::min(imin + 1, s.size() - 1)].first;
  double best_pH = s[imin].first, best = s[imin].second;
  if (b > a) {
    auto f = [&](double x) { return scanner.at(x).solubility_mol_per_L; };
    const double g = 0.5 * (std::sqrt(5.0) - 1.0);
    double x1 = b - g * (b - a), x2 = a + g * (b - a);
    double f1 = f(x1), f2 = f(x2);
    while (b - a > kMinimumTolerance_pH) {
      if (f1 < f2) {
        b = x2; x2 = x1; f2 = f1;
        x1 = b - g * (b - a);
        f1 = f(x1);
      } else {
        a = x1; x1 = x2; f1 = f2;
        x2 = a + g * (b - a);
        f2 = f(x2);
      }
    }
    for (double x : {x1, x2}) {
      const double v = f(x);
      if (v < best) {
        best = v;
        best_pH = x;
      }
    }
  }
  r.min_at_pH = best_pH;
  r.min_solubility_mol_per_L = best;
  r.min_solubility_mg_per_mL = best * mf;
  r.dose_solubility_volume_mL = o.dose_mg / r.min_solubility_mg_per_mL;
  r.verdict = r.dose_mol_per_L <= best ? "high" : "low";

  auto point = [&](const std::string& label, double pH) {
    const SolubilityAtPh at = scanner.at(pH);
    ClassifyPoint p;
    p.label = label;
    p.pH = pH;
    p.solubility_mol_per_L = at.solubility_mol_per_L;
    p.solubility_mg_per_mL = at.solubility_mol_per_L * mf;
    p.dose_number = r.dose_mol_per_L / at.solubility_mol_per_L;
    p.limiting_solid = at.limiting_solid;
    return p;
  };
  for (double anchor : {1.2, 4.5, 6.8}) {
    if (anchor >= o.from_pH - 1e-9 && anchor <= o.to_pH + 1e-9) r.points.push_back(point("pH " + fixed(anchor, 1), anchor));
  }
  for (double pka : scan.pka_at_temperature) {
    if (pka > o.from_pH && pka < o.to_pH) r.points.push_back(point("pKa " + fixed(pka, 2), pka));
  }
  r.points.push_back(point("minimum", best_pH));

  char conv[512];
  std::snprintf(conv, sizeof conv,
                "equilibrium solubility with excess solid in water, the pH held by %s or %s (salts "
                "limit where their counterion comes with the titrant), %s activities, scanned every "
                "%g pH over %g-%g with the minimum refined to 1e-6 pH; D0 = (dose / %g mL) / S; "
                "high when D0 <= 1 at the minimum",
                o.acid_titrant.c_str(), o.base_titrant.c_str(),
                o.activity == ActivityModel::kIdeal ? "ideal" : activity_model_label(o.activity).c_str(), o.scan_step_pH, o.from_pH, o.to_pH,
                o.volume_mL);
  r.convention = conv;
  r.notes = scan.notes;
  r.warnings = scan.warnings;
  for (const PhMax& m : scan.ph_max) {
    if (m.on_profile) {
      r.notes.push_back("pHmax of " + m.salt + " at pH " + fixed(m.pH, 2) + " (the limiting solid changes there)");
    }
  }
  if (std::fabs(o.temperature_C - 37.0) > 1.0) {
    r.warnings.push_back("temperature " + fixed(o.temperature_C, 1) + " °C: ICH M9 asks for 37 ± 1 °C");
  }
  if (std::fabs(o.volume_mL - 250.0) > 1e-9) {
    r.warnings.push_back("volume " + num(o.volume_mL) + " mL: ICH M9 uses 250 mL");
  }
  if (o.from_pH > 1.2 + 1e-9 || o.to_pH < 6.8 - 1e-9) {
    r.warnings.push_back("the pH range " + num(o.from_pH) + "-" + num(o.to_pH) +
                         " does not cover ICH M9's 1.2-6.8");
  }

  if (o.check_media) {
    for (const char* id : kClassifyMedia) {
      auto it = library.media.find(id);
      if (it == library.media.end()) continue;
      MediumCheck mc;
      mc.medium = id;
      mc.name = it->second.name;
      mc.nominal_pH = it->second.nominal_pH;
      Mixture m;
      m.temperature_C = o.temperature_C;
      m.activity = o.activity;
      add_medium(m, library, id);
      add_drug(m, library, compound, r.dose_mol_per_L, r.form);
      const Equilibrium e = solve(m);
      mc.usable = e.usable() && e.drug.has_value();
      if (mc.usable) {
        mc.pH_after = e.pH;
        mc.dissolved_fraction = e.drug->dissolved_mol_per_L / r.dose_mol_per_L;
        mc.solid = e.drug->solid;
        if (r.verdict == "high" && mc.solid != "none") {
          r.warnings.push_back("the dose does not dissolve completely in " + mc.medium + " (pH " +
                               fixed(mc.pH_after, 2) + " after the dose, solid " + mc.solid +
                               "): the medium does not hold its pH or brings a common ion; ICH M9 asks "
                               "for the pH to be verified after adding the drug");
        }
      } else {
        r.warnings.push_back("the dose in " + mc.medium + " could not be equilibrated: " + e.message);
      }
      r.media.push_back(mc);
    }
    bool all_dissolve = !r.media.empty();
    for (const MediumCheck& mc : r.media) all_dissolve = all_dissolve && mc.usable && mc.solid == "none";
    if (r.verdict == "low" && all_dissolve) {
      r.notes.push_back("the dose dissolves completely in every pharmacopeial medium checked; the scan "
                        "(pH held exactly, the lower ionic strength of water, every pH of the range) is "
                        "the stricter test and decides");
    }
  }
  return r;
}

}  // namespace pkarta
