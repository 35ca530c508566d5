// Screen criteria helpers: practical strengths, a route's common practice, near misses.
#include <algorithm>
#include <cmath>
#include <limits>

#include "pkarta/analyses/mix.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {
constexpr double kInf = std::numeric_limits<double>::infinity();

// Common practice for a route (not rules): buffer strengths above max_strength and osmolality
// estimates above max_osmolality are flagged.
struct RouteLimits {
  const char* route;
  double max_strength_mol_per_L;
  double max_osmolality_mOsm_per_kg;
};
constexpr RouteLimits kRouteLimits[] = {{"parenteral", 0.05, 600.0}, {"ophthalmic", 0.05, 600.0}};

}  // namespace

std::vector<std::string> screen_route_flags(const std::string& route, const ScreenResult& r, double temperature_C) {
  std::vector<std::string> flags;
  for (const RouteLimits& l : kRouteLimits) {
    if (route != l.route) continue;
    if (r.conc_used_mol_per_L > l.max_strength_mol_per_L * (1 + 1e-9)) {
      flags.push_back("strength " + sig(1e3 * r.conc_used_mol_per_L, 3) + " mM is above the " +
                      sig(1e3 * l.max_strength_mol_per_L, 3) + " mM common for " + route +
                      " products (common practice, not a rule)");
    }
    const double osm = kOsmoticCoefficient * r.osmolarity_mOsm_per_L / water_density_kg_per_L(temperature_C);
    if (osm > l.max_osmolality_mOsm_per_kg) {
      flags.push_back("osmolality estimate " + fixed(osm, 0) + " mOsm/kg is above the " +
                      fixed(l.max_osmolality_mOsm_per_kg, 0) + " mOsm/kg usual for " + route +
                      " products (common practice, not a rule)");
    }
  }
  return flags;
}

double round_up_strength(double min_conc, double max_conc, double step) {
  double v;
  if (step > 0) {
    v = std::ceil(min_conc / step * (1 - 1e-9)) * step;
    if (v < min_conc) v += step;
  } else {
    v = 1e-3;
    const double mults[] = {1.0, 2.0, 5.0};
    for (int decade = -3; decade <= 3 && v < min_conc * (1 - 1e-9); ++decade) {
      for (double m : mults) {
        v = m * std::pow(10.0, decade);
        if (v >= min_conc * (1 - 1e-9)) break;
      }
    }
    v = std::max(v, min_conc);
  }
  return std::min(v, max_conc);
}

std::string screen_criterion_value_text(const ScreenCriterion& c) {
  if (!std::isfinite(c.value)) return "n/a";
  if (c.id == "min-capacity") return sig(1e3 * c.value, 3) + " mM/pH";
  if (c.id == "storage-drift") return fixed(c.value, 3) + " pH";
  return "pH " + fixed(c.value, 3);
}

void write_screen_near_misses(const ScreenReport& rep, std::ostream& out) {
  for (const ScreenResult& r : rep.results) {
    if (r.status == ScreenStatus::kOk) return;
  }
  std::vector<const ScreenResult*> near;
  for (const ScreenResult& r : rep.results) {
    if (r.status != ScreenStatus::kOutsideRange && std::isfinite(r.pH_drift)) near.push_back(&r);
  }
  // How far a buffer misses at max-conc: the largest distance of a failing criterion's value
  // beyond its limits (pH units for the pH criteria), then the pH deviation after the dose.
  auto miss = [](const ScreenResult* r) {
    double m = 0.0;
    for (const ScreenCriterion& c : r->criteria) {
      if (c.pass) continue;
      if (!std::isfinite(c.value)) return kInf;
      const double d = c.value < c.limit_low ? c.limit_low - c.value : c.value - c.limit_high;
      m = std::max(m, c.id == "min-capacity" ? d / std::max(c.limit_low, 1e-30) : d);
    }
    return m;
  };
  std::stable_sort(near.begin(), near.end(), [&](const ScreenResult* a, const ScreenResult* b) {
    const double ma = miss(a), mb = miss(b);
    if (ma != mb) return ma < mb;
    return std::fabs(a->pH_drift) < std::fabs(b->pH_drift);
  });
  out << "\n  no buffer is ok";
  if (near.empty()) {
    out << " and none has a pKa within 1 of the target\n";
    return;
  }
  out << "; closest candidates at their max-conc:\n";
  for (std::size_t k = 0; k < near.size() && k < 3; ++k) {
    const ScreenResult& r = *near[k];
    std::string fails;
    for (const ScreenCriterion& c : r.criteria) {
      if (!c.pass) fails += (fails.empty() ? "" : ", ") + c.id + " (" + screen_criterion_value_text(c) + ")";
    }
    if (r.status == ScreenStatus::kDoseNotSoluble) fails += (fails.empty() ? "" : ", ") + std::string("dose not soluble");
    out << "  " << r.buffer << " " << sig(1e3 * r.max_conc_mol_per_L, 3) << " mM: pH after drug "
        << fixed(r.pH_after_drug, 3) << " (" << (r.pH_drift >= 0 ? "+" : "") << fixed(r.pH_drift, 3)
        << "); fails " << (fails.empty() ? "none" : fails) << "\n";
  }
}

}  // namespace pkarta
