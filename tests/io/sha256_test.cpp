// SHA-256 against the FIPS 180-4 example vectors (NIST CSRC "Examples with intermediate
// values", SHA256.pdf) and padding boundaries.
#include "pkarta/io/sha256.h"

#include <gtest/gtest.h>

#include <fstream>
#include <set>
#include <string>

#include "pkarta/base/error.h"

namespace {

using pkarta::sha256_hex;

TEST(Sha256, FipsExamples) {
  EXPECT_EQ(sha256_hex("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(sha256_hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  EXPECT_EQ(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(Sha256, MillionAs) {
  EXPECT_EQ(sha256_hex(std::string(1000000, 'a')),
            "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST(Sha256, PaddingBoundariesDiffer) {
  // Lengths 55, 56, 63, 64 and 65 take one or two padding blocks; all digests differ.
  std::set<std::string> seen;
  for (std::size_t n : {55u, 56u, 63u, 64u, 65u}) seen.insert(sha256_hex(std::string(n, 'x')));
  EXPECT_EQ(seen.size(), 5u);
}

TEST(Sha256, FileDigestAndMissingFile) {
  const std::string path = testing::TempDir() + "/sha256-abc.txt";
  std::ofstream(path, std::ios::binary) << "abc";
  EXPECT_EQ(pkarta::sha256_file_hex(path), sha256_hex("abc"));
  EXPECT_THROW(pkarta::sha256_file_hex(testing::TempDir() + "/no-such-file"), pkarta::InputError);
}

}  // namespace
