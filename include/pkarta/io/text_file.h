// Reading whole input files (compound, library and measurement files).
#ifndef PKARTA_IO_TEXT_FILE_H_
#define PKARTA_IO_TEXT_FILE_H_

#include <cstddef>
#include <string>
#include <string_view>

namespace pkarta {

/// Largest input file read (64 MiB): far above any compound, library or data file, small
/// enough that a wrong path (a disk image, /dev/zero) is refused at once.
inline constexpr std::size_t kMaxInputFileBytes = std::size_t{64} << 20;

/// Reads a whole regular file into a string. Throws InputError naming the file when it
/// cannot: missing, unreadable, a folder, a device, FIFO or socket (which could block or
/// never end), or larger than kMaxInputFileBytes.
std::string read_text_file(const std::string& path);

/// What a path names when it is not a regular file ("a folder", "a FIFO", ...), or "" when
/// it is a regular file or does not exist. Links are followed.
std::string non_regular_kind(const std::string& path);

/// Byte offset of the first byte that is not part of well-formed UTF-8 (RFC 3629: no
/// overlong forms, no surrogates, nothing above U+10FFFF), or std::string_view::npos when the
/// whole text is UTF-8. The readers refuse such a file at the byte's line and column, so no
/// name or id holding it reaches a report or a JSON output.
std::size_t invalid_utf8_offset(std::string_view text);

}  // namespace pkarta

#endif  // PKARTA_IO_TEXT_FILE_H_
