// Text and CSV of the Monte Carlo bands of a pH-solubility profile.
#ifndef PKARTA_WRITERS_UNCERTAINTY_WRITER_H_
#define PKARTA_WRITERS_UNCERTAINTY_WRITER_H_

#include <ostream>

#include "pkarta/analyses/uncertainty.h"

namespace pkarta {

/// Text table of the bands (pH, nominal, 5 %, 50 %, 95 % in mol/L and the band width in log10).
void write_profile_bands_text(const ProfileBands& bands, std::ostream& out);
/// CSV: pH, solubility_mol_per_L (nominal), p05/p50/p95 _mol_per_L.
void write_profile_bands_csv(const ProfileBands& bands, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_UNCERTAINTY_WRITER_H_
