#include "catalog/sha256.hpp"

#include <gtest/gtest.h>
#include <string>

using coilsieve::catalog::Sha256;
using coilsieve::catalog::sha256_hex;

// Expected digests: FIPS 180-4 examples (NIST CSRC "SHA256.pdf" example values).
TEST(Sha256, FipsOneBlockAbc) {
    EXPECT_EQ(sha256_hex("abc"),
              "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

TEST(Sha256, EmptyString) {
    EXPECT_EQ(sha256_hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

TEST(Sha256, FipsTwoBlockMessage) {
    EXPECT_EQ(sha256_hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
              "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST(Sha256, IncrementalEqualsOneShot) {
    std::string text(1000, 'x');
    for (std::size_t i = 0; i < text.size(); ++i) text[i] = static_cast<char>('a' + i % 26);
    Sha256 h;
    h.update(text.substr(0, 63));
    h.update(text.substr(63, 1));
    h.update(text.substr(64));
    EXPECT_EQ(h.hex(), sha256_hex(text));
}
