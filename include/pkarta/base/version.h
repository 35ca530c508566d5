// The library's version.
#ifndef PKARTA_BASE_VERSION_H_
#define PKARTA_BASE_VERSION_H_

#include <string>

namespace pkarta {

/// The library's version, "MAJOR.MINOR.PATCH" (the project version in CMakeLists.txt).
std::string version();

}  // namespace pkarta

#endif  // PKARTA_BASE_VERSION_H_
