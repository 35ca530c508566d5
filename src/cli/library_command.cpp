#include <algorithm>
#include <iostream>
#include <sstream>

#include <pugixml.hpp>

#include "cli_common.h"
#include "cli_output.h"
#include "commands.h"
#include "pkarta/base/format.h"
#include "pkarta/io/xml_input.h"

namespace pkarta::cli {

namespace {
std::string join(const std::vector<std::string>& v, const char* sep) {
  std::string s;
  for (const auto& x : v) s += (s.empty() ? "" : sep) + x;
  return s;
}

std::string pka_list(const AcidBaseSystem& s) {
  std::string out;
  for (const Pka& p : s.pkas) {
    out += (out.empty() ? "" : ", ") + fixed(p.value, 3) + (p.type == GroupType::kBase ? " (base)" : "");
  }
  return out;
}
using J = nlohmann::ordered_json;

J system_json(const std::string& id, const AcidBaseSystem& s) {
  J pkas = J::array();
  for (const Pka& p : s.pkas) {
    pkas.push_back({{"pKa", p.value}, {"type", p.type == GroupType::kBase ? "base" : "acid"},
                    {"dH_kJ_per_mol", p.dH_kJ_per_mol}, {"dCp_J_per_K_mol", p.dCp_J_per_K_mol},
                    {"ref_temperature_C", p.ref_temperature_C}, {"pKa_5C", p.at(5)}, {"pKa_37C", p.at(37)}});
  }
  return {{"kind", "system"}, {"id", id}, {"name", s.name}, {"source", s.source}, {"pKa", pkas}};
}
J buffer_json(const std::string& id, const Buffer& b) {
  return {{"kind", "buffer"}, {"id", id}, {"name", b.name}, {"system", b.system}, {"routes", b.routes},
          {"max_conc_mol_per_L", b.max_conc_mol_per_L}, {"acid_titrant", b.acid_titrant},
          {"base_titrant", b.base_titrant}, {"acid_reagent", b.acid_reagent}, {"base_reagent", b.base_reagent}};
}
J reagent_json(const std::string& id, const Reagent& r) {
  J gives = J::array();
  for (const Contribution& c : r.gives) gives.push_back({{"id", c.id}, {"count", c.count}});
  return {{"kind", "reagent"}, {"id", id}, {"name", r.name}, {"formula", r.formula}, {"state", r.state},
          {"molar_mass_g_per_mol", r.molar_mass_g_per_mol}, {"gives", gives}};
}
J medium_json(const std::string& id, const Medium& m) {
  J reagents = J::object();
  for (const auto& [rid, c] : m.reagents_mol_per_L) reagents[rid] = c;
  return {{"kind", "medium"}, {"id", id}, {"name", m.name}, {"nominal_pH", m.nominal_pH}, {"source", m.source},
          {"reagents_mol_per_L", reagents}};
}
J ion_json(const std::string& id, const Ion& i) {
  return {{"kind", "ion"}, {"id", id}, {"name", i.name}, {"charge", i.charge},
          {"molar_mass_g_per_mol", i.molar_mass_g_per_mol}};
}

// A JSON value as one CSV cell: strings as they are, numbers at full precision, the rest as JSON.
std::string cell(const J& v) {
  if (v.is_string()) return v.get<std::string>();
  if (v.is_number()) return full(v.get<double>());
  if (v.is_array() && std::all_of(v.begin(), v.end(), [](const J& x) { return x.is_string(); })) {
    std::string s;
    for (const J& x : v) s += (s.empty() ? "" : " ") + x.get<std::string>();
    return s;
  }
  return v.dump();
}

DataTable entries_table(const std::string& name, const J& entries) {
  DataTable t{name, {}, {}};
  for (const J& e : entries) {
    if (t.header.empty()) {
      for (auto it = e.begin(); it != e.end(); ++it) {
        if (it.key() != "kind") t.header.push_back(it.key());
      }
    }
    std::vector<std::string> row;
    for (const std::string& k : t.header) row.push_back(e.contains(k) ? cell(e[k]) : "");
    t.add(row);
  }
  if (t.header.empty()) t.header = {"id"};
  return t;
}

std::vector<TableInfo> library_table_info() {
  return {{"buffers", "library list: one row per buffer"},
          {"media", "library list: one row per medium"},
          {"reagents", "library list: one row per reagent"},
          {"ions", "library list: one row per ion"},
          {"properties", "library show ID: one row per property of each entry with that id"}};
}

}  // namespace

int run_library(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::vector<std::string> words;
    po::options_description desc("library options");
    TableOptions tables;
    add_table_options(desc, tables);
    add_common_options(desc, common);
    po::options_description hidden;
    hidden.add_options()("words", po::value(&words)->composing());
    po::options_description all;
    all.add(desc).add(hidden);
    po::positional_options_description pos;
    pos.add("words", -1);
    parse(args, all, &pos);
    if (common.help) {
      print_help(std::cout, "pkarta library [list | show ID]", desc);
      std::cout << "\n" << tables_help(library_table_info());
      print_examples(std::cout, {"pkarta library list", "pkarta library show phosphate --format json"});
      return 0;
    }
    check_format(common.format);
    check_table_options(tables, common.format, library_table_info(), common.library_files);
    const Library lib = load_libraries(common);
    const std::string verb = words.empty() ? "list" : words[0];
    if (verb == "list") {
      if (words.size() > 1) throw InputError("library list takes no further argument");
      if (common.format != "text") {
        J bs = J::array(), ms = J::array(), rs = J::array(), is = J::array();
        for (const auto& [id, b] : lib.buffers) bs.push_back(buffer_json(id, b));
        for (const auto& [id, m] : lib.media) ms.push_back(medium_json(id, m));
        for (const auto& [id, r] : lib.reagents) rs.push_back(reagent_json(id, r));
        for (const auto& [id, i] : lib.ions) is.push_back(ion_json(id, i));
        if (!tables.table.empty() && tables.table == "properties") {
          throw InputError(SourceLocation{"--table", 0, 0}, "the properties table is of library show ID");
        }
        emit_tables(tables, common.format,
                    {entries_table("buffers", bs), entries_table("media", ms), entries_table("reagents", rs),
                     entries_table("ions", is)},
                    common.library_files);
        if (common.format == "json") {
          print_json(J{{"library", {{"id", lib.id}, {"name", lib.name}, {"version", lib.version}}},
                       {"buffers", bs}, {"media", ms}, {"reagents", rs}, {"ions", is}});
        }
        return 0;
      }
      std::cout << "Library " << lib.name << " (version " << lib.version << ")\n\nBuffers\n";
      TextTable bt({"id", "pKa (25 °C)", "routes", "max conc (M)"});
      for (const auto& [id, b] : lib.buffers) {
        bt.add_row({id, pka_list(lib.system(b.system)), join(b.routes, " "), sig(b.max_conc_mol_per_L, 3)});
      }
      bt.write(std::cout);
      std::cout << "\nMedia\n";
      TextTable mt({"id", "name", "nominal pH"});
      for (const auto& [id, m] : lib.media) mt.add_row({id, m.name, m.nominal_pH});
      mt.write(std::cout);
      std::cout << "\nReagents\n";
      TextTable rt({"id", "formula", "molar mass (g/mol)"});
      for (const auto& [id, r] : lib.reagents) rt.add_row({id, r.formula, fixed(r.molar_mass_g_per_mol, 3)});
      rt.write(std::cout);
      std::cout << "\nIons\n";
      TextTable it({"id", "charge", "molar mass (g/mol)"});
      for (const auto& [id, i] : lib.ions) it.add_row({id, std::to_string(i.charge), fixed(i.molar_mass_g_per_mol, 3)});
      it.write(std::cout);
      return 0;
    }
    if (verb == "show") {
      if (words.size() != 2) throw InputError("library show needs one ID");
      const std::string& id = words[1];
      if (common.format != "text") {
        J entries = J::array();
        if (lib.systems.count(id)) entries.push_back(system_json(id, lib.systems.at(id)));
        if (lib.buffers.count(id)) entries.push_back(buffer_json(id, lib.buffers.at(id)));
        if (lib.reagents.count(id)) entries.push_back(reagent_json(id, lib.reagents.at(id)));
        if (lib.media.count(id)) entries.push_back(medium_json(id, lib.media.at(id)));
        if (lib.ions.count(id)) entries.push_back(ion_json(id, lib.ions.at(id)));
        if (entries.empty()) throw InputError("no library entry with id '" + id + "' (see pkarta library list)");
        if (!tables.table.empty() && tables.table != "properties") {
          throw InputError(SourceLocation{"--table", 0, 0}, "library show ID has the properties table only");
        }
        DataTable t{"properties", {"kind", "id", "property", "value"}, {}};
        for (const J& e : entries) {
          for (auto it = e.begin(); it != e.end(); ++it) {
            if (it.key() != "kind" && it.key() != "id") t.add({e["kind"], id, it.key(), cell(it.value())});
          }
        }
        emit_tables(tables, common.format, {t}, common.library_files);
        if (common.format == "json") print_json(J{{"id", id}, {"entries", entries}});
        return 0;
      }
      bool found = false;
      if (lib.systems.count(id)) {
        found = true;
        const AcidBaseSystem& s = lib.systems.at(id);
        std::cout << "system " << id << " (" << s.name << ")\n  source: " << s.source << "\n";
        TextTable t({"step", "pKa (25 °C)", "type", "dH (kJ/mol)", "dCp (J/K/mol)", "pKa 5 °C", "pKa 37 °C"});
        for (std::size_t i = 0; i < s.pkas.size(); ++i) {
          const Pka& p = s.pkas[i];
          t.add_row({std::to_string(i + 1), fixed(p.value, 3), p.type == GroupType::kBase ? "base" : "acid",
                     fixed(p.dH_kJ_per_mol, 2), fixed(p.dCp_J_per_K_mol, 0), fixed(p.at(5), 3), fixed(p.at(37), 3)});
        }
        t.write(std::cout);
      }
      if (lib.buffers.count(id)) {
        found = true;
        const Buffer& b = lib.buffers.at(id);
        std::cout << "buffer " << id << ": system " << b.system << ", routes " << join(b.routes, " ")
                  << ", max conc " << sig(b.max_conc_mol_per_L, 3) << " M, titrants " << b.acid_titrant
                  << "/" << b.base_titrant << ", reagents " << b.acid_reagent << " / " << b.base_reagent << "\n";
      }
      if (lib.reagents.count(id)) {
        found = true;
        const Reagent& r = lib.reagents.at(id);
        std::cout << "reagent " << id << " (" << r.name << "): " << r.formula << ", "
                  << fixed(r.molar_mass_g_per_mol, 3) << " g/mol, gives";
        for (const Contribution& c : r.gives) std::cout << " " << sig(c.count, 3) << " " << c.id;
        std::cout << "\n";
      }
      if (lib.media.count(id)) {
        found = true;
        const Medium& m = lib.media.at(id);
        std::cout << "medium " << id << " (" << m.name << "), source: " << m.source << "\n";
        for (const auto& [rid, c] : m.reagents_mol_per_L) std::cout << "  " << rid << " " << sig(c * 1000, 4) << " mM\n";
      }
      if (lib.ions.count(id)) {
        found = true;
        const Ion& i = lib.ions.at(id);
        std::cout << "ion " << id << ": charge " << i.charge << ", " << fixed(i.molar_mass_g_per_mol, 3) << " g/mol\n";
      }
      if (!found) throw InputError("no library entry with id '" + id + "' (see pkarta library list)");
      return 0;
    }
    throw InputError("unknown library action '" + verb + "', expected list or show ID");
  });
}

int run_check(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::vector<std::string> files;
    po::options_description desc("check options");
    TableOptions tables;
    add_table_options(desc, tables);
    add_common_options(desc, common);
    po::options_description hidden;
    hidden.add_options()("files", po::value(&files)->composing());
    po::options_description all;
    all.add(desc).add(hidden);
    po::positional_options_description pos;
    pos.add("files", -1);
    parse(args, all, &pos);
    if (common.help || files.empty()) {
      print_help(common.help ? std::cout : std::cerr, "pkarta check FILE...", desc);
      std::ostream& to = common.help ? std::cout : std::cerr;
      to << "\n" << tables_help({{"files", "one row per file checked"}});
      print_examples(to, {"pkarta check compounds/demo-base.xml", "pkarta check my-library.xml --format json"});
      return common.help ? 0 : static_cast<int>(kExitBadInput);
    }
    check_format(common.format);
    const std::vector<TableInfo> info = {{"files", "one row per file checked"}};
    check_table_options(tables, common.format, info, files);
    Library lib = load_libraries(common);
    J checked = J::array();
    DataTable t{"files", {"file", "kind", "id", "systems", "reagents", "buffers", "media", "pka", "salts", "summary"}, {}};
    std::ostringstream printed;
    // Every error of every file is reported (each file's in line order), then nothing is
    // printed on standard output.
    std::vector<InputError> errors;
    for (const std::string& f : files) {
      try {
        const std::string text = read_text_file(f);
        std::ostream& out = printed;
        pugi::xml_document doc;
        const bool is_library = doc.load_buffer(text.data(), text.size()) &&
                                std::string(doc.document_element().name()) == "library";
        Warnings w;
        if (is_library) {
          const Library extra = parse_library(text, f, &lib, &w);
          for (const auto& s : w) std::cerr << "pkarta: " << s << "\n";
          std::ostringstream line;
          line << "library ok (" << extra.systems.size() << " systems, " << extra.reagents.size()
               << " reagents, " << extra.buffers.size() << " buffers, " << extra.media.size() << " media)";
          out << f << ": " << line.str() << "\n";
          checked.push_back({{"file", f}, {"kind", "library"}, {"ok", true}, {"id", extra.id},
                             {"systems", extra.systems.size()}, {"reagents", extra.reagents.size()},
                             {"buffers", extra.buffers.size()}, {"media", extra.media.size()},
                             {"warnings", w}, {"summary", line.str()}});
          t.add({f, "library", extra.id, std::to_string(extra.systems.size()), std::to_string(extra.reagents.size()),
                 std::to_string(extra.buffers.size()), std::to_string(extra.media.size()), "", "", line.str()});
        } else {
          const Compound c = parse_compound(text, f, lib, &w);
          for (const auto& s : w) std::cerr << "pkarta: " << s << "\n";
          std::ostringstream line;
          line << "compound ok (" << c.id << ", " << c.system.pkas.size() << " pKa, " << c.salts.size() << " salts";
          J derived = J::object();
          for (const Salt& s : c.salts) {
            if (s.solubility_in_water_mol_per_L) {
              line << "; derived Ksp of " << s.id << " " << sig(*s.ksp, 4);
              derived[s.id] = *s.ksp;
            }
          }
          line << ")";
          out << f << ": " << line.str() << "\n";
          checked.push_back({{"file", f}, {"kind", "compound"}, {"ok", true}, {"id", c.id},
                             {"pka", c.system.pkas.size()}, {"salts", c.salts.size()}, {"derived_ksp", derived},
                             {"warnings", w}, {"summary", line.str()}});
          t.add({f, "compound", c.id, "", "", "", "", std::to_string(c.system.pkas.size()),
                 std::to_string(c.salts.size()), line.str()});
        }
      } catch (const InputErrors& e) {
        errors.insert(errors.end(), e.all().begin(), e.all().end());
      } catch (const InputError& e) {
        errors.push_back(e);
      }
    }
    if (errors.size() == 1) throw InputError(errors.front());
    if (!errors.empty()) throw InputErrors(errors);
    if (common.format == "json") print_json(J{{"files", checked}});
    if (common.format == "csv" || !tables.out_dir.empty()) emit_tables(tables, common.format, {t}, files);
    if (common.format == "text") std::cout << printed.str();
    return 0;
  });
}

}  // namespace pkarta::cli
