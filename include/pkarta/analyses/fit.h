// Fitting pKa values, intrinsic solubility and salt Ksp to measured solubilities.
//
// Weighted nonlinear least squares in log10 solubility: the model is solubility_at_pH
// (profile.h: excess solid, pH held by a titrant in a medium, salt plateau included), evaluated
// at each point's pH and temperature. The parameters are log10 S0 (mol/L), pKa values and
// log10 Ksp of named salts, each at the reference temperature it has in the compound file
// (points at other temperatures are corrected with the file's dH values, as everywhere).
//
// The minimiser is levenberg_marquardt() (levenberg_marquardt.h) with a forward-difference
// Jacobian; standard errors come from the covariance s^2 (J'WJ)^-1 scaled
// by the residual variance s^2 = chi^2 / (m - n).
#ifndef PKARTA_FIT_H_
#define PKARTA_FIT_H_

#include <Eigen/Core>

#include <string>
#include <vector>

#include "pkarta/base/error.h"
#include "pkarta/chem/model.h"
#include "pkarta/analyses/fit_statistics.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/io/solubility_csv.h"  // FitPoint, the CSV reader

namespace pkarta {

/// The points of a compound file's measured-solubility block (unweighted).
std::vector<FitPoint> fit_points_from_compound(const Compound& compound);

/// A fitted quantity.
struct FitParameter {
  enum class Kind { kLog10S0, kPka, kLog10Ksp };
  Kind kind = Kind::kLog10S0;
  int index = 0;         ///< pKa index (0-based) or salt index into compound.salts
  std::string name;      ///< "log10_S0_mol_per_L", "pKa1", "log10_Ksp:hydrochloride"
  double start = 0.0;    ///< value in the compound file
  double estimate = 0.0;
  double std_error = 0.0;  ///< NaN when not estimable (rank-deficient, or m == n)
  double lower = 0.0;    ///< search range
  double upper = 0.0;
};

/// Parses a parameter list: "s0", "pka1".."pkaN", "ksp:SALT", comma-separated, case-insensitive,
/// in the order given. Starting values are the compound's.
/// Throws InputError located at `option` for an unknown, repeated or inapplicable name.
/// Example: parse_fit_parameters("s0,pka2,ksp:hydrochloride", compound)
std::vector<FitParameter> parse_fit_parameters(const std::string& list, const Compound& compound,
                                               const std::string& option = "--params");

/// How the fit is run.
struct FitOptions {
  /// Medium, titrants and activity model of the measurements (temperature comes from each
  /// point). Default: water, pH held by HCl or NaOH, Davies activities.
  ProfileConditions conditions;
  int max_iterations = 100;              ///< Levenberg-Marquardt iterations
  double relative_step_tolerance = 1e-9; ///< stop when every |step| < tol (1 + |p|)
  double derivative_step = 1e-6;         ///< forward-difference step in parameter units
  /// A pKa is flagged as not determined when no point lies within this many pH units of it.
  double pka_window_pH = 1.5;
  /// Estimates with a standard error above this (log10 or pKa units) are flagged as poorly
  /// determined.
  double poor_std_error = 0.5;
  /// Pairs with |correlation| above this are flagged.
  double strong_correlation = 0.98;
  /// A parameter that moves no point by more than this (log10 S per unit of the parameter)
  /// at the starting values is not determined by the data (e.g. every point more than 2 pH
  /// units on the neutral side of a pKa): it is held at its starting value with a warning,
  /// as is one whose estimate runs to the end of its search range. 0: never held.
  double min_leverage = 0.01;
  /// Lack-of-fit p-values below this give a warning.
  double lack_of_fit_alpha = 0.05;
  bool is_valid(std::string* error) const;
};

enum class FitStatus { kConverged, kMaxIterations, kFailure };

/// One point after the fit.
struct FitResidual {
  double pH = 7.0;
  double temperature_C = 25.0;
  double observed_log10 = 0.0;   ///< log10 of the measured solubility (mol/L)
  double fitted_log10 = 0.0;     ///< log10 of the model at the estimates
  double weight = 1.0;           ///< 1 / log10_sd^2, or 1
  std::string limiting_solid;    ///< "free", a salt id or "none" at the estimates
};

/// Result of fit_solubility(): a value type; check usable() before relying on the numbers.
struct FitResult {
  FitStatus status = FitStatus::kFailure;
  std::string message = "fit_solubility() was not called";
  int iterations = -1;
  int evaluations = -1;                ///< model evaluations (solubility_at_pH calls)
  std::vector<FitParameter> parameters;
  Eigen::MatrixXd covariance;          ///< n x n, scaled by the residual variance (NaN when not estimable)
  Eigen::MatrixXd correlation;         ///< n x n (NaN when not estimable)
  int rank = -1;                       ///< numerical rank of the column-scaled Jacobian
  int degrees_of_freedom = -1;         ///< points - parameters
  double rms_log10 = 0.0;              ///< sqrt(mean (observed - fitted)^2), unweighted
  double residual_sd = 0.0;            ///< sqrt(chi^2 / dof), weighted; NaN when dof = 0
  /// Lack of fit (fit_statistics.h): "chi-square" when every point has a stated sd (and
  /// dof > 0), else "runs" (residual signs; both signs present), else "none".
  std::string lack_of_fit_test = "none";
  double reduced_chi_square = 0.0;     ///< chi^2 / dof against the stated sd; NaN unless "chi-square"
  double lack_of_fit_p = 0.0;          ///< p-value of the test named; NaN for "none"
  RunsTest runs;                       ///< runs test of the residual signs (computed in every case)
  std::vector<std::string> held;       ///< parameters held at their starting values (not determined)
  std::vector<FitResidual> residuals;
  std::vector<std::string> warnings;   ///< parameters not determined by the data, etc.
  Compound fitted;                     ///< the compound with the estimates in place
  std::string data_source;             ///< "compound file" or the CSV path
  bool usable() const { return status == FitStatus::kConverged; }
};

/// The default parameters: log10 S0 (when the compound has a net-neutral form), every pKa, and
/// log10 Ksp of each salt that limits the model solubility at one or more of the points at the
/// starting values.
std::vector<FitParameter> default_fit_parameters(const Compound& compound, const Library& library,
                                                 const std::vector<FitPoint>& points,
                                                 const FitOptions& options);

/// Fits `parameters` (from parse_fit_parameters) of `compound` to `points`. Parameters the
/// data do not determine (FitOptions::min_leverage, or an estimate at the end of its range) are
/// held at their starting values (std_error NaN, listed in `held`, with a warning naming them).
/// Throws InputError (located at the data's last point) when there are fewer points than
/// parameters, and (located at the point) for a solubility outside 1e-15 to 10 mol/L or a
/// log10 sd that is neither 0 nor 1e-4 to 5, as the readers refuse them; numerical trouble is reported through status, message and warnings.
/// Example: fit_solubility(c, lib, fit_points_from_compound(c), parse_fit_parameters("", c), {})
FitResult fit_solubility(const Compound& compound, const Library& library,
                         const std::vector<FitPoint>& points, std::vector<FitParameter> parameters,
                         const FitOptions& options = {});

/// log10 solubility (mol/L) of the fitted compound over a pH grid, under the fit's conditions
/// at `temperature_C`: the fitted curve to draw beside the measured points.
std::vector<double> fitted_curve_log10(const FitResult& result, const Library& library,
                                       const std::vector<double>& pH_grid, const FitOptions& options,
                                       double temperature_C = 25.0);

/// The compound file `compound_path` with the fitted values written in (pKa value and sd,
/// intrinsic-solubility value in its own unit and log-sd, salt ksp replacing any
/// solubility-in-water) and a comment naming the fit above the <compound> element; only the
/// attributes written change, every other byte of the file is kept (comments, layout). The
/// text is checked by parsing it back (edit_compound_xml, io/compound_xml_edit.h). Throws InputError when the fitted
/// file would not load (e.g. pKa values out of order).
std::string fitted_compound_xml(const std::string& compound_path, const FitResult& result,
                                const Library& library);

}  // namespace pkarta

#endif  // PKARTA_FIT_H_
