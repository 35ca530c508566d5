// The Levenberg-Marquardt minimiser on a published nonlinear least-squares problem: Misra1a of
// the NIST Statistical Reference Datasets (StRD, nonlinear regression, lower difficulty;
// data from Misra, NIST dental research monomolecular adsorption study), model
// y = b1 (1 - exp(-b2 x)), with its certified values.
#include "pkarta/analyses/levenberg_marquardt.h"

#include <gtest/gtest.h>

#include <cmath>

namespace pkarta {
namespace {

LeastSquaresProblem misra1a() {
  const double xs[] = {77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8,
                       378.4, 434.8, 477.3, 536.8, 593.1, 689.1, 760.0};
  const double ys[] = {10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02,
                       44.82, 50.76, 55.05, 61.01, 66.40, 75.47, 81.78};
  LeastSquaresProblem p;
  const int m = 14;
  Eigen::VectorXd x(m);
  p.y.resize(m);
  for (int i = 0; i < m; ++i) {
    x[i] = xs[i];
    p.y[i] = ys[i];
  }
  p.sqrt_weight = Eigen::VectorXd::Ones(m);
  p.lower = Eigen::Vector2d(-1e6, -1.0);
  p.upper = Eigen::Vector2d(1e6, 1.0);
  p.model = [x](const Eigen::VectorXd& b, Eigen::VectorXd* f) {
    *f = b[0] * (1.0 - (-b[1] * x.array()).exp()).matrix();
    return f->allFinite();
  };
  p.jacobian = [x](const Eigen::VectorXd& b, const Eigen::VectorXd&, Eigen::MatrixXd* j) {
    j->resize(x.size(), 2);
    j->col(0) = (1.0 - (-b[1] * x.array()).exp()).matrix();
    j->col(1) = (b[0] * x.array() * (-b[1] * x.array()).exp()).matrix();
    return j->allFinite();
  };
  return p;
}

// Certified values (NIST StRD, Misra1a): b1 = 2.3894212918E+02, b2 = 5.5015643181E-04,
// residual sum of squares 1.2455138894E-01.
void expect_certified(const LevenbergMarquardtResult& r, const LeastSquaresProblem& p) {
  ASSERT_EQ(r.status, LevenbergMarquardtStatus::kConverged);
  EXPECT_NEAR(r.x[0], 2.3894212918E+02, 2.3894212918E+02 * 1e-6);
  EXPECT_NEAR(r.x[1], 5.5015643181E-04, 5.5015643181E-04 * 1e-6);
  EXPECT_NEAR((p.y - r.f).squaredNorm(), 1.2455138894E-01, 1.2455138894E-01 * 1e-6);
}

TEST(LevenbergMarquardt, Misra1aFromTheFirstCertifiedStart) {
  const LeastSquaresProblem p = misra1a();
  LevenbergMarquardtOptions o;
  o.max_iterations = 500;
  o.relative_step_tolerance = 1e-12;
  expect_certified(levenberg_marquardt(p, Eigen::Vector2d(500.0, 1e-4), o), p);
}

TEST(LevenbergMarquardt, Misra1aFromTheSecondCertifiedStart) {
  const LeastSquaresProblem p = misra1a();
  LevenbergMarquardtOptions o;
  o.max_iterations = 500;
  o.relative_step_tolerance = 1e-12;
  expect_certified(levenberg_marquardt(p, Eigen::Vector2d(250.0, 5e-4), o), p);
}

TEST(LevenbergMarquardt, StartOutsideTheBoundsIsClampedAndANonFiniteStartIsReported) {
  LeastSquaresProblem p = misra1a();
  p.model = [](const Eigen::VectorXd&, Eigen::VectorXd* f) {
    *f = Eigen::VectorXd::Constant(14, NAN);
    return false;
  };
  const LevenbergMarquardtResult r = levenberg_marquardt(p, Eigen::Vector2d(5e6, 2.0), {});
  EXPECT_EQ(r.status, LevenbergMarquardtStatus::kStartNotFinite);
  EXPECT_EQ(r.x[0], 1e6);
  EXPECT_EQ(r.x[1], 1.0);
}

}  // namespace
}  // namespace pkarta
