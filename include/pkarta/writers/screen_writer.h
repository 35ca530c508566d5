// Text, CSV and JSON of the buffer screen (`pkarta screen`).
#ifndef PKARTA_WRITERS_SCREEN_WRITER_H_
#define PKARTA_WRITERS_SCREEN_WRITER_H_

#include <ostream>
#include <string>
#include <vector>

#include "pkarta/analyses/screen.h"
#include "pkarta/analyses/uncertainty.h"

namespace pkarta {

/// Writers: text tables, CSV (one row per compound and buffer), JSON (docs/commands.md
/// keys; one compound gives the stable object, several give {"screens": [...]}).
void write_screen_text(const std::vector<ScreenReport>& reports, std::ostream& out);
/// With `wide` every column of the screen (capacity, ionic strength, osmolality, storage pH,
/// drug solid, routes...); without, the columns that fit 100 text columns (as the overload above).
void write_screen_text(const std::vector<ScreenReport>& reports, std::ostream& out, bool wide);
/// The method note and the osmolality note the writers end with.
std::string screen_method_note(ActivityModel activity);
/// When the screen has a fallback (no buffer ok made premade): one paragraph saying what the dose
/// alone needs and that the pH can be adjusted after the dose, and one line per adjusted buffer
/// that holds the target (at most three). Empty without a fallback.
std::string screen_fallback_summary(const ScreenReport& report);
std::vector<std::string> screen_fallback_items(const ScreenReport& report);
/// Why a result does not hold at the storage temperatures ("outside 7.40 +/- 0.10 at 5 °C; the
/// dose does not stay dissolved at 5 °C (free solid)"); empty when it holds.
std::string storage_failure_text(const ScreenReport& report, const ScreenResult& result);
/// One paragraph naming the ok buffers that hold the target at the run temperature only, with
/// their storage pH and the reason; empty when every ok buffer holds at both ends.
std::string screen_storage_note(const ScreenReport& report);
/// With a dilution medium: one paragraph giving each ok buffer's highest supersaturation ratio on
/// dilution (and the ratio where it exceeds 1); empty otherwise.
std::string screen_dilution_note(const ScreenReport& report);
/// The `pkarta recipe` command that prints the bench recipe of the screen's answer: the leading
/// ok buffer at its recommended strength with the compound and dose (with --preparation adjusted
/// for the leading buffer of the adjusted fallback), --isotonic for parenteral and ophthalmic
/// routes; empty when no buffer is ok either way. The dose is the user's text when known, else
/// the dose in mM of free form.
std::string screen_recipe_command(const ScreenReport& report);
const char* screen_osmolality_note();
void write_screen_json(const std::vector<ScreenReport>& reports, std::ostream& out);
/// The JSON document `pkarta screen` prints: write_screen_json's object, with "screens" (one
/// object per compound) also for one compound; with bands (may be null; one compound), each
/// buffer's 5/50/95 % minimum concentration and ok fraction, and "uncertainty".
void write_screen_json_document(const std::vector<ScreenReport>& reports, const ScreenBands* bands,
                                std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_SCREEN_WRITER_H_
