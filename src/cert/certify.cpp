#include "zetabraid/cert/certify.hpp"

#include <fmt/format.h>

#include <cctype>
#include <cmath>

#include "zetabraid/error.hpp"
#include "zetabraid/braid/word_index.hpp"
#include "zetabraid/linalg/word_product.hpp"

namespace zb {

Method parse_method(const std::string& s) {
  if (s == "exact") return Method::kExact;
  if (s == "interval") return Method::kInterval;
  if (s == "auto") return Method::kAuto;
  if (s == "modular") return Method::kModular;
  throw InputError(fmt::format("unknown method '{}' (expected exact, interval, modular or auto)", s));
}

std::string method_name(Method m) {
  switch (m) {
    case Method::kExact: return "exact";
    case Method::kInterval: return "interval";
    case Method::kModular: return "modular";
    default: return "auto";
  }
}

namespace {

void arf_to_fmpq(fmpq_t out, const arf_t x) {
  fmpz_t m, e;
  fmpz_init(m);
  fmpz_init(e);
  arf_get_fmpz_2exp(m, e, x);
  fmpz_set(fmpq_numref(out), m);
  fmpz_one(fmpq_denref(out));
  slong ee = fmpz_get_si(e);
  if (ee >= 0)
    fmpq_mul_2exp(out, out, static_cast<ulong>(ee));
  else
    fmpq_div_2exp(out, out, static_cast<ulong>(-ee));
  fmpz_clear(m);
  fmpz_clear(e);
}

std::string decimal_round(const arf_t x, int digits, bool up) {
  if (arf_is_zero(x)) return "0";
  if (arf_sgn(x) < 0) throw MathError("decimal bound of a negative number");
  if (!arf_is_finite(x)) throw MathError("decimal bound of a non-finite number");
  // k = floor(log10 x) estimated from the binary exponent (a double of x itself may overflow to infinity), then
  // corrected exactly below
  const double log2x = static_cast<double>(arf_abs_bound_lt_2exp_si(x)) - 1.0;
  if (std::fabs(log2x) > 1e8) throw MathError("decimal bound of a number out of range");
  fmpq_t q, t;
  fmpq_init(q);
  fmpq_init(t);
  arf_to_fmpq(q, x);
  long k = static_cast<long>(std::floor(log2x * 0.30102999566398120));
  fmpz_t n, p10, lo, hi;
  fmpz_init(n);
  fmpz_init(p10);
  fmpz_init(lo);
  fmpz_init(hi);
  fmpz_ui_pow_ui(lo, 10, static_cast<ulong>(digits - 1));
  fmpz_ui_pow_ui(hi, 10, static_cast<ulong>(digits));
  for (;;) {  // the estimate is within one or two of k: a few steps
    long s = digits - 1 - k;  // scale q by 10^s
    fmpz_ui_pow_ui(p10, 10, static_cast<ulong>(s >= 0 ? s : -s));
    if (s >= 0)
      fmpq_mul_fmpz(t, q, p10);
    else
      fmpq_div_fmpz(t, q, p10);
    // floor of t: if it is below 10^(digits-1) decrease k, if >= 10^digits increase k
    fmpz_fdiv_q(n, fmpq_numref(t), fmpq_denref(t));
    if (fmpz_cmp(n, lo) < 0) {
      --k;
      continue;
    }
    if (fmpz_cmp(n, hi) >= 0) {
      ++k;
      continue;
    }
    if (up) fmpz_cdiv_q(n, fmpq_numref(t), fmpq_denref(t));
    break;
  }
  if (fmpz_cmp(n, hi) >= 0) {  // rounding up reached 10^digits
    fmpz_divexact_ui(n, n, 10);
    ++k;
  }
  char* str = fmpz_get_str(nullptr, 10, n);
  std::string d(str);
  flint_free(str);
  fmpz_clear(n);
  fmpz_clear(p10);
  fmpz_clear(lo);
  fmpz_clear(hi);
  fmpq_clear(q);
  fmpq_clear(t);
  return d.size() > 1 ? fmt::format("{}.{}e{}", d.substr(0, 1), d.substr(1), k) : fmt::format("{}e{}", d, k);
}

}  // namespace

std::string decimal_upper(const arf_t x, int digits) { return decimal_round(x, digits, true); }
std::string decimal_lower(const arf_t x, int digits) { return decimal_round(x, digits, false); }

bool parse_decimal(arb_t x, const std::string& s, long prec) {
  // [digits][.digits][e[-]digits]
  size_t p = 0;
  std::string mant;
  while (p < s.size() && std::isdigit(static_cast<unsigned char>(s[p]))) mant += s[p++];
  long frac = 0;
  if (p < s.size() && s[p] == '.') {
    ++p;
    while (p < s.size() && std::isdigit(static_cast<unsigned char>(s[p]))) {
      mant += s[p++];
      ++frac;
    }
  }
  if (mant.empty() || mant.size() > 40) return false;
  long e = 0;
  if (p < s.size() && (s[p] == 'e' || s[p] == 'E')) {
    ++p;
    int sign = 1;
    if (p < s.size() && (s[p] == '-' || s[p] == '+')) sign = s[p++] == '-' ? -1 : 1;
    size_t st = p;
    while (p < s.size() && std::isdigit(static_cast<unsigned char>(s[p])) && p - st < 9) e = e * 10 + (s[p++] - '0');
    if (p == st) return false;
    e *= sign;
  }
  if (p != s.size()) return false;
  fmpz_t m, t;
  fmpz_init(m);
  fmpz_init(t);
  fmpz_set_str(m, mant.c_str(), 10);
  long ex = e - frac;
  fmpz_ui_pow_ui(t, 10, static_cast<ulong>(ex >= 0 ? ex : -ex));
  fmpq_t q;
  fmpq_init(q);
  if (ex >= 0) {
    fmpz_mul(fmpq_numref(q), m, t);
    fmpz_one(fmpq_denref(q));
  } else {
    fmpq_set_fmpz_frac(q, m, t);
  }
  arb_set_fmpq(x, q, prec);
  fmpq_clear(q);
  fmpz_clear(m);
  fmpz_clear(t);
  return true;
}

bool interval_bounds(const std::string& ball, long prec, std::string* upper, std::string* lower) {
  arb_t b;
  arb_init(b);
  if (arb_set_str(b, ball.c_str(), 128) != 0 || !arb_is_finite(b)) {
    arb_clear(b);
    throw MathError("malformed enclosure " + ball);
  }
  arf_t u, floor_bound;
  arf_init(u);
  arf_init(floor_bound);
  arb_get_ubound_arf(u, b, 128);
  // never state "leakage <= 0": an enclosure whose upper end is 0 is reported as <= 2^-prec
  arf_one(floor_bound);
  arf_mul_2exp_si(floor_bound, floor_bound, -prec);
  if (arf_sgn(u) <= 0) arf_set(u, floor_bound);
  *upper = decimal_upper(u, 6);
  bool positive = arb_is_positive(b);
  lower->clear();
  if (positive) {
    arb_get_lbound_arf(u, b, 128);
    *lower = decimal_lower(u, 6);
  }
  arf_clear(u);
  arf_clear(floor_bound);
  arb_clear(b);
  return positive;
}

namespace {

Matrix rows_of(const Matrix& m, const std::vector<size_t>& rows) {
  Matrix z(m.field(), rows.size(), m.cols());
  for (size_t i = 0; i < rows.size(); ++i)
    for (size_t j = 0; j < m.cols(); ++j) z(i, j) = m(rows[i], j);
  return z;
}

}  // namespace

ExactLeak exact_leakage(const Subspace& keep, const Matrix& w, bool unitary) {
  ExactLeak r;
  const FieldPtr& f = w.field();
  const size_t k = keep.kept();
  if (keep.coordinate) {
    std::vector<bool> in(w.rows(), false);
    for (size_t c : keep.coordinates) in[c] = true;
    Scalar leak(f);
    bool zero = true;
    for (size_t i = 0; i < w.rows(); ++i) {
      if (in[i]) continue;
      for (size_t j = 0; j < k; ++j)
        if (!w(i, j).is_zero()) {
          zero = false;
          if (unitary) leak += w(i, j).abs2();
        }
    }
    r.leak_free = zero;
    if (unitary) r.leakage = leak;
    r.action = rows_of(w, keep.coordinates);
    if (!zero && !unitary) r.action.reset();
    return r;
  }
  // P = V G^-1 V* is a projector onto span V (G = V*V is positive definite), so W lies in span V exactly when
  // D = W - V A vanishes, A = G^-1 V* W. In a unitary model P is P_in and leakage = tr(G^-1 D* D).
  const Matrix& v = keep.basis;
  Matrix vh = v.adjoint();
  Matrix gi = (vh * v).inverse();
  Matrix a = gi * (vh * w);
  Matrix d = w - v * a;
  r.leak_free = d.is_zero();
  if (r.leak_free || unitary) r.action = a;
  if (unitary) {
    Matrix dg = d * gi;
    Scalar leak(f);
    for (size_t i = 0; i < d.rows(); ++i)
      for (size_t j = 0; j < k; ++j)
        if (!d(i, j).is_zero() && !dg(i, j).is_zero()) leak += d(i, j).conj() * dg(i, j);
    r.leakage = leak;
  }
  return r;
}

namespace {

std::string scalar_ball(const Scalar& s, long prec = 128, long digits = 20) {
  acb_t b;
  acb_init(b);
  s.ball(b, prec);
  std::string out = ball_str(acb_realref(b), digits);
  acb_clear(b);
  return out;
}

// Ball of the leakage from a ball image; writes a real ball.
void ball_leakage(arb_t out, const Subspace& keep, const acb_mat_t w, long prec) {
  const size_t dim = static_cast<size_t>(acb_mat_nrows(w)), k = keep.kept();
  arb_zero(out);
  arb_t t;
  arb_init(t);
  if (keep.coordinate) {
    std::vector<bool> in(dim, false);
    for (size_t c : keep.coordinates) in[c] = true;
    for (size_t i = 0; i < dim; ++i) {
      if (in[i]) continue;
      for (size_t j = 0; j < k; ++j) {
        acb_srcptr e = acb_mat_entry(w, i, j);
        arb_sqr(t, acb_realref(e), prec);
        arb_add(out, out, t, prec);
        arb_sqr(t, acb_imagref(e), prec);
        arb_add(out, out, t, prec);
      }
    }
    arb_clear(t);
    return;
  }
  const Matrix& v = keep.basis;
  Matrix vh = v.adjoint();
  Matrix gi = (vh * v).inverse();
  acb_mat_t vb, vhb, gib, wh, a, b, bh, m1, m2;
  acb_mat_init(vb, dim, k);
  acb_mat_init(vhb, k, dim);
  acb_mat_init(gib, k, k);
  acb_mat_init(wh, k, dim);
  acb_mat_init(a, k, k);
  acb_mat_init(b, k, k);
  acb_mat_init(bh, k, k);
  acb_mat_init(m1, k, k);
  acb_mat_init(m2, k, k);
  v.ball(vb, prec);
  vh.ball(vhb, prec);
  gi.ball(gib, prec);
  acb_mat_conjugate_transpose(wh, w);
  acb_mat_mul(a, wh, w, prec);
  acb_mat_mul(b, vhb, w, prec);
  acb_mat_conjugate_transpose(bh, b);
  acb_mat_mul(m1, gib, a, prec);
  acb_t tr1, tr2;
  acb_init(tr1);
  acb_init(tr2);
  acb_mat_trace(tr1, m1, prec);
  acb_mat_mul(m1, gib, bh, prec);
  acb_mat_mul(m2, m1, gib, prec);
  acb_mat_mul(m1, m2, b, prec);
  acb_mat_trace(tr2, m1, prec);
  acb_sub(tr1, tr1, tr2, prec);
  arb_set(out, acb_realref(tr1));
  acb_clear(tr1);
  acb_clear(tr2);
  for (acb_mat_struct* m : {vb, vhb, gib, wh, a, b, bh, m1, m2}) acb_mat_clear(m);
  arb_clear(t);
}

}  // namespace

Matrix leak_post(const Subspace& keep) {
  const FieldPtr& f = keep.basis.field();
  const size_t dim = keep.basis.rows();
  if (keep.coordinate) {
    std::vector<bool> in(dim, false);
    for (size_t c : keep.coordinates) in[c] = true;
    Matrix p(f, dim - keep.coordinates.size(), dim);
    size_t r = 0;
    for (size_t i = 0; i < dim; ++i)
      if (!in[i]) p(r++, i) = Scalar(f, 1);
    return p;
  }
  const Matrix& v = keep.basis;
  Matrix vh = v.adjoint();
  return Matrix::identity(f, dim) - v * ((vh * v).inverse() * vh);
}

namespace {

// Verdict from modular images of the leak block (method modular). With prove_zero off only the filter runs:
// returns false (res untouched) when every image vanished.
bool modular_verdict(CertifyResult* res, const IndexedWord& letters, const Subspace& keep, int threads,
                     bool prove_zero) {
  Matrix post = leak_post(keep);
  ModularZeroOptions mo;
  mo.threads = threads;
  mo.prove_zero = prove_zero;
  ModularZeroResult z = modular_zero_test(letters, keep.basis, &post, nullptr, mo);
  if (!z.zero && !z.nonzero) return false;
  res->method = Method::kModular;
  res->verdict = z.zero ? Verdict::kLeakFree : Verdict::kLeaks;
  res->precision = mo.ball_precision;
  res->modular = std::move(z);
  return true;
}

}  // namespace

CertifyResult certify(BraidGenerators& gens, const std::vector<int>& anyons, const Subspace& keep, const Word& w,
                      const CertifyOptions& opt) {
  const Model& model = gens.model();
  const FusionSpace& space = gens.space(anyons);
  space.require_nonzero();
  if (keep.basis.rows() != space.dimension()) throw MathError("kept basis does not match the fusion space");
  std::vector<int> end;
  const IndexedWord letters = index_word(gens, anyons, w, &end);  // powers kept, letters found once
  if (end != anyons)
    throw InputError(fmt::format("the braid word permutes the anyons ({} becomes {}); leakage is defined only for "
                                 "braids that return every anyon type to its position",
                                 label_names(model, anyons), label_names(model, end)));
  CertifyResult res;
  res.dimension = space.dimension();
  res.kept = keep.kept();
  res.letters = w.size();
  res.unitary = model.claims_unitary;
  Method m = opt.method;
  if (m == Method::kAuto) {
    // Short words: exact. Long words: interval bounds for unitary data; otherwise a modular filter first (a
    // nonzero image proves the leak at once), then the exact engine for the leak-free decision.
    const bool small = w.size() * space.dimension() * keep.kept() <= opt.exact_budget;
    m = small ? Method::kExact : res.unitary ? Method::kInterval : Method::kExact;
    if (!small && !res.unitary && modular_verdict(&res, letters, keep, opt.threads, false)) return res;
  }
  res.method = m;
  if (m == Method::kModular) {
    modular_verdict(&res, letters, keep, opt.threads, true);
    return res;
  }
  if (m == Method::kExact) {
    ProductOptions po;
    po.threads = opt.threads;
    Matrix img = letters.empty() ? keep.basis : word_product_columns(letters, keep.basis, po);
    ExactLeak el = exact_leakage(keep, img, res.unitary);
    res.verdict = el.leak_free ? Verdict::kLeakFree : Verdict::kLeaks;
    res.leakage = el.leakage;
    res.action = el.action;
    res.image = std::move(img);
    res.precision = 128;
    if (res.leakage) res.leakage_ball = scalar_ball(*res.leakage);
    return res;
  }
  if (!res.unitary)
    throw InputError(fmt::format("model {} does not claim a unitary gauge: the interval method bounds the unitary "
                                 "leakage and needs unitary data (use --method exact to decide leak-free exactly)",
                                 model.name));
  long prec = opt.precision > 0 ? opt.precision : 128;
  arb_t leak;
  arb_init(leak);
  acb_mat_t img;
  acb_mat_init(img, static_cast<slong>(space.dimension()), static_cast<slong>(keep.kept()));
  for (;;) {
    if (letters.empty())
      keep.basis.ball(img, prec);
    else
      word_product_ball(img, letters, keep.basis, prec, BallMethod::kAuto, opt.threads);
    ball_leakage(leak, keep, img, prec);
    long acc = arb_rel_accuracy_bits(leak);
    long rad_bits = mag_is_zero(arb_radref(leak)) ? prec : -static_cast<long>(mag_get_d_log2_approx(arb_radref(leak)));
    // done when the enclosure is tight, or proves leaking with at least 32 correct bits
    bool decided = rad_bits >= opt.target_bits || (arb_is_positive(leak) && acc >= 32);
    if (opt.precision > 0 || decided || prec >= opt.max_precision) {
      res.accuracy_bits = rad_bits;
      break;
    }
    prec *= 2;
  }
  res.precision = prec;
  res.leakage_ball = ball_str(leak, 20);
  res.verdict = interval_bounds(res.leakage_ball, prec, &res.leakage_upper, &res.leakage_lower)
                    ? Verdict::kLeaks
                    : Verdict::kLeakageBounded;
  arb_clear(leak);
  acb_mat_clear(img);
  return res;
}

}  // namespace zb
