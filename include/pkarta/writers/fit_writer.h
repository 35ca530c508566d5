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
/// JSON keys (docs/commands.md): parameters[], correlation, rms_log10 (kept; the same value as
/// rms_residual_log10_molar: rms of observed - fitted log10 S, S in mol/L), residual_sd_log10,
/// lack_of_fit_test ("chi-square", "runs" or "none"), reduced_chi_square, lack_of_fit_p,
/// runs_test {runs, positive, negative, expected_runs, p}, held_at_start[], residuals[],
/// warnings[]. Numbers that do not apply are null.
void write_fit_json(const FitResult& result, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_FIT_WRITER_H_
