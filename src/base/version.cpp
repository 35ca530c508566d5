#include "pkarta/base/version.h"

namespace pkarta {

std::string version() { return PKARTA_VERSION; }

}  // namespace pkarta
