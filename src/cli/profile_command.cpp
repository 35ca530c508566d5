// `pkarta profile`: pH-solubility profile with salt limits and pHmax.
#include <iostream>
#include <sstream>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/analyses/uncertainty.h"
#include "pkarta/writers/profile_writer.h"
#include "pkarta/writers/tables.h"
#include "progress_bar.h"

namespace pkarta::cli {

namespace {

std::vector<double> parse_points(const std::string& text) {
  std::vector<double> v;
  std::stringstream ss(text);
  std::string item;
  while (std::getline(ss, item, ',')) {
    const auto b = item.find_first_not_of(" \t");
    const auto e = item.find_last_not_of(" \t");
    if (b == std::string::npos) {
      throw InputError(SourceLocation{"--points", 0, 0},
                       "empty entry in \"" + text + "\", expected comma-separated pH values such as 1.2,4.5,6.8");
    }
    v.push_back(option_number("--points", item.substr(b, e - b + 1), -1.0, 15.0));
  }
  if (v.empty() || text.back() == ',') {
    throw InputError(SourceLocation{"--points", 0, 0},
                     "empty entry in \"" + text + "\", expected comma-separated pH values such as 1.2,4.5,6.8");
  }
  return v;
}

}  // namespace

int run_profile(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    FormulationOptions f;
    std::string from = "1", to = "13", step = "0.05", points, acid = "HCl", base = "NaOH";
    std::string uncertainty = "0", seed = "1";
    TableOptions tables;
    po::options_description desc("profile options");
    desc.add_options()
        ("compound", po::value(&f.compound_file), "compound XML file (required)")
        ("from", po::value(&from)->default_value("1"), "first pH of the grid")
        ("to", po::value(&to)->default_value("13"), "last pH of the grid")
        ("step", po::value(&step)->default_value("0.05"), "grid step, pH units (> 0)")
        ("points", po::value(&points), "explicit pH list instead of the grid, e.g. 1.2,4.5,6.8")
        ("add", po::value(&f.adds)->composing(), "medium reagent and amount, e.g. NaCl=154mM; may repeat")
        ("medium", po::value(&f.medium), "library medium to start from (e.g. saline-0.9, hcl-1.2)")
        ("acid", po::value(&acid)->default_value("HCl"),
         "strong acid holding the low pH (a library reagent giving one strong anion, e.g. HCl, "
         "methanesulfonic-acid); its anion can form a salt")
        ("base", po::value(&base)->default_value("NaOH"),
         "strong base holding the high pH (NaOH, KOH); its cation can form a salt")
        ("temp", po::value(&f.temperature)->default_value("25"), "temperature, °C");
    add_activity_options(desc, f.activity);
    desc.add_options()
        ("uncertainty", po::value(&uncertainty)->default_value("0"),
         "Monte Carlo samples over the pKa sd and S0 log-sd of the compound file: 5/50/95 % bands")
        ("seed", po::value(&seed)->default_value("1"), "seed of the Monte Carlo samples (reproducible)");
    add_table_options(desc, tables);
    add_common_options(desc, common);
    add_output_option(desc, common);
    const po::variables_map vm = parse(args, desc);
    if (common.help) {
      print_help(std::cout,
                 "pkarta profile --compound FILE [--from 1 --to 13 --step 0.05 | --points LIST] "
                 "[--add REAGENT=AMOUNT]... [--medium MEDIUM] [--acid HCl] [--base NaOH] [--temp CELSIUS] "
                 "[--activity MODEL | --ideal]",
                 desc);
      std::cout << "At each pH the drug's excess free form is equilibrated in the medium, the pH held by\n"
                   "the acid or the base; a salt limits where its ion product would exceed Ksp, its\n"
                   "counterion coming from the titrant and the medium. pHmax is where the free-form and\n"
                   "salt curves cross in this medium. Text output prints every 0.5 pH of the default\n"
                   "grid; giving --step or --points prints every row (csv and json always hold all).\n\n"
                << tables_help(profile_table_info());
      print_examples(std::cout, {"pkarta profile --compound compounds/demo-base.xml --medium saline-0.9 --temp 37",
                                 "pkarta profile --compound compounds/demo-acid.xml --from 3 --to 9 --step 0.1 --format csv --table ph_max"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, profile_table_info(), {f.compound_file});
    if (f.compound_file.empty()) {
      throw InputError(SourceLocation{"--compound", 0, 0}, "--compound FILE is required");
    }
    std::vector<std::string> protect = common.library_files;
    protect.push_back(f.compound_file);
    OutputTarget out(common.output, protect, common.format == "text");
    const bool explicit_grid = !vm["from"].defaulted() || !vm["to"].defaulted() || !vm["step"].defaulted();
    ProfileGrid grid;
    if (vm.count("points")) {
      if (explicit_grid) {
        throw InputError(SourceLocation{"--points", 0, 0}, "--points cannot be combined with --from, --to or --step");
      }
      grid.points_pH = parse_points(points);
    } else {
      grid.from_pH = option_number("--from", from, -1.0, 15.0);
      grid.to_pH = option_number("--to", to, -1.0, 15.0);
      if (grid.to_pH < grid.from_pH) {
        throw InputError(SourceLocation{"--to", 0, 0},
                         "empty pH range: --to " + to + " is below --from " + from);
      }
      double s;
      try {
        s = parse_number(step, "value");
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--step", 0, 0}, e.message());
      }
      if (!(s > 0)) throw InputError(SourceLocation{"--step", 0, 0}, "step " + step + " must be > 0 (pH units)");
      grid.step_pH = s;
      std::string err;
      if (!grid.is_valid(&err)) {
        throw InputError(SourceLocation{"--step", 0, 0},
                         "step " + step + " gives more than " + std::to_string(kMaxProfilePoints) + " points");
      }
    }

    const Library lib = load_libraries(common);
    ProfileConditions cond;
    cond.acid_titrant = acid;
    cond.base_titrant = base;
    try {
      titrant_strong_ion(lib, acid, -1);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--acid", 0, 0}, e.message());
    }
    try {
      titrant_strong_ion(lib, base, +1);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--base", 0, 0}, e.message());
    }
    std::vector<std::string> contents;
    const std::string compound_file = f.compound_file;
    f.compound_file.clear();  // the medium only; the compound is loaded below
    cond.medium = build_formulation(f, lib, &contents);
    cond.temperature_C = cond.medium.temperature_C;
    cond.activity = cond.medium.activity;
    const Compound c = load_compound(compound_file, lib);

    const int samples = static_cast<int>(option_count("--uncertainty", uncertainty, 0, 1e6, "samples"));
    const long long seed_value = option_count("--seed", seed, 0, 9.007199254740992e15, "");  // 1.5 is no seed

    const Profile p = compute_profile(c, lib, cond, grid, contents);
    ProfileBands bands;
    if (samples > 0) {
      std::vector<double> ph;
      for (const auto& pt : p.points) ph.push_back(pt.pH);
      const ProgressBar bar("uncertainty");
      MonteCarloRun run;
      run.progress = bar;
      bands = profile_bands(c, lib, ph, cond, samples, static_cast<std::uint64_t>(seed_value), run);
      bar.finish();
    }
    emit_tables(tables, common.format, profile_tables(p, bands), {compound_file});
    if (common.format == "json") {
      std::ostringstream raw;
      write_profile_json(p, bands, raw);
      print_json(raw.str());
    } else if (common.format == "text") {
      write_profile_text(p, bands, std::cout, explicit_grid || vm.count("points") ? 0.0 : 0.5);
    }
    if (common.format != "text") {
      for (const std::string& w : p.warnings) std::cerr << "pkarta: warning: " << w << "\n";
    }
    return out.done(0);
  });
}

}  // namespace pkarta::cli
