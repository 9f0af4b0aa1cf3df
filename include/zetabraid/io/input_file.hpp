// Reading untrusted input files: regular files only, bounded size, never blocking on a FIFO or device.
#pragma once
#include <cstddef>
#include <string>

namespace zb {

/// Documented size limits of input files (bytes).
inline constexpr size_t kMaxModelFileBytes = 64u << 20;        ///< model files (TOML)
inline constexpr size_t kMaxWordFileBytes = 64u << 20;         ///< braid-word files
inline constexpr size_t kMaxKeepFileBytes = 16u << 20;         ///< keep files (explicit basis vectors)
inline constexpr size_t kMaxCertificateFileBytes = 256u << 20; ///< certificates (JSON)

/// The whole file as bytes. InputError (exit 2) naming `what` and the path when the path does not name a regular
/// file (directory, FIFO, device, socket), cannot be read, or is larger than max_bytes. Opens with O_NONBLOCK so a
/// FIFO never blocks, checks the type with fstat on the opened descriptor, and never reads more than max_bytes + 1.
std::string read_input_file(const std::string& path, size_t max_bytes, const std::string& what);

/// `s` with control characters, DEL, backslash and non-ASCII bytes written as \n, \t, \xHH, \\ (safe to print
/// on a terminal: no escape sequence of the input reaches it).
std::string printable(const std::string& s);

}  // namespace zb
