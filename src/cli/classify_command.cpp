// `pkarta classify`: solubility classification over pH 1.2-6.8 at 37 °C (ICH M9, 2019).
#include <cctype>
#include <iostream>
#include <sstream>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/analyses/classify.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/base/format.h"
#include "pkarta/analyses/recipe.h"
#include "pkarta/base/table.h"
#include "pkarta/writers/classify_writer.h"
#include "pkarta/writers/tables.h"

namespace pkarta::cli {

namespace {
// A number > 0 from an option value; errors name the option.
double positive_option(const std::string& option, const std::string& text, const std::string& what) {
  double v;
  try {
    v = parse_number(text, "value");
  } catch (const InputError& e) {
    throw InputError(SourceLocation{option, 0, 0}, e.message());
  }
  if (!(v > 0)) throw InputError(SourceLocation{option, 0, 0}, what + " " + text + " must be > 0");
  return v;
}
// A mass as --dose gives it ("50mg", "0.05g", "500ug"; a plain number is mg), in mg.
std::string dose_mass_mg(const std::string& text) {
  std::size_t end = 0;
  while (end < text.size() && (std::isdigit(static_cast<unsigned char>(text[end])) || text[end] == '.' ||
                               text[end] == 'e' || text[end] == 'E' || text[end] == '-' || text[end] == '+')) {
    ++end;
  }
  const std::string unit = text.substr(end);
  const double mg = unit.empty() || unit == "mg" ? 1.0 : unit == "g" ? 1e3 : unit == "ug" || unit == "µg" ? 1e-3 : 0.0;
  if (mg == 0.0 || end == 0) {
    throw InputError(SourceLocation{"--dose", 0, 0},
                     "expected the highest single dose as a mass such as 50mg or 0.05g, got \"" + text + "\"");
  }
  const double v = positive_option("--dose", text.substr(0, end), "dose (mg)");
  return full(v * mg);
}

}  // namespace

int run_classify(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::string compound_file, dose, volume = "250", temp = "37", form = "free", acid = "HCl", base = "NaOH",
                step = "0.01";
    bool no_media = false;
    ActivityOptions activity;
    std::string dose_alias, volume_alias;
    TableOptions tables;
    po::options_description desc("classify options");
    desc.add_options()
        ("compound", po::value(&compound_file), "compound XML file (required)")
        ("dose-mg", po::value(&dose), "highest single therapeutic dose, mg of the form given (required)")
        ("dose", po::value(&dose_alias), "the same as --dose-mg, as a mass: 50mg, 0.05g")
        ("form", po::value(&form)->default_value("free"), "form the dose is expressed in: free or a salt id")
        ("volume-mL", po::value(&volume)->default_value("250"), "volume of medium, mL (ICH M9: 250)")
        ("volume", po::value(&volume_alias), "the same as --volume-mL, with a unit: 250mL, 0.25L")
        ("temp", po::value(&temp)->default_value("37"), "temperature, °C (ICH M9: 37 ± 1)")
        ("step", po::value(&step)->default_value("0.01"), "scan step over pH 1.2-6.8 (at most 0.1)")
        ("acid", po::value(&acid)->default_value("HCl"), "strong acid holding the low pH of the scan")
        ("base", po::value(&base)->default_value("NaOH"), "strong base holding the high pH of the scan")
        ("no-media", po::bool_switch(&no_media), "skip the dose in the pharmacopeial media");
    add_activity_options(desc, activity);
    add_table_options(desc, tables);
    add_common_options(desc, common);
    const po::variables_map vm = parse(args, desc);
    if (vm.count("dose")) take_alias(vm, "dose-mg", "dose", dose_mass_mg(dose_alias), dose);
    if (vm.count("volume")) {
      double litres = 0.0;
      try {
        litres = parse_volume_L(volume_alias);
      } catch (const InputError& e) {
        throw InputError(SourceLocation{"--volume", 0, 0}, e.message());
      }
      take_alias(vm, "volume-mL", "volume", full(litres * 1e3), volume);
    }
    if (common.help) {
      print_help(std::cout,
                 "pkarta classify --compound FILE --dose-mg MG [--form free|SALT] [--volume-mL 250] [--temp 37]",
                 desc);
      std::cout
          << "ICH M9 (2019): highly soluble when the highest single therapeutic dose dissolves in\n"
             "250 mL or less of aqueous media over pH 1.2-6.8 at 37 ± 1 °C. Convention: the whole\n"
             "range is scanned (every 0.01 pH, minimum refined to 1e-6 pH) with the equilibrium\n"
             "solubility in water, excess solid, pH held by HCl or NaOH; the dose number\n"
             "D0 = (dose / 250 mL) / S is reported at pH 1.2, 4.5, 6.8, at each pKa in the range and at\n"
             "the minimum; solubilities are in mg/mL of the form the dose is given in. The dose is also\n"
             "dissolved in the library media hcl-1.2, acetate-4.5 and phosphate-6.8 (closed system) to\n"
             "show the pH after the dose; those checks inform, the scan decides.\n\n"
          << tables_help(classify_table_info());
      print_examples(std::cout, {"pkarta classify --compound compounds/demo-ampholyte.xml --dose-mg 50",
                                 "pkarta classify --compound compounds/demo-base.xml --dose-mg 25 --form hydrochloride --format json"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, classify_table_info(), {compound_file});
    if (compound_file.empty()) throw InputError(SourceLocation{"--compound", 0, 0}, "--compound FILE is required");
    if (dose.empty()) {
      throw InputError(SourceLocation{"--dose-mg", 0, 0}, "--dose-mg N is required (highest single dose, mg)");
    }
    ClassifyOptions o;
    o.dose_mg = positive_option("--dose-mg", dose, "dose (mg)");
    o.volume_mL = positive_option("--volume-mL", volume, "volume (mL)");
    o.temperature_C = option_temperature("--temp", temp);
    o.scan_step_pH = positive_option("--step", step, "step");
    if (o.scan_step_pH > 0.1) {
      throw InputError(SourceLocation{"--step", 0, 0}, "step " + step + " is above 0.1 pH: the scan would miss minima");
    }
    o.form = form;
    o.acid_titrant = acid;
    o.base_titrant = base;
    o.activity = activity_model_of(activity);
    o.check_media = !no_media;

    const Library lib = load_libraries(common);
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
    const Compound c = load_compound(compound_file, lib);
    if (form != "free" && !c.salt(form)) {
      std::string known = "free";
      for (const Salt& s : c.salts) known += ", " + s.id;
      throw InputError(SourceLocation{"--form", 0, 0},
                       "compound '" + c.id + "' has no form '" + form + "' (forms: " + known + ")");
    }
    // The dose in the volume of medium must be a concentration the model covers.
    const double dose_mol_per_L = o.dose_mg / form_molar_mass(c, form, lib) / o.volume_mL;
    if (!(dose_mol_per_L <= kMaxConc_mol_per_L)) {
      throw InputError(SourceLocation{"--volume-mL", 0, 0},
                       dose + " mg in " + volume + " mL is " + sig(dose_mol_per_L, 3) +
                           " mol/L, beyond the 10 mol/L the model covers");
    }
    const ClassifyResult r = classify(c, lib, o);
    emit_tables(tables, common.format, classify_tables(r), {compound_file});
    if (common.format == "json") {
      std::ostringstream raw;
      write_classify_json(r, raw);
      print_json(raw.str());
    } else if (common.format == "text") {
      write_classify_text(r, std::cout);
    }
    if (common.format != "text") {
      for (const std::string& w : r.warnings) std::cerr << "pkarta: warning: " << w << "\n";
    }
    return 0;
  });
}

}  // namespace pkarta::cli
