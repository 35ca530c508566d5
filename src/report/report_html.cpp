// The HTML page of the report: one function per section, in page order.
#include "pkarta/report/report.h"

#include <cmath>
#include <cstdlib>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/base/limits.h"
#include "pkarta/report/svg_chart.h"
#include "pkarta/writers/screen_writer.h"
#include "report_internal.h"

namespace pkarta {

namespace {

using report_internal::dilution_chart;
using report_internal::drift_chart;
using report_internal::esc;
using report_internal::find_table;
using report_internal::form_label;
using report_internal::leading_buffer;
using report_internal::mg_per_mL;
using report_internal::profile_chart;
using report_internal::species_chart;
using report_internal::write_table_html;

// The text writers' ASCII "+/-" as the report's "±".
std::string with_plus_minus_sign(std::string text) {
  for (std::size_t at = text.find("+/-"); at != std::string::npos; at = text.find("+/-", at)) {
    text.replace(at, 3, "±");
  }
  return text;
}

// "1:10", "1:2.5": a dilution ratio.
std::string ratio_text(double ratio) {
  if (std::fabs(ratio - std::round(ratio)) < 1e-9) return "1:" + fixed(ratio, 0);
  return "1:" + sig(ratio, 3);
}

// The titrant of the formulation made with the pH adjusted after the dose, in words: from its
// recipe when the report has one (reagents as weighed, e.g. NaH2PO4.2H2O with 59.9 mM NaOH),
// else the screen's (the buffer's net-neutral form with its titrant).
std::string adjusted_titrant_words(const ReportData& d, const ScreenResult& alt) {
  if (d.adjusted_formulation) {
    const Recipe& r = d.adjusted_formulation->recipe;
    std::string reagents;
    for (const RecipeReagent& g : r.reagents) {
      if (g.role == "tonicity") continue;
      reagents += (reagents.empty() ? "" : ", ") + g.id;
    }
    return reagents + (r.titrant ? " with " + sig(r.titrant->amount_mol / r.volume_L * 1e3, 3) + " mM " + r.titrant->id +
                                       " added after the drug"
                                 : std::string(", no titrant"));
  }
  return alt.titrant.empty() ? std::string("no titrant") : sig(alt.titrant_mol_per_L * 1e3, 3) + " mM " + alt.titrant;
}

// The caution text without its leading "Caution: ", first letter capitalised (the box has
// its own heading).
std::string caution_sentences() {
  std::string s = caution_text();
  const std::string prefix = "Caution: ";
  if (s.rfind(prefix, 0) == 0) s = s.substr(prefix.size());
  if (!s.empty() && s[0] >= 'a' && s[0] <= 'z') s[0] = static_cast<char>(s[0] - 'a' + 'A');
  return s;
}

struct Section {
  std::string id;
  std::string title;
};

void key(std::ostream& out, const std::string& cls, const std::string& label, const std::string& value,
         const std::string& detail, const std::string& where) {
  out << "<div class=\"key" << (cls.empty() ? "" : " " + cls) << "\"><div class=\"label\">" << esc(label)
      << "</div><div class=\"value\">" << esc(value) << "</div><div class=\"detail\">" << esc(detail) << "</div>";
  if (!where.empty()) out << "<div class=\"where\">" << esc(where) << "</div>";
  out << "</div>\n";
}

// What every section writes with: the data, its tables, the numbered sections and the output.
struct Page {
  const ReportData& d;
  const std::string& csv_folder;
  std::ostream& out;
  std::vector<ReportTable> tables;
  std::vector<Section> sections;

  // "section N" of a section by its id ("below" when absent).
  std::string number(const std::string& id) const {
    for (std::size_t i = 0; i < sections.size(); ++i) {
      if (sections[i].id == id) return "section " + std::to_string(i + 1);
    }
    return std::string("below");
  }
  void heading(const std::string& id) const {
    for (std::size_t i = 0; i < sections.size(); ++i) {
      if (sections[i].id == id) {
        out << "<h2><span class=\"num\">" << i + 1 << "</span>" << esc(sections[i].title) << "</h2>\n";
        return;
      }
    }
  }
};

// The sections present, in page order.
std::vector<Section> page_sections(const ReportData& d) {
  std::vector<Section> sections = {{"summary", "Summary"}, {"compound", "Compound data"},
                                   {"profile", "pH-solubility"}, {"species", "Species distribution"}};
  if (d.dose_in_water) sections.push_back({"dose-in-water", "The dose in water"});
  if (d.classification) sections.push_back({"classification", "Solubility classification (ICH M9)"});
  if (d.screen) sections.push_back({"screen", "Buffer screen"});
  if (d.recipe) sections.push_back({"recipe", "Recipe of the leading buffer"});
  if (d.adjusted_formulation) sections.push_back({"recipe", "Recipe of the formulation, pH adjusted after the dose"});
  if (d.dilution) sections.push_back({"dilution", "Dilution"});
  if (d.uncertainty) sections.push_back({"uncertainty", "Uncertainty"});
  if (d.fit) sections.push_back({"fit", "Fit to the measured solubilities"});
  sections.push_back({"methods", "Methods, assumptions and references"});
  sections.push_back({"traceability", "Traceability"});
  return sections;
}

// The document head with the style sheet, and the page header.
void write_head(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const Compound& c = d.compound;
  const double T = d.request.temperature_C;
  out << "<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\" xml:lang=\"en\">\n<head>\n"
      << "<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n"
      << "<meta name=\"generator\" content=\"pkarta " << esc(d.provenance.tool_version) << "\"/>\n"
      << "<title>Preformulation report: " << esc(c.name) << " (" << esc(c.id) << ")</title>\n<style>" << report_internal::kReportCss
      << "</style>\n</head>\n<body>\n";

  out << "<header class=\"report-head\"><h1>Preformulation report: " << esc(c.name) << "</h1>\n<p>Compound id <code>"
      << esc(c.id) << "</code> · " << fixed(T, 1) << " °C · " << esc(d.provenance.date_utc) << " · pkarta "
      << esc(d.provenance.tool_version) << "</p></header>\n";
}

// Summary: the key numbers first, each saying where to find it.
void write_summary(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const Compound& c = d.compound;
  const double T = d.request.temperature_C;
  const double mm = d.free_molar_mass_g_per_mol;
  out << "<section id=\"summary\">\n";
  pg.heading("summary");
  out << "<div class=\"key-numbers\">\n";
  if (d.request.dose_mol_per_L > 0) {
    key(out, "lead", "Dose", d.request.dose_text + " " + form_label(d.request.form),
        sig(d.request.dose_mol_per_L, 3) + " mol/L = " + mg_per_mL(d.request.dose_mol_per_L, mm) + " mg/mL as free form",
        "Bold dashed black line across the pH-solubility chart (" + pg.number("profile") + ").");
  } else {
    key(out, "", "Dose", "not given", "Give --dose to draw the dose line and judge the dose in water.", "");
  }
  std::vector<const PhMax*> shown_ph_max;  // the pHmax values where the profile's solid changes
  for (const PhMax& m : d.profile.ph_max) {
    if (m.on_profile) shown_ph_max.push_back(&m);
  }
  if (!shown_ph_max.empty()) {
    std::string v, det;
    for (std::size_t i = 0; i < shown_ph_max.size(); ++i) {
      v += (i ? " / " : "") + fixed(shown_ph_max[i]->pH, 2);
      det += (i ? "; " : "") + shown_ph_max[i]->salt;
    }
    det += " in water, pH held by HCl or NaOH";
    for (const SaltTransition& t : d.profile.salt_transitions) {
      det += "; the " + t.below + " limits below pH " + fixed(t.pH, 2);
    }
    key(out, "lead", "pHmax", v, det,
        "Vermillion dashed vertical line on the pH-solubility chart (" + pg.number("profile") + ").");
  } else {
    key(out, "", "pHmax", "none", "No salt limits the solubility in water with HCl or NaOH over the pH range shown.", "");
  }
  if (!d.screen) {
    key(out, "", "Recommended buffer", "not screened",
        "Give a dose (--dose) and a target pH (--target-ph) to screen the buffers of the library.", "");
  }
  if (d.screen) {
    const ScreenReport& sr = *d.screen;
    const ScreenResult* lead = leading_buffer(d);
    if (lead && lead->recommended_conc_mol_per_L) {
      key(out, "lead", "Recommended buffer", lead->name + " " + sig(*lead->recommended_conc_mol_per_L * 1e3, 3) + " mM",
          "Strength set by the " + lead->binding + " criterion (minimum " + sig(*lead->min_conc_mol_per_L * 1e3, 3) +
              " mM, rounded up); holds pH " + fixed(sr.target_pH, 2) + " ± " + fixed(sr.tolerance_pH, 2) +
              " with the dose: pH " + fixed(lead->pH_after_drug, 2) + " (" + fixed(lead->pH_at_5C, 2) + " at " +
              fixed(sr.low_temperature_C, 0) + " °C, " + fixed(lead->pH_at_40C, 2) + " at " +
              fixed(sr.high_temperature_C, 0) + " °C)" +
              (lead->holds_at_storage ? std::string()
                                      : "; it holds at " + fixed(sr.temperature_C, 0) + " °C only: " +
                                            with_plus_minus_sign(storage_failure_text(sr, *lead)) +
                                            " (no screened buffer holds at both)"),
          "Highlighted first row of the buffer screen (" + pg.number("screen") + ").");
    } else {
      const bool adjusted = sr.fallback && !sr.fallback->adjusted.empty();
      const ScreenResult* alt = adjusted ? &sr.fallback->adjusted.front() : nullptr;
      key(out, "lead", "Recommended buffer",
          alt && alt->recommended_conc_mol_per_L
              ? alt->name + " " + sig(*alt->recommended_conc_mol_per_L * 1e3, 3) + " mM, pH adjusted after the dose"
              : std::string("none"),
          "No screened buffer made first at the target holds pH " + fixed(sr.target_pH, 2) + " ± " +
              fixed(sr.tolerance_pH, 2) + " with this dose" +
              (alt ? "; made with the pH adjusted after the dose (" + adjusted_titrant_words(d, *alt) + "), it holds it (set by " + alt->binding + ")" +
                         (alt->holds_at_storage ? std::string(".")
                                                : " at " + fixed(sr.temperature_C, 0) + " °C only: " +
                                                      with_plus_minus_sign(storage_failure_text(sr, *alt)) + ".")
                   : std::string(".")),
          d.adjusted_formulation ? "Buffer screen (" + pg.number("screen") + "); recipe (" + pg.number("recipe") + ")."
                                 : "Buffer screen (" + pg.number("screen") + ").");
    }
    key(out, "", "Solubility at target pH", sig(sr.solubility_at_target_mol_per_L * mm, 3) + " mg/mL",
        sig(sr.solubility_at_target_mol_per_L, 3) + " mol/L in water at pH " + fixed(sr.target_pH, 2) +
            (sr.solubility_at_target_mol_per_L >= sr.dose_mol_per_L ? ": the dose dissolves" : ": below the dose"),
        "Green vertical line on the pH-solubility chart.");
  }
  if (d.dilution) {
    const DilutionResult& dl = *d.dilution;
    std::string first;
    double worst = 0.0;
    for (const DilutionPoint& p : dl.points) {
      if (p.risk && first.empty()) first = ratio_text(p.ratio);
      worst = std::max(worst, p.supersaturation_ratio);
    }
    key(out, first.empty() ? "" : "lead", "Dilution into " + dilution_medium_label(dl, true), first.empty() ? "no precipitation risk" : first == "1:1" ? "risk undiluted" : "risk from " + first,
        "Highest supersaturation ratio " + sig(worst, 3) + " (above 1: may precipitate)", "Dilution (" + pg.number("dilution") + ").");
  }
  if (d.classification) {
    const ClassifyResult& cr = *d.classification;
    key(out, "", "Solubility class (ICH M9)", cr.verdict == "high" ? "highly soluble" : "not highly soluble",
        sig(cr.dose_mg, 4) + " mg needs " + sig(cr.dose_solubility_volume_mL, 3) + " mL at the lowest solubility (pH " +
            fixed(cr.min_at_pH, 2) + ", " + fixed(cr.temperature_C, 0) + " °C); the limit is " + fixed(cr.volume_mL, 0) + " mL",
        "Classification (" + pg.number("classification") + ").");
  }
  if (c.has_intrinsic_solubility) {
    key(out, "", "Intrinsic solubility", sig(c.s0_at(T) * mm, 3) + " mg/mL",
        sig(c.s0_at(T), 3) + " mol/L, free form at " + fixed(T, 1) + " °C", "Compound data (" + pg.number("compound") + ").");
  }
  if (d.dose_in_water && d.dose_in_water->equilibrium.drug) {
    const Equilibrium& e = d.dose_in_water->equilibrium;
    const bool solid = e.drug->solid != "none";
    key(out, solid ? "lead" : "", "Dose in water alone", "pH " + fixed(e.pH, 2),
        solid ? "Not all dissolves: " + e.drug->solid + " remains (" + sig(e.drug->dissolved_mg_per_mL, 3) +
                    " mg/mL dissolved)"
              : "All of the dose dissolves (saturation ratio " + sig(e.drug->saturation_ratio, 3) + ")",
        "The dose in water (" + pg.number("dose-in-water") + ").");
  }
  out << "</div>\n";
  out << "</section>\n";
}

// The caution box and the run's warnings.
void write_caution(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  out << "<div class=\"caution\" id=\"caution\" role=\"note\"><div class=\"sign\" aria-hidden=\"true\">!</div><p><strong>"
         "Caution.</strong> "
      << esc(caution_sentences()) << "</p></div>\n";
  if (!d.warnings.empty()) {
    out << "<ul class=\"warnings\">";
    for (const std::string& w : d.warnings) out << "<li>" << esc(w) << "</li>";
    out << "</ul>\n";
  }
}

// The list of sections.
void write_contents(const Page& pg) {
  std::ostream& out = pg.out;
  out << "<nav class=\"contents\" aria-label=\"contents\"><strong>Contents</strong><ol>";
  for (const Section& s : pg.sections) out << "<li><a href=\"#" << s.id << "\">" << esc(s.title) << "</a></li>";
  out << "</ol></nav>\n";
}

// Compound data.
void write_compound(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const Compound& c = d.compound;
  out << "<section id=\"compound\">\n";
  pg.heading("compound");
  if (!c.description.empty()) out << "<p>" << esc(c.description) << "</p>\n";
  for (const char* f : {"compound.csv", "pka.csv", "salts.csv"}) {
    if (const ReportTable* t = find_table(pg.tables, f)) write_table_html(*t, out, pg.csv_folder);
  }
  out << "<p class=\"muted\">A salt given by its solubility in water has its Ksp (activity product) derived from the salt "
         "dissolved in pure water at the pH it sets itself, at the salt's temperature.</p>\n";
  out << "</section>\n";
}

// pH-solubility: the profile chart, pHmax and profile tables.
void write_profile(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const Compound& c = d.compound;
  out << "<section id=\"profile\">\n";
  pg.heading("profile");
  out << "<figure>\n";
  svg::write_svg(profile_chart(d), out);
  out << "<figcaption><strong>How to read it.</strong> Solubility on a log scale: mol/L on the left axis, mg/mL of free "
         "form on the right. The thick blue line is the model; the grey dotted line the ideal Henderson-Hasselbalch "
         "curve without salt limits. Shaded pH ranges are limited by a salt (its name is written in the band); "
         "elsewhere the free form limits. Where the dose line lies above the blue line, the dose does not dissolve at "
         "that pH.";
  if (!c.measured.empty()) out << " Squares are the shake-flask points of the compound file.";
  if (d.uncertainty) out << " The thin sky-blue lines bound 90 % of the Monte Carlo samples (" << pg.number("uncertainty") << ").";
  out << "</figcaption>\n</figure>\n";
  if (const ReportTable* t = find_table(pg.tables, "phmax.csv")) {
    if (!t->rows.empty()) write_table_html(*t, out, pg.csv_folder);
  }
  if (!d.profile.notes.empty()) {
    out << "<ul class=\"notes\">";
    for (const std::string& n : d.profile.notes) out << "<li>" << esc(n) << "</li>";
    out << "</ul>\n";
  }
  if (const ReportTable* t = find_table(pg.tables, "profile.csv")) {
    std::vector<std::size_t> rows;
    for (std::size_t i = 0; i < d.profile.points.size(); ++i) {
      const double x = d.profile.points[i].pH * 2.0;
      if (std::fabs(x - std::round(x)) < 1e-6) rows.push_back(i);
    }
    write_table_html(*t, out, pg.csv_folder, &rows,
                     "Every 0.5 pH shown; the CSV holds every " + fixed(d.request.profile_step_pH, 2) + " pH.");
  }
  out << "</section>\n";
}

// Species distribution.
void write_species(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const double T = d.request.temperature_C;
  out << "<section id=\"species\">\n";
  pg.heading("species");
  out << "<figure>\n";
  svg::write_svg(species_chart(d), out);
  out << "<figcaption><strong>How to read it.</strong> Share of each protonation state of the dissolved drug; the "
         "grey dashed vertical lines mark the pKa values at "
      << fixed(T, 1)
      << " °C. The fractions are in the profile CSV.</figcaption>\n</figure>\n";
  out << "</section>\n";
}

// The dose in water alone.
void write_dose_in_water(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const double T = d.request.temperature_C;
  if (!d.dose_in_water) return;
  out << "<section id=\"dose-in-water\">\n";
  pg.heading("dose-in-water");
  out << "<p>The dose dissolved in water with nothing else (no buffer, no pH adjustment), at " << fixed(T, 1)
      << " °C: the pH it sets itself and what stays undissolved.</p>\n";
  if (const ReportTable* t = find_table(pg.tables, "dose-in-water.csv")) write_table_html(*t, out, pg.csv_folder);
  out << "</section>\n";
}

// Solubility classification.
void write_classification(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  if (!d.classification) return;
  const ClassifyResult& cr = *d.classification;
  out << "<section id=\"classification\">\n";
  pg.heading("classification");
  out << "<p class=\"lead-statement\"><strong>" << (cr.verdict == "high" ? "Highly soluble" : "Not highly soluble")
      << "</strong> after " << esc(cr.guideline) << ": the highest dose, " << esc(sig(cr.dose_mg, 4)) << " mg of "
      << esc(form_label(cr.form)) << ", needs " << esc(sig(cr.dose_solubility_volume_mL, 3))
      << " mL at the lowest solubility over pH " << fixed(cr.from_pH, 1) << "-" << fixed(cr.to_pH, 1) << " (" << esc(sig(cr.min_solubility_mg_per_mL, 3))
      << " mg/mL at pH " << fixed(cr.min_at_pH, 2) << "); the guideline allows " << fixed(cr.volume_mL, 0) << " mL.</p>\n";
  for (const char* f : {"classification-summary.csv", "classification.csv", "classification-media.csv"}) {
    if (const ReportTable* t = find_table(pg.tables, f)) write_table_html(*t, out, pg.csv_folder);
  }
  if (!cr.notes.empty() || !cr.convention.empty()) {
    out << "<ul class=\"notes\">";
    if (!cr.convention.empty()) out << "<li>" << esc(cr.convention) << "</li>";
    for (const std::string& n : cr.notes) out << "<li>" << esc(n) << "</li>";
    out << "</ul>\n";
  }
  out << "</section>\n";
}

// Buffer screen.
void write_screen(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  if (!d.screen) return;
  const ScreenReport& sr = *d.screen;
  out << "<section id=\"screen\">\n";
  pg.heading("screen");
  out << "<p>Each buffer is prepared alone at the target pH (its net-neutral form plus HCl or NaOH), then the dose is "
         "added and the closed system equilibrated. The minimum concentration is the weakest buffer that meets every "
         "criterion: the pH after the dose within the tolerance"
      << (sr.challenge_mol_per_L > 0 ? ", and after " + sig(sr.challenge_mol_per_L * 1e3, 3) +
                                           " mM of strong acid or of strong base added to the formulation"
                                     : std::string())
      << "; the recommended strength is that rounded up to the 1-2-5 series in mM (set by: the criterion that "
         "decides). The buffers that also hold when the same formulation is kept at "
      << fixed(sr.low_temperature_C, 0) << " and at " << fixed(sr.high_temperature_C, 0)
      << " °C (pH within the tolerance there, no drug solid forming) come first; within each group they "
         "are ranked by the minimum concentration, then by their pH change between "
      << fixed(sr.low_temperature_C, 0) << " and " << fixed(sr.high_temperature_C, 0) << " °C."
      << (sr.dilution_medium.empty()
              ? std::string()
              : " The last column dilutes each ok formulation as screened (no tonicity reagent) 1:1 to 1:100 into " +
                    esc(sr.dilution_label) + ", as in the dilution section: its highest supersaturation ratio "
                    "(above 1 the drug may precipitate).")
      << "</p>\n";
  if (const ScreenResult* lead = leading_buffer(d)) {
    out << "<p class=\"lead-statement\"><strong>Leading buffer: " << esc(lead->name) << " at "
        << esc(sig(lead->recommended_conc_mol_per_L.value_or(lead->conc_used_mol_per_L) * 1e3, 3)) << " mM"
        << "</strong> (set by " << esc(lead->binding) << "), brought to pH " << fixed(sr.target_pH, 2)
        << " with " << esc(lead->titrant.empty() ? std::string("no titrant") : lead->titrant) << "; pH after the dose "
        << fixed(lead->pH_after_drug, 2) << ", osmolarity " << fixed(lead->osmolarity_mOsm_per_L, 1)
        << " mOsm/L (ideal).</p>\n";
  } else {
    out << "<p class=\"lead-statement\"><strong>No buffer holds the target with this dose.</strong></p>\n";
    if (sr.fallback) {
      out << "<p>" << esc(screen_fallback_summary(sr)) << "</p>\n";
      const std::vector<std::string> items = screen_fallback_items(sr);
      if (!items.empty()) {
        out << "<ul>\n";
        for (const std::string& item : items) out << "<li>" << esc(with_plus_minus_sign(item)) << "</li>\n";
        out << "</ul>\n";
      }
    }
  }
  if (const ReportTable* t = find_table(pg.tables, "screen.csv")) {
    // Buffers with no pKa near the target are named below the table, not given a row each.
    std::vector<std::size_t> rows;
    std::vector<std::string> outside;
    for (std::size_t i = 0; i < sr.results.size(); ++i) {
      if (sr.results[i].status == ScreenStatus::kOutsideRange) outside.push_back(sr.results[i].name + " (pKa " + fixed(sr.results[i].nearest_pka, 2) + ")");
      else rows.push_back(i);
    }
    write_table_html(*t, out, pg.csv_folder, &rows,
                     "Status: ok; not-achievable (even the maximum strength drifts too far); dose-not-soluble (the "
                     "dose exceeds the solubility at the target pH).",
                     leading_buffer(d) ? 0 : -1);
    if (!outside.empty()) {
      out << "<p class=\"muted\">Not screened further, no pKa within 1 of the target (outside-range; in the CSV): ";
      for (std::size_t i = 0; i < outside.size(); ++i) out << (i ? ", " : "") << esc(outside[i]);
      out << ".</p>\n";
    }
  }
  if (!d.drift.empty()) {
    out << "<figure>\n";
    svg::write_svg(drift_chart(d), out);
    out << "<figcaption><strong>How to read it.</strong> Each line is one leading buffer: the pH it reaches once the "
           "dose is dissolved, against its concentration. Where a line enters the shaded band the buffer holds the "
           "target; the black line marks the strength recommended for the leading buffer, which may lie above where its line enters the band when another criterion (a challenge, the dose range) decides.</figcaption>\n</figure>\n";
  }
  out << "</section>\n";
}

// Recipe of the formulation made with the pH adjusted after the dose (no buffer holds the
// target made first).
void write_adjusted_formulation(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const Formulation& f = *d.adjusted_formulation;
  const Recipe& r = f.recipe;
  out << "<section id=\"recipe\">\n";
  pg.heading("recipe");
  out << "<p class=\"lead-statement\"><strong>" << esc(r.buffer_name) << " " << esc(sig(r.conc_mol_per_L * 1e3, 3))
      << " mM with the dose, pH adjusted to " << fixed(r.target_pH, 2) << " after the drug is in</strong>"
      << (r.titrant ? " (" + sig(r.titrant->volume_mL, 4) + " mL of " + sig(r.titrant->conc_mol_per_L, 3) + " mol/L " +
                          r.titrant->id + " for " + sig(r.volume_L * 1e3, 4) + " mL)"
                    : std::string())
      << ": no buffer of the screen made first at the target holds it once the dose is in, so the buffer reagent, "
         "the drug and the tonicity reagent are dissolved together and the titrant brings the pH to the target. "
         "Predicted pH "
      << fixed(f.pH_low, 2) << " at " << fixed(f.low_temperature_C, 0) << " °C and " << fixed(f.pH_high, 2) << " at "
      << fixed(f.high_temperature_C, 0) << " °C with the same totals.</p>\n";
  if (!f.steps.empty()) {
    out << "<ol class=\"steps\">";
    for (const std::string& step : f.steps) out << "<li>" << esc(step) << "</li>";
    out << "</ol>\n";
  }
  for (const char* name : {"formulation.csv", "formulation-solution.csv"}) {
    if (const ReportTable* t = find_table(pg.tables, name)) write_table_html(*t, out, pg.csv_folder);
  }
  out << "<ul class=\"notes\">";
  if (!f.tonicity_note.empty()) out << "<li>" << esc(f.tonicity_note) << "</li>";
  out << "<li>The titrant volume is a prediction: add most of it, then finish the adjustment with a calibrated pH "
         "meter at the stated temperature.</li>";
  for (const std::string& n : f.warnings) out << "<li class=\"warning\">" << esc(n) << "</li>";
  for (const std::string& n : r.warnings) out << "<li class=\"warning\">" << esc(n) << "</li>";
  out << "</ul>\n</section>\n";
}

// Recipe of the leading buffer.
void write_recipe(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  if (d.adjusted_formulation) {
    write_adjusted_formulation(pg);
    return;
  }
  if (!d.recipe) return;
  const Recipe& r = *d.recipe;
  out << "<section id=\"recipe\">\n";
  pg.heading("recipe");
  out << "<p class=\"lead-statement\"><strong>" << esc(r.buffer_name) << " " << esc(sig(r.conc_mol_per_L * 1e3, 3))
      << " mM, pH " << fixed(r.target_pH, 2) << "</strong>: the leading buffer at the strength the screen recommends"
      << (leading_buffer(d) ? " (set by the " + leading_buffer(d)->binding + " criterion)" : std::string())
      << (r.isotonic ? std::string(", made isotonic with ") + (d.recipe_tonicity_note.empty() ? "sodium chloride" : "dextrose") +
                           " (osmolality estimated, to be measured)"
                     : std::string())
      << ". The buffer alone, before the drug is added.</p>\n";
  for (const char* f : {"recipe.csv", "recipe-solution.csv"}) {
    if (const ReportTable* t = find_table(pg.tables, f)) write_table_html(*t, out, pg.csv_folder);
  }
  if (!r.notes.empty() || !r.warnings.empty() || !r.tonicity_method.empty()) {
    out << "<ul class=\"notes\">";
    if (!d.recipe_tonicity_note.empty()) out << "<li>" << esc(d.recipe_tonicity_note) << "</li>";
    // The recipe's own sentence names NaCl; with another tonicity reagent the note above says it.
    if (!r.tonicity_method.empty() && d.recipe_tonicity_note.empty()) out << "<li>" << esc(r.tonicity_method) << "</li>";
    for (const std::string& n : r.notes) out << "<li>" << esc(n) << "</li>";
    for (const std::string& n : r.warnings) out << "<li class=\"warning\">" << esc(n) << "</li>";
    out << "</ul>\n";
  }
  out << "</section>\n";
}

// Dilution into a medium.
void write_dilution(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  if (!d.dilution) return;
  const DilutionResult& dl = *d.dilution;
  out << "<section id=\"dilution\">\n";
  pg.heading("dilution");
  std::vector<std::string> risky;
  for (const DilutionPoint& p : dl.points) {
    if (p.risk) risky.push_back(ratio_text(p.ratio));
  }
  out << "<p class=\"lead-statement\"><strong>"
      << (risky.empty() ? "No precipitation risk" : "Precipitation risk at " + esc(risky.front()) +
                                                        (risky.size() > 1 ? " to " + esc(risky.back()) : std::string()))
      << "</strong> when the formulation (recipe above with the dose) is diluted into " << esc(dilution_medium_label(dl))
      << ": the supersaturation ratio is the drug concentration over the solubility of the least soluble solid, "
         "with the whole dose dissolved.</p>\n";
  out << "<figure>\n";
  svg::write_svg(dilution_chart(dl), out);
  out << "<figcaption><strong>How to read it.</strong> Points in the shaded area (ratio above 1) may precipitate "
         "on dilution; the table gives the pH and what would remain dissolved at equilibrium.</figcaption>\n</figure>\n";
  if (const ReportTable* t = find_table(pg.tables, "dilution.csv")) write_table_html(*t, out, pg.csv_folder);
  if (!dl.notes.empty()) {
    out << "<ul class=\"notes\">";
    for (const std::string& n : dl.notes) out << "<li>" << esc(n) << "</li>";
    out << "</ul>\n";
  }
  out << "</section>\n";
}

// Uncertainty (Monte Carlo band).
void write_uncertainty(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  if (!d.uncertainty) return;
  const ProfileBands& b = *d.uncertainty;
  out << "<section id=\"uncertainty\">\n";
  pg.heading("uncertainty");
  double widest = 0.0, at = 0.0;
  for (std::size_t i = 0; i < b.pH.size(); ++i) {
    const double w = b.p95_log10_mol_per_L[i] - b.p05_log10_mol_per_L[i];
    if (w > widest) {
      widest = w;
      at = b.pH[i];
    }
  }
  out << "<p>The pKa values and the intrinsic solubility are drawn " << b.samples
      << " times from normal distributions with the standard uncertainties of the compound file (salt Ksp held); "
         "the thin sky-blue lines on the pH-solubility chart are the 5th and 95th percentiles. The band is widest at pH "
      << fixed(at, 2) << ", a factor " << esc(sig(std::pow(10.0, widest), 3)) << " between them.</p>\n";
  if (const ReportTable* t = find_table(pg.tables, "uncertainty.csv")) {
    std::vector<std::size_t> rows;
    for (std::size_t i = 0; i < b.pH.size(); ++i) {
      if (std::fabs(b.pH[i] - std::round(b.pH[i])) < 1e-6) rows.push_back(i);
    }
    write_table_html(*t, out, pg.csv_folder, &rows, "Every 1 pH shown; the CSV holds every " + fixed(d.request.uncertainty_step_pH, 2) + " pH.");
  }
  out << "</section>\n";
}

// Fit to the measured solubilities.
void write_fit(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  if (!d.fit) return;
  const FitResult& f = *d.fit;
  out << "<section id=\"fit\">\n";
  pg.heading("fit");
  out << "<p>The constants are fitted to the shake-flask points of the compound file by weighted least squares in "
         "log10 solubility (Levenberg-Marquardt); root-mean-square residual "
      << esc(fixed(f.rms_log10, 3)) << " log10 units over " << f.residuals.size() << " points. "
      << (f.usable() ? "The report's other sections use the constants as given in the file, not these estimates."
                     : "The fit did not converge; its numbers are shown for inspection only.")
      << "</p>\n";
  for (const char* fn : {"fit.csv", "fit-residuals.csv"}) {
    if (const ReportTable* t = find_table(pg.tables, fn)) write_table_html(*t, out, pg.csv_folder);
  }
  if (!f.warnings.empty()) {
    out << "<ul class=\"notes\">";
    for (const std::string& w : f.warnings) out << "<li>" << esc(w) << "</li>";
    out << "</ul>\n";
  }
  out << "</section>\n";
}

// Methods, assumptions and references.
void write_methods(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  out << "<section id=\"methods\">\n";
  pg.heading("methods");
  out << "<ul>\n"
         "<li>Species fractions from the macroscopic pKa values (Henderson-Hasselbalch form [1]) with "
         "thermodynamic constants corrected to the ionic strength by the Davies equation [2], solved "
         "self-consistently with the pH. Above "
      << fixed(kDaviesMaxIonicStrength, 1)
      << " mol/L ionic strength the Davies equation is outside its range.</li>\n"
         "<li>Temperature: pKa, Ksp and S0 by the van 't Hoff equation with constant heat capacity of ionization [3]; "
         "buffer constants from the compilation of Goldberg, Kishore and Lennen [3] as named in the library. "
         "Water: pKw after Harned and Robinson [6], density after Kell [7], dielectric constant after Malmberg and "
         "Maryott [8].</li>\n"
         "<li>Solids: the free form (net-neutral species) saturates at S0; a 1:1 salt at a(drug ion) a(X) = Ksp. "
         "pHmax is where the free-form and salt curves cross in the medium [9].</li>\n"
         "<li>Profile: at each pH the free form is in excess in water, the pH held by HCl or NaOH; a salt "
         "precipitates where its ion product would exceed Ksp, its counterion coming from the titrant.</li>\n"
         "<li>Buffer capacity as d(strong base)/d(pH) of the closed system; its ideal limit is van Slyke's [4].</li>\n"
         "<li>Solubility classification follows ICH M9 [5]: highest dose in 250 mL over pH 1.2-6.8 at 37 °C.</li>\n"
         "<li>Activity model: "
      << activity_model_label(d.request.activity)
      << ". pH means -log10 a(H+). Closed systems: no CO2 exchange with air. Not modelled: aggregation, micelles, "
         "complexation, polymorphs and hydrates of the drug, cosolvents, ion pairing, kinetics.</li>\n</ul>\n"
         "<ol class=\"refs\">\n"
         "<li>Henderson LJ (1908) Am. J. Physiol. 21, 173; Hasselbalch KA (1916) Biochem. Z. 78, 112.</li>\n"
         "<li>Davies CW (1962) Ion Association. Butterworths, London.</li>\n"
         "<li>Goldberg RN, Kishore N, Lennen RM (2002) Thermodynamic quantities for the ionization reactions of "
         "buffers. J. Phys. Chem. Ref. Data 31, 231.</li>\n"
         "<li>van Slyke DD (1922) On the measurement of buffer values. J. Biol. Chem. 52, 525.</li>\n"
         "<li>ICH M9 (2019) Biopharmaceutics classification system-based biowaivers.</li>\n"
         "<li>Harned HS, Robinson RA (1940) Trans. Faraday Soc. 36, 973.</li>\n"
         "<li>Kell GS (1975) J. Chem. Eng. Data 20, 97.</li>\n"
         "<li>Malmberg CG, Maryott AA (1956) J. Res. Natl. Bur. Stand. 56, 1.</li>\n"
         "<li>Kramer SF, Flynn GL (1972) Solubility of organic hydrochlorides. J. Pharm. Sci. 61, 1896.</li>\n"
         "</ol>\n</section>\n";
}

// Traceability: the run, the data and the input files with their digests.
void write_traceability(const Page& pg) {
  const ReportData& d = pg.d;
  std::ostream& out = pg.out;
  const double T = d.request.temperature_C;
  out << "<section id=\"traceability\">\n";
  pg.heading("traceability");
  const Provenance& p = d.provenance;
  out << "<dl class=\"trace\">\n<dt>tool</dt><dd>pkarta " << esc(p.tool_version) << "</dd>\n<dt>library</dt><dd>"
      << esc(p.library_id) << " version " << esc(p.library_version) << "</dd>\n<dt>date (UTC)</dt><dd>"
      << esc(p.date_utc) << "</dd>\n<dt>temperature</dt><dd>" << fixed(T, 1) << " °C</dd>\n<dt>activity model</dt><dd>"
      << (d.request.activity == ActivityModel::kIdeal ? "ideal" : activity_model_label(d.request.activity))
      << "</dd>\n<dt>profile</dt><dd>pH "
      << fixed(d.request.profile_from_pH, 2) << " to " << fixed(d.request.profile_to_pH, 2) << " step "
      << fixed(d.request.profile_step_pH, 2) << ", water, HCl or NaOH</dd>\n";
  if (!p.command_line.empty()) out << "<dt>command</dt><dd><code>" << esc(p.command_line) << "</code></dd>\n";
  if (!p.buffer_sources.empty()) {
    out << "<dt>buffer data</dt><dd>";
    for (std::size_t i = 0; i < p.buffer_sources.size(); ++i) {
      out << (i ? "; " : "") << "<strong>" << esc(p.buffer_sources[i].first) << "</strong>: " << esc(p.buffer_sources[i].second);
    }
    out << "</dd>\n";
  }
  out << "</dl>\n<div class=\"table-wrap\"><table class=\"inputs\">\n<caption>Input files</caption>\n<thead><tr><th "
         "scope=\"col\">role</th><th scope=\"col\">file</th><th scope=\"col\">bytes</th><th "
         "scope=\"col\">SHA-256</th></tr></thead>\n<tbody>\n";
  for (const InputFile& f : p.inputs) {
    out << "<tr><th scope=\"row\">" << esc(f.role) << "</th><td>" << esc(f.path) << "</td><td class=\"num\">" << f.bytes
        << "</td><td class=\"hash\">" << esc(f.sha256) << "</td></tr>\n";
  }
  out << "</tbody></table></div>\n</section>\n";
}

// The footer with the caution, and the end of the document.
void write_footer(const Page& pg) {
  pg.out << "<footer>Written by pkarta " << esc(pg.d.provenance.tool_version) << ". " << esc(caution_text())
         << "</footer>\n";
  pg.out << "</body>\n</html>\n";
}

}  // namespace

void write_report_html(const ReportData& d, const std::string& csv_folder, std::ostream& out) {
  const Page pg{d, csv_folder, out, report_tables(d), page_sections(d)};
  write_head(pg);
  write_summary(pg);
  write_caution(pg);
  write_contents(pg);
  write_compound(pg);
  write_profile(pg);
  write_species(pg);
  write_dose_in_water(pg);
  write_classification(pg);
  write_screen(pg);
  write_recipe(pg);
  write_dilution(pg);
  write_uncertainty(pg);
  write_fit(pg);
  write_methods(pg);
  write_traceability(pg);
  write_footer(pg);
}

}  // namespace pkarta
