// Checks shared by the fuzz targets (tests/fuzz/fuzz_*.cpp) and the regression test that
// replays saved inputs (tests/fuzz_regressions_test.cpp). Each check returns "" when the input
// gave a valid result or a clean InputError, and otherwise says what went wrong.
#ifndef PKARTA_TESTS_FUZZ_FUZZ_CHECKS_H_
#define PKARTA_TESTS_FUZZ_FUZZ_CHECKS_H_

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/base/error.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/xml_input.h"

namespace pkarta::fuzz {

inline std::string clean_error(const InputError& e) {
  return e.message().empty() ? "InputError without a message" : "";
}

/// The compound XML loader: a usable Compound (finite constants, every salt with a positive
/// finite Ksp) or an InputError.
inline std::string check_compound(std::string_view text, const Library& library) {
  Warnings warnings;
  try {
    const Compound c = parse_compound(std::string(text), "fuzz.xml", library, &warnings);
    if (!std::isfinite(c.molar_mass_g_per_mol) || !std::isfinite(c.s0_mol_per_L)) {
      return "compound with a non-finite molar mass or S0";
    }
    for (const Salt& s : c.salts) {
      if (!s.ksp || !std::isfinite(*s.ksp) || !(*s.ksp > 0)) return "salt '" + s.id + "' without a usable Ksp";
    }
  } catch (const InputError& e) {
    return clean_error(e);
  }
  return "";
}

/// The library XML loader, alone and on top of the built-in library (the --library case),
/// followed by a merge: a Library with positive finite molar masses and concentrations, or an
/// InputError.
inline std::string check_library(std::string_view text, const Library& builtin) {
  for (const Library* base : {static_cast<const Library*>(nullptr), &builtin}) {
    Warnings warnings;
    try {
      const Library lib = parse_library(std::string(text), "fuzz.xml", base, &warnings);
      for (const auto& [id, r] : lib.reagents) {
        if (!std::isfinite(r.molar_mass_g_per_mol) || !(r.molar_mass_g_per_mol > 0)) {
          return "reagent '" + id + "' with a bad molar mass";
        }
      }
      for (const auto& [id, m] : lib.media) {
        for (const auto& [reagent, conc] : m.reagents_mol_per_L) {
          if (!std::isfinite(conc) || conc < 0 || conc > 10.0) return "medium '" + id + "' with a bad amount";
        }
      }
      Library merged = builtin;
      merged.merge(lib);
    } catch (const InputError& e) {
      const std::string bad = clean_error(e);
      if (!bad.empty()) return bad;
    }
  }
  return "";
}

/// The amount parser: a finite, non-negative Amount whose conversion to mol/L is finite for
/// any molar mass and temperature the loaders accept, or an InputError; the same for numbers.
inline std::string check_amount(std::string_view text) {
  try {
    const Amount a = parse_amount(text);
    if (!std::isfinite(a.value) || a.value < 0) return "amount with a non-finite or negative value";
    for (double molar_mass : {1.0, 311.4, 1e6}) {
      for (double temperature : {-10.0, 25.0, 100.0}) {
        const double c = a.to_mol_per_L(molar_mass, temperature);
        if (!std::isfinite(c) || c < 0) return "amount converting to a non-finite mol/L";
      }
    }
    if (unit_symbol(a.unit) == "?") return "amount with an unknown unit";
  } catch (const InputError& e) {
    const std::string bad = clean_error(e);
    if (!bad.empty()) return bad;
  }
  try {
    const double v = parse_number(text, "value");
    if (!std::isfinite(v)) return "non-finite number";
  } catch (const InputError& e) {
    return clean_error(e);
  }
  return "";
}

/// The formula parser: a finite, positive molar mass or an InputError.
inline std::string check_formula(std::string_view text) {
  try {
    const double m = molar_mass_g_per_mol(text);
    if (!std::isfinite(m) || !(m > 0)) return "formula with a non-finite or non-positive molar mass";
  } catch (const InputError& e) {
    return clean_error(e);
  }
  return "";
}

namespace detail {

class Bytes {
 public:
  Bytes(const std::uint8_t* data, std::size_t size) : data_(data), size_(size) {}
  unsigned u8() { return pos_ < size_ ? data_[pos_++] : 0u; }
  double unit() { return (u8() * 256.0 + u8()) / 65535.0; }  // [0, 1]
  double uniform(double lo, double hi) { return lo + (hi - lo) * unit(); }
  double log_uniform(double lo, double hi) {
    return std::pow(10.0, std::log10(lo) + (std::log10(hi) - std::log10(lo)) * unit());
  }

 private:
  const std::uint8_t* data_;
  std::size_t size_;
  std::size_t pos_ = 0;
};

inline AcidBaseSystem decode_system(Bytes& b, const std::string& id) {
  AcidBaseSystem s;
  s.id = id;
  const int n = 1 + static_cast<int>(b.u8() % kMaxPka);
  for (int i = 0; i < n; ++i) {
    Pka p;
    const unsigned flags = b.u8();
    p.value = b.uniform(-5.0, 20.0);
    p.type = (flags & 1u) ? GroupType::kBase : GroupType::kAcid;
    p.dH_kJ_per_mol = (flags & 2u) ? b.uniform(-60.0, 60.0) : 0.0;
    p.dCp_J_per_K_mol = (flags & 4u) ? b.uniform(-300.0, 300.0) : 0.0;
    s.pkas.push_back(p);
  }
  std::sort(s.pkas.begin(), s.pkas.end(),
            [](const Pka& x, const Pka& y) { return x.value < y.value; });
  for (int i = 1; i < n; ++i) {  // strictly ascending, as the loaders require
    s.pkas[i].value = std::max(s.pkas[i].value, s.pkas[i - 1].value + 1e-3);
  }
  return s;
}

inline bool is_finite(double x) { return std::isfinite(x); }

}  // namespace detail



/// The equilibrium solver fed with fuzzed numbers. The bytes are decoded into a small Mixture
/// within the ranges the model covers (pKa -5 to 20, up to 8 per system, totals up to
/// 5 mol/L, 0-80 °C, S0 1e-15 to 10 mol/L, salts with Ksp 1e-12 to 10). Every solve must
/// converge to a finite state whose charge and mass residuals are below 1e-10, or refuse with
/// a message; a plain non-convergence of a mixture under 10 mol/L in all is a failure too.
inline std::string check_solver(const std::uint8_t* data, std::size_t size) {
  detail::Bytes b(data, size);
  Mixture m;
  const unsigned flags = b.u8();
  m.activity = (flags & 1u) ? ActivityModel::kIdeal : ActivityModel::kDavies;
  m.temperature_C = b.uniform(0.0, 80.0);
  double sum = 0.0;
  const int systems = static_cast<int>(b.u8() % 4);
  for (int k = 0; k < systems; ++k) {
    const AcidBaseSystem s = detail::decode_system(b, "s" + std::to_string(k));
    const double total = b.log_uniform(1e-9, 5.0);
    m.add_system(s, total);
    sum += total;
  }
  struct IonKind {
    const char* id;
    int charge;
  };
  const IonKind kinds[] = {{"Na+", 1}, {"Cl-", -1}, {"Ca2+", 2}, {"SO4 2-", -2}};
  const unsigned ions = b.u8();
  for (int k = 0; k < 4; ++k) {
    if (ions & (1u << k)) {
      const double c = b.log_uniform(1e-9, 5.0);
      m.add_ion(kinds[k].id, kinds[k].charge, c);
      sum += c;
    }
  }
  if (flags & 2u) {
    DrugAmount d;
    d.compound.id = "drug";
    d.compound.molar_mass_g_per_mol = b.uniform(50.0, 2000.0);
    d.compound.system = detail::decode_system(b, "drug");
    d.compound.system.permanent_charge = (flags & 4u) ? 1 : 0;
    d.compound.has_intrinsic_solubility = d.compound.system.neutral_index() >= 0;
    d.compound.s0_mol_per_L = b.log_uniform(1e-15, 10.0);
    if (flags & 8u) d.compound.s0_dH_kJ_per_mol = b.uniform(-50.0, 50.0);
    const int z0 = d.compound.system.z0();
    const int n = static_cast<int>(d.compound.system.pkas.size());
    for (const IonKind& ion : {kinds[1], kinds[0]}) {  // Cl- pairs with +1, Na+ with -1
      const int j = z0 + ion.charge;
      if (j < 0 || j > n || !(b.u8() & 1u)) continue;
      Salt s;
      s.id = std::string("salt with ") + ion.id;
      s.counterion = ion.id;
      s.ksp = b.log_uniform(1e-12, 10.0);
      s.dH_kJ_per_mol = b.uniform(-30.0, 30.0);
      d.compound.salts.push_back(s);
    }
    d.dose_mol_per_L = b.log_uniform(1e-9, 5.0);
    d.allow_solids = !(flags & 16u);
    sum += d.dose_mol_per_L;
    m.drug = d;
  }

  const Equilibrium e = solve(m);
  using detail::is_finite;
  if (!e.usable()) {
    if (e.message.empty()) return "refused without a message";
    if (e.message == "the equilibrium did not converge" && sum <= 10.0) {
      return "no convergence at " + std::to_string(sum) + " mol/L in all";
    }
    if (!is_finite(e.pH) || !is_finite(e.ionic_strength_mol_per_L)) return "refused with a non-finite pH or I";
    return "";
  }
  if (!is_finite(e.pH) || !is_finite(e.ionic_strength_mol_per_L) || !is_finite(e.osmolarity_mOsm_per_L)) {
    return "converged with a non-finite pH, I or osmolarity";
  }
  if (!(e.charge_residual_rel <= 1e-10) || !(e.mass_residual_rel <= 1e-10)) {
    return "converged with residuals " + std::to_string(e.charge_residual_rel) + " (charge), " +
           std::to_string(e.mass_residual_rel) + " (mass)";
  }
  for (const Species& sp : e.species) {
    if (!is_finite(sp.conc_mol_per_L) || sp.conc_mol_per_L < 0 || !is_finite(sp.activity_coefficient)) {
      return "species " + sp.name + " with a bad concentration or activity coefficient: " + std::to_string(sp.conc_mol_per_L) + " " + std::to_string(sp.activity_coefficient) + " pH " + std::to_string(e.pH) + " I " + std::to_string(e.ionic_strength_mol_per_L);
    }
  }
  if (e.drug) {
    const DrugState& d = *e.drug;
    for (double x : {d.dissolved_mol_per_L, d.free_solid_mol_per_L, d.salt_solid_mol_per_L,
                     d.neutral_mol_per_L, d.saturation_ratio}) {
      if (!is_finite(x)) return "drug state with a non-finite amount or saturation ratio";
    }
    for (double f : d.fractions) {
      if (!is_finite(f)) return "drug with a non-finite species fraction";
    }
  }
  return "";
}

}  // namespace pkarta::fuzz

#endif  // PKARTA_TESTS_FUZZ_FUZZ_CHECKS_H_
