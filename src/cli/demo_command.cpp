// `pkarta demo` (what `make demo` runs): the reports of the three invented demo compounds.
#include <filesystem>
#include <iostream>
#include <system_error>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/base/format.h"
#include "report_cli.h"

namespace pkarta::cli {

namespace {

bool vm_has_dir(const std::string& dir) { return std::filesystem::is_directory(dir); }

// Invented demonstration scenarios: dose, form, target pH and route of each demo compound.
struct DemoCase {
  const char* file;
  const char* dose;
  const char* form;
  const char* target_ph;
  const char* route;
  const char* dose_mg;  ///< highest single dose, for the ICH M9 class
};
constexpr DemoCase kDemoCases[] = {
    {"demo-base", "2mg/mL", "hydrochloride", "5.0", "parenteral", "100"},
    {"demo-acid", "5mg/mL", "sodium", "7.4", "ophthalmic", "200"},
    {"demo-ampholyte", "0.1mg/mL", "hydrochloride", "7.0", "oral", "50"},
};

std::string summary_line(const ReportData& d) {
  std::string s = d.compound.name + ":";
  if (d.profile.ph_max.empty()) s += " no salt limits in water;";
  for (const PhMax& p : d.profile.ph_max) s += " pHmax " + fixed(p.pH, 2) + " (" + p.salt + ");";
  if (d.classification) s += " ICH M9: " + std::string(d.classification->verdict == "high" ? "highly soluble;" : "not highly soluble;");
  if (d.screen) {
    const ScreenResult* lead = nullptr;
    for (const ScreenResult& r : d.screen->results) {
      if (r.status == ScreenStatus::kOk) {
        lead = &r;
        break;
      }
    }
    s += lead ? " leading buffer " + lead->name + " " + sig(*lead->recommended_conc_mol_per_L * 1e3, 3) + " mM (set by " +
                    lead->binding + ");"
              : std::string(" no buffer holds the target;");
  }
  if (d.dose_in_water && d.dose_in_water->equilibrium.drug) {
    const Equilibrium& e = d.dose_in_water->equilibrium;
    s += " dose " + d.request.dose_text + " in water: pH " + fixed(e.pH, 2) + ", " +
         (e.drug->solid == "none" ? std::string("all dissolved") : e.drug->solid + " remains");
  }
  return s;
}

}  // namespace

int run_demo(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::string dir = "compounds";
    std::string out_dir = "reports";
    po::options_description desc("demo options");
    desc.add_options()
        ("compounds", po::value(&dir)->default_value("compounds"), "folder of the demo compounds")
        ("out-dir,o", po::value(&out_dir)->default_value("reports"), "folder the reports are written to");
    add_common_options(desc, common);
    parse(args, desc);
    if (common.help) {
      print_help(std::cout, "pkarta demo [--compounds DIR] [--out-dir DIR]", desc);
      std::cout << "\n" << tables_help({{"files", "one row per file written (--format csv; json lists them)"}});
      print_examples(std::cout, {"pkarta demo",
                                 "pkarta demo -o my-reports --format json"});
      return 0;
    }
    check_format(common.format);
    // Text goes to standard output; with csv or json the progress lines go to stderr.
    std::ostream& say = common.format == "text" ? std::cout : std::cerr;
    nlohmann::ordered_json reports = nlohmann::ordered_json::array();
    std::vector<std::pair<std::string, std::vector<std::string>>> runs;
    if (!vm_has_dir(dir) && !shipped_compounds_dir().empty()) dir = shipped_compounds_dir();
    const Library lib = load_libraries(common);
    std::error_code ec;
    std::filesystem::create_directories(out_dir, ec);
    if (ec) {
      error("cannot create folder " + out_dir + ": " + ec.message());
      return static_cast<int>(kExitRefused);
    }
    say << "pkarta demo: preformulation reports of three invented compounds\n\n";
    for (const DemoCase& dc : kDemoCases) {
      ReportOptions r;
      r.compound_file = dir + "/" + dc.file + ".xml";
      r.dose = dc.dose;
      r.form = dc.form;
      r.target_ph = dc.target_ph;
      r.route = dc.route;
      r.dose_mg = dc.dose_mg;
      r.output = out_dir + "/" + dc.file + ".html";
      ReportData data;
      std::vector<std::string> written;
      try {
        written = make_report(r, common, lib, "pkarta report" + report_arguments(r), &data);
      } catch (const std::system_error& e) {
        error(e.what());
        return static_cast<int>(kExitRefused);
      }
      reports.push_back(report_files_json(r.compound_file, written));
      runs.emplace_back(r.compound_file, written);
      say << "  " << r.output << "  (tables in " << out_dir << "/" << dc.file << "/, " << written.size() - 1
                << " CSV files)\n    " << summary_line(data) << "\n";
    }
    say << "\nOpen the HTML files in any browser; they need no network. " << caution_text() << "\n";
    if (common.format == "json") print_json(nlohmann::ordered_json{{"reports", reports}});
    else if (common.format == "csv") write_table_csv(report_files_table(runs), std::cout);
    return 0;
  });
}

}  // namespace pkarta::cli
