#include "pkarta/base/error.h"

#include <utility>

namespace pkarta {

std::string SourceLocation::str() const {
  std::string s = file;
  if (line > 0) {
    s += ":" + std::to_string(line);
    if (column > 0) s += ":" + std::to_string(column);
  }
  return s;
}

namespace {
// Any run of more than 120 characters without a space (a pasted field, a whole file as an
// attribute) is shown shortened, whichever message echoes it.
std::string shorten_long_runs(const std::string& message) {
  constexpr std::size_t kLongRun = 120;
  std::string out;
  std::size_t i = 0;
  while (i < message.size()) {
    std::size_t j = message.find(' ', i);
    if (j == std::string::npos) j = message.size();
    std::string_view run(message.data() + i, j - i);
    if (run.size() > kLongRun) {
      // Quotes around the field stay outside the shortened text.
      const std::size_t lead = run.find_first_not_of("'\"");
      const std::size_t last = run.find_last_not_of("'\",;:");
      if (lead != std::string_view::npos && last != std::string_view::npos && last >= lead) {
        out += std::string(run.substr(0, lead)) + shown(run.substr(lead, last + 1 - lead)) +
               std::string(run.substr(last + 1));
      } else {
        out += shown(run);
      }
    } else {
      out += std::string(run);
    }
    if (j < message.size()) out += ' ';
    i = j + 1;
  }
  return out;
}

std::string compose(const SourceLocation& where, const std::string& message) {
  const std::string place = where.str();
  return place.empty() ? message : place + ": " + message;
}
}  // namespace

InputError::InputError(SourceLocation where, const std::string& message)
    : std::runtime_error(compose(where, shorten_long_runs(message))),
      where_(std::move(where)),
      message_(shorten_long_runs(message)) {}

std::string shown(std::string_view text) {
  if (text.size() <= kMaxEchoedChars) return std::string(text);
  // Cut at a character boundary: never inside a UTF-8 sequence.
  std::size_t cut = kMaxEchoedChars;
  while (cut > 0 && (static_cast<unsigned char>(text[cut]) & 0xC0) == 0x80) --cut;
  return std::string(text.substr(0, cut)) + "... (" + std::to_string(text.size()) + " characters)";
}

InputErrors::InputErrors(std::vector<InputError> all)
    : InputError(all.at(0)), all_(std::move(all)) {}

}  // namespace pkarta
