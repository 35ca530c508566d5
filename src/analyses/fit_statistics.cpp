#include "pkarta/analyses/fit_statistics.h"

#include <cmath>
#include <limits>

namespace pkarta {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Regularised lower incomplete gamma P(a, x) by its series, x < a + 1.
double gamma_p_series(double a, double x) {
  double term = 1.0 / a, sum = term;
  for (int n = 1; n < 1000; ++n) {
    term *= x / (a + n);
    sum += term;
    if (std::fabs(term) < std::fabs(sum) * 1e-16) break;
  }
  return sum * std::exp(-x + a * std::log(x) - std::lgamma(a));
}

// Regularised upper incomplete gamma Q(a, x) by its continued fraction (modified Lentz), x >= a + 1.
double gamma_q_fraction(double a, double x) {
  const double tiny = 1e-300;
  double b = x + 1.0 - a, c = 1.0 / tiny, d = 1.0 / b, h = d;
  for (int i = 1; i < 1000; ++i) {
    const double an = -i * (i - a);
    b += 2.0;
    d = an * d + b;
    if (std::fabs(d) < tiny) d = tiny;
    c = b + an / c;
    if (std::fabs(c) < tiny) c = tiny;
    d = 1.0 / d;
    const double del = d * c;
    h *= del;
    if (std::fabs(del - 1.0) < 1e-16) break;
  }
  return std::exp(-x + a * std::log(x) - std::lgamma(a)) * h;
}

// log C(n, k)
double log_choose(int n, int k) {
  return std::lgamma(n + 1.0) - std::lgamma(k + 1.0) - std::lgamma(n - k + 1.0);
}

// C(n, k) as a double, 0 outside 0 <= k <= n.
double choose(int n, int k) {
  if (k < 0 || k > n || n < 0) return 0.0;
  return std::exp(log_choose(n, k));
}

}  // namespace

double chi_square_upper_tail(double chi2, int dof) {
  if (dof <= 0 || !(chi2 >= 0)) return kNaN;
  const double a = 0.5 * dof, x = 0.5 * chi2;
  if (x == 0.0) return 1.0;
  if (x < a + 1.0) return 1.0 - gamma_p_series(a, x);
  return gamma_q_fraction(a, x);
}

RunsTest runs_test(const std::vector<double>& residuals) {
  RunsTest t;
  int last = 0;
  for (double r : residuals) {
    const int s = r > 0 ? 1 : r < 0 ? -1 : 0;
    if (s == 0) continue;
    (s > 0 ? t.positive : t.negative) += 1;
    if (s != last) ++t.runs;
    last = s;
  }
  const int n1 = t.positive, n2 = t.negative, n = n1 + n2;
  if (n1 == 0 || n2 == 0) {
    t.expected_runs = kNaN;
    t.p = kNaN;
    return t;
  }
  t.expected_runs = 1.0 + 2.0 * n1 * n2 / n;
  // P(R = r): 2 C(n1-1, k-1) C(n2-1, k-1) / C(n, n1) for r = 2k;
  // [C(n1-1, k-1) C(n2-1, k-2) + C(n1-1, k-2) C(n2-1, k-1)] / C(n, n1) for r = 2k - 1.
  const double total = choose(n, n1);
  double p = 0.0;
  for (int r = 2; r <= t.runs; ++r) {
    if (r % 2 == 0) {
      const int k = r / 2;
      p += 2.0 * choose(n1 - 1, k - 1) * choose(n2 - 1, k - 1);
    } else {
      const int k = (r + 1) / 2;
      p += choose(n1 - 1, k - 1) * choose(n2 - 1, k - 2) + choose(n1 - 1, k - 2) * choose(n2 - 1, k - 1);
    }
  }
  t.p = std::fmin(1.0, p / total);
  return t;
}

}  // namespace pkarta
