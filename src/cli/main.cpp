// pkarta: command-line entry point. Parses the command word and hands over.
#include <algorithm>
#include <cerrno>
#include <cstring>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "cli_common.h"
#include "commands.h"
#include "pkarta/base/format.h"
#include "pkarta/base/suggest.h"
#include "pkarta/base/version.h"

namespace {

struct Command {
  const char* name;
  int (*run)(const pkarta::cli::Args&);
  const char* summary;
};

const Command kCommands[] = {
    {"mix", pkarta::cli::run_mix, "closed-system equilibrium of reagents and a drug dose"},
    {"profile", pkarta::cli::run_profile, "pH-solubility profile with salt limits and pHmax"},
    {"classify", pkarta::cli::run_classify, "solubility classification over pH 1.2-6.8 at 37 °C (ICH M9)"},
    {"screen", pkarta::cli::run_screen, "buffer strength needed to hold a target pH at the dose"},
    {"recipe", pkarta::cli::run_recipe, "bench recipe for a buffer at a pH and strength"},
    {"fit", pkarta::cli::run_fit, "fit pKa and intrinsic solubility to measured solubilities"},
    {"dilute", pkarta::cli::run_dilute, "precipitation risk of a formulation diluted into a medium"},
    {"report", pkarta::cli::run_report, "self-contained HTML preformulation report with CSV tables"},
    {"check", pkarta::cli::run_check, "validate a compound or library file"},
    {"library", pkarta::cli::run_library, "list or show entries of the library"},
    {"demo", pkarta::cli::run_demo, "run the demonstration on the invented demo compounds"},
};

void usage(std::ostream& out) {
  out << "usage: pkarta COMMAND [OPTIONS]   (pkarta COMMAND --help for its options)\n\n"
         "pH, buffer and solubility calculations for formulation scientists.\n\ncommands:\n";
  for (const Command& c : kCommands) {
    out << "  " << c.name << std::string(10 - std::strlen(c.name), ' ') << c.summary << "\n";
  }
  out << "\nexit codes: 0 ok, 1 computed but not usable, 2 bad input\n"
         "\nExamples:\n"
         "  pkarta profile --compound compounds/demo-base.xml --medium saline-0.9 --temp 37\n"
         "  pkarta screen --compound compounds/demo-base.xml --dose 0.5mg/mL --form hydrochloride --target-ph 5\n";
}

// Output is checked once it is flushed: a full disk or a closed pipe must not pass for
// success (e.g. `pkarta mix ... > /dev/full`).
int finish(int code) {
  errno = 0;
  std::cout.flush();
  if (!std::cout) {
    const int e = errno;
    pkarta::cli::error(std::string("cannot write the output to standard output") +
                       (e ? std::string(": ") + std::strerror(e) : std::string()));
    return code == pkarta::cli::kExitOk ? static_cast<int>(pkarta::cli::kExitRefused) : code;
  }
  return code;
}

// Text output is kept within 100 columns (paragraphs wrapped; tables lay themselves out):
// the command writes into a buffer that is wrapped once it is done. CSV and JSON pass as they are.
bool text_output(const pkarta::cli::Args& args) {
  for (std::size_t i = 0; i < args.size(); ++i) {
    std::string value;
    if (args[i] == "--format" && i + 1 < args.size()) value = args[i + 1];
    else if (args[i].rfind("--format=", 0) == 0) value = args[i].substr(9);
    else continue;
    if (value == "csv" || value == "json") return false;
  }
  return true;
}

int run_command(const Command& c, const pkarta::cli::Args& args) {
  if (!text_output(args)) return c.run(args);
  std::ostringstream buffer;
  std::streambuf* const real = std::cout.rdbuf(buffer.rdbuf());
  int code = 0;
  try {
    code = c.run(args);
  } catch (...) {
    std::cout.rdbuf(real);
    throw;
  }
  std::cout.rdbuf(real);
  std::cout << pkarta::fit_text_width(buffer.str());
  return code;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    usage(std::cerr);
    return pkarta::cli::kExitBadInput;
  }
  const std::string cmd = argv[1];
  if (cmd == "--help" || cmd == "-h" || cmd == "help") {
    usage(std::cout);
    return finish(0);
  }
  const pkarta::cli::Args args(argv + 2, argv + argc);
  // `pkarta --version` and `pkarta COMMAND --version` alike.
  if (cmd == "--version" || std::find(args.begin(), args.end(), "--version") != args.end()) {
    std::cout << "pkarta " << pkarta::version() << "\n";
    return finish(0);
  }
  for (const Command& c : kCommands) {
    if (cmd == c.name) return finish(run_command(c, args));
  }
  std::vector<std::string> names;
  for (const Command& c : kCommands) names.emplace_back(c.name);
  pkarta::cli::error("unknown command '" + cmd + "'" + pkarta::did_you_mean(cmd, names) + " (see pkarta --help)");
  return pkarta::cli::kExitBadInput;
}
