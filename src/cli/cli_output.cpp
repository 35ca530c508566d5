#include "cli_output.h"

#include <filesystem>
#include <iostream>
#include <sstream>

#include "pkarta/base/error.h"
#include "pkarta/base/suggest.h"
#include "pkarta/base/version.h"
#include "pkarta/io/atomic_file.h"

namespace pkarta::cli {

void add_table_options(po::options_description& desc, TableOptions& t) {
  desc.add_options()
      ("table", po::value(&t.table), "with --format csv: the table to print (see Tables below)")
      ("bom", po::bool_switch(&t.bom), "CSV starts with a UTF-8 byte-order mark (for spreadsheets that need it)")
      ("out-dir", po::value(&t.out_dir),
       "also write every table as DIR/NAME.csv (folder created when missing)");
}

namespace {

std::string names_of(const std::vector<TableInfo>& info) {
  std::string s;
  for (const TableInfo& i : info) s += (s.empty() ? "" : ", ") + i.name;
  return s;
}

std::vector<std::string> given(const std::vector<std::string>& inputs) {
  std::vector<std::string> out;
  for (const std::string& i : inputs) {
    if (!i.empty()) out.push_back(i);
  }
  return out;
}

std::string table_path(const std::string& dir, const std::string& name) {
  return (std::filesystem::path(dir) / (name + ".csv")).string();
}

}  // namespace

void check_table_options(const TableOptions& t, const std::string& format, const std::vector<TableInfo>& info,
                         const std::vector<std::string>& inputs) {
  if (!t.table.empty()) {
    std::vector<std::string> names;
    names.reserve(info.size());
    for (const TableInfo& i : info) names.push_back(i.name);
    bool known = false;
    for (const std::string& n : names) known = known || n == t.table;
    if (!known) {
      throw InputError(SourceLocation{"--table", 0, 0}, "unknown table \"" + t.table + "\" (tables: " +
                                                            names_of(info) + ")" + did_you_mean(t.table, names));
    }
    if (format != "csv") {
      throw InputError(SourceLocation{"--table", 0, 0}, "--table chooses the table of --format csv");
    }
  }
  if (t.bom && format != "csv" && t.out_dir.empty()) {
    throw InputError(SourceLocation{"--bom", 0, 0}, "--bom applies to CSV (--format csv or --out-dir)");
  }
  if (!t.out_dir.empty()) {
    namespace fs = std::filesystem;
    std::error_code ec;
    if (!fs::exists(t.out_dir, ec)) return;  // created when the tables are written
    if (!fs::is_directory(t.out_dir, ec)) {
      throw InputError(SourceLocation{"--out-dir", 0, 0}, t.out_dir + " exists and is not a folder");
    }
    for (const TableInfo& i : info) {
      try {
        refuse_to_overwrite_inputs(table_path(t.out_dir, i.name), given(inputs));
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--out-dir", 0, 0}, e.message());
      }
    }
  }
}

void emit_tables(const TableOptions& t, const std::string& format, const std::vector<DataTable>& tables,
                 const std::vector<std::string>& inputs) {
  if (tables.empty()) throw std::logic_error("a command without tables");
  if (format == "csv") {
    const DataTable* chosen = &tables.front();
    for (const DataTable& d : tables) {
      if (d.name == t.table) chosen = &d;
    }
    write_table_csv(*chosen, std::cout, t.bom);
  }
  if (!t.out_dir.empty()) {
    std::filesystem::create_directories(t.out_dir);
    std::string names;
    for (const DataTable& d : tables) {
      std::ostringstream csv;
      write_table_csv(d, csv, t.bom);
      write_file_atomically(table_path(t.out_dir, d.name), csv.str(), given(inputs));
      names += (names.empty() ? "" : ", ") + d.name + ".csv";
    }
    std::cerr << "pkarta: wrote " << tables.size() << " tables to " << t.out_dir << " (" << names << ")\n";
  }
}

std::string tables_help(const std::vector<TableInfo>& info) {
  std::string s = "Tables (--format csv prints the first, --table NAME another; --out-dir DIR writes all):\n";
  for (const TableInfo& i : info) {
    s += "  " + i.name + std::string(i.name.size() < 13 ? 13 - i.name.size() : 1, ' ') + i.description + "\n";
  }
  return s;
}

nlohmann::ordered_json stamped(const nlohmann::ordered_json& j) {
  nlohmann::ordered_json out;
  out["pkarta_version"] = version();
  if (j.is_object()) {
    for (auto it = j.begin(); it != j.end(); ++it) {
      if (it.key() != "pkarta_version") out[it.key()] = it.value();
    }
  }
  return out;
}

void print_json(const nlohmann::ordered_json& j) { std::cout << stamped(j).dump(2) << "\n"; }

void print_json(const std::string& writer_output) { print_json(nlohmann::ordered_json::parse(writer_output)); }

}  // namespace pkarta::cli
