// Placeholder until the recipe analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_recipe(const Args&) {
  error("the 'recipe' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
