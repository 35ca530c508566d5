// Placeholder until the dilute analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_dilute(const Args&) {
  error("the 'dilute' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
