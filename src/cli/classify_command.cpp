// Placeholder until the classify analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_classify(const Args&) {
  error("the 'classify' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
