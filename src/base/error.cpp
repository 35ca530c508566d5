#include "pkarta/base/error.h"

namespace pkarta {

std::string SourceLocation::str() const {
  std::string s = file;
  if (line > 0) {
    s += ":" + std::to_string(line);
    if (column > 0) s += ":" + std::to_string(column);
  }
  return s;
}

namespace {
std::string compose(const SourceLocation& where, const std::string& message) {
  const std::string place = where.str();
  return place.empty() ? message : place + ": " + message;
}
}  // namespace

InputError::InputError(SourceLocation where, const std::string& message)
    : std::runtime_error(compose(where, message)), where_(std::move(where)), message_(message) {}

}  // namespace pkarta
