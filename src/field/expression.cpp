#include "zetabraid/field/expression.hpp"

#include <fmt/format.h>

#include <bit>
#include <cctype>
#include <limits>
#include <numeric>
#include <optional>

#include "zetabraid/detail/raii.hpp"

namespace zb {

namespace {

enum class Tok { kEnd, kInt, kIdent, kPlus, kMinus, kStar, kSlash, kCaret, kLParen, kRParen };

struct Token {
  Tok kind = Tok::kEnd;
  std::string text;
  size_t col = 0;  // 1-based
};

const char* tok_name(Tok t) {
  switch (t) {
    case Tok::kEnd: return "end of input";
    case Tok::kInt: return "an integer";
    case Tok::kIdent: return "a name";
    case Tok::kPlus: return "'+'";
    case Tok::kMinus: return "'-'";
    case Tok::kStar: return "'*'";
    case Tok::kSlash: return "'/'";
    case Tok::kCaret: return "'^'";
    case Tok::kLParen: return "'('";
    case Tok::kRParen: return "')'";
  }
  return "?";
}

std::vector<Token> tokenize(const std::string& s) {
  std::vector<Token> out;
  size_t i = 0;
  while (i < s.size()) {
    unsigned char c = static_cast<unsigned char>(s[i]);
    if (std::isspace(c)) { ++i; continue; }
    Token t;
    t.col = i + 1;
    if (std::isdigit(c)) {
      size_t j = i;
      while (j < s.size() && std::isdigit(static_cast<unsigned char>(s[j]))) ++j;
      if (j < s.size() && s[j] == '.')
        throw ExpressionError("decimal numbers are not exact; write a fraction such as 1/2", j + 1);
      t.kind = Tok::kInt;
      t.text = s.substr(i, j - i);
      i = j;
    } else if (std::isalpha(c) || c == '_') {
      size_t j = i;
      while (j < s.size() && (std::isalnum(static_cast<unsigned char>(s[j])) || s[j] == '_')) ++j;
      t.kind = Tok::kIdent;
      t.text = s.substr(i, j - i);
      i = j;
    } else {
      switch (c) {
        case '+': t.kind = Tok::kPlus; break;
        case '-': t.kind = Tok::kMinus; break;
        case '*': t.kind = Tok::kStar; break;
        case '/': t.kind = Tok::kSlash; break;
        case '^': t.kind = Tok::kCaret; break;
        case '(': t.kind = Tok::kLParen; break;
        case ')': t.kind = Tok::kRParen; break;
        default:
          throw ExpressionError(fmt::format("unexpected character '{}'; expected a number, a name, an operator "
                                            "(+ - * / ^) or a parenthesis",
                                            s[i] >= 32 && s[i] < 127 ? std::string(1, s[i]) : "\\x" + fmt::format("{:02x}", c)),
                                i + 1);
      }
      t.text = std::string(1, s[i]);
      ++i;
    }
    out.push_back(std::move(t));
  }
  Token end;
  end.col = s.size() + 1;
  out.push_back(end);
  return out;
}

// A phase r*pi^a*i^b with r rational, used inside exp(...).
struct Phase {
  fmpq_t r;
  int pi = 0;
  int i = 0;
  Phase() { fmpq_init(r); }
  Phase(const Phase& o) : pi(o.pi), i(o.i) { fmpq_init(r); fmpq_set(r, o.r); }
  Phase& operator=(const Phase& o) { fmpq_set(r, o.r); pi = o.pi; i = o.i; return *this; }
  ~Phase() { fmpq_clear(r); }
  void normalise() {
    i = ((i % 4) + 4) % 4;
    if (i >= 2) { fmpq_neg(r, r); i -= 2; }
    if (fmpq_is_zero(r)) { pi = 0; i = 0; }
  }
};

class Parser {
 public:
  Parser(const std::string& text, const FieldPtr& f, const ExpressionLimits& lim,
         const std::map<std::string, Scalar>* names = nullptr)
      : toks_(tokenize(text)), f_(f), lim_(lim), names_(names) {}

  Scalar parse_all() {
    Scalar v = expr();
    if (cur().kind != Tok::kEnd) fail(fmt::format("expected an operator or the end, found {}", describe(cur())));
    return v;
  }

 private:
  const Token& cur() const { return toks_[pos_]; }
  void next() { if (pos_ + 1 < toks_.size()) ++pos_; }
  [[noreturn]] void fail(const std::string& msg) const { throw ExpressionError(msg, cur().col); }
  static std::string describe(const Token& t) {
    if (t.kind == Tok::kInt || t.kind == Tok::kIdent) return "'" + t.text + "'";
    return tok_name(t.kind);
  }
  void expect(Tok k, const char* what) {
    if (cur().kind != k) fail(fmt::format("expected {}, found {}", what, describe(cur())));
    next();
  }
  // One nesting level: an opening parenthesis or a unary sign (checked against lim_.max_depth).
  struct Depth {
    Parser& p;
    explicit Depth(Parser& pp) : p(pp) {
      if (++p.depth_ > p.lim_.max_depth)
        p.fail(fmt::format("expression nested deeper than {} levels (each parenthesis and unary sign is a level)",
                           p.lim_.max_depth));
    }
    ~Depth() { --p.depth_; }
  };

  // ---- the bit budget (lim_.max_bits) ----
  static long sat_mul(long a, long b) {
    long r;
    return __builtin_mul_overflow(a, b, &r) ? std::numeric_limits<long>::max() : r;
  }
  [[noreturn]] void too_big(long bits, size_t col, const std::string& what) const {
    throw ResourceError(fmt::format("column {}: {} would need {}{} bits, more than the limit of {} bits for an exact "
                                    "value (max_bits; --max-bits on the command line)",
                                    col, what, bits == std::numeric_limits<long>::max() ? "over " : "about ",
                                    bits, lim_.max_bits));
  }
  const Scalar& checked(const Scalar& v, size_t col) const {
    long b = v.size_bits();
    if (b > lim_.max_bits) too_big(b, col, "this value");
    return v;
  }
  // Size of w^-1, estimated before computing it: a non-rational element of K of height h has an inverse of about
  // phi^2 h bits (phi coefficients of about phi h bits: adjugate over norm); each square root in w doubles the
  // number of terms and the height (Scalar::inverse multiplies by a conjugate per radical).
  long inverse_estimate(const Scalar& w) const {
    RadicalMask all = 0;
    long h = 0;
    bool rational = true;
    for (const auto& [m, c] : w.terms()) {
      all |= m;
      h = std::max(h, c.size().height);
      if (m != 0 || !c.is_rational()) rational = false;
    }
    if (rational) return w.size_bits();
    const int m = std::popcount(all);
    for (int j = 0; j < 64; ++j)
      if (all & (RadicalMask{1} << j)) h += f_->radicand(j).size().height;
    if (m > 20) return std::numeric_limits<long>::max();
    const long phi = f_->cyclotomic()->degree();
    return sat_mul(sat_mul(phi, phi), sat_mul(h, 1L << (2 * m)));
  }
  Scalar checked_inverse(const Scalar& w, size_t col) const {
    long est = inverse_estimate(w);
    if (est > lim_.max_bits) too_big(est, col, "the inverse");
    return checked(w.inverse(), col);
  }
  // base^e by squaring, every intermediate checked; refused beforehand when the estimated size is over the limit.
  Scalar checked_pow(Scalar base, long e, size_t col) const {
    if (e < 0) {
      base = checked_inverse(base, col);
      e = -e;
    }
    if (e >= 2 && !base.is_zero()) {
      // bits beyond the leading one of each number, times e: about the size of base^e (a lower estimate when the
      // coefficients grow by reduction; the stepwise checks below catch that case)
      long log_size = 0;
      for (const auto& [m, c] : base.terms()) {
        Cyclo::Size sz = c.size();
        log_size += sz.total - sz.nonzero - 1;
      }
      long est = sat_mul(log_size, e);
      if (est > lim_.max_bits) too_big(est, col, fmt::format("the power ^{}", e));
    }
    Scalar r(f_, 1);
    while (e) {
      if (e & 1) r = checked(r * base, col);
      e >>= 1;
      if (e) base = checked(base * base, col);
    }
    return r;
  }

  Scalar expr() {
    Scalar v = term();
    while (cur().kind == Tok::kPlus || cur().kind == Tok::kMinus) {
      bool plus = cur().kind == Tok::kPlus;
      size_t col = cur().col;
      next();
      Scalar w = term();
      if (plus) v += w; else v -= w;
      checked(v, col);
    }
    return v;
  }

  Scalar term() {
    Scalar v = factor();
    while (cur().kind == Tok::kStar || cur().kind == Tok::kSlash) {
      bool mul = cur().kind == Tok::kStar;
      size_t col = cur().col;
      next();
      Scalar w = factor();
      if (mul) {
        v *= w;
      } else {
        if (w.is_zero()) throw ExpressionError("division by zero", col);
        v *= checked_inverse(w, col);
      }
      checked(v, col);
    }
    return v;
  }

  Scalar factor() {
    if (cur().kind == Tok::kMinus || cur().kind == Tok::kPlus) {
      Depth d(*this);
      bool minus = cur().kind == Tok::kMinus;
      next();
      return minus ? -factor() : factor();
    }
    return power();
  }

  long exponent() {
    bool paren = false;
    if (cur().kind == Tok::kLParen) { paren = true; next(); }
    bool neg = false;
    if (cur().kind == Tok::kMinus) { neg = true; next(); }
    else if (cur().kind == Tok::kPlus) next();
    if (cur().kind != Tok::kInt) fail(fmt::format("expected an integer exponent, found {}", describe(cur())));
    if (cur().text.size() > 12) fail("exponent too large");
    long e = std::stol(cur().text);
    if (e > lim_.max_exponent) fail(fmt::format("exponent {} exceeds the limit {}", e, lim_.max_exponent));
    next();
    if (paren) expect(Tok::kRParen, "')' closing the exponent");
    return neg ? -e : e;
  }

  Scalar power() {
    size_t col = cur().col;
    Scalar base = atom();
    if (cur().kind == Tok::kCaret) {
      size_t caret = cur().col;
      next();
      long e = exponent();
      if (e < 0 && base.is_zero()) throw ExpressionError("0 raised to a negative power", col);
      base = checked_pow(std::move(base), e, caret);
      if (cur().kind == Tok::kCaret) fail("write a^(b*c) as a power with one integer exponent; '^' does not chain");
    }
    return base;
  }

  Scalar integer_value(const std::string& digits, size_t col) {
    // log2(10) < 3.33: refuse before converting when the digits alone are over the limit
    if (sat_mul(static_cast<long>(digits.size()), 333) / 100 > lim_.max_bits + 4)
      too_big(sat_mul(static_cast<long>(digits.size()), 332) / 100, col, "this integer");
    fmpz_t z;
    fmpz_init(z);
    fmpz_set_str(z, digits.c_str(), 10);
    fmpq_t q;
    fmpq_init(q);
    fmpq_set_fmpz_frac(q, z, one());
    Scalar v(f_, Cyclo(f_->cyclotomic(), q));
    fmpq_clear(q);
    fmpz_clear(z);
    return v;
  }
  static const fmpz* one() {
    static fmpz o = 1;  // small fmpz values are stored inline
    return &o;
  }

  Scalar atom() {
    const Token t = cur();
    unsigned long n = f_->conductor();
    switch (t.kind) {
      case Tok::kInt:
        next();
        return checked(integer_value(t.text, t.col), t.col);
      case Tok::kLParen: {
        Depth d(*this);
        next();
        Scalar v = expr();
        expect(Tok::kRParen, "')'");
        return v;
      }
      case Tok::kIdent: {
        if (t.text == "zeta") { next(); return Scalar::zeta_power(f_, 1); }
        if (t.text == "i") {
          if (n % 4 != 0)
            fail(fmt::format("i lies in Q(zeta_{}) only when 4 divides the conductor; try conductor {}", n,
                             std::lcm(n, 4UL)));
          next();
          return Scalar::zeta_power(f_, static_cast<long>(n / 4));
        }
        if (t.text == "sqrt" || t.text == "conj") {
          Depth d(*this);
          next();
          expect(Tok::kLParen, fmt::format("'(' after {}", t.text).c_str());
          size_t col = cur().col;
          Scalar v = expr();
          expect(Tok::kRParen, "')'");
          if (t.text == "conj") return v.conj();
          if (!v.in_base())
            throw ExpressionError("sqrt of a number that already involves square roots is not supported", col);
          try {
            return checked(f_->sqrt(v.to_base()), t.col);
          } catch (const InputError& e) {
            throw ExpressionError(e.what(), col);
          }
        }
        if (t.text == "exp") {
          Depth d(*this);
          next();
          expect(Tok::kLParen, "'(' after exp");
          size_t col = cur().col;
          Phase ph = phase_sum();
          expect(Tok::kRParen, "')' closing exp(");
          return root_of_unity(ph, col);
        }
        if (t.text == "pi") fail("pi is only allowed inside exp(...), as in exp(2*pi*i/5)");
        if (names_) {
          auto it = names_->find(t.text);
          if (it != names_->end()) {
            next();
            return checked(it->second, t.col);
          }
        }
        fail(fmt::format("unknown name '{}'; expected zeta, i, sqrt, conj or exp", t.text));
      }
      default:
        fail(fmt::format("expected a number, zeta, i, sqrt(...), exp(...) or '(', found {}", describe(t)));
    }
  }

  // ---- phases inside exp(...) ----
  Phase phase_sum() {
    Phase v = phase_term();
    while (cur().kind == Tok::kPlus || cur().kind == Tok::kMinus) {
      bool plus = cur().kind == Tok::kPlus;
      next();
      Phase w = phase_term();
      if (fmpq_is_zero(w.r)) continue;
      if (fmpq_is_zero(v.r)) { v = w; if (!plus) fmpq_neg(v.r, v.r); continue; }
      if (w.pi != v.pi || w.i != v.i) fail("inside exp(...) every term must be a rational multiple of pi*i");
      if (plus) fmpq_add(v.r, v.r, w.r); else fmpq_sub(v.r, v.r, w.r);
      v.normalise();
    }
    return v;
  }
  Phase phase_term() {
    Phase v = phase_factor();
    while (cur().kind == Tok::kStar || cur().kind == Tok::kSlash) {
      bool mul = cur().kind == Tok::kStar;
      next();
      Phase w = phase_factor();
      if (mul) {
        fmpq_mul(v.r, v.r, w.r);
        v.pi += w.pi;
        v.i += w.i;
      } else {
        if (fmpq_is_zero(w.r)) fail("division by zero");
        fmpq_div(v.r, v.r, w.r);
        v.pi -= w.pi;
        v.i -= w.i;
      }
      v.normalise();
    }
    return v;
  }
  Phase phase_factor() {
    Phase v;
    const Token t = cur();
    if (t.kind == Tok::kMinus || t.kind == Tok::kPlus) {
      Depth d(*this);
      next();
      v = phase_factor();
      if (t.kind == Tok::kMinus) fmpq_neg(v.r, v.r);
      return v;
    }
    if (t.kind == Tok::kInt) {
      next();
      fmpz_t z;
      fmpz_init(z);
      fmpz_set_str(z, t.text.c_str(), 10);
      fmpq_set_fmpz_frac(v.r, z, one());
      fmpz_clear(z);
    } else if (t.kind == Tok::kIdent && (t.text == "pi" || t.text == "i")) {
      next();
      fmpq_one(v.r);
      (t.text == "pi" ? v.pi : v.i) = 1;
    } else if (t.kind == Tok::kLParen) {
      Depth d(*this);
      next();
      v = phase_sum();
      expect(Tok::kRParen, "')'");
    } else {
      fail(fmt::format("inside exp(...) expected a rational multiple of pi*i such as 2*pi*i/5, found {}",
                       describe(t)));
    }
    if (cur().kind == Tok::kCaret) fail("powers are not supported inside exp(...)");
    return v;
  }

  Scalar root_of_unity(const Phase& ph, size_t col) {
    unsigned long n = f_->conductor();
    if (fmpq_is_zero(ph.r)) return Scalar(f_, 1);
    if (ph.pi != 1 || ph.i != 1)
      throw ExpressionError("exp(...) needs an argument of the form r*pi*i with r rational, e.g. exp(2*pi*i/5)", col);
    // exp(r*pi*i) = exp(2*pi*i * r/2).
    fmpq_t t;
    fmpq_init(t);
    fmpq_div_2exp(t, ph.r, 1);
    fmpz_t q, p;
    fmpz_init_set(q, fmpq_denref(t));
    fmpz_init_set(p, fmpq_numref(t));
    fmpq_clear(t);
    bool odd = n % 2 == 1;
    unsigned long order_ok = odd ? 2 * n : n;  // Q(zeta_N) = Q(zeta_2N) for odd N
    if (fmpz_cmp_ui(q, order_ok) > 0 || order_ok % fmpz_get_ui(q) != 0) {
      std::string qs = fmpz_string(q);
      unsigned long qq = fmpz_fits_si(q) ? fmpz_get_ui(q) : 0;
      fmpz_clear(q);
      fmpz_clear(p);
      throw ExpressionError(
          qq ? fmt::format("exp(2*pi*i*k/{}) is not in Q(zeta_{}); it lies in Q(zeta_N) when {} divides N, "
                           "e.g. conductor {}",
                           qs, n, qs, std::lcm(n, qq))
             : "root of unity of enormous order",
          col);
    }
    unsigned long qq = fmpz_get_ui(q);
    long pm = fmpz_fdiv_ui(p, qq);
    fmpz_clear(q);
    fmpz_clear(p);
    if (n % qq == 0) return Scalar::zeta_power(f_, static_cast<long>(n / qq) * pm);
    // odd N, q | 2N: exp(2*pi*i/(2N)) = -zeta^((N+1)/2)
    long k = static_cast<long>(2 * n / qq) * pm;  // exp(2*pi*i*k/(2N))
    Scalar z2 = -Scalar::zeta_power(f_, static_cast<long>((n + 1) / 2));
    return z2.pow(k % static_cast<long>(2 * n));
  }

  std::vector<Token> toks_;
  size_t pos_ = 0;
  FieldPtr f_;
  ExpressionLimits lim_;
  int depth_ = 0;
  const std::map<std::string, Scalar>* names_ = nullptr;
};

}  // namespace

Scalar parse_expression(const std::string& text, const FieldPtr& f, const ExpressionLimits& limits) {
  static const std::map<std::string, Scalar> none;
  return parse_expression(text, f, none, limits);
}

Scalar parse_expression(const std::string& text, const FieldPtr& f, const std::map<std::string, Scalar>& names,
                        const ExpressionLimits& limits) {
  if (text.size() > limits.max_length)
    throw ExpressionError(fmt::format("expression longer than {} characters", limits.max_length), 1);
  Parser p(text, f, limits, names.empty() ? nullptr : &names);
  try {
    return p.parse_all();
  } catch (const ExpressionError&) {
    throw;
  } catch (const MathError& e) {
    throw ExpressionError(e.what(), 1);
  }
}

}  // namespace zb
