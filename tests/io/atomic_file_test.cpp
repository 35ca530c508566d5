// Atomic writes: whole content or nothing, inputs never overwritten, clear errors.
#include "pkarta/io/atomic_file.h"

#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>
#include <vector>
#include <iterator>
#include <sys/sysmacros.h>
#include <sys/stat.h>

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

// A missing folder is bad input (the user's path), refused before anything is written.
TEST(AtomicFile, MissingFolderIsAnInputErrorNamingThePath) {
  const std::string path = testing::TempDir() + "/atomic-no-such-dir/x/out.html";
  try {
    pkarta::write_file_atomically(path, "x");
    FAIL() << "expected InputError";
  } catch (const pkarta::InputError& e) {
    EXPECT_EQ(std::string(e.what()), path + ": cannot write: the folder " + testing::TempDir() +
                                         "/atomic-no-such-dir/x does not exist");
  }
}

TEST(AtomicFile, TargetThatIsAFolderIsRefusedAndLeavesNoTemporary) {
  const std::string dir = fresh_dir("folder");
  const std::string path = dir + "/out.html";
  fs::create_directories(path + "/inside");
  try {
    pkarta::write_file_atomically(path, "new");
    FAIL() << "expected InputError";
  } catch (const pkarta::InputError& e) {
    EXPECT_NE(std::string(e.what()).find("is a folder, not a regular file"), std::string::npos) << e.what();
  }
  int entries = 0;
  for (const auto& e : fs::directory_iterator(dir)) {
    ++entries;
    EXPECT_EQ(e.path().filename(), "out.html");
  }
  EXPECT_EQ(entries, 1);
  EXPECT_TRUE(fs::is_directory(path + "/inside"));
}

// A FIFO and a device node made by the test in its own folder are refused and left as they
// are (renaming over them would destroy them; as root even /dev/full once).
TEST(AtomicFile, FifoAndDeviceNodesAreRefusedAndKept) {
  const std::string dir = fresh_dir("nodes");
  const std::string fifo = dir + "/pipe";
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  EXPECT_THROW(pkarta::write_file_atomically(fifo, "new"), pkarta::InputError);
  EXPECT_TRUE(fs::is_fifo(fifo));
  const std::string device = dir + "/null";
  if (::mknod(device.c_str(), S_IFCHR | 0666, makedev(1, 3)) == 0) {  // as root only
    EXPECT_THROW(pkarta::write_file_atomically(device, "new"), pkarta::InputError);
    EXPECT_TRUE(fs::is_character_file(device));
  }
}

TEST(AtomicFile, OverwrittenFileKeepsItsModeAndALinkStaysALink) {
  const std::string dir = fresh_dir("mode");
  const std::string path = dir + "/private.xml";
  { std::ofstream(path) << "old"; }
  ASSERT_EQ(::chmod(path.c_str(), 0600), 0);
  pkarta::write_file_atomically(path, "new");
  struct stat st {};
  ASSERT_EQ(::stat(path.c_str(), &st), 0);
  EXPECT_EQ(st.st_mode & 0777, 0600u);
  const std::string link = dir + "/link.xml";
  fs::create_symlink("private.xml", link);
  pkarta::write_file_atomically(link, "newer");
  EXPECT_TRUE(fs::is_symlink(link));
  std::ifstream in(path);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  EXPECT_EQ(text, "newer");
}

}  // namespace

// --- Sets (a report and its table folder) ---------------------------------------------------
namespace {

std::string read_all(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return std::string((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
}

std::vector<pkarta::SetFile> tables(const std::string& tag, int n) {
  std::vector<pkarta::SetFile> t;
  for (int i = 0; i < n; ++i) t.push_back({"t" + std::to_string(i) + ".csv", tag + "\n"});
  return t;
}

}  // namespace

TEST(FileSet, ReplacesTheWholeSetAndDropsStaleTables) {
  const std::string dir = fresh_dir("set");
  pkarta::write_file_set(dir + "/r.html", "first", dir + "/r", tables("first", 5), {});
  pkarta::write_file_set(dir + "/r.html", "second", dir + "/r", tables("second", 2), {});
  EXPECT_EQ(read_all(dir + "/r.html"), "second");
  EXPECT_EQ(read_all(dir + "/r/t1.csv"), "second\n");
  EXPECT_FALSE(fs::exists(dir + "/r/t4.csv")) << "a table of the earlier, larger set was left";
  int entries = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir)) ++entries;
  EXPECT_EQ(entries, 2) << "temporary files or folders were left";
}

TEST(FileSet, RefusesAFolderWithFilesItDidNotWriteAndTheDotDotName) {
  const std::string dir = fresh_dir("foreign");
  fs::create_directories(dir + "/d");
  { std::ofstream(dir + "/d/profile.csv") << "the user's own table"; }
  EXPECT_THROW(pkarta::write_file_set(dir + "/d.html", "x", dir + "/d", tables("x", 1), {}), pkarta::InputError);
  EXPECT_EQ(read_all(dir + "/d/profile.csv"), "the user's own table");
  EXPECT_FALSE(fs::exists(dir + "/d.html"));
  // `-o d/..html`: the tables would go into d/.. itself.
  EXPECT_THROW(pkarta::write_file_set(dir + "/d/..html", "x", dir + "/d/..", tables("x", 1), {}),
               pkarta::InputError);
  EXPECT_EQ(read_all(dir + "/d/profile.csv"), "the user's own table");
}

TEST(FileSet, EightConcurrentWritersLeaveOneCompleteSet) {
  const std::string dir = fresh_dir("parallel");
  std::vector<pid_t> children;
  for (int w = 0; w < 8; ++w) {
    const pid_t pid = fork();
    if (pid == 0) {
      const std::string tag = "writer" + std::to_string(w);
      try {
        for (int k = 0; k < 5; ++k) pkarta::write_file_set(dir + "/r.html", tag, dir + "/r", tables(tag, 3 + w % 3), {});
      } catch (...) {
        _exit(1);
      }
      _exit(0);
    }
    children.push_back(pid);
  }
  for (pid_t pid : children) {
    int status = 0;
    waitpid(pid, &status, 0);
    EXPECT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0);
  }
  const std::string tag = read_all(dir + "/r.html");
  ASSERT_EQ(tag.rfind("writer", 0), 0u);
  const int n = 3 + std::stoi(tag.substr(6)) % 3;
  int csv = 0;
  for (const auto& e : fs::directory_iterator(dir + "/r")) {
    if (e.path().extension() != ".csv") continue;
    ++csv;
    EXPECT_EQ(read_all(e.path().string()), tag + "\n") << "a table of another run beside the HTML";
  }
  EXPECT_EQ(csv, n);
}
