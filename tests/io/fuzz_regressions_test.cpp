// Replays every input kept for the fuzz targets: the inputs that once failed
// (tests/fuzz/regressions/<target>/) and the seed corpora (tests/fuzz/corpus/<target>/).
// Each must give a valid result or a clean InputError (the checks of tests/fuzz/fuzz_checks.h).
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <vector>

#include "fuzz/fuzz_checks.h"
#include "fuzz/fuzz_cli_checks.h"

namespace pkarta {
namespace {

namespace fs = std::filesystem;

struct Input {
  std::string path;
  std::string bytes;
};

/// Every file under tests/fuzz/regressions/<target>/ and tests/fuzz/corpus/<target>/.
std::vector<Input> inputs(const std::string& target) {
  std::vector<Input> out;
  for (const char* kind : {"regressions", "corpus"}) {
    const fs::path dir = fs::path(PKARTA_SOURCE_DIR) / "tests" / "fuzz" / kind / target;
    if (!fs::is_directory(dir)) continue;
    for (const fs::directory_entry& f : fs::directory_iterator(dir)) {
      if (!f.is_regular_file()) continue;
      std::ifstream in(f.path(), std::ios::binary);
      out.push_back({f.path().string(), std::string(std::istreambuf_iterator<char>(in), {})});
    }
  }
  return out;
}

TEST(FuzzRegressions, CompoundInputs) {
  const Library library = builtin_library();
  const std::vector<Input> in = inputs("compound");
  ASSERT_GE(in.size(), 3u);
  for (const Input& i : in) EXPECT_EQ(fuzz::check_compound(i.bytes, library), "") << i.path;
}

TEST(FuzzRegressions, LibraryInputs) {
  const Library builtin = builtin_library();
  const std::vector<Input> in = inputs("library");
  ASSERT_GE(in.size(), 1u);
  for (const Input& i : in) EXPECT_EQ(fuzz::check_library(i.bytes, builtin), "") << i.path;
}

TEST(FuzzRegressions, AmountInputs) {
  const std::vector<Input> in = inputs("amount");
  ASSERT_GE(in.size(), 5u);
  for (const Input& i : in) EXPECT_EQ(fuzz::check_amount(i.bytes), "") << i.path;
}

TEST(FuzzRegressions, FormulaInputs) {
  const std::vector<Input> in = inputs("formula");
  ASSERT_GE(in.size(), 5u);
  for (const Input& i : in) EXPECT_EQ(fuzz::check_formula(i.bytes), "") << i.path;
}

TEST(FuzzRegressions, SolverInputs) {
  const std::vector<Input> in = inputs("solver");
  ASSERT_GE(in.size(), 1u);
  for (const Input& i : in) {
    EXPECT_EQ(fuzz::check_solver(reinterpret_cast<const std::uint8_t*>(i.bytes.data()), i.bytes.size()), "")
        << i.path;
  }
}

TEST(FuzzRegressions, CommandLineInputs) {
  const std::vector<Input> in = inputs("cli");
  ASSERT_GE(in.size(), 10u);
  const std::string compounds = std::string(PKARTA_SOURCE_DIR) + "/compounds";
  for (const Input& i : in) EXPECT_EQ(fuzz::check_cli(i.bytes, compounds), "") << i.path;
}

// The inputs that once failed, by what they exercise.
TEST(FuzzRegressions, AnAmountBeyondAnyPhysicalOneIsRefused) {
  EXPECT_THROW(parse_amount("1.7e308%"), InputError);  // converted to infinite mol/L before
  EXPECT_THROW(parse_amount("2e9 M"), InputError);
  EXPECT_NO_THROW(parse_amount("1e9 uM"));
}

}  // namespace
}  // namespace pkarta
