// The rectangular tables of each command (base/table.h: one convention for column names and
// units, full-precision numbers, flags in columns of their own). The first table of each list
// is the command's main table: what `--format csv` writes unless `--table NAME` picks another;
// `--out-dir DIR` writes them all as DIR/NAME.csv. Every list ends with `notes` (kind, text).
#ifndef PKARTA_WRITERS_TABLES_H_
#define PKARTA_WRITERS_TABLES_H_

#include <vector>

#include "pkarta/analyses/classify.h"
#include "pkarta/analyses/dilute.h"
#include "pkarta/analyses/fit.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/analyses/recipe.h"
#include "pkarta/analyses/recipe_formulation.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/analyses/uncertainty.h"
#include "pkarta/base/table.h"

namespace pkarta {

/// Flag of a profile point's ideal (Henderson-Hasselbalch) solubility: "capped" at or above
/// kSolubilityCap_mol_per_L, otherwise empty. The same for the solubility itself.
inline constexpr const char* kCappedFlag = "capped";
/// Flag of a point whose ionic strength lies above the Davies equation's range (0.5 mol/L).
inline constexpr const char* kOutsideActivityRangeFlag = "outside activity model range";

/// The tables of each command, in order, main first (names and what a row is).
std::vector<TableInfo> mix_table_info();
std::vector<TableInfo> profile_table_info();
std::vector<TableInfo> classify_table_info();
std::vector<TableInfo> fit_table_info();
std::vector<TableInfo> dilute_table_info();
std::vector<TableInfo> screen_table_info();
std::vector<TableInfo> recipe_table_info();

/// mix at one or several temperatures: state (one row per temperature), species, notes.
std::vector<DataTable> mix_tables(const std::vector<MixResult>& results);
/// profile: points, ph_max, derived_ksp, bands (rows only with samples > 0), notes.
std::vector<DataTable> profile_tables(const Profile& profile, const ProfileBands& bands);
/// classify: points, summary (one row), media, notes.
std::vector<DataTable> classify_tables(const ClassifyResult& result);
/// fit: parameters, residuals, correlation, summary (one row), notes.
std::vector<DataTable> fit_tables(const FitResult& result);
/// dilute: points, notes.
std::vector<DataTable> dilute_tables(const DilutionResult& result);
/// screen of one or more compounds: results (one row per compound and buffer), criteria,
/// near_misses... see screen_table_info(); `bands` may be null (no Monte Carlo run).
std::vector<DataTable> screen_tables(const std::vector<ScreenReport>& reports, const ScreenBands* bands);
/// recipe: reagents (the titrant included), solution (one row), formulation (one row with a
/// drug, none without), notes.
std::vector<DataTable> recipe_tables(const Recipe& recipe, const Formulation* formulation);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_TABLES_H_
