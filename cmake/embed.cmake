# Writes a C++ source holding the contents of IN as a string constant.
file(READ ${IN} content HEX)
string(LENGTH "${content}" hex_len)
math(EXPR byte_len "${hex_len} / 2")
string(REGEX REPLACE "([0-9a-f][0-9a-f])" "'\\\\x\\1'," bytes "${content}")
file(WRITE ${OUT} "// Generated from compounds/library.xml at build time. Do not edit.\n"
  "#include <cstddef>\nnamespace pkarta::detail {\n"
  "extern const char kBuiltinLibraryXml[] = {${bytes} '\\0'};\n"
  "extern const std::size_t kBuiltinLibraryXmlSize = ${byte_len};\n}\n")
