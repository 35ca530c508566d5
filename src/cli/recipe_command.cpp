// `pkarta recipe`: what to weigh and titrate to make a buffer.
#include <iostream>
#include <sstream>

#include "cli_common.h"
#include "cli_output.h"
#include "pkarta/writers/tables.h"
#include "commands.h"
#include "pkarta/base/error.h"
#include "pkarta/analyses/recipe.h"
#include "pkarta/analyses/recipe_formulation.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/writers/recipe_writer.h"

namespace pkarta::cli {

int run_recipe(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::string buffer, ph, conc, volume = "1L", temp = "25", reagents, compound, dose, form = "free", dose_as = "weighed", preparation = "premade";
    bool isotonic = false, titrant = false;
    std::string ph_alias, volume_mL;
    po::options_description desc("recipe options");
    desc.add_options()
        ("buffer", po::value(&buffer), "library buffer id (see pkarta library list)")
        ("ph", po::value(&ph), "target pH, 0-14")
        ("target-ph", po::value(&ph_alias), "the same as --ph")
        ("conc", po::value(&conc), "total buffer strength, e.g. 50mM, 0.05M or 0.05mol/kg")
        ("volume", po::value(&volume)->default_value("1L"), "final volume, e.g. 1L or 500mL")
        ("volume-mL", po::value(&volume_mL), "final volume in mL (the same as --volume with mL)")
        ("temp", po::value(&temp)->default_value("25"), "temperature the buffer is made up at, °C")
        ("isotonic", po::bool_switch(&isotonic), "add NaCl to about 290 mOsm/kg (estimate; measure it)")
        ("reagents", po::value(&reagents),
         "ACID,BASE reagent ids to weigh (hydrates as wanted), or one id with --titrant")
        ("titrant", po::bool_switch(&titrant), "one reagent plus 1 M HCl or NaOH instead of a pair")
        ("compound", po::value(&compound), "compound XML file: the recipe of the formulation with its dose")
        ("dose", po::value(&dose), "dose as an amount of the form weighed, e.g. 5mg/mL (with --compound)")
        ("form", po::value(&form)->default_value("free"), "form of the drug weighed: free or a salt id")
      ("dose-as", po::value(&dose_as)->default_value("weighed"),
       "weighed: --dose is of the form weighed; free: of its free-form equivalent")
        ("preparation", po::value(&preparation)->default_value("premade"),
         "premade: buffer made at the pH, drug dissolved in it; adjusted: buffer reagent and drug "
         "dissolved, pH brought to target with the titrant (with --compound)");
    ActivityOptions activity;
    add_activity_options(desc, activity);
    TableOptions tables;
    add_table_options(desc, tables);
    add_common_options(desc, common);
    const po::variables_map vm = parse(args, desc);
    take_alias(vm, "ph", "target-ph", ph_alias, ph);
    take_alias(vm, "volume", "volume-mL", volume_mL + "mL", volume);
    if (common.help) {
      print_help(std::cout,
                 "pkarta recipe --buffer ID --ph PH --conc AMOUNT [--volume 1L] [--temp CELSIUS] [--isotonic] "
                 "[--reagents ACID,BASE] [--titrant] [--compound FILE --dose AMOUNT [--form SALT] "
                 "[--preparation premade|adjusted]]",
                 desc);
      std::cout << "\n" << tables_help(recipe_table_info());
      print_examples(std::cout, {"pkarta recipe --buffer phosphate --ph 7.0 --conc 50mM --volume 500mL",
                                 "pkarta recipe --buffer tris --ph 7.4 --conc 20mM --reagents tris --titrant --temp 37"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, recipe_table_info(), {compound});
    if (buffer.empty()) throw InputError(SourceLocation{"--buffer", 0, 0}, "give the buffer (--buffer ID)");
    if (ph.empty()) throw InputError(SourceLocation{"--ph", 0, 0}, "give the target pH (--ph P)");
    if (conc.empty()) throw InputError(SourceLocation{"--conc", 0, 0}, "give the buffer strength (--conc, e.g. 50mM)");

    RecipeOptions o;
    o.activity = activity_model_of(activity);
    o.buffer = buffer;
    o.pH = option_number("--ph", ph, 0.0, 14.0);
    o.temperature_C = option_temperature("--temp", temp);
    const Amount c = option_amount("--conc", conc);
    if (c.is_mass_based()) {
      throw InputError(SourceLocation{"--conc", 0, 0},
                       "give the buffer strength in M, mM, uM or mol/kg, not \"" + conc + "\"");
    }
    o.conc_mol_per_L = c.to_mol_per_L(0.0, o.temperature_C);
    if (!(o.conc_mol_per_L > 0)) throw InputError(SourceLocation{"--conc", 0, 0}, "the buffer strength must be > 0");
    if (o.conc_mol_per_L > 10) throw InputError(SourceLocation{"--conc", 0, 0}, "the buffer strength must be at most 10 M");
    try {
      o.volume_L = parse_volume_L(volume);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--volume", 0, 0}, e.message());
    }
    o.isotonic = isotonic;
    o.use_titrant = titrant;
    if (!reagents.empty()) {
      std::string cur;
      for (char ch : reagents + ",") {
        if (ch == ',') {
          if (!cur.empty()) o.reagents.push_back(cur);
          cur.clear();
        } else if (ch != ' ') {
          cur += ch;
        }
      }
      if (o.reagents.empty() || o.reagents.size() > 2) {
        throw InputError(SourceLocation{"--reagents", 0, 0}, "expected ACID,BASE or one reagent id");
      }
      if (titrant && o.reagents.size() == 2) {
        throw InputError(SourceLocation{"--reagents", 0, 0}, "--titrant takes one reagent, e.g. --reagents KH2PO4");
      }
    }

    const Library lib = load_libraries(common);
    try {
      lib.buffer(buffer);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--buffer", 0, 0}, e.message());
    }
    for (const std::string& id : o.reagents) {
      try {
        lib.reagent(id);
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--reagents", 0, 0}, e.message());
      }
    }
    if (compound.empty() != dose.empty()) {
      throw InputError(SourceLocation{compound.empty() ? "--compound" : "--dose", 0, 0},
                       "--compound and --dose go together (the recipe of a formulation)");
    }
    if (preparation != "premade" && preparation != "adjusted") {
      throw InputError(SourceLocation{"--preparation", 0, 0}, "expected premade or adjusted, got \"" + preparation + "\"");
    }
    if (!compound.empty()) {
      const Compound drug = load_compound(compound, lib);
      const Amount dose_amount = option_amount("--dose", dose);
      if (!(dose_amount.value > 0)) throw InputError(SourceLocation{"--dose", 0, 0}, "the dose must be > 0");
      double dose_mol = 0.0;
      const DoseBasis basis = option_dose_basis(dose_as);
      try {
        dose_mol = dose_conc_mol_per_L(lib, drug, form, dose_amount, o.temperature_C, basis);
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--form", 0, 0}, e.message());
      }
      check_dose("--dose", drug, dose, dose_mol);
      Formulation f;
      try {
        f = make_formulation(lib, o, drug, dose_mol, form,
                             preparation == "adjusted" ? ScreenPreparation::kAdjusted : ScreenPreparation::kPremade);
      } catch (const InputError& e) {
        const std::string& field = e.where().file;
        const std::string option = field == "pH" ? "--ph" : field.empty() ? "--buffer" : "--" + field;
        throw InputError(SourceLocation{option, 0, 0}, e.message());
      }
      emit_tables(tables, common.format, recipe_tables(f.recipe, &f), {compound});
      if (common.format == "json") {
        std::ostringstream raw;
        write_formulation_json(f, raw);
        print_json(raw.str());
      } else if (common.format == "text") {
        write_formulation_text(f, std::cout);
      }
      return 0;
    }
    Recipe r;
    try {
      r = make_recipe(lib, o);
    } catch (const InputError& e) {
      // The library names the field at fault; the command line names the option.
      const std::string& field = e.where().file;
      const std::string option = field == "pH" ? "--ph" : field.empty() ? "--buffer" : "--" + field;
      throw InputError(SourceLocation{option, 0, 0}, e.message());
    }
    emit_tables(tables, common.format, recipe_tables(r, nullptr), {compound});
    if (common.format == "json") {
      std::ostringstream raw;
      write_recipe_json(r, raw);
      print_json(raw.str());
    } else if (common.format == "text") {
      write_recipe_text(r, std::cout);
    }
    return 0;
  });
}

}  // namespace pkarta::cli
