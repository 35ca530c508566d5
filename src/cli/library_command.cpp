#include <iostream>

#include <pugixml.hpp>

#include "cli_common.h"
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
}  // namespace

int run_library(const Args& args) {
  return guarded([&] {
    CommonOptions common;
    std::vector<std::string> words;
    po::options_description desc("library options");
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
      return 0;
    }
    check_format(common.format, false);
    const Library lib = load_libraries(common);
    const std::string verb = words.empty() ? "list" : words[0];
    if (verb == "list") {
      if (words.size() > 1) throw InputError("library list takes no further argument");
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
      return common.help ? 0 : static_cast<int>(kExitBadInput);
    }
    Library lib = load_libraries(common);
    for (const std::string& f : files) {
      const std::string text = read_text_file(f);
      pugi::xml_document doc;
      const bool is_library = doc.load_buffer(text.data(), text.size()) &&
                              std::string(doc.document_element().name()) == "library";
      Warnings w;
      if (is_library) {
        const Library extra = parse_library(text, f, &lib, &w);
        for (const auto& s : w) std::cerr << "pkarta: " << s << "\n";
        std::cout << f << ": library ok (" << extra.systems.size() << " systems, " << extra.reagents.size()
                  << " reagents, " << extra.buffers.size() << " buffers, " << extra.media.size() << " media)\n";
      } else {
        const Compound c = parse_compound(text, f, lib, &w);
        for (const auto& s : w) std::cerr << "pkarta: " << s << "\n";
        std::cout << f << ": compound ok (" << c.id << ", " << c.system.pkas.size() << " pKa, "
                  << c.salts.size() << " salts";
        for (const Salt& s : c.salts) {
          if (s.solubility_in_water_mol_per_L) std::cout << "; derived Ksp of " << s.id << " " << sig(*s.ksp, 4);
        }
        std::cout << ")\n";
      }
    }
    return 0;
  });
}

}  // namespace pkarta::cli
