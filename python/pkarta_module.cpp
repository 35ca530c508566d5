// Python module `pkarta`: each analysis as a function taking keyword arguments named after the
// command's options (`dose="2mg/mL"`, `target_ph=5`, `add={"KH2PO4": "25mM"}`, `temp=[5, 25]`)
// and returning the command's JSON as plain dicts and lists (the same keys), so that
// pandas.DataFrame(pkarta.profile(...)["points"]) works. The function runs exactly what the
// command line runs, so a result here and `pkarta COMMAND ... --format json` agree to the bit.
#include <pybind11/pybind11.h>

#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "cli_common.h"
#include "commands.h"
#include "pkarta/base/version.h"

namespace py = pybind11;

namespace {

using Runner = int (*)(const pkarta::cli::Args&);

std::string option_name(const std::string& key) {
  std::string name = key;
  for (char& c : name) {
    if (c == '_') c = '-';
  }
  return "--" + name;
}

std::string text_of(const py::handle& value) {
  if (py::isinstance<py::bool_>(value)) return value.cast<bool>() ? "true" : "false";
  if (py::isinstance<py::float_>(value)) {
    std::ostringstream s;
    s.precision(17);
    s << value.cast<double>();
    return s.str();
  }
  return py::str(value).cast<std::string>();
}

// Keyword arguments -> command-line words. A dict gives one `--key NAME=VALUE` per entry
// (`add`), a list or tuple one comma-separated value (`temp=[5, 25, 37]`), True a bare flag,
// False or None nothing.
pkarta::cli::Args arguments(const py::kwargs& kwargs, std::vector<std::string> positional) {
  pkarta::cli::Args args(std::move(positional));
  for (const auto& item : kwargs) {
    const std::string key = py::str(item.first).cast<std::string>();
    const py::handle value = item.second;
    if (key == "format") throw py::value_error("format: the Python functions always return the JSON result");
    const std::string option = option_name(key);
    if (value.is_none()) continue;
    if (py::isinstance<py::bool_>(value)) {
      if (value.cast<bool>()) args.push_back(option);
      continue;
    }
    if (py::isinstance<py::dict>(value)) {
      for (const auto& entry : value.cast<py::dict>()) {
        args.push_back(option);
        args.push_back(text_of(entry.first) + "=" + text_of(entry.second));
      }
      continue;
    }
    if (key == "library" && (py::isinstance<py::list>(value) || py::isinstance<py::tuple>(value))) {
      for (const auto& file : value) {
        args.push_back(option);
        args.push_back(text_of(file));
      }
      continue;
    }
    if (py::isinstance<py::list>(value) || py::isinstance<py::tuple>(value)) {
      std::string joined;
      for (const auto& v : value) joined += (joined.empty() ? "" : ",") + text_of(v);
      args.push_back(option);
      args.push_back(joined);
      continue;
    }
    args.push_back(option);
    args.push_back(text_of(value));
  }
  args.push_back("--format");
  args.push_back("json");
  return args;
}

// Runs a command with standard output and error captured.
py::object run(Runner runner, const pkarta::cli::Args& args) {
  std::ostringstream out;
  std::ostringstream err;
  std::streambuf* old_out = std::cout.rdbuf(out.rdbuf());
  std::streambuf* old_err = std::cerr.rdbuf(err.rdbuf());
  int code = 0;
  try {
    code = runner(args);
  } catch (...) {
    std::cout.rdbuf(old_out);
    std::cerr.rdbuf(old_err);
    throw;
  }
  std::cout.rdbuf(old_out);
  std::cerr.rdbuf(old_err);
  std::string message = err.str();
  const std::string prefix = "pkarta: ";
  if (message.compare(0, prefix.size(), prefix) == 0) message.erase(0, prefix.size());
  while (!message.empty() && message.back() == '\n') message.pop_back();
  // Bad input: ValueError with the command's own message (the option or file:line:column).
  if (code == pkarta::cli::kExitBadInput) throw py::value_error(message);
  if (out.str().empty()) throw std::runtime_error(message.empty() ? "no result" : message);
  return py::module_::import("json").attr("loads")(out.str());
}

void define(py::module_& m, const char* name, Runner runner, const char* doc,
            std::vector<std::string> positional = {}) {
  m.def(
      name,
      [runner, positional](const py::kwargs& kwargs) { return run(runner, arguments(kwargs, positional)); },
      doc);
}

}  // namespace

PYBIND11_MODULE(pkarta, m) {
  m.doc() =
      "pkarta: acid-base equilibria, pH-solubility and buffer design for formulation science.\n"
      "Each function takes the options of the command of the same name as keyword arguments\n"
      "(dashes as underscores) and returns its JSON result as dicts and lists. Predictions are\n"
      "estimates to be confirmed by measurement.";
  m.attr("__version__") = pkarta::version();
  m.def("version", &pkarta::version, "pkarta's version");
  define(m, "mix", pkarta::cli::run_mix,
         "Closed-system equilibrium: mix(add={'KH2PO4': '25mM', 'Na2HPO4': '25mM'}, temp=25)");
  define(m, "profile", pkarta::cli::run_profile,
         "pH-solubility profile: profile(compound='file.xml', medium='saline-0.9', temp=37)");
  define(m, "classify", pkarta::cli::run_classify,
         "ICH M9 solubility class: classify(compound='file.xml', dose_mg=50)");
  define(m, "screen", pkarta::cli::run_screen,
         "Buffer screen: screen(compound='file.xml', dose='0.5mg/mL', form='hydrochloride', target_ph=5)");
  define(m, "recipe", pkarta::cli::run_recipe,
         "Bench recipe: recipe(buffer='phosphate', ph=7.0, conc='50mM', volume='500mL')");
  define(m, "fit", pkarta::cli::run_fit, "Fit pKa and S0: fit(compound='file.xml', data='points.csv')");
  define(m, "dilute", pkarta::cli::run_dilute,
         "Dilution: dilute(compound='file.xml', dose='2mg/mL', form='hydrochloride', into='saline-0.9')");
}
