// Reading library files (XML).
#include <set>
#include <sstream>
#include <string>

#include "pkarta/io/xml_input.h"
#include "xml_reader.h"

namespace pkarta {

namespace detail {
extern const char kBuiltinLibraryXml[];
extern const std::size_t kBuiltinLibraryXmlSize;
}  // namespace detail

using xml_detail::Reader;
using xml_detail::Text;

Library parse_library(const std::string& text, const std::string& name, const Library* base,
                      Warnings* warnings) {
  Reader r(text, name, warnings);
  const pugi::xml_node root = r.root("library");
  r.attempt([&] { r.check_attributes(root, {{"id", Text::kId}, {"version", Text::kNonEmpty}, {"name", Text::kNonEmpty}}); });
  // Unknown elements and text between the elements: errors, as the schema's.
  r.check_children(root, {"ion", "system", "reagent", "buffer", "medium"});
  // Each element is read on its own: an error is kept and reading goes on with the next
  // element, so one run names every error of the file. An element that refers to one refused
  // (by its id) is skipped without a second message.
  std::set<std::string> refused;
  auto element = [&](const pugi::xml_node& n, const char* kind, const auto& body) {
    if (!r.attempt(body)) {
      if (const pugi::xml_attribute id = n.attribute("id")) refused.insert(std::string(kind) + ":" + id.value());
    }
  };
  auto known = [&](const char* kind, const std::string& id, bool found) {
    if (!found && refused.count(std::string(kind) + ":" + id) != 0) throw xml_detail::Skip{};
    return found;
  };
  // The children of one element, each read on its own; the element is skipped when one failed.
  auto children = [&](const pugi::xml_node& n, const auto& body) {
    bool ok = true;
    for (const pugi::xml_node c : n.children()) {
      if (c.type() != pugi::node_element) continue;
      ok = r.attempt([&] { body(c); }) && ok;
    }
    if (!ok) throw xml_detail::Skip{};
  };
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
      element(n, "ion", [&] {
        r.check_attributes(n, {{"id", Text::kId}, {"charge", Text::kInteger}, "formula", "molar-mass",
                               {"name", Text::kNonEmpty}});
        r.check_children(n, {});
        Ion ion;
        ion.id = r.required(n, "id");
        unique(n, "ion", ion.id);
        ion.name = r.optional(n, "name", ion.id);
        ion.charge = r.integer(n, "charge", 0);
        if (!n.attribute("charge")) r.fail(n, "<ion> needs attribute 'charge'");
        r.in_range(n, "charge", ion.charge, -4, 4);
        if (n.attribute("molar-mass")) {
          ion.molar_mass_g_per_mol = r.in_range(n, "molar-mass", r.number(n, "molar-mass"), 0.5, 5000);
        } else if (n.attribute("formula")) {
          ion.molar_mass_g_per_mol = formula_mass(r, n, r.required(n, "formula"));
        } else {
          r.fail(n, "<ion> needs a 'formula' or a 'molar-mass'");
        }
        lib.ions[ion.id] = ion;
      });
    } else if (tag == "system") {
      element(n, "system", [&] {
        r.check_attributes(n, {{"id", Text::kId}, {"name", Text::kNonEmpty}, {"source", Text::kNonEmpty},
                               {"permanent-charge", Text::kInteger}});
        r.check_children(n, {"pka"});
        AcidBaseSystem s;
        s.id = r.required(n, "id");
        unique(n, "system", s.id);
        s.name = r.optional(n, "name", s.id);
        s.source = r.optional(n, "source", "");
        s.permanent_charge = r.integer(n, "permanent-charge", 0);
        std::vector<pugi::xml_node> nodes;
        children(n, [&](const pugi::xml_node& c) {
          if (std::strcmp(c.name(), "pka") == 0) {  // another element is refused above
            s.pkas.push_back(read_pka(r, c));
            nodes.push_back(c);
          }
        });
        if (s.pkas.empty()) r.fail(n, "<system> '" + shown(s.id) + "' has no <pka>");
        s.to_thermodynamic();
        check_ascending(r, s.pkas, nodes);
        lib.systems[s.id] = s;
      });
    }
  }
  auto has_system = [&](const std::string& id) {
    return known("system", id, lib.systems.count(id) || (base && base->systems.count(id)));
  };
  auto has_ion = [&](const std::string& id) {
    return known("ion", id, lib.ions.count(id) || (base && base->ions.count(id)));
  };
  // Pass 2: reagents.
  for (const pugi::xml_node n : root.children("reagent")) {
    element(n, "reagent", [&] {
      r.check_attributes(n, {{"id", Text::kId}, "formula", {"name", Text::kNonEmpty}, "state"});
      r.check_children(n, {"gives"});
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
      children(n, [&](const pugi::xml_node& c) {
        if (std::strcmp(c.name(), "gives") != 0) return;  // refused above
        r.check_attributes(c, {{"system", Text::kId}, {"ion", Text::kId}, {"count", Text::kPositiveInteger}});
        r.check_children(c, {});
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
      });
      lib.reagents[g.id] = g;
    });
  }
  auto has_reagent = [&](const std::string& id) {
    return known("reagent", id, lib.reagents.count(id) || (base && base->reagents.count(id)));
  };
  auto reagent_mass = [&](const std::string& id) {
    auto it = lib.reagents.find(id);
    if (it != lib.reagents.end()) return it->second.molar_mass_g_per_mol;
    // has_reagent() found it in `base` (at() is the invariant's check).
    return (base != nullptr ? *base : lib).reagents.at(id).molar_mass_g_per_mol;
  };
  // Pass 3: buffers and media; unknown top-level elements.
  for (const pugi::xml_node n : root.children()) {
    if (n.type() != pugi::node_element) continue;
    const std::string tag = n.name();
    if (tag == "buffer") {
      element(n, "buffer", [&] {
        r.check_attributes(n, {{"id", Text::kId}, {"system", Text::kId}, {"name", Text::kNonEmpty}, "routes",
                               "max-conc", {"acid-titrant", Text::kId}, {"base-titrant", Text::kId},
                               {"acid-reagent", Text::kOptionalId}, {"base-reagent", Text::kOptionalId}});
        r.check_children(n, {});
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
        if (b.routes.empty()) r.fail(n, "attribute 'routes' of <buffer> is empty; give one or more of oral, parenteral, ophthalmic, topical");
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
      });
    } else if (tag == "medium") {
      element(n, "medium", [&] {
        r.check_attributes(n, {{"id", Text::kId}, {"name", Text::kNonEmpty}, {"source", Text::kNonEmpty},
                               {"nominal-pH", Text::kOptionalPH}});
        r.check_children(n, {"add"});
        Medium m;
        m.id = r.required(n, "id");
        unique(n, "medium", m.id);
        m.name = r.optional(n, "name", m.id);
        m.source = r.optional(n, "source", "");
        m.nominal_pH = r.optional(n, "nominal-pH", "");
        children(n, [&](const pugi::xml_node& c) {
          if (std::strcmp(c.name(), "add") != 0) return;  // refused above
          r.check_attributes(c, {{"reagent", Text::kId}, "amount"});
          r.check_children(c, {});
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
        });
        lib.media[m.id] = m;
      });
    }
  }
  r.finish();
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

}  // namespace pkarta
