// SHA-256 digests of input files, for the traceability block of reports.
#ifndef PKARTA_SHA256_H_
#define PKARTA_SHA256_H_

#include <string>
#include <string_view>

namespace pkarta {

/// SHA-256 (FIPS 180-4) of bytes, as 64 lower-case hexadecimal digits.
/// Example: sha256_hex("abc") ==
///   "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
std::string sha256_hex(std::string_view bytes);

/// SHA-256 of a file's bytes. Throws InputError naming the file when it cannot be read.
std::string sha256_file_hex(const std::string& path);

}  // namespace pkarta

#endif  // PKARTA_SHA256_H_
