#include "pkarta/io/text_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include "pkarta/base/error.h"

namespace pkarta {

namespace {
std::string kind_of(mode_t mode) {
  if (S_ISREG(mode)) return "";
  if (S_ISDIR(mode)) return "a folder";
  if (S_ISFIFO(mode)) return "a FIFO (named pipe)";
  if (S_ISCHR(mode)) return "a character device";
  if (S_ISBLK(mode)) return "a block device";
  if (S_ISSOCK(mode)) return "a socket";
  return "not a regular file";
}

std::string size_text(std::size_t bytes) { return std::to_string(bytes >> 20) + " MiB"; }
}  // namespace

std::string non_regular_kind(const std::string& path) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return "";
  return kind_of(st.st_mode);
}

std::string read_text_file(const std::string& path) {
  const SourceLocation at{path, 0, 0};
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) {
    throw InputError(at, std::string("cannot read file: ") + std::strerror(errno));
  }
  if (!S_ISREG(st.st_mode)) {
    throw InputError(at, "cannot read file: it is " + kind_of(st.st_mode) + ", not a regular file");
  }
  if (static_cast<std::size_t>(st.st_size) > kMaxInputFileBytes) {
    throw InputError(at, "file too large: " + size_text(static_cast<std::size_t>(st.st_size)) +
                             ", inputs are limited to " + size_text(kMaxInputFileBytes));
  }
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC | O_NONBLOCK);
  if (fd < 0) throw InputError(at, std::string("cannot read file: ") + std::strerror(errno));
  std::string text;
  text.reserve(static_cast<std::size_t>(st.st_size));
  char buffer[1 << 16];
  for (;;) {
    const ssize_t n = ::read(fd, buffer, sizeof buffer);
    if (n < 0) {
      if (errno == EINTR) continue;
      const int err = errno;
      ::close(fd);
      throw InputError(at, std::string("error while reading file: ") + std::strerror(err));
    }
    if (n == 0) break;
    text.append(buffer, static_cast<std::size_t>(n));
    // A file that grows while it is read is held to the same limit.
    if (text.size() > kMaxInputFileBytes) {
      ::close(fd);
      throw InputError(at, "file too large: inputs are limited to " + size_text(kMaxInputFileBytes));
    }
  }
  ::close(fd);
  return text;
}

std::size_t invalid_utf8_offset(std::string_view text) {
  const auto* b = reinterpret_cast<const unsigned char*>(text.data());
  const std::size_t n = text.size();
  std::size_t i = 0;
  while (i < n) {
    const unsigned char c = b[i];
    if (c < 0x80) {
      ++i;
      continue;
    }
    std::size_t len = 0;
    unsigned char lo = 0x80, hi = 0xBF;  // range of the second byte
    if (c >= 0xC2 && c <= 0xDF) {
      len = 2;
    } else if (c >= 0xE0 && c <= 0xEF) {
      len = 3;
      if (c == 0xE0) lo = 0xA0;  // no overlong form
      if (c == 0xED) hi = 0x9F;  // no surrogate
    } else if (c >= 0xF0 && c <= 0xF4) {
      len = 4;
      if (c == 0xF0) lo = 0x90;  // no overlong form
      if (c == 0xF4) hi = 0x8F;  // nothing above U+10FFFF
    } else {
      return i;
    }
    if (i + len > n || b[i + 1] < lo || b[i + 1] > hi) return i;
    for (std::size_t k = 2; k < len; ++k) {
      if (b[i + k] < 0x80 || b[i + k] > 0xBF) return i;
    }
    i += len;
  }
  return std::string_view::npos;
}

}  // namespace pkarta
