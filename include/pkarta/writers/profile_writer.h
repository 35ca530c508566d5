// Text, CSV and JSON of a pH-solubility profile (`pkarta profile`).
#ifndef PKARTA_WRITERS_PROFILE_WRITER_H_
#define PKARTA_WRITERS_PROFILE_WRITER_H_

#include <ostream>

#include "pkarta/analyses/profile.h"
#include "pkarta/analyses/uncertainty.h"
#include "pkarta/writers/uncertainty_writer.h"

namespace pkarta {

/// Text: header, pHmax, derived Ksp, the table, notes, warnings and the caution. With
/// row_interval_pH > 0 only rows whose pH is a multiple of it are printed (0: every row).
void write_profile_text(const Profile& profile, std::ostream& out, double row_interval_pH = 0.0);
/// CSV (RFC 4180): the points table (writers/tables.h has every table of the profile).
void write_profile_csv(const Profile& profile, std::ostream& out);
/// JSON: keys of docs/commands.md plus species, derived_ksp, notes, warnings, caution.
void write_profile_json(const Profile& profile, std::ostream& out);

/// The profile with its Monte Carlo bands (`pkarta profile --uncertainty N`). Bands with
/// samples = 0 (none drawn) give the profile alone. Text appends the bands table after an
/// empty line (CSV: the points table; profile_tables() gives the bands); JSON adds
/// solubility_p05/p50/p95_mol_per_L to each point and
/// uncertainty {samples, seed}.
void write_profile_text(const Profile& profile, const ProfileBands& bands, std::ostream& out,
                        double row_interval_pH = 0.0);
void write_profile_csv(const Profile& profile, const ProfileBands& bands, std::ostream& out);
void write_profile_json(const Profile& profile, const ProfileBands& bands, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_PROFILE_WRITER_H_
