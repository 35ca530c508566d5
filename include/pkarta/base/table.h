// Rectangular data tables: what `--format csv` writes (one table on standard output, every table
// of a command as NAME.csv with --out-dir). Column names follow one convention everywhere:
// lower_snake_case, the unit last after an underscore with "per" for "/" (solubility_mg_per_mL,
// conc_mol_per_L, temperature_C, osmolarity_mOsm_per_L, capacity_mol_per_L_per_pH); pH and
// ratios carry no unit. Numbers are written at full precision (the shortest text that reads
// back to the same double); an empty cell is a value the model does not give.
#ifndef PKARTA_BASE_TABLE_H_
#define PKARTA_BASE_TABLE_H_

#include <optional>
#include <ostream>
#include <string>
#include <vector>

namespace pkarta {

/// A table's name (its --table NAME and file NAME.csv) and what one row is.
struct TableInfo {
  std::string name;
  std::string description;
};

/// One rectangular table: every row has header.size() cells.
struct DataTable {
  std::string name;
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  /// Appends a row; throws std::logic_error when its width differs from the header's.
  void add(std::vector<std::string> row);
};

/// Shortest text that reads back to the same double ("0.1", "1.2345678901234567e-05"); empty
/// for a value that is not finite.
std::string full(double value);
/// full(*value), or empty when absent.
std::string full(const std::optional<double>& value);
/// "true" or "false".
std::string boolean(bool value);

/// RFC 4180: the header and rows, CRLF line endings; with `bom` a UTF-8 byte-order mark first
/// (for spreadsheets that need one to read UTF-8).
void write_table_csv(const DataTable& table, std::ostream& out, bool bom = false);

/// A table of notes, warnings and the caution: columns kind, text.
DataTable notes_table(const std::vector<std::string>& notes, const std::vector<std::string>& warnings);

}  // namespace pkarta

#endif  // PKARTA_BASE_TABLE_H_
