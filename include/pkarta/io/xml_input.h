// Reading compound and library files (XML). Every error names file:line:column.
#ifndef PKARTA_XML_INPUT_H_
#define PKARTA_XML_INPUT_H_

#include <string>
#include <vector>

#include "pkarta/chem/model.h"
#include "pkarta/io/text_file.h"

namespace pkarta {

/// Located, non-fatal remarks found while reading (unknown elements or attributes).
using Warnings = std::vector<std::string>;

/// The built-in library (compounds/library.xml, embedded at build time).
Library builtin_library();

/// The built-in library's XML text.
std::string builtin_library_xml();

/// Reads a library file; references (reagent -> system/ion, buffer -> system/reagents,
/// medium -> reagents) are checked against `base` plus the file itself.
/// Throws InputError with file:line:column.
Library load_library_file(const std::string& path, const Library* base, Warnings* warnings);

/// Parses library XML text; `name` is used in messages.
Library parse_library(const std::string& text, const std::string& name, const Library* base,
                      Warnings* warnings);

/// Reads a compound file. Counterions are checked against the library, and salts given by
/// their solubility in water get a Ksp derived self-consistently (resolve_salt_ksp).
Compound load_compound_file(const std::string& path, const Library& library, Warnings* warnings);

/// Parses compound XML text; `name` is used in messages.
Compound parse_compound(const std::string& text, const std::string& name, const Library& library,
                        Warnings* warnings);

}  // namespace pkarta

#endif  // PKARTA_XML_INPUT_H_
