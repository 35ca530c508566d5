#include "pkarta/io/text_file.h"

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <system_error>

#include "pkarta/base/error.h"

namespace pkarta {

std::string read_text_file(const std::string& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {
    throw InputError(SourceLocation{path, 0, 0}, "cannot read file: it is a folder");
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    throw InputError(SourceLocation{path, 0, 0},
                     std::string("cannot read file: ") + std::strerror(errno));
  }
  std::ostringstream ss;
  ss << in.rdbuf();
  if (in.bad()) throw InputError(SourceLocation{path, 0, 0}, "error while reading file");
  return ss.str();
}

}  // namespace pkarta
