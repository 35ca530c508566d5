// Reading whole input files (compound, library and measurement files).
#ifndef PKARTA_IO_TEXT_FILE_H_
#define PKARTA_IO_TEXT_FILE_H_

#include <string>

namespace pkarta {

/// Reads a whole file into a string. Throws InputError naming the file when it cannot.
std::string read_text_file(const std::string& path);

}  // namespace pkarta

#endif  // PKARTA_IO_TEXT_FILE_H_
