// Uses an installed pkarta: its version and one closed-system solve, 25 mM KH2PO4 with
// 25 mM Na2HPO4 at 25 °C. The IUPAC primary standard of this composition (by molality) is
// pH 6.865 (Buck et al. 2002, Pure Appl. Chem. 74, 2169); by molarity it differs by < 0.005.
#include <cmath>
#include <cstdio>
#include <string>

#include <pkarta/pkarta.h>

int main() {
  const pkarta::Library library = pkarta::builtin_library();
  pkarta::Mixture mixture;
  pkarta::add_reagent(mixture, library, "KH2PO4", 0.025);
  pkarta::add_reagent(mixture, library, "Na2HPO4", 0.025);
  const pkarta::Equilibrium state = pkarta::solve(mixture);
  std::printf("pkarta %s: pH %.3f\n", pkarta::version().c_str(), state.pH);
  if (pkarta::version().empty() || !state.usable() || std::fabs(state.pH - 6.865) > 0.02) return 1;
  return 0;
}
