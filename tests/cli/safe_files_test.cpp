// Output files under failure: a full disk, a read-only folder, standard output on a full
// device. Nothing half-written may be left behind and every failure must be reported.
#include <gtest/gtest.h>
#include <pwd.h>
#include <signal.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <system_error>

#include "pkarta/base/error.h"
#include "pkarta/io/atomic_file.h"

namespace pkarta {
namespace {

namespace fs = std::filesystem;

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

fs::path fresh_dir() {
  char tmpl[] = "/tmp/pkarta-safe-XXXXXX";
  const char* d = mkdtemp(tmpl);
  EXPECT_NE(d, nullptr);
  return fs::path(d ? d : "/tmp");
}

int files_in(const fs::path& dir) {
  int n = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir)) ++n;
  return n;
}

// Outcomes of a write attempted in a child process.
enum ChildResult : int {
  kWrote = 10,
  kSystemErrorNamingPath = 11,  // a write failed part-way (disk full): std::system_error
  kOtherSystemError = 12,
  kOtherError = 13,
  kBadPathNamingIt = 14         // the path cannot be written at all: InputError, before any work
};

/// Runs write_file_atomically(path, content) in a child process after `prepare` (which may
/// lower limits or drop privileges) and returns how it ended.
template <typename Prepare>
int write_in_child(const std::string& path, const std::string& content, Prepare prepare) {
  const pid_t pid = fork();
  if (pid == 0) {
    prepare();
    int code = kWrote;
    try {
      write_file_atomically(path, content);
    } catch (const pkarta::InputError& e) {
      code = std::string(e.what()).rfind(path + ": cannot write", 0) == 0 ? kBadPathNamingIt : kOtherError;
    } catch (const std::system_error& e) {
      code = std::string(e.what()).find("cannot write " + path) != std::string::npos ? kSystemErrorNamingPath
                                                                                     : kOtherSystemError;
    } catch (...) {
      code = kOtherError;
    }
    _exit(code);
  }
  int status = 0;
  waitpid(pid, &status, 0);
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

TEST(SafeFiles, AFullDiskLeavesTheOldFileWholeAndNoTemporary) {
  // A file-size limit makes write() fail with EFBIG part-way, as a full disk fails with ENOSPC.
  const fs::path dir = fresh_dir();
  const std::string path = (dir / "report.html").string();
  std::ofstream(path) << "old report";
  const std::string big(1 << 20, 'x');
  const int r = write_in_child(path, big, [] {
    signal(SIGXFSZ, SIG_IGN);
    struct rlimit lim = {4096, 4096};
    setrlimit(RLIMIT_FSIZE, &lim);
  });
  EXPECT_EQ(r, kSystemErrorNamingPath);
  EXPECT_EQ(slurp(path), "old report");
  EXPECT_EQ(files_in(dir), 1) << "a temporary file was left behind";
  fs::remove_all(dir);
}

TEST(SafeFiles, AReadOnlyFolderIsAnErrorNamingThePath) {
  // Permissions do not bind root, so the child writes as an unprivileged user when run as root.
  const fs::path dir = fresh_dir();
  fs::permissions(dir, fs::perms::owner_all | fs::perms::group_read | fs::perms::group_exec |
                           fs::perms::others_read | fs::perms::others_exec);
  const fs::path ro = dir / "read-only";
  fs::create_directory(ro);
  const std::string path = (ro / "report.html").string();
  uid_t uid = 65534;
  gid_t gid = 65534;
  if (const passwd* pw = getpwnam("nobody")) {
    uid = pw->pw_uid;
    gid = pw->pw_gid;
  }
  if (geteuid() == 0) ASSERT_EQ(chown(ro.c_str(), 0, 0), 0);
  fs::permissions(ro, fs::perms::owner_read | fs::perms::owner_exec | fs::perms::group_read |
                          fs::perms::group_exec | fs::perms::others_read | fs::perms::others_exec);
  const int r = write_in_child(path, "new report", [&] {
    if (geteuid() == 0 && (setgid(gid) != 0 || setuid(uid) != 0)) _exit(kOtherError);
  });
  EXPECT_EQ(r, kBadPathNamingIt);
  EXPECT_EQ(files_in(ro), 0);
  fs::permissions(ro, fs::perms::owner_all);
  fs::remove_all(dir);
}

struct RunResult {
  int code = -1;
  std::string err;
};

RunResult run_to_dev_full(const std::string& args) {
  const fs::path dir = fresh_dir();
  const std::string err = (dir / "err.txt").string();
  const std::string cmd = std::string("cd ") + PKARTA_SOURCE_DIR + " && " + PKARTA_BINARY + " " + args +
                          " >/dev/full 2>" + err;
  const int status = std::system(cmd.c_str());
  RunResult r;
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.err = slurp(err);
  fs::remove_all(dir);
  return r;
}

TEST(SafeFiles, StandardOutputOnAFullDeviceIsAFailureWithAMessage) {
  for (const char* args : {"--version", "mix --add NaCl=10mM --format json", "library list",
                           "mix --add KH2PO4=25mM --add Na2HPO4=25mM --format csv"}) {
    const RunResult r = run_to_dev_full(args);
    EXPECT_EQ(r.code, 1) << args << "\n" << r.err;
    EXPECT_NE(r.err.find("cannot write the output to standard output"), std::string::npos) << args << "\n" << r.err;
  }
}

}  // namespace
}  // namespace pkarta
