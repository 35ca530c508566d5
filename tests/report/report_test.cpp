// The HTML report and its CSV tables: sections, charts, numbers, escaping, reproducibility,
// the committed example, and a render in headless Chromium.
#include "pkarta/report/report.h"

#include <gtest/gtest.h>
#include <sys/wait.h>
#include <zlib.h>

#include <pugixml.hpp>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "pkarta/base/error.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/sha256.h"
#include "pkarta/io/text_file.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/xml_input.h"

namespace {

namespace fs = std::filesystem;
using namespace pkarta;

// The date the committed example report is written with (2026-12-01 UTC).
constexpr const char* kExampleEpoch = "1796083200";

std::string source(const std::string& rel) { return std::string(PKARTA_SOURCE_DIR) + "/" + rel; }

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

std::string fresh_dir(const std::string& name) {
  const std::string dir = testing::TempDir() + "/report-" + name;
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

struct ShellRun {
  int code = -1;
  std::string out, err;
};

// Runs a shell command line in the source folder.
ShellRun shell(const std::string& cmd) {
  const std::string dir = fresh_dir("shell-" + std::to_string(std::hash<std::string>()(cmd)));
  const std::string full = "cd " + std::string(PKARTA_SOURCE_DIR) + " && " + cmd + " >" + dir + "/out 2>" + dir + "/err";
  const int status = std::system(full.c_str());
  return ShellRun{WIFEXITED(status) ? WEXITSTATUS(status) : -1, slurp(dir + "/out"), slurp(dir + "/err")};
}

// Minimal RFC 4180 reader (quoted fields, doubled quotes, CRLF records).
std::vector<std::vector<std::string>> parse_csv(const std::string& text) {
  std::vector<std::vector<std::string>> rows(1);
  std::string field;
  bool quoted = false, any = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (quoted) {
      if (c == '"' && i + 1 < text.size() && text[i + 1] == '"') {
        field += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        field += c;
      }
    } else if (c == '"') {
      quoted = true;
      any = true;
    } else if (c == ',') {
      rows.back().push_back(field);
      field.clear();
    } else if (c == '\r' && i + 1 < text.size() && text[i + 1] == '\n') {
      rows.back().push_back(field);
      field.clear();
      rows.emplace_back();
      ++i;
    } else {
      field += c;
      any = true;
    }
  }
  (void)any;
  if (rows.back().empty()) rows.pop_back();
  return rows;
}

struct Fixture {
  Library library = builtin_library();
  Compound compound;
  ReportData data;
  std::string html;
};

Fixture demo_base_fixture() {
  setenv("SOURCE_DATE_EPOCH", kExampleEpoch, 1);
  Fixture f;
  const std::string file = source("compounds/demo-base.xml");
  f.compound = load_compound_file(file, f.library, nullptr);
  ReportRequest req;
  req.dose_text = "2mg/mL";
  req.form = "hydrochloride";
  req.dose_mol_per_L = dose_conc_mol_per_L(f.library, f.compound, req.form, parse_amount("2mg/mL"), 25.0);
  req.target_pH = 5.0;
  req.classify_dose_mg = 100.0;
  req.route = "parenteral";
  RunRecord run;
  run.date_utc = report_date_utc();
  run.command_line = "pkarta report --compound demo-base.xml";
  const std::string text = read_text_file(file);
  run.inputs.push_back(InputFile{"compound", file, sha256_hex(text), static_cast<std::uint64_t>(text.size())});
  const std::string builtin = builtin_library_xml();
  run.inputs.push_back(InputFile{"library", "<built-in> compounds/library.xml", sha256_hex(builtin),
                                 static_cast<std::uint64_t>(builtin.size())});
  f.data = analyse_report(f.compound, f.library, req, run);
  std::ostringstream out;
  write_report_html(f.data, "demo-base", out);
  f.html = out.str();
  return f;
}

const Fixture& fixture() {
  static const Fixture f = demo_base_fixture();
  return f;
}

pugi::xml_node parse_html(const std::string& html, pugi::xml_document& doc) {
  const pugi::xml_parse_result r = doc.load_string(html.c_str(), pugi::parse_default | pugi::parse_doctype);
  EXPECT_TRUE(r) << r.description() << " at offset " << r.offset << ": " << html.substr(r.offset > 80 ? r.offset - 80 : 0, 160);
  return doc.child("html");
}

std::string text_of(pugi::xml_node n) {
  std::string s;
  for (pugi::xml_node c : n.children()) {
    if (c.type() == pugi::node_pcdata) s += c.value();
    else s += text_of(c);
  }
  return s;
}

TEST(Report, IsWellFormedXhtmlWithEverySection) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  ASSERT_TRUE(html);
  EXPECT_STREQ(html.attribute("xmlns").value(), "http://www.w3.org/1999/xhtml");
  EXPECT_EQ(fixture().html.rfind("<!DOCTYPE html>", 0), 0u);
  for (const char* id : {"summary", "compound", "profile", "species", "dose-in-water", "classification", "screen", "recipe",
                         "dilution", "uncertainty", "fit", "methods", "traceability"}) {
    EXPECT_TRUE(html.select_node((std::string("//section[@id='") + id + "']").c_str())) << id;
  }
  // The contents links all lead somewhere.
  const auto links = html.select_nodes("//nav[@class='contents']//a");
  EXPECT_EQ(links.size(), 13u);
  for (const auto& a : links) {
    const std::string target = std::string(a.node().attribute("href").value()).substr(1);
    EXPECT_TRUE(html.select_node(("//*[@id='" + target + "']").c_str())) << target;
  }
  // Caution box with the project's caution text.
  const pugi::xml_node caution = html.select_node("//div[@class='caution']").node();
  ASSERT_TRUE(caution);
  EXPECT_NE(text_of(caution).find("pharmacopeia, local regulatory requirements and licensed practice"), std::string::npos);
}

TEST(Report, IsSelfContained) {
  const std::string& h = fixture().html;
  EXPECT_EQ(h.find("<script"), std::string::npos);
  EXPECT_EQ(h.find("src="), std::string::npos);
  EXPECT_EQ(h.find("@import"), std::string::npos);
  EXPECT_EQ(h.find("url(http"), std::string::npos);
  EXPECT_EQ(h.find("<link"), std::string::npos);
  // The only http(s) strings are XML namespaces.
  std::size_t pos = 0;
  while ((pos = h.find("http", pos)) != std::string::npos) {
    const std::string ahead = h.substr(pos, 30);
    EXPECT_TRUE(ahead.rfind("http://www.w3.org/", 0) == 0) << ahead;
    ++pos;
  }
}

TEST(Report, SummaryGivesDosePhmaxAndWhereToFindThem) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  std::map<std::string, std::string> keys;
  for (const auto& k : html.select_nodes("//div[@class='key-numbers']/div")) {
    keys[text_of(k.node().find_child_by_attribute("div", "class", "label"))] =
        text_of(k.node().find_child_by_attribute("div", "class", "value"));
  }
  EXPECT_EQ(keys["Dose"], "2mg/mL hydrochloride");
  // Demo base: the hydrochloride's pHmax (about 6.2 in water, compound file comment) is the
  // one on the profile; the dihydrochloride's (with the free base) lies where the
  // hydrochloride is less soluble, so the card leaves it out and names the salt transition.
  ASSERT_EQ(fixture().data.profile.ph_max.size(), 2u);
  EXPECT_TRUE(fixture().data.profile.ph_max[0].on_profile);
  EXPECT_FALSE(fixture().data.profile.ph_max[1].on_profile);
  EXPECT_NEAR(fixture().data.profile.ph_max[0].pH, 6.2, 0.1);
  EXPECT_EQ(keys["pHmax"], fixed(fixture().data.profile.ph_max[0].pH, 2));
  ASSERT_EQ(fixture().data.profile.salt_transitions.size(), 1u);
  EXPECT_EQ(fixture().data.profile.salt_transitions[0].below, "dihydrochloride");
  EXPECT_EQ(keys["Dose in water alone"].rfind("pH ", 0), 0u);
  // The recommended buffer is the first ok result of the screen, at its recommended strength
  // (the largest minimum over the criteria, rounded up), and the recipe uses the same number.
  ASSERT_TRUE(fixture().data.screen);
  const ScreenResult& lead = fixture().data.screen->results.at(0);
  ASSERT_EQ(lead.status, ScreenStatus::kOk);
  ASSERT_TRUE(lead.recommended_conc_mol_per_L);
  EXPECT_GE(*lead.recommended_conc_mol_per_L, *lead.min_conc_mol_per_L);
  EXPECT_EQ(keys["Recommended buffer"], lead.name + " " + sig(*lead.recommended_conc_mol_per_L * 1e3, 3) + " mM");
  ASSERT_TRUE(fixture().data.recipe);
  EXPECT_DOUBLE_EQ(fixture().data.recipe->conc_mol_per_L, *lead.recommended_conc_mol_per_L);
  bool table_seen = false;
  for (const ReportTable& t : report_tables(fixture().data)) {
    if (t.file != "screen.csv") continue;
    table_seen = true;
    EXPECT_EQ(t.header.at(4), "recommended (mM)");
    EXPECT_EQ(t.rows.at(0).at(4), sig(*lead.recommended_conc_mol_per_L * 1e3, 3));
    EXPECT_EQ(t.rows.at(0).at(5), lead.binding);
  }
  EXPECT_TRUE(table_seen);
}

TEST(Report, ClassificationSectionGivesTheVerdictAndItsPoints) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  ASSERT_TRUE(fixture().data.classification);
  const ClassifyResult& cr = *fixture().data.classification;
  EXPECT_EQ(cr.temperature_C, 37.0);
  EXPECT_EQ(cr.volume_mL, 250.0);
  const pugi::xml_node section = html.select_node("//section[@id='classification']").node();
  ASSERT_TRUE(section);
  EXPECT_EQ(section.select_nodes(".//table[@data-csv='classification.csv']/tbody/tr").size(), cr.points.size());
  const std::string lead = text_of(section.select_node(".//p[@class='lead-statement']").node());
  EXPECT_EQ(lead.rfind(cr.verdict == "high" ? "Highly soluble" : "Not highly soluble", 0), 0u) << lead;
  EXPECT_NE(lead.find("ICH M9"), std::string::npos) << lead;
  std::string card;
  for (const auto& k : html.select_nodes("//div[@class='key-numbers']/div")) {
    if (text_of(k.node().first_child()) == "Solubility class (ICH M9)") card = text_of(k.node().child("div").next_sibling());
  }
  EXPECT_EQ(card, cr.verdict == "high" ? "highly soluble" : "not highly soluble");
}

TEST(Report, RecipeDilutionUncertaintyAndFitSections) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  const ReportData& d = fixture().data;
  // Recipe of the leading buffer at its minimum strength rounded up to the 1-2-5 series,
  // isotonic for the parenteral route.
  ASSERT_TRUE(d.recipe && d.screen);
  EXPECT_EQ(d.recipe->buffer, d.screen->results[0].buffer);
  EXPECT_DOUBLE_EQ(d.recipe->conc_mol_per_L, round_up_125(*d.screen->results[0].min_conc_mol_per_L));
  EXPECT_TRUE(d.recipe->isotonic);
  EXPECT_NEAR(d.recipe->pH, 5.0, 0.01);
  const pugi::xml_node recipe = html.select_node("//section[@id='recipe']//table[@data-csv='recipe.csv']").node();
  ASSERT_TRUE(recipe);
  EXPECT_EQ(recipe.select_nodes("tbody/tr").size(), d.recipe->reagents.size() + (d.recipe->titrant ? 1 : 0) + 1);
  // Dilution into plasma for the parenteral route: chart with one series, log axes.
  ASSERT_TRUE(d.dilution);
  EXPECT_EQ(d.dilution->medium_id, "plasma-7.4");
  const pugi::xml_node chart = html.select_node("//*[@id='chart-dilution']").node();
  ASSERT_TRUE(chart);
  EXPECT_EQ(chart.select_nodes(".//g[@class='series']").size(), 1u);
  std::set<std::string> labels;
  for (const auto& n : chart.select_nodes(".//text[@class='axis-label']")) labels.insert(n.node().child_value());
  EXPECT_EQ(labels, (std::set<std::string>{"dilution (total volume / formulation volume, log scale)",
                                           "supersaturation ratio (log scale)"}));
  EXPECT_EQ(html.select_nodes("//table[@data-csv='dilution.csv']/tbody/tr").size(), d.dilution->points.size());
  // Uncertainty: percentiles bracket the nominal profile.
  ASSERT_TRUE(d.uncertainty);
  EXPECT_EQ(d.uncertainty->samples, 100);
  for (std::size_t i = 0; i < d.uncertainty->pH.size(); ++i) {
    EXPECT_LE(d.uncertainty->p05_log10_mol_per_L[i], d.uncertainty->p95_log10_mol_per_L[i]);
  }
  EXPECT_TRUE(html.select_node("//section[@id='uncertainty']//table[@data-csv='uncertainty.csv']"));
  // Fit to the 12 shake-flask points: one row per parameter, one per point.
  ASSERT_TRUE(d.fit);
  EXPECT_EQ(html.select_nodes("//table[@data-csv='fit.csv']/tbody/tr").size(), d.fit->parameters.size());
  EXPECT_EQ(html.select_nodes("//table[@data-csv='fit-residuals.csv']/tbody/tr").size(), fixture().compound.measured.size());
}

// The report of the demo acid at a dose of its free form, a target pH and a route (no Monte
// Carlo bands), with the library and compound it was made from.
struct DemoAcidReport {
  Library library;
  Compound compound;
  ReportData data;
};
DemoAcidReport demo_acid_report(const std::string& dose, double target_pH, const std::string& route) {
  setenv("SOURCE_DATE_EPOCH", kExampleEpoch, 1);
  DemoAcidReport r;
  r.library = builtin_library();
  r.compound = load_compound_file(source("compounds/demo-acid.xml"), r.library, nullptr);
  ReportRequest req;
  req.dose_text = dose;
  req.dose_mol_per_L = dose_conc_mol_per_L(r.library, r.compound, "free", parse_amount(dose), 25.0);
  req.target_pH = target_pH;
  req.route = route;
  req.uncertainty_samples = 0;
  RunRecord run;
  run.date_utc = report_date_utc();
  r.data = analyse_report(r.compound, r.library, req, run);
  return r;
}

// A free acid whose dose itself moves the pH (demo-acid, 5 mg/mL at pH 7.4): no buffer made first
// at the target holds it, one made with the pH adjusted after the dose does, and the report then
// gives that formulation's recipe (the drug, the titrant after it) instead of a buffer recipe. The
// recipe is checked against the equilibrium of its own contents (charge balance solved afresh) and
// against the tonicity target (290 mOsm/kg, common practice).
TEST(Report, AdjustedFormulationGetsItsRecipe) {
  const DemoAcidReport r = demo_acid_report("5mg/mL", 7.4, "parenteral");
  const Library& library = r.library;
  const Compound& compound = r.compound;
  const ReportData& d = r.data;
  ASSERT_TRUE(d.screen && d.screen->fallback);
  ASSERT_FALSE(d.screen->fallback->adjusted.empty());
  EXPECT_FALSE(d.recipe);
  ASSERT_TRUE(d.adjusted_formulation);
  const Formulation& f = *d.adjusted_formulation;
  const ScreenResult& alt = d.screen->fallback->adjusted.front();
  EXPECT_EQ(f.recipe.buffer, alt.buffer);
  EXPECT_DOUBLE_EQ(f.recipe.conc_mol_per_L, *alt.recommended_conc_mol_per_L);
  EXPECT_EQ(f.preparation, ScreenPreparation::kAdjusted);
  // 5 mg/mL of the free form in 1 L: 5 g weighed.
  EXPECT_NEAR(f.drug.mass_g, 5.0 * f.recipe.volume_L, 1e-9);
  const Equilibrium e = solve(formulation_mixture(library, f, compound, ReportRequest{}.activity));
  ASSERT_TRUE(e.usable());
  EXPECT_NEAR(e.pH, 7.4, 0.005);
  EXPECT_NEAR(f.osmolality_estimate_mOsm_per_kg, 290.0, 1.0);
  // 50 mM phosphate with NaCl to isotonicity: I above 0.15 with multivalent anions, where Davies
  // drifts alkaline against McIlvaine's table (tests/chem/buffer_tables_test.cpp): the summary says so.
  bool hint = false;
  for (const std::string& w : d.warnings) hint = hint || w.rfind("formulation: ionic strength", 0) == 0;
  EXPECT_GT(f.ionic_strength_mol_per_L, 0.15);
  EXPECT_TRUE(hint);
  // The dilution is of this formulation (parenteral: into plasma).
  ASSERT_TRUE(d.dilution);
  EXPECT_EQ(d.dilution->medium_id, "plasma-7.4");

  std::ostringstream out;
  write_report_html(d, "acid-7.4", out);
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(out.str(), doc);
  const pugi::xml_node table = html.select_node("//section[@id='recipe']//table[@data-csv='formulation.csv']").node();
  ASSERT_TRUE(table);
  EXPECT_EQ(table.select_nodes("tbody/tr").size(), f.recipe.reagents.size() + 1 + (f.recipe.titrant ? 1 : 0) + 1);
  EXPECT_EQ(html.select_nodes("//section[@id='recipe']//ol/li").size(), f.steps.size());
  EXPECT_TRUE(html.select_node("//section[@id='recipe']//table[@data-csv='formulation-solution.csv']"));
  EXPECT_NE(out.str().find("Recipe of the formulation, pH adjusted after the dose"), std::string::npos);
}

// When no screened buffer holds the target at both storage temperatures the summary says the
// recommended one holds at the run temperature only. Demo acid, 0.5 mg/mL at pH 7.6: the
// buffers near pH 7.6 are amines (HEPES dpKa/dT -0.014 per K, Good et al. 1966, Biochemistry
// 5, 467; tris -0.028), so at 5 °C each lies 0.28 or more above the target, beyond +/-0.10,
// while phosphate (the one buffer that would hold in storage) fails the acid challenge.
TEST(Report, SummarySaysWhenTheRecommendedBufferHoldsAtTheRunTemperatureOnly) {
  const DemoAcidReport r = demo_acid_report("0.5mg/mL", 7.6, "any");
  const ReportData& d = r.data;
  ASSERT_TRUE(d.screen);
  const ScreenResult& lead = d.screen->results.front();
  ASSERT_EQ(lead.status, ScreenStatus::kOk);
  EXPECT_FALSE(lead.holds_at_storage);
  EXPECT_GT(lead.pH_at_5C - 7.6, 0.2);
  std::ostringstream out;
  write_report_html(d, "acid-7.6", out);
  const std::string html_text = out.str();
  EXPECT_NE(html_text.find("it holds at 25 °C only: outside 7.60 ± 0.10 at 5 °C"), std::string::npos);
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(html_text, doc);
  const pugi::xml_node table = html.select_node("//table[@data-csv='screen.csv']").node();
  ASSERT_TRUE(table);
  EXPECT_STREQ(table.select_node("thead/tr/th[3]").node().child_value(), "holds at 5 and 40 °C");
  EXPECT_STREQ(table.select_node("tbody/tr[1]/*[3]").node().child_value(), "no");
}

// The parenteral report dilutes every ok buffer of its screen into plasma as the screen command
// does, and for the leading buffer that agrees with the dilution section, which dilutes the
// recipe made isotonic with dextrose (a non-electrolyte, so the ratio barely moves): within 2 %.
TEST(Report, ScreenTableGivesEachBuffersDilutionAndTheLeaderAgreesWithTheDilutionSection) {
  const ReportData& d = fixture().data;
  ASSERT_TRUE(d.screen && d.dilution);
  ASSERT_EQ(d.screen->dilution_medium, "plasma-7.4");
  double section = 0.0;
  for (const DilutionPoint& p : d.dilution->points) section = std::max(section, p.supersaturation_ratio);
  const ScreenResult& lead = d.screen->results.front();
  ASSERT_EQ(lead.status, ScreenStatus::kOk);
  EXPECT_NEAR(lead.dilution_max_supersaturation / section, 1.0, 0.02);
  for (const ReportTable& t : report_tables(d)) {
    if (t.file != "screen.csv") continue;
    EXPECT_EQ(t.header.back(), "highest supersaturation on dilution into plasma-7.4 (as screened)");
    EXPECT_EQ(t.rows.front().back(), sig(lead.dilution_max_supersaturation, 3));
  }
}

TEST(Report, RoundUp125) {
  EXPECT_DOUBLE_EQ(round_up_125(0.000656), 0.001);
  EXPECT_DOUBLE_EQ(round_up_125(0.00415), 0.005);
  EXPECT_DOUBLE_EQ(round_up_125(0.02), 0.02);
  EXPECT_DOUBLE_EQ(round_up_125(0.0201), 0.05);
  EXPECT_DOUBLE_EQ(round_up_125(0.06), 0.1);
}

TEST(Report, ScreenSectionHighlightsTheLeadingBufferAndDrawsTheDrift) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  const pugi::xml_node section = html.select_node("//section[@id='screen']").node();
  ASSERT_TRUE(section);
  const pugi::xml_node table = section.select_node(".//table[@data-csv='screen.csv']").node();
  ASSERT_TRUE(table);
  const ScreenReport& sr = *fixture().data.screen;
  std::size_t screened = 0;
  for (const ScreenResult& r : sr.results) screened += r.status != ScreenStatus::kOutsideRange;
  EXPECT_EQ(table.select_nodes("tbody/tr").size(), screened);
  const pugi::xml_node first = table.select_node("tbody/tr[1]").node();
  EXPECT_STREQ(first.attribute("class").value(), "lead");
  EXPECT_EQ(text_of(first.child("th")), sr.results[0].buffer);
  EXPECT_EQ(table.select_nodes("tbody/tr[@class='lead']").size(), 1u);
  // Drift chart: one series per leading buffer (at most three), both axes labelled, the
  // tolerance band and the strength the leading buffer needs.
  const pugi::xml_node chart = section.select_node(".//*[@id='chart-drift']").node();
  ASSERT_TRUE(chart);
  ASSERT_FALSE(fixture().data.drift.empty());
  EXPECT_LE(fixture().data.drift.size(), 3u);
  EXPECT_EQ(chart.select_nodes(".//g[@class='series']").size(), fixture().data.drift.size());
  std::set<std::string> labels;
  for (const auto& n : chart.select_nodes(".//text[@class='axis-label']")) labels.insert(n.node().child_value());
  EXPECT_EQ(labels, (std::set<std::string>{"buffer concentration (mM, log scale)", "pH after the dose"}));
  EXPECT_EQ(chart.select_nodes(".//g[@class='band']").size(), 1u);
  const std::string needs = chart.select_node(".//g[@class='reference-line']").node().attribute("data-label").value();
  EXPECT_EQ(needs, sr.results[0].name + " " + sig(*sr.results[0].recommended_conc_mol_per_L * 1e3, 3) + " mM (set by " +
                       sr.results[0].binding + ")");
  EXPECT_EQ(fixture().data.drift[0].buffer, sr.results[0].buffer);
}

TEST(Report, ProfileChartHasItsSeriesAxesAndMarks) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  const pugi::xml_node chart = html.select_node("//*[@id='chart-profile']").node();
  ASSERT_TRUE(chart);
  std::vector<std::string> series;
  for (const auto& s : chart.select_nodes(".//g[@class='series']")) series.push_back(s.node().attribute("data-series").value());
  // Model, ideal curve, measured points, and the 5th and 95th percentiles of the Monte Carlo
  // band (one legend entry for both).
  ASSERT_EQ(series.size(), 5u);
  EXPECT_EQ(series[0], "model (Davies activities, salt limits)");
  EXPECT_EQ(series[2], "measured (compound file)");
  EXPECT_EQ(series[3].rfind("5th and 95th percentiles", 0), 0u);
  EXPECT_EQ(chart.select_nodes(".//g[@class='legend-item']").size(), 4u);
  // Every measured point of the compound file is drawn.
  EXPECT_EQ(chart.select_nodes(".//g[@class='series'][3]/*").size(), fixture().compound.measured.size());
  std::set<std::string> labels;
  for (const auto& n : chart.select_nodes(".//text[@class='axis-label']")) labels.insert(n.node().child_value());
  EXPECT_EQ(labels, (std::set<std::string>{"pH", "solubility (mol/L)", "solubility (mg/mL, as free form)"}));
  // Log axis with decade ticks.
  std::set<std::string> ticks;
  for (const auto& n : chart.select_nodes(".//g[@class='axis y-axis']/text[@class='tick']")) ticks.insert(n.node().child_value());
  EXPECT_TRUE(ticks.count("0.01") && ticks.count("0.001")) << ticks.size();
  // Dose line, pHmax line and target line; the limiting salt shaded.
  std::vector<std::string> lines;
  for (const auto& n : chart.select_nodes(".//g[@class='reference-line']")) lines.push_back(n.node().attribute("data-label").value());
  ASSERT_EQ(lines.size(), 3u);
  EXPECT_EQ(lines[0], "target pH 5.00");
  EXPECT_EQ(lines[1], "pHmax " + fixed(fixture().data.profile.ph_max[0].pH, 2) + " (hydrochloride)");
  EXPECT_EQ(lines[2].rfind("dose 2mg/mL (hydrochloride)", 0), 0u) << lines[2];
  const auto bands = chart.select_nodes(".//g[@class='band']");
  ASSERT_EQ(bands.size(), 2u);  // the dihydrochloride in strong acid, then the hydrochloride
  EXPECT_STREQ(bands[0].node().attribute("data-label").value(), "dihydrochloride limits");
  EXPECT_STREQ(bands[1].node().attribute("data-label").value(), "hydrochloride limits");
  EXPECT_TRUE(chart.child("title") && chart.child("desc"));
}

TEST(Report, SpeciesChartHasOneSeriesPerProtonationState) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  const pugi::xml_node chart = html.select_node("//*[@id='chart-species']").node();
  ASSERT_TRUE(chart);
  EXPECT_EQ(chart.select_nodes(".//g[@class='series']").size(), fixture().compound.system.pkas.size() + 1);
  std::set<std::string> labels;
  for (const auto& n : chart.select_nodes(".//text[@class='axis-label']")) labels.insert(n.node().child_value());
  EXPECT_EQ(labels, (std::set<std::string>{"pH", "fraction of dissolved drug"}));
  EXPECT_EQ(chart.select_nodes(".//g[@class='reference-line']").size(), fixture().compound.system.pkas.size());
}

TEST(Report, HtmlTablesShowTheCsvNumbers) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  std::map<std::string, std::vector<std::vector<std::string>>> csv;
  for (const ReportTable& t : report_tables(fixture().data)) csv[t.file] = parse_csv(table_csv(t));
  const auto tables = html.select_nodes("//table[@data-csv]");
  ASSERT_GE(tables.size(), 6u);
  int rows_checked = 0;
  for (const auto& tn : tables) {
    const std::string file = tn.node().attribute("data-csv").value();
    ASSERT_TRUE(csv.count(file)) << file;
    const auto& rows = csv[file];
    std::vector<std::string> head;
    for (const auto& th : tn.node().select_nodes("thead/tr/th")) head.push_back(text_of(th.node()));
    EXPECT_EQ(head, rows[0]) << file;
    for (const auto& tr : tn.node().select_nodes("tbody/tr")) {
      std::vector<std::string> cells;
      for (pugi::xml_node c : tr.node().children()) cells.push_back(text_of(c));
      bool found = false;
      for (std::size_t i = 1; i < rows.size() && !found; ++i) found = rows[i] == cells;
      EXPECT_TRUE(found) << file << ": row starting " << cells[0] << " is not in the CSV";
      ++rows_checked;
    }
  }
  EXPECT_GT(rows_checked, 40);
  // The profile CSV is the full grid (1 to 13 by 0.05) and its numbers are the analysis'.
  const auto& prof = csv["profile.csv"];
  ASSERT_EQ(prof.size(), 1u + 241u);
  EXPECT_EQ(prof[0][1], "solubility (mol/L)");
  for (std::size_t i = 1; i < prof.size(); i += 40) {
    const SolubilityAtPh& s = fixture().data.profile.points[i - 1];
    EXPECT_NEAR(std::stod(prof[i][0]), s.pH, 1e-9);
    EXPECT_NEAR(std::stod(prof[i][1]) / s.solubility_mol_per_L, 1.0, 1e-3);
    EXPECT_NEAR(std::stod(prof[i][2]) / (s.solubility_mol_per_L * fixture().compound.molar_mass_g_per_mol), 1.0, 1e-3);
  }
}

TEST(Report, TraceabilityNamesVersionDateInputsAndDigests) {
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(fixture().html, doc);
  const pugi::xml_node trace = html.select_node("//section[@id='traceability']").node();
  const std::string text = text_of(trace);
  EXPECT_NE(text.find(std::string("pkarta ") + PKARTA_VERSION), std::string::npos);
  EXPECT_NE(text.find("2026-12-01"), std::string::npos);
  EXPECT_NE(text.find("Davies"), std::string::npos);
  EXPECT_NE(text.find("25.0 °C"), std::string::npos);
  const std::string digest = sha256_file_hex(source("compounds/demo-base.xml"));
  EXPECT_NE(text.find(digest), std::string::npos);
  EXPECT_NE(text.find(sha256_hex(builtin_library_xml())), std::string::npos);
  EXPECT_NE(text.find(builtin_library().version), std::string::npos);
  // The data source of the leading buffer's system, as the library gives it.
  const Library lib = builtin_library();
  const std::string& lead = fixture().data.screen->results[0].buffer;
  EXPECT_NE(text.find(lib.system(lib.buffer(lead).system).source), std::string::npos) << lead;
  // References named in the methods.
  const std::string methods = text_of(html.select_node("//section[@id='methods']").node());
  for (const char* ref : {"Henderson", "Davies CW (1962)", "Goldberg RN, Kishore N, Lennen RM (2002)", "van Slyke DD (1922)",
                          "ICH M9 (2019)"}) {
    EXPECT_NE(methods.find(ref), std::string::npos) << ref;
  }
}

TEST(Report, DateComesFromSourceDateEpoch) {
  setenv("SOURCE_DATE_EPOCH", "0", 1);
  EXPECT_EQ(report_date_utc(), "1970-01-01");
  setenv("SOURCE_DATE_EPOCH", "1796083200", 1);
  EXPECT_EQ(report_date_utc(), "2026-12-01");
  setenv("SOURCE_DATE_EPOCH", "yesterday", 1);
  EXPECT_THROW(report_date_utc(), InputError);
  setenv("SOURCE_DATE_EPOCH", kExampleEpoch, 1);
}

TEST(Report, SameInputsGiveTheSameBytes) {
  const Fixture again = demo_base_fixture();
  EXPECT_EQ(again.html, fixture().html);
}

TEST(Report, MarkupInTheCompoundIsEscapedEverywhere) {
  setenv("SOURCE_DATE_EPOCH", kExampleEpoch, 1);
  const std::string evil_name = "<script>alert(\"x\")</script> & 'co', \"q\"";
  const std::string evil_id = "ev&il<script>\"'";
  // The schema's id pattern (letters, digits, _ . + -) keeps markup out of a file's ids: the
  // reader refuses this one; the writers still escape an id handed to them.
  const std::string xml =
      "<compound id=\"ev-il\" name=\"&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; "
      "'co', &quot;q&quot;\" molar-mass=\"300\">\n"
      "  <pka value=\"8.0\" type=\"base\"/>\n"
      "  <intrinsic-solubility value=\"10\" unit=\"ug/mL\"/>\n"
      "  <salt id=\"hydrochloride\" counterion=\"Cl-\" ksp=\"1e-4\"/>\n"
      "</compound>\n";
  const std::string dir = fresh_dir("evil");
  const std::string file = dir + "/evil.xml";
  std::ofstream(file) << xml;
  const Library lib = builtin_library();
  Compound c = load_compound_file(file, lib, nullptr);
  ASSERT_EQ(c.name, evil_name);
  std::string with_evil_id = xml;
  with_evil_id.replace(with_evil_id.find("ev-il"), 5, "ev&amp;il&lt;script&gt;&quot;'");
  EXPECT_THROW(parse_compound(with_evil_id, "evil-id.xml", lib, nullptr), InputError);
  c.id = evil_id;
  ReportRequest req;
  req.dose_text = "1mg/mL";
  req.dose_mol_per_L = 1.0 / 300.0;
  req.profile_step_pH = 0.5;
  RunRecord run;
  run.command_line = "pkarta report --compound " + file;
  const ReportData d = analyse_report(c, lib, req, run);
  const std::vector<std::string> written = write_report_files(d, dir + "/evil.html", {file});
  const std::string html = slurp(dir + "/evil.html");
  EXPECT_EQ(html.find("<script"), std::string::npos);
  pugi::xml_document doc;
  const pugi::xml_node root = parse_html(html, doc);
  ASSERT_TRUE(root);
  EXPECT_EQ(root.select_nodes("//script").size(), 0u);
  EXPECT_EQ(std::string(root.child("head").child("title").child_value()),
            "Preformulation report: " + evil_name + " (" + evil_id + ")");
  EXPECT_NE(text_of(root.select_node("//h1").node()).find(evil_name), std::string::npos);
  // In the SVG charts (title and text alternative).
  const std::string svg_title = root.select_node("//*[@id='chart-profile']/title").node().child_value();
  EXPECT_NE(svg_title.find(evil_name), std::string::npos);
  // In the CSV: the fields read back to the same text.
  const auto rows = parse_csv(slurp(dir + "/evil/compound.csv"));
  std::map<std::string, std::string> q;
  for (const auto& r : rows) q[r[0]] = r[1];
  EXPECT_EQ(q["name"], evil_name);
  EXPECT_EQ(q["id"], evil_id);
}

TEST(Report, WithoutDoseOrTargetOnlyTheirSectionsAreLeftOut) {
  const Library lib = builtin_library();
  const std::string file = source("compounds/demo-ampholyte.xml");
  const Compound c = load_compound_file(file, lib, nullptr);
  ReportRequest req;
  req.uncertainty_samples = 0;
  const ReportData d = analyse_report(c, lib, req, RunRecord{});
  EXPECT_FALSE(d.dose_in_water || d.screen || d.recipe || d.dilution || d.classification || d.uncertainty);
  std::ostringstream out;
  write_report_html(d, "", out);
  pugi::xml_document doc;
  const pugi::xml_node html = parse_html(out.str(), doc);
  std::vector<std::string> ids;
  for (const auto& n : html.select_nodes("//section")) ids.push_back(n.node().attribute("id").value());
  EXPECT_EQ(ids, (std::vector<std::string>{"summary", "compound", "profile", "species", "fit", "methods", "traceability"}));
  // No CSV links without a folder; the summary says what to give for the missing parts.
  EXPECT_EQ(html.select_nodes("//a[@class='csv-link']").size(), 0u);
  std::map<std::string, std::string> keys;
  for (const auto& k : html.select_nodes("//div[@class='key-numbers']/div")) {
    keys[text_of(k.node().first_child())] = text_of(k.node().first_child().next_sibling());
  }
  EXPECT_EQ(keys["Dose"], "not given");
  EXPECT_EQ(keys["Recommended buffer"], "not screened");
  // The profile chart has no dose line without a dose.
  for (const auto& n : html.select_nodes("//*[@id='chart-profile']//g[@class='reference-line']")) {
    EXPECT_EQ(std::string(n.node().attribute("data-label").value()).find("dose"), std::string::npos);
  }
}

TEST(Report, WritesCsvFolderAndRefusesToOverwriteInputs) {
  const std::string dir = fresh_dir("files");
  const std::string html = dir + "/r.html";
  const std::vector<std::string> written = write_report_files(fixture().data, html, {source("compounds/demo-base.xml")});
  ASSERT_FALSE(written.empty());
  EXPECT_EQ(written.back(), html);
  for (const ReportTable& t : report_tables(fixture().data)) {
    EXPECT_EQ(slurp(dir + "/r/" + t.file), table_csv(t)) << t.file;
  }
  const std::string input = dir + "/compound.xml";
  fs::copy_file(source("compounds/demo-base.xml"), input);
  EXPECT_THROW(write_report_files(fixture().data, input, {input}), InputError);
  EXPECT_EQ(slurp(input), slurp(source("compounds/demo-base.xml")));
}

TEST(ReportCli, WritesTheReportAndRefusesBadOutputs) {
  const std::string dir = fresh_dir("cli");
  const std::string bin = PKARTA_BINARY;
  ShellRun r = shell(bin + " report --compound compounds/demo-acid.xml --dose 5mg/mL --form sodium --target-ph 7.4 -o " + dir +
                "/acid.html");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_TRUE(fs::exists(dir + "/acid.html"));
  EXPECT_TRUE(fs::exists(dir + "/acid/profile.csv"));
  // The input file as output: exit 2, a clear message, the input unchanged (the compound file
  // is named .html here, so only the input check can refuse it).
  fs::copy_file(source("compounds/demo-acid.xml"), dir + "/acid-input.html");
  const std::string before = slurp(dir + "/acid-input.html");
  r = shell(bin + " report --compound " + dir + "/acid-input.html -o " + dir + "/acid-input.html");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("refusing to overwrite the input file"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(dir + "/acid-input.html"), before);
  EXPECT_FALSE(fs::exists(dir + "/acid-input"));
  // No output given, an unknown form, a missing folder.
  r = shell(bin + " report --compound compounds/demo-acid.xml");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("-o FILE"), std::string::npos) << r.err;
  r = shell(bin + " report --compound compounds/demo-acid.xml --dose 1mg/mL --form mesylate -o " + dir + "/x.html");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("mesylate"), std::string::npos) << r.err;
  r = shell(bin + " report --compound compounds/demo-acid.xml --dose 1mg/mL --target-ph 7 --into seawater -o " + dir + "/x.html");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("--into: unknown medium 'seawater'"), std::string::npos) << r.err;
  r = shell(bin + " report --compound compounds/demo-acid.xml -o " + dir + "/report");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("ending in .html"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(dir + "/report"));
  r = shell(bin + " report --compound compounds/demo-acid.xml -o " + dir + "/no/such/dir/x.html");
  EXPECT_NE(r.code, 0);
  EXPECT_NE(r.err.find("cannot"), std::string::npos) << r.err;
}

TEST(ReportDemo, CommittedExampleIsCurrent) {
  const std::string dir = fresh_dir("demo");
  const ShellRun r = shell(std::string("SOURCE_DATE_EPOCH=") + kExampleEpoch + " " + PKARTA_BINARY + " demo --out-dir " + dir);
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* name : {"demo-base", "demo-acid", "demo-ampholyte"}) {
    EXPECT_NE(r.out.find(dir + "/" + name + ".html"), std::string::npos) << r.out;
  }
  const std::string how = std::string("; regenerate with: SOURCE_DATE_EPOCH=") + kExampleEpoch +
                          " build/pkarta demo, or make example (then commit reports/demo-base.html and reports/demo-base/)";
  EXPECT_TRUE(slurp(dir + "/demo-base.html") == slurp(source("reports/demo-base.html")))
      << "reports/demo-base.html is out of date" << how;
  int csv_files = 0;
  for (const auto& e : fs::directory_iterator(dir + "/demo-base")) {
    ++csv_files;
    const std::string name = e.path().filename().string();
    EXPECT_TRUE(slurp(e.path().string()) == slurp(source("reports/demo-base/" + name)))
        << "reports/demo-base/" << name << " is out of date" << how;
  }
  int committed = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(source("reports/demo-base"))) ++committed;
  EXPECT_EQ(committed, csv_files) << "reports/demo-base/ holds other files than the demo writes" << how;
}

// Reads a PNG (8-bit RGB or RGBA, non-interlaced) and counts pixels that are not near-white.
struct PngStats {
  unsigned width = 0, height = 0;
  std::size_t non_white = 0;
  std::size_t coloured = 0;  // clearly chromatic pixels (the chart colours)
  std::string error;
};

PngStats png_stats(const std::string& bytes) {
  PngStats st;
  auto be32 = [&](std::size_t p) {
    return (unsigned(static_cast<unsigned char>(bytes[p])) << 24) | (unsigned(static_cast<unsigned char>(bytes[p + 1])) << 16) |
           (unsigned(static_cast<unsigned char>(bytes[p + 2])) << 8) | unsigned(static_cast<unsigned char>(bytes[p + 3]));
  };
  if (bytes.size() < 33 || bytes.compare(0, 8, "\x89PNG\r\n\x1a\n") != 0) {
    st.error = "not a PNG";
    return st;
  }
  std::string idat;
  int colour_type = -1, depth = 0, interlace = 0;
  for (std::size_t p = 8; p + 12 <= bytes.size();) {
    const unsigned n = be32(p);
    const std::string type = bytes.substr(p + 4, 4);
    if (type == "IHDR") {
      st.width = be32(p + 8);
      st.height = be32(p + 12);
      depth = static_cast<unsigned char>(bytes[p + 16]);
      colour_type = static_cast<unsigned char>(bytes[p + 17]);
      interlace = static_cast<unsigned char>(bytes[p + 20]);
    } else if (type == "IDAT") {
      idat += bytes.substr(p + 8, n);
    }
    p += 12 + n;
  }
  if (depth != 8 || (colour_type != 2 && colour_type != 6) || interlace != 0) {
    st.error = "unsupported PNG format";
    return st;
  }
  const std::size_t bpp = colour_type == 6 ? 4 : 3, stride = st.width * bpp;
  std::string raw((stride + 1) * st.height, '\0');
  uLongf len = raw.size();
  if (uncompress(reinterpret_cast<Bytef*>(&raw[0]), &len, reinterpret_cast<const Bytef*>(idat.data()), idat.size()) != Z_OK ||
      len != raw.size()) {
    st.error = "bad image data";
    return st;
  }
  std::vector<unsigned char> prev(stride, 0), line(stride);
  for (unsigned y = 0; y < st.height; ++y) {
    const unsigned char* in = reinterpret_cast<const unsigned char*>(raw.data()) + y * (stride + 1);
    const int filter = in[0];
    for (std::size_t x = 0; x < stride; ++x) {
      const int a = x >= bpp ? line[x - bpp] : 0, b = prev[x], c = x >= bpp ? prev[x - bpp] : 0;
      int pred = 0;
      switch (filter) {
        case 1: pred = a; break;
        case 2: pred = b; break;
        case 3: pred = (a + b) / 2; break;
        case 4: {
          const int p = a + b - c, pa = std::abs(p - a), pb = std::abs(p - b), pc = std::abs(p - c);
          pred = (pa <= pb && pa <= pc) ? a : (pb <= pc ? b : c);
          break;
        }
        default: break;
      }
      line[x] = static_cast<unsigned char>(in[1 + x] + pred);
    }
    for (std::size_t x = 0; x < stride; x += bpp) {
      const int r = line[x], g = line[x + 1], b = line[x + 2];
      if (r < 235 || g < 235 || b < 235) ++st.non_white;
      if (std::max({r, g, b}) - std::min({r, g, b}) > 60) ++st.coloured;
    }
    prev = line;
  }
  return st;
}

TEST(ReportBrowser, ChromiumRendersTheDemoReport) {
  const ShellRun which = shell("command -v chromium");
  ASSERT_EQ(which.code, 0) << "headless Chromium is needed for this test: apt-get install chromium (make test-deps)";
  const std::string dir = fresh_dir("browser");
  const std::string html = dir + "/demo-base.html";
  ASSERT_NO_THROW(write_report_files(fixture().data, html, {}));
  const std::string png = dir + "/demo-base.png";
  const ShellRun r = shell("timeout 120 chromium --headless --no-sandbox --disable-gpu --disable-background-networking "
                      "--disable-component-update --disable-sync --no-first-run --user-data-dir=" + dir +
                      "/profile --screenshot=" + png + " --window-size=1280,3000 file://" + html);
  ASSERT_EQ(r.code, 0) << r.err;
  const PngStats st = png_stats(slurp(png));
  ASSERT_TRUE(st.error.empty()) << st.error;
  EXPECT_EQ(st.width, 1280u);
  EXPECT_EQ(st.height, 3000u);
  const double pixels = double(st.width) * st.height;
  // Text, tables and charts cover a good share of the page; the chart colours show.
  EXPECT_GT(st.non_white / pixels, 0.05) << st.non_white;
  EXPECT_GT(st.coloured / pixels, 0.005) << st.coloured;
  EXPECT_LT(st.non_white / pixels, 0.9);
}

// The PNG reader itself: a white image with one dark and one blue pixel.
TEST(ReportBrowser, PngReaderCountsPixels) {
  const unsigned w = 4, h = 3;
  std::string raw;
  for (unsigned y = 0; y < h; ++y) {
    raw += '\0';  // filter: none
    for (unsigned x = 0; x < w; ++x) {
      if (y == 1 && x == 2) raw += std::string("\x10\x10\x10", 3);
      else if (y == 2 && x == 0) raw += std::string("\x00\x72\xb2", 3);
      else raw += std::string("\xff\xff\xff", 3);
    }
  }
  std::string z(compressBound(raw.size()), '\0');
  uLongf zlen = z.size();
  ASSERT_EQ(compress(reinterpret_cast<Bytef*>(&z[0]), &zlen, reinterpret_cast<const Bytef*>(raw.data()), raw.size()), Z_OK);
  z.resize(zlen);
  auto u32 = [](unsigned v) {
    return std::string{static_cast<char>(v >> 24), static_cast<char>(v >> 16), static_cast<char>(v >> 8), static_cast<char>(v)};
  };
  auto chunk = [&](const std::string& type, const std::string& data) {
    const std::string td = type + data;
    return u32(static_cast<unsigned>(data.size())) + td +
           u32(static_cast<unsigned>(crc32(0, reinterpret_cast<const Bytef*>(td.data()), td.size())));
  };
  const std::string ihdr = u32(w) + u32(h) + std::string("\x08\x02\x00\x00\x00", 5);
  const std::string png = std::string("\x89PNG\r\n\x1a\n", 8) + chunk("IHDR", ihdr) + chunk("IDAT", z) + chunk("IEND", "");
  const PngStats st = png_stats(png);
  ASSERT_TRUE(st.error.empty()) << st.error;
  EXPECT_EQ(st.width, w);
  EXPECT_EQ(st.height, h);
  EXPECT_EQ(st.non_white, 2u);
  EXPECT_EQ(st.coloured, 1u);
  EXPECT_EQ(png_stats("not a png").error, "not a PNG");
}

}  // namespace
