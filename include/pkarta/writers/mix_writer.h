// Text, CSV and JSON of one closed-system equilibrium (`pkarta mix`).
#ifndef PKARTA_WRITERS_MIX_WRITER_H_
#define PKARTA_WRITERS_MIX_WRITER_H_

#include <ostream>
#include <vector>

#include "pkarta/analyses/mix.h"

namespace pkarta {

void write_mix_text(const MixResult& result, std::ostream& out);
void write_mix_csv(const MixResult& result, std::ostream& out);
void write_mix_json(const MixResult& result, std::ostream& out);
/// The JSON document of `pkarta mix`: {"states": [...]} with one object per temperature; with
/// one temperature, that state's keys at the top level as well.
void write_mix_json_document(const std::vector<MixResult>& results, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_MIX_WRITER_H_
