// Placeholder until the screen analysis lands.
#include "cli_common.h"
#include "commands.h"

namespace pkarta::cli {

int run_screen(const Args&) {
  error("the 'screen' command is not available in this build");
  return kExitRefused;
}

}  // namespace pkarta::cli
