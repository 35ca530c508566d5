// `pkarta fit`: pKa, intrinsic solubility and salt Ksp fitted to measured solubilities.
#include <iostream>
#include <sstream>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/io/atomic_file.h"
#include "pkarta/analyses/fit.h"
#include "pkarta/writers/fit_writer.h"
#include "pkarta/writers/tables.h"
#include "pkarta/chem/mixture_builder.h"

namespace pkarta::cli {

int run_fit(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::string compound_file, data_file, params, output, medium, acid = "HCl", base = "NaOH";
    ActivityOptions activity;
    po::options_description desc("fit options");
    desc.add_options()
        ("compound", po::value(&compound_file), "compound XML file (starting values; measured points)")
        ("data", po::value(&data_file),
         "CSV of measured solubilities with a header row: pH,value,unit[,temperature][,log_sd] "
         "(default: the compound file's measured-solubility block)")
        ("params", po::value(&params),
         "parameters to fit, e.g. s0,pka1,pka2,ksp:hydrochloride (default: s0, every pKa, and the "
         "Ksp of each salt that limits a point at the starting values)")
        ("output,o", po::value(&output), "write the fitted compound file here (other content kept)")
        ("medium", po::value(&medium), "library medium the measurements were made in (default: water)")
        ("acid", po::value(&acid)->default_value("HCl"), "strong acid that set the pH")
        ("base", po::value(&base)->default_value("NaOH"), "strong base that set the pH");
    add_activity_options(desc, activity);
    TableOptions tables;
    add_table_options(desc, tables);  // -o is the fitted compound file
    add_common_options(desc, common);
    parse(args, desc);
    if (common.help) {
      print_help(std::cout,
                 "pkarta fit --compound FILE [--data CSV] [--params s0,pka1,pka2,ksp:SALT] [-o OUT.xml] "
                 "[--medium MEDIUM] [--acid HCl] [--base NaOH] [--activity MODEL | --ideal]",
                 desc);
      std::cout << "\n" << tables_help(fit_table_info());
      print_examples(std::cout, {"pkarta fit --compound compounds/demo-base.xml",
                                 "pkarta fit --compound compounds/demo-acid.xml --data points.csv --params s0,pka1 -o fitted.xml"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, fit_table_info(), {compound_file, data_file});
    if (compound_file.empty()) throw InputError(SourceLocation{"--compound", 0, 0}, "fit needs --compound FILE");
    const Library lib = load_libraries(common);
    if (output == "-") {
      throw InputError(SourceLocation{"--output", 0, 0},
                       "fit prints its result on standard output; give a file name for the fitted compound file");
    }
    if (!output.empty()) {
      std::vector<std::string> inputs{compound_file};
      if (!data_file.empty()) inputs.push_back(data_file);
      for (const std::string& f : common.library_files) inputs.push_back(f);
      refuse_to_overwrite_inputs(output, inputs);
    }
    const Compound compound = load_compound(compound_file, lib);

    FitOptions options;
    options.conditions.activity = activity_model_of(activity);
    options.conditions.acid_titrant = acid;
    options.conditions.base_titrant = base;
    try {
      lib.reagent(acid);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--acid", 0, 0}, e.message());
    }
    try {
      lib.reagent(base);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--base", 0, 0}, e.message());
    }
    if (!medium.empty()) {
      try {
        lib.medium(medium);
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--medium", 0, 0}, e.message());
      }
      add_medium(options.conditions.medium, lib, medium);
    }

    std::vector<FitPoint> points;
    if (!data_file.empty()) {
      std::vector<std::string> warnings;
      points = read_solubility_csv(data_file, compound.molar_mass_g_per_mol, &warnings);
      for (const std::string& w : warnings) std::cerr << "pkarta: " << w << "\n";
    } else {
      points = fit_points_from_compound(compound);
      if (points.empty()) {
        throw InputError(SourceLocation{compound_file, 0, 0},
                         "no <measured-solubility> points in the compound file; add some or give --data CSV");
      }
    }
    const std::vector<FitParameter> parameters =
        params.empty() ? default_fit_parameters(compound, lib, points, options)
                       : parse_fit_parameters(params, compound, "--params");
    FitResult r = fit_solubility(compound, lib, points, parameters, options);
    if (r.status == FitStatus::kFailure) {
      error("fit failed: " + r.message);
      return static_cast<int>(kExitRefused);
    }
    std::string fitted_xml;
    if (!output.empty() && r.usable()) fitted_xml = fitted_compound_xml(compound_file, r, lib);

    emit_tables(tables, common.format, fit_tables(r), {compound_file, data_file});
    if (common.format == "json") {
      std::ostringstream raw;
      write_fit_json(r, raw);
      print_json(raw.str());
    } else if (common.format == "text") {
      write_fit_text(r, std::cout);
    }
    if (common.format != "text") {
      for (const std::string& w : r.warnings) std::cerr << "pkarta: warning: " << w << "\n";
    }
    if (!r.usable()) {
      error("fit did not converge: " + r.message + (output.empty() ? "" : "; " + output + " not written"));
      return static_cast<int>(kExitRefused);
    }
    if (!output.empty()) {
      write_file_atomically(output, fitted_xml, {compound_file});
      std::cerr << "pkarta: wrote " << output << "\n";
    }
    return 0;
  });
}

}  // namespace pkarta::cli
