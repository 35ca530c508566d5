#include "report_cli.h"

#include "progress_bar.h"

#include "pkarta/base/format.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/sha256.h"
#include "pkarta/io/text_file.h"
#include "pkarta/io/xml_input.h"
#include "pkarta/report/report.h"

namespace pkarta::cli {

namespace {

InputFile hash_input(const std::string& role, const std::string& path, const std::string& text) {
  return InputFile{role, path, sha256_hex(text), static_cast<std::uint64_t>(text.size())};
}

// The traceability record of a report run: the compound file, the built-in library, the
// library files given, each with its SHA-256; the date (SOURCE_DATE_EPOCH when set).
RunRecord gather_run_record(const std::string& compound_file, const std::vector<std::string>& library_files,
                            const std::string& command_line) {
  RunRecord run;
  run.date_utc = report_date_utc();
  run.command_line = command_line;
  if (!compound_file.empty()) run.inputs.push_back(hash_input("compound", compound_file, read_text_file(compound_file)));
  run.inputs.push_back(hash_input("library", "<built-in> compounds/library.xml", builtin_library_xml()));
  for (const std::string& f : library_files) run.inputs.push_back(hash_input("library", f, read_text_file(f)));
  return run;
}

}  // namespace

void add_report_options(po::options_description& desc, ReportOptions& r) {
  desc.add_options()
      ("compound", po::value(&r.compound_file), "compound XML file")
      ("dose", po::value(&r.dose), "dose as an amount of the form weighed, e.g. 2mg/mL (draws the dose line)")
      ("form", po::value(&r.form)->default_value("free"), "form of the drug: free or a salt id")
      ("dose-as", po::value(&r.dose_as)->default_value("weighed"),
       "weighed: --dose is of the form weighed; free: of its free-form equivalent")
      ("target-ph", po::value(&r.target_ph), "pH the formulation must hold (buffer screen and recipe)")
      ("ph", po::value(&r.target_ph_alias), "the same as --target-ph")
      ("tolerance", po::value(&r.tolerance)->default_value("0.1"), "allowed pH drift after the dose")
      ("dose-mg", po::value(&r.dose_mg), "highest single dose in mg of the form, for the ICH M9 solubility class at 37 °C")
      ("into", po::value(&r.into), "medium the formulation is diluted into (default by route; none: no dilution)")
      ("route", po::value(&r.route)->default_value("any"), "oral, parenteral, ophthalmic, topical or any")
      ("temp", po::value(&r.temperature)->default_value("25"), "temperature, °C");
  add_activity_options(desc, r.activity);
  desc.add_options()
      ("output,o", po::value(&r.output), "HTML file to write; its CSV tables go to the folder beside it");
}

std::string report_arguments(const ReportOptions& r) {
  std::string s = " --compound " + r.compound_file;
  if (!r.dose.empty()) s += " --dose " + r.dose;
  if (r.form != "free") s += " --form " + r.form;
  if (!r.target_ph.empty()) s += " --target-ph " + r.target_ph;
  if (r.tolerance != "0.1") s += " --tolerance " + r.tolerance;
  if (r.route != "any") s += " --route " + r.route;
  if (!r.dose_mg.empty()) s += " --dose-mg " + r.dose_mg;
  if (!r.into.empty()) s += " --into " + r.into;
  s += " --temp " + r.temperature;
  s += activity_arguments(r.activity);
  return s;
}

std::vector<std::string> make_report(const ReportOptions& r, const CommonOptions& common, const Library& library,
                                     const std::string& command_line, ReportData* data_out) {
  const auto ends_with = [&](const std::string& suffix) {
    return r.output.size() > suffix.size() && r.output.compare(r.output.size() - suffix.size(), suffix.size(), suffix) == 0;
  };
  if (!ends_with(".html") && !ends_with(".htm")) {
    throw InputError(SourceLocation{"--output", 0, 0},
                     "expected an HTML file name ending in .html (its tables go to the folder of the same name), got \"" +
                         r.output + "\"");
  }
  ReportRequest req;
  req.temperature_C = option_temperature("--temp", r.temperature);
  req.activity = activity_model_of(r.activity);
  req.form = r.form;
  req.tolerance_pH = option_number("--tolerance", r.tolerance, 1e-4, 2.0);
  if (!r.target_ph.empty()) req.target_pH = option_number("--target-ph", r.target_ph, 0.0, 14.0);
  if (r.route != "any" && r.route != "oral" && r.route != "parenteral" && r.route != "ophthalmic" &&
      r.route != "topical") {
    throw InputError(SourceLocation{"--route", 0, 0},
                     "unknown route \"" + r.route + "\", expected oral, parenteral, ophthalmic, topical or any");
  }
  req.route = r.route;
  if (!r.into.empty() && r.into != "none") check_medium_option(library, "--into", r.into);
  req.dilution_medium = r.into;
  if (!r.dose_mg.empty()) req.classify_dose_mg = option_number("--dose-mg", r.dose_mg, 1e-6, 1e7);
  const Compound compound = load_compound(r.compound_file, library);
  if (!r.dose.empty()) {
    const Amount dose = option_amount("--dose", r.dose);
    const DoseBasis basis = option_dose_basis(r.dose_as);
    try {
      req.dose_mol_per_L = dose_conc_mol_per_L(library, compound, r.form, dose, req.temperature_C, basis);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--form", 0, 0}, e.message());
    }
    if (!(req.dose_mol_per_L > 0)) throw InputError(SourceLocation{"--dose", 0, 0}, "the dose must be above 0");
    check_dose("--dose", compound, r.dose, req.dose_mol_per_L);
    req.dose_text = spaced_amount(r.dose) + dose_basis_note(basis, r.form);
  } else if (r.form != "free") {
    form_molar_mass(compound, r.form, library);  // an unknown form is an error even without a dose
  }
  std::string why;
  if (!req.is_valid(&why)) throw InputError(why);  // before the run record, as the analysis would
  const ProgressBar bar("report " + r.compound_file);
  req.progress = bar;
  const ReportData data = analyse_report(compound, library, req, gather_run_record(r.compound_file, common.library_files, command_line));
  std::vector<std::string> protect = {r.compound_file};
  protect.insert(protect.end(), common.library_files.begin(), common.library_files.end());
  bar.finish();
  std::vector<std::string> written = write_report_files(data, r.output, protect);
  if (data_out) *data_out = data;
  return written;
}

nlohmann::ordered_json report_files_json(const std::string& compound_file, const std::vector<std::string>& written) {
  nlohmann::ordered_json tables = nlohmann::ordered_json::array();
  for (std::size_t i = 0; i + 1 < written.size(); ++i) tables.push_back(written[i]);
  return {{"compound_file", compound_file}, {"html", written.empty() ? "" : written.back()}, {"tables", tables}};
}

DataTable report_files_table(const std::vector<std::pair<std::string, std::vector<std::string>>>& runs) {
  DataTable t{"files", {"compound_file", "html", "file", "kind"}, {}};
  for (const auto& [compound, written] : runs) {
    const std::string html = written.empty() ? "" : written.back();
    for (std::size_t i = 0; i < written.size(); ++i) {
      t.add({compound, html, written[i], i + 1 == written.size() ? "html" : "csv"});
    }
  }
  return t;
}

}  // namespace pkarta::cli
