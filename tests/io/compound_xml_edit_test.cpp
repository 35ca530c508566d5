// Writing values into a compound file: only the edited attributes change, the comment lands
// above <compound>, "--" in it is broken up, and a result that would not load is refused.
#include "pkarta/io/compound_xml_edit.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include "pkarta/io/text_file.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

const std::string kAcid = std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-acid.xml";

TEST(CompoundXmlEdit, WritesValuesAndKeepsEveryOtherByte) {
  const Library lib = builtin_library();
  std::vector<CompoundValueEdit> edits(3);
  edits[0].kind = CompoundValueEdit::Kind::kPka;
  edits[0].value = 4.41234;
  edits[0].sd = 0.031;
  edits[1].kind = CompoundValueEdit::Kind::kIntrinsicSolubility;
  edits[1].value = 2.0 * 25e-3 / 248.3;  // twice the file's 25 ug/mL (25 mg/L), in mol/L
  edits[1].sd = std::numeric_limits<double>::quiet_NaN();  // log-sd left as it is
  edits[2].kind = CompoundValueEdit::Kind::kSaltKsp;
  edits[2].salt_id = "sodium";
  edits[2].value = 0.0125;
  const std::string out = edit_compound_xml(kAcid, edits, 248.3, 25.0, "fitted -- test", lib);
  EXPECT_NE(out.find("<!-- fitted - - test -->\n<compound id=\"demo-acid\""), std::string::npos);
  EXPECT_NE(out.find("<pka value=\"4.412\" type=\"acid\" dH=\"1.5\" temperature=\"25\" sd=\"0.031\"/>   <!-- invented -->"),
            std::string::npos);
  EXPECT_NE(out.find("<intrinsic-solubility value=\"50\" unit=\"ug/mL\" temperature=\"25\" dH=\"20\" log-sd=\"0.2\"/>"),
            std::string::npos);
  EXPECT_NE(out.find("<salt id=\"sodium\" counterion=\"Na+\" molar-mass=\"270.3\" temperature=\"25\" dH=\"15\" ksp=\"0.0125\"/>"),
            std::string::npos);
  // Every other line is kept byte for byte, and only the comment line is added.
  const std::string original = read_text_file(kAcid);
  std::size_t lines = 0;
  for (std::size_t at = 0, next; (next = original.find('\n', at)) != std::string::npos; at = next + 1) {
    const std::string line = original.substr(at, next + 1 - at);
    ++lines;
    if (line.find("<pka ") != std::string::npos || line.find("<intrinsic-solubility ") != std::string::npos ||
        line.find("<salt ") != std::string::npos) {
      continue;
    }
    EXPECT_NE(out.find(line), std::string::npos) << "lost: " << line;
  }
  EXPECT_EQ(static_cast<std::size_t>(std::count(out.begin(), out.end(), '\n')), lines + 1);
}

TEST(CompoundXmlEdit, RefusesValuesThatWouldNotLoad) {
  const Library lib = builtin_library();
  std::vector<CompoundValueEdit> edits(1);
  edits[0].kind = CompoundValueEdit::Kind::kPka;
  edits[0].value = std::numeric_limits<double>::quiet_NaN();
  try {
    edit_compound_xml(kAcid, edits, 248.3, 25.0, "x", lib);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.where().file, kAcid);
    EXPECT_NE(e.message().find("do not make a valid compound file"), std::string::npos) << e.message();
  }
}

}  // namespace
}  // namespace pkarta
