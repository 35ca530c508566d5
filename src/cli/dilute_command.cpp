// `pkarta dilute`: a formulation diluted into a medium at several ratios; precipitation risk.
#include <iostream>
#include <sstream>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/analyses/dilute.h"
#include "pkarta/writers/dilute_writer.h"
#include "pkarta/writers/tables.h"
#include "pkarta/chem/mixture_builder.h"

namespace pkarta::cli {

namespace {

std::vector<double> parse_ratios(const std::string& text) {
  std::vector<double> out;
  std::istringstream in(text);
  std::string item;
  while (std::getline(in, item, ',')) {
    if (item.find(':') != std::string::npos) {
      // "1:10" reads as 1 part in 10 to some and as 1 part plus 10 to others: ask for the factor.
      throw InputError(SourceLocation{"--ratios", 0, 0},
                       "give each ratio as total volume / formulation volume, not as \"" + item +
                           "\" (which reads two ways): 10 means 1 volume of formulation made up to 10");
    }
    out.push_back(option_number("--ratios", item, 1.0, 1e9));
  }
  if (out.empty()) {
    throw InputError(SourceLocation{"--ratios", 0, 0}, "no ratios given, e.g. --ratios 1,2,5,10,20,50,100");
  }
  return out;
}

}  // namespace

int run_dilute(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    FormulationOptions f;
    std::string into, ratios = "1,2,5,10,20,50,100", into_temp, blood_model, pco2, blood = "plasma";
    po::options_description desc("dilute options");
    add_formulation_options(desc, f);
    desc.add_options()
        ("into", po::value(&into), "library medium diluted into (water, saline-0.9, dextrose-5, "
                                   "plasma-7.4, sgf-1.2, sif-6.8, ...)")
        ("ratios", po::value(&ratios)->default_value("1,2,5,10,20,50,100"),
         "dilution ratios, total volume / formulation volume (>= 1; 10 = 1 volume + 9 of medium)")
        ("into-temp", po::value(&into_temp), "temperature of the diluted mixture, °C (default: --temp; "
                                             "37 for plasma or blood)")
        ("blood-model", po::value(&blood_model), "bicarbonate of plasma or blood: open (held at a set "
                                                 "pCO2, default for plasma or blood) or closed")
        ("pco2", po::value(&pco2), "arterial pCO2 of the open model, mmHg (default 40)")
        ("blood", po::value(&blood)->default_value("plasma"), "non-bicarbonate buffering of a plasma or blood medium: "
                                                              "plasma (7.7 mmol/L per pH) or whole (with haemoglobin, 21.0)");
    TableOptions tables;
    add_table_options(desc, tables);
    add_common_options(desc, common);
    parse(args, desc);
    if (common.help) {
      print_help(std::cout,
                 "pkarta dilute [--compound FILE --dose AMOUNT [--form free|SALT]] [--add REAGENT=AMOUNT]... "
                 "[--medium MEDIUM] [--temp CELSIUS] --into MEDIUM [--ratios 1,2,5,10,20,50,100] [--into-temp CELSIUS] "
                 "[--blood-model open|closed] [--pco2 MMHG] [--blood plasma|whole]",
                 desc);
      std::cout << "\n" << tables_help(dilute_table_info());
      print_examples(std::cout, {"pkarta dilute --compound compounds/demo-base.xml --dose 2mg/mL --form mesylate --into plasma-7.4",
                                 "pkarta dilute --compound compounds/demo-base.xml --dose 2mg/mL --form hydrochloride --into saline-0.9 --ratios 1,2,5,10 --format csv"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, dilute_table_info(), {f.compound_file});
    if (into.empty()) throw InputError(SourceLocation{"--into", 0, 0}, "dilute needs --into MEDIUM");
    const Library lib = load_libraries(common);
    check_medium_option(lib, "--into", into);
    DilutionOptions options;
    options.medium_id = into;
    options.ratios = parse_ratios(ratios);
    if (!into_temp.empty()) options.temperature_C = option_temperature("--into-temp", into_temp);
    if (blood_model == "open") options.blood_model = BloodModel::kOpen;
    else if (blood_model == "closed") options.blood_model = BloodModel::kClosed;
    else if (!blood_model.empty()) {
      throw InputError(SourceLocation{"--blood-model", 0, 0}, "expected open or closed, got \"" + blood_model + "\"");
    }
    if (blood == "whole") options.blood = BloodKind::kWhole;
    else if (blood != "plasma") {
      throw InputError(SourceLocation{"--blood", 0, 0}, "expected plasma or whole, got \"" + blood + "\"");
    }
    if (options.blood == BloodKind::kWhole && !is_physiological_medium(lib, into)) {
      throw InputError(SourceLocation{"--blood", 0, 0}, "whole needs a plasma or blood medium; " + into + " is neither");
    }
    if (!pco2.empty()) options.pco2_mmHg = option_number("--pco2", pco2, 1.0, 200.0);
    if (options.blood_model == BloodModel::kOpen && !is_physiological_medium(lib, into)) {
      Mixture med;
      add_medium(med, lib, into);
      bool carbonate = false;
      for (const SystemAmount& s : med.systems) carbonate = carbonate || s.system.id == "carbonate";
      if (!carbonate) {
        throw InputError(SourceLocation{"--blood-model", 0, 0}, "open needs a medium holding bicarbonate; " + into + " has none");
      }
    }
    std::vector<std::string> inputs;
    const Mixture m = build_formulation(f, lib, &inputs);
    if (m.systems.empty() && m.ions.empty() && !m.drug) {
      throw InputError(SourceLocation{"--add", 0, 0},
                       "nothing to dilute: give --compound with --dose, --add REAGENT=AMOUNT or --medium");
    }
    const DilutionResult r = analyse_dilution(m, lib, options, inputs);
    if (!r.usable()) {
      error(r.message);
      return static_cast<int>(kExitRefused);
    }
    emit_tables(tables, common.format, dilute_tables(r), {f.compound_file});
    if (common.format == "json") {
      std::ostringstream raw;
      write_dilute_json(r, raw);
      print_json(raw.str());
    } else if (common.format == "text") {
      write_dilute_text(r, std::cout);
    }
    if (common.format != "text") {
      for (const std::string& w : r.warnings) std::cerr << "pkarta: warning: " << w << "\n";
    }
    return 0;
  });
}

}  // namespace pkarta::cli
