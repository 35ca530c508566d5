// Input errors: the one exception type of the library, thrown only at the input boundary.
#ifndef PKARTA_ERROR_H_
#define PKARTA_ERROR_H_

#include <cstddef>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace pkarta {

/// Where a piece of input came from: a file position (1-based line and column) or a
/// command-line option. An empty file and zero line mean "no position known".
struct SourceLocation {
  std::string file;    ///< file path, or an option name such as "--dose"
  int line = 0;        ///< 1-based; 0 when not known
  int column = 0;      ///< 1-based; 0 when not known
  /// "file:line:column" (or the shorter forms when parts are unknown).
  std::string str() const;
};

/// Bad input: a malformed file, an unknown unit, a value out of range. The message is
/// lower-case without a final period; what() gives "place: message".
class InputError : public std::runtime_error {
 public:
  InputError(SourceLocation where, const std::string& message);
  explicit InputError(const std::string& message) : InputError(SourceLocation{}, message) {}
  const SourceLocation& where() const noexcept { return where_; }
  const std::string& message() const noexcept { return message_; }

 private:
  SourceLocation where_;
  std::string message_;
};

/// Every error found in one file, in line order (a reader goes on after an error to report
/// them all in one run). It is itself the first of them: what() gives that one alone.
class InputErrors : public InputError {
 public:
  /// `all` must not be empty.
  explicit InputErrors(std::vector<InputError> all);
  const std::vector<InputError>& all() const noexcept { return all_; }

 private:
  std::vector<InputError> all_;
};

/// Longest piece of the user's input echoed in a message.
inline constexpr std::size_t kMaxEchoedChars = 80;

/// The user's text as a message shows it: whole when short; else its first 80 characters,
/// "...", and its length ("abcd... (1048576 characters)"), so a huge field never floods the
/// terminal or a log.
std::string shown(std::string_view text);

}  // namespace pkarta

#endif  // PKARTA_ERROR_H_
