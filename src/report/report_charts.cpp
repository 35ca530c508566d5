// The report's charts: pH-solubility profile, species, drift with the buffer strength, dilution.
#include <algorithm>
#include <cmath>
#include <map>
#include <sstream>

#include "pkarta/base/format.h"
#include "report_internal.h"

namespace pkarta {
namespace report_internal {

namespace {

// "H2A2+" -> "H₂A²⁺" for display.
std::string pretty_species(const std::string& label) {
  static const char* const kSub[10] = {"\u2080", "\u2081", "\u2082", "\u2083", "\u2084",
                                       "\u2085", "\u2086", "\u2087", "\u2088", "\u2089"};
  static const char* const kSup[10] = {"\u2070", "\u00B9", "\u00B2", "\u00B3", "\u2074",
                                       "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
  std::string out;
  const std::size_t a = label.find('A');
  for (std::size_t i = 0; i < label.size(); ++i) {
    const char ch = label[i];
    if (ch >= '0' && ch <= '9') out += (a != std::string::npos && i > a) ? kSup[ch - '0'] : kSub[ch - '0'];
    else if (ch == '+' && i > a) out += "\u207A";
    else if (ch == '-' && i > a) out += "\u207B";
    else out += ch;
  }
  return out;
}

// Salt runs along the profile: contiguous pH ranges where a salt limits.
struct Run {
  std::string solid;
  double from, to;
};
std::vector<Run> salt_runs(const std::vector<ProfilePoint>& profile) {
  std::vector<Run> runs;
  for (std::size_t i = 0; i < profile.size(); ++i) {
    const std::string& s = profile[i].limiting_solid;
    if (s == "free" || s == "none") continue;
    const double lo = i > 0 ? 0.5 * (profile[i - 1].pH + profile[i].pH) : profile[i].pH;
    const double hi = i + 1 < profile.size() ? 0.5 * (profile[i].pH + profile[i + 1].pH) : profile[i].pH;
    if (!runs.empty() && runs.back().solid == s && std::fabs(runs.back().to - lo) < 1e-9) runs.back().to = hi;
    else runs.push_back({s, lo, hi});
  }
  return runs;
}

}  // namespace

svg::Chart profile_chart(const ReportData& d) {
  const Compound& c = d.compound;
  const double mm = d.free_molar_mass_g_per_mol;
  svg::Chart ch;
  ch.id = "chart-profile";
  ch.title = "pH-solubility of " + c.name + " in water at " + fixed(d.request.temperature_C, 1) + " °C";
  ch.x = {"pH", d.request.profile_from_pH, d.request.profile_to_pH, svg::Scale::kLinear, 1.0, 0};
  double lo = 1e300, hi = 0;
  svg::Series model{"model (Davies activities, salt limits)", {}, {}, svg::SeriesKind::kLine, 0, 3.0, true};
  svg::Series ideal{"Henderson-Hasselbalch, ideal (no salt limit)", {}, {}, svg::SeriesKind::kLine, 6, 2.0};
  for (const ProfilePoint& s : d.profile.points) {
    model.x.push_back(s.pH);
    model.y.push_back(s.solubility_mol_per_L);
    ideal.x.push_back(s.pH);
    ideal.y.push_back(s.ideal_solubility_mol_per_L);
    if (s.solubility_mol_per_L > 0) {
      lo = std::min(lo, s.solubility_mol_per_L);
      hi = std::max(hi, s.solubility_mol_per_L);
    }
  }
  ch.series.push_back(model);
  ch.series.push_back(ideal);
  if (!c.measured.empty()) {
    svg::Series meas{"measured (compound file)", {}, {}, svg::SeriesKind::kMarkers, 1};
    for (const MeasuredPoint& m : c.measured) {
      meas.x.push_back(m.pH);
      meas.y.push_back(m.solubility_mol_per_L);
      lo = std::min(lo, m.solubility_mol_per_L);
      hi = std::max(hi, m.solubility_mol_per_L);
    }
    ch.series.push_back(meas);
  }
  if (d.uncertainty) {
    const ProfileBands& b = *d.uncertainty;
    svg::Series p05{"5th and 95th percentiles (Monte Carlo, " + std::to_string(b.samples) + " samples)", {}, {},
                    svg::SeriesKind::kLine, 5, 1.5};
    svg::Series p95{"", {}, {}, svg::SeriesKind::kLine, 5, 1.5};
    for (std::size_t i = 0; i < b.pH.size(); ++i) {
      p05.x.push_back(b.pH[i]);
      p05.y.push_back(std::pow(10.0, b.p05_log10_mol_per_L[i]));
      p95.x.push_back(b.pH[i]);
      p95.y.push_back(std::pow(10.0, b.p95_log10_mol_per_L[i]));
    }
    ch.series.push_back(p05);
    ch.series.push_back(p95);
  }
  const double dose = d.request.dose_mol_per_L;
  if (dose > 0) {
    lo = std::min(lo, dose);
    hi = std::max(hi, dose);
  }
  if (!(hi > 0)) {
    lo = 1e-6;
    hi = 1;
  }
  const double ylo = std::pow(10.0, std::floor(std::log10(lo) - 0.3));
  const double yhi = std::min(std::pow(10.0, std::ceil(std::log10(hi) + 0.3)), 100.0);
  ch.y = {"solubility (mol/L)", ylo, std::max(yhi, ylo * 100), svg::Scale::kLog10};
  ch.y2 = svg::SecondaryAxis{"solubility (mg/mL, as free form)", mm};
  int tint = 0;
  std::map<std::string, int> tints;
  for (const Run& r : salt_runs(d.profile.points)) {
    if (!tints.count(r.solid)) tints[r.solid] = tint++;
    ch.bands.push_back(svg::Band{svg::Band::Orientation::kVertical, r.from, r.to, r.solid + " limits", tints[r.solid]});
  }
  // The target first, so a pHmax line at the same pH is drawn over it.
  if (d.request.target_pH) {
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, *d.request.target_pH,
                                    "target pH " + fixed(*d.request.target_pH, 2), 2, false, false});
  }
  for (const PhMax& p : d.profile.ph_max) {
    if (!p.on_profile) continue;
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, p.pH, "pHmax " + fixed(p.pH, 2) + " (" + p.salt + ")",
                                    1, true, false});
  }
  if (dose > 0) {
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kHorizontal, dose,
                                    "dose " + d.request.dose_text + " (" + form_label(d.request.form) + ") = " +
                                        mg_per_mL(dose, mm) + " mg/mL free form",
                                    7, true, true});
  }
  std::ostringstream desc;
  desc << "Log-scale chart of the solubility of " << c.name << " against pH from " << fixed(d.request.profile_from_pH, 1)
       << " to " << fixed(d.request.profile_to_pH, 1) << ". The model solubility ranges from " << sig(lo, 3) << " to "
       << sig(hi, 3) << " mol/L.";
  for (const PhMax& p : d.profile.ph_max) {
    if (p.on_profile) desc << " pHmax of the " << p.salt << " is " << fixed(p.pH, 2) << ".";
  }
  for (const SaltTransition& t : d.profile.salt_transitions) {
    desc << " Below pH " << fixed(t.pH, 2) << " the " << t.below << " limits instead of the " << t.above << ".";
  }
  if (dose > 0) desc << " The dose, " << sig(dose, 3) << " mol/L, is drawn as a horizontal line.";
  ch.description = desc.str();
  return ch;
}

svg::Chart species_chart(const ReportData& d) {
  const Compound& c = d.compound;
  svg::Chart ch;
  ch.id = "chart-species";
  ch.title = "Species of " + c.name + " against pH at " + fixed(d.request.temperature_C, 1) + " °C";
  ch.x = {"pH", d.request.profile_from_pH, d.request.profile_to_pH, svg::Scale::kLinear, 1.0, 0};
  ch.y = {"fraction of dissolved drug", 0.0, 1.0, svg::Scale::kLinear, 0.2, 1};
  ch.plot_height = 260;
  const int nsp = static_cast<int>(c.system.pkas.size()) + 1;
  const int neutral = c.system.neutral_index();
  for (int j = 0; j < nsp; ++j) {
    const int z = c.system.charge_of(j);
    std::string name = pretty_species(c.system.species_label(j)) + " (charge " + (z > 0 ? "+" : "") + std::to_string(z) +
                       (j == neutral ? ", neutral form" : "") + ")";
    svg::Series s{name, {}, {}, svg::SeriesKind::kLine, j, 2.5};
    for (const ProfilePoint& p : d.profile.points) {
      s.x.push_back(p.pH);
      s.y.push_back(j < static_cast<int>(p.fractions.size()) ? p.fractions[j] : NAN);
    }
    ch.series.push_back(s);
  }
  for (std::size_t i = 0; i < c.system.pkas.size(); ++i) {
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, c.system.pkas[i].at(d.request.temperature_C),
                                    "pKa" + std::to_string(i + 1) + " " + fixed(c.system.pkas[i].at(d.request.temperature_C), 2),
                                    6, true, false});
  }
  ch.description = "Fractions of the " + std::to_string(nsp) + " protonation states of " + c.name +
                   " in its saturated solution against pH; curves cross at the pKa values.";
  return ch;
}

svg::Chart drift_chart(const ReportData& d) {
  svg::Chart ch;
  ch.id = "chart-drift";
  const double target = *d.request.target_pH, tol = d.request.tolerance_pH;
  ch.title = "pH after the dose against buffer strength (target pH " + fixed(target, 2) + ")";
  double cmin = 1e300, cmax = 0, plo = target - 3 * tol, phi = target + 3 * tol;
  for (const DriftCurve& c : d.drift) {
    svg::Series s{c.name, {}, {}, svg::SeriesKind::kLineAndMarkers, -1, 2.25};
    for (std::size_t i = 0; i < c.conc_mol_per_L.size(); ++i) {
      s.x.push_back(c.conc_mol_per_L[i] * 1e3);
      s.y.push_back(c.pH_after_drug[i]);
      cmin = std::min(cmin, c.conc_mol_per_L[i] * 1e3);
      cmax = std::max(cmax, c.conc_mol_per_L[i] * 1e3);
      if (std::isfinite(c.pH_after_drug[i])) {
        plo = std::min(plo, c.pH_after_drug[i]);
        phi = std::max(phi, c.pH_after_drug[i]);
      }
    }
    ch.series.push_back(s);
  }
  plo = std::max(plo, target - 2.0);
  phi = std::min(phi, target + 2.0);
  const double span = phi - plo;
  const double step = span > 2.0 ? 0.5 : span > 1.0 ? 0.2 : span > 0.4 ? 0.1 : 0.05;
  ch.x = {"buffer concentration (mM, log scale)", std::pow(10.0, std::floor(std::log10(cmin))),
          std::pow(10.0, std::ceil(std::log10(cmax) - 1e-9)), svg::Scale::kLog10};
  ch.y = {"pH after the dose", std::floor(plo / step) * step, std::ceil(phi / step) * step, svg::Scale::kLinear, step};
  ch.plot_height = 280;
  ch.bands.push_back(svg::Band{svg::Band::Orientation::kHorizontal, target - tol, target + tol,
                               "target pH " + fixed(target, 2) + " ± " + fixed(tol, 2), 1, 0.30});
  if (const ScreenResult* lead = leading_buffer(d)) {
    if (lead->recommended_conc_mol_per_L) {
      ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, *lead->recommended_conc_mol_per_L * 1e3,
                                      lead->name + " " + sig(*lead->recommended_conc_mol_per_L * 1e3, 3) +
                                          " mM (set by " + lead->binding + ")",
                                      7, true, true});
    }
  }
  ch.description = "pH reached after adding the dose to each leading buffer prepared at the target pH, against the "
                   "buffer concentration; the shaded band is the accepted tolerance.";
  return ch;
}

svg::Chart dilution_chart(const DilutionResult& dl) {
  svg::Chart ch;
  ch.id = "chart-dilution";
  ch.title = "Supersaturation on dilution into " + dilution_medium_label(dl, true);
  double lo = 1.0, hi = 1.0, rmax = 1.0;
  svg::Series ss{"supersaturation ratio", {}, {}, svg::SeriesKind::kLineAndMarkers, 0, 2.5};
  for (const DilutionPoint& p : dl.points) {
    ss.x.push_back(p.ratio);
    ss.y.push_back(p.supersaturation_ratio);
    rmax = std::max(rmax, p.ratio);
    if (p.supersaturation_ratio > 0 && std::isfinite(p.supersaturation_ratio)) {
      lo = std::min(lo, p.supersaturation_ratio);
      hi = std::max(hi, p.supersaturation_ratio);
    }
  }
  ch.series.push_back(ss);
  ch.x = {"dilution (total volume / formulation volume, log scale)", 1.0, std::pow(10.0, std::ceil(std::log10(rmax) - 1e-9)),
          svg::Scale::kLog10};
  ch.y = {"supersaturation ratio (log scale)", std::pow(10.0, std::floor(std::log10(lo) - 0.2)),
          std::pow(10.0, std::ceil(std::log10(hi) + 0.2)), svg::Scale::kLog10};
  ch.plot_height = 240;
  ch.bands.push_back(svg::Band{svg::Band::Orientation::kHorizontal, 1.0, ch.y.max, "precipitation possible", 2, 0.25});
  ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kHorizontal, 1.0, "saturation (ratio 1)", 7, true, false});
  ch.description = "Supersaturation ratio of the drug against the dilution ratio into " + dilution_medium_label(dl, true) +
                   "; above 1 the drug may precipitate.";
  return ch;
}

}  // namespace report_internal
}  // namespace pkarta
