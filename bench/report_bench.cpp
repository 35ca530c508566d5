// The full demo report: analyses of the three demo compounds, HTML with its charts and the CSV
// tables (in memory; writing the files adds a few milliseconds).
#include <benchmark/benchmark.h>

#include <cmath>
#include <filesystem>
#include <sstream>
#include <string>
#include <vector>

#include "pkarta/chem/mixture_builder.h"
#include "pkarta/report/report.h"
#include "pkarta/report/svg_chart.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/xml_input.h"


namespace {

using namespace pkarta;

struct DemoCase {
  const char* file;
  const char* dose;
  const char* form;
  double target_pH;
  double dose_mg;
  const char* route;
};
constexpr DemoCase kCases[] = {{"demo-base", "2mg/mL", "hydrochloride", 5.0, 100, "parenteral"},
                               {"demo-acid", "5mg/mL", "sodium", 7.4, 200, "ophthalmic"},
                               {"demo-ampholyte", "0.1mg/mL", "hydrochloride", 7.0, 50, "oral"}};

std::size_t demo_reports(const Library& lib, const std::string& dir, int uncertainty_samples = 100) {
  std::size_t bytes = 0;
  for (const DemoCase& c : kCases) {
    const std::string file = dir + "/" + c.file + ".xml";
    const Compound compound = load_compound_file(file, lib, nullptr);
    ReportRequest req;
    req.dose_text = c.dose;
    req.form = c.form;
    req.dose_mol_per_L = dose_conc_mol_per_L(lib, compound, c.form, parse_amount(c.dose), 25.0);
    req.target_pH = c.target_pH;
    req.classify_dose_mg = c.dose_mg;
    req.route = c.route;
    req.uncertainty_samples = uncertainty_samples;
    RunRecord run;
    run.command_line = "pkarta report";
    const ReportData d = analyse_report(compound, lib, req, run);
    std::ostringstream out;
    write_report_html(d, c.file, out);
    bytes += out.str().size();
    for (const ReportTable& t : report_tables(d)) bytes += table_csv(t).size();
  }
  return bytes;
}

// The demo compounds: ./compounds when run from the source folder (make bench), else beside
// this file.
std::string compounds_dir() {
  if (std::filesystem::is_directory("compounds")) return "compounds";
  return (std::filesystem::path(__FILE__).parent_path().parent_path() / "compounds").string();
}

void BM_demo_report_three_compounds(benchmark::State& state) {
  const Library lib = builtin_library();
  const std::string dir = compounds_dir();
  std::size_t bytes = 0;
  for (auto _ : state) {
    bytes = demo_reports(lib, dir);
    benchmark::DoNotOptimize(bytes);
  }
  state.counters["output_kB"] = static_cast<double>(bytes) / 1000.0;
}
BENCHMARK(BM_demo_report_three_compounds)->Unit(benchmark::kMillisecond)->UseRealTime();

// The same without the Monte Carlo band (what the other analyses cost).
void BM_demo_report_without_uncertainty(benchmark::State& state) {
  const Library lib = builtin_library();
  const std::string dir = compounds_dir();
  for (auto _ : state) benchmark::DoNotOptimize(demo_reports(lib, dir, 0));
}
BENCHMARK(BM_demo_report_without_uncertainty)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_svg_chart_241_points(benchmark::State& state) {
  svg::Chart c;
  c.id = "b";
  c.x = {"pH", 1, 13};
  c.y = {"S (mol/L)", 1e-6, 1, svg::Scale::kLog10};
  svg::Series s{"model"};
  for (int i = 0; i <= 240; ++i) {
    s.x.push_back(1 + 0.05 * i);
    s.y.push_back(1e-5 * (1 + std::pow(10.0, 8 - s.x.back())));
  }
  c.series = {s, s, s};
  for (auto _ : state) benchmark::DoNotOptimize(svg::render_svg(c));
}
BENCHMARK(BM_svg_chart_241_points)->Unit(benchmark::kMicrosecond);

}  // namespace
