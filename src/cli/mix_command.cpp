#include <iostream>
#include <sstream>

#include "pkarta/base/format.h"

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/analyses/mix.h"
#include "pkarta/writers/mix_writer.h"
#include "pkarta/writers/tables.h"

namespace pkarta::cli {

namespace {

// Several temperatures: a compact comparison (text, csv) or {"states": [...]} (json).
int run_mix_temperatures(FormulationOptions f, const Library& lib, const std::vector<std::string>& temps,
                         const std::string& format, const TableOptions& tables) {
  std::vector<MixResult> results;
  std::vector<std::string> inputs;
  for (const std::string& t : temps) {
    f.temperature = t;
    inputs.clear();
    const Mixture m = build_formulation(f, lib, &inputs);
    results.push_back(analyse_mix(m, inputs));
    if (!results.back().equilibrium.usable()) {
      error(results.back().equilibrium.message + " at " + t + " C");
      return static_cast<int>(kExitRefused);
    }
  }
  emit_tables(tables, format, mix_tables(results), {f.compound_file});
  if (format == "json") {
    std::ostringstream doc;
    write_mix_json_document(results, doc);
    print_json(doc.str());
    return 0;
  }
  if (format == "csv") return 0;
  const bool drug = results.front().equilibrium.drug.has_value();
  std::vector<std::string> head = {"temperature (°C)", "pH", "ionic strength (mol/L)",
                                   "capacity (mol/L per pH)", "osmolarity (mOsm/L)"};
  if (drug) {
    head.push_back("drug dissolved (mg/mL as free form)");
    head.push_back("solid");
  }
  TextTable t(head);
  for (const MixResult& r : results) {
    const Equilibrium& e = r.equilibrium;
    std::vector<std::string> row = {fixed(e.temperature_C, 1), fixed(e.pH, 3), sig(e.ionic_strength_mol_per_L, 4),
                                    sig(r.capacity_mol_per_L_per_pH, 4), fixed(e.osmolarity_mOsm_per_L, 1)};
    if (drug) {
      row.push_back(sig(e.drug->dissolved_mg_per_mL, 4));
      row.push_back(e.drug->solid);
    }
    t.add_row(row);
  }
  std::cout << "Closed-system equilibrium at " << temps.size() << " temperatures\n  contents: ";
  for (std::size_t i = 0; i < inputs.size(); ++i) std::cout << (i ? ", " : "") << inputs[i];
  std::cout << "\n\n";
  t.write(std::cout);
  std::cout << "\n(give one --temp for the species table)\n" << caution_text() << "\n";
  return 0;
}

}  // namespace

int run_mix(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    FormulationOptions f;
    TableOptions tables;
    po::options_description desc("mix options");
    add_formulation_options(desc, f, true);
    add_table_options(desc, tables);
    add_common_options(desc, common);
    add_output_option(desc, common);
    parse(args, desc);
    if (common.help) {
      print_help(std::cout,
                 "pkarta mix [--compound FILE --dose AMOUNT [--form free|SALT]] [--add REAGENT=AMOUNT]... "
                 "[--medium MEDIUM] [--temp CELSIUS[,...]]",
                 desc);
      std::cout << "\n" << tables_help(mix_table_info());
      print_examples(std::cout, {"pkarta mix --add KH2PO4=25mM --add Na2HPO4=25mM --temp 5,25,37",
                                 "pkarta mix --compound compounds/demo-base.xml --dose 2mg/mL --form hydrochloride --medium saline-0.9 --format json"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, mix_table_info(), {f.compound_file});
    std::vector<std::string> protect = common.library_files;
    if (!f.compound_file.empty()) protect.push_back(f.compound_file);
    OutputTarget out(common.output, protect, common.format == "text");
    const Library lib = load_libraries(common);
    // --temp may list several temperatures (e.g. 5,25,37): one state each, same contents.
    std::vector<std::string> temps;
    for (std::size_t start = 0;;) {
      const std::size_t comma = f.temperature.find(',', start);
      temps.push_back(f.temperature.substr(start, comma == std::string::npos ? std::string::npos : comma - start));
      if (comma == std::string::npos) break;
      start = comma + 1;
    }
    if (temps.size() > 1) return out.done(run_mix_temperatures(f, lib, temps, common.format, tables));
    std::vector<std::string> inputs;
    const Mixture m = build_formulation(f, lib, &inputs);
    if (m.systems.empty() && m.ions.empty() && !m.drug) {
      throw InputError(SourceLocation{"--add", 0, 0},
                       "nothing to mix: give --add REAGENT=AMOUNT, --medium or --compound with --dose");
    }
    const MixResult r = analyse_mix(m, inputs);
    if (!r.equilibrium.usable()) {
      error(r.equilibrium.message);
      return static_cast<int>(kExitRefused);
    }
    emit_tables(tables, common.format, mix_tables({r}), {f.compound_file});
    if (common.format == "json") {
      std::ostringstream doc;
      write_mix_json_document({r}, doc);
      print_json(doc.str());
    } else if (common.format == "text") {
      write_mix_text(r, std::cout);
    }
    for (const std::string& w : r.equilibrium.warnings) {
      if (common.format != "text") std::cerr << "pkarta: warning: " << w << "\n";
    }
    return out.done(0);
  });
}

}  // namespace pkarta::cli
