#include "pkarta/io/atomic_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <system_error>

#include "pkarta/base/error.h"
#include "pkarta/io/text_file.h"

namespace pkarta {

namespace fs = std::filesystem;

void refuse_to_overwrite_inputs(const std::string& path, const std::vector<std::string>& inputs) {
  // Only a regular file is replaced: renaming over a device, FIFO or folder would destroy it
  // (as root, `-o /dev/full` once replaced the device node with a file).
  const std::string kind = non_regular_kind(path);
  if (!kind.empty()) {
    throw InputError(SourceLocation{path, 0, 0},
                     "the output path is " + kind + ", not a regular file; choose a file name");
  }
  // The folder must exist and be writable: say so before any work is done.
  const fs::path target(path);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  std::error_code ec;
  if (!fs::is_directory(dir, ec)) {
    throw InputError(SourceLocation{path, 0, 0}, "cannot write: the folder " + dir.string() + " does not exist");
  }
  if (::access(dir.c_str(), W_OK) != 0) {
    throw InputError(SourceLocation{path, 0, 0},
                     "cannot write in the folder " + dir.string() + ": " + std::strerror(errno));
  }
  if (!fs::exists(path, ec)) return;
  for (const std::string& in : inputs) {
    std::error_code e2;
    if (fs::equivalent(path, in, e2) && !e2) {
      throw InputError(SourceLocation{path, 0, 0},
                       "refusing to overwrite the input file " + in + "; choose another output path");
    }
  }
}

void write_file_atomically(const std::string& path, std::string_view content,
                           const std::vector<std::string>& inputs_to_protect, bool durable) {
  refuse_to_overwrite_inputs(path, inputs_to_protect);
  // A link is followed: the file it points to gets the new content, the link stays.
  std::string resolved = path;
  std::error_code link_ec;
  if (fs::is_symlink(path, link_ec)) {
    const fs::path real = fs::canonical(path, link_ec);
    if (!link_ec) resolved = real.string();
  }
  // An existing file keeps its permissions and owner.
  struct stat old_stat {};
  const bool had_file = ::stat(resolved.c_str(), &old_stat) == 0;
  const fs::path target(resolved);
  const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
  const std::string base = target.filename().string();
  auto fail = [&](int err) {
    throw std::system_error(err, std::generic_category(), "cannot write " + path);
  };
  // A fresh name in the same folder (O_EXCL: never reuse another writer's file).
  std::string tmp;
  int fd = -1;
  for (int attempt = 0; attempt < 1000 && fd < 0; ++attempt) {
    tmp = (dir / ("." + base + "." + std::to_string(::getpid()) + "-" + std::to_string(attempt) + ".tmp")).string();
    fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
    if (fd < 0 && errno != EEXIST) fail(errno);
  }
  if (fd < 0) fail(EEXIST);
  const char* p = content.data();
  std::size_t left = content.size();
  while (left > 0) {
    const ssize_t n = ::write(fd, p, left);
    if (n < 0) {
      if (errno == EINTR) continue;
      const int err = errno;
      ::close(fd);
      ::unlink(tmp.c_str());
      fail(err);
    }
    p += n;
    left -= static_cast<std::size_t>(n);
  }
  if (had_file) {
    // Best effort: a user who may not chown keeps the file under their own name.
    (void)::fchmod(fd, old_stat.st_mode & 07777);
    if (::fchown(fd, old_stat.st_uid, old_stat.st_gid) != 0) (void)::fchmod(fd, old_stat.st_mode & 0777);
  }
  if (durable && ::fsync(fd) != 0 && errno != EINVAL && errno != EROFS) {
    const int err = errno;
    ::close(fd);
    ::unlink(tmp.c_str());
    fail(err);
  }
  if (::close(fd) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    fail(err);
  }
  if (::rename(tmp.c_str(), resolved.c_str()) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    fail(err);
  }
}

}  // namespace pkarta
