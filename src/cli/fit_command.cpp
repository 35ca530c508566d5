// Placeholder until the fit analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_fit(const Args&) {
  error("the 'fit' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
