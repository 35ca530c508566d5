#include "pkarta/base/table.h"

#include <charconv>
#include <cmath>
#include <stdexcept>

#include "pkarta/base/format.h"

namespace pkarta {

void DataTable::add(std::vector<std::string> row) {
  if (row.size() != header.size()) {
    throw std::logic_error("table " + name + ": a row of " + std::to_string(row.size()) + " cells under " +
                           std::to_string(header.size()) + " columns");
  }
  rows.push_back(std::move(row));
}

std::string full(double value) {
  if (!std::isfinite(value)) return "";
  if (value == 0.0) return "0";  // also -0
  char buf[64];
  const std::to_chars_result r = std::to_chars(buf, buf + sizeof buf, value);
  return std::string(buf, r.ptr);
}

std::string full(const std::optional<double>& value) { return value ? full(*value) : std::string(); }

std::string boolean(bool value) { return value ? "true" : "false"; }

void write_table_csv(const DataTable& table, std::ostream& out, bool bom) {
  if (bom) out << "\xEF\xBB\xBF";
  write_csv_row(out, table.header);
  for (const std::vector<std::string>& r : table.rows) write_csv_row(out, r);
}

DataTable notes_table(const std::vector<std::string>& notes, const std::vector<std::string>& warnings) {
  DataTable t{"notes", {"kind", "text"}, {}};
  for (const std::string& n : notes) t.add({"note", n});
  for (const std::string& w : warnings) t.add({"warning", w});
  t.add({"caution", caution_text()});
  return t;
}

}  // namespace pkarta
