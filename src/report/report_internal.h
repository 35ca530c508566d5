// Internal to the report (src/report/, not installed): the small formatting pieces shared by
// its tables, charts and HTML page.
#ifndef PKARTA_SRC_REPORT_REPORT_INTERNAL_H_
#define PKARTA_SRC_REPORT_REPORT_INTERNAL_H_

#include <cstddef>
#include <ostream>
#include <string>
#include <vector>

#include "pkarta/base/format.h"
#include "pkarta/report/report.h"
#include "pkarta/report/svg_chart.h"

namespace pkarta {
namespace report_internal {

/// "free form" for the free form, else the salt's name.
inline std::string form_label(const std::string& form) { return form == "free" ? "free form" : form; }

/// A concentration in mol/L as mg/mL of a form of molar mass `molar_mass`, 3 significant figures.
inline std::string mg_per_mL(double mol_per_L, double molar_mass) { return sig(mol_per_L * molar_mass, 3); }

/// The first buffer of the screen that holds the target (the screen is ranked), or null.
inline const ScreenResult* leading_buffer(const ReportData& d) {
  if (!d.screen) return nullptr;
  for (const ScreenResult& r : d.screen->results) {
    if (r.status == ScreenStatus::kOk) return &r;
  }
  return nullptr;
}

/// Text escaped for HTML/XML.
inline std::string esc(const std::string& s) { return svg::xml_escape(s); }

/// Writes a table as HTML: caption (with a link to its CSV in `csv_folder` unless ""), header,
/// the rows given by index (all when null), an optional note under the caption, and the row
/// `lead_row` (>= 0) highlighted. Cells that read as numbers are right-aligned.
void write_table_html(const ReportTable& t, std::ostream& out, const std::string& csv_folder,
                      const std::vector<std::size_t>* rows = nullptr, const std::string& note = "",
                      int lead_row = -1);

/// The table written to `file`, or null.
const ReportTable* find_table(const std::vector<ReportTable>& tables, const std::string& file);

/// The style sheet of the page (report_style.cpp).
extern const char* const kReportCss;

// The charts of the report (report_charts.cpp).
svg::Chart profile_chart(const ReportData& d);
svg::Chart species_chart(const ReportData& d);
svg::Chart drift_chart(const ReportData& d);  ///< needs a target pH and drift curves
svg::Chart dilution_chart(const DilutionResult& dl);

}  // namespace report_internal
}  // namespace pkarta

#endif  // PKARTA_SRC_REPORT_REPORT_INTERNAL_H_
