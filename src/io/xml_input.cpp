#include "pkarta/io/xml_input.h"

#include <pugixml.hpp>

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/io/text_file.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/solubility_csv.h"

namespace pkarta {

namespace detail {
extern const char kBuiltinLibraryXml[];
extern const std::size_t kBuiltinLibraryXmlSize;
}  // namespace detail

namespace {

std::string hex_byte(char c) {
  static const char* const kDigits = "0123456789ABCDEF";
  const auto u = static_cast<unsigned char>(c);
  return std::string("0x") + kDigits[u >> 4] + kDigits[u & 15];
}

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

  [[noreturn]] void fail(const pugi::xml_node& n, const std::string& what) const {
    throw InputError(loc_.at(n), what);
  }

  void check_attributes(const pugi::xml_node& n, std::initializer_list<const char*> known) {
    for (const pugi::xml_attribute a : n.attributes()) {
      bool ok = false;
      for (const char* k : known) ok = ok || std::strcmp(a.name(), k) == 0;
      if (!ok && warnings_) {
        warnings_->push_back(loc_.at(n).str() + ": warning: unknown attribute '" + a.name() +
                             "' on <" + n.name() + "> ignored");
      }
    }
  }
  void warn(const pugi::xml_node& n, const std::string& what) {
    if (warnings_) warnings_->push_back(loc_.at(n).str() + ": warning: " + what);
  }
  void unknown_element(const pugi::xml_node& n) {
    if (warnings_) {
      warnings_->push_back(loc_.at(n).str() + ": warning: unknown element <" + n.name() +
                           "> ignored");
    }
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
      std::ostringstream ss;
      ss << "attribute '" << attr << "' of <" << n.name() << "> is " << v << ", expected " << lo
         << " to " << hi;
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
  double temperature(const pugi::xml_node& n, const char* attr, double def) const {
    const double t = number_or(n, attr, def);
    return in_range(n, attr, t, -10.0, 100.0);
  }

 private:
  Locator loc_;
  Warnings* warnings_;
  pugi::xml_document doc_;
};

Pka read_pka(Reader& r, const pugi::xml_node& n) {
  r.check_attributes(n, {"value", "type", "dH", "dCp", "temperature", "sd", "source", "ionic-strength",
                         "scale", "electrolyte"});
  Pka p;
  p.where = r.at(n);
  p.value = r.in_range(n, "value", r.number(n, "value"), -5.0, 20.0);
  const std::string type = r.required(n, "type");
  if (type == "acid") p.type = GroupType::kAcid;
  else if (type == "base") p.type = GroupType::kBase;
  else r.fail(n, "attribute 'type' of <pka> is \"" + type + "\", expected acid or base");
  p.dH_kJ_per_mol = r.in_range(n, "dH", r.number_or(n, "dH", 0.0), -200.0, 200.0);
  p.dCp_J_per_K_mol = r.in_range(n, "dCp", r.number_or(n, "dCp", 0.0), -2000.0, 2000.0);
  p.ref_temperature_C = r.temperature(n, "temperature", 25.0);
  p.sd = r.in_range(n, "sd", r.number_or(n, "sd", 0.0), 0.0, 5.0);
  // Apparent constants: converted to thermodynamic by AcidBaseSystem::to_thermodynamic() once
  // every group's type (hence every species' charge) is known.
  p.stated_value = p.value;
  const std::string scale = r.optional(n, "scale", "thermodynamic");
  if (scale == "concentration") p.stated_scale = PkaScale::kConcentration;
  else if (scale == "mixed") p.stated_scale = PkaScale::kMixed;
  else if (scale != "thermodynamic") {
    r.fail(n, "attribute 'scale' of <pka> is \"" + scale + "\", expected thermodynamic, concentration or mixed");
  }
  // Davies is a fair activity model to about I = 0.5 mol/L (Davies 1962).
  p.stated_ionic_strength_mol_per_L = r.in_range(n, "ionic-strength", r.number_or(n, "ionic-strength", 0.0), 0.0, 0.5);
  p.stated_electrolyte = r.optional(n, "electrolyte", "");
  if (p.is_apparent() && !(p.stated_ionic_strength_mol_per_L > 0)) {
    r.fail(n, "<pka> with scale=\"" + scale + "\" needs ionic-strength (mol/L, > 0) of the measurement");
  }
  if (!p.is_apparent() && (p.stated_ionic_strength_mol_per_L > 0 || !p.stated_electrolyte.empty())) {
    r.fail(n, "<pka> states an ionic strength or electrolyte but no scale: give scale=\"concentration\" "
              "or scale=\"mixed\" (an apparent constant), or remove them (a thermodynamic constant)");
  }
  return p;
}

void check_ascending(Reader& r, const std::vector<Pka>& pkas, const std::vector<pugi::xml_node>& nodes) {
  for (std::size_t i = 1; i < pkas.size(); ++i) {
    if (!(pkas[i].value > pkas[i - 1].value)) {
      std::ostringstream ss;
      ss << "pKa values must be in ascending order (" << pkas[i].value << " follows "
         << pkas[i - 1].value << ")";
      r.fail(nodes[i], ss.str());
    }
  }
  // Ascending at their reference temperature, two constants may still cross within the 0-60 °C
  // the pKa(T) data cover (different dH and dCp): warn, giving where they are out of order.
  for (std::size_t i = 1; i < pkas.size() && i < nodes.size(); ++i) {
    double first = -1.0, last = -1.0, at_first_lower = 0.0, at_first_upper = 0.0;
    for (int step = 0; step <= 120; ++step) {
      const double t = 0.5 * step;
      const double lower = pkas[i - 1].at(t), upper = pkas[i].at(t);
      if (upper > lower) continue;
      if (first < 0) {
        first = t;
        at_first_lower = lower;
        at_first_upper = upper;
      }
      last = t;
    }
    if (first < 0) continue;
    std::ostringstream ss;
    ss << "pKa " << i + 1 << " (" << pkas[i].value << ") and pKa " << i << " (" << pkas[i - 1].value
       << ") cross by their temperature dependence: out of order from " << first << " to " << last
       << " °C (at " << first << " °C " << fixed(at_first_upper, 2) << " and " << fixed(at_first_lower, 2)
       << "); the macroscopic model, its constants in ascending order, no longer holds there";
    r.warn(nodes[i], ss.str());
  }
  if (pkas.size() > static_cast<std::size_t>(kMaxPka)) {
    r.fail(nodes[kMaxPka], "at most " + std::to_string(kMaxPka) + " pKa values are supported");
  }
}

// The 'unit' attribute alone (the value is in 'value'); the solubility CSV reads its 'unit'
// column with the same parse_unit, so both accept and refuse the same texts.
Amount unit_attribute(Reader& r, const pugi::xml_node& n) {
  const std::string unit = r.required(n, "unit");
  Amount a;
  a.value = 1.0;
  try {
    a.unit = parse_unit(unit, "attribute 'unit'");
  } catch (const InputError& e) {
    r.fail(n, e.message());
  }
  if (unit != unit_symbol(a.unit)) {
    r.fail(n, "attribute 'unit' is \"" + unit + "\": write it as the schema spells it, " +
                  unit_symbol(a.unit) + " (units: M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v)");
  }
  return a;
}

double formula_mass(Reader& r, const pugi::xml_node& n, const std::string& formula) {
  try {
    return molar_mass_g_per_mol(formula);
  } catch (const InputError& e) {
    r.fail(n, e.message());
  }
}

}  // namespace

Library parse_library(const std::string& text, const std::string& name, const Library* base,
                      Warnings* warnings) {
  Reader r(text, name, warnings);
  const pugi::xml_node root = r.root("library");
  r.check_attributes(root, {"id", "version", "name"});
  Library lib;
  lib.id = r.optional(root, "id", name);
  lib.version = r.optional(root, "version", "");
  lib.name = r.optional(root, "name", "");
  lib.files.push_back(name);

  std::set<std::string> seen;
  auto unique = [&](const pugi::xml_node& n, const char* kind, const std::string& id) {
    if (!seen.insert(std::string(kind) + ":" + id).second) {
      r.fail(n, std::string("duplicate ") + kind + " id '" + shown(id) + "'");
    }
  };
  // Pass 1: ions and systems (referenced by everything else).
  for (const pugi::xml_node n : root.children()) {
    if (n.type() != pugi::node_element) continue;
    const std::string tag = n.name();
    if (tag == "ion") {
      r.check_attributes(n, {"id", "charge", "formula", "molar-mass", "name"});
      Ion ion;
      ion.id = r.required(n, "id");
      unique(n, "ion", ion.id);
      ion.name = r.optional(n, "name", ion.id);
      ion.charge = r.integer(n, "charge", 0);
      if (!n.attribute("charge")) r.fail(n, "<ion> needs attribute 'charge'");
      if (n.attribute("molar-mass")) {
        ion.molar_mass_g_per_mol = r.in_range(n, "molar-mass", r.number(n, "molar-mass"), 0.5, 5000);
      } else if (n.attribute("formula")) {
        ion.molar_mass_g_per_mol = formula_mass(r, n, r.required(n, "formula"));
      } else {
        r.fail(n, "<ion> needs a 'formula' or a 'molar-mass'");
      }
      lib.ions[ion.id] = ion;
    } else if (tag == "system") {
      r.check_attributes(n, {"id", "name", "source", "permanent-charge"});
      AcidBaseSystem s;
      s.id = r.required(n, "id");
      unique(n, "system", s.id);
      s.name = r.optional(n, "name", s.id);
      s.source = r.optional(n, "source", "");
      s.permanent_charge = r.integer(n, "permanent-charge", 0);
      std::vector<pugi::xml_node> nodes;
      for (const pugi::xml_node c : n.children()) {
        if (c.type() != pugi::node_element) continue;
        if (std::strcmp(c.name(), "pka") == 0) {
          s.pkas.push_back(read_pka(r, c));
          nodes.push_back(c);
        } else {
          r.unknown_element(c);
        }
      }
      if (s.pkas.empty()) r.fail(n, "<system> '" + shown(s.id) + "' has no <pka>");
      s.to_thermodynamic();
      check_ascending(r, s.pkas, nodes);
      lib.systems[s.id] = s;
    }
  }
  auto has_system = [&](const std::string& id) {
    return lib.systems.count(id) || (base && base->systems.count(id));
  };
  auto has_ion = [&](const std::string& id) { return lib.ions.count(id) || (base && base->ions.count(id)); };
  // Pass 2: reagents.
  for (const pugi::xml_node n : root.children("reagent")) {
    r.check_attributes(n, {"id", "formula", "name", "state", "molar-mass"});
    Reagent g;
    g.id = r.required(n, "id");
    unique(n, "reagent", g.id);
    g.name = r.optional(n, "name", g.id);
    g.formula = r.required(n, "formula");
    g.state = r.optional(n, "state", "solid");
    if (g.state != "solid" && g.state != "liquid" && g.state != "solution") {
      r.fail(n, "attribute 'state' is \"" + g.state + "\", expected solid, liquid or solution");
    }
    g.molar_mass_g_per_mol = formula_mass(r, n, g.formula);
    for (const pugi::xml_node c : n.children()) {
      if (c.type() != pugi::node_element) continue;
      if (std::strcmp(c.name(), "gives") != 0) {
        r.unknown_element(c);
        continue;
      }
      r.check_attributes(c, {"system", "ion", "count"});
      Contribution k;
      const bool sys = static_cast<bool>(c.attribute("system"));
      const bool ion = static_cast<bool>(c.attribute("ion"));
      if (sys == ion) r.fail(c, "<gives> needs exactly one of 'system' or 'ion'");
      k.kind = sys ? Contribution::Kind::kSystem : Contribution::Kind::kIon;
      k.id = r.required(c, sys ? "system" : "ion");
      k.count = r.in_range(c, "count", r.number_or(c, "count", 1.0), 1e-6, 100.0);
      if (sys && !has_system(k.id)) r.fail(c, "unknown system '" + shown(k.id) + "'");
      if (!sys && !has_ion(k.id)) r.fail(c, "unknown ion '" + shown(k.id) + "'");
      g.gives.push_back(k);
    }
    lib.reagents[g.id] = g;
  }
  auto has_reagent = [&](const std::string& id) {
    return lib.reagents.count(id) || (base && base->reagents.count(id));
  };
  auto reagent_mass = [&](const std::string& id) {
    auto it = lib.reagents.find(id);
    if (it != lib.reagents.end()) return it->second.molar_mass_g_per_mol;
    return base->reagents.at(id).molar_mass_g_per_mol;
  };
  // Pass 3: buffers and media; unknown top-level elements.
  for (const pugi::xml_node n : root.children()) {
    if (n.type() != pugi::node_element) continue;
    const std::string tag = n.name();
    if (tag == "buffer") {
      r.check_attributes(n, {"id", "system", "name", "routes", "max-conc", "acid-titrant",
                             "base-titrant", "acid-reagent", "base-reagent"});
      Buffer b;
      b.id = r.required(n, "id");
      unique(n, "buffer", b.id);
      b.name = r.optional(n, "name", b.id);
      b.system = r.required(n, "system");
      if (!has_system(b.system)) r.fail(n, "unknown system '" + shown(b.system) + "'");
      std::istringstream routes(r.optional(n, "routes", "oral"));
      for (std::string w; routes >> w;) {
        if (w != "oral" && w != "parenteral" && w != "ophthalmic" && w != "topical") {
          r.fail(n, "unknown route '" + shown(w) + "', expected oral, parenteral, ophthalmic or topical");
        }
        b.routes.push_back(w);
      }
      if (n.attribute("max-conc")) {
        const Amount a = r.amount(n, "max-conc");
        if (a.is_mass_based()) r.fail(n, "max-conc must be in M, mM or mol/kg");
        b.max_conc_mol_per_L = a.to_mol_per_L(0.0, 25.0);
        r.in_range(n, "max-conc", b.max_conc_mol_per_L, 1e-5, 5.0);
      }
      b.acid_titrant = r.optional(n, "acid-titrant", "HCl");
      b.base_titrant = r.optional(n, "base-titrant", "NaOH");
      b.acid_reagent = r.optional(n, "acid-reagent", "");
      b.base_reagent = r.optional(n, "base-reagent", "");
      for (const std::string* id : {&b.acid_titrant, &b.base_titrant, &b.acid_reagent, &b.base_reagent}) {
        if (!id->empty() && !has_reagent(*id)) r.fail(n, "unknown reagent '" + shown(*id) + "'");
      }
      lib.buffers[b.id] = b;
    } else if (tag == "medium") {
      r.check_attributes(n, {"id", "name", "source", "nominal-pH"});
      Medium m;
      m.id = r.required(n, "id");
      unique(n, "medium", m.id);
      m.name = r.optional(n, "name", m.id);
      m.source = r.optional(n, "source", "");
      m.nominal_pH = r.optional(n, "nominal-pH", "");
      for (const pugi::xml_node c : n.children()) {
        if (c.type() != pugi::node_element) continue;
        if (std::strcmp(c.name(), "add") != 0) {
          r.unknown_element(c);
          continue;
        }
        r.check_attributes(c, {"reagent", "amount"});
        const std::string id = r.required(c, "reagent");
        if (!has_reagent(id)) r.fail(c, "unknown reagent '" + shown(id) + "'");
        const Amount a = r.amount(c, "amount");
        const double conc = a.to_mol_per_L(reagent_mass(id), 25.0);
        if (!(conc <= 10.0)) {  // mol/L: the range the model covers
          std::ostringstream ss;
          ss << "attribute 'amount' of <add> is " << conc << " mol/L, beyond the 10 mol/L the model covers";
          r.fail(c, ss.str());
        }
        m.reagents_mol_per_L.emplace_back(id, conc);
      }
      lib.media[m.id] = m;
    } else if (tag != "ion" && tag != "system" && tag != "reagent") {
      r.unknown_element(n);
    }
  }
  return lib;
}

Library load_library_file(const std::string& path, const Library* base, Warnings* warnings) {
  return parse_library(read_text_file(path), path, base, warnings);
}

std::string builtin_library_xml() {
  return std::string(detail::kBuiltinLibraryXml, detail::kBuiltinLibraryXmlSize);
}

Library builtin_library() {
  Library lib = parse_library(builtin_library_xml(), "<built-in library>", nullptr, nullptr);
  return lib;
}

Compound parse_compound(const std::string& text, const std::string& name, const Library& library,
                        Warnings* warnings) {
  Reader r(text, name, warnings);
  const pugi::xml_node root = r.root("compound");
  r.check_attributes(root, {"id", "name", "molar-mass", "permanent-charge"});
  Compound c;
  c.file = name;
  c.id = r.required(root, "id");
  c.name = r.optional(root, "name", c.id);
  c.molar_mass_g_per_mol = r.in_range(root, "molar-mass", r.number(root, "molar-mass"), 1.0, 1e6);
  c.system.id = c.id;
  c.system.name = c.name;
  c.system.permanent_charge = r.integer(root, "permanent-charge", 0);
  std::vector<pugi::xml_node> pka_nodes, salt_nodes;
  pugi::xml_node s0_node;
  for (const pugi::xml_node n : root.children()) {
    if (n.type() != pugi::node_element) continue;
    const std::string tag = n.name();
    if (tag == "description") {
      c.description = n.text().get();
    } else if (tag == "pka") {
      c.system.pkas.push_back(read_pka(r, n));
      pka_nodes.push_back(n);
    } else if (tag == "intrinsic-solubility") {
      if (s0_node) r.fail(n, "a second <intrinsic-solubility>; give one");
      s0_node = n;
      r.check_attributes(n, {"value", "unit", "temperature", "dH", "log-sd", "source", "ionic-strength",
                             "electrolyte"});
      const double v = r.number(n, "value");
      if (!(v > 0)) r.fail(n, "intrinsic solubility must be > 0, got " + r.required(n, "value"));
      Amount a = unit_attribute(r, n);
      a.value = v;
      c.s0_ref_temperature_C = r.temperature(n, "temperature", 25.0);
      c.s0_mol_per_L = a.to_mol_per_L(c.molar_mass_g_per_mol, c.s0_ref_temperature_C);
      r.in_range(n, "value", c.s0_mol_per_L, 1e-15, 10.0);
      if (n.attribute("dH")) c.s0_dH_kJ_per_mol = r.in_range(n, "dH", r.number(n, "dH"), -200, 200);
      c.s0_log_sd = r.in_range(n, "log-sd", r.number_or(n, "log-sd", 0.0), 0.0, 5.0);
      c.s0_stated_ionic_strength_mol_per_L =
          r.in_range(n, "ionic-strength", r.number_or(n, "ionic-strength", 0.0), 0.0, 0.5);
      c.s0_stated_electrolyte = r.optional(n, "electrolyte", "");
      c.has_intrinsic_solubility = true;
    } else if (tag == "salt") {
      r.check_attributes(n, {"id", "counterion", "counterion-charge", "stoichiometry", "ksp",
                             "solubility-in-water", "molar-mass", "temperature", "dH", "source"});
      Salt s;
      s.where = r.at(n);
      s.id = r.required(n, "id");
      if (s.id == "free" || s.id == "none") r.fail(n, "salt id '" + s.id + "' is reserved");
      for (const Salt& o : c.salts) {
        if (o.id == s.id) r.fail(n, "duplicate salt id '" + s.id + "'");
      }
      s.counterion = r.required(n, "counterion");
      // A counterion is a strong ion of the library, or (with counterion-charge) the species of
      // that charge of a library acid-base system: a weak-acid or weak-base counterion.
      s.counterion_is_system = static_cast<bool>(n.attribute("counterion-charge"));
      auto it = library.ions.find(s.counterion);
      int zc = 0;
      if (s.counterion_is_system) {
        auto sys = library.systems.find(s.counterion);
        if (sys == library.systems.end()) {
          r.fail(n, "counterion '" + s.counterion + "' of salt '" + s.id +
                        "' is not an acid-base system of the library (counterion-charge names a "
                        "species of a system)");
        }
        zc = r.integer(n, "counterion-charge", 0);
        const int cj = sys->second.z0() - zc;
        if (zc == 0 || cj < 0 || cj > static_cast<int>(sys->second.pkas.size())) {
          std::string charges;
          for (int j = 0; j <= static_cast<int>(sys->second.pkas.size()); ++j) {
            if (sys->second.charge_of(j) == 0) continue;
            charges += (charges.empty() ? "" : ", ") + std::to_string(sys->second.charge_of(j)) + " (" +
                       sys->second.species_label(j) + ")";
          }
          r.fail(n, "attribute 'counterion-charge' of <salt> is '" +
                        std::string(n.attribute("counterion-charge").value()) + "': the system '" +
                        s.counterion + "' has no " + (zc == 0 ? "charged " : "") +
                        "species of that charge (its charged species: " + charges + ")");
        }
        s.counterion_charge = zc;
      } else if (it == library.ions.end()) {
        r.fail(n, "counterion '" + s.counterion + "' of salt '" + s.id + "' is not an ion of the library" +
                      (library.systems.count(s.counterion) != 0
                           ? std::string(" (it is an acid-base system: give counterion-charge to "
                                         "name its species, e.g. -1)")
                           : std::string()));
      } else {
        zc = it->second.charge;
      }
      if (n.attribute("stoichiometry")) {
        // "m:n", drug : counterion, each a whole number 1..8.
        const std::string text = n.attribute("stoichiometry").value();
        const std::size_t colon = text.find(':');
        auto whole = [](const std::string& t, int* v) {
          if (t.empty() || t.size() > 1 || t[0] < '1' || t[0] > '8') return false;
          *v = t[0] - '0';
          return true;
        };
        if (colon == std::string::npos || !whole(text.substr(0, colon), &s.drug_count) ||
            !whole(text.substr(colon + 1), &s.counterion_count)) {
          r.fail(n, "attribute 'stoichiometry' of <salt> is '" + text +
                        "', expected drug:counterion as two whole numbers 1 to 8, e.g. 1:2");
        }
      } else if (zc != 1 && zc != -1) {
        r.fail(n, "counterion '" + s.counterion + "' has charge " + std::to_string(zc) +
                      "; only 1:1 salts with a monovalent counterion are assumed without a "
                      "'stoichiometry' attribute (drug:counterion, e.g. 2:1)");
      }
      if (zc == 0 || (zc * s.counterion_count) % s.drug_count != 0) {
        r.fail(n, "salt '" + s.id + "': the charges cannot balance: " + s.stoichiometry() +
                      " with " + s.counterion + " (charge " + std::to_string(zc) +
                      ") needs a drug charge of " + std::to_string(-zc * s.counterion_count) + "/" +
                      std::to_string(s.drug_count) + " (drug charge x m + counterion charge x n = 0)");
      }
      for (const Salt& o : c.salts) {
        if (o.counterion == s.counterion && o.drug_count * s.counterion_count == o.counterion_count * s.drug_count) {
          r.fail(n, "salts '" + o.id + "' and '" + s.id + "' share the counterion " + s.counterion +
                        " and the stoichiometry " + s.stoichiometry() +
                        "; give one salt per counterion and stoichiometry");
        }
      }
      if (c.salts.size() >= static_cast<std::size_t>(kMaxSalts)) {
        r.fail(n, "more than " + std::to_string(kMaxSalts) + " salts; at most " +
                      std::to_string(kMaxSalts) + " are supported");
      }
      salt_nodes.push_back(n);
      const bool has_ksp = static_cast<bool>(n.attribute("ksp"));
      const bool has_sol = static_cast<bool>(n.attribute("solubility-in-water"));
      if (has_ksp == has_sol) r.fail(n, "<salt> needs exactly one of 'ksp' or 'solubility-in-water'");
      s.molar_mass_g_per_mol = r.number_or(n, "molar-mass", 0.0);
      if (n.attribute("molar-mass")) r.in_range(n, "molar-mass", s.molar_mass_g_per_mol, 1.0, 1e6);
      s.ref_temperature_C = r.temperature(n, "temperature", 25.0);
      s.dH_kJ_per_mol = r.in_range(n, "dH", r.number_or(n, "dH", 0.0), -200, 200);
      if (has_ksp) {
        const double k = r.number(n, "ksp");
        if (!(k > 0)) r.fail(n, "ksp must be > 0, got " + r.required(n, "ksp"));
        r.in_range(n, "ksp", k, 1e-40, 100.0);
        s.ksp = k;
      } else {
        s.solubility_in_water_text = r.required(n, "solubility-in-water");
        const Amount a = r.amount(n, "solubility-in-water");
        double mm = s.molar_mass_g_per_mol;
        if (!(mm > 0) && s.counterion_is_system) {
          mm = salt_molar_mass(c, s, library);
        } else if (!(mm > 0) && s.drug_count == 1 && s.counterion_count == 1 && (zc == 1 || zc == -1)) {
          mm = c.molar_mass_g_per_mol + it->second.molar_mass_g_per_mol +
               (it->second.charge < 0 ? 1.008 : -1.008);
        } else if (!(mm > 0)) {
          mm = s.drug_count * (c.molar_mass_g_per_mol + s.drug_charge(zc) * 1.008) +
               s.counterion_count * it->second.molar_mass_g_per_mol;
        }
        const double sol = a.to_mol_per_L(mm, s.ref_temperature_C);
        if (!(sol > 0)) r.fail(n, "solubility-in-water must be > 0");
        r.in_range(n, "solubility-in-water", sol, 1e-12, 10.0);
        s.solubility_in_water_mol_per_L = sol;
      }
      c.salts.push_back(s);
    } else if (tag == "measured-solubility") {
      for (const pugi::xml_node p : n.children()) {
        if (p.type() != pugi::node_element) continue;
        if (std::strcmp(p.name(), "point") != 0) {
          r.unknown_element(p);
          continue;
        }
        r.check_attributes(p, {"pH", "value", "unit", "temperature", "log-sd"});
        MeasuredPoint m;
        m.where = r.at(p);
        m.pH = r.in_range(p, "pH", r.number(p, "pH"), -1.0, 15.0);
        const double v = r.number(p, "value");
        if (!(v > 0)) r.fail(p, "measured solubility must be > 0, got " + r.required(p, "value"));
        Amount a = unit_attribute(r, p);
        a.value = v;
        m.temperature_C = r.temperature(p, "temperature", 25.0);
        if (p.attribute("log-sd")) {
          // As the CSV's log_sd column: 1/sd^2 must stay a finite weight.
          m.log10_sd = r.in_range(p, "log-sd", r.number(p, "log-sd"), kMinFitLog10Sd, 5.0);
        }
        m.solubility_mol_per_L = a.to_mol_per_L(c.molar_mass_g_per_mol, m.temperature_C);
        if (const std::string why = measured_solubility_problem(m.solubility_mol_per_L); !why.empty()) {
          r.fail(p, "measured solubility " + r.required(p, "value") + " " + r.required(p, "unit") + " " + why);
        }
        c.measured.push_back(m);
      }
    } else {
      r.unknown_element(n);
    }
  }
  c.system.to_thermodynamic();
  check_ascending(r, c.system.pkas, pka_nodes);
  if (!c.has_intrinsic_solubility && c.system.neutral_index() >= 0) {
    r.fail(root, "<compound> needs an <intrinsic-solubility> (it has a net-neutral form)");
  }
  if (c.has_intrinsic_solubility && c.system.neutral_index() < 0) {
    r.fail(s0_node, "the compound has no net-neutral form (permanent-charge " +
                        std::to_string(c.system.permanent_charge) +
                        "), so an intrinsic solubility does not apply");
  }
  for (std::size_t k = 0; k < c.salts.size(); ++k) {
    const int zd = c.salts[k].drug_charge(counterion_charge_of(c.salts[k], library));
    const int j = c.system.z0() - zd;
    if (j < 0 || j > static_cast<int>(c.system.pkas.size())) {
      r.fail(salt_nodes[k], "salt '" + c.salts[k].id + "': the compound has no species of charge " +
                                std::to_string(zd) + " to pair " + c.salts[k].stoichiometry() +
                                " with " + c.salts[k].counterion);
    }
  }
  resolve_salt_ksp(c, library);
  return c;
}

Compound load_compound_file(const std::string& path, const Library& library, Warnings* warnings) {
  return parse_compound(read_text_file(path), path, library, warnings);
}

}  // namespace pkarta
