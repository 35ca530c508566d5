// Text, CSV and JSON of a solubility fit.
#ifndef PKARTA_WRITERS_FIT_WRITER_H_
#define PKARTA_WRITERS_FIT_WRITER_H_

#include <ostream>

#include "pkarta/analyses/fit.h"

namespace pkarta {

void write_fit_text(const FitResult& result, std::ostream& out);
/// Two CSV tables separated by an empty line: parameters (name, estimate, std_error), then
/// residuals (pH, temperature, observed and fitted log10, limiting solid).
void write_fit_csv(const FitResult& result, std::ostream& out);
/// JSON keys (docs/commands.md): parameters[], correlation, rms_log10, residuals[], warnings[].
void write_fit_json(const FitResult& result, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_FIT_WRITER_H_
