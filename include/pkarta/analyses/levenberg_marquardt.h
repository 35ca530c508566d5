// Bounded Levenberg-Marquardt minimisation of a weighted sum of squares.
//
// Minimises chi^2(x) = sum_i (w_i (y_i - f_i(x)))^2 over x within [lower, upper] (each trial
// point is clamped into the box). Each iteration solves the damped normal equations
//   (J'W J + lambda D) dx = J'W r,   D = diag(J'W J) (floored at 1e-9 of its largest entry),
// with J the Jacobian of f and r the weighted residuals; lambda grows (x4, or x10 when the
// system is singular) until a step lowers chi^2 and shrinks (x0.3) after each accepted step
// (Levenberg 1944, Q. Appl. Math. 2, 164; Marquardt 1963, J. SIAM 11, 431; the scaling by the
// diagonal is Marquardt's).
// Stopping: the gradient J'W r vanishes, every |dx_k| <= tol (1 + |x_k|), the decrease is
// below 1e-15 of chi^2/2, or no step lowers chi^2 any more (lambda > 1e12): "converged";
// otherwise "max iterations".
#ifndef PKARTA_ANALYSES_LEVENBERG_MARQUARDT_H_
#define PKARTA_ANALYSES_LEVENBERG_MARQUARDT_H_

#include <Eigen/Core>

#include <functional>

namespace pkarta {

/// A least-squares problem: data y with square-root weights w (1 / sd), a model and its
/// Jacobian. The callbacks return false when the model is not finite at x.
struct LeastSquaresProblem {
  Eigen::VectorXd y;
  Eigen::VectorXd sqrt_weight;
  Eigen::VectorXd lower;
  Eigen::VectorXd upper;
  std::function<bool(const Eigen::VectorXd& x, Eigen::VectorXd* f)> model;
  /// d f_i / d x_k at x, given f = f(x).
  std::function<bool(const Eigen::VectorXd& x, const Eigen::VectorXd& f, Eigen::MatrixXd* jac)> jacobian;
};

struct LevenbergMarquardtOptions {
  int max_iterations = 100;
  double relative_step_tolerance = 1e-9;
};

enum class LevenbergMarquardtStatus {
  kConverged,
  kMaxIterations,
  kStartNotFinite,     ///< the model is not finite at the (clamped) starting point
  kJacobianNotFinite,  ///< the Jacobian could not be computed at an iterate
};

struct LevenbergMarquardtResult {
  LevenbergMarquardtStatus status = LevenbergMarquardtStatus::kStartNotFinite;
  Eigen::VectorXd x;  ///< the estimates (the last iterate)
  Eigen::VectorXd f;  ///< the model at x
  int iterations = 0;
};

/// Minimises the problem's chi^2 from `start` (clamped into the bounds).
/// Example: levenberg_marquardt(problem, Eigen::Vector2d(500, 1e-4), {})
LevenbergMarquardtResult levenberg_marquardt(const LeastSquaresProblem& problem,
                                             const Eigen::VectorXd& start,
                                             const LevenbergMarquardtOptions& options);

/// Each element of x clamped into [lower, upper].
Eigen::VectorXd clamp_to_box(Eigen::VectorXd x, const Eigen::VectorXd& lower, const Eigen::VectorXd& upper);

}  // namespace pkarta

#endif  // PKARTA_ANALYSES_LEVENBERG_MARQUARDT_H_
