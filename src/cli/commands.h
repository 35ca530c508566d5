// One function per command; each takes the arguments after the command word.
#ifndef PKARTA_CLI_COMMANDS_H_
#define PKARTA_CLI_COMMANDS_H_

#include <string>
#include <vector>

namespace pkarta::cli {

using Args = std::vector<std::string>;

int run_mix(const Args& args);
int run_check(const Args& args);
int run_library(const Args& args);
int run_demo(const Args& args);
int run_profile(const Args& args);
int run_classify(const Args& args);
int run_screen(const Args& args);
int run_recipe(const Args& args);
int run_fit(const Args& args);
int run_dilute(const Args& args);
int run_report(const Args& args);

}  // namespace pkarta::cli

#endif  // PKARTA_CLI_COMMANDS_H_
