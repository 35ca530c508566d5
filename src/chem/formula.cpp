#include "pkarta/chem/formula.h"

#include <cctype>
#include <string>

#include "pkarta/base/error.h"

namespace pkarta {

namespace {

struct Element {
  const char* symbol;
  double weight;
};

// Standard atomic weights: CIAAW "Standard Atomic Weights 2021" (ciaaw.org); for elements whose
// standard weight is an interval, the conventional values of the IUPAC abridged table
// (Prohaska et al., Pure Appl. Chem. 94, 573 (2022)).
constexpr Element kElements[] = {
    {"H", 1.008},      {"He", 4.002602}, {"Li", 6.94},      {"Be", 9.0121831}, {"B", 10.81},
    {"C", 12.011},     {"N", 14.007},    {"O", 15.999},     {"F", 18.998403162}, {"Ne", 20.1797},
    {"Na", 22.98976928}, {"Mg", 24.305}, {"Al", 26.9815384}, {"Si", 28.085},  {"P", 30.973761998},
    {"S", 32.06},      {"Cl", 35.45},    {"Ar", 39.95},     {"K", 39.0983},   {"Ca", 40.078},
    {"Sc", 44.955907}, {"Ti", 47.867},   {"V", 50.9415},    {"Cr", 51.9961},  {"Mn", 54.938043},
    {"Fe", 55.845},    {"Co", 58.933194}, {"Ni", 58.6934},  {"Cu", 63.546},   {"Zn", 65.38},
    {"Ga", 69.723},    {"Ge", 72.630},   {"As", 74.921595}, {"Se", 78.971},   {"Br", 79.904},
    {"Kr", 83.798},    {"Rb", 85.4678},  {"Sr", 87.62},     {"Y", 88.905838}, {"Zr", 91.224},
    {"Mo", 95.95},     {"Ag", 107.8682}, {"Cd", 112.414},   {"Sn", 118.710},  {"Sb", 121.760},
    {"I", 126.90447},  {"Cs", 132.90545196}, {"Ba", 137.327}, {"Pt", 195.084}, {"Au", 196.966570},
    {"Hg", 200.592},   {"Pb", 207.2},    {"Bi", 208.98040},
};

double element_weight(const std::string& symbol) {
  for (const Element& e : kElements) {
    if (symbol == e.symbol) return e.weight;
  }
  return -1.0;
}

class Parser {
 public:
  explicit Parser(std::string_view text) : text_(text) {}

  double parse() {
    if (text_.empty()) fail("empty formula");
    double total = 0.0;
    bool first = true;
    while (true) {
      double multiplier = 1.0;
      if (!first) multiplier = read_count(/*allow_none=*/true);
      total += multiplier * parse_group(/*depth=*/0);
      first = false;
      if (pos_ >= text_.size()) break;
      if (text_[pos_] == '.' || text_[pos_] == '*') {
        ++pos_;
        if (pos_ >= text_.size()) fail("formula ends after '.'");
        continue;
      }
      fail(std::string("unexpected character '") + text_[pos_] + "'");
    }
    return total;
  }

 private:
  double parse_group(int depth) {
    if (depth > 16) fail("parentheses nested too deeply");
    double sum = 0.0;
    bool any = false;
    while (pos_ < text_.size()) {
      const char c = text_[pos_];
      if (c == '(' || c == '[') {
        const char close = c == '(' ? ')' : ']';
        ++pos_;
        const double inner = parse_group(depth + 1);
        if (pos_ >= text_.size() || text_[pos_] != close) fail(std::string("missing '") + close + "'");
        ++pos_;
        sum += inner * read_count(true);
        any = true;
      } else if (std::isupper(static_cast<unsigned char>(c))) {
        std::string sym(1, c);
        ++pos_;
        while (pos_ < text_.size() && std::islower(static_cast<unsigned char>(text_[pos_]))) {
          sym += text_[pos_++];
        }
        const double w = element_weight(sym);
        if (w < 0) fail("unknown element '" + sym + "'");
        sum += w * read_count(true);
        any = true;
      } else {
        break;
      }
    }
    if (!any) fail("expected an element symbol or '('");
    return sum;
  }

  double read_count(bool allow_none) {
    std::size_t start = pos_;
    long n = 0;
    while (pos_ < text_.size() && std::isdigit(static_cast<unsigned char>(text_[pos_]))) {
      n = n * 10 + (text_[pos_] - '0');
      if (n > 100000) fail("count too large");
      ++pos_;
    }
    if (pos_ == start) {
      if (!allow_none) fail("expected a count");
      return 1.0;
    }
    if (n == 0) fail("count of zero");
    return static_cast<double>(n);
  }

  [[noreturn]] void fail(const std::string& what) const {
    throw InputError("formula \"" + std::string(text_) + "\": " + what + " at character " +
                     std::to_string(pos_ + 1));
  }

  std::string_view text_;
  std::size_t pos_ = 0;
};

}  // namespace

double molar_mass_g_per_mol(std::string_view formula) { return Parser(formula).parse(); }

}  // namespace pkarta
