// Text, CSV and JSON of a dilution (`pkarta dilute`).
#ifndef PKARTA_WRITERS_DILUTE_WRITER_H_
#define PKARTA_WRITERS_DILUTE_WRITER_H_

#include <ostream>

#include "pkarta/analyses/dilute.h"

namespace pkarta {

void write_dilute_text(const DilutionResult& result, std::ostream& out);
void write_dilute_csv(const DilutionResult& result, std::ostream& out);
/// JSON keys (docs/commands.md): points[] {ratio, pH, drug_mol_per_L, solubility_mol_per_L,
/// supersaturation_ratio, risk}, plus notes, warnings and the equilibrium after precipitation.
void write_dilute_json(const DilutionResult& result, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_DILUTE_WRITER_H_
