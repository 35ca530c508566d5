// Placeholder until the report analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_report(const Args&) {
  error("the 'report' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
