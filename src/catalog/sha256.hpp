#pragma once
// SHA-256 (FIPS 180-4) for source-file digests and catalog fingerprints.

#include <array>
#include <cstdint>
#include <string>
#include <string_view>

namespace coilsieve::catalog {

// Incremental SHA-256: update() any number of times, then hex() once.
class Sha256 {
public:
    Sha256();
    void update(std::string_view bytes);
    // Finishes the digest; the object must not be updated afterwards.
    std::array<std::uint8_t, 32> digest();
    std::string hex();

private:
    void block(const std::uint8_t* p);
    std::array<std::uint32_t, 8> h_;
    std::array<std::uint8_t, 64> buffer_{};
    std::size_t buffered_ = 0;
    std::uint64_t length_ = 0; // bytes
};

// Lower-case hex digest of `bytes`.
std::string sha256_hex(std::string_view bytes);

} // namespace coilsieve::catalog
