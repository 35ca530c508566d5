#include <iostream>

#include "cli_common.h"
#include "commands.h"
#include "pkarta/mix.h"

namespace pkarta::cli {

int run_mix(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    FormulationOptions f;
    po::options_description desc("mix options");
    add_formulation_options(desc, f);
    add_common_options(desc, common);
    parse(args, desc);
    if (common.help) {
      print_help(std::cout,
                 "pkarta mix [--compound F --dose AMOUNT [--form free|SALT]] [--add REAGENT=AMOUNT]... "
                 "[--medium ID] [--temp C]",
                 desc);
      return 0;
    }
    check_format(common.format);
    const Library lib = load_libraries(common);
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
    if (common.format == "json") write_mix_json(r, std::cout);
    else if (common.format == "csv") write_mix_csv(r, std::cout);
    else write_mix_text(r, std::cout);
    for (const std::string& w : r.equilibrium.warnings) {
      if (common.format != "text") std::cerr << "pkarta: warning: " << w << "\n";
    }
    return 0;
  });
}

}  // namespace pkarta::cli
