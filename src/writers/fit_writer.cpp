// Text, CSV and JSON of a solubility fit (analyses/fit.h).
#include "pkarta/writers/fit_writer.h"
#include "pkarta/writers/tables.h"

#include <nlohmann/json.hpp>

#include <cmath>

#include "pkarta/base/format.h"

namespace pkarta {

namespace {

std::string se_text(double se) { return std::isfinite(se) ? sig(se, 2) : "n/a"; }

}  // namespace

void write_fit_text(const FitResult& r, std::ostream& out) {
  out << "Fit of " << r.parameters.size() << " parameter" << (r.parameters.size() == 1 ? "" : "s")
      << " to " << r.residuals.size() << " measured solubilities (" << r.data_source << ")\n";
  out << "  model: solubility with excess solid, pH held by a titrant (as in profile); weighted least\n"
         "  squares in log10 S; constants at the reference temperatures of the compound file\n";
  out << "  status: " << r.message;
  if (r.iterations >= 0) out << " after " << r.iterations << " iterations (" << r.evaluations << " model evaluations)";
  out << "\n\n";
  TextTable t({"parameter", "start", "estimate", "std error"});
  for (const FitParameter& p : r.parameters) {
    t.add_row({p.name, fixed(p.start, 3), fixed(p.estimate, 3), se_text(p.std_error)});
  }
  t.write(out);
  if (r.parameters.size() > 1) {
    out << "\nCorrelation\n";
    std::vector<std::string> head{""};
    for (const FitParameter& p : r.parameters) head.push_back(p.name);
    TextTable c(head);
    for (std::size_t a = 0; a < r.parameters.size(); ++a) {
      std::vector<std::string> row{r.parameters[a].name};
      for (std::size_t b = 0; b < r.parameters.size(); ++b) {
        row.push_back(fixed(r.correlation(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b)), 3));
      }
      c.add_row(row);
    }
    c.write(out);
  }
  out << "\nResiduals (log10 mol/L)\n";
  TextTable res({"pH", "T (°C)", "observed", "fitted", "residual", "limiting solid"});
  for (const FitResidual& x : r.residuals) {
    res.add_row({fixed(x.pH, 2), fixed(x.temperature_C, 1), fixed(x.observed_log10, 3),
                 fixed(x.fitted_log10, 3), fixed(x.observed_log10 - x.fitted_log10, 3), x.limiting_solid});
  }
  res.write(out);
  out << "\n  rms " << fixed(r.rms_log10, 3) << " log10 over " << r.residuals.size() << " points";
  if (std::isfinite(r.residual_sd)) {
    out << "; residual sd " << fixed(r.residual_sd, 3) << " (" << r.degrees_of_freedom << " degrees of freedom)";
  }
  out << "\n";
  if (r.lack_of_fit_test == "chi-square") {
    out << "  lack of fit: reduced chi-square " << fixed(r.reduced_chi_square, 3)
        << " against the stated sd (p = " << sig(r.lack_of_fit_p, 2) << ")\n";
  } else if (r.lack_of_fit_test == "runs") {
    out << "  lack of fit: " << r.runs.runs << " runs of residual signs, " << fixed(r.runs.expected_runs, 1)
        << " expected (runs test p = " << sig(r.lack_of_fit_p, 2) << ")\n";
  }
  if (!r.warnings.empty()) {
    out << "\nWarnings\n";
    for (const std::string& w : r.warnings) out << "  - " << w << "\n";
  }
  out << "\n" << caution_text() << "\n";
}

void write_fit_csv(const FitResult& r, std::ostream& out) {
  write_table_csv(fit_tables(r).front(), out);
}

void write_fit_json(const FitResult& r, std::ostream& out) {
  using J = nlohmann::ordered_json;
  auto num = [](double v) { return std::isfinite(v) ? J(v) : J(nullptr); };
  J j;
  j["status"] = r.status == FitStatus::kConverged ? "converged"
                : r.status == FitStatus::kMaxIterations ? "max-iterations" : "failure";
  j["message"] = r.message;
  j["data_source"] = r.data_source;
  J ps = J::array();
  for (const FitParameter& p : r.parameters) {
    ps.push_back({{"name", p.name}, {"estimate", p.estimate}, {"std_error", num(p.std_error)}, {"start", p.start}});
  }
  j["parameters"] = ps;
  J corr = J::array();
  for (Eigen::Index a = 0; a < r.correlation.rows(); ++a) {
    J row = J::array();
    for (Eigen::Index b = 0; b < r.correlation.cols(); ++b) row.push_back(num(r.correlation(a, b)));
    corr.push_back(row);
  }
  j["correlation"] = corr;
  J by_name = J::object();  // the same matrix keyed by parameter names
  for (Eigen::Index a = 0; a < r.correlation.rows() && a < static_cast<Eigen::Index>(r.parameters.size()); ++a) {
    J row = J::object();
    for (Eigen::Index b = 0; b < r.correlation.cols() && b < static_cast<Eigen::Index>(r.parameters.size()); ++b) {
      row[r.parameters[static_cast<std::size_t>(b)].name] = num(r.correlation(a, b));
    }
    by_name[r.parameters[static_cast<std::size_t>(a)].name] = row;
  }
  j["correlation_by_parameter"] = by_name;
  j["rms_log10"] = r.rms_log10;  // the same as rms_residual_log10_molar (older name)
  j["rms_residual_log10_molar"] = r.rms_log10;
  j["residual_sd_log10"] = num(r.residual_sd);
  j["degrees_of_freedom"] = r.degrees_of_freedom;
  j["lack_of_fit_test"] = r.lack_of_fit_test;
  j["reduced_chi_square"] = num(r.reduced_chi_square);
  j["lack_of_fit_p"] = num(r.lack_of_fit_p);
  j["runs_test"] = {{"runs", r.runs.runs},
                    {"positive", r.runs.positive},
                    {"negative", r.runs.negative},
                    {"expected_runs", num(r.runs.expected_runs)},
                    {"p", num(r.runs.p)}};
  j["held_at_start"] = r.held;
  j["iterations"] = r.iterations;
  J res = J::array();
  for (const FitResidual& x : r.residuals) {
    res.push_back({{"pH", x.pH},
                   {"observed_log10", x.observed_log10},
                   {"fitted_log10", x.fitted_log10},
                   {"temperature_C", x.temperature_C},
                   {"limiting_solid", x.limiting_solid}});
  }
  j["residuals"] = res;
  j["warnings"] = r.warnings;
  j["caution"] = caution_text();
  out << j.dump(2) << "\n";
}

}  // namespace pkarta
