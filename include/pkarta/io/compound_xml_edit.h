// Writing new values into a compound file's text, keeping every other byte (comments, layout).
#ifndef PKARTA_IO_COMPOUND_XML_EDIT_H_
#define PKARTA_IO_COMPOUND_XML_EDIT_H_

#include <string>
#include <vector>

#include "pkarta/chem/model.h"

namespace pkarta {

/// One value to write into a compound file.
struct CompoundValueEdit {
  enum class Kind {
    kPka,                  ///< <pka> number `pka_index` (0-based): value (3 decimals), sd
    kIntrinsicSolubility,  ///< <intrinsic-solubility>: value in the file's own unit, log-sd
    kSaltKsp               ///< <salt id="salt_id">: ksp, replacing any solubility-in-water
  };
  Kind kind = Kind::kPka;
  int pka_index = 0;
  std::string salt_id;
  double value = 0.0;  ///< pKa; intrinsic solubility in mol/L; Ksp
  double sd = 0.0;     ///< pKa sd or log10 sd written when finite and > 0 (not for Ksp)
};

/// The compound file `compound_path` with `values` applied (in order) and the XML comment
/// `comment` on its own line above the <compound> element ("--" in it is broken up). Only the
/// attributes written change. `molar_mass_g_per_mol` and `s0_ref_temperature_C` convert the
/// intrinsic solubility to the file's unit. The text is checked by parsing it back.
/// Throws InputError naming the file when it cannot be edited or the result would not load.
std::string edit_compound_xml(const std::string& compound_path,
                              const std::vector<CompoundValueEdit>& values,
                              double molar_mass_g_per_mol, double s0_ref_temperature_C,
                              const std::string& comment, const Library& library);

}  // namespace pkarta

#endif  // PKARTA_IO_COMPOUND_XML_EDIT_H_
