// Text kept within 100 columns: wide tables in blocks of columns, long paragraphs wrapped.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <optional>
#include <sstream>
#include <string>

#include "pkarta/base/format.h"
#include "pkarta/base/table.h"

namespace {

std::size_t widest(const std::string& text) {
  std::size_t w = 0, cur = 0;
  for (unsigned char c : text) {
    if (c == '\n') {
      w = std::max(w, cur);
      cur = 0;
    } else if ((c & 0xC0) != 0x80) {
      ++cur;
    }
  }
  return std::max(w, cur);
}

TEST(TextWidth, AWideTableComesInBlocksEachStartingWithTheKey) {
  std::vector<std::string> head = {"pH"};
  std::vector<std::string> row = {"7.00"};
  for (int i = 0; i < 12; ++i) {
    head.push_back("fraction of species " + std::to_string(i));
    row.push_back("0.0" + std::to_string(i));
  }
  pkarta::TextTable t(head);
  t.add_row(row);
  std::ostringstream out;
  t.write(out);
  EXPECT_LE(widest(out.str()), 100u) << out.str();
  // Every column is there once, the key column once per block.
  for (int i = 0; i < 12; ++i) {
    const std::string name = "fraction of species " + std::to_string(i);
    EXPECT_TRUE(out.str().find(name + " ") != std::string::npos || out.str().find(name + "\n") != std::string::npos)
        << name;
  }
  std::size_t blocks = 0;
  for (std::size_t at = out.str().find("  pH "); at != std::string::npos; at = out.str().find("  pH ", at + 1)) ++blocks;
  EXPECT_GE(blocks, 3u);
  pkarta::TextTable unlimited(head);
  unlimited.add_row(row);
  unlimited.set_max_width(0);
  std::ostringstream one;
  unlimited.write(one);
  EXPECT_GT(widest(one.str()), 100u);
}

TEST(TextWidth, ParagraphsWrapUnderTheirIndentTablesStay) {
  const std::string caution = std::string(pkarta::caution_text()) + "\n";
  const std::string wrapped = pkarta::fit_text_width(caution);
  EXPECT_LE(widest(wrapped), 100u);
  EXPECT_EQ(wrapped.find("\n "), std::string::npos);  // a paragraph at column 0 stays there
  std::string same = wrapped;
  for (char& c : same) c = c == '\n' ? ' ' : c;
  EXPECT_EQ(same.substr(0, same.size() - 1), caution.substr(0, caution.size() - 1));  // no word lost
  const std::string item = "  - " + std::string(120, 'x').replace(50, 1, " ") + "\n";
  EXPECT_EQ(pkarta::fit_text_width(item).find("\n    x"), 54u);  // under the text of the item
  const std::string row = "  1     succinate  ok  " + std::string(100, '9') + "\n";
  EXPECT_EQ(pkarta::fit_text_width(row), row);
}

TEST(FullPrecision, NumbersReadBackExactly) {
  for (double v : {0.1, 1.0 / 3.0, 6.02214076e23, -2.5e-310, 7.0}) EXPECT_EQ(std::strtod(pkarta::full(v).c_str(), nullptr), v);
  EXPECT_EQ(pkarta::full(7.0), "7");
  EXPECT_EQ(pkarta::full(std::nan("")), "");
  EXPECT_EQ(pkarta::full(std::optional<double>()), "");
}

// The SI Brochure (BIPM, 9th edition 2019, section 5.4.3): the value of a quantity is written
// as a number and a unit separated by a space.
TEST(SpacedAmount, OneSpaceBetweenNumberAndUnit) {
  EXPECT_EQ(pkarta::spaced_amount("2mg/mL"), "2 mg/mL");
  EXPECT_EQ(pkarta::spaced_amount(" 2   mg/mL "), "2 mg/mL");
  EXPECT_EQ(pkarta::spaced_amount("1e-3M"), "1e-3 M");
  EXPECT_EQ(pkarta::spaced_amount("2.5E2 mM"), "2.5E2 mM");
  EXPECT_EQ(pkarta::spaced_amount("0.5"), "0.5");
  EXPECT_EQ(pkarta::spaced_amount("mg/mL"), "mg/mL");
  EXPECT_EQ(pkarta::spaced_amount("5eq"), "5 eq");
}

}  // namespace
