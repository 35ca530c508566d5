// Shared pieces of the command-line layer: exit codes, common options, error reporting.
#ifndef PKARTA_CLI_COMMON_H_
#define PKARTA_CLI_COMMON_H_

#include <boost/program_options.hpp>

#include <functional>
#include <iosfwd>
#include <sstream>
#include <string>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/model.h"
#include "pkarta/chem/units.h"

namespace pkarta::cli {

namespace po = boost::program_options;

/// Exit codes (docs/commands.md, "Exit codes").
enum ExitCode : int {
  kExitOk = 0,       ///< success; a result such as "not achievable" is still a success
  kExitRefused = 1,  ///< computed but not usable (e.g. no convergence)
  kExitBadInput = 2  ///< bad usage or bad file
};

/// Options every command takes.
struct CommonOptions {
  std::string format = "text";
  std::vector<std::string> library_files;
  bool help = false;
  std::string output;  ///< -o of the one-stream commands; empty or "-": standard output
};

void add_common_options(po::options_description& desc, CommonOptions& common);
/// -o FILE for a command whose result is one stream (mix, profile, screen): "-" means
/// standard output, as when -o is not given.
void add_output_option(po::options_description& desc, CommonOptions& common);

/// Sends what a command prints on standard output to common.output instead (when it names a
/// file, not "-"): the path is checked at once (before any work), the text is collected and
/// written atomically by done(0); a refusal, an error or an exit code other than 0 writes
/// nothing, so no half result is left.
class OutputTarget {
 public:
  /// With `text` the file gets the text as standard output would (kept within 100 columns).
  OutputTarget(const std::string& path, std::vector<std::string> inputs, bool text = false);
  ~OutputTarget();
  OutputTarget(const OutputTarget&) = delete;
  OutputTarget& operator=(const OutputTarget&) = delete;
  /// Restores standard output and, when `code` is 0, writes the file; returns `code`.
  int done(int code);

 private:
  std::string path_;
  std::vector<std::string> inputs_;
  std::ostringstream buffer_;
  std::streambuf* saved_ = nullptr;
  bool text_ = false;
};

/// Parses args (without the command word); throws po::error on bad usage.
po::variables_map parse(const std::vector<std::string>& args, const po::options_description& desc,
                        const po::positional_options_description* positional = nullptr);

/// The built-in library plus every --library file (later files override).
Library load_libraries(const CommonOptions& common);

/// Checks --format; throws InputError naming the option.
void check_format(const std::string& format, bool allow_csv = true);

/// Amount from an option value; errors name the option.
Amount option_amount(const std::string& option, const std::string& text);
/// Number in [lo, hi] from an option value; errors name the option.
double option_number(const std::string& option, const std::string& text, double lo, double hi);

/// The activity model options of every command that solves equilibria: --activity NAME and
/// --ideal (kept; the same as --activity ideal).
struct ActivityOptions {
  std::string activity;  ///< "" = the default model
  bool ideal = false;
};
void add_activity_options(po::options_description& desc, ActivityOptions& a);
/// The model the options name; InputError naming --activity for an unknown name or for
/// --ideal together with another model.
ActivityModel activity_model_of(const ActivityOptions& a);
/// The options as arguments (" --activity sit", " --ideal" or ""), for traceability.
std::string activity_arguments(const ActivityOptions& a);
/// Temperature option (°C, -10..100).
/// A whole number within [lo, hi] ("--threads 1.5" is refused, naming the option and `what`,
/// which may be empty).
long long option_count(const std::string& option, const std::string& text, double lo, double hi,
                       const std::string& what);

double option_temperature(const std::string& option, const std::string& text);

/// Refuses a medium id the library does not have (InputError naming `option`, with the
/// library's "did you mean" or its list of media).
void check_medium_option(const Library& library, const std::string& option, const std::string& id);

/// Splits "A=B" of --add; errors name the option.
std::pair<std::string, std::string> split_assignment(const std::string& option, const std::string& text);

/// An option given under its other name (an alias, e.g. --ph for --target-ph): `value` takes the
/// alias's value when only the alias was given; both at once are refused (InputError naming them).
void take_alias(const po::variables_map& vm, const std::string& name, const std::string& alias,
                const std::string& alias_value, std::string& value);

/// Loads a compound file against a library, printing located warnings to stderr.
Compound load_compound(const std::string& path, const Library& library);

/// Refuses (InputError naming `option`) a dose above kMaxConc_mol_per_L (10 mol/L), or one
/// whose most charged species would carry more than 10 mol/L of charge (|z| times the dose).
void check_dose(const std::string& option, const Compound& compound, const std::string& text, double conc_mol_per_L);

/// What `mix` and `dilute` share: the formulation options.
struct FormulationOptions {
  std::string compound_file;
  std::string dose;
  std::string form = "free";
  std::string dose_as = "weighed";  ///< --dose-as: weighed | free (see DoseBasis)
  std::vector<std::string> adds;
  std::string medium;
  std::string temperature = "25";
  ActivityOptions activity;
};
/// `temperature_list`: --temp takes a list of temperatures to compare (mix), else one value.
void add_formulation_options(po::options_description& desc, FormulationOptions& f,
                             bool temperature_list = false);
/// Reads --dose-as: "weighed" (the amount is of the form weighed) or "free" (its free-form
/// equivalent); anything else is an InputError naming the option.
DoseBasis option_dose_basis(const std::string& text);
/// " (as free form)" when the dose is stated as the free-form equivalent of a salt, else "".
std::string dose_basis_note(DoseBasis basis, const std::string& form);
/// Builds the mixture; `inputs` receives a readable list of the contents.
Mixture build_formulation(const FormulationOptions& f, const Library& library,
                          std::vector<std::string>* inputs, Compound* compound_out = nullptr);

/// Runs a command body, mapping exceptions to messages on stderr and exit codes.
int guarded(const std::function<int()>& body);

/// Prints "pkarta: message" on stderr.
void error(const std::string& message);

/// Usage line and option help.
/// The demo compounds shipped with pkarta, found from the binary's own location: an installed
/// copy's PREFIX/share/pkarta/compounds, or the source tree's compounds/ beside build/.
/// Empty when neither exists. No build path is compiled into the binary.
std::string shipped_compounds_dir();

/// Usage line (wrapped) and one line per option: `  -o, --out-dir DIR   text (default X)`, the
/// placeholder named after what the option takes (FILE, AMOUNT, CELSIUS...).
void print_help(std::ostream& out, const std::string& usage, const po::options_description& desc);

/// "Examples:" and the command lines given (two per command), printed last in --help.
void print_examples(std::ostream& out, const std::vector<std::string>& examples);

}  // namespace pkarta::cli

#endif  // PKARTA_CLI_COMMON_H_
