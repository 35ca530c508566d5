// Reading whole input files (compound, library and measurement files).
#ifndef PKARTA_IO_TEXT_FILE_H_
#define PKARTA_IO_TEXT_FILE_H_

#include <cstddef>
#include <string>

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

}  // namespace pkarta

#endif  // PKARTA_IO_TEXT_FILE_H_
