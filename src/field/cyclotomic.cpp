#include "zetabraid/field/cyclotomic.hpp"

#include <flint/fmpz_vec.h>

#include <fmt/format.h>

#include <algorithm>
#include <functional>

#include "zetabraid/error.hpp"

namespace zb {

std::string abbreviate(const std::string& s, size_t max_chars) {
  if (s.size() <= max_chars) return s;
  const size_t head = max_chars * 2 / 3, tail = max_chars / 3;
  return s.substr(0, head) + fmt::format(" ... ({} characters) ... ", s.size()) + s.substr(s.size() - tail);
}

unsigned long euler_phi(unsigned long n) {
  fmpz_t a, r;
  fmpz_init_set_ui(a, n);
  fmpz_init(r);
  fmpz_euler_phi(r, a);
  unsigned long v = fmpz_get_ui(r);
  fmpz_clear(a);
  fmpz_clear(r);
  return v;
}

CyclotomicField::CyclotomicField(unsigned long n) : n_(n) {
  fmpz_poly_init(phi_);
  fmpz_poly_cyclotomic(phi_, n);
  degree_ = fmpz_poly_degree(phi_);
  fmpq_poly_t q;
  fmpq_poly_init(q);
  fmpq_poly_set_fmpz_poly(q, phi_);
  nf_init(nf_, q);
  fmpq_poly_clear(q);
}

CyclotomicField::~CyclotomicField() {
  nf_clear(nf_);
  fmpz_poly_clear(phi_);
}

CyclotomicFieldPtr CyclotomicField::make(unsigned long conductor) {
  if (conductor == 0) throw InputError("the conductor N of Q(zeta_N) must be at least 1");
  if (conductor > 1000000 || static_cast<long>(euler_phi(conductor)) > kMaxDegree)
    throw ResourceError(fmt::format("Q(zeta_{}) has degree {} over Q; at most {} is supported", conductor,
                                    euler_phi(conductor), kMaxDegree));
  return CyclotomicFieldPtr(new CyclotomicField(conductor));
}

// ---- Cyclo ----

Cyclo::Cyclo(CyclotomicFieldPtr k) : k_(std::move(k)) {
  nf_elem_init(v_, k_->nf());
  nf_elem_zero(v_, k_->nf());
}
Cyclo::Cyclo(CyclotomicFieldPtr k, long v) : Cyclo(std::move(k)) { nf_elem_set_si(v_, v, k_->nf()); }
Cyclo::Cyclo(CyclotomicFieldPtr k, const fmpq_t v) : Cyclo(std::move(k)) { nf_elem_set_fmpq(v_, v, k_->nf()); }
Cyclo::Cyclo(CyclotomicFieldPtr k, long num, long den) : Cyclo(std::move(k)) {
  if (den == 0) throw MathError("division by zero in a rational constant");
  fmpq_t q;
  fmpq_init(q);
  fmpq_set_si(q, num, static_cast<unsigned long>(den < 0 ? -den : den));
  if (den < 0) fmpq_neg(q, q);
  nf_elem_set_fmpq(v_, q, k_->nf());
  fmpq_clear(q);
}

Cyclo Cyclo::zeta_power(CyclotomicFieldPtr k, long e) {
  long n = static_cast<long>(k->conductor());
  long r = ((e % n) + n) % n;
  fmpq_poly_t p;
  fmpq_poly_init(p);
  fmpq_poly_set_coeff_si(p, r, 1);
  Cyclo out = from_poly(std::move(k), p);
  fmpq_poly_clear(p);
  return out;
}

Cyclo Cyclo::from_poly(CyclotomicFieldPtr k, const fmpq_poly_t p) {
  Cyclo out(std::move(k));
  fmpq_poly_t r;
  fmpq_poly_init(r);
  fmpq_poly_rem(r, p, out.k_->nf()->pol);
  nf_elem_set_fmpq_poly(out.v_, r, out.k_->nf());
  fmpq_poly_clear(r);
  return out;
}

Cyclo::Cyclo(const Cyclo& o) : k_(o.k_) {
  nf_elem_init(v_, k_->nf());
  nf_elem_set(v_, o.v_, k_->nf());
}
Cyclo::Cyclo(Cyclo&& o) noexcept : k_(o.k_) {
  nf_elem_init(v_, k_->nf());  // o keeps a valid (zero) value
  nf_elem_swap(v_, o.v_, k_->nf());
}
Cyclo& Cyclo::operator=(const Cyclo& o) {
  if (this == &o) return *this;
  if (k_ != o.k_) {
    nf_elem_clear(v_, k_->nf());
    k_ = o.k_;
    nf_elem_init(v_, k_->nf());
  }
  nf_elem_set(v_, o.v_, k_->nf());
  return *this;
}
Cyclo& Cyclo::operator=(Cyclo&& o) noexcept {
  if (this != &o && k_ == o.k_) {
    nf_elem_swap(v_, o.v_, k_->nf());
    return *this;
  }
  return *this = static_cast<const Cyclo&>(o);
}
Cyclo::~Cyclo() {
  if (k_) nf_elem_clear(v_, k_->nf());
}

void Cyclo::check_same(const Cyclo& o) const {
  if (k_ != o.k_ && k_->conductor() != o.k_->conductor())
    throw MathError(fmt::format("mixing elements of Q(zeta_{}) and Q(zeta_{})", k_->conductor(),
                                o.k_->conductor()));
}

Cyclo& Cyclo::operator+=(const Cyclo& o) {
  check_same(o);
  nf_elem_add(v_, v_, o.v_, k_->nf());
  return *this;
}
Cyclo& Cyclo::operator-=(const Cyclo& o) {
  check_same(o);
  nf_elem_sub(v_, v_, o.v_, k_->nf());
  return *this;
}
Cyclo& Cyclo::operator*=(const Cyclo& o) {
  check_same(o);
  nf_elem_mul(v_, v_, o.v_, k_->nf());
  return *this;
}
Cyclo& Cyclo::operator/=(const Cyclo& o) {
  check_same(o);
  if (o.is_zero()) throw MathError("division by zero");
  nf_elem_div(v_, v_, o.v_, k_->nf());
  return *this;
}
Cyclo Cyclo::operator-() const {
  Cyclo r(*this);
  nf_elem_neg(r.v_, r.v_, k_->nf());
  return r;
}
bool operator==(const Cyclo& a, const Cyclo& b) {
  a.check_same(b);
  return nf_elem_equal(a.v_, b.v_, a.k_->nf());
}

Cyclo Cyclo::inverse() const {
  if (is_zero()) throw MathError("division by zero (inverse of 0)");
  Cyclo r(k_);
  nf_elem_inv(r.v_, v_, k_->nf());
  return r;
}

Cyclo Cyclo::pow(long e) const {
  if (e < 0) return inverse().pow(-e);
  Cyclo r(k_);
  if (e == 0) {
    nf_elem_one(r.v_, k_->nf());
    return r;
  }
  nf_elem_pow(r.v_, v_, static_cast<ulong>(e), k_->nf());
  return r;
}

Cyclo Cyclo::galois(long a) const {
  long n = static_cast<long>(k_->conductor());
  long am = ((a % n) + n) % n;
  if (n_gcd(static_cast<ulong>(am), static_cast<ulong>(n)) != 1 && n > 1)
    throw MathError(fmt::format("zeta -> zeta^{} is not an automorphism of Q(zeta_{})", a, n));
  // Substitute zeta^k -> zeta^(a k mod N) in the power-basis representation.
  fmpq_poly_t p, q;
  fmpq_poly_init(p);
  fmpq_poly_init(q);
  get_poly(p);
  fmpz_t c;
  fmpz_init(c);
  long len = fmpq_poly_length(p);
  for (long k = 0; k < len; ++k) {
    fmpq_poly_get_coeff_fmpz(c, p, k);  // numerator coefficient (denominator handled below)
    if (fmpz_is_zero(c)) continue;
    long e = (am * k) % (n > 0 ? n : 1);
    fmpz_t old;
    fmpz_init(old);
    fmpq_poly_get_coeff_fmpz(old, q, e);
    fmpz_add(old, old, c);
    fmpq_poly_set_coeff_fmpz(q, e, old);
    fmpz_clear(old);
  }
  // p = num/den with fmpq_poly_get_coeff_fmpz returning the numerator coefficient; restore the denominator.
  fmpq_poly_scalar_div_fmpz(q, q, fmpq_poly_denref(p));
  Cyclo r = from_poly(k_, q);
  fmpz_clear(c);
  fmpq_poly_clear(p);
  fmpq_poly_clear(q);
  return r;
}

Cyclo Cyclo::conj() const { return galois(-1); }

bool Cyclo::is_zero() const { return nf_elem_is_zero(v_, k_->nf()); }
bool Cyclo::is_one() const { return nf_elem_is_one(v_, k_->nf()); }
bool Cyclo::is_rational() const { return nf_elem_is_rational(v_, k_->nf()); }

void Cyclo::get_poly(fmpq_poly_t out) const { nf_elem_get_fmpq_poly(out, v_, k_->nf()); }

Cyclo::Size Cyclo::size() const {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  get_poly(p);
  Size s;
  if (fmpq_poly_length(p) == 0) {
    fmpq_poly_clear(p);
    return s;
  }
  const long den = static_cast<long>(fmpz_bits(fmpq_poly_denref(p)));
  for (long k = 0; k < fmpq_poly_length(p); ++k) {
    const long b = static_cast<long>(fmpz_bits(fmpq_poly_numref(p) + k));
    s.total += b;
    s.height = std::max(s.height, b + den);
    if (b > 0) ++s.nonzero;
  }
  s.total += den;
  fmpq_poly_clear(p);
  return s;
}

void Cyclo::get_fmpq(fmpq_t out) const {
  if (!is_rational()) throw MathError("element is not rational");
  fmpq_poly_t p;
  fmpq_poly_init(p);
  get_poly(p);
  fmpq_poly_get_coeff_fmpq(out, p, 0);
  fmpq_poly_clear(p);
}

void Cyclo::norm(fmpq_t out) const { nf_elem_norm(out, v_, k_->nf()); }
void Cyclo::trace(fmpq_t out) const { nf_elem_trace(out, v_, k_->nf()); }

std::string Cyclo::str() const {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  get_poly(p);
  std::string s;
  fmpq_t c;
  fmpq_init(c);
  for (long k = fmpq_poly_degree(p); k >= 0; --k) {
    fmpq_poly_get_coeff_fmpq(c, p, k);
    if (fmpq_is_zero(c)) continue;
    bool neg = fmpq_sgn(c) < 0;
    if (neg) fmpq_neg(c, c);
    if (s.empty())
      s += neg ? "-" : "";
    else
      s += neg ? " - " : " + ";
    char* cs = fmpq_get_str(nullptr, 10, c);
    std::string cstr(cs);
    flint_free(cs);
    bool unit = fmpq_is_one(c);
    if (k == 0) {
      s += cstr;
    } else {
      if (!unit) s += cstr + "*";
      s += k == 1 ? "zeta" : fmt::format("zeta^{}", k);
    }
  }
  fmpq_clear(c);
  fmpq_poly_clear(p);
  return s.empty() ? "0" : s;
}

void Cyclo::ball(acb_t out, long prec) const {
  if (is_zero()) {
    acb_zero(out);
    return;
  }
  fmpq_poly_t p;
  fmpq_poly_init(p);
  get_poly(p);
  Cyclo cj = conj();
  const bool real = cj == *this, imaginary = !real && cj == -*this;  // exact
  acb_t z;
  acb_init(z);
  fmpq_t e;
  fmpq_init(e);
  fmpq_set_si(e, 2, k_->conductor());
  fmpz_t c;
  fmpz_init(c);
  // Horner on the integer numerator. Large coefficients can cancel: the working precision starts above the
  // coefficient size and doubles until the (nonzero) value has prec correct relative bits.
  long wp = prec + 16 + 2 * static_cast<long>(FLINT_BIT_COUNT(static_cast<ulong>(k_->degree()) + 1)) +
            std::labs(_fmpz_vec_max_bits(fmpq_poly_numref(p), fmpq_poly_length(p)));
  for (;; wp *= 2) {
    arb_sin_cos_pi_fmpq(acb_imagref(z), acb_realref(z), e, wp);
    acb_zero(out);
    for (long k = fmpq_poly_degree(p); k >= 0; --k) {
      acb_mul(out, out, z, wp);
      fmpq_poly_get_coeff_fmpz(c, p, k);
      arb_add_fmpz(acb_realref(out), acb_realref(out), c, wp);
    }
    acb_div_fmpz(out, out, fmpq_poly_denref(p), wp);
    if (real) arb_zero(acb_imagref(out));  // exact: a real element has imaginary part exactly 0
    if (imaginary) arb_zero(acb_realref(out));
    if (acb_rel_accuracy_bits(out) >= prec || wp > (1L << 24)) break;
  }
  acb_set_round(out, out, prec);
  fmpz_clear(c);
  fmpq_clear(e);
  acb_clear(z);
  fmpq_poly_clear(p);
}

int sign_of_nonzero_real(const std::function<void(acb_t, long)>& ball_at, const std::string& what) {
  acb_t b;
  acb_init(b);
  int s = 0;
  for (long prec = 64; prec <= (1L << 20) && s == 0; prec *= 2) {
    ball_at(b, prec);
    if (arb_is_positive(acb_realref(b))) s = 1;
    else if (arb_is_negative(acb_realref(b))) s = -1;
  }
  acb_clear(b);
  if (s == 0) throw ResourceError("could not decide the sign of " + what + " within 2^20 bits");
  return s;
}

int Cyclo::real_sign() const {
  if (!is_real()) throw MathError("sign requested of a non-real number " + str());
  if (is_zero()) return 0;
  return sign_of_nonzero_real([this](acb_t b, long prec) { ball(b, prec); }, str());
}

}  // namespace zb
