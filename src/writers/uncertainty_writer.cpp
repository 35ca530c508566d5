// Text and CSV of the Monte Carlo bands of a pH-solubility profile (analyses/uncertainty.h).
#include "pkarta/writers/uncertainty_writer.h"

#include <cmath>

#include "pkarta/base/format.h"

namespace pkarta {

void write_profile_bands_text(const ProfileBands& b, std::ostream& out) {
  out << "Monte Carlo bands of the solubility (" << b.samples << " samples, seed " << b.seed
      << "; pKa sd and S0 log-sd of the compound file, Ksp held)\n\n";
  TextTable t({"pH", "S (mol/L)", "5 % (mol/L)", "50 % (mol/L)", "95 % (mol/L)", "width (log10)"});
  for (std::size_t i = 0; i < b.pH.size(); ++i) {
    t.add_row({fixed(b.pH[i], 2), sig(std::pow(10.0, b.nominal_log10_mol_per_L[i]), 4),
               sig(std::pow(10.0, b.p05_log10_mol_per_L[i]), 4), sig(std::pow(10.0, b.p50_log10_mol_per_L[i]), 4),
               sig(std::pow(10.0, b.p95_log10_mol_per_L[i]), 4),
               fixed(b.p95_log10_mol_per_L[i] - b.p05_log10_mol_per_L[i], 3)});
  }
  t.write(out);
}

void write_profile_bands_csv(const ProfileBands& b, std::ostream& out) {
  write_csv_row(out, {"pH", "solubility_mol_per_L", "solubility_p05_mol_per_L", "solubility_p50_mol_per_L",
                      "solubility_p95_mol_per_L"});
  for (std::size_t i = 0; i < b.pH.size(); ++i) {
    write_csv_row(out, {sig(b.pH[i], 6), sig(std::pow(10.0, b.nominal_log10_mol_per_L[i]), 6),
                        sig(std::pow(10.0, b.p05_log10_mol_per_L[i]), 6),
                        sig(std::pow(10.0, b.p50_log10_mol_per_L[i]), 6),
                        sig(std::pow(10.0, b.p95_log10_mol_per_L[i]), 6)});
  }
}

}  // namespace pkarta
