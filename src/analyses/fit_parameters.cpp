// The fit's parameters: the list a user gives (--params), the defaults, and each parameter's
// start, bounds and scale from the compound.
#include "pkarta/analyses/fit.h"

#include <Eigen/QR>
#include <Eigen/SVD>

#include <algorithm>
#include <charconv>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/chem/units.h"
#include "pkarta/analyses/levenberg_marquardt.h"
#include "pkarta/io/compound_xml_edit.h"

namespace pkarta {

namespace {

FitParameter make_s0(const Compound& c) {
  FitParameter p;
  p.kind = FitParameter::Kind::kLog10S0;
  p.name = "log10_S0_mol_per_L";
  p.start = std::log10(c.s0_mol_per_L);
  p.lower = -15.0;
  p.upper = 1.0;
  return p;
}

FitParameter make_pka(const Compound& c, int i) {
  FitParameter p;
  p.kind = FitParameter::Kind::kPka;
  p.index = i;
  p.name = "pKa" + std::to_string(i + 1);
  p.start = c.system.pkas[i].value;
  p.lower = -3.0;
  p.upper = 17.0;
  return p;
}

FitParameter make_ksp(const Compound& c, int k) {
  FitParameter p;
  p.kind = FitParameter::Kind::kLog10Ksp;
  p.index = k;
  p.name = "log10_Ksp:" + c.salts[k].id;
  p.start = std::log10(*c.salts[k].ksp);
  p.lower = -40.0;
  p.upper = 2.0;
  return p;
}

}  // namespace

std::vector<FitParameter> parse_fit_parameters(const std::string& list, const Compound& compound,
                                               const std::string& option) {
  std::vector<FitParameter> out;
  const SourceLocation at{option, 0, 0};
  std::string item;
  std::istringstream in(list);
  std::vector<std::string> items;
  while (std::getline(in, item, ',')) items.push_back(trim_space(item));
  if (items.empty()) throw InputError(at, "no parameters given (e.g. s0,pka1,ksp:hydrochloride)");
  for (const std::string& raw : items) {
    const std::string it = ascii_lower(raw);
    FitParameter p;
    if (it == "s0") {
      if (!compound.has_intrinsic_solubility) {
        throw InputError(at, "'s0': compound '" + compound.id + "' has no intrinsic solubility "
                             "(no net-neutral form)");
      }
      p = make_s0(compound);
    } else if (it.rfind("pka", 0) == 0 && it.size() > 3 &&
               it.find_first_not_of("0123456789", 3) == std::string::npos) {
      const int n = static_cast<int>(compound.system.pkas.size());
      // The whole digit string is the index: "pka4294967297" is not pka1 (no wrap-around).
      long long k = 0;
      const auto [ptr, ec] = std::from_chars(it.data() + 3, it.data() + it.size(), k);
      if (ec != std::errc() || ptr != it.data() + it.size()) k = -1;
      if (k < 1 || k > n) {
        throw InputError(at, "'" + raw + "': compound '" + compound.id + "' has " + std::to_string(n) +
                                 " pKa value" + (n == 1 ? "" : "s") + " (pka1" +
                                 (n > 1 ? "..pka" + std::to_string(n) : "") + ")");
      }
      p = make_pka(compound, static_cast<int>(k - 1));
    } else if (it.rfind("ksp:", 0) == 0) {
      const std::string id = trim_space(raw.substr(4));
      int found = -1;
      for (std::size_t k = 0; k < compound.salts.size(); ++k) {
        if (compound.salts[k].id == id) found = static_cast<int>(k);
      }
      if (found < 0) {
        std::vector<std::string> ids;
        for (const Salt& s : compound.salts) ids.push_back(s.id);
        throw InputError(at, "'" + raw + "': compound '" + compound.id + "' has no salt '" + id + "'" +
                                 (ids.empty() ? " (it has no salts)" : " (salts: " + join_strings(ids, ", ") + ")"));
      }
      if (!compound.salts[found].ksp) throw InputError(at, "'" + raw + "': the salt has no Ksp to start from");
      p = make_ksp(compound, found);
    } else {
      throw InputError(at, "unknown parameter '" + raw + "', expected s0, pka1..pkaN or ksp:SALT");
    }
    for (const FitParameter& q : out) {
      if (q.name == p.name) throw InputError(at, "parameter '" + raw + "' is given twice");
    }
    out.push_back(p);
  }
  return out;
}

std::vector<FitParameter> default_fit_parameters(const Compound& compound, const Library& library,
                                                 const std::vector<FitPoint>& points,
                                                 const FitOptions& options) {
  std::vector<FitParameter> out;
  if (compound.has_intrinsic_solubility) out.push_back(make_s0(compound));
  for (int i = 0; i < static_cast<int>(compound.system.pkas.size()); ++i) out.push_back(make_pka(compound, i));
  std::vector<bool> limits(compound.salts.size(), false);
  ProfileConditions cond = options.conditions;
  for (const FitPoint& p : points) {
    cond.temperature_C = p.temperature_C;
    const SolubilityAtPh s = solubility_at_pH(compound, library, p.pH, cond);
    for (std::size_t k = 0; k < compound.salts.size(); ++k) {
      if (s.limiting_solid == compound.salts[k].id) limits[k] = true;
    }
  }
  for (std::size_t k = 0; k < compound.salts.size(); ++k) {
    if (limits[k] && compound.salts[k].ksp) out.push_back(make_ksp(compound, static_cast<int>(k)));
  }
  return out;
}

}  // namespace pkarta
