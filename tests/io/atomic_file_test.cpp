// Atomic writes: whole content or nothing, inputs never overwritten, clear errors.
#include "pkarta/io/atomic_file.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <system_error>

#include "pkarta/base/error.h"

namespace {

namespace fs = std::filesystem;

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

std::string fresh_dir(const std::string& name) {
  const std::string dir = testing::TempDir() + "/atomic-" + name;
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

TEST(AtomicFile, WritesAndReplacesWithoutLeavingTemporaries) {
  const std::string dir = fresh_dir("replace");
  const std::string path = dir + "/out.html";
  pkarta::write_file_atomically(path, "first");
  EXPECT_EQ(slurp(path), "first");
  pkarta::write_file_atomically(path, std::string(100000, 'x'), {}, /*durable=*/true);
  EXPECT_EQ(slurp(path), std::string(100000, 'x'));
  int files = 0;
  for (const auto& e : fs::directory_iterator(dir)) {
    ++files;
    EXPECT_EQ(e.path().filename(), "out.html");
  }
  EXPECT_EQ(files, 1);
}

TEST(AtomicFile, RefusesToOverwriteAnInput) {
  const std::string dir = fresh_dir("input");
  const std::string input = dir + "/compound.xml";
  std::ofstream(input) << "<compound/>";
  // The same file named another way (relative, with ./ and ..) is still the input.
  const std::string other_name = dir + "/./../atomic-input/compound.xml";
  try {
    pkarta::write_file_atomically(other_name, "report", {input});
    FAIL() << "expected InputError";
  } catch (const pkarta::InputError& e) {
    EXPECT_NE(e.message().find("refusing to overwrite the input file"), std::string::npos) << e.what();
  }
  EXPECT_EQ(slurp(input), "<compound/>");
  pkarta::write_file_atomically(dir + "/report.html", "ok", {input});  // other paths are fine
  EXPECT_EQ(slurp(dir + "/report.html"), "ok");
}

TEST(AtomicFile, MissingFolderIsASystemErrorNamingThePath) {
  const std::string path = testing::TempDir() + "/atomic-no-such-dir/x/out.html";
  try {
    pkarta::write_file_atomically(path, "x");
    FAIL() << "expected std::system_error";
  } catch (const std::system_error& e) {
    EXPECT_EQ(std::string(e.what()), "cannot write " + path + ": No such file or directory");
    EXPECT_EQ(e.code().value(), ENOENT);
  }
}

TEST(AtomicFile, TargetThatIsAFolderFailsAndLeavesNoTemporary) {
  const std::string dir = fresh_dir("folder");
  const std::string path = dir + "/out.html";
  fs::create_directories(path + "/inside");
  try {
    pkarta::write_file_atomically(path, "new");
    FAIL() << "expected std::system_error";
  } catch (const std::system_error& e) {
    EXPECT_EQ(std::string(e.what()).rfind("cannot write " + path + ": ", 0), 0u) << e.what();
  }
  int entries = 0;
  for (const auto& e : fs::directory_iterator(dir)) {
    ++entries;
    EXPECT_EQ(e.path().filename(), "out.html");
  }
  EXPECT_EQ(entries, 1);
}

}  // namespace
