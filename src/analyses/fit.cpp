#include "pkarta/analyses/fit.h"

#include <Eigen/QR>
#include <Eigen/SVD>

#include <algorithm>
#include <charconv>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/chem/units.h"
#include "pkarta/analyses/levenberg_marquardt.h"
#include "pkarta/io/compound_xml_edit.h"

namespace pkarta {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string format_g(double v, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

std::string format_f(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

// ----- parameters --------------------------------------------------------------------------

void apply(Compound& c, const std::vector<FitParameter>& params, const Eigen::VectorXd& x) {
  for (std::size_t k = 0; k < params.size(); ++k) {
    const FitParameter& p = params[k];
    switch (p.kind) {
      case FitParameter::Kind::kLog10S0: c.s0_mol_per_L = std::pow(10.0, x[k]); break;
      case FitParameter::Kind::kPka: c.system.pkas[p.index].value = x[k]; break;
      case FitParameter::Kind::kLog10Ksp: c.salts[p.index].ksp = std::pow(10.0, x[k]); break;
    }
  }
}

// The model: log10 solubility at every point, for parameter vector x.
class FitModel {
 public:
  FitModel(const Compound& compound, const Library& library, const std::vector<FitPoint>& points,
           const std::vector<FitParameter>& params, const ProfileConditions& conditions)
      : base_(compound), library_(library), points_(points), params_(params), conditions_(conditions) {
    base_.measured.clear();  // not needed by the model; keeps per-call copies small
    base_.description.clear();
  }

  // Returns false when a model value is not finite.
  bool evaluate(const Eigen::VectorXd& x, Eigen::VectorXd* f, std::vector<std::string>* solids = nullptr) {
    Compound c = base_;
    apply(c, params_, x);
    f->resize(static_cast<Eigen::Index>(points_.size()));
    if (solids) solids->assign(points_.size(), "");
    ProfileConditions cond = conditions_;
    for (std::size_t i = 0; i < points_.size(); ++i) {
      cond.temperature_C = points_[i].temperature_C;
      const SolubilityAtPh s = solubility_at_pH(c, library_, points_[i].pH, cond);
      ++evaluations_;
      const double v = std::log10(s.solubility_mol_per_L);
      if (!std::isfinite(v)) return false;
      (*f)[static_cast<Eigen::Index>(i)] = v;
      if (solids) (*solids)[i] = s.limiting_solid;
    }
    return true;
  }

  // Forward-difference Jacobian of f at x (f0 = f(x)); steps stay inside the bounds.
  bool jacobian(const Eigen::VectorXd& x, const Eigen::VectorXd& f0, double step, Eigen::MatrixXd* jac) {
    const Eigen::Index n = x.size();
    jac->resize(f0.size(), n);
    Eigen::VectorXd f1;
    for (Eigen::Index k = 0; k < n; ++k) {
      Eigen::VectorXd xs = x;
      double h = step;
      if (xs[k] + h > params_[k].upper) h = -h;
      xs[k] += h;
      if (!evaluate(xs, &f1)) return false;
      jac->col(k) = (f1 - f0) / h;
    }
    return true;
  }

  long evaluations() const { return evaluations_; }

 private:
  Compound base_;
  const Library& library_;
  const std::vector<FitPoint>& points_;
  const std::vector<FitParameter>& params_;
  ProfileConditions conditions_;
  long evaluations_ = 0;
};

}  // namespace

bool FitOptions::is_valid(std::string* error) const {
  auto fail = [&](const std::string& what) {
    if (error) *error = "FitOptions::" + what;
    return false;
  };
  if (!(max_iterations >= 1)) return fail("max_iterations = " + std::to_string(max_iterations) + ", must be >= 1");
  if (!(relative_step_tolerance > 0)) return fail("relative_step_tolerance must be > 0");
  if (!(derivative_step > 0 && derivative_step < 0.1)) return fail("derivative_step must be in (0, 0.1)");
  if (!(pka_window_pH > 0)) return fail("pka_window_pH must be > 0");
  if (!(min_leverage >= 0)) return fail("min_leverage must be >= 0");
  if (!(lack_of_fit_alpha > 0 && lack_of_fit_alpha < 1)) return fail("lack_of_fit_alpha must be in (0, 1)");
  return true;
}

std::vector<FitPoint> fit_points_from_compound(const Compound& compound) {
  std::vector<FitPoint> out;
  for (const MeasuredPoint& m : compound.measured) {
    FitPoint p;
    p.pH = m.pH;
    p.solubility_mol_per_L = m.solubility_mol_per_L;
    p.temperature_C = m.temperature_C;
    p.log10_sd = m.log10_sd;
    p.where = m.where;
    out.push_back(p);
  }
  return out;
}

namespace {

// The fit of every parameter in `parameters` (none held).
FitResult fit_all(const Compound& compound, const Library& library, const std::vector<FitPoint>& points,
                  std::vector<FitParameter> parameters, const FitOptions& options) {
  FitResult r;
  r.fitted = compound;
  std::string err;
  if (!options.is_valid(&err)) {
    r.message = err;
    return r;
  }
  const int m = static_cast<int>(points.size());
  const int n = static_cast<int>(parameters.size());
  if (n == 0) {
    r.message = "no parameters to fit";
    return r;
  }
  if (m < n) {
    std::vector<std::string> names;
    names.reserve(parameters.size());
    for (const FitParameter& p : parameters) names.push_back(p.name);
    const SourceLocation at = m > 0 ? points.back().where : SourceLocation{};
    throw InputError(SourceLocation{at.file, at.line, 0},
                     std::to_string(m) + " measured point" + (m == 1 ? "" : "s") + " for " +
                         std::to_string(n) + " parameters (" + join_strings(names, ", ") +
                         "): give at least as many points as parameters, or fit fewer (--params)");
  }
  r.degrees_of_freedom = m - n;
  r.data_source = !points.front().where.file.empty() ? points.front().where.file : "given points";

  Eigen::VectorXd y(m), w(m);
  for (int i = 0; i < m; ++i) {
    y[i] = std::log10(points[i].solubility_mol_per_L);
    w[i] = points[i].log10_sd > 0 ? 1.0 / points[i].log10_sd : 1.0;  // sqrt of the weight
  }
  FitModel model(compound, library, points, parameters, options.conditions);
  Eigen::VectorXd x(n);
  for (int k = 0; k < n; ++k) x[k] = parameters[k].start;

  auto fail = [&](const std::string& msg) {
    r.status = FitStatus::kFailure;
    r.message = msg;
    r.evaluations = static_cast<int>(model.evaluations());
    return r;
  };

  LeastSquaresProblem problem;
  problem.y = y;
  problem.sqrt_weight = w;
  problem.lower.resize(n);
  problem.upper.resize(n);
  for (int k = 0; k < n; ++k) {
    problem.lower[k] = parameters[k].lower;
    problem.upper[k] = parameters[k].upper;
  }
  problem.model = [&](const Eigen::VectorXd& xv, Eigen::VectorXd* fv) { return model.evaluate(xv, fv); };
  problem.jacobian = [&](const Eigen::VectorXd& xv, const Eigen::VectorXd& fv, Eigen::MatrixXd* j) {
    return model.jacobian(xv, fv, options.derivative_step, j);
  };
  LevenbergMarquardtOptions lm_options;
  lm_options.max_iterations = options.max_iterations;
  lm_options.relative_step_tolerance = options.relative_step_tolerance;
  const LevenbergMarquardtResult lm = levenberg_marquardt(problem, x, lm_options);
  if (lm.status == LevenbergMarquardtStatus::kStartNotFinite) {
    return fail("the model gives no finite solubility at the starting values");
  }
  if (lm.status == LevenbergMarquardtStatus::kJacobianNotFinite) {
    return fail("the model gives no finite solubility near the current estimates");
  }
  x = lm.x;
  Eigen::VectorXd f = lm.f;
  Eigen::MatrixXd jac;
  const FitStatus status =
      lm.status == LevenbergMarquardtStatus::kConverged ? FitStatus::kConverged : FitStatus::kMaxIterations;
  const int it = lm.iterations;
  r.iterations = it;
  r.status = status;
  r.message = status == FitStatus::kConverged ? "converged" : "no convergence within " +
                                                                   std::to_string(options.max_iterations) +
                                                                   " iterations";

  // Final state: residuals, Jacobian, covariance.
  std::vector<std::string> solids;
  model.evaluate(x, &f, &solids);
  if (!model.jacobian(x, f, options.derivative_step, &jac)) return fail("the model failed at the estimates");
  r.evaluations = static_cast<int>(model.evaluations());
  const Eigen::VectorXd res = (y - f).cwiseProduct(w);
  const double chi2 = res.squaredNorm();
  r.rms_log10 = std::sqrt((y - f).squaredNorm() / m);
  r.residual_sd = r.degrees_of_freedom > 0 ? std::sqrt(chi2 / r.degrees_of_freedom) : kNaN;
  for (int i = 0; i < m; ++i) {
    FitResidual fr;
    fr.pH = points[i].pH;
    fr.temperature_C = points[i].temperature_C;
    fr.observed_log10 = y[i];
    fr.fitted_log10 = f[i];
    fr.weight = w[i] * w[i];
    fr.limiting_solid = solids[i];
    r.residuals.push_back(fr);
  }

  // Lack of fit: chi-square against the stated sd when every point has one, else runs of signs.
  std::vector<double> raw(static_cast<std::size_t>(m));
  bool all_sd = true;
  for (int i = 0; i < m; ++i) {
    raw[static_cast<std::size_t>(i)] = y[i] - f[i];
    all_sd = all_sd && points[i].log10_sd > 0;
  }
  r.runs = runs_test(raw);
  r.reduced_chi_square = kNaN;
  r.lack_of_fit_p = kNaN;
  if (all_sd && r.degrees_of_freedom > 0) {
    r.lack_of_fit_test = "chi-square";
    r.reduced_chi_square = chi2 / r.degrees_of_freedom;
    r.lack_of_fit_p = chi_square_upper_tail(chi2, r.degrees_of_freedom);
    if (r.lack_of_fit_p < options.lack_of_fit_alpha) {
      r.warnings.push_back("poor fit: reduced chi-square " + format_g(r.reduced_chi_square, 3) + " against the stated sd (" +
                           std::to_string(r.degrees_of_freedom) + " degrees of freedom, p = " +
                           format_g(r.lack_of_fit_p, 2) + "): the model or the stated uncertainties do not "
                           "describe the data");
    }
  } else if (std::isfinite(r.runs.p)) {
    r.lack_of_fit_test = "runs";
    r.lack_of_fit_p = r.runs.p;
    if (r.lack_of_fit_p < options.lack_of_fit_alpha) {
      r.warnings.push_back("poor fit: " + std::to_string(r.runs.runs) + " runs of residual signs where " +
                           format_g(r.runs.expected_runs, 3) + " are expected (" + std::to_string(r.runs.positive) +
                           " positive, " + std::to_string(r.runs.negative) + " negative; runs test p = " +
                           format_g(r.lack_of_fit_p, 2) + "): the residuals are systematic, not scatter");
    }
  }

  const Eigen::MatrixXd jw = w.asDiagonal() * jac;
  Eigen::VectorXd norms(n);
  for (int k = 0; k < n; ++k) norms[k] = jw.col(k).norm();
  const double norm_max = norms.maxCoeff();
  std::vector<bool> undetermined(n, false);
  std::vector<std::string> no_effect;
  for (int k = 0; k < n; ++k) {
    if (!(norms[k] > 1e-10 * std::max(norm_max, 1e-300)) || !(norms[k] > 1e-12)) {
      undetermined[k] = true;
      no_effect.push_back(parameters[k].name);
    }
  }
  if (!no_effect.empty()) {
    r.warnings.push_back(join_strings(no_effect, ", ") + (no_effect.size() > 1 ? " have" : " has") +
                         " no effect on the model at the measured points, so the data do not "
                         "determine " + (no_effect.size() > 1 ? "them" : "it"));
  }
  // Column-scaled Jacobian of the parameters that act; rank from a rank-revealing QR.
  std::vector<int> act;
  for (int k = 0; k < n; ++k) {
    if (!undetermined[k]) act.push_back(k);
  }
  r.covariance = Eigen::MatrixXd::Constant(n, n, kNaN);
  if (!act.empty()) {
    const int na = static_cast<int>(act.size());
    Eigen::MatrixXd js(m, na);
    for (int a = 0; a < na; ++a) js.col(a) = jw.col(act[a]) / norms[act[a]];
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(js);
    qr.setThreshold(1e-6);  // well above the noise of the forward differences
    const int rank = static_cast<int>(qr.rank());
    r.rank = rank;
    Eigen::MatrixXd inv_scaled;  // (Js'Js)^-1 or its pseudo-inverse
    std::vector<bool> in_null(na, false);
    if (rank < na) {
      const Eigen::JacobiSVD<Eigen::MatrixXd> svd(js, Eigen::ComputeThinV);
      const Eigen::VectorXd& sv = svd.singularValues();
      const Eigen::MatrixXd& v = svd.matrixV();
      std::vector<std::string> names;
      for (int c = rank; c < na; ++c) {
        for (int a = 0; a < na; ++a) {
          if (std::fabs(v(a, c)) > 0.2 && !in_null[a]) {
            in_null[a] = true;
            names.push_back(parameters[act[a]].name);
          }
        }
      }
      r.warnings.push_back("the Jacobian is rank-deficient (rank " + std::to_string(rank) + " of " +
                           std::to_string(na) + "): " + join_strings(names, ", ") +
                           " are not separately determined by the data; fix some of them "
                           "(--params) or add points where they act");
      Eigen::VectorXd sinv2 = Eigen::VectorXd::Zero(na);
      for (int c = 0; c < rank; ++c) sinv2[c] = 1.0 / (sv[c] * sv[c]);
      inv_scaled = v * sinv2.asDiagonal() * v.transpose();
    } else {
      const Eigen::MatrixXd rr = qr.matrixR().topLeftCorner(na, na).triangularView<Eigen::Upper>();
      const Eigen::MatrixXd rinv =
          rr.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(na, na));
      inv_scaled = qr.colsPermutation() * (rinv * rinv.transpose()) * qr.colsPermutation().transpose();
    }
    const double s2 = r.degrees_of_freedom > 0 ? chi2 / r.degrees_of_freedom : kNaN;
    for (int a = 0; a < na; ++a) {
      for (int b = 0; b < na; ++b) {
        double c = s2 * inv_scaled(a, b) / (norms[act[a]] * norms[act[b]]);
        if (in_null[a] || in_null[b]) c = kNaN;
        r.covariance(act[a], act[b]) = c;
      }
    }
    for (int a = 0; a < na; ++a) {
      if (in_null[a]) undetermined[act[a]] = true;
    }
  } else {
    r.rank = 0;
  }
  r.correlation = Eigen::MatrixXd::Constant(n, n, kNaN);
  for (int a = 0; a < n; ++a) {
    for (int b = 0; b < n; ++b) {
      const double d = std::sqrt(r.covariance(a, a) * r.covariance(b, b));
      r.correlation(a, b) = a == b && std::isfinite(d) ? 1.0 : r.covariance(a, b) / d;
    }
  }
  for (int k = 0; k < n; ++k) {
    parameters[k].estimate = x[k];
    const double v = r.covariance(k, k);
    parameters[k].std_error = std::isfinite(v) && v >= 0 ? std::sqrt(v) : kNaN;
  }
  r.parameters = parameters;
  apply(r.fitted, parameters, x);
  for (const FitParameter& p : parameters) {
    if (p.kind != FitParameter::Kind::kLog10Ksp) continue;
    r.fitted.salts[p.index].solubility_in_water_mol_per_L.reset();  // now given by its Ksp
    r.fitted.salts[p.index].solubility_in_water_text.clear();
  }

  // What the data do not determine.
  if (r.degrees_of_freedom == 0) {
    r.warnings.push_back("as many points as parameters: the fit is exact, so no residual variance "
                         "and no standard errors can be estimated");
  }
  if (status == FitStatus::kMaxIterations) r.warnings.push_back(r.message);
  for (int k = 0; k < n; ++k) {
    const FitParameter& p = parameters[k];
    if (p.kind == FitParameter::Kind::kPka) {
      double nearest = std::numeric_limits<double>::infinity();
      for (const FitPoint& pt : points) {
        const double pk = r.fitted.system.pkas[p.index].at(pt.temperature_C);
        nearest = std::min(nearest, std::fabs(pt.pH - pk));
      }
      if (nearest > options.pka_window_pH) {
        r.warnings.push_back(p.name + " = " + format_f(p.estimate, 2) + ": no measured point within ±" +
                             format_f(options.pka_window_pH, 1) +
                             " pH units of it, so the data hardly determine it");
      }
    } else if (p.kind == FitParameter::Kind::kLog10S0) {
      bool any = false;
      for (const std::string& s : solids) any = any || s == "free";
      if (!any) {
        r.warnings.push_back(p.name + ": no point is limited by the free form at the estimates, so "
                                      "the data hardly determine the intrinsic solubility");
      }
    } else {
      const std::string& id = compound.salts[p.index].id;
      bool any = false;
      for (const std::string& s : solids) any = any || s == id;
      if (!any) {
        r.warnings.push_back(p.name + ": no point is limited by the salt '" + id +
                             "' at the estimates, so the data hardly determine its Ksp");
      }
    }
    if (std::isfinite(p.std_error) && p.std_error > options.poor_std_error) {
      r.warnings.push_back(p.name + " is poorly determined: standard error " + format_g(p.std_error, 2));
    }
    if (p.estimate <= p.lower + 1e-9 || p.estimate >= p.upper - 1e-9) {
      r.warnings.push_back(p.name + " reached the end of its search range (" + format_g(p.lower, 3) +
                           " to " + format_g(p.upper, 3) + "): not determined by the data");
    }
  }
  for (int a = 0; a < n; ++a) {
    for (int b = a + 1; b < n; ++b) {
      const double c = r.correlation(a, b);
      if (std::isfinite(c) && std::fabs(c) > options.strong_correlation) {
        r.warnings.push_back(parameters[a].name + " and " + parameters[b].name +
                             " are strongly correlated (" + format_f(c, 3) +
                             "): the data determine a combination of them better than either");
      }
    }
  }
  const auto& pk = r.fitted.system.pkas;
  for (std::size_t i = 1; i < pk.size(); ++i) {
    if (!(pk[i].value > pk[i - 1].value)) {
      r.warnings.push_back("the fitted pKa values are not in ascending order (pKa" + std::to_string(i) +
                           " = " + format_f(pk[i - 1].value, 2) + ", pKa" + std::to_string(i + 1) + " = " +
                           format_f(pk[i].value, 2) + "): the model's macroscopic constants lose "
                           "their meaning; fix one of them");
      break;
    }
  }
  return r;
}

}  // namespace

FitResult fit_solubility(const Compound& compound, const Library& library,
                         const std::vector<FitPoint>& points, std::vector<FitParameter> parameters,
                         const FitOptions& options) {
  // Points given through the API are checked as the readers check them: a solubility that
  // underflows or overflows, or a degenerate weight, would give an infinite rms.
  for (const FitPoint& pt : points) {
    if (const std::string why = measured_solubility_problem(pt.solubility_mol_per_L); !why.empty()) {
      throw InputError(pt.where, "measured solubility " + why);
    }
    if (!(pt.log10_sd == 0.0 || (pt.log10_sd >= kMinFitLog10Sd && pt.log10_sd <= 5.0))) {
      throw InputError(pt.where, "the log10 sd of a measured point is " + format_g(pt.log10_sd, 3) +
                                     ", expected 0 (unweighted) or 0.0001 to 5");
    }
  }
  const int m = static_cast<int>(points.size());
  const int n = static_cast<int>(parameters.size());
  std::string err;
  if (!options.is_valid(&err) || n == 0 || m < n || options.min_leverage == 0) {
    return fit_all(compound, library, points, std::move(parameters), options);
  }
  // Parameters that move no point at the starting values.
  std::vector<std::string> reason(static_cast<std::size_t>(n));
  {
    FitModel model(compound, library, points, parameters, options.conditions);
    Eigen::VectorXd x(n);
    for (int k = 0; k < n; ++k) x[k] = std::clamp(parameters[k].start, parameters[k].lower, parameters[k].upper);
    Eigen::VectorXd f;
    Eigen::MatrixXd jac;
    if (!model.evaluate(x, &f) || !model.jacobian(x, f, options.derivative_step, &jac)) {
      return fit_all(compound, library, points, std::move(parameters), options);
    }
    for (int k = 0; k < n; ++k) {
      const double leverage = jac.col(k).cwiseAbs().maxCoeff();
      if (!(leverage >= options.min_leverage)) {
        reason[k] = "a unit change of it moves no measured point by more than " + format_g(options.min_leverage, 2) +
                    " log10 at the starting values";
      }
    }
  }
  FitResult r;
  while (true) {
    Compound base = compound;
    std::vector<FitParameter> free, held;
    for (int k = 0; k < n; ++k) (reason[k].empty() ? free : held).push_back(parameters[k]);
    Eigen::VectorXd start(static_cast<Eigen::Index>(held.size()));
    for (std::size_t k = 0; k < held.size(); ++k) start[static_cast<Eigen::Index>(k)] = held[k].start;
    apply(base, held, start);
    if (free.empty()) {
      r = FitResult{};
      r.fitted = base;
      r.message = "no parameter is determined by the data";
      break;
    }
    r = fit_all(base, library, points, free, options);
    if (!r.usable()) break;
    bool more = false;
    for (int k = 0, j = 0; k < n; ++k) {
      if (!reason[k].empty()) continue;
      const FitParameter& p = r.parameters[static_cast<std::size_t>(j++)];
      const bool at_end = p.estimate <= p.lower + 1e-9 || p.estimate >= p.upper - 1e-9;
      const bool started_there = p.start <= p.lower + 1e-9 || p.start >= p.upper - 1e-9;
      if (at_end && !started_there) {
        reason[k] = "its estimate ran to the end of its search range (" + format_g(p.lower, 3) + " to " +
                    format_g(p.upper, 3) + ")";
        more = true;
      }
    }
    if (held.empty() && !more) return r;
    if (!more) break;
  }
  // Every parameter in the given order; the held ones at their starting values.
  const Eigen::Index nf = static_cast<Eigen::Index>(r.parameters.size());
  Eigen::MatrixXd cov = Eigen::MatrixXd::Constant(n, n, kNaN), corr = cov;
  std::vector<int> index;  // position in `parameters` of each free one
  for (int k = 0; k < n; ++k) {
    if (reason[k].empty()) index.push_back(k);
  }
  for (Eigen::Index a = 0; a < nf && r.covariance.rows() == nf; ++a) {
    for (Eigen::Index b = 0; b < nf; ++b) {
      cov(index[a], index[b]) = r.covariance(a, b);
      corr(index[a], index[b]) = r.correlation(a, b);
    }
  }
  std::vector<FitParameter> all = parameters;
  std::vector<std::string> warnings;
  const bool fitted = r.parameters.size() == index.size();  // false after a failure
  for (int k = 0, j = 0; k < n; ++k) {
    if (reason[k].empty()) {
      if (fitted) all[k] = r.parameters[static_cast<std::size_t>(j++)];
      continue;
    }
    all[k].estimate = parameters[k].start;
    all[k].std_error = kNaN;
    r.held.push_back(parameters[k].name);
    warnings.push_back(parameters[k].name + " is not determined by the data (" + reason[k] +
                       "): held at its starting value " + format_g(parameters[k].start, 4));
  }
  r.parameters = all;
  r.covariance = cov;
  r.correlation = corr;
  warnings.insert(warnings.end(), r.warnings.begin(), r.warnings.end());
  r.warnings = warnings;
  return r;
}

std::vector<double> fitted_curve_log10(const FitResult& result, const Library& library,
                                       const std::vector<double>& pH_grid, const FitOptions& options,
                                       double temperature_C) {
  ProfileConditions cond = options.conditions;
  cond.temperature_C = temperature_C;
  Compound c = result.fitted;
  c.measured.clear();
  std::vector<double> out;
  out.reserve(pH_grid.size());
  for (double pH : pH_grid) out.push_back(std::log10(solubility_at_pH(c, library, pH, cond).solubility_mol_per_L));
  return out;
}

std::string fitted_compound_xml(const std::string& compound_path, const FitResult& result,
                                const Library& library) {
  const Compound& c = result.fitted;
  std::vector<CompoundValueEdit> edits;
  std::vector<std::string> names;
  for (const FitParameter& p : result.parameters) {
    names.push_back(p.name);
    CompoundValueEdit e;
    e.sd = p.std_error;
    switch (p.kind) {
      case FitParameter::Kind::kPka:
        e.kind = CompoundValueEdit::Kind::kPka;
        e.pka_index = p.index;
        e.value = p.estimate;
        break;
      case FitParameter::Kind::kLog10S0:
        e.kind = CompoundValueEdit::Kind::kIntrinsicSolubility;
        e.value = std::pow(10.0, p.estimate);
        break;
      case FitParameter::Kind::kLog10Ksp:
        e.kind = CompoundValueEdit::Kind::kSaltKsp;
        e.salt_id = c.salts[p.index].id;
        e.value = std::pow(10.0, p.estimate);
        break;
    }
    edits.push_back(e);
  }
  const std::string comment = "Fitted by pkarta fit " + std::string(PKARTA_VERSION) + ": " + join_strings(names, ", ") +
                              " to " + std::to_string(result.residuals.size()) + " measured points (" +
                              result.data_source + "); rms " + format_f(result.rms_log10, 3) +
                              " log10. Standard errors are written as sd and log-sd.";
  return edit_compound_xml(compound_path, edits, c.molar_mass_g_per_mol, c.s0_ref_temperature_C, comment,
                           library);
}

}  // namespace pkarta
