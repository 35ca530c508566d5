#include "pkarta/analyses/recipe.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>

#include "pkarta/base/format.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/units.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

// What one mole of a reagent brings: moles of the buffer's system, and the net charge, the
// sum of count * z^2 and the number of its strong ions.
struct ReagentInfo {
  const Reagent* reagent = nullptr;
  double n_system = 0.0;
  double charge = 0.0;
  double z2 = 0.0;
  double particles = 0.0;
};

ReagentInfo reagent_info(const Library& library, const std::string& id, const std::string& system) {
  ReagentInfo info;
  info.reagent = &library.reagent(id);
  for (const Contribution& c : info.reagent->gives) {
    if (c.kind == Contribution::Kind::kSystem) {
      if (c.id != system) {
        throw InputError(SourceLocation{"reagents", 0, 0},
                         "reagent '" + id + "' gives the " + c.id + " system, not " + system);
      }
      info.n_system += c.count;
    } else {
      const Ion& ion = library.ion(c.id);
      info.charge += c.count * ion.charge;
      info.z2 += c.count * ion.charge * ion.charge;
      info.particles += c.count;
    }
  }
  return info;
}

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

// The unknown amounts for one ionic-strength-consistent solve.
struct Split {
  double a = 0.0;        // first reagent, mol/L (two-reagent mode) or the single reagent
  double b = 0.0;        // second reagent, mol/L (two-reagent mode)
  double t = 0.0;        // titrant, mol/L (titrant mode)
  const ReagentInfo* titrant = nullptr;
  bool converged = false;
};

class Solver {
 public:
  Solver(const Library& library, const RecipeOptions& o, const Buffer& buffer) : options_(o) {
    alone_.temperature_C = o.temperature_C;
    alone_.activity = o.activity;
    alone_.add_system(library.system(buffer.system), o.conc_mol_per_L);
  }

  // Two reagents A, B: n_a a + n_b b = C and z_a a + z_b b + q + s z_s = 0.
  Split two(const ReagentInfo& A, const ReagentInfo& B, const ReagentInfo& salt, double s) const {
    return iterate([&](double q, Split& x) {
      const double det = A.n_system * B.charge - B.n_system * A.charge;
      const double rhs = -(q + s * salt.charge);
      x.a = (options_.conc_mol_per_L * B.charge - B.n_system * rhs) / det;
      x.b = (A.n_system * rhs - A.charge * options_.conc_mol_per_L) / det;
      return 0.5 * (std::max(x.a, 0.0) * A.z2 + std::max(x.b, 0.0) * B.z2 + s * salt.z2);
    });
  }

  // One reagent R at C / n_R plus the acid or base titrant that closes the charge balance.
  Split one(const ReagentInfo& R, const ReagentInfo& acid, const ReagentInfo& base, const ReagentInfo& salt,
            double s) const {
    return iterate([&](double q, Split& x) {
      x.a = options_.conc_mol_per_L / R.n_system;
      const double residual = q + R.charge * x.a + s * salt.charge;  // > 0: anions needed
      x.titrant = residual > 0 ? &acid : &base;
      x.t = -residual / x.titrant->charge;
      return 0.5 * (x.a * R.z2 + x.t * x.titrant->z2 + s * salt.z2);
    });
  }

 private:
  // Fixed point on the ionic strength: `amounts(q, split)` fills the split from the charge q of
  // the system species (with H+ and OH-) at the target pH and returns the strong ions' share.
  template <typename F>
  Split iterate(F&& amounts) const {
    EquilibriumModel model(alone_);
    Split x;
    x.converged = balance_charge_at_pH(model, options_.pH, options_.activity == ActivityModel::kIdeal,
                                       [&](double q) { return amounts(q, x); });
    return x;
  }

  const RecipeOptions& options_;
  Mixture alone_;
};

RecipeReagent line(const ReagentInfo& info, const std::string& role, double conc, double volume_L) {
  RecipeReagent r;
  r.id = info.reagent->id;
  r.name = info.reagent->name;
  r.formula = info.reagent->formula;
  r.state = info.reagent->state;
  r.role = role;
  r.molar_mass_g_per_mol = info.reagent->molar_mass_g_per_mol;
  r.conc_mol_per_L = conc;
  r.amount_mol = conc * volume_L;
  r.mass_g = r.amount_mol * r.molar_mass_g_per_mol;
  return r;
}

double ph_of(const Library& library, const std::string& reagent, double conc, const RecipeOptions& o) {
  Mixture m;
  m.temperature_C = o.temperature_C;
  m.activity = o.activity;
  add_reagent(m, library, reagent, conc);
  return solve(m).pH;
}

const char* kTonicityMethod =
    "NaCl added until the osmolality estimate reaches 290 mOsm/kg: ideal osmolarity of every "
    "dissolved species x osmotic coefficient 0.93 (NaCl at physiological strength) / density of "
    "water, solved together with the buffer split. An estimate: the osmolality must be measured "
    "(freezing-point or vapour-pressure osmometer) and the NaCl adjusted.";

}  // namespace

bool RecipeOptions::is_valid(std::string* error) const {
  auto fail = [&](const char* field, double v, const char* rule) {
    *error = std::string("RecipeOptions::") + field + " = " + fmt("%g", v) + ", must be " + rule;
    return false;
  };
  if (buffer.empty()) {
    *error = "RecipeOptions::buffer is empty, must name a library buffer";
    return false;
  }
  if (!(pH >= 0.0 && pH <= 14.0)) return fail("pH", pH, "within 0 to 14");
  if (!(conc_mol_per_L > 0.0 && conc_mol_per_L <= 10.0)) return fail("conc_mol_per_L", conc_mol_per_L, "within 0 to 10");
  if (!(volume_L > 0.0 && std::isfinite(volume_L))) return fail("volume_L", volume_L, "> 0");
  if (!(temperature_C >= -10.0 && temperature_C <= 100.0)) return fail("temperature_C", temperature_C, "within -10 to 100");
  if (!(titrant_conc_mol_per_L > 0.0)) return fail("titrant_conc_mol_per_L", titrant_conc_mol_per_L, "> 0");
  if (reagents.size() > 2) return fail("reagents.size()", static_cast<double>(reagents.size()), "0, 1 or 2");
  if (use_titrant && reagents.size() == 2) {
    *error = "RecipeOptions::use_titrant takes one reagent, 2 were given";
    return false;
  }
  return true;
}

Recipe make_recipe(const Library& library, const RecipeOptions& o) {
  std::string err;
  if (!o.is_valid(&err)) throw InputError(err);
  const Buffer* found = nullptr;
  try {
    found = &library.buffer(o.buffer);
  } catch (const InputError& e) {
    throw InputError(SourceLocation{"buffer", 0, 0}, e.message());
  }
  const Buffer& buffer = *found;
  Recipe out;
  out.buffer = buffer.id;
  out.buffer_name = buffer.name;
  out.system = buffer.system;
  out.target_pH = o.pH;
  out.conc_mol_per_L = o.conc_mol_per_L;
  out.volume_L = o.volume_L;
  out.temperature_C = o.temperature_C;
  out.activity = o.activity;

  std::vector<std::string> ids = o.reagents;
  if (ids.empty()) {
    if (!buffer.acid_reagent.empty()) ids.push_back(buffer.acid_reagent);
    if (!buffer.base_reagent.empty() && !(o.use_titrant && !ids.empty())) ids.push_back(buffer.base_reagent);
  }
  if (ids.empty()) {
    throw InputError(SourceLocation{"reagents", 0, 0},
                     "buffer '" + buffer.id + "' names no reagent in the library; give the reagents to weigh");
  }
  std::vector<ReagentInfo> infos;
  for (const std::string& id : ids) {
    ReagentInfo info = reagent_info(library, id, buffer.system);
    if (!(info.n_system > 0)) {
      throw InputError(SourceLocation{"reagents", 0, 0}, "reagent '" + id + "' does not carry the " +
                                                             buffer.system + " system of buffer '" + buffer.id + "'");
    }
    infos.push_back(info);
  }
  const ReagentInfo salt = reagent_info(library, o.tonicity_reagent, buffer.system);
  if (salt.n_system > 0 || !(salt.particles > 0)) {
    throw InputError(SourceLocation{"isotonic", 0, 0},
                     "tonicity reagent '" + o.tonicity_reagent + "' must give strong ions only");
  }
  const bool two = infos.size() == 2;
  ReagentInfo acid, base;
  if (!two) {
    acid = reagent_info(library, buffer.acid_titrant, buffer.system);
    base = reagent_info(library, buffer.base_titrant, buffer.system);
    if (acid.n_system > 0 || !(acid.charge < 0) || base.n_system > 0 || !(base.charge > 0)) {
      throw InputError(SourceLocation{"buffer", 0, 0},
                       "buffer '" + buffer.id + "': its titrants must be a strong acid and a strong base");
    }
  } else {
    // Acid form first: the reagent bringing less positive charge per mole of system.
    if (infos[0].charge / infos[0].n_system > infos[1].charge / infos[1].n_system) std::swap(infos[0], infos[1]);
    if (infos[0].charge / infos[0].n_system == infos[1].charge / infos[1].n_system) {
      throw InputError(SourceLocation{"reagents", 0, 0}, "reagents '" + infos[0].reagent->id + "' and '" + infos[1].reagent->id +
                       "' bring the same charge per mole of " + buffer.system +
                       ": give an acid-form and a base-form reagent, or one reagent with a titrant");
    }
  }

  Solver solver(library, o, buffer);
  const double rho = water_density_kg_per_L(o.temperature_C);
  double s = 0.0;  // tonicity salt, mol/L
  Split split;
  Equilibrium e;
  bool hypertonic = false;
  for (int round = 0; round < 60; ++round) {
    split = two ? solver.two(infos[0], infos[1], salt, s) : solver.one(infos[0], acid, base, salt, s);
    if (!split.converged) throw std::runtime_error("the recipe's ionic strength did not converge");
    if (two && (split.a < 0 || split.b < 0)) {
      const double lo = ph_of(library, infos[0].reagent->id, o.conc_mol_per_L / infos[0].n_system, o);
      const double hi = ph_of(library, infos[1].reagent->id, o.conc_mol_per_L / infos[1].n_system, o);
      throw InputError(SourceLocation{"pH", 0, 0}, "pH " + fmt("%.2f", o.pH) + " lies outside what " + infos[0].reagent->id + " and " +
                       infos[1].reagent->id + " alone reach at this strength (pH " + fmt("%.2f", lo) + " to " +
                       fmt("%.2f", hi) + " at " + fmt("%.1f", o.temperature_C) +
                       " °C); use one reagent with a titrant instead");
    }
    out.reagents.clear();
    if (two) {
      out.reagents.push_back(line(infos[0], "acid form", split.a, o.volume_L));
      out.reagents.push_back(line(infos[1], "base form", split.b, o.volume_L));
      out.titrant.reset();
    } else {
      out.reagents.push_back(line(infos[0], "buffer", split.a, o.volume_L));
      RecipeTitrant t;
      t.id = split.titrant->reagent->id;
      t.name = split.titrant->reagent->name;
      t.conc_mol_per_L = o.titrant_conc_mol_per_L;
      t.amount_mol = split.t * o.volume_L;
      t.volume_mL = 1000.0 * t.amount_mol / t.conc_mol_per_L;
      out.titrant = t;
    }
    if (s > 0) out.reagents.push_back(line(salt, "tonicity", s, o.volume_L));
    e = solve(recipe_mixture(library, out, o.activity));
    if (!e.usable()) throw std::runtime_error("the recipe's equilibrium did not converge: " + e.message);
    if (!o.isotonic) break;
    // Osmolality estimate phi * osmolarity / rho = target: the salt's particles make up the rest.
    const double want_mOsm_per_L =
        kIsotonicTarget_mOsm_per_kg * rho / kOsmoticCoefficient - o.other_solutes_mOsm_per_L;
    const double s_new =
        std::max(0.0, s + (want_mOsm_per_L - e.osmolarity_mOsm_per_L) / 1000.0 / salt.particles);
    if (s == 0.0 && s_new == 0.0) {
      hypertonic = true;
      break;
    }
    if (std::fabs(s_new - s) <= 1e-12) break;
    s = s_new;
  }

  out.pH = e.pH;
  out.ionic_strength_mol_per_L = e.ionic_strength_mol_per_L;
  out.osmolarity_mOsm_per_L = e.osmolarity_mOsm_per_L;
  out.osmolality_estimate_mOsm_per_kg = kOsmoticCoefficient * e.osmolarity_mOsm_per_L / rho;
  const Mixture made = recipe_mixture(library, out, o.activity);  // the reagents as finally weighed
  out.capacity_mol_per_L_per_pH = buffer_capacity(made);
  out.isotonic = o.isotonic;
  if (o.isotonic) {
    out.tonicity_method = kTonicityMethod;
    if (o.tonicity_reagent != "NaCl") {
      // The same sizing with another reagent: name it.
      std::string m = kTonicityMethod;
      for (std::size_t at = m.find("NaCl"); at != std::string::npos; at = m.find("NaCl", at + o.tonicity_reagent.size())) {
        if (m.compare(at, 19, "NaCl at physiologic") == 0) continue;
        m.replace(at, 4, o.tonicity_reagent);
      }
      out.tonicity_method = m;
    }
  }
  if (hypertonic) {
    out.warnings.push_back("the buffer alone is already above 290 mOsm/kg (estimate " +
                           fmt("%.0f", out.osmolality_estimate_mOsm_per_kg) + "): no NaCl added");
  }
  if (std::fabs(out.pH - o.pH) > 1e-6) {
    out.warnings.push_back("the solved recipe gives pH " + fmt("%.4f", out.pH) + ", not the target");
  }
  for (const std::string& w : e.warnings) out.warnings.push_back(w);
  // Where Davies is known to drift the activity models part: the pH the same weights give under
  // the two models made for that range, what the pH meter may show before the adjustment.
  if (std::string w = recipe_activity_warning(made, e); !w.empty()) out.warnings.push_back(std::move(w));
  for (const RecipeReagent& r : out.reagents) {
    if (r.state == "liquid") {
      out.notes.push_back(r.id + " is a liquid: weigh it, or convert the mass to a volume with its density");
    } else if (r.state == "solution") {
      out.notes.push_back(r.id + " is usually supplied as a solution: the mass is of the pure substance; "
                          "take the equivalent amount of a stock of known assay");
    }
  }
  if (out.titrant && out.titrant->volume_mL > 0.5 * 1000.0 * o.volume_L) {
    out.warnings.push_back("the titrant volume exceeds half the final volume: use a stronger titrant");
  }
  return out;
}

std::string recipe_activity_warning(const Mixture& mixture, const Equilibrium& e) {
  const std::string hint = activity_model_hint(mixture, e);
  return hint.empty() ? hint : hint + ". Expect to adjust the pH, or size the recipe with --activity ion-pairs";
}

Mixture recipe_mixture(const Library& library, const Recipe& recipe, ActivityModel activity) {
  Mixture m;
  m.temperature_C = recipe.temperature_C;
  m.activity = activity;
  for (const RecipeReagent& r : recipe.reagents) add_reagent(m, library, r.id, r.conc_mol_per_L);
  if (recipe.titrant && recipe.titrant->amount_mol > 0) {
    add_reagent(m, library, recipe.titrant->id, recipe.titrant->amount_mol / recipe.volume_L);
  }
  return m;
}

double parse_volume_L(std::string_view text) {
  std::string_view t = text;
  while (!t.empty() && (t.front() == ' ' || t.front() == '\t')) t.remove_prefix(1);
  while (!t.empty() && (t.back() == ' ' || t.back() == '\t')) t.remove_suffix(1);
  std::size_t i = 0;
  while (i < t.size() && (std::isdigit(static_cast<unsigned char>(t[i])) || t[i] == '.' || t[i] == '+' ||
                          t[i] == '-' || ((t[i] == 'e' || t[i] == 'E') && i + 1 < t.size() &&
                                          (std::isdigit(static_cast<unsigned char>(t[i + 1])) || t[i + 1] == '-')))) {
    ++i;
  }
  std::string_view unit = t.substr(i);
  while (!unit.empty() && unit.front() == ' ') unit.remove_prefix(1);
  if (i == 0) {
    throw InputError("volume \"" + std::string(text) + "\" has no number; expected e.g. 1L or 500mL");
  }
  const double v = parse_number(t.substr(0, i), "volume");
  if (unit.empty()) {
    throw InputError("volume \"" + std::string(text) + "\" has no unit; expected e.g. 1L or 500mL");
  }
  double factor;
  if (unit == "L" || unit == "l") factor = 1.0;
  else if (unit == "mL" || unit == "ml") factor = 1e-3;
  else if (unit == "uL" || unit == "ul" || unit == "\xC2\xB5L") factor = 1e-6;
  else {
    throw InputError("unknown volume unit \"" + std::string(unit) + "\" in \"" + std::string(text) +
                     "\"; expected L, mL or uL");
  }
  if (!(v > 0)) throw InputError("volume \"" + std::string(text) + "\" must be > 0");
  return v * factor;
}

}  // namespace pkarta
