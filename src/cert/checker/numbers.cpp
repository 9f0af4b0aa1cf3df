// Numbers read from certificates: strict, bounded grammars (no inf, nan, or exponents that would make the checker
// build huge integers), and the checker's own re-derivation of an interval claim's decimal bounds.
#include <fmt/format.h>

#include <cctype>
#include <cmath>

#include "checker.hpp"
#include "zetabraid/detail/raii.hpp"

namespace zb::checker {

namespace {

// Scans an unsigned decimal "[digits][.digits][e[+-]digits]" at s[*p...]: mantissa digits (without the point)
// into *mant, the count of fraction digits into *frac, the exponent into *exp. False when malformed or out of
// the documented bounds (kMaxMantissaDigits, kMaxDecimalExponent).
bool scan_decimal(const std::string& s, size_t* p, std::string* mant, long* frac, long* exp) {
  size_t i = *p;
  mant->clear();
  *frac = 0;
  *exp = 0;
  while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) *mant += s[i++];
  if (i < s.size() && s[i] == '.') {
    ++i;
    const size_t before = mant->size();
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) *mant += s[i++];
    *frac = static_cast<long>(mant->size() - before);
    if (*frac == 0) return false;
  }
  if (mant->empty() || mant->size() > kMaxMantissaDigits) return false;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    ++i;
    int sign = 1;
    if (i < s.size() && (s[i] == '-' || s[i] == '+')) sign = s[i++] == '-' ? -1 : 1;
    const size_t st = i;
    long e = 0;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) {
      if (i - st >= 7) return false;  // more than 7 exponent digits: out of range
      e = e * 10 + (s[i++] - '0');
    }
    if (i == st || e > kMaxDecimalExponent) return false;
    *exp = sign * e;
  }
  *p = i;
  return true;
}

// The exact rational mant * 10^(exp - frac).
void decimal_value(fmpq_t q, const std::string& mant, long frac, long exp) {
  FmpzT m, t;
  fmpz_set_str(m.get(), mant.c_str(), 10);
  const long ex = exp - frac;
  fmpz_ui_pow_ui(t.get(), 10, static_cast<ulong>(ex >= 0 ? ex : -ex));
  if (ex >= 0) {
    fmpz_mul(fmpq_numref(q), m.get(), t.get());
    fmpz_one(fmpq_denref(q));
  } else {
    fmpq_set_fmpz_frac(q, m.get(), t.get());
  }
}

// x > 0 (finite) rounded to `digits` significant decimal digits, up or down, as "d.ddddde<k>". The decimal
// exponent k is first estimated from the binary exponent, then corrected by exact comparisons.
std::string round_decimal(const arf_t x, int digits, bool up) {
  if (arf_is_zero(x)) return "0";
  FmpzT m, e, n, p10, lo, hi;
  FmpqT q, t;
  arf_get_fmpz_2exp(m.get(), e.get(), x);
  fmpz_set(fmpq_numref(q.get()), m.get());
  const slong ee = fmpz_get_si(e.get());
  if (ee >= 0)
    fmpq_mul_2exp(q.get(), q.get(), static_cast<ulong>(ee));
  else
    fmpq_div_2exp(q.get(), q.get(), static_cast<ulong>(-ee));
  const double log2x = static_cast<double>(ee) + static_cast<double>(fmpz_bits(m.get())) - 1.0;
  long k = static_cast<long>(std::floor(log2x * 0.30102999566398120));
  fmpz_ui_pow_ui(lo.get(), 10, static_cast<ulong>(digits - 1));
  fmpz_ui_pow_ui(hi.get(), 10, static_cast<ulong>(digits));
  for (;;) {
    const long s = digits - 1 - k;  // scale by 10^s
    fmpz_ui_pow_ui(p10.get(), 10, static_cast<ulong>(s >= 0 ? s : -s));
    if (s >= 0)
      fmpq_mul_fmpz(t.get(), q.get(), p10.get());
    else
      fmpq_div_fmpz(t.get(), q.get(), p10.get());
    fmpz_fdiv_q(n.get(), fmpq_numref(t.get()), fmpq_denref(t.get()));
    if (fmpz_cmp(n.get(), lo.get()) < 0) {
      --k;
    } else if (fmpz_cmp(n.get(), hi.get()) >= 0) {
      ++k;
    } else {
      break;
    }
  }
  if (up) fmpz_cdiv_q(n.get(), fmpq_numref(t.get()), fmpq_denref(t.get()));
  if (fmpz_cmp(n.get(), hi.get()) >= 0) {  // rounding up reached 10^digits
    fmpz_divexact_ui(n.get(), n.get(), 10);
    ++k;
  }
  char* str = fmpz_get_str(nullptr, 10, n.get());
  std::string d(str);
  flint_free(str);
  return d.size() > 1 ? fmt::format("{}.{}e{}", d.substr(0, 1), d.substr(1), k) : fmt::format("{}e{}", d, k);
}

}  // namespace

bool parse_decimal(arb_t x, const std::string& s, long prec) {
  size_t p = 0;
  std::string mant;
  long frac = 0, exp = 0;
  if (!scan_decimal(s, &p, &mant, &frac, &exp) || p != s.size()) return false;
  FmpqT q;
  decimal_value(q.get(), mant, frac, exp);
  arb_set_fmpq(x, q.get(), prec);
  return true;
}

bool parse_ball(arb_t x, const std::string& s, long prec) {
  // "[" ["-"] decimal " +/- " decimal "]"  or  "[+/- " decimal "]"
  std::string mant;
  long frac = 0, exp = 0;
  size_t p = 0;
  if (s.empty() || s[p++] != '[') return false;
  const std::string pm = "+/- ";
  if (s.compare(p, pm.size(), pm) != 0) {
    if (p < s.size() && s[p] == '-') ++p;
    if (!scan_decimal(s, &p, &mant, &frac, &exp)) return false;
    if (s.compare(p, 1, " ") != 0) return false;
    ++p;
    if (s.compare(p, pm.size(), pm) != 0) return false;
  }
  p += pm.size();
  if (!scan_decimal(s, &p, &mant, &frac, &exp)) return false;
  if (p + 1 != s.size() || s[p] != ']') return false;
  // the text is now known to be a bounded, finite enclosure: Arb reads it (as the producer's printer wrote it)
  return arb_set_str(x, s.c_str(), prec) == 0 && arb_is_finite(x);
}

bool derive_bounds(const std::string& ball, long prec, std::string* upper, std::string* lower) {
  ArbT b;
  if (!parse_ball(b.get(), ball, 128)) reject(fmt::format("malformed enclosure {}", ball));
  ArfT u, floor_bound;
  arb_get_ubound_arf(u.get(), b.get(), 128);
  // never "leakage <= 0": an upper end <= 0 is stated as 2^-prec
  arf_one(floor_bound.get());
  arf_mul_2exp_si(floor_bound.get(), floor_bound.get(), -prec);
  if (arf_sgn(u.get()) <= 0) arf_set(u.get(), floor_bound.get());
  *upper = round_decimal(u.get(), 6, true);
  const bool positive = arb_is_positive(b.get());
  lower->clear();
  if (positive) {
    arb_get_lbound_arf(u.get(), b.get(), 128);
    *lower = round_decimal(u.get(), 6, false);
  }
  return positive;
}

}  // namespace zb::checker
