// Machine-readable output shared by the commands: the table options (--table, --bom,
// --out-dir), the CSV on standard output, the tables written to a folder, and the JSON every
// command prints (stamped with pkarta_version).
#ifndef PKARTA_CLI_CLI_OUTPUT_H_
#define PKARTA_CLI_CLI_OUTPUT_H_

#include <boost/program_options.hpp>

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli_common.h"
#include "pkarta/base/table.h"

namespace pkarta::cli {

/// What the table options asked for.
struct TableOptions {
  std::string table;    ///< --table NAME ("" : the main table)
  std::string out_dir;  ///< --out-dir DIR (-o is the output file of the commands that have one)
  bool bom = false;     ///< --bom
};

/// Adds --table NAME, --bom and --out-dir DIR.
void add_table_options(po::options_description& desc, TableOptions& t);

/// Checks the table options before any work: a known --table (else "did you mean" and the
/// list), --table and --bom only with csv output, an output folder that is not a file and
/// whose files are not one of `inputs`. Throws InputError naming the option.
void check_table_options(const TableOptions& t, const std::string& format, const std::vector<TableInfo>& info,
                         const std::vector<std::string>& inputs);

/// Writes the chosen table (csv format) to standard output and, with --out-dir, every table as
/// DIR/NAME.csv (written atomically; the folder is created when missing).
void emit_tables(const TableOptions& t, const std::string& format, const std::vector<DataTable>& tables,
                 const std::vector<std::string>& inputs);

/// "Tables (--table NAME, --format csv; all with --out-dir DIR):" and one line per table.
std::string tables_help(const std::vector<TableInfo>& info);

/// The JSON of a command with "pkarta_version" as its first key.
nlohmann::ordered_json stamped(const nlohmann::ordered_json& j);
/// Parses a writer's JSON text, stamps it and prints it (2-space indent) to standard output.
void print_json(const std::string& writer_output);
void print_json(const nlohmann::ordered_json& j);

}  // namespace pkarta::cli

#endif  // PKARTA_CLI_CLI_OUTPUT_H_
