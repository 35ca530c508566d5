// Internal to the equilibrium model's source files (not installed): the model limits and two
// small numerical helpers shared by equilibrium.cpp, equilibrium_solids.cpp,
// equilibrium_solve.cpp and salt_forms.cpp.
#pragma once

#include <algorithm>
#include <cmath>

#include "pkarta/chem/equilibrium.h"

namespace pkarta {
namespace equilibrium_detail {
inline constexpr int kGammaOffset = 16;  // gamma_ table covers charges -16..+16
inline constexpr double kPhLow = -3.0;   // bracket of every solve: charge balance > 0 here ...
inline constexpr double kPhHigh = 17.0;  // ... and < 0 here, for totals up to 10 mol/L
inline constexpr double kEps = 1e-12;    // relative slack of the phase-consistency checks
// Largest relative charge and mass residuals of a returned state (docs/model.md, "Solver").
inline constexpr double kMaxChargeResidual = 1e-10;
inline constexpr double kMaxMassResidual = 1e-10;
inline constexpr int kMaxComp = 1 + kMaxSalts;  // partition components: the drug and each counterion

/// x^k for a small positive integer k, by multiplication (x^1 is x itself).
inline double ipow(double x, int k) {
  double r = x;
  for (int i = 1; i < k; ++i) r *= x;
  return r;
}

/// Sets the leading n x (n + 1) block of an augmented matrix to zero (only that block is used:
/// zeroing the whole array cost more than the solve itself).
inline void zero_augmented(int n, double (*a)[2 * kMaxComp + 1]) {
  for (int r = 0; r < n; ++r) std::fill(a[r], a[r] + n + 1, 0.0);
}

/// Solves the dense system a x = b (n <= 2 kMaxComp) by Gaussian elimination with partial
/// pivoting; false when it is singular.
inline bool solve_dense(int n, double (*a)[2 * kMaxComp + 1], double* x) {
  for (int c = 0; c < n; ++c) {
    int piv = c;
    for (int r = c + 1; r < n; ++r) {
      if (std::fabs(a[r][c]) > std::fabs(a[piv][c])) piv = r;
    }
    if (!(std::fabs(a[piv][c]) > 1e-300)) return false;
    if (piv != c) {
      for (int k = c; k <= n; ++k) std::swap(a[piv][k], a[c][k]);
    }
    for (int r = c + 1; r < n; ++r) {
      const double f = a[r][c] / a[c][c];
      if (f == 0.0) continue;
      for (int k = c; k <= n; ++k) a[r][k] -= f * a[c][k];
    }
  }
  for (int r = n - 1; r >= 0; --r) {
    double v = a[r][n];
    for (int k = r + 1; k < n; ++k) v -= a[r][k] * x[k];
    x[r] = v / a[r][r];
  }
  return true;
}
}  // namespace equilibrium_detail
}  // namespace pkarta
