#include "pkarta/chem/model.h"

#include "pkarta/base/suggest.h"

#include <algorithm>
#include <cmath>

#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

double Pka::at(double temperature_C) const {
  return pk_at_temperature(value, ref_temperature_C, dH_kJ_per_mol, dCp_J_per_K_mol, temperature_C);
}

double thermodynamic_pka(PkaScale scale, double apparent, double ionic_strength_mol_per_L, int zA,
                         double temperature_C) {
  if (scale == PkaScale::kThermodynamic || !(ionic_strength_mol_per_L > 0)) return apparent;
  const double D = davies_a(temperature_C) * davies_bracket(ionic_strength_mol_per_L);
  const int zB = zA - 1;
  const double dz2 = static_cast<double>(zB * zB - zA * zA);
  return apparent + D * (scale == PkaScale::kConcentration ? 1.0 + dz2 : dz2);
}

void AcidBaseSystem::to_thermodynamic() {
  for (std::size_t i = 0; i < pkas.size(); ++i) {
    Pka& p = pkas[i];
    if (!p.is_apparent()) continue;
    p.value = thermodynamic_pka(p.stated_scale, p.stated_value, p.stated_ionic_strength_mol_per_L,
                                charge_of(static_cast<int>(i)), p.ref_temperature_C);
  }
}

std::vector<std::string> pka_convention_notes(const AcidBaseSystem& system) {
  std::vector<std::string> out;
  for (std::size_t i = 0; i < system.pkas.size(); ++i) {
    const Pka& p = system.pkas[i];
    if (!p.is_apparent()) continue;
    const int j = static_cast<int>(i);
    out.push_back("pKa" + std::to_string(j + 1) + " " + fixed(p.stated_value, 3) + " was stated as an apparent constant (" +
                  (p.stated_scale == PkaScale::kMixed ? "mixed scale: pH as activity, species as concentrations"
                                                      : "concentration scale") +
                  ", I = " + sig(p.stated_ionic_strength_mol_per_L, 3) + " mol/L" +
                  (p.stated_electrolyte.empty() ? std::string() : " " + p.stated_electrolyte) + ", " +
                  fixed(p.ref_temperature_C, 1) + " °C); converted to the thermodynamic " + fixed(p.value, 3) +
                  " with Davies activities for the step " + system.species_label(j) + " -> " +
                  system.species_label(j + 1) + ", as the solver uses");
  }
  return out;
}

int AcidBaseSystem::z0() const {
  int z = permanent_charge;
  for (const Pka& p : pkas) z += p.type == GroupType::kBase ? 1 : 0;
  return z;
}

int AcidBaseSystem::neutral_index() const {
  const int j = z0();
  return (j >= 0 && j <= static_cast<int>(pkas.size())) ? j : -1;
}

std::string AcidBaseSystem::species_label(int j) const {
  const int n = static_cast<int>(pkas.size());
  const int h = n - j;
  std::string s;
  if (h > 1) s = "H" + std::to_string(h);
  else if (h == 1) s = "H";
  s += "A";
  const int z = charge_of(j);
  if (z != 0) {
    const int m = z < 0 ? -z : z;
    if (m > 1) s += std::to_string(m);
    s += z < 0 ? "-" : "+";
  }
  return s;
}

bool Buffer::allows_route(const std::string& route) const {
  if (route.empty() || route == "any") return true;
  return std::find(routes.begin(), routes.end(), route) != routes.end();
}

namespace {
template <typename T>
const T& find_or_throw(const std::map<std::string, T>& m, const std::string& id, const char* kind) {
  auto it = m.find(id);
  if (it == m.end()) {
    std::string known;
    std::vector<std::string> ids;
    int listed = 0;
    for (const auto& kv : m) {
      ids.push_back(kv.first);
      if (listed == 12) known += ", ...";
      if (listed++ < 12) known += (known.empty() ? "" : ", ") + kv.first;
    }
    const std::string suggestion = did_you_mean(id, ids);
    throw InputError(std::string("unknown ") + kind + " '" + shown(id) + "'" +
                     (!suggestion.empty() ? suggestion : known.empty() ? "" : " (known: " + known + ")"));
  }
  return it->second;
}
}  // namespace

const Ion& Library::ion(const std::string& id) const { return find_or_throw(ions, id, "ion"); }
const AcidBaseSystem& Library::system(const std::string& id) const {
  return find_or_throw(systems, id, "system");
}
const Reagent& Library::reagent(const std::string& id) const {
  return find_or_throw(reagents, id, "reagent");
}
const Buffer& Library::buffer(const std::string& id) const { return find_or_throw(buffers, id, "buffer"); }
const Medium& Library::medium(const std::string& id) const { return find_or_throw(media, id, "medium"); }

void Library::merge(const Library& other) {
  for (const auto& kv : other.ions) ions[kv.first] = kv.second;
  for (const auto& kv : other.systems) systems[kv.first] = kv.second;
  for (const auto& kv : other.reagents) reagents[kv.first] = kv.second;
  for (const auto& kv : other.buffers) buffers[kv.first] = kv.second;
  for (const auto& kv : other.media) media[kv.first] = kv.second;
  files.insert(files.end(), other.files.begin(), other.files.end());
}

std::string Salt::stoichiometry() const {
  return std::to_string(drug_count) + ":" + std::to_string(counterion_count);
}

int Salt::drug_charge(int z_counterion) const {
  return -z_counterion * counterion_count / drug_count;
}

int counterion_charge_of(const Salt& salt, const Library& library) {
  return salt.counterion_is_system ? salt.counterion_charge : library.ion(salt.counterion).charge;
}

std::string counterion_label(const Salt& salt, const Library& library) {
  if (!salt.counterion_is_system) return salt.counterion;
  const AcidBaseSystem& sys = library.system(salt.counterion);
  const int j = sys.z0() - salt.counterion_charge;
  if (j < 0 || j > static_cast<int>(sys.pkas.size())) return salt.counterion;
  return sys.id + " " + sys.species_label(j);
}

const Salt* Compound::salt(const std::string& id) const {
  for (const Salt& s : salts) {
    if (s.id == id) return &s;
  }
  return nullptr;
}

double Compound::s0_at(double temperature_C) const {
  if (!s0_dH_kJ_per_mol) return s0_mol_per_L;
  const double T = kelvin(temperature_C);
  const double T0 = kelvin(s0_ref_temperature_C);
  return s0_mol_per_L * std::exp(-*s0_dH_kJ_per_mol * 1000.0 / kGasConstant * (1.0 / T - 1.0 / T0));
}

std::vector<std::string> Compound::convention_notes() const {
  std::vector<std::string> out = pka_convention_notes(system);
  if (has_intrinsic_solubility && s0_stated_ionic_strength_mol_per_L > 0) {
    out.push_back("S0 was measured at I = " + sig(s0_stated_ionic_strength_mol_per_L, 3) + " mol/L" +
                  (s0_stated_electrolyte.empty() ? std::string() : " " + s0_stated_electrolyte) +
                  "; used as given: with Davies the neutral species has activity coefficient 1 at any "
                  "ionic strength, so no correction applies (salting out is not modelled)");
  }
  return out;
}

}  // namespace pkarta
