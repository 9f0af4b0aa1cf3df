#include "zetabraid/io/sha256.hpp"

#include <openssl/evp.h>

#include <memory>

#include "zetabraid/error.hpp"

namespace zb {

std::string sha256_hex(const std::string& bytes) {
  unsigned char md[EVP_MAX_MD_SIZE];
  unsigned int len = 0;
  std::unique_ptr<EVP_MD_CTX, void (*)(EVP_MD_CTX*)> ctx(EVP_MD_CTX_new(), EVP_MD_CTX_free);
  bool ok = ctx && EVP_DigestInit_ex(ctx.get(), EVP_sha256(), nullptr) == 1 &&
            EVP_DigestUpdate(ctx.get(), bytes.data(), bytes.size()) == 1 &&
            EVP_DigestFinal_ex(ctx.get(), md, &len) == 1;
  if (!ok) throw MathError("SHA-256 computation failed (OpenSSL)");
  static const char* hex = "0123456789abcdef";
  std::string out;
  out.reserve(2 * len);
  for (unsigned int i = 0; i < len; ++i) {
    out += hex[md[i] >> 4];
    out += hex[md[i] & 15];
  }
  return out;
}

}  // namespace zb
