// SHA-256 of byte strings (OpenSSL EVP), for recording exactly which input bytes a result speaks about.
#pragma once
#include <string>

namespace zb {

/// Lower-case hex SHA-256 (64 characters) of bytes. MathError if OpenSSL fails.
std::string sha256_hex(const std::string& bytes);

}  // namespace zb
