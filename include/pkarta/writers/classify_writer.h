// Text, CSV and JSON of a solubility classification (`pkarta classify`).
#ifndef PKARTA_WRITERS_CLASSIFY_WRITER_H_
#define PKARTA_WRITERS_CLASSIFY_WRITER_H_

#include <ostream>

#include "pkarta/analyses/classify.h"

namespace pkarta {

void write_classify_text(const ClassifyResult& result, std::ostream& out);
/// CSV (RFC 4180): the points table, then the summary, the media and the notes.
void write_classify_csv(const ClassifyResult& result, std::ostream& out);
/// JSON: keys of docs/commands.md plus dose, convention, media, notes, warnings, caution.
void write_classify_json(const ClassifyResult& result, std::ostream& out);

}  // namespace pkarta

#endif  // PKARTA_WRITERS_CLASSIFY_WRITER_H_
