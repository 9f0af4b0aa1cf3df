// Strict reading of certificate JSON (docs/certificate-format.md): duplicate keys, unknown keys, missing keys,
// wrong types and out-of-range integers are all rejections.
#include <fmt/format.h>
#include <openssl/evp.h>

#include "checker.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"

namespace zb::checker {

void reject(const std::string& why) { throw Reject{why}; }

json parse_strict(const std::string& text) {
  // nlohmann keeps the last of two equal keys silently: track the keys of every open object.
  std::vector<std::set<std::string>> open;
  std::vector<std::string> names;  // the key under which each open object stands (display only)
  std::string last_key;
  auto cb = [&](int /*depth*/, json::parse_event_t ev, json& parsed) {
    if (ev == json::parse_event_t::object_start) {
      open.emplace_back();
      names.push_back(names.empty() ? std::string("the certificate") : "'" + last_key + "'");
    } else if (ev == json::parse_event_t::object_end) {
      open.pop_back();
      names.pop_back();
    } else if (ev == json::parse_event_t::key) {
      last_key = parsed.get<std::string>();
      if (!open.back().insert(last_key).second)
        reject(fmt::format("duplicate key '{}' in {}", last_key, names.back()));
    }
    return true;
  };
  try {
    return json::parse(text, cb);
  } catch (const json::exception& e) {
    reject(fmt::format("not a JSON document: {}", e.what()));
  }
}

void expect_keys(const json& o, const std::set<std::string>& keys, const std::string& where) {
  if (!o.is_object()) reject(fmt::format("{} is not an object", where));
  for (auto it = o.begin(); it != o.end(); ++it)
    if (!keys.count(it.key())) reject(fmt::format("unexpected key '{}' in {}", it.key(), where));
  std::vector<std::string> missing;
  for (const auto& k : keys)
    if (!o.contains(k)) missing.push_back(k);
  if (!missing.empty())
    reject(fmt::format("missing key{} {} in {}", missing.size() > 1 ? "s" : "", fmt::join(missing, ", "), where));
}

std::string str_of(const json& v, const std::string& where) {
  if (!v.is_string()) reject(fmt::format("{} must be a string", where));
  return v.get<std::string>();
}

size_t uint_of(const json& v, const std::string& where, size_t max) {
  if (!v.is_number_unsigned()) reject(fmt::format("{} must be a non-negative integer", where));
  const auto x = v.get<std::uint64_t>();
  if (x > max) reject(fmt::format("{} is out of range (at most {})", where, max));
  return static_cast<size_t>(x);
}

bool bool_of(const json& v, const std::string& where) {
  if (!v.is_boolean()) reject(fmt::format("{} must be true or false", where));
  return v.get<bool>();
}

void expect_null(const json& v, const std::string& where) {
  if (!v.is_null()) reject(fmt::format("{} must be null", where));
}

Scalar scalar_of(const json& v, const FieldPtr& f, const std::string& where) {
  std::string s = str_of(v, where);
  Scalar x(f);
  try {
    x = parse_expression(s, f);
  } catch (const std::exception& e) {
    reject(fmt::format("{}: not an exact expression: {}", where, e.what()));
  }
  // exact values are written in the canonical form of Scalar::str (section 6): one text per value
  if (x.str() != s) reject(fmt::format("{}: \"{}\" is not in canonical form (\"{}\")", where, s, x.str()));
  return x;
}

Matrix matrix_of_rows(const json& v, size_t rows, size_t cols, const FieldPtr& f, const std::string& where) {
  if (!v.is_array() || v.size() != rows) reject(fmt::format("{} must be an array of {} rows", where, rows));
  Matrix m(f, rows, cols);
  for (size_t i = 0; i < rows; ++i) {
    if (!v[i].is_array() || v[i].size() != cols) reject(fmt::format("{} row {} must have {} entries", where, i, cols));
    for (size_t j = 0; j < cols; ++j) m(i, j) = scalar_of(v[i][j], f, fmt::format("{}[{}][{}]", where, i, j));
  }
  return m;
}

ModularPrime prime_of(const json& j, const Field& f, const std::string& where) {
  expect_keys(j, {"p", "zeta", "roots"}, where);
  const ulong max = ~ulong(0);
  ulong p = uint_of(j["p"], where + ".p", max), z = uint_of(j["zeta"], where + ".zeta", max);
  if (!j["roots"].is_array() || j["roots"].size() != static_cast<size_t>(f.radicand_count()))
    reject(fmt::format("{}.roots must be an array of {} integers (one per radicand)", where, f.radicand_count()));
  std::vector<ulong> roots;
  for (const auto& r : j["roots"]) roots.push_back(uint_of(r, where + ".roots", max));
  for (ulong r : roots)
    if (r >= p) reject(fmt::format("{}: a root is not reduced mod p", where));
  if (z >= p) reject(fmt::format("{}: zeta is not reduced mod p", where));
  try {
    return make_prime(f, p, z, roots);
  } catch (const std::exception& e) {
    reject(fmt::format("{}: {}", where, e.what()));
  }
}

std::string sha256_hex(const std::string& bytes) {
  unsigned char md[EVP_MAX_MD_SIZE];
  unsigned int len = 0;
  EVP_MD_CTX* ctx = EVP_MD_CTX_new();
  bool ok = ctx && EVP_DigestInit_ex(ctx, EVP_sha256(), nullptr) == 1 &&
            EVP_DigestUpdate(ctx, bytes.data(), bytes.size()) == 1 && EVP_DigestFinal_ex(ctx, md, &len) == 1;
  EVP_MD_CTX_free(ctx);
  if (!ok) throw InternalError("SHA-256 computation failed (OpenSSL)");
  std::string hex;
  for (unsigned int i = 0; i < len; ++i) hex += fmt::format("{:02x}", md[i]);
  return hex;
}

}  // namespace zb::checker
