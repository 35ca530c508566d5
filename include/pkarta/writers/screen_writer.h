// Text, CSV and JSON of the buffer screen (`pkarta screen`).
#ifndef PKARTA_WRITERS_SCREEN_WRITER_H_
#define PKARTA_WRITERS_SCREEN_WRITER_H_

#include <ostream>
#include <string>
#include <vector>

#include "pkarta/analyses/screen.h"

namespace pkarta {

/// Writers: text tables, CSV (one row per compound and buffer), JSON (docs/commands.md
/// keys; one compound gives the stable object, several give {"screens": [...]}).
void write_screen_text(const std::vector<ScreenReport>& reports, std::ostream& out);
/// With `wide` every column of the screen (capacity, ionic strength, osmolality, storage pH,
/// drug solid, routes...); without, the columns that fit 100 text columns (as the overload above).
void write_screen_text(const std::vector<ScreenReport>& reports, std::ostream& out, bool wide);
void write_screen_csv(const std::vector<ScreenReport>& reports, std::ostream& out);
/// The method note and the osmolality note the writers end with.
std::string screen_method_note(ActivityModel activity);
const char* screen_osmolality_note();
void write_screen_json(const std::vector<ScreenReport>& reports, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_SCREEN_WRITER_H_
