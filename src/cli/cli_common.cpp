#include "cli_common.h"

#include <algorithm>
#include <cctype>
#include <cstdlib>
#include <cmath>
#include <filesystem>

#include <iostream>
#include <sstream>

#include "pkarta/base/error.h"
#include "pkarta/base/format.h"
#include "pkarta/base/limits.h"
#include "pkarta/base/suggest.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/atomic_file.h"
#include "pkarta/io/xml_input.h"

namespace pkarta::cli {

void add_common_options(po::options_description& desc, CommonOptions& common) {
  desc.add_options()
      ("help,h", po::bool_switch(&common.help), "show this help")
      ("format", po::value(&common.format)->default_value("text"), "output format: text, csv or json")
      ("library", po::value(&common.library_files)->composing(),
       "extra library XML file (adds or overrides built-in entries); may repeat");
}

void add_output_option(po::options_description& desc, CommonOptions& common) {
  desc.add_options()
      ("output,o", po::value(&common.output), "write the result to this file instead of standard output (- : standard output)");
}

OutputTarget::OutputTarget(const std::string& path, std::vector<std::string> inputs, bool text)
    : path_(path == "-" ? std::string() : path), inputs_(std::move(inputs)), text_(text) {
  if (path_.empty()) return;
  refuse_to_overwrite_inputs(path_, inputs_);
  saved_ = std::cout.rdbuf(buffer_.rdbuf());
}

OutputTarget::~OutputTarget() {
  if (saved_) std::cout.rdbuf(saved_);
}

int OutputTarget::done(int code) {
  if (!saved_) return code;
  std::cout.rdbuf(saved_);
  saved_ = nullptr;
  if (code == 0) write_file_atomically(path_, text_ ? fit_text_width(buffer_.str()) : buffer_.str(), inputs_);
  return code;
}

po::variables_map parse(const std::vector<std::string>& args, const po::options_description& desc,
                        const po::positional_options_description* positional) {
  po::variables_map vm;
  // An option name never holds '%'; Boost's messages fill %...% placeholders with the name
  // and would loop on a name such as "--%canonical_option%", so such words are refused here.
  for (const std::string& a : args) {
    const bool option_word = a.size() > 1 && a[0] == '-' && (a[1] == '-' || std::isalpha(static_cast<unsigned char>(a[1])));
    if (option_word && a.substr(0, a.find('=')).find('%') != std::string::npos) {
      throw InputError(SourceLocation{}, "unrecognised option '" + shown(a.substr(0, a.find('='))) + "' (see --help)");
    }
  }
  po::command_line_parser parser(args);
  parser.options(desc).style(po::command_line_style::default_style &
                             ~po::command_line_style::allow_guessing);
  if (positional) parser.positional(*positional);
  po::parsed_options parsed(&desc);
  try {
    parsed = parser.run();
  } catch (const po::unknown_option& e) {
    std::vector<std::string> names;
    for (const auto& o : desc.options()) names.push_back("--" + o->long_name());
    const std::string given = e.get_option_name();
    throw po::error(std::string(e.what()) + did_you_mean(given.substr(0, given.find('=')), names));
  }
  if (!positional) {
    // Without a positional description Boost stores stray words nowhere: refuse them, naming
    // the option before (a value with spaces, such as "25 mM", needs quotes).
    std::string before;
    for (const po::option& o : parsed.options) {
      if (o.position_key >= 0 && !o.original_tokens.empty()) {
        throw po::error("unexpected argument '" + o.original_tokens.front() + "'" +
                        (before.empty() ? "" : " after '" + before + "'"));
      }
      before.clear();
      for (const std::string& t : o.original_tokens) before += (before.empty() ? "" : " ") + t;
    }
  }
  // An empty value ("--compound ''") is refused as such, not taken for a missing option.
  for (const po::option& o : parsed.options) {
    if (o.position_key < 0 && !o.string_key.empty() && o.value.size() == 1 && o.value.front().empty() &&
        !o.original_tokens.empty()) {
      throw po::error("--" + o.string_key + ": the value is empty");
    }
  }
  po::store(parsed, vm);
  po::notify(vm);
  return vm;
}

Library load_libraries(const CommonOptions& common) {
  Library lib = builtin_library();
  for (const std::string& f : common.library_files) {
    Warnings w;
    Library extra = load_library_file(f, &lib, &w);
    for (const std::string& s : w) std::cerr << "pkarta: " << s << "\n";
    lib.merge(extra);
  }
  return lib;
}

void check_format(const std::string& format, bool allow_csv) {
  if (format == "text" || format == "json" || (allow_csv && format == "csv")) return;
  throw InputError(SourceLocation{"--format", 0, 0},
                   "unknown format \"" + format + "\", expected text, " +
                       std::string(allow_csv ? "csv or json" : "or json"));
}

Amount option_amount(const std::string& option, const std::string& text) {
  try {
    return parse_amount(text);
  } catch (const InputError& e) {
    throw InputError(SourceLocation{option, 0, 0}, e.message());
  }
}

double option_number(const std::string& option, const std::string& text, double lo, double hi) {
  double v;
  try {
    v = parse_number(text, "value");
  } catch (const InputError& e) {
    throw InputError(SourceLocation{option, 0, 0}, e.message());
  }
  if (!(v >= lo && v <= hi)) {
    std::ostringstream ss;
    ss << "value " << text << " is out of range, expected " << lo << " to " << hi;
    throw InputError(SourceLocation{option, 0, 0}, ss.str());
  }
  return v;
}

long long option_count(const std::string& option, const std::string& text, double lo, double hi,
                       const std::string& what) {
  const double v = option_number(option, text, lo, hi);
  if (v != std::floor(v)) {
    throw InputError(SourceLocation{option, 0, 0},
                     "expected a whole number" + (what.empty() ? std::string() : " of " + what) + ", got " + text);
  }
  return static_cast<long long>(v);
}

double option_temperature(const std::string& option, const std::string& text) {
  return option_number(option, text, -10.0, 100.0);
}

std::pair<std::string, std::string> split_assignment(const std::string& option, const std::string& text) {
  const auto eq = text.find('=');
  if (eq == std::string::npos || eq == 0 || eq + 1 == text.size()) {
    throw InputError(SourceLocation{option, 0, 0},
                     "expected REAGENT=AMOUNT (e.g. KH2PO4=25mM), got \"" + text + "\"");
  }
  return {text.substr(0, eq), text.substr(eq + 1)};
}

void take_alias(const po::variables_map& vm, const std::string& name, const std::string& alias,
                const std::string& alias_value, std::string& value) {
  const auto given = [&vm](const std::string& n) { return vm.count(n) > 0 && !vm[n].defaulted(); };
  if (!given(alias)) return;
  if (given(name)) {
    throw InputError(SourceLocation{"--" + alias, 0, 0},
                     "--" + alias + " is another name of --" + name + ": give one of them");
  }
  value = alias_value;
}

Compound load_compound(const std::string& path, const Library& library) {
  Warnings w;
  Compound c = load_compound_file(path, library, &w);
  for (const std::string& s : w) std::cerr << "pkarta: " << s << "\n";
  return c;
}

void add_formulation_options(po::options_description& desc, FormulationOptions& f, bool temperature_list) {
  desc.add_options()
      ("compound", po::value(&f.compound_file), "compound XML file")
      ("dose", po::value(&f.dose), "dose as an amount of the form weighed, e.g. 5mg/mL or 10mM")
      ("form", po::value(&f.form)->default_value("free"), "form of the drug: free or a salt id")
      ("dose-as", po::value(&f.dose_as)->default_value("weighed"),
       "weighed: --dose is of the form weighed; free: of its free-form equivalent")
      ("add", po::value(&f.adds)->composing(), "reagent and amount, e.g. KH2PO4=25mM; may repeat")
      ("medium", po::value(&f.medium), "library medium to start from (e.g. saline-0.9)")
      ("temp", po::value(&f.temperature)->default_value("25"),
       temperature_list ? "temperature, °C; a list such as 5,25,37 compares them" : "temperature, °C");
  add_activity_options(desc, f.activity);
}

void add_activity_options(po::options_description& desc, ActivityOptions& a) {
  desc.add_options()
      ("activity", po::value(&a.activity),
       ("activity model: " + activity_model_names() + " (default " +
        activity_model_id(kDefaultActivityModel) + "; sit: specific ion interaction, for ionic "
        "strength up to " + fixed(kCheckedMaxIonicStrength, 1) + " mol/L; ion-pairs: Davies with the "
        "ion pairs of Na+, K+, Ca2+ and Mg2+, up to " + fixed(kCheckedMaxIonicStrength, 1) +
        " mol/L; ideal: the same as --ideal)").c_str())
      ("ideal", po::bool_switch(&a.ideal), "activity coefficients 1 (no Davies correction)");
}

ActivityModel activity_model_of(const ActivityOptions& a) {
  if (a.activity.empty()) return a.ideal ? ActivityModel::kIdeal : kDefaultActivityModel;
  const std::optional<ActivityModel> m = parse_activity_model(a.activity);
  if (!m) {
    throw InputError(SourceLocation{"--activity", 0, 0},
                     "unknown activity model \"" + a.activity + "\" (expected one of " +
                         activity_model_names() + ")");
  }
  if (a.ideal && *m != ActivityModel::kIdeal) {
    throw InputError(SourceLocation{"--activity", 0, 0},
                     "--ideal and --activity " + a.activity + " name two different activity models");
  }
  return *m;
}

std::string activity_arguments(const ActivityOptions& a) {
  if (a.activity.empty()) return a.ideal ? " --ideal" : "";
  return " --activity " + a.activity;
}

DoseBasis option_dose_basis(const std::string& text) {
  if (text == "weighed") return DoseBasis::kFormWeighed;
  if (text == "free" || text == "free-form") return DoseBasis::kFreeForm;
  throw InputError(SourceLocation{"--dose-as", 0, 0},
                   "expected weighed (the dose is of the form weighed) or free (the dose is its "
                   "free-form equivalent), got \"" + text + "\"");
}

std::string dose_basis_note(DoseBasis basis, const std::string& form) {
  return basis == DoseBasis::kFreeForm && form != "free" ? " (as free form)" : "";
}

namespace {
// The model covers totals up to 10 mol/L (kMaxConc_mol_per_L, the pH bracket of the solver);
// more of one reagent than that is a typing error, not a solution.
void check_concentration(const std::string& option, const std::string& what, const std::string& text,
                         double conc_mol_per_L) {
  if (!(conc_mol_per_L <= kMaxConc_mol_per_L)) {
    throw InputError(SourceLocation{option, 0, 0}, what + " at " + text + " is " + sig(conc_mol_per_L, 3) +
                     " mol/L, beyond the 10 mol/L the model covers");
  }
}
}  // namespace

void check_dose(const std::string& option, const Compound& compound, const std::string& text, double conc_mol_per_L) {
  check_concentration(option, "the dose of " + compound.id, text, conc_mol_per_L);
  // A highly charged drug needs as many equivalents of counterions: a permanent charge of 16
  // at a few mol/L would need tens of mol/L of them (ionic strength above 1000 mol/L).
  int z_max = 0;
  for (int j = 0; j <= static_cast<int>(compound.system.pkas.size()); ++j) {
    z_max = std::max(z_max, std::abs(compound.system.charge_of(j)));
  }
  const double equivalents = z_max * conc_mol_per_L;
  if (!(equivalents <= kMaxConc_mol_per_L)) {
    throw InputError(SourceLocation{option, 0, 0},
                     "the dose of " + compound.id + " at " + text + " carries up to " + sig(equivalents, 3) +
                         " mol/L of charge (species of charge " + std::to_string(z_max) + " at " +
                         sig(conc_mol_per_L, 3) + " mol/L), beyond the 10 mol/L the model covers");
  }
}

void check_medium_option(const Library& library, const std::string& option, const std::string& id) {
  try {
    library.medium(id);
  } catch (const InputError& e) {
    throw InputError(SourceLocation{option, 0, 0}, e.message());
  }
}

Mixture build_formulation(const FormulationOptions& f, const Library& library,
                          std::vector<std::string>* inputs, Compound* compound_out) {
  Mixture m;
  m.temperature_C = option_temperature("--temp", f.temperature);
  m.activity = activity_model_of(f.activity);
  if (!f.medium.empty()) {
    check_medium_option(library, "--medium", f.medium);
    add_medium(m, library, f.medium);
    if (inputs) inputs->push_back("medium " + f.medium);
  }
  for (const std::string& a : f.adds) {
    const auto [id, amount_text] = split_assignment("--add", a);
    const Amount amount = option_amount("--add", amount_text);
    try {
      const double c = reagent_conc_mol_per_L(library, id, amount, m.temperature_C);
      check_concentration("--add", id, amount_text, c);
      add_reagent(m, library, id, c);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{"--add", 0, 0}, e.message());
    }
    if (inputs) inputs->push_back(id + " " + spaced_amount(amount_text));
  }
  if (!f.compound_file.empty()) {
    if (f.dose.empty()) throw InputError(SourceLocation{"--dose", 0, 0}, "--compound needs --dose");
    const DoseBasis basis = option_dose_basis(f.dose_as);
    const Compound c = load_compound(f.compound_file, library);
    const Amount dose = option_amount("--dose", f.dose);
    double conc;
    try {
      conc = dose_conc_mol_per_L(library, c, f.form, dose, m.temperature_C, basis);
      add_drug(m, library, c, conc, f.form);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{e.where().file.empty() ? "--form" : e.where().file,
                                      e.where().line, e.where().column},
                       e.message());
    }
    check_dose("--dose", c, f.dose, conc);
    if (inputs) inputs->push_back(c.id + (f.form == "free" ? "" : " " + f.form) + " " + spaced_amount(f.dose) + dose_basis_note(basis, f.form));
    if (compound_out) *compound_out = c;
  } else if (!f.dose.empty()) {
    throw InputError(SourceLocation{"--dose", 0, 0}, "--dose needs --compound");
  }
  return m;
}

void error(const std::string& message) { std::cerr << "pkarta: " << message << "\n"; }

int guarded(const std::function<int()>& body) {
  try {
    return body();
  } catch (const InputErrors& e) {
    // Every error of a file, in line order.
    for (const InputError& one : e.all()) error(one.what());
    return kExitBadInput;
  } catch (const InputError& e) {
    error(e.what());
    return kExitBadInput;
  } catch (const po::error& e) {
    error(std::string(e.what()) + " (see --help)");
    return kExitBadInput;
  } catch (const std::filesystem::filesystem_error& e) {
    // A path the user gave that cannot be used (a link loop, a folder that cannot be read).
    const std::string where = e.path1().empty() ? std::string() : e.path1().string() + ": ";
    error(where + e.code().message());
    return kExitBadInput;
  } catch (const std::system_error& e) {
    // Writing an output failed (disk full, device error): computed, but not delivered.
    error(e.what());
    return kExitRefused;
  } catch (const std::bad_alloc&) {
    error("out of memory");
    return kExitRefused;
  } catch (const std::exception& e) {
    error(std::string("internal error: ") + e.what());
    return kExitRefused;
  }
}

namespace {

// The value placeholder shown after an option in --help (`--dose AMOUNT`), by option name.
std::string placeholder(const std::string& name, const std::string& description) {
  if (name == "temp" && description.find("list") != std::string::npos) return "CELSIUS[,...]";
  static const std::vector<std::pair<const char*, const char*>> kNames = {
      {"compound", "FILE"}, {"compounds", "DIR"}, {"library", "FILE"}, {"data", "FILE"}, {"output", "FILE"},
      {"out-dir", "DIR"}, {"table", "NAME"}, {"format", "text|csv|json"}, {"dose", "AMOUNT"},
      {"dose-mg", "MG"}, {"form", "free|SALT"}, {"add", "REAGENT=AMOUNT"}, {"medium", "MEDIUM"},
      {"into", "MEDIUM"}, {"temp", "CELSIUS"}, {"into-temp", "CELSIUS"}, {"storage", "CELSIUS,CELSIUS"},
      {"from", "PH"}, {"to", "PH"}, {"step", "PH"}, {"points", "PH[,...]"}, {"target-ph", "PH"}, {"ph", "PH"},
      {"tolerance", "PH"}, {"max-drift", "PH"}, {"acid", "REAGENT"}, {"base", "REAGENT"},
      {"uncertainty", "SAMPLES"}, {"seed", "N"}, {"threads", "N"}, {"volume-mL", "ML"}, {"volume", "VOLUME"},
      {"buffers", "all|ID[,...]"}, {"buffer", "ID"}, {"route", "ROUTE"}, {"dose-range", "FRACTION"},
      {"preparation", "premade|adjusted"}, {"challenge", "AMOUNT"}, {"min-capacity", "CAPACITY"},
      {"round", "AMOUNT"}, {"conc", "AMOUNT"}, {"reagents", "ACID[,BASE]"}, {"params", "NAME[,...]"},
      {"ratios", "RATIO[,...]"}, {"blood-model", "open|closed"}, {"pco2", "MMHG"}, {"blood", "plasma|whole"}, {"dose-as", "weighed|free"}, {"activity", "MODEL"}};
  for (const auto& [n, p] : kNames) {
    if (name == n) return p;
  }
  std::string up;
  for (char c : name) up += c == '-' ? '_' : static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  return up;
}

// Words of `text` in lines of at most `width` columns, the first after `first`, the others
// indented by `indent` spaces.
void wrap_into(std::ostream& out, const std::string& first, const std::string& text, std::size_t indent,
               std::size_t width, const std::string& at_break = "") {
  std::string line = first;
  std::istringstream words(text);
  std::string w;
  bool empty = true;
  while (words >> w) {
    if (!empty && line.size() + 1 + w.size() + at_break.size() > width) {
      out << line << at_break << "\n";
      line = std::string(indent, ' ') + w;
    } else {
      line += (empty ? "" : " ") + w;
    }
    empty = false;
  }
  out << line << "\n";
}

}  // namespace

void print_help(std::ostream& out, const std::string& usage, const po::options_description& desc) {
  constexpr std::size_t kWidth = 100, kColumn = 30;
  wrap_into(out, "usage: ", usage, 4, kWidth);
  // "pkarta profile ..." -> "profile options:"
  std::istringstream usage_words(usage);
  std::string program, command;
  usage_words >> program >> command;
  out << "\n" << command << " options:\n";
  for (const auto& o : desc.options()) {
    const std::string names = o->long_name();
    std::string shown = "  ";
    const std::string short_name = o->canonical_display_name(po::command_line_style::allow_dash_for_short);
    if (short_name.size() == 2 && short_name[0] == '-') shown += short_name + ", ";
    shown += "--" + names;
    const bool takes_value = o->semantic()->max_tokens() > 0;
    if (takes_value) shown += " " + placeholder(names, o->description()) + (o->semantic()->max_tokens() > 1 ? "..." : "");
    std::string text = o->description();
    // Boost writes a default as "arg (=25)".
    const std::string format = o->format_parameter();
    const std::size_t eq = format.find("(=");
    if (takes_value && eq != std::string::npos && format.back() == ')') {
      text += " (default " + format.substr(eq + 2, format.size() - eq - 3) + ")";
    }
    if (shown.size() + 2 > kColumn) {
      out << shown << "\n";
      wrap_into(out, std::string(kColumn - 1, ' '), text, kColumn - 1, kWidth);
    } else {
      wrap_into(out, shown + std::string(kColumn - 1 - shown.size(), ' '), text, kColumn - 1, kWidth);
    }
  }
}

void print_examples(std::ostream& out, const std::vector<std::string>& examples) {
  out << "\nExamples:\n";
  for (const std::string& e : examples) wrap_into(out, "  ", e, 6, 100, " \\");
}

std::string shipped_compounds_dir() {
  std::error_code ec;
  const std::filesystem::path exe = std::filesystem::read_symlink("/proc/self/exe", ec);
  if (ec) return "";
  const std::filesystem::path bin = exe.parent_path();
  for (const auto& candidate : {bin / ".." / "share" / "pkarta" / "compounds", bin / ".." / "compounds"}) {
    if (std::filesystem::is_regular_file(candidate / "demo-base.xml", ec)) {
      return candidate.lexically_normal().string();
    }
  }
  return "";
}

}  // namespace pkarta::cli
