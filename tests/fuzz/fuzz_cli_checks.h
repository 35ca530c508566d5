// Check of the command line under arbitrary argument vectors (fuzz_cli and its replay in
// fuzz_regressions_test). The bytes are split into words at NUL or newline; the first word
// picks a command. Whatever the words, the command returns exit code 0, 1 or 2 and never
// crashes, hangs or writes a file: options that write files or choose a workload (-o,
// --out-dir, --threads, --uncertainty, ...) are dropped, and every --compound value becomes
// one of the demo compounds.
#ifndef PKARTA_FUZZ_CLI_CHECKS_H_
#define PKARTA_FUZZ_CLI_CHECKS_H_

#include <functional>
#include <iostream>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include "commands.h"

namespace pkarta::fuzz {

inline std::vector<std::string> words_of(std::string_view bytes) {
  std::vector<std::string> words;
  std::string w;
  for (char c : bytes) {
    if (c == '\0' || c == '\n') {
      words.push_back(w);
      w.clear();
    } else {
      w += c;
    }
  }
  if (!w.empty()) words.push_back(w);
  return words;
}

/// "" when the command line behaved, else what went wrong.
inline std::string check_cli(std::string_view bytes, const std::string& compounds_dir) {
  std::vector<std::string> words = words_of(bytes);
  if (words.empty() || words.size() > 40) return "";
  using Run = int (*)(const pkarta::cli::Args&);
  const std::pair<const char*, Run> commands[] = {
      {"mix", pkarta::cli::run_mix},         {"profile", pkarta::cli::run_profile},
      {"classify", pkarta::cli::run_classify}, {"screen", pkarta::cli::run_screen},
      {"recipe", pkarta::cli::run_recipe},   {"dilute", pkarta::cli::run_dilute},
      {"check", pkarta::cli::run_check},     {"library", pkarta::cli::run_library},
  };
  Run run = nullptr;
  for (const auto& [name, r] : commands) {
    if (words[0] == name) run = r;
  }
  if (!run) return "";
  const char* demo[] = {"demo-base.xml", "demo-acid.xml", "demo-ampholyte.xml"};
  pkarta::cli::Args args;
  for (std::size_t i = 1; i < words.size(); ++i) {
    const std::string& w = words[i];
    const std::string name = w.substr(0, w.find('='));
    const bool short_with_o = w.size() > 1 && w[0] == '-' && w[1] != '-' && w.find('o') != std::string::npos;
    if (short_with_o || name == "--output" || name == "--out" || name == "--out-dir" || name == "--threads" ||
        name == "--uncertainty" || name == "--compounds" || name == "--library" || name == "--data") {
      if (w.find('=') == std::string::npos) ++i;  // drop the option and its value
      continue;
    }
    if (name == "--compound" || (words[0] == "check" && i == 1)) {
      const bool inline_value = w.find('=') != std::string::npos;
      if (name == "--compound") args.push_back("--compound");
      args.push_back(compounds_dir + "/" + demo[(i + w.size()) % 3]);
      if (name == "--compound" && !inline_value) ++i;
      continue;
    }
    args.push_back(w);
  }
  std::ostringstream out, err;
  std::streambuf* old_out = std::cout.rdbuf(out.rdbuf());
  std::streambuf* old_err = std::cerr.rdbuf(err.rdbuf());
  const int code = run(args);
  std::cout.rdbuf(old_out);
  std::cerr.rdbuf(old_err);
  if (code < 0 || code > 2) return "exit code " + std::to_string(code);
  // A message of pkarta's own, not the user's words echoed in one (words hold no newline).
  const std::string e = "\n" + err.str();
  if (e.find("\npkarta: internal error:") != std::string::npos) return "internal error: " + err.str();
  return "";
}

}  // namespace pkarta::fuzz

#endif  // PKARTA_FUZZ_CLI_CHECKS_H_
