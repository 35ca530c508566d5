// What `report` and `demo` share: the report options and the step from options to files.
#ifndef PKARTA_CLI_REPORT_CLI_H_
#define PKARTA_CLI_REPORT_CLI_H_

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli_common.h"
#include "pkarta/base/table.h"
#include "pkarta/report/report.h"

namespace pkarta::cli {

struct ReportOptions {
  std::string compound_file;
  std::string dose;
  std::string form = "free";
  std::string dose_as = "weighed";    ///< weighed | free (the dose as free-form equivalent)
  std::string target_ph;
  std::string target_ph_alias;        ///< --ph, another name of --target-ph
  std::string tolerance = "0.1";
  std::string route = "any";
  std::string temperature = "25";
  std::string dose_mg;                ///< highest single dose for the ICH M9 class
  std::string into;                   ///< dilution medium ("" = by route, "none" = no dilution)
  ActivityOptions activity;
  std::string output;
};

void add_report_options(po::options_description& desc, ReportOptions& r);

/// The options as a canonical argument string (" --compound F --dose 2mg/mL ..."), for the
/// traceability block: the same options always give the same text.
std::string report_arguments(const ReportOptions& r);

/// Loads the compound, runs the analyses and writes the HTML file and its CSV folder.
/// Returns the paths written (CSV files, then the HTML file).
/// `data_out` (may be null) receives the analysed report.
std::vector<std::string> make_report(const ReportOptions& r, const CommonOptions& common, const Library& library,
                                     const std::string& command_line, ReportData* data_out = nullptr);

/// The files a report run wrote, for --format json (one object per report) and csv (one row per
/// file): `written` as make_report returns it (CSV tables first, the HTML last).
nlohmann::ordered_json report_files_json(const std::string& compound_file, const std::vector<std::string>& written);
DataTable report_files_table(const std::vector<std::pair<std::string, std::vector<std::string>>>& runs);

}  // namespace pkarta::cli

#endif  // PKARTA_CLI_REPORT_CLI_H_
