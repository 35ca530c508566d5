#include "pkarta/analyses/levenberg_marquardt.h"

#include <Eigen/Cholesky>

#include <algorithm>
#include <cmath>

namespace pkarta {

Eigen::VectorXd clamp_to_box(Eigen::VectorXd x, const Eigen::VectorXd& lower, const Eigen::VectorXd& upper) {
  for (Eigen::Index k = 0; k < x.size(); ++k) x[k] = std::clamp(x[k], lower[k], upper[k]);
  return x;
}

LevenbergMarquardtResult levenberg_marquardt(const LeastSquaresProblem& problem,
                                             const Eigen::VectorXd& start,
                                             const LevenbergMarquardtOptions& options) {
  using Status = LevenbergMarquardtStatus;
  LevenbergMarquardtResult out;
  const Eigen::VectorXd& y = problem.y;
  const Eigen::VectorXd& w = problem.sqrt_weight;
  const Eigen::Index n = start.size();
  Eigen::VectorXd x = clamp_to_box(start, problem.lower, problem.upper);
  Eigen::VectorXd f;
  out.x = x;
  if (!problem.model(x, &f)) {
    out.status = Status::kStartNotFinite;
    return out;
  }
  Eigen::VectorXd res = (y - f).cwiseProduct(w);
  double cost = 0.5 * res.squaredNorm();
  double lambda = 1e-3;
  Eigen::MatrixXd jac;
  Status status = Status::kMaxIterations;
  int it = 0;
  while (status == Status::kMaxIterations && it < options.max_iterations) {
    ++it;
    if (!problem.jacobian(x, f, &jac)) {
      out.status = Status::kJacobianNotFinite;
      out.x = x;
      out.f = f;
      out.iterations = it;
      return out;
    }
    const Eigen::MatrixXd jw = w.asDiagonal() * jac;
    const Eigen::MatrixXd a = jw.transpose() * jw;
    const Eigen::VectorXd g = jw.transpose() * res;
    if (cost == 0.0 || g.cwiseAbs().maxCoeff() <= 1e-14 * std::max(1.0, cost)) {
      status = Status::kConverged;
      break;
    }
    const double dmax = std::max(a.diagonal().maxCoeff(), 1e-300);
    bool accepted = false;
    while (!accepted) {
      Eigen::MatrixXd damped = a;
      for (Eigen::Index k = 0; k < n; ++k) damped(k, k) += lambda * std::max(a(k, k), 1e-9 * dmax);
      const Eigen::LDLT<Eigen::MatrixXd> ldlt(damped);
      Eigen::VectorXd step;
      if (ldlt.info() == Eigen::Success) step = ldlt.solve(g);
      if (ldlt.info() != Eigen::Success || !step.allFinite()) {
        lambda *= 10.0;
        if (lambda > 1e12) break;
        continue;
      }
      const Eigen::VectorXd xn = clamp_to_box(x + step, problem.lower, problem.upper);
      Eigen::VectorXd fn;
      if (!problem.model(xn, &fn)) {
        lambda *= 4.0;
        if (lambda > 1e12) break;
        continue;
      }
      const Eigen::VectorXd rn = (y - fn).cwiseProduct(w);
      const double cn = 0.5 * rn.squaredNorm();
      if (cn < cost) {
        const Eigen::VectorXd dx = xn - x;
        const double decrease = cost - cn;
        x = xn;
        f = fn;
        res = rn;
        accepted = true;
        lambda = std::max(lambda * 0.3, 1e-12);
        bool small = true;
        for (Eigen::Index k = 0; k < n; ++k) {
          small = small && std::fabs(dx[k]) <= options.relative_step_tolerance * (1.0 + std::fabs(x[k]));
        }
        if (small || decrease <= 1e-15 * cost) status = Status::kConverged;
        cost = cn;
      } else {
        lambda *= 4.0;
        if (lambda > 1e12) break;
      }
    }
    // No step lowers the cost any more: a minimum to working precision.
    if (!accepted) status = Status::kConverged;
  }
  out.status = status;
  out.x = x;
  out.f = f;
  out.iterations = it;
  return out;
}

}  // namespace pkarta
