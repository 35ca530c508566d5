#include "pkarta/io/compound_xml_edit.h"

#include <pugixml.hpp>

#include <cctype>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <map>

#include "pkarta/base/error.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/text_file.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {

namespace {

std::string format_g(double v, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

std::string format_f(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}


// The start tag of an element in the original text: [begin, end) from '<' to just past '>'.
struct TagSpan {
  std::size_t begin = 0;
  std::size_t end = 0;
};

TagSpan tag_span(const std::string& text, const pugi::xml_node& n, const std::string& file) {
  const std::ptrdiff_t o = n.offset_debug();
  if (o <= 0 || static_cast<std::size_t>(o) > text.size() || text[o - 1] != '<' ||
      text.compare(static_cast<std::size_t>(o), std::strlen(n.name()), n.name()) != 0) {
    throw InputError(SourceLocation{file, 0, 0}, std::string("cannot locate <") + n.name() + "> in the file text");
  }
  TagSpan t;
  t.begin = static_cast<std::size_t>(o - 1);
  char quote = 0;
  for (std::size_t i = static_cast<std::size_t>(o); i < text.size(); ++i) {
    const char c = text[i];
    if (quote) {
      if (c == quote) quote = 0;
    } else if (c == '"' || c == '\'') {
      quote = c;
    } else if (c == '>') {
      t.end = i + 1;
      return t;
    }
  }
  throw InputError(SourceLocation{file, 0, 0}, std::string("unterminated <") + n.name() + "> tag");
}

// One attribute of a start tag's text: [space, value_end + 1) covers it with its leading
// whitespace; the value lies in [value_begin, value_end).
struct TagAttribute {
  std::string name;
  std::size_t space = 0;
  std::size_t value_begin = 0;
  std::size_t value_end = 0;
};

std::vector<TagAttribute> tag_attributes(const std::string& tag) {
  std::vector<TagAttribute> out;
  std::size_t i = 1;  // past '<'
  while (i < tag.size() && !std::isspace(static_cast<unsigned char>(tag[i])) && tag[i] != '/' && tag[i] != '>') ++i;
  while (i < tag.size()) {
    const std::size_t space = i;
    while (i < tag.size() && std::isspace(static_cast<unsigned char>(tag[i]))) ++i;
    if (i >= tag.size() || tag[i] == '/' || tag[i] == '>') break;
    TagAttribute a;
    a.space = space;
    while (i < tag.size() && tag[i] != '=' && !std::isspace(static_cast<unsigned char>(tag[i]))) a.name += tag[i++];
    while (i < tag.size() && (tag[i] == '=' || std::isspace(static_cast<unsigned char>(tag[i])))) ++i;
    if (i >= tag.size() || (tag[i] != '"' && tag[i] != '\'')) break;  // not well-formed: pugixml would have refused
    const char quote = tag[i++];
    a.value_begin = i;
    while (i < tag.size() && tag[i] != quote) ++i;
    a.value_end = i;
    ++i;
    out.push_back(a);
  }
  return out;
}

// Sets (or adds) attribute `name` in a start tag's text, keeping its quotes and the layout.
void set_tag_attribute(std::string& tag, const std::string& name, const std::string& value) {
  for (const TagAttribute& a : tag_attributes(tag)) {
    if (a.name == name) {
      tag.replace(a.value_begin, a.value_end - a.value_begin, value);
      return;
    }
  }
  std::size_t at = tag.size() - 1;  // before '>'
  if (at > 0 && tag[at - 1] == '/') --at;
  while (at > 0 && std::isspace(static_cast<unsigned char>(tag[at - 1]))) --at;
  tag.insert(at, " " + name + "=\"" + value + "\"");
}

void remove_tag_attribute(std::string& tag, const std::string& name) {
  for (const TagAttribute& a : tag_attributes(tag)) {
    if (a.name == name) {
      tag.erase(a.space, a.value_end + 1 - a.space);
      return;
    }
  }
}

}  // namespace

std::string edit_compound_xml(const std::string& compound_path,
                              const std::vector<CompoundValueEdit>& values,
                              double molar_mass_g_per_mol, double s0_ref_temperature_C,
                              const std::string& comment, const Library& library) {
  std::string text = read_text_file(compound_path);
  pugi::xml_document doc;
  // No end-of-line or escape rewriting: node offsets must match the text edited below.
  const pugi::xml_parse_result pr = doc.load_buffer(text.data(), text.size(),
                                                    pugi::parse_minimal | pugi::parse_comments,
                                                    pugi::encoding_utf8);
  if (!pr) throw InputError(SourceLocation{compound_path, 0, 0}, std::string("malformed XML: ") + pr.description());
  const pugi::xml_node root = doc.child("compound");
  if (!root) throw InputError(SourceLocation{compound_path, 0, 0}, "no <compound> element");
  std::vector<pugi::xml_node> pkas;
  for (pugi::xml_node n : root.children("pka")) pkas.push_back(n);

  // New start tags, keyed by their position in the text.
  std::map<std::size_t, std::pair<TagSpan, std::string>> edits;
  auto tag_of = [&](const pugi::xml_node& n) -> std::string& {
    const TagSpan span = tag_span(text, n, compound_path);
    auto it = edits.find(span.begin);
    if (it == edits.end()) {
      it = edits.emplace(span.begin, std::make_pair(span, text.substr(span.begin, span.end - span.begin))).first;
    }
    return it->second.second;
  };
  for (const CompoundValueEdit& p : values) {
    const bool se = std::isfinite(p.sd) && p.sd > 0;
    switch (p.kind) {
      case CompoundValueEdit::Kind::kPka: {
        if (p.pka_index >= static_cast<int>(pkas.size())) break;
        std::string& tag = tag_of(pkas[p.pka_index]);
        set_tag_attribute(tag, "value", format_f(p.value, 3));
        if (se) set_tag_attribute(tag, "sd", format_g(p.sd, 2));
        break;
      }
      case CompoundValueEdit::Kind::kIntrinsicSolubility: {
        const pugi::xml_node s = root.child("intrinsic-solubility");
        if (!s) break;
        const Amount unit = parse_amount(std::string("1") + s.attribute("unit").value());
        const double per_unit = unit.to_mol_per_L(molar_mass_g_per_mol, s0_ref_temperature_C);
        std::string& tag = tag_of(s);
        set_tag_attribute(tag, "value", format_g(p.value / per_unit, 4));
        if (se) set_tag_attribute(tag, "log-sd", format_g(p.sd, 2));
        break;
      }
      case CompoundValueEdit::Kind::kSaltKsp: {
        for (const pugi::xml_node s : root.children("salt")) {
          if (p.salt_id != s.attribute("id").value()) continue;
          std::string& tag = tag_of(s);
          remove_tag_attribute(tag, "solubility-in-water");
          set_tag_attribute(tag, "ksp", format_g(p.value, 4));
        }
        break;
      }
    }
  }
  // Apply from the end so that earlier positions stay valid.
  for (auto it = edits.rbegin(); it != edits.rend(); ++it) {
    const TagSpan& span = it->second.first;
    text.replace(span.begin, span.end - span.begin, it->second.second);
  }
  // The comment on its own line above the <compound> element.
  std::string note = "<!-- " + comment + " -->";
  for (std::size_t i = 4; (i = note.find("--", i)) != std::string::npos && i + 3 < note.size();) {
    note.replace(i, 2, "- -");
  }
  const std::size_t root_at = tag_span(text, root, compound_path).begin;
  text.insert(root_at, note + "\n");
  try {
    parse_compound(text, compound_path, library, nullptr);
  } catch (const InputError& e) {
    throw InputError(SourceLocation{compound_path, 0, 0},
                     "the fitted values do not make a valid compound file: " + e.message());
  }
  return text;
}

}  // namespace pkarta
