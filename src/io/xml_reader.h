// Shared parts of the compound and library readers (internal to src/io): byte offsets to
// file:line:column, the attribute readers, and the list of errors a file collects while it is
// read (each element is read on its own, so one run reports every error of a file).
#ifndef PKARTA_SRC_IO_XML_READER_H_
#define PKARTA_SRC_IO_XML_READER_H_

#include <pugixml.hpp>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstring>
#include <initializer_list>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "pkarta/chem/model.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/text_file.h"
#include "pkarta/io/xml_input.h"

namespace pkarta::xml_detail {

std::string hex_byte(char c);

/// Thrown by an element that refers to an element already refused: the element is skipped
/// without a second message (the first error names the cause).
struct Skip {};

// Maps byte offsets to 1-based line and column.
class Locator {
 public:
  Locator(const std::string& text, std::string file) : file_(std::move(file)) {
    line_starts_.push_back(0);
    // Lines end with LF, CRLF or a lone CR (old Mac files): each counts once.
    for (std::size_t i = 0; i < text.size(); ++i) {
      if (text[i] == '\n' || (text[i] == '\r' && (i + 1 == text.size() || text[i + 1] != '\n'))) {
        line_starts_.push_back(i + 1);
      }
    }
  }
  SourceLocation at(std::ptrdiff_t offset) const {
    if (offset < 0) return {file_, 0, 0};
    auto it = std::upper_bound(line_starts_.begin(), line_starts_.end(),
                               static_cast<std::size_t>(offset));
    const int line = static_cast<int>(it - line_starts_.begin());
    const int col = static_cast<int>(static_cast<std::size_t>(offset) - *(it - 1)) + 1;
    return {file_, line, col};
  }
  // offset_debug() points at the element name; report the '<' before it.
  SourceLocation at(const pugi::xml_node& n) const {
    const std::ptrdiff_t o = n.offset_debug();
    return at(n.type() == pugi::node_element && o > 0 ? o - 1 : o);
  }
  const std::string& file() const { return file_; }

 private:
  std::string file_;
  std::vector<std::size_t> line_starts_;
};

/// How the schema types an attribute's text (the numbers are checked where they are read).
enum class Text {
  kAny,
  kId,               // [A-Za-z0-9][A-Za-z0-9_.+-]*
  kOptionalId,       // an id or empty
  kNonEmpty,         // some text that is not only spaces
  kInteger,          // [+-]digits
  kPositiveInteger,  // [+]digits, > 0
  kOptionalPH,       // empty or [+-]decimal, no exponent
};

/// An attribute the schema allows on an element, and the type of its text.
struct Attr {
  Attr(const char* n, Text t = Text::kAny) : name(n), text(t) {}  // NOLINT: implicit from a name
  const char* name;
  Text text;
};

/// Why `value` is not text of type `t` (empty when it is).
std::string text_problem(Text t, const std::string& value);
/// `t` without leading and trailing white space.
std::string trimmed(const std::string& t);
/// Whether `name` on `n` is a namespace declaration (xmlns:p) or the schema location of
/// XML Schema instance (xsi:noNamespaceSchemaLocation, xsi:schemaLocation): not attributes of
/// the file's own, as the schema sees them.
bool is_namespace_attribute(const pugi::xml_node& n, const char* name);

class Reader {
 public:
  Reader(const std::string& text, const std::string& name, Warnings* warnings)
      : loc_(text, name), warnings_(warnings) {
    // A NUL byte is never text: refuse it where it is, rather than let the parser stop there
    // and silently ignore the rest of the file.
    const std::size_t nul = text.find('\0');
    if (nul != std::string::npos) {
      throw InputError(loc_.at(static_cast<std::ptrdiff_t>(nul)),
                       "NUL byte in the file (is it binary, or UTF-16? save it as UTF-8 text)");
    }
    const pugi::xml_parse_result r =
        doc_.load_buffer(text.data(), text.size(), pugi::parse_default | pugi::parse_ws_pcdata_single,
                         pugi::encoding_utf8);
    if (!r) {
      throw InputError(loc_.at(r.offset), std::string("malformed XML: ") + r.description());
    }
    // Well-formed XML may still hold bytes that are not UTF-8 (pugixml passes them through):
    // refuse them where they are, before a name or id carries them into a report or JSON.
    const std::size_t bad = invalid_utf8_offset(text);
    if (bad != std::string_view::npos) {
      throw InputError(loc_.at(static_cast<std::ptrdiff_t>(bad)),
                       "invalid UTF-8 (byte " + hex_byte(text[bad]) + "); save the file as UTF-8 text");
    }
  }
  pugi::xml_node root(const char* expected) {
    pugi::xml_node n = doc_.document_element();
    if (!n) throw InputError(SourceLocation{loc_.file(), 1, 1}, "empty document");
    if (std::strcmp(n.name(), expected) != 0) {
      throw InputError(loc_.at(n), std::string("root element is <") + n.name() + ">, expected <" +
                                       expected + ">");
    }
    return n;
  }
  SourceLocation at(const pugi::xml_node& n) const { return loc_.at(n); }

  /// Reads one element (or one check): an error is kept and reading goes on with the next.
  /// Returns whether the body finished.
  template <class Body>
  bool attempt(Body&& body) {
    try {
      body();
      return true;
    } catch (const InputError& e) {
      errors_.push_back(e);
    } catch (const Skip&) {
      skipped_ = true;
    }
    return false;
  }
  /// Whether an element was refused or skipped so far.
  bool has_errors() const { return !errors_.empty() || skipped_; }
  /// Throws the errors kept, in line order: one as it is, several as InputErrors.
  void finish() {
    if (errors_.empty()) return;
    std::stable_sort(errors_.begin(), errors_.end(), [](const InputError& a, const InputError& b) {
      return a.where().line != b.where().line ? a.where().line < b.where().line
                                              : a.where().column < b.where().column;
    });
    if (errors_.size() == 1) throw InputError(errors_.front());
    throw InputErrors(errors_);
  }

  [[noreturn]] void fail(const pugi::xml_node& n, const std::string& what) const {
    throw InputError(loc_.at(n), what);
  }

  /// Reports an error at `n` and goes on reading (the error is kept for finish()).
  void error(const pugi::xml_node& n, const std::string& what) { errors_.push_back(InputError(loc_.at(n), what)); }

  /// Checks the attributes of `n` against the schema's: each unknown one is an error naming
  /// those allowed, and a value that is not written as the schema's type wants is one too
  /// (after every attribute is checked, the element is skipped: throws Skip).
  void check_attributes(const pugi::xml_node& n, std::initializer_list<Attr> known) {
    bool bad_value = false;
    for (const pugi::xml_attribute a : n.attributes()) {
      // Well-formed XML never repeats an attribute (pugixml does not check it).
      for (pugi::xml_attribute b = a.previous_attribute(); b; b = b.previous_attribute()) {
        if (std::strcmp(a.name(), b.name()) == 0) {
          error(n, "attribute '" + shown(a.name()) + "' is given twice on <" + n.name() + ">");
          bad_value = true;
        }
      }
      const Attr* k = nullptr;
      for (const Attr& x : known) {
        if (std::strcmp(a.name(), x.name) == 0) k = &x;
      }
      if (k == nullptr) {
        if (is_namespace_attribute(n, a.name())) continue;
        if (std::strcmp(a.name(), "xmlns") == 0) {
          error(n, std::string("<") + n.name() + "> is in the namespace \"" + shown(a.value()) +
                       "\"; the schema's elements have none: remove xmlns");
          continue;
        }
        std::string allowed;
        for (const Attr& x : known) allowed += (allowed.empty() ? "" : ", ") + std::string(x.name);
        error(n, "unknown attribute '" + shown(a.name()) + "' on <" + n.name() + ">; " +
                     (allowed.empty() ? std::string("<") + n.name() + "> takes no attributes" : "allowed here: " + allowed));
        continue;
      }
      if (const std::string why = text_problem(k->text, a.value()); !why.empty()) {
        error(n, "attribute '" + std::string(a.name()) + "' of <" + n.name() + "> is \"" + shown(a.value()) +
                     "\": " + why);
        bad_value = true;
      }
    }
    if (bad_value) throw Skip{};
  }
  /// Checks the children of `n`: each element not in `allowed` is an error naming those allowed
  /// here (none: the element holds attributes only), and so is text where the schema has none.
  /// Returns whether all were fine.
  bool check_children(const pugi::xml_node& n, std::initializer_list<const char*> allowed, bool text_allowed = false) {
    bool ok = true;
    std::string list;
    for (const char* x : allowed) list += (list.empty() ? "" : ", ") + std::string(x);
    for (const pugi::xml_node c : n.children()) {
      if (c.type() == pugi::node_element) {
        bool known = false;
        for (const char* x : allowed) known = known || std::strcmp(c.name(), x) == 0;
        if (known) continue;
        error(c, "unknown element <" + shown(c.name()) + "> in <" + n.name() + ">; " +
                     (text_allowed   ? std::string("<") + n.name() + "> holds text only"
                      : list.empty() ? std::string("<") + n.name() + "> holds attributes only, no elements"
                                     : "allowed here: " + list));
        ok = false;
      } else if ((c.type() == pugi::node_pcdata || c.type() == pugi::node_cdata) && !text_allowed) {
        // Whitespace between elements is fine; an element of attributes alone holds none.
        const std::string t = c.value();
        if (!list.empty() && t.find_first_not_of(" \t\r\n") == std::string::npos) continue;
        const std::string what = trimmed(t).empty() ? std::string("white space") : "text \"" + shown(trimmed(t)) + "\"";
        const std::size_t lead = trimmed(t).empty() ? 0 : t.find_first_not_of(" \t\r\n");
        errors_.push_back(InputError(loc_.at(c.offset_debug() + static_cast<std::ptrdiff_t>(lead)), what + " in <" + n.name() + ">; " +
                     (list.empty() ? std::string("<") + n.name() + "> holds attributes only"
                                   : "only the elements " + list + " go here")));
        ok = false;
      }
    }
    return ok;
  }
  void warn(const pugi::xml_node& n, const std::string& what) {
    if (warnings_) warnings_->push_back(loc_.at(n).str() + ": warning: " + what);
  }

  std::string required(const pugi::xml_node& n, const char* attr) const {
    const pugi::xml_attribute a = n.attribute(attr);
    if (!a) fail(n, std::string("<") + n.name() + "> needs attribute '" + attr + "'");
    std::string v = a.value();
    if (v.empty()) fail(n, std::string("attribute '") + attr + "' of <" + n.name() + "> is empty");
    return v;
  }
  std::string optional(const pugi::xml_node& n, const char* attr, const std::string& def = "") const {
    const pugi::xml_attribute a = n.attribute(attr);
    return a ? std::string(a.value()) : def;
  }
  double number(const pugi::xml_node& n, const char* attr) const {
    return to_number(n, attr, required(n, attr));
  }
  double number_or(const pugi::xml_node& n, const char* attr, double def) const {
    const pugi::xml_attribute a = n.attribute(attr);
    return a ? to_number(n, attr, a.value()) : def;
  }
  double to_number(const pugi::xml_node& n, const char* attr, const std::string& v) const {
    try {
      return parse_number(v, std::string("attribute '") + attr + "'");
    } catch (const InputError& e) {
      fail(n, e.message() + " on <" + n.name() + ">");
    }
  }
  double in_range(const pugi::xml_node& n, const char* attr, double v, double lo, double hi) const {
    if (!(v >= lo && v <= hi)) {
      // The value as the file writes it when it is the attribute's own (not a converted one).
      const pugi::xml_attribute a = n.attribute(attr);
      std::ostringstream ss;
      ss << "attribute '" << attr << "' of <" << n.name() << "> is ";
      if (a && number_text(a.value()) == v) {
        ss << shown(a.value());
      } else {
        ss << v;
      }
      ss << ", expected " << lo << " to " << hi;
      fail(n, ss.str());
    }
    return v;
  }
  int integer(const pugi::xml_node& n, const char* attr, int def) const {
    const pugi::xml_attribute a = n.attribute(attr);
    if (!a) return def;
    const double v = to_number(n, attr, a.value());
    if (v != std::floor(v) || std::fabs(v) > 16) {
      fail(n, std::string("attribute '") + attr + "' of <" + n.name() + "> must be a whole number");
    }
    return static_cast<int>(v);
  }
  Amount amount(const pugi::xml_node& n, const char* attr) const {
    const std::string v = required(n, attr);
    Amount a;
    try {
      a = parse_amount(v);
    } catch (const InputError& e) {
      fail(n, "attribute '" + std::string(attr) + "': " + e.message());
    }
    // Files are read as strictly as their schema: a number, at most one space, and the unit
    // spelled as the schema spells it (the command line is more lenient).
    const std::string canon = unit_symbol(a.unit);
    std::string number = v.size() >= canon.size() && v.compare(v.size() - canon.size(), canon.size(), canon) == 0
                             ? v.substr(0, v.size() - canon.size())
                             : std::string("?");
    if (!number.empty() && number.back() == ' ') number.pop_back();
    const bool plain = !number.empty() && number.find_first_not_of("0123456789.eE+-") == std::string::npos &&
                       (std::isdigit(static_cast<unsigned char>(number[0])) || number[0] == '.');
    if (!plain) {
      fail(n, "attribute '" + std::string(attr) + "' is \"" + v + "\": write a number, at most one space " +
                  "and the unit as the schema spells it (" + canon + "; units: M, mM, uM, mol/kg, mg/mL, " +
                  "g/L, ug/mL, %w/v)");
    }
    return a;
  }
  // The attribute's text as a number, if it is one.
  static std::optional<double> number_text(const char* text) {
    try {
      return parse_number(text, "");
    } catch (const InputError&) {
      return std::nullopt;
    }
  }
  double temperature(const pugi::xml_node& n, const char* attr, double def) const {
    const double t = number_or(n, attr, def);
    return in_range(n, attr, t, -10.0, 100.0);
  }

 private:
  Locator loc_;
  Warnings* warnings_;
  pugi::xml_document doc_;
  std::vector<InputError> errors_;
  bool skipped_ = false;
};

Pka read_pka(Reader& r, const pugi::xml_node& n);
/// Refuses pKa values out of ascending order (one error each) and warns where two cross.
void check_ascending(Reader& r, const std::vector<Pka>& pkas, const std::vector<pugi::xml_node>& nodes);
/// The 'unit' attribute alone (the value is in 'value').
Amount unit_attribute(Reader& r, const pugi::xml_node& n);
double formula_mass(Reader& r, const pugi::xml_node& n, const std::string& formula);

}  // namespace pkarta::xml_detail

#endif  // PKARTA_SRC_IO_XML_READER_H_
