// Reading compound files (XML).
#include <algorithm>
#include <iterator>
#include <sstream>
#include <string>
#include <vector>

#include "pkarta/base/limits.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/io/solubility_csv.h"
#include "pkarta/io/xml_input.h"
#include "xml_reader.h"

namespace pkarta {

using xml_detail::Reader;
using xml_detail::Text;

Compound parse_compound(const std::string& text, const std::string& name, const Library& library,
                        Warnings* warnings) {
  Reader r(text, name, warnings);
  const pugi::xml_node root = r.root("compound");
  Compound c;
  c.file = name;
  // The root's attributes (the molar mass converts every amount): an error there ends the reading.
  if (!r.attempt([&] {
    r.check_attributes(root, {{"id", Text::kId}, {"name", Text::kNonEmpty}, "molar-mass",
                              {"permanent-charge", Text::kInteger}});
    c.id = r.required(root, "id");
    c.name = r.optional(root, "name", c.id);
    c.molar_mass_g_per_mol = r.in_range(root, "molar-mass", r.number(root, "molar-mass"), 1.0, 1e6);
    c.system.id = c.id;
    c.system.name = c.name;
    c.system.permanent_charge = r.integer(root, "permanent-charge", 0);
    })) {
    r.finish();
  }
  std::vector<pugi::xml_node> pka_nodes, salt_nodes;
  pugi::xml_node s0_node;
  std::ptrdiff_t last_rank = 0;  // of the last element in kOrder
  int descriptions = 0, measured = 0;
  // Unknown elements and text between the elements: errors, as the schema's.
  r.check_children(root, {"description", "pka", "intrinsic-solubility", "salt", "measured-solubility"});
  for (const pugi::xml_node n : root.children()) {
    if (n.type() != pugi::node_element) continue;
    const std::string tag = n.name();
    // Each element on its own: an error is kept and reading goes on with the next one.
    r.attempt([&] {
      // The schema's order (compound.xsd); an unknown element is refused above.
      static const char* const kOrder[] = {"description", "pka", "intrinsic-solubility", "salt",
                                           "measured-solubility"};
      const auto rank = std::find(std::begin(kOrder), std::end(kOrder), tag) - std::begin(kOrder);
      if (rank < std::end(kOrder) - std::begin(kOrder)) {
        if (rank < last_rank) {
          r.fail(n, "<" + tag + "> after <" + kOrder[last_rank] + ">: the elements of <compound> go in the " +
                        "order description, pka, intrinsic-solubility, salt, measured-solubility");
        }
        last_rank = std::max(last_rank, rank);
      }
      if (tag == "description") {
        if (++descriptions > 1) r.fail(n, "a second <description>; give one");
        r.check_attributes(n, {});
        r.check_children(n, {}, true);
        c.description = n.text().get();
      } else if (tag == "pka") {
        c.system.pkas.push_back(read_pka(r, n));
        pka_nodes.push_back(n);
      } else if (tag == "intrinsic-solubility") {
        if (s0_node) r.fail(n, "a second <intrinsic-solubility>; give one");
        s0_node = n;
        r.check_attributes(n, {"value", "unit", "temperature", "dH", "log-sd", {"source", Text::kNonEmpty},
                               "ionic-strength", {"electrolyte", Text::kNonEmpty}});
        r.check_children(n, {});
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
            r.in_range(n, "ionic-strength", r.number_or(n, "ionic-strength", 0.0), 0.0, kDaviesMaxIonicStrength);
        c.s0_stated_electrolyte = r.optional(n, "electrolyte", "");
        c.has_intrinsic_solubility = true;
      } else if (tag == "salt") {
        r.check_attributes(n, {{"id", Text::kId}, {"counterion", Text::kId}, {"counterion-charge", Text::kInteger},
                               "stoichiometry", "ksp", "solubility-in-water", "molar-mass", "temperature", "dH",
                               {"source", Text::kNonEmpty}});
        r.check_children(n, {});
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
        if (++measured > 1) r.fail(n, "a second <measured-solubility>; give all the points in one");
        r.check_attributes(n, {});
        r.check_children(n, {"point"});
        if (!n.child("point")) r.fail(n, "<measured-solubility> has no <point>");
        for (const pugi::xml_node p : n.children("point")) {
          r.attempt([&] {
            r.check_attributes(p, {"pH", "value", "unit", "temperature", "log-sd"});
            r.check_children(p, {});
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
          });
        }
      }
    });
  }
  // The checks across elements need every element read: they are made when none was refused.
  if (!r.has_errors()) {
    c.system.to_thermodynamic();
    r.attempt([&] { check_ascending(r, c.system.pkas, pka_nodes); });
  }
  if (!r.has_errors()) {
    r.attempt([&] {
      if (!c.has_intrinsic_solubility && c.system.neutral_index() >= 0) {
        r.fail(root, "<compound> needs an <intrinsic-solubility> (it has a net-neutral form)");
      }
      if (c.has_intrinsic_solubility && c.system.neutral_index() < 0) {
        r.fail(s0_node, "the compound has no net-neutral form (permanent-charge " +
                            std::to_string(c.system.permanent_charge) +
                            "), so an intrinsic solubility does not apply");
      }
    });
    for (std::size_t k = 0; k < c.salts.size(); ++k) {
      const int zd = c.salts[k].drug_charge(counterion_charge_of(c.salts[k], library));
      const int j = c.system.z0() - zd;
      if (j < 0 || j > static_cast<int>(c.system.pkas.size())) {
        r.attempt([&] {
          r.fail(salt_nodes[k], "salt '" + c.salts[k].id + "': the compound has no species of charge " +
                                    std::to_string(zd) + " to pair " + c.salts[k].stoichiometry() +
                                    " with " + c.salts[k].counterion);
        });
      }
    }
  }
  r.finish();
  resolve_salt_ksp(c, library);
  return c;
}

Compound load_compound_file(const std::string& path, const Library& library, Warnings* warnings) {
  return parse_compound(read_text_file(path), path, library, warnings);
}

}  // namespace pkarta
