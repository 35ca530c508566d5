#include <filesystem>
#include <iostream>

#include "cli_common.h"
#include "commands.h"
#include "pkarta/mix.h"
#include "pkarta/mixture_builder.h"

namespace pkarta::cli {

namespace {
bool vm_has_dir(const std::string& dir) { return std::filesystem::is_directory(dir); }
}  // namespace

int run_demo(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::string dir = "compounds";
    po::options_description desc("demo options");
    desc.add_options()("compounds", po::value(&dir)->default_value("compounds"), "folder of the demo compounds");
    add_common_options(desc, common);
    parse(args, desc);
    if (common.help) {
      print_help(std::cout, "pkarta demo [--compounds DIR]", desc);
      return 0;
    }
    if (!vm_has_dir(dir)) dir = PKARTA_DEFAULT_COMPOUNDS;
    const Library lib = load_libraries(common);
    FormulationOptions f;
    f.compound_file = dir + "/demo-base.xml";
    f.dose = "2mg/mL";
    f.form = "hydrochloride";
    f.adds = {"KH2PO4=25mM", "Na2HPO4=25mM"};
    std::vector<std::string> inputs;
    const Mixture m = build_formulation(f, lib, &inputs);
    const MixResult r = analyse_mix(m, inputs);
    write_mix_text(r, std::cout);
    return 0;
  });
}

}  // namespace pkarta::cli
