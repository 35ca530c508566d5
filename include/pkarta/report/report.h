// The preformulation report: one self-contained HTML file (inline CSS and SVG, no script, no
// network) and a folder of CSV tables with the same numbers, for preformulation reports and
// the pharmaceutical-development section of regulatory documents.
//
// Two steps, as everywhere in pkarta: analyse_report() runs the analyses (profile, dose in
// water, and whichever further analyses were asked and exist) into a ReportData value;
// the writers turn that value into HTML or CSV text and compute no chemistry. A section
// appears when its analysis is in the ReportData.
//
// Output is deterministic: fixed number formats, stable order, the date taken from
// SOURCE_DATE_EPOCH when set (reproducible-builds.org convention), so the same inputs give
// byte-identical files.
#ifndef PKARTA_REPORT_H_
#define PKARTA_REPORT_H_

#include <cstdint>
#include <cstddef>
#include <functional>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "pkarta/analyses/classify.h"
#include "pkarta/analyses/dilute.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/analyses/fit.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/chem/model.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/analyses/recipe.h"
#include "pkarta/analyses/recipe_formulation.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/analyses/uncertainty.h"

namespace pkarta {

/// What the report is asked to cover. Everything but the compound is optional.
struct ReportRequest {
  std::string dose_text;                  ///< as given, e.g. "2mg/mL" ("" = no dose)
  double dose_mol_per_L = 0.0;            ///< of drug; 0 = no dose
  std::string form = "free";              ///< form weighed: "free" or a salt id
  std::optional<double> target_pH;        ///< for the buffer screen and recipe
  double tolerance_pH = 0.1;
  std::string route = "any";              ///< oral, parenteral, ophthalmic, topical, any
  std::vector<std::string> buffers;       ///< buffers to screen; empty: every buffer of the library
  int drift_buffers = 3;                  ///< leading buffers drawn on the drift chart
  /// Highest single therapeutic dose (mg of `form`) for the ICH M9 solubility class at 37 °C;
  /// absent: no classification section.
  std::optional<double> classify_dose_mg;
  double recipe_volume_L = 1.0;           ///< volume of the leading buffer's recipe
  /// Medium the formulation (leading buffer + dose) is diluted into; "" = by route
  /// (parenteral: plasma-7.4, oral: sif-6.8, others: saline-0.9); "none" = no dilution.
  std::string dilution_medium;
  /// Monte Carlo samples for the uncertainty band of the profile (0 = none). Only pKa and S0
  /// values with an sd in the compound file vary.
  int uncertainty_samples = 100;
  std::uint64_t uncertainty_seed = 20261201;
  double uncertainty_step_pH = 0.25;      ///< grid of the band (coarser than the profile)
  bool fit_measured = true;               ///< fit pKa/S0/Ksp to the file's measured points
  double temperature_C = 25.0;            ///< profile, dose and screen temperature
  ActivityModel activity = ActivityModel::kDavies;
  double profile_from_pH = 1.0;
  double profile_to_pH = 13.0;
  double profile_step_pH = 0.05;
  /// Called as the report's long steps advance (done, total: the Monte Carlo samples); may be
  /// empty. The library never prints: the command line draws its progress bar here.
  std::function<void(std::size_t done, std::size_t total)> progress;
  /// False with a message naming the field ("ReportRequest::profile_step_pH = 0, must be > 0").
  bool is_valid(std::string* error) const;
};

/// An input file and its SHA-256, for the traceability block.
struct InputFile {
  std::string role;     ///< "compound", "library"
  std::string path;     ///< as given on the command line
  std::string sha256;   ///< 64 hex digits
  std::uint64_t bytes = 0;
};

/// Traceability: what produced the report.
struct Provenance {
  std::string tool_version = PKARTA_VERSION;
  std::string library_id;
  std::string library_version;
  std::vector<InputFile> inputs;          ///< the built-in library is listed with its digest too
  std::string date_utc;                   ///< "2026-12-01" (from SOURCE_DATE_EPOCH when set)
  std::string command_line;               ///< the options that made the report, in order
  /// Data sources of the buffer systems the report's results rest on (screened buffers that
  /// were computed), as the library names them: (buffer id, source).
  std::vector<std::pair<std::string, std::string>> buffer_sources;
};

/// pH after the dose against the buffer's concentration, for the drift chart.
struct DriftCurve {
  std::string buffer;                       ///< buffer id
  std::string name;
  std::vector<double> conc_mol_per_L;       ///< log-spaced up to the buffer's max-conc
  std::vector<double> pH_after_drug;        ///< NaN where the equilibrium did not converge
  std::optional<double> min_conc_mol_per_L; ///< from the screen
};

/// Everything a report shows. Built by analyse_report(); writers only read it.
struct ReportData {
  Compound compound;
  ReportRequest request;
  Provenance provenance;
  double free_molar_mass_g_per_mol = 0.0;
  double form_molar_mass_g_per_mol = 0.0;
  /// Salts with the Ksp used at 25 °C reference and at the run temperature.
  std::vector<double> salt_ksp_at_run_temperature;
  /// pH-solubility profile in water, pH held by HCl or NaOH (profile.h), at the run temperature,
  /// with pHmax of each salt that can limit there.
  Profile profile;
  /// Solubility classification after ICH M9 (classify.h), when a dose in mg was given.
  std::optional<ClassifyResult> classification;
  /// The buffer screen (screen.h), when a dose and a target pH were given.
  std::optional<ScreenReport> screen;
  /// pH drift against concentration for the leading buffers of the screen.
  std::vector<DriftCurve> drift;
  /// Bench recipe of the leading buffer at the target pH, at its minimum strength rounded up
  /// to the 1-2-5 series (isotonic with NaCl for parenteral and ophthalmic routes).
  std::optional<Recipe> recipe;
  std::string recipe_tonicity_note;       ///< why the tonicity reagent was chosen ("" = NaCl, default)
  /// When no buffer holds the target made first (premade) but one does with the pH adjusted
  /// after the dose: the bench recipe of that formulation (buffer reagent, tonicity reagent,
  /// drug, titrant after the drug), at the strength the adjusted screen recommends.
  std::optional<Formulation> adjusted_formulation;
  /// The formulation (recipe + dose) diluted into a medium.
  std::optional<DilutionResult> dilution;
  /// Monte Carlo band of the profile from the compound's pKa and S0 uncertainties.
  std::optional<ProfileBands> uncertainty;
  /// Fit of the compound's constants to its measured points (when it has enough of them).
  std::optional<FitResult> fit;
  /// The dose dissolved in water alone (no buffer): pH it sets, what stays solid.
  std::optional<MixResult> dose_in_water;
  std::vector<std::string> warnings;
};

/// What the caller gathered about the run for the traceability block: the input files with
/// their digests (in report order), the report date and the command line. The analysis reads
/// no file and no environment; it copies these into ReportData::provenance.
struct RunRecord {
  std::vector<InputFile> inputs;
  std::string date_utc;
  std::string command_line;
};

/// Runs the analyses the request asks for. Throws InputError for an invalid request (named
/// field) or an unknown form.
ReportData analyse_report(const Compound& compound, const Library& library, const ReportRequest& request,
                          const RunRecord& run);

/// The smallest value of the 1-2-5 series (..., 1, 2, 5, 10, ...) at or above `x` (> 0).
double round_up_125(double x);

/// The date for reports: SOURCE_DATE_EPOCH (seconds since 1970, UTC) when set and valid, else
/// the current UTC date; "YYYY-MM-DD". Throws InputError when SOURCE_DATE_EPOCH is set but not
/// a non-negative integer.
std::string report_date_utc();

/// One table of the report, as the HTML shows it and the CSV holds it (same strings).
struct ReportTable {
  std::string file;                        ///< CSV file name, e.g. "profile.csv"
  std::string caption;
  std::vector<std::string> header;         ///< with units: "solubility (mg/mL)"
  std::vector<std::vector<std::string>> rows;
};

/// The tables of the report (compound, profile, dose in water, ...), in report order.
std::vector<ReportTable> report_tables(const ReportData& data);

/// RFC 4180 text of a table (header row, CRLF line endings).
std::string table_csv(const ReportTable& table);

/// Writes the HTML report. `csv_folder` is the folder name the HTML links to for the tables
/// (relative to the HTML file, e.g. "demo-base"); "" = no links.
void write_report_html(const ReportData& data, const std::string& csv_folder, std::ostream& out);

/// Writes `html_path` and, beside it, the folder NAME/ (NAME = html file name without
/// extension) with one CSV file per table, as one set (write_file_set: the old set or the new
/// one, never a mix; a folder with files pkarta did not write is refused). Refuses (InputError)
/// to overwrite any of `inputs_to_protect`; write failures throw std::system_error naming the file.
/// Returns the paths written (CSV files, then the HTML file).
std::vector<std::string> write_report_files(const ReportData& data, const std::string& html_path,
                                            const std::vector<std::string>& inputs_to_protect);

}  // namespace pkarta

#endif  // PKARTA_REPORT_H_
