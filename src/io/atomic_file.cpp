#include "pkarta/io/atomic_file.h"

#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
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

namespace {
// The one "keep metadata" step of both writers: a file that replaces an existing one keeps its
// mode and owner. Best effort: a user who may not chown keeps the file under their own name,
// without set-id bits.
void keep_metadata(int fd, const struct stat& old_stat) {
  (void)::fchmod(fd, old_stat.st_mode & 07777);
  if (::fchown(fd, old_stat.st_uid, old_stat.st_gid) != 0) (void)::fchmod(fd, old_stat.st_mode & 0777);
}
}  // namespace

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
  if (had_file) keep_metadata(fd, old_stat);
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

namespace {

// Writes a whole file (no temporary: used inside a temporary folder); with `keep`, it takes
// that file's mode and owner (keep_metadata).
void write_plain(const fs::path& path, std::string_view content, const struct stat* keep = nullptr) {
  const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
  if (fd < 0) throw std::system_error(errno, std::generic_category(), "cannot write " + path.string());
  const char* p = content.data();
  std::size_t left = content.size();
  while (left > 0) {
    const ssize_t n = ::write(fd, p, left);
    if (n < 0 && errno == EINTR) continue;
    if (n < 0) {
      const int err = errno;
      ::close(fd);
      throw std::system_error(err, std::generic_category(), "cannot write " + path.string());
    }
    p += n;
    left -= static_cast<std::size_t>(n);
  }
  if (keep) keep_metadata(fd, *keep);
  if (::close(fd) != 0) throw std::system_error(errno, std::generic_category(), "cannot write " + path.string());
}

// The names a set's manifest lists (empty when there is none).
std::set<std::string> manifest_names(const fs::path& folder) {
  std::set<std::string> names;
  std::ifstream in(folder / kSetManifest);
  std::string line;
  while (std::getline(in, line)) {
    if (!line.empty()) names.insert(line);
  }
  return names;
}

// Holds an exclusive lock on a folder while it lives (flock on the folder itself).
class FolderLock {
 public:
  explicit FolderLock(const fs::path& dir) : fd_(::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC)) {
    if (fd_ >= 0) {
      while (::flock(fd_, LOCK_EX) != 0 && errno == EINTR) {
      }
    }
  }
  ~FolderLock() {
    if (fd_ >= 0) ::close(fd_);
  }
  FolderLock(const FolderLock&) = delete;
  FolderLock& operator=(const FolderLock&) = delete;

 private:
  int fd_;
};

}  // namespace

void write_file_set(const std::string& main_path, std::string_view main_content, const std::string& folder_path,
                    const std::vector<SetFile>& files, const std::vector<std::string>& inputs_to_protect) {
  refuse_to_overwrite_inputs(main_path, inputs_to_protect);
  const fs::path folder(folder_path);
  const std::string folder_name = folder.filename().string();
  if (folder_name.empty() || folder_name == "." || folder_name == "..") {
    throw InputError(SourceLocation{main_path, 0, 0},
                     "the tables would go into the folder '" + folder_path + "'; choose an output name such as report.html");
  }
  const fs::path dir = folder.has_parent_path() ? folder.parent_path() : fs::path(".");
  const FolderLock lock(dir);
  std::error_code ec;
  const bool had_folder = fs::exists(folder, ec);
  if (had_folder) {
    if (!fs::is_directory(folder, ec)) {
      throw InputError(SourceLocation{folder_path, 0, 0},
                       "the tables' folder is " + non_regular_kind(folder_path) + " or a file; choose another output name");
    }
    const std::set<std::string> ours = manifest_names(folder);
    for (const fs::directory_entry& e : fs::directory_iterator(folder, ec)) {
      const std::string name = e.path().filename().string();
      if (name != kSetManifest && ours.count(name) == 0) {
        throw InputError(SourceLocation{folder_path, 0, 0},
                         "the folder holds files pkarta did not write (" + name +
                             "); choose another output name or move them");
      }
    }
  }
  // 1. The new folder, complete, under a temporary name.
  fs::path staged;
  for (int attempt = 0; attempt < 1000; ++attempt) {
    staged = dir / ("." + folder_name + "." + std::to_string(::getpid()) + "-" + std::to_string(attempt) + ".tmp");
    if (::mkdir(staged.c_str(), 0777) == 0) break;
    if (errno != EEXIST) throw std::system_error(errno, std::generic_category(), "cannot write " + folder_path);
    staged.clear();
  }
  if (staged.empty()) throw std::system_error(EEXIST, std::generic_category(), "cannot write " + folder_path);
  fs::path staged_main;
  try {
    std::ostringstream manifest;
    for (const SetFile& f : files) {
      write_plain(staged / f.name, f.content);
      manifest << f.name << "\n";
    }
    write_plain(staged / kSetManifest, manifest.str());
    // 2. The main file, under a temporary name too.
    staged_main = dir / ("." + fs::path(main_path).filename().string() + "." + std::to_string(::getpid()) + ".tmp");
    fs::remove(staged_main, ec);
    struct stat old_stat {};
    const bool had_main = ::stat(main_path.c_str(), &old_stat) == 0;
    write_plain(staged_main, main_content, had_main ? &old_stat : nullptr);
    // 3. Folder and main file into place, one right after the other.
    if (had_folder) {
      if (::renameat2(AT_FDCWD, staged.c_str(), AT_FDCWD, folder.c_str(), RENAME_EXCHANGE) != 0) {
        throw std::system_error(errno, std::generic_category(), "cannot write " + folder_path);
      }
    } else if (::rename(staged.c_str(), folder.c_str()) != 0) {
      throw std::system_error(errno, std::generic_category(), "cannot write " + folder_path);
    }
    if (::rename(staged_main.c_str(), main_path.c_str()) != 0) {
      throw std::system_error(errno, std::generic_category(), "cannot write " + main_path);
    }
  } catch (...) {
    fs::remove_all(staged, ec);
    if (!staged_main.empty()) fs::remove(staged_main, ec);
    throw;
  }
  // 4. The old tables (now under the temporary name) go.
  fs::remove_all(staged, ec);
}

}  // namespace pkarta
