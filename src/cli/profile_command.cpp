// Placeholder until the profile analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_profile(const Args&) {
  error("the 'profile' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
