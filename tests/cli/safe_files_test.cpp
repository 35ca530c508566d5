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
#include <vector>

#include "cli_run.h"
#include "pkarta/base/error.h"
#include "pkarta/base/format.h"
#include "pkarta/io/atomic_file.h"
#include "pkarta/io/text_file.h"

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

// CSV formula injection (OWASP, "CSV Injection"): a text cell a spreadsheet would evaluate
// (it starts with '=', '+', '-', '@', tab or CR) is written with a leading single quote;
// numbers, negative ones included, stay numbers.
TEST(SafeFiles, CsvCellsThatLookLikeFormulasAreNeutralised) {
  EXPECT_EQ(csv_field("=HYPERLINK(\"x\")"), "\"'=HYPERLINK(\"\"x\"\")\"");
  EXPECT_EQ(csv_field("@SUM(A1)"), "'@SUM(A1)");
  EXPECT_EQ(csv_field("+A1"), "'+A1");
  EXPECT_EQ(csv_field("-A1"), "'-A1");
  EXPECT_EQ(csv_field("\tx"), "'\tx");
  EXPECT_EQ(csv_field("\rx"), "\"'\rx\"");
  EXPECT_EQ(csv_field("-"), "'-");
  EXPECT_EQ(csv_field("-1e"), "'-1e");
  for (const char* number : {"-0.25", "1e-3", "-1", "+3", "-1.5E+07", "0", "-.5", "7."}) {
    EXPECT_EQ(csv_field(number), number);
  }
  EXPECT_EQ(csv_field("phosphate H2A-"), "phosphate H2A-");  // only the first character counts
  EXPECT_EQ(csv_field("a=b"), "a=b");
}

// Splits RFC 4180 CSV text into cells (quoted fields may hold commas, quotes and line breaks).
std::vector<std::string> csv_cells(const std::string& text) {
  std::vector<std::string> cells;
  std::string cell;
  bool quoted = false, in_cell = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (quoted) {
      if (c == '"' && i + 1 < text.size() && text[i + 1] == '"') {
        cell += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        cell += c;
      }
    } else if (c == '"' && cell.empty()) {
      quoted = in_cell = true;
    } else if (c == ',' || c == '\n') {
      cells.push_back(cell);
      cell.clear();
      in_cell = false;
    } else if (c != '\r' || (i + 1 < text.size() && text[i + 1] != '\n')) {
      cell += c;
      in_cell = true;
    }
  }
  if (in_cell || !cell.empty()) cells.push_back(cell);
  return cells;
}

// Every cell of `csv` that starts like a formula is a plain number; returns the offenders.
std::string formula_cells(const std::string& csv) {
  std::string bad;
  for (const std::string& c : csv_cells(csv)) {
    if (!c.empty() && csv_formula_like(c)) bad += "[" + c + "] ";
  }
  return bad;
}

TEST(SafeFiles, NamesAndIdsStartingLikeFormulasAreNeutralisedInEveryCsv) {
  // Ids follow the schema's pattern (a letter or digit first): an id starting with '=' or '@'
  // is refused where it is written, so no id reaches a CSV as a formula.
  for (const char* ids : {"<compound id='=cmd' molar-mass='300'/>",
                          "<compound id='cmd' molar-mass='300'><salt id='@hcl' counterion='Cl-' ksp='1e-3'/></compound>"}) {
    const std::string bad = pkarta_test::write_file("formula-id.xml", ids);
    const pkarta_test::RunResult out = pkarta_test::run("check " + bad);
    EXPECT_EQ(out.code, 2) << ids;
    EXPECT_NE(out.err.find("an id is letters and digits"), std::string::npos) << out.err;
  }
  // The compound's name starts with '@'; the reader accepts it.
  const std::string compound = pkarta_test::write_file(
      "formula-compound.xml",
      "<compound id='cmd' name='@SUM(A1)' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='ug/mL'/>\n <salt id='hcl' counterion='Cl-' ksp='1e-3'/>\n"
      " <measured-solubility><point pH='2' value='3' unit='mg/mL'/><point pH='7' value='20' unit='ug/mL'/>"
      "<point pH='9' value='1.2' unit='ug/mL'/></measured-solubility>\n</compound>\n");
  struct Run {
    std::string args, expect;
  };
  const Run runs[] = {
      {"mix --compound " + compound + " --dose 1mg/mL --add KH2PO4=25mM --format csv --table species", "cmd HA+,cmd,1,"},
      {"profile --compound " + compound + " --format csv", ",hcl,"},
      {"screen --compound " + compound + " --dose 1mg/mL --target-ph 6 --format csv", "cmd"},
      {"fit --compound " + compound + " --params s0 --format csv", "log10_S0_mol_per_L"},
  };
  for (const Run& r : runs) {
    const pkarta_test::RunResult out = pkarta_test::run(r.args);
    ASSERT_EQ(out.code, 0) << r.args << "\n" << out.err;
    EXPECT_NE(out.out.find(r.expect), std::string::npos) << r.args << "\n" << out.out;
    EXPECT_EQ(formula_cells(out.out), "") << r.args;
  }
  // Negative numbers stay numbers: the charge of a phosphate species.
  const pkarta_test::RunResult mix = pkarta_test::run("mix --add KH2PO4=25mM --add Na2HPO4=25mM --format csv --table species");
  ASSERT_EQ(mix.code, 0) << mix.err;
  EXPECT_NE(mix.out.find("phosphate HA2-,phosphate,-2,"), std::string::npos) << mix.out;
  // The report's CSV tables.
  const std::string html = pkarta_test::temp_dir() + "/formula-report.html";
  const pkarta_test::RunResult rep =
      pkarta_test::run("report --compound " + compound + " --dose 1mg/mL --target-ph 6 -o " + html);
  ASSERT_EQ(rep.code, 0) << rep.err;
  const fs::path tables = pkarta_test::temp_dir() + "/formula-report";
  const std::string compound_csv = slurp((tables / "compound.csv").string());
  EXPECT_NE(compound_csv.find("id,cmd"), std::string::npos) << compound_csv;
  EXPECT_NE(compound_csv.find("name,'@SUM(A1)"), std::string::npos) << compound_csv;
  int tables_read = 0;
  for (const auto& e : fs::directory_iterator(tables)) {
    if (e.path().extension() != ".csv") continue;
    ++tables_read;
    EXPECT_EQ(formula_cells(slurp(e.path().string())), "") << e.path();
  }
  EXPECT_GE(tables_read, 5);
  // The text output is not CSV: the name is shown as written.
  EXPECT_NE(pkarta_test::run("mix --compound " + compound + " --dose 1mg/mL").out.find("(@SUM(A1))"), std::string::npos);
}

// Bytes that are not UTF-8 (RFC 3629) are found where they are; a compound file holding them
// is refused before any HTML, CSV or JSON is written (JSON output once failed with an
// internal error, and the HTML report was written with the bytes in it).
TEST(SafeFiles, InvalidUtf8IsRefusedBeforeAnyOutputIsWritten) {
  constexpr std::size_t kNone = std::string_view::npos;
  EXPECT_EQ(invalid_utf8_offset("plain ASCII"), kNone);
  EXPECT_EQ(invalid_utf8_offset("\xC2\xB5g/mL, 25 \xC2\xB0" "C, \xE2\x82\xAC, \xF0\x9F\x98\x80"), kNone);
  EXPECT_EQ(invalid_utf8_offset("ab\xFF"), 2u);            // never a UTF-8 byte
  EXPECT_EQ(invalid_utf8_offset("a\xC3"), 1u);             // sequence cut short
  EXPECT_EQ(invalid_utf8_offset("a\xC3(x"), 1u);           // continuation missing
  EXPECT_EQ(invalid_utf8_offset("\xC0\xAF"), 0u);          // overlong '/'
  EXPECT_EQ(invalid_utf8_offset("\xE0\x80\xAF"), 0u);      // overlong, three bytes
  EXPECT_EQ(invalid_utf8_offset("x\xED\xA0\x80"), 1u);     // surrogate U+D800
  EXPECT_EQ(invalid_utf8_offset("\xF4\x90\x80\x80"), 0u);  // above U+10FFFF
  EXPECT_EQ(invalid_utf8_offset("\x80"), 0u);              // lone continuation byte

  const fs::path dir = fresh_dir();
  const std::string compound = (dir / "latin1.xml").string();
  std::ofstream(compound) << "<compound id='x' name='caf\xE9ine' molar-mass='300'>\n <pka value='8' type='base'/>\n"
                             " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n";
  const std::string html = (dir / "report.html").string();
  const pkarta_test::RunResult rep = pkarta_test::run("report --compound " + compound + " -o " + html);
  EXPECT_EQ(rep.code, 2) << rep.err;
  EXPECT_NE(rep.err.find(compound + ":1:27: invalid UTF-8 (byte 0xE9)"), std::string::npos) << rep.err;
  EXPECT_EQ(files_in(dir), 1) << "the report or its tables were written";
  for (const char* command : {"profile --format json", "profile --format csv", "check"}) {
    const std::string cmd(command);
    const std::string args = cmd.substr(0, cmd.find(' ')) == "check"
                                 ? "check " + compound
                                 : cmd.substr(0, cmd.find(' ')) + " --compound " + compound + cmd.substr(cmd.find(' '));
    const pkarta_test::RunResult r = pkarta_test::run(args);
    EXPECT_EQ(r.code, 2) << args << "\n" << r.err;
    EXPECT_EQ(r.out, "") << args;
    EXPECT_EQ(r.err.find("internal error"), std::string::npos) << args << "\n" << r.err;
  }
  fs::remove_all(dir);
}

// Both writers keep a replaced file's mode and owner (one shared step). As root the file is
// first given to another user; otherwise only the mode can be checked.
TEST(SafeFiles, ReplacedFilesKeepTheirModeAndOwner) {
  const fs::path dir = fresh_dir();
  const std::string single = (dir / "fitted.xml").string();
  const std::string main = (dir / "report.html").string();
  std::ofstream(single) << "old";
  std::ofstream(main) << "old report";
  const bool root = geteuid() == 0;
  const uid_t other_uid = 4242;
  const gid_t other_gid = 4343;
  for (const std::string& p : {single, main}) {
    ASSERT_EQ(::chmod(p.c_str(), 0640), 0);
    if (root) ASSERT_EQ(::chown(p.c_str(), other_uid, other_gid), 0);
  }
  write_file_atomically(single, "new");
  write_file_set(main, "new report", (dir / "report").string(), {{"a.csv", "x\r\n"}}, {});
  for (const std::string& p : {single, main}) {
    struct stat st {};
    ASSERT_EQ(::stat(p.c_str(), &st), 0);
    EXPECT_EQ(st.st_mode & 07777, 0640u) << p;
    if (root) {
      EXPECT_EQ(st.st_uid, other_uid) << p;
      EXPECT_EQ(st.st_gid, other_gid) << p;
    }
  }
  EXPECT_EQ(slurp(single), "new");
  EXPECT_EQ(slurp(main), "new report");
  fs::remove_all(dir);
}

// -o FILE of mix, profile and screen writes what standard output would hold, atomically; -o -
// is standard output itself; a refused or unusable result writes no file.
TEST(SafeFiles, DashOIsStandardOutputAndAFileGetsTheSameBytes) {
  const fs::path dir = fresh_dir();
  for (const std::string args : {std::string("mix --add KH2PO4=25mM --add Na2HPO4=25mM --format json"),
                                 std::string("profile --compound compounds/demo-base.xml --format csv"),
                                 std::string("screen --compound compounds/demo-base.xml --dose 1mg/mL --target-ph 6 --format csv"),
                                 std::string("mix --add KH2PO4=25mM --temp 5,25,37")}) {
    const pkarta_test::RunResult plain = pkarta_test::run(args);
    ASSERT_EQ(plain.code, 0) << args << "\n" << plain.err;
    ASSERT_FALSE(plain.out.empty());
    const pkarta_test::RunResult dash = pkarta_test::run(args + " -o -");
    EXPECT_EQ(dash.code, 0) << args;
    EXPECT_EQ(dash.out, plain.out) << args;
    const std::string file = (dir / "out.txt").string();
    const pkarta_test::RunResult to_file = pkarta_test::run(args + " -o " + file);
    EXPECT_EQ(to_file.code, 0) << args << "\n" << to_file.err;
    EXPECT_EQ(to_file.out, "") << args;
    EXPECT_EQ(slurp(file), plain.out) << args;
    fs::remove(file);
  }
  const std::string kept = (dir / "kept.json").string();
  std::ofstream(kept) << "old";
  const pkarta_test::RunResult refused = pkarta_test::run("mix --add HCl=9M --add NaCl=9M --format json -o " + kept);
  EXPECT_EQ(refused.code, 1) << refused.err;
  EXPECT_EQ(slurp(kept), "old");
  EXPECT_EQ(files_in(dir), 1) << "a temporary file was left behind";
  fs::remove_all(dir);
}

}  // namespace
}  // namespace pkarta
