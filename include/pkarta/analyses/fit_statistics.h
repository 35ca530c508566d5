// Lack-of-fit statistics for a least-squares fit.
//
// With stated uncertainties: chi^2 = sum ((observed - fitted) / sd)^2 follows the chi-square
// distribution with dof = points - parameters when the model is right and the sd are
// correct; the reduced chi-square chi^2 / dof is near 1 and the lack-of-fit p-value is
// P(chi^2_dof >= chi^2) (Bevington and Robinson, Data Reduction and Error Analysis for the
// Physical Sciences, 3rd ed. 2003, sections 11.1-11.2).
// Without them: the Wald-Wolfowitz runs test of the residual signs (Wald and Wolfowitz 1940,
// Ann. Math. Statist. 11, 147): too few runs (long stretches of one sign) mean systematic
// misfit; p = P(R <= runs) from the exact distribution of the number of runs R given the
// counts of each sign (Swed and Eisenhart 1943, Ann. Math. Statist. 14, 66).
#ifndef PKARTA_ANALYSES_FIT_STATISTICS_H_
#define PKARTA_ANALYSES_FIT_STATISTICS_H_

#include <vector>

namespace pkarta {

/// P(X >= chi2) for X chi-square distributed with `dof` > 0 degrees of freedom: the
/// regularised upper incomplete gamma function Q(dof/2, chi2/2), by its series below
/// a + 1 and its continued fraction above (Press et al., Numerical Recipes, 3rd ed. 2007,
/// section 6.2). NaN for dof <= 0 or chi2 < 0.
/// Example: chi_square_upper_tail(5.0, 3) = 0.1718 (to 4 digits).
double chi_square_upper_tail(double chi2, int dof);

/// The runs test of a sequence of residuals (zeros are skipped).
struct RunsTest {
  int positive = 0;
  int negative = 0;
  int runs = 0;
  double expected_runs = 0.0;  ///< 1 + 2 n+ n- / (n+ + n-); NaN with fewer than one of each sign
  double p = 1.0;              ///< P(R <= runs), exact; NaN with fewer than one of each sign
};

/// Example: runs_test({+1, +1, -1, -1}) gives runs 2, expected 3, p = 2 / C(4, 2) = 1/3.
RunsTest runs_test(const std::vector<double>& residuals);

}  // namespace pkarta

#endif  // PKARTA_ANALYSES_FIT_STATISTICS_H_
