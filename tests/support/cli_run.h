// Running the built pkarta binary from a test: exit code, stdout and stderr.
#ifndef PKARTA_TESTS_CLI_RUN_H_
#define PKARTA_TESTS_CLI_RUN_H_

#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

namespace pkarta_test {

struct RunResult {
  int code = -1;
  std::string out;
  std::string err;
};

inline std::string slurp(const std::string& path) {
  std::ifstream in(path);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

/// A fresh folder for this test process (tests run in parallel).
inline std::string temp_dir() {
  static const std::string dir = [] {
    char tmpl[] = "/tmp/pkarta-test-XXXXXX";
    const char* made = mkdtemp(tmpl);
    return std::string(made ? made : "/tmp");
  }();
  return dir;
}

/// Runs `pkarta ARGS` (a shell word list) from the source folder.
inline RunResult run(const std::string& args) {
  const std::string out = temp_dir() + "/out.txt", err = temp_dir() + "/err.txt";
  const std::string cmd = std::string("cd ") + PKARTA_SOURCE_DIR + " && " + PKARTA_BINARY + " " + args +
                          " >" + out + " 2>" + err;
  const int status = std::system(cmd.c_str());
  RunResult r;
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.out = slurp(out);
  r.err = slurp(err);
  return r;
}

/// Writes a file into the test folder and returns its path.
inline std::string write_file(const std::string& name, const std::string& text) {
  const std::string path = temp_dir() + "/" + name;
  std::ofstream(path) << text;
  return path;
}

}  // namespace pkarta_test

#endif  // PKARTA_TESTS_CLI_RUN_H_
