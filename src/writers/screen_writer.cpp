// Text, CSV and JSON of the buffer screen (`pkarta screen`).
#include "pkarta/writers/screen_writer.h"

#include <algorithm>
#include <cmath>

#include <nlohmann/json.hpp>

#include "pkarta/analyses/mix.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

std::string routes_text(const std::vector<std::string>& routes) {
  std::string s;
  for (const std::string& r : routes) s += (s.empty() ? "" : " ") + r;
  return s;
}

double osmolality_estimate(double osmolarity_mOsm_per_L, double temperature_C) {
  return kOsmoticCoefficient * osmolarity_mOsm_per_L / water_density_kg_per_L(temperature_C);
}

// Word-wraps a paragraph at `width` columns.
void write_wrapped(std::ostream& out, const std::string& text, std::size_t width = 100,
                   const std::string& indent = "") {
  out << indent;
  std::size_t col = indent.size();
  std::size_t i = 0;
  while (i < text.size()) {
    const std::size_t j = std::min(text.find(' ', i), text.size());
    const std::string word = text.substr(i, j - i);
    if (col > indent.size() && col + 1 + word.size() > width) {
      out << "\n" << indent;
      col = indent.size();
    } else if (col > indent.size()) {
      out << ' ';
      ++col;
    }
    out << word;
    col += word.size();
    i = j + 1;
  }
  out << "\n";
}

bool is_solid_warning(const std::string& w) { return w.rfind("the dose does not dissolve completely", 0) == 0; }

std::string form_text(const ScreenReport& rep) { return rep.form == "free" ? "free form" : rep.form; }

const char* kMethodNote =
    "Each buffer: its system at total concentration C in the net-neutral form, plus the one "
    "titrant that brings it alone to the target pH at the run temperature (preparation premade), "
    "or that brings buffer and dose together to the target (adjusted); then the dose (with its "
    "salt's counterion) is added and the closed system equilibrated, solids allowed. Criteria, "
    "each met by the smallest C from 1e-6 M to the buffer's max-conc above which it holds: the "
    "dose (pH within the tolerance), the dose range (worst pH within it), an acid and a base "
    "challenge (strong acid, then strong base, added to the finished formulation: pH within the "
    "tolerance; about challenge / capacity for small loads), optionally a minimum capacity and "
    "the pH at the storage temperatures. min conc: the largest of these minima (set by: its "
    "criterion); recommended: min conc rounded up to a practical strength (1-2-5 series in mM "
    "from 1 mM unless --round is given), at most max-conc; values are at the recommended strength, "
    "or at max-conc when none is found. pH at 5 and 40 °C: the same totals re-equilibrated. "
    "outside-range: no pKa(T) within target +/- 1. dose-not-soluble: the dose exceeds the drug's "
    "solubility in water at the target pH. ";
const char* kMethodTail = "; thermodynamic pKa (I = 0) corrected for temperature by van 't Hoff.";

/// The method note with the activity model the screen used.
std::string method_note(ActivityModel activity) {
  return kMethodNote + activity_words(activity) + kMethodTail;
}

const char* kOsmolalityNote =
    "Osmolarity is ideal (sum of dissolved species); osmolality estimate = 0.93 x osmolarity / "
    "density of water, an estimate that must be measured.";

// "ok", or "ok (25 °C)" for a buffer that holds the target at the run temperature only.
std::string status_cell(const ScreenReport& rep, const ScreenResult& r) {
  if (r.status == ScreenStatus::kOk && !r.holds_at_storage) return "ok (" + fixed(rep.temperature_C, 0) + " °C)";
  return screen_status_name(r.status);
}

// Below the table: which ok buffers do not hold at the storage temperatures, and why.
void write_storage_note(const ScreenReport& rep, std::ostream& out) {
  const std::string text = screen_storage_note(rep);
  if (!text.empty()) write_wrapped(out, text, 100, "  ");
}

// A shell command over several lines, broken before an option with a backslash so that it can be
// pasted as it stands; each line at most `width` columns where the words allow.
void write_command(std::ostream& out, const std::string& cmd, std::size_t width, const std::string& indent) {
  std::string line = indent;
  std::size_t i = 0;
  while (i < cmd.size()) {
    // The next option with its value ("--dose 0.5mg/mL"), or the leading words.
    std::size_t j = cmd.find(" --", i + 1);
    if (j == std::string::npos) j = cmd.size();
    const std::string part = cmd.substr(i, j - i);
    const std::string piece = line.size() > indent.size() ? part : part.substr(part.find_first_not_of(' '));
    if (line.size() > indent.size() && line.size() + piece.size() + 2 > width) {
      out << line << " \\\n";
      line = indent + "  " + part.substr(part.find_first_not_of(' '));
    } else {
      line += piece;
    }
    i = j;
  }
  out << line << "\n";
}

// Per buffer that was searched: each criterion's value and verdict at the strength used.
void write_screen_criteria(const ScreenReport& rep, std::ostream& out) {
  bool any = false;
  for (const ScreenResult& r : rep.results) {
    if (r.criteria.empty() || r.status == ScreenStatus::kOutsideRange) continue;
    if (!any) out << "\n  criteria (value at the strength shown, pass/fail, minimum strength meeting it):\n";
    any = true;
    std::string line = "  " + r.buffer + " at " + sig(1e3 * r.conc_used_mol_per_L, 3) + " mM" +
                       (r.recommended_conc_mol_per_L ? "" : " (max-conc)") + ":";
    for (const ScreenCriterion& c : r.criteria) {
      line += " " + c.id + " " + screen_criterion_value_text(c) + " " + (c.pass ? "pass" : "FAIL") + " (" +
              (c.min_conc_mol_per_L ? (c.min_conc_at_lower_bound ? "<" : "") + sig(1e3 * *c.min_conc_mol_per_L, 3) + " mM"
                                    : "not met") + ");";
    }
    line.pop_back();
    out << line << "\n";
  }
}

// The next step when no buffer is ok made premade (screen_fallback_summary and _items).
void write_fallback(const ScreenReport& rep, std::ostream& out) {
  if (!rep.fallback) return;
  out << "\n";
  write_wrapped(out, screen_fallback_summary(rep), 100, "  ");
  for (const std::string& item : screen_fallback_items(rep)) out << "    " << item << "\n";
}

nlohmann::ordered_json opt_number(const std::optional<double>& v) {
  if (!v || !std::isfinite(*v)) return nullptr;
  return *v;
}

nlohmann::ordered_json number(double v) {
  if (!std::isfinite(v)) return nullptr;
  return v;
}

nlohmann::ordered_json result_json(const ScreenReport& rep, const ScreenResult& r, int rank) {
  nlohmann::ordered_json x;
  x["rank"] = rank;
  x["buffer"] = r.buffer;
  x["name"] = r.name;
  x["status"] = screen_status_name(r.status);
  x["min_conc_mol_per_L"] = opt_number(r.min_conc_mol_per_L);
  x["min_conc_at_lower_bound"] = r.min_conc_at_lower_bound;
  x["conc_used_mol_per_L"] = r.conc_used_mol_per_L;
  x["max_conc_mol_per_L"] = r.max_conc_mol_per_L;
  x["titrant"] = r.titrant.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(r.titrant);
  x["titrant_mol_per_L"] = r.titrant_mol_per_L;
  x["nearest_pKa"] = number(r.nearest_pka);
  x["pH_after_drug"] = number(r.pH_after_drug);
  x["pH_drift"] = number(r.pH_drift);
  x["capacity_mol_per_L_per_pH"] = number(r.capacity_mol_per_L_per_pH);
  x["ionic_strength_mol_per_L"] = number(r.ionic_strength_mol_per_L);
  x["osmolarity_mOsm_per_L"] = number(r.osmolarity_mOsm_per_L);
  x["osmolality_estimate_mOsm_per_kg"] = number(osmolality_estimate(r.osmolarity_mOsm_per_L, rep.temperature_C));
  x["pH_at_5C"] = number(r.pH_at_5C);
  x["pH_at_40C"] = number(r.pH_at_40C);
  x["drug_solid"] = r.drug_solid;
  x["drug_solid_at_5C"] = r.drug_solid_at_5C;
  x["drug_solid_at_40C"] = r.drug_solid_at_40C;
  x["holds_at_storage_temperatures"] = r.holds_at_storage;
  if (!rep.dilution_medium.empty()) {
    x["dilution_max_supersaturation"] = number(r.dilution_max_supersaturation);
    x["dilution_worst_ratio"] = std::isfinite(r.dilution_max_supersaturation) ? nlohmann::ordered_json(r.dilution_worst_ratio)
                                                                                : nlohmann::ordered_json(nullptr);
  }
  if (rep.dose_range_fraction > 0) {
    x["worst_pH_in_dose_range"] = opt_number(r.worst_pH_in_dose_range);
    x["dose_range_within_tolerance"] = r.dose_range_within_tolerance;
  }
  x["binding"] = r.binding.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(r.binding);
  x["recommended_conc_mol_per_L"] = opt_number(r.recommended_conc_mol_per_L);
  x["pH_after_acid_challenge"] = number(r.pH_after_acid_challenge);
  x["pH_after_base_challenge"] = number(r.pH_after_base_challenge);
  nlohmann::ordered_json crit = nlohmann::ordered_json::object();
  for (const ScreenCriterion& c : r.criteria) {
    nlohmann::ordered_json y;
    y["quantity"] = c.quantity;
    y["value"] = number(c.value);
    y["limit_low"] = number(c.limit_low);
    y["limit_high"] = number(c.limit_high);
    y["pass"] = c.pass;
    y["min_conc_mol_per_L"] = opt_number(c.min_conc_mol_per_L);
    crit[c.id] = y;
  }
  x["criteria"] = crit;
  x["route_flags"] = r.route_flags;
  x["routes"] = r.routes;
  x["warnings"] = r.warnings;
  return x;
}

nlohmann::ordered_json report_json(const ScreenReport& rep) {
  nlohmann::ordered_json j;
  j["compound"] = rep.compound_id;
  j["compound_name"] = rep.compound_name;
  j["compound_file"] = rep.compound_file;
  j["form"] = rep.form;
  j["target_pH"] = rep.target_pH;
  j["tolerance_pH"] = rep.tolerance_pH;
  j["temperature_C"] = rep.temperature_C;
  j["dose_mol_per_L"] = rep.dose_mol_per_L;
  if (rep.dose_range_fraction > 0) j["dose_range_fraction"] = rep.dose_range_fraction;
  j["route"] = rep.route;
  j["preparation"] = screen_preparation_name(rep.preparation);
  j["challenge_mol_per_L"] = rep.challenge_mol_per_L;
  if (rep.min_capacity_mol_per_L_per_pH > 0) j["min_capacity_mol_per_L_per_pH"] = rep.min_capacity_mol_per_L_per_pH;
  if (rep.max_drift_pH) j["max_drift_pH"] = *rep.max_drift_pH;
  j["solubility_at_target_pH_mol_per_L"] = number(rep.solubility_at_target_mol_per_L);
  if (!rep.dilution_medium.empty()) {
    j["dilution_medium"] = rep.dilution_medium;
    j["dilution"] = rep.dilution_label;
  }
  if (rep.solubility_at_target_mol_per_L < rep.dose_mol_per_L) {  // the ranges are computed then
    nlohmann::ordered_json ranges = nlohmann::ordered_json::array();
    for (const auto& [lo, hi] : rep.dose_soluble_pH_ranges) ranges.push_back({lo, hi});
    j["dose_soluble_pH_ranges"] = ranges;
  }
  nlohmann::ordered_json results = nlohmann::ordered_json::array();
  int rank = 0;
  for (const ScreenResult& r : rep.results) results.push_back(result_json(rep, r, ++rank));
  j["results"] = results;
  if (rep.fallback) {
    const ScreenFallback& fb = *rep.fallback;
    nlohmann::ordered_json f;
    f["dose_titrant"] = fb.dose_titrant.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(fb.dose_titrant);
    f["dose_titrant_mol_per_L"] = fb.dose_titrant_found ? nlohmann::ordered_json(fb.dose_titrant_mol_per_L) : nlohmann::ordered_json(nullptr);
    f["dose_titrant_mg_per_mL"] = fb.dose_titrant_found ? nlohmann::ordered_json(fb.dose_titrant_mg_per_mL) : nlohmann::ordered_json(nullptr);
    f["preparation"] = "adjusted";
    nlohmann::ordered_json ok = nlohmann::ordered_json::array();
    int k = 0;
    for (const ScreenResult& r : fb.adjusted) ok.push_back(result_json(rep, r, ++k));
    f["results"] = ok;
    j["premade_fallback"] = f;
  }
  const std::string cmd = screen_recipe_command(rep);
  j["recipe_command"] = cmd.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(cmd);
  j["warnings"] = rep.warnings;
  return j;
}

}  // namespace

std::string screen_method_note(ActivityModel activity) { return method_note(activity); }

std::string screen_fallback_summary(const ScreenReport& rep) {
  if (!rep.fallback) return "";
  const ScreenFallback& fb = *rep.fallback;
  std::string text = "With the buffer made first at pH " + fixed(rep.target_pH, 2) + ", the dose itself moves the pH: ";
  if (!fb.dose_titrant_found) {
    text += "no amount of the buffer's titrant brings the dose alone in water to the target.";
  } else if (fb.dose_titrant.empty() || fb.dose_titrant_mol_per_L < 1e-6) {
    text += "the dose alone in water sits at the target.";
  } else {
    text += "dissolved alone in water, the dose (" + form_text(rep) + ") needs " +
            sig(1e3 * fb.dose_titrant_mol_per_L, 3) + " mM " + fb.dose_titrant + " (" +
            sig(fb.dose_titrant_mg_per_mL, 3) + " mg/mL) to reach it.";
  }
  if (fb.adjusted.empty()) {
    return text + " Made with the pH adjusted after the dose (--preparation adjusted), no buffer is ok either.";
  }
  return text + " Made with the pH adjusted after the dose (--preparation adjusted: buffer and dose dissolved, "
                "then the titrant added to the target), these hold it at " +
         fixed(rep.temperature_C, 0) + " °C:";
}

std::vector<std::string> screen_fallback_items(const ScreenReport& rep) {
  std::vector<std::string> items;
  if (!rep.fallback) return items;
  for (std::size_t k = 0; k < rep.fallback->adjusted.size() && k < 3; ++k) {
    const ScreenResult& r = rep.fallback->adjusted[k];
    std::string line = r.buffer + " " +
                       (r.recommended_conc_mol_per_L ? sig(1e3 * *r.recommended_conc_mol_per_L, 3) : std::string("?")) +
                       " mM";
    if (!r.titrant.empty()) line += " with " + sig(1e3 * r.titrant_mol_per_L, 3) + " mM " + r.titrant;
    line += " (set by " + r.binding + "; pH " + fixed(r.pH_at_5C, 2) + " at " + fixed(rep.low_temperature_C, 0) +
            " °C, " + fixed(r.pH_at_40C, 2) + " at " + fixed(rep.high_temperature_C, 0) + " °C";
    if (!r.holds_at_storage) line += ": " + storage_failure_text(rep, r);
    if (std::isfinite(r.dilution_max_supersaturation)) {
      line += "; diluted into " + rep.dilution_medium + ", supersaturation at most " +
              sig(r.dilution_max_supersaturation, 3) + (r.dilution_max_supersaturation > 1.0 ? ", may precipitate" : "");
    }
    line += ")";
    items.push_back(line);
  }
  return items;
}

std::string storage_failure_text(const ScreenReport& rep, const ScreenResult& r) {
  const double limit = rep.storage_limit_pH();
  std::vector<std::string> parts;
  const bool cold = !(std::fabs(r.pH_at_5C - rep.target_pH) <= limit);
  const bool warm = !(std::fabs(r.pH_at_40C - rep.target_pH) <= limit);
  const std::string lo = fixed(rep.low_temperature_C, 0) + " °C", hi = fixed(rep.high_temperature_C, 0) + " °C";
  if (cold || warm) {
    parts.push_back("outside " + fixed(rep.target_pH, 2) + " +/- " + fixed(limit, 2) + " at " +
                    (cold && warm ? lo + " and " + hi : cold ? lo : hi));
  }
  auto solid_text = [&](const std::string& solid, const std::string& where) {
    if (r.new_solid_in_storage(solid)) {
      parts.push_back("the dose does not stay dissolved at " + where + " (" + solid + " solid)");
    }
  };
  solid_text(r.drug_solid_at_5C, lo);
  solid_text(r.drug_solid_at_40C, hi);
  std::string text;
  for (const std::string& p : parts) text += (text.empty() ? "" : "; ") + p;
  return text;
}

std::string screen_storage_note(const ScreenReport& rep) {
  std::string list;
  bool any_holds = false;
  const std::string lo = fixed(rep.low_temperature_C, 0) + " °C", hi = fixed(rep.high_temperature_C, 0) + " °C";
  for (const ScreenResult& r : rep.results) {
    if (r.status != ScreenStatus::kOk) continue;
    if (r.holds_at_storage) {
      any_holds = true;
      continue;
    }
    list += (list.empty() ? "" : ", ") + r.buffer + " " + fixed(r.pH_at_5C, 2) + " / " + fixed(r.pH_at_40C, 2);
    for (const auto& [solid, where] : {std::pair{r.drug_solid_at_5C, lo}, std::pair{r.drug_solid_at_40C, hi}}) {
      if (r.new_solid_in_storage(solid)) list += " (" + solid + " solid at " + where + ")";
    }
  }
  if (list.empty()) return "";
  const double limit = rep.storage_limit_pH();
  const std::string t = fixed(rep.temperature_C, 0) + " °C";
  return "ok (" + t + "): holds the target at " + t + " only; the same formulation stored at " + lo + " / " + hi +
         " reads pH " + list + " (target " + fixed(rep.target_pH, 2) + " +/- " + fixed(limit, 2) + ")." +
         (any_holds ? " Ranked after the buffers that hold at both." : "") +
         " --max-drift PH makes the storage pH a criterion.";
}

namespace {
// "1:2", "1:2.5": a dilution ratio.
std::string ratio_words(double ratio) {
  std::string t = fixed(ratio, 1);
  if (t.size() > 2 && t.compare(t.size() - 2, 2, ".0") == 0) t.resize(t.size() - 2);
  return "1:" + t;
}
}  // namespace

std::string screen_dilution_note(const ScreenReport& rep) {
  if (rep.dilution_medium.empty()) return "";
  std::string list;
  for (const ScreenResult& r : rep.results) {
    if (r.status != ScreenStatus::kOk || !std::isfinite(r.dilution_max_supersaturation)) continue;
    list += (list.empty() ? "" : ", ") + r.buffer + " " + sig(r.dilution_max_supersaturation, 3) +
            (r.dilution_max_supersaturation > 1.0 ? " at " + ratio_words(r.dilution_worst_ratio) + " (may precipitate)"
                                                  : "");
  }
  if (list.empty()) return "";
  return "diluted 1:1 to 1:100 into " + rep.dilution_label + ", each formulation as screened (no tonicity "
         "reagent) reaches at most the supersaturation ratio (above 1 the drug may precipitate: a driving force, "
         "not a rate): " + list + ".";
}

namespace {
// A command-line argument, single-quoted when it holds anything a shell would split or expand.
std::string shell_word(const std::string& w) {
  if (!w.empty() && w.find_first_not_of("abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789/._-+%,=:") ==
                        std::string::npos) {
    return w;
  }
  std::string q = "'";
  for (char c : w) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}
}  // namespace

std::string screen_recipe_command(const ScreenReport& rep) {
  const ScreenResult* lead = nullptr;
  bool adjusted = rep.preparation == ScreenPreparation::kAdjusted;
  for (const ScreenResult& r : rep.results) {
    if (r.status == ScreenStatus::kOk && r.recommended_conc_mol_per_L) {
      lead = &r;
      break;
    }
  }
  if (!lead && rep.fallback && !rep.fallback->adjusted.empty() && rep.fallback->adjusted.front().recommended_conc_mol_per_L) {
    lead = &rep.fallback->adjusted.front();
    adjusted = true;
  }
  if (!lead || rep.compound_file.empty()) return "";
  std::string cmd = "pkarta recipe --buffer " + shell_word(lead->buffer) + " --ph " + fixed(rep.target_pH, 2) +
                    " --conc " + sig(1e3 * *lead->recommended_conc_mol_per_L, 3) + "mM --compound " +
                    shell_word(rep.compound_file) + " --dose ";
  if (rep.dose_text.empty()) {
    cmd += sig(1e3 * rep.dose_mol_per_L, 6) + "mM --dose-as free";
  } else {
    cmd += shell_word(rep.dose_text);
    if (rep.dose_basis != "weighed") cmd += " --dose-as " + shell_word(rep.dose_basis);
  }
  if (rep.form != "free") cmd += " --form " + shell_word(rep.form);
  if (adjusted) cmd += " --preparation adjusted";
  if (std::fabs(rep.temperature_C - 25.0) > 1e-9) {
    std::string t = fixed(rep.temperature_C, 2);  // "37", "37.5": no trailing zeros
    while (t.back() == '0') t.pop_back();
    if (t.back() == '.') t.pop_back();
    cmd += " --temp " + t;
  }
  if (rep.activity != kDefaultActivityModel) cmd += " --activity " + activity_model_id(rep.activity);
  if (rep.route == "parenteral" || rep.route == "ophthalmic") cmd += " --isotonic";
  for (const std::string& f : rep.library_files) cmd += " --library " + shell_word(f);
  return cmd;
}

const char* screen_osmolality_note() { return kOsmolalityNote; }

namespace {
nlohmann::ordered_json screen_json(const std::vector<ScreenReport>& reports) {
  nlohmann::ordered_json j;
  if (reports.size() == 1) {
    j = report_json(reports.front());
  } else {
    if (!reports.empty()) {
      j["target_pH"] = reports.front().target_pH;
      j["tolerance_pH"] = reports.front().tolerance_pH;
      j["temperature_C"] = reports.front().temperature_C;
    }
    nlohmann::ordered_json all = nlohmann::ordered_json::array();
    for (const ScreenReport& rep : reports) all.push_back(report_json(rep));
    j["screens"] = all;
  }
  j["method"] = method_note(reports.empty() ? kDefaultActivityModel : reports.front().activity);
  j["osmolality_note"] = kOsmolalityNote;
  j["caution"] = caution_text();
  return j;
}
}  // namespace

void write_screen_json(const std::vector<ScreenReport>& reports, std::ostream& out) {
  out << screen_json(reports).dump(2) << "\n";
}

void write_screen_json_document(const std::vector<ScreenReport>& reports, const ScreenBands* bands,
                                std::ostream& out) {
  nlohmann::ordered_json j = screen_json(reports);
  if (reports.size() == 1) {
    nlohmann::ordered_json one = j;
    for (const char* k : {"method", "osmolality_note", "caution"}) one.erase(k);
    j["screens"] = nlohmann::ordered_json::array({one});
  }
  if (bands) {
    auto finite_or_null = [](double v) { return std::isfinite(v) ? nlohmann::ordered_json(v) : nlohmann::ordered_json(); };
    for (auto& r : j["results"]) {
      for (const ScreenBand& b : bands->buffers) {
        if (r["buffer"] != b.buffer) continue;
        r["min_conc_p05_mol_per_L"] = finite_or_null(b.p05_mol_per_L);
        r["min_conc_p50_mol_per_L"] = finite_or_null(b.p50_mol_per_L);
        r["min_conc_p95_mol_per_L"] = finite_or_null(b.p95_mol_per_L);
        r["ok_fraction"] = b.ok_fraction;
      }
    }
    j["uncertainty"] = {{"samples", bands->samples}, {"seed", bands->seed}};
    j["screens"] = nlohmann::ordered_json::array({j["screens"].front()});
    j["screens"][0]["uncertainty"] = j["uncertainty"];
    j["screens"][0]["results"] = j["results"];
  }
  out << j.dump(2) << "\n";
}

void write_screen_text(const std::vector<ScreenReport>& reports, std::ostream& out) {
  write_screen_text(reports, out, false);
}

void write_screen_text(const std::vector<ScreenReport>& reports, std::ostream& out, bool wide) {
  bool first = true;
  for (const ScreenReport& rep : reports) {
    if (!first) out << "\n";
    first = false;
    out << "Buffer screen: " << rep.compound_name << " (" << rep.compound_id << "), " << form_text(rep)
        << ", dose " << sig(rep.dose_mol_per_L, 4) << " mol/L\n";
    out << "  target pH " << fixed(rep.target_pH, 2) << " +/- " << fixed(rep.tolerance_pH, 2) << " at "
        << fixed(rep.temperature_C, 1) << " °C; route: " << rep.route << "; solubility in water at pH "
        << fixed(rep.target_pH, 2) << ": " << sig(rep.solubility_at_target_mol_per_L, 3) << " mol/L\n\n";
    out << "  preparation: " << screen_preparation_name(rep.preparation) << "; challenge: "
        << (rep.challenge_mol_per_L > 0 ? sig(1e3 * rep.challenge_mol_per_L, 3) + " mM strong acid and base" : "off");
    if (rep.min_capacity_mol_per_L_per_pH > 0) {
      out << "; min capacity " << sig(1e3 * rep.min_capacity_mol_per_L_per_pH, 3) << " mM/pH";
    }
    if (rep.max_drift_pH) out << "; max drift in storage " << fixed(*rep.max_drift_pH, 2) << " pH";
    out << "\n\n";
    const bool challenge = rep.challenge_mol_per_L > 0 && wide;
    // The default table fits 100 columns; --wide adds the other columns of the screen.
    std::vector<std::string> head = {"rank", "buffer", "status", wide ? "min conc (mM)" : "min (mM)",
                                     wide ? "recommended (mM)" : "rec. (mM)", "set by",
                                     wide ? "pH after drug" : "pH w/ drug"};
    if (challenge) {
      head.push_back("pH +acid");
      head.push_back("pH +base");
    }
    if (wide) {
      for (const char* h : {"capacity (mM/pH)", "I (mM)", "osmolality (mOsm/kg)"}) head.push_back(h);
      for (const std::string& h : std::vector<std::string>{
                                       "pH " + fixed(rep.low_temperature_C, 0) + " °C",
                                       "pH " + fixed(rep.high_temperature_C, 0) + " °C", "drug solid"}) {
        head.push_back(h);
      }
    }
    const bool dose_range = rep.dose_range_fraction > 0 && wide;
    if (dose_range) head.push_back("worst pH, dose +/-" + fixed(100 * rep.dose_range_fraction, 0) + "%");
    if (wide) head.push_back("routes");
    TextTable t(head);
    if (wide) t.set_max_width(0);
    int rank = 0;
    std::vector<std::string> outside;  // named below the default table, not given a row each
    for (const ScreenResult& r : rep.results) {
      if (!wide && r.status == ScreenStatus::kOutsideRange) {
        outside.push_back(r.buffer + " " + fixed(r.nearest_pka, 2));
        ++rank;
        continue;
      }
      std::vector<std::string> row = {
          std::to_string(++rank), r.buffer, status_cell(rep, r),
          r.min_conc_mol_per_L ? (r.min_conc_at_lower_bound ? "<" : "") + sig(1e3 * *r.min_conc_mol_per_L, 3) : "n/a",
          r.recommended_conc_mol_per_L ? sig(1e3 * *r.recommended_conc_mol_per_L, 3) : "n/a",
          r.recommended_conc_mol_per_L ? r.binding : (r.binding.empty() ? "" : "fails " + r.binding),
          fixed(r.pH_after_drug, 3)};
      if (challenge) {
        row.push_back(fixed(r.pH_after_acid_challenge, 3));
        row.push_back(fixed(r.pH_after_base_challenge, 3));
      }
      if (wide) {
        for (const std::string& v : {sig(1e3 * r.capacity_mol_per_L_per_pH, 3), sig(1e3 * r.ionic_strength_mol_per_L, 3),
                                     fixed(osmolality_estimate(r.osmolarity_mOsm_per_L, rep.temperature_C), 0),
                                     fixed(r.pH_at_5C, 3), fixed(r.pH_at_40C, 3), r.drug_solid}) {
          row.push_back(v);
        }
      }
      if (dose_range) row.push_back(r.worst_pH_in_dose_range ? fixed(*r.worst_pH_in_dose_range, 3) : "n/a");
      if (wide) row.push_back(routes_text(r.routes));
      t.add_row(row);
    }
    t.write(out);
    if (!outside.empty()) {
      std::string list;
      for (const std::string& o : outside) list += (list.empty() ? "" : ", ") + o;
      write_wrapped(out, "outside-range (no pKa within 1 of the target; nearest pKa at " +
                             fixed(rep.temperature_C, 0) + " °C): " + list + ".", 100, "  ");
    }
    write_storage_note(rep, out);
    if (const std::string d = screen_dilution_note(rep); !d.empty()) write_wrapped(out, d, 100, "  ");
    if (!wide) {
      out << "  (--wide adds the outside-range rows, the pH after the acid and base challenges, capacity,\n"
             "  ionic strength, osmolality, the pH at the storage temperatures, the drug solid"
          << (rep.dose_range_fraction > 0 ? ", the worst pH over the dose range" : "") << " and the routes)\n";
    }
    write_screen_criteria(rep, out);
    write_screen_near_misses(rep, out);
    write_fallback(rep, out);
    if (const std::string cmd = screen_recipe_command(rep); !cmd.empty()) {
      out << "\n  bench recipe of this answer (reagents and drug to weigh, order of addition):\n";
      write_command(out, cmd, 100, "    ");
    }
    std::vector<std::string> notes;
    for (const ScreenResult& r : rep.results) {
      for (const std::string& w : r.route_flags) notes.push_back(r.buffer + ": " + w);
    }
    for (const ScreenResult& r : rep.results) {
      for (const std::string& w : r.warnings) {
        if (!is_solid_warning(w)) notes.push_back(r.buffer + ": " + w);  // shown in the solid column
      }
    }
    for (const std::string& w : rep.warnings) notes.push_back(w);
    if (!notes.empty()) {
      out << "\n";
      for (const std::string& n : notes) out << "  warning: " << n << "\n";
    }
  }
  out << "\n";
  write_wrapped(out, method_note(reports.empty() ? kDefaultActivityModel : reports.front().activity) +
                         " \"<\" marks the lower end of the search (the dose alone holds the target). " +
                         kOsmolalityNote);
  out << "\n";
  write_wrapped(out, caution_text());
}

}  // namespace pkarta
