// Machine-readable output of the command line: one rectangular CSV table on standard output,
// --table, --out-dir, --bom, full-precision numbers, pkarta_version in every JSON.
#include <gtest/gtest.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.h"

namespace {

using pkarta_test::run;
using pkarta_test::slurp;
using pkarta_test::temp_dir;

// RFC 4180 records (quoted fields may hold commas, quotes and line breaks).
std::vector<std::vector<std::string>> parse_csv(const std::string& text) {
  std::vector<std::vector<std::string>> rows(1);
  std::string cell;
  bool quoted = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (quoted) {
      if (c == '"' && i + 1 < text.size() && text[i + 1] == '"') cell += text[++i];
      else if (c == '"') quoted = false;
      else cell += c;
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      rows.back().push_back(cell);
      cell.clear();
    } else if (c == '\r' && i + 1 < text.size() && text[i + 1] == '\n') {
      rows.back().push_back(cell);
      cell.clear();
      rows.emplace_back();
      ++i;
    } else {
      cell += c;
    }
  }
  if (!rows.back().empty() || !cell.empty()) rows.back().push_back(cell);
  else rows.pop_back();
  return rows;
}

std::size_t column(const std::vector<std::string>& header, const std::string& name) {
  for (std::size_t i = 0; i < header.size(); ++i) {
    if (header[i] == name) return i;
  }
  ADD_FAILURE() << "no column " << name;
  return 0;
}

const char* kPhosphate = "mix --add KH2PO4=0.025mol/kg --add Na2HPO4=0.025mol/kg";

TEST(Tables, CsvIsOneRectangularTableAgreeingWithJsonToTheBit) {
  const auto csv = run(std::string(kPhosphate) + " --format csv");
  const auto json = run(std::string(kPhosphate) + " --format json");
  ASSERT_EQ(csv.code, 0) << csv.err;
  ASSERT_EQ(json.code, 0) << json.err;
  const auto rows = parse_csv(csv.out);
  ASSERT_EQ(rows.size(), 2u) << csv.out;  // header and one state
  EXPECT_EQ(rows[0].size(), rows[1].size());
  const nlohmann::json j = nlohmann::json::parse(json.out);
  const double ph = std::stod(rows[1][column(rows[0], "pH")]);
  EXPECT_EQ(ph, j["pH"].get<double>());
  // 0.025/0.025 mol/kg phosphate: pH 6.865 at 25 °C (IUPAC primary standard, Buck et al., Pure
  // Appl. Chem. 74 (2002) 2169, Table 4).
  EXPECT_NEAR(ph, 6.865, 0.02);  // Davies, not the Bates-Guggenheim convention of the standard
  EXPECT_EQ("pkarta " + j["pkarta_version"].get<std::string>() + "\n", run("--version").out);
}

TEST(Tables, TableChoosesAnotherAndAnUnknownNameIsRefused) {
  const auto sp = run(std::string(kPhosphate) + " --format csv --table species");
  ASSERT_EQ(sp.code, 0) << sp.err;
  const auto rows = parse_csv(sp.out);
  ASSERT_GT(rows.size(), 3u);
  EXPECT_EQ(rows[0][1], "species");
  for (const auto& r : rows) EXPECT_EQ(r.size(), rows[0].size());
  const auto bad = run(std::string(kPhosphate) + " --format csv --table specie");
  EXPECT_EQ(bad.code, 2);
  EXPECT_TRUE(bad.out.empty());
  EXPECT_NE(bad.err.find("--table"), std::string::npos) << bad.err;
  EXPECT_NE(bad.err.find("did you mean"), std::string::npos) << bad.err;
  EXPECT_NE(bad.err.find("state, species, notes"), std::string::npos) << bad.err;
  EXPECT_EQ(run(std::string(kPhosphate) + " --format json --table species").code, 2);
}

TEST(Tables, OutDirWritesEveryTableAndBomMarksTheCsv) {
  const std::string dir = temp_dir() + "/tables-profile";
  std::filesystem::remove_all(dir);
  const auto r = run("profile --compound compounds/demo-base.xml --points 2,5,7 --out-dir " + dir);
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("Profile"), std::string::npos);  // the text still goes to standard output
  for (const char* name : {"points", "ph_max", "derived_ksp", "bands", "notes"}) {
    const std::string path = dir + "/" + name + ".csv";
    ASSERT_TRUE(std::filesystem::exists(path)) << path;
    const auto rows = parse_csv(slurp(path));
    ASSERT_FALSE(rows.empty());
    for (const auto& row : rows) EXPECT_EQ(row.size(), rows[0].size()) << path;
  }
  EXPECT_EQ(parse_csv(slurp(dir + "/points.csv")).size(), 4u);
  const auto bom = run("profile --compound compounds/demo-base.xml --points 2 --format csv --bom");
  ASSERT_EQ(bom.code, 0) << bom.err;
  EXPECT_EQ(bom.out.rfind("\xEF\xBB\xBFpH,", 0), 0u);
  EXPECT_EQ(run("profile --compound compounds/demo-base.xml --points 2 --bom").code, 2);
  // A file where the folder should be: refused before any work, nothing written.
  const auto file = run("profile --compound compounds/demo-base.xml --points 2 --out-dir compounds/demo-base.xml");
  EXPECT_EQ(file.code, 2);
  EXPECT_TRUE(file.out.empty());
}

TEST(Tables, FlagsStandApartFromNumbers) {
  // At pH 1 the demo base's ideal (Henderson-Hasselbalch) solubility is beyond the cap: the
  // numeric column holds a number, the flag column says "capped".
  const auto r = run("profile --compound compounds/demo-base.xml --points 1,8 --format csv");
  ASSERT_EQ(r.code, 0) << r.err;
  const auto rows = parse_csv(r.out);
  ASSERT_EQ(rows.size(), 3u);
  const std::size_t ideal = column(rows[0], "ideal_solubility_mol_per_L");
  const std::size_t flag = column(rows[0], "ideal_solubility_flag");
  for (std::size_t i = 1; i < rows.size(); ++i) {
    EXPECT_NO_THROW((void)std::stod(rows[i][ideal])) << rows[i][ideal];
    EXPECT_EQ(rows[i][ideal].find('>'), std::string::npos);
  }
  EXPECT_EQ(rows[1][flag], "capped");
  EXPECT_EQ(rows[2][flag], "");
  // Species fractions are labelled in the JSON as well as listed.
  const auto j = nlohmann::json::parse(run("profile --compound compounds/demo-base.xml --points 8 --format json").out);
  const auto& pt = j["points"][0];
  ASSERT_EQ(pt["fractions"].size(), j["species"].size());
  for (std::size_t i = 0; i < j["species"].size(); ++i) {
    EXPECT_EQ(pt["fractions_by_species"][j["species"][i].get<std::string>()], pt["fractions"][i]);
  }
}

}  // namespace
