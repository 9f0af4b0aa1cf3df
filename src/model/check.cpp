// Exact consistency checks (see check.hpp for the equations).
//
// Speed: F- and R-symbols are copied once into flat tables of sparse radical-monomial values (mask, Q(zeta)
// coefficient); the pentagon/hexagon loops then run on raw antic nf_elem arithmetic with per-thread reusable
// accumulators, so the innermost loop does no map lookups and creates no Scalar temporaries. Work is split by
// fusion-tree blocks over std::thread; results are gathered per block, so the report is deterministic.
#include "zetabraid/model/check.hpp"

#include <fmt/format.h>

#include <atomic>
#include <chrono>
#include <complex>
#include <thread>
#include <unordered_map>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/matrix.hpp"

namespace zb {

const CheckCount* CheckReport::find(const std::string& name) const {
  for (const CheckCount& c : checks)
    if (c.name == name) return &c;
  return nullptr;
}

namespace {

constexpr int kMaxCheckLabels = 128;

// A sparse exact value: sum_i c[i] * sqrt(d_{m[i]}), reusable storage (size n <= capacity).
struct Acc {
  std::vector<RadicalMask> m;
  std::vector<Cyclo> c;
  size_t n = 0;
  CyclotomicFieldPtr k;
  explicit Acc(CyclotomicFieldPtr kk) : k(std::move(kk)) {}
  void clear() { n = 0; }
  nf_elem_struct* slot(RadicalMask mask) {
    for (size_t i = 0; i < n; ++i)
      if (m[i] == mask) return c[i].raw();
    if (n == c.size()) {
      c.emplace_back(k);
      m.push_back(mask);
    } else {
      m[n] = mask;
      nf_elem_zero(c[n].raw(), k->nf());
    }
    return c[n++].raw();
  }
  bool is_zero() const {
    for (size_t i = 0; i < n; ++i)
      if (!nf_elem_is_zero(c[i].raw(), k->nf())) return false;
    return true;
  }
  void set(const Scalar& s) {
    clear();
    for (const auto& [mask, cf] : s.terms()) nf_elem_set(slot(mask), cf.raw(), k->nf());
  }
  Scalar to_scalar(const FieldPtr& f) const {
    Scalar r(f);
    for (size_t i = 0; i < n; ++i)
      if (!nf_elem_is_zero(c[i].raw(), k->nf())) r += Scalar::monomial(f, c[i], m[i]);
    return r;
  }
};

// An integer polynomial (RAII over fmpz_poly_t).
struct Poly {
  fmpz_poly_t p;
  Poly() { fmpz_poly_init(p); }
  ~Poly() { fmpz_poly_clear(p); }
  Poly(const Poly& o) {
    fmpz_poly_init(p);
    fmpz_poly_set(p, o.p);
  }
  Poly(Poly&& o) noexcept {
    fmpz_poly_init(p);
    fmpz_poly_swap(p, o.p);
  }
  Poly& operator=(const Poly& o) {
    fmpz_poly_set(p, o.p);
    return *this;
  }
  Poly& operator=(Poly&& o) noexcept {
    fmpz_poly_swap(p, o.p);
    return *this;
  }
};

// A sparse value with integral coefficients: sum_i c[i](zeta) * sqrt(d_{m[i]}), c[i] in Z[x] (not necessarily
// reduced modulo Phi_N until finished).
struct IAcc {
  std::vector<RadicalMask> m;
  std::vector<Poly> c;
  size_t n = 0;
  void clear() { n = 0; }
  fmpz_poly_struct* slot(RadicalMask mask) {
    for (size_t i = 0; i < n; ++i)
      if (m[i] == mask) return c[i].p;
    if (n == c.size()) {
      c.emplace_back();
      m.push_back(mask);
    } else {
      m[n] = mask;
      fmpz_poly_zero(c[n].p);
    }
    return c[n++].p;
  }
};

// x (integral coefficients) as an integer polynomial; false when some coefficient is not an integer.
bool integral_poly(const Cyclo& x, Poly& out) {
  fmpq_poly_t q;
  fmpq_poly_init(q);
  x.get_poly(q);
  bool ok = fmpz_is_one(fmpq_poly_denref(q));
  if (ok) fmpq_poly_get_numerator(out.p, q);
  fmpq_poly_clear(q);
  return ok;
}

struct Tables {
  const Model& M;
  int n;
  FieldPtr F;
  const nf_struct* nf;
  bool dense;
  std::vector<int> fdense;
  std::unordered_map<std::uint64_t, int> fsparse;
  std::vector<Acc> fvals;
  std::vector<int> ridx;
  std::vector<Acc> rvals, rinv;
  std::vector<std::vector<int>> ch;
  std::vector<std::complex<double>> fd, rd, rid;  // double images (benchmarks only)

  bool generic;  // antic's generic representation (degree > 2): lazy reduction in the kernels
  fmpz_t scale;  // F values are stored multiplied by this integer
  ~Tables() { fmpz_clear(scale); }
  Tables(const Tables&) = delete;
  Tables& operator=(const Tables&) = delete;

  explicit Tables(const Model& m)
      : M(m), n(m.label_count()), F(m.field), nf(m.field->cyclotomic()->nf()),
        generic(!(nf->flag & (NF_LINEAR | NF_QUADRATIC))) {
    fmpz_init(scale);
    size_t n6 = 1;
    for (int i = 0; i < 6; ++i) n6 *= static_cast<size_t>(n);
    dense = n <= 14;
    if (dense) fdense.assign(n6, -1);
    for (const auto& [key, v] : M.f_symbols()) {
      if (v.is_zero()) continue;
      int id = static_cast<int>(fvals.size());
      fvals.emplace_back(F->cyclotomic());
      fvals.back().set(v);
      if (dense)
        fdense[idx6(key[0], key[1], key[2], key[3], key[4], key[5])] = id;
      else
        fsparse[idx6(key[0], key[1], key[2], key[3], key[4], key[5])] = id;
    }
    // Scale every F value by the common denominator D of its coefficients, so that the kernels work with
    // integral polynomials (no rational content to maintain); the equations are rescaled accordingly
    // (pentagon: D * (G G) = sum G G G; hexagon: D * (R G R) = sum G R G, with G = D F).
    fmpz_one(scale);
    if (generic) {
      for (const Acc& v : fvals)
        for (size_t i = 0; i < v.n; ++i) fmpz_lcm(scale, scale, fmpq_poly_denref(NF_ELEM(v.c[i].raw())));
      if (fmpz_bits(scale) > 64) fmpz_one(scale);
      for (Acc& v : fvals)
        for (size_t i = 0; i < v.n; ++i) nf_elem_scalar_mul_fmpz(v.c[i].raw(), v.c[i].raw(), scale, nf);
    }
    ridx.assign(static_cast<size_t>(n) * n * n, -1);
    for (const auto& [key, v] : M.r_symbols()) {
      if (v.is_zero()) continue;
      ridx[(static_cast<size_t>(key[0]) * n + key[1]) * n + key[2]] = static_cast<int>(rvals.size());
      rvals.emplace_back(F->cyclotomic());
      rvals.back().set(v);
      rinv.emplace_back(F->cyclotomic());
      rinv.back().set(v.inverse());
    }
    build_integral();
    ch.resize(static_cast<size_t>(n) * n);
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b) ch[static_cast<size_t>(a) * n + b] = M.channels(a, b);
  }
  // Integral images of every table value and of the cyclotomic modulus, for the integer kernel. Used when the
  // (scaled) F values, the R-symbols, their inverses and the radicands all have integral coefficients.
  bool integral = false;
  std::vector<IAcc> ifvals, irvals, irinv;
  std::vector<std::pair<long, long>> modulus;  // Phi_N = x^d + sum (coefficient, exponent) below the leading term
  long degree = 0;
  std::vector<Poly> iradicands;
  void build_integral() {
    auto conv = [](const std::vector<Acc>& from, std::vector<IAcc>& to) {
      for (const Acc& v : from) {
        IAcc x;
        for (size_t i = 0; i < v.n; ++i) {
          Poly q;
          if (!integral_poly(v.c[i], q)) return false;
          fmpz_poly_set(x.slot(v.m[i]), q.p);
        }
        to.push_back(std::move(x));
      }
      return true;
    };
    integral = conv(fvals, ifvals) && conv(rvals, irvals) && conv(rinv, irinv);
    for (int j = 0; integral && j < F->radicand_count(); ++j) {
      Poly q;
      integral = integral_poly(F->radicand(j), q);
      iradicands.push_back(std::move(q));
    }
    const fmpz_poly_struct* phi = F->cyclotomic()->modulus();
    degree = fmpz_poly_degree(phi);
    for (long i = 0; i < degree; ++i) {
      const fmpz* co = phi->coeffs + i;
      if (fmpz_is_zero(co)) continue;
      if (!fmpz_fits_si(co)) integral = false;
      else modulus.emplace_back(fmpz_get_si(co), i);
    }
    if (!fmpz_is_one(phi->coeffs + degree)) integral = false;
    if (!integral) ifvals.clear(), irvals.clear(), irinv.clear();
  }
  size_t idx6(int a, int b, int c, int d, int e, int f) const {
    size_t N = static_cast<size_t>(n);
    return ((((static_cast<size_t>(a) * N + b) * N + c) * N + d) * N + e) * N + f;
  }
  int fid(int a, int b, int c, int d, int e, int f) const {
    size_t i = idx6(a, b, c, d, e, f);
    if (dense) return fdense[i];
    auto it = fsparse.find(i);
    return it == fsparse.end() ? -1 : it->second;
  }
  const Acc* fv(int a, int b, int c, int d, int e, int f) const {
    int i = fid(a, b, c, d, e, f);
    return i < 0 ? nullptr : &fvals[static_cast<size_t>(i)];
  }
  int rid_(int a, int b, int c) const { return ridx[(static_cast<size_t>(a) * n + b) * n + c]; }
  const Acc* rv(int a, int b, int c) const {
    int i = rid_(a, b, c);
    return i < 0 ? nullptr : &rvals[static_cast<size_t>(i)];
  }
  const Acc* riv(int a, int b, int c) const {
    int i = rid_(a, b, c);
    return i < 0 ? nullptr : &rinv[static_cast<size_t>(i)];
  }
  const std::vector<int>& chan(int a, int b) const { return ch[static_cast<size_t>(a) * n + b]; }
  bool N(int a, int b, int c) const { return M.fusion(a, b, c) > 0; }

  void make_double() {
    auto img = [&](const Acc& v) {
      Scalar s = v.to_scalar(F);
      acb_t b;
      acb_init(b);
      s.ball(b, 64);
      std::complex<double> z(arf_get_d(arb_midref(acb_realref(b)), ARF_RND_NEAR),
                             arf_get_d(arb_midref(acb_imagref(b)), ARF_RND_NEAR));
      acb_clear(b);
      return z;
    };
    double sc = fmpz_get_d(scale);
    for (const Acc& v : fvals) fd.push_back(img(v) / sc);
    for (const Acc& v : rvals) rd.push_back(img(v));
    for (const Acc& v : rinv) rid.push_back(img(v));
  }
};

// Per-thread scratch space and the exact kernels.
struct Worker {
  const Tables& T;
  Cyclo t1, t2;
  std::unordered_map<RadicalMask, Cyclo> rad;
  explicit Worker(const Tables& t) : T(t), t1(t.F->cyclotomic()), t2(t.F->cyclotomic()) {}

  const Cyclo& radprod(RadicalMask s) {
    auto it = rad.find(s);
    if (it != rad.end()) return it->second;
    return rad.emplace(s, T.F->radicand_product(s)).first->second;
  }
  // out += x * y. For generic number fields (degree > 2) the products are left unreduced and uncanonicalised
  // (sums of them stay exact polynomials); finish() reduces modulo Phi_N once per accumulated value.
  void addmul(Acc& out, const Acc& x, const Acc& y) {
    const bool lazy = T.generic;
    for (size_t i = 0; i < x.n; ++i)
      for (size_t j = 0; j < y.n; ++j) {
        RadicalMask common = x.m[i] & y.m[j];
        if (common) {
          nf_elem_mul(t2.raw(), x.c[i].raw(), radprod(common).raw(), T.nf);
          if (lazy)
            nf_elem_mul_red(t1.raw(), t2.raw(), y.c[j].raw(), T.nf, 0);
          else
            nf_elem_mul(t1.raw(), t2.raw(), y.c[j].raw(), T.nf);
        } else if (lazy) {
          nf_elem_mul_red(t1.raw(), x.c[i].raw(), y.c[j].raw(), T.nf, 0);
        } else {
          nf_elem_mul(t1.raw(), x.c[i].raw(), y.c[j].raw(), T.nf);
        }
        nf_elem_struct* s = out.slot(x.m[i] ^ y.m[j]);
        if (lazy)
          fmpq_poly_add_can(NF_ELEM(s), NF_ELEM(s), NF_ELEM(t1.raw()), 0);
        else
          nf_elem_add(s, s, t1.raw(), T.nf);
      }
  }
  // out = x * y, reduced (used as a factor again).
  void mul(Acc& out, const Acc& x, const Acc& y) {
    out.clear();
    for (size_t i = 0; i < x.n; ++i)
      for (size_t j = 0; j < y.n; ++j) {
        nf_elem_mul(t1.raw(), x.c[i].raw(), y.c[j].raw(), T.nf);
        RadicalMask common = x.m[i] & y.m[j];
        if (common) {
          nf_elem_mul(t2.raw(), t1.raw(), radprod(common).raw(), T.nf);
          nf_elem_swap(t1.raw(), t2.raw(), T.nf);
        }
        nf_elem_struct* s = out.slot(x.m[i] ^ y.m[j]);
        nf_elem_add(s, s, t1.raw(), T.nf);
      }
  }
  void sub(Acc& out, const Acc& x) {
    for (size_t i = 0; i < x.n; ++i) {
      nf_elem_struct* s = out.slot(x.m[i]);
      if (T.generic)
        fmpq_poly_sub_can(NF_ELEM(s), NF_ELEM(s), NF_ELEM(x.c[i].raw()), 0);
      else
        nf_elem_sub(s, s, x.c[i].raw(), T.nf);
    }
  }
  // v *= the F scale (exact).
  void scale(Acc& v) {
    if (fmpz_is_one(T.scale)) return;
    for (size_t i = 0; i < v.n; ++i) {
      if (T.generic)
        fmpq_poly_scalar_mul_fmpz(NF_ELEM(v.c[i].raw()), NF_ELEM(v.c[i].raw()), T.scale);
      else
        nf_elem_scalar_mul_fmpz(v.c[i].raw(), v.c[i].raw(), T.scale, T.nf);
    }
  }
  // The true residual from a scaled one: divide by scale^power.
  Scalar unscale(const Acc& v, int power) const {
    Scalar r = v.to_scalar(T.F);
    if (fmpz_is_one(T.scale)) return r;
    fmpq_t q;
    fmpq_init(q);
    fmpz_pow_ui(fmpq_denref(q), T.scale, static_cast<ulong>(power));
    fmpz_one(fmpq_numref(q));
    Scalar f(T.F, Cyclo(T.F->cyclotomic(), q));
    fmpq_clear(q);
    return r * f;
  }
  using Value = Acc;
  Acc make() const { return Acc(T.F->cyclotomic()); }
  const Acc* fv(int a, int b, int c, int d, int e, int f) const { return T.fv(a, b, c, d, e, f); }
  const Acc* rv(int a, int b, int c) const { return T.rv(a, b, c); }
  const Acc* riv(int a, int b, int c) const { return T.riv(a, b, c); }
  bool is_zero(const Acc& v) const { return v.is_zero(); }
  // Brings every coefficient of an accumulated value back to canonical reduced form.
  void finish(Acc& v) {
    if (!T.generic) return;
    for (size_t i = 0; i < v.n; ++i) {
      fmpq_poly_canonicalise(NF_ELEM(v.c[i].raw()));
      nf_elem_reduce(v.c[i].raw(), T.nf);
      nf_elem_canonicalise(v.c[i].raw(), T.nf);
    }
  }
};

// The integer kernel: the same operations on integral polynomials, with a sparse reduction modulo Phi_N
// (Phi_N is monic with few terms for the conductors of SU(2)_k: e.g. Phi_48 = x^16 - x^8 + 1).
struct IntWorker {
  const Tables& T;
  Poly t1, t2;
  std::unordered_map<RadicalMask, Poly> rad;
  explicit IntWorker(const Tables& t) : T(t) {}

  using Value = IAcc;
  IAcc make() const { return IAcc(); }
  const IAcc* fv(int a, int b, int c, int d, int e, int f) const {
    int i = T.fid(a, b, c, d, e, f);
    return i < 0 ? nullptr : &T.ifvals[static_cast<size_t>(i)];
  }
  const IAcc* rv(int a, int b, int c) const {
    int i = T.rid_(a, b, c);
    return i < 0 ? nullptr : &T.irvals[static_cast<size_t>(i)];
  }
  const IAcc* riv(int a, int b, int c) const {
    int i = T.rid_(a, b, c);
    return i < 0 ? nullptr : &T.irinv[static_cast<size_t>(i)];
  }

  // x <- x mod Phi_N, using x^d = -sum c_j x^j.
  void reduce(fmpz_poly_struct* x) const {
    const long d = T.degree;
    long len = x->length;
    if (len <= d) return;
    fmpz* co = x->coeffs;
    for (long i = len - 1; i >= d; --i) {
      if (fmpz_is_zero(co + i)) continue;
      // Not fmpz_submul_si: in FLINT 2.9 the _si variants can leave a small result in non-canonical form
      // (then equal numbers compare unequal); the _ui variants are correct.
      for (const auto& [cj, j] : T.modulus) {
        if (cj > 0)
          fmpz_submul_ui(co + (i - d + j), co + i, static_cast<ulong>(cj));
        else if (cj < 0)
          fmpz_addmul_ui(co + (i - d + j), co + i, static_cast<ulong>(-cj));
      }
      fmpz_zero(co + i);
    }
    _fmpz_poly_set_length(x, d);
    _fmpz_poly_normalise(x);
  }
  const Poly& radprod(RadicalMask s) {
    auto it = rad.find(s);
    if (it != rad.end()) return it->second;
    Poly p;
    fmpz_poly_one(p.p);
    for (int j = 0; j < static_cast<int>(T.iradicands.size()); ++j)
      if (s & (RadicalMask{1} << j)) {
        fmpz_poly_mul(p.p, p.p, T.iradicands[static_cast<size_t>(j)].p);
        reduce(p.p);
      }
    return rad.emplace(s, std::move(p)).first->second;
  }
  // t1 = x_i * y_j (times the radicand product of their common square roots); reduced when asked.
  void product(const IAcc& x, size_t i, const IAcc& y, size_t j, bool reduced) {
    fmpz_poly_mul(t1.p, x.c[i].p, y.c[j].p);
    RadicalMask common = x.m[i] & y.m[j];
    if (common) {
      reduce(t1.p);
      fmpz_poly_mul(t2.p, t1.p, radprod(common).p);
      fmpz_poly_swap(t1.p, t2.p);
    }
    if (reduced) reduce(t1.p);
  }
  void addmul(IAcc& out, const IAcc& x, const IAcc& y) {
    for (size_t i = 0; i < x.n; ++i)
      for (size_t j = 0; j < y.n; ++j) {
        product(x, i, y, j, false);
        fmpz_poly_struct* s = out.slot(x.m[i] ^ y.m[j]);
        fmpz_poly_add(s, s, t1.p);
      }
  }
  void mul(IAcc& out, const IAcc& x, const IAcc& y) {
    out.clear();
    for (size_t i = 0; i < x.n; ++i)
      for (size_t j = 0; j < y.n; ++j) {
        product(x, i, y, j, true);
        fmpz_poly_struct* s = out.slot(x.m[i] ^ y.m[j]);
        fmpz_poly_add(s, s, t1.p);
      }
  }
  void sub(IAcc& out, const IAcc& x) {
    for (size_t i = 0; i < x.n; ++i) {
      fmpz_poly_struct* s = out.slot(x.m[i]);
      fmpz_poly_sub(s, s, x.c[i].p);
    }
  }
  void scale(IAcc& v) {
    if (fmpz_is_one(T.scale)) return;
    for (size_t i = 0; i < v.n; ++i) fmpz_poly_scalar_mul_fmpz(v.c[i].p, v.c[i].p, T.scale);
  }
  void finish(IAcc& v) {
    for (size_t i = 0; i < v.n; ++i) reduce(v.c[i].p);
  }
  bool is_zero(const IAcc& v) const {
    for (size_t i = 0; i < v.n; ++i)
      if (!fmpz_poly_is_zero(v.c[i].p)) return false;
    return true;
  }
  Scalar unscale(const IAcc& v, int power) const {
    Scalar r(T.F);
    fmpq_poly_t q;
    fmpq_poly_init(q);
    for (size_t i = 0; i < v.n; ++i) {
      fmpq_poly_set_fmpz_poly(q, v.c[i].p);
      Cyclo c = Cyclo::from_poly(T.F->cyclotomic(), q);
      if (!c.is_zero()) r += Scalar::monomial(T.F, c, v.m[i]);
    }
    fmpq_poly_clear(q);
    if (fmpz_is_one(T.scale)) return r;
    fmpq_t s;
    fmpq_init(s);
    fmpz_pow_ui(fmpq_denref(s), T.scale, static_cast<ulong>(power));
    fmpz_one(fmpq_numref(s));
    Scalar f(T.F, Cyclo(T.F->cyclotomic(), s));
    fmpq_clear(s);
    return r * f;
  }
};

std::string lab(const Model& m, int a) { return m.labels[static_cast<size_t>(a)]; }

struct BlockResult {
  long count = 0, failed = 0;
  std::vector<CheckFailure> failures;
};

// Runs work(i, worker, result) for i in [0, total) on threads; returns per-item results in order.
template <class W, class Work>
std::vector<BlockResult> run_parallel(const Tables& T, size_t total, int threads, const std::string& stage,
                                      const CheckOptions& opt, Work work) {
  std::vector<BlockResult> res(total);
  std::atomic<size_t> next{0}, done{0};
  auto body = [&] {
    W w(T);
    for (;;) {
      size_t i = next.fetch_add(1);
      if (i >= total) break;
      work(i, w, res[i]);
      done.fetch_add(1);
    }
  };
  int nt = std::max(1, std::min<int>(threads, static_cast<int>(total)));
  std::vector<std::thread> pool;
  std::exception_ptr err;
  std::mutex err_mu;
  for (int t = 0; t < nt; ++t)
    pool.emplace_back([&] {
      try {
        body();
      } catch (...) {
        std::lock_guard<std::mutex> g(err_mu);
        if (!err) err = std::current_exception();
        next.store(total);
      }
    });
  if (opt.progress) {
    while (done.load() < total && next.load() < total + static_cast<size_t>(nt) + 1) {
      std::this_thread::sleep_for(std::chrono::milliseconds(100));
      if (err) break;
      opt.progress(stage, total ? static_cast<double>(done.load()) / static_cast<double>(total) : 1.0);
      if (done.load() >= total) break;
    }
  }
  for (auto& th : pool) th.join();
  if (err) std::rethrow_exception(err);
  return res;
}

int thread_count(const CheckOptions& opt) {
  if (opt.threads > 0) return opt.threads;
  unsigned h = std::thread::hardware_concurrency();
  return static_cast<int>(std::clamp(h, 1u, 8u));
}

std::string ball_of(const Scalar& s, long digits) {
  acb_t b;
  acb_init(b);
  s.ball(b, static_cast<long>(digits * 3.33) + 16);
  std::string out = ball_str(b, digits);
  acb_clear(b);
  return out;
}

struct PentagonBlock {
  int a, b, c, d, e;
};

std::vector<PentagonBlock> pentagon_blocks(const Tables& T) {
  std::vector<PentagonBlock> out;
  int n = T.n;
  std::vector<char> seen(static_cast<size_t>(n));
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        for (int d = 0; d < n; ++d) {
          std::fill(seen.begin(), seen.end(), 0);
          for (int f : T.chan(a, b))
            for (int g : T.chan(f, c))
              for (int e : T.chan(g, d)) seen[static_cast<size_t>(e)] = 1;
          for (int e = 0; e < n; ++e)
            if (seen[static_cast<size_t>(e)]) out.push_back({a, b, c, d, e});
        }
  return out;
}

// One pentagon block: every (f,g) x (k,l).
template <class W>
void pentagon_block(const Tables& T, const PentagonBlock& B, W& w, BlockResult& r, const CheckOptions& opt,
                    bool record) {
  using V = typename W::Value;
  const int a = B.a, b = B.b, c = B.c, d = B.d, e = B.e, n = T.n;
  std::vector<std::pair<int, int>> right;  // (k, l)
  std::vector<int> pos(static_cast<size_t>(n) * n, -1);
  for (int l : T.chan(c, d))
    for (int k : T.chan(b, l))
      if (T.N(a, k, e)) {
        pos[static_cast<size_t>(k) * n + l] = static_cast<int>(right.size());
        right.emplace_back(k, l);
      }
  std::vector<V> acc;
  for (size_t j = 0; j < right.size(); ++j) acc.push_back(w.make());
  V p = w.make(), lhs = w.make();
  for (int f : T.chan(a, b))
    for (int g : T.chan(f, c)) {
      if (!T.N(g, d, e)) continue;
      for (V& x : acc) x.clear();
      for (int h : T.chan(b, c)) {
        const V* x1 = w.fv(a, b, c, g, f, h);
        if (!x1) continue;
        for (int k : T.chan(h, d)) {
          if (!T.N(a, k, e)) continue;
          const V* x2 = w.fv(a, h, d, e, g, k);
          if (!x2) continue;
          w.mul(p, *x1, *x2);
          for (int l : T.chan(c, d)) {
            int ps = pos[static_cast<size_t>(k) * n + l];
            if (ps < 0) continue;
            const V* x3 = w.fv(b, c, d, k, h, l);
            if (!x3) continue;
            w.addmul(acc[static_cast<size_t>(ps)], p, *x3);
          }
        }
      }
      for (size_t j = 0; j < right.size(); ++j) {
        auto [k, l] = right[j];
        const V* y1 = w.fv(f, c, d, e, g, l);
        const V* y2 = w.fv(a, b, l, e, f, k);
        lhs.clear();
        lhs.clear();
        if (y1 && y2) w.addmul(lhs, *y1, *y2);  // unreduced, like acc[j]: one reduction per equation
        w.scale(lhs);
        w.sub(lhs, acc[j]);
        w.finish(lhs);
        ++r.count;
        if (!w.is_zero(lhs)) {
          ++r.failed;
          if (record && r.failures.size() < opt.max_failures) {
            const Model& M = T.M;
            Scalar res = w.unscale(lhs, 3);
            CheckFailure fl;
            fl.check = "pentagon";
            fl.where = fmt::format("a={} b={} c={} d={} e={} f={} g={} k={} l={}", lab(M, a), lab(M, b), lab(M, c),
                                   lab(M, d), lab(M, e), lab(M, f), lab(M, g), lab(M, k), lab(M, l));
            fl.what = "[F^{fcd}_e]_{gl} [F^{abl}_e]_{fk} - sum_h [F^{abc}_g]_{fh} [F^{ahd}_e]_{gk} [F^{bcd}_k]_{hl} != 0";
            fl.residual = res.str();
            fl.residual_ball = ball_of(res, opt.ball_digits);
            r.failures.push_back(std::move(fl));
          }
        }
      }
    }
}

struct HexBlock {
  int a, b, c, d;
};

std::vector<HexBlock> hexagon_blocks(const Tables& T) {
  std::vector<HexBlock> out;
  for (int a = 0; a < T.n; ++a)
    for (int b = 0; b < T.n; ++b)
      for (int c = 0; c < T.n; ++c)
        for (int d = 0; d < T.n; ++d) {
          bool any = false;
          for (int e : T.chan(a, c))
            if (T.N(e, b, d)) any = true;
          if (any) out.push_back({a, b, c, d});
        }
  return out;
}

// Both hexagons of one block (a,b,c,d); inverse selects the reverse equation.
template <class W>
void hexagon_block(const Tables& T, const HexBlock& B, bool inverse, W& w, BlockResult& r,
                   const CheckOptions& opt, bool record) {
  using V = typename W::Value;
  const int a = B.a, b = B.b, c = B.c, d = B.d;
  V lhs = w.make(), t = w.make(), u = w.make();
  for (int e : T.chan(a, c)) {
    if (!T.N(e, b, d)) continue;
    for (int g : T.chan(c, b)) {
      if (!T.N(a, g, d)) continue;
      // left side
      lhs.clear();
      const V* r1 = inverse ? w.riv(a, c, e) : w.rv(c, a, e);
      const V* f1 = w.fv(a, c, b, d, e, g);
      const V* r2 = inverse ? w.riv(b, c, g) : w.rv(c, b, g);
      if (r1 && f1 && r2) {
        w.mul(t, *r1, *f1);
        w.mul(lhs, t, *r2);
        w.scale(lhs);
      }
      // minus the right side
      for (int f : T.chan(a, b)) {
        const V* x1 = w.fv(c, a, b, d, e, f);
        const V* x2 = inverse ? w.riv(f, c, d) : w.rv(c, f, d);
        const V* x3 = w.fv(a, b, c, d, f, g);
        if (!x1 || !x2 || !x3) continue;
        w.mul(t, *x1, *x2);
        w.mul(u, t, *x3);
        w.sub(lhs, u);
      }
      w.finish(lhs);
      ++r.count;
      if (!w.is_zero(lhs)) {
        ++r.failed;
        if (record && r.failures.size() < opt.max_failures) {
          const Model& M = T.M;
          Scalar res = w.unscale(lhs, 2);
          CheckFailure fl;
          fl.check = inverse ? "hexagon_reverse" : "hexagon";
          fl.where = fmt::format("a={} b={} c={} d={} e={} g={}", lab(M, a), lab(M, b), lab(M, c), lab(M, d),
                                 lab(M, e), lab(M, g));
          fl.what = inverse ? "(R^{ac}_e)^-1 [F^{acb}_d]_{eg} (R^{bc}_g)^-1 - sum_f [F^{cab}_d]_{ef} (R^{fc}_d)^-1 "
                              "[F^{abc}_d]_{fg} != 0"
                            : "R^{ca}_e [F^{acb}_d]_{eg} R^{cb}_g - sum_f [F^{cab}_d]_{ef} R^{cf}_d [F^{abc}_d]_{fg} != 0";
          fl.residual = res.str();
          fl.residual_ball = ball_of(res, opt.ball_digits);
          r.failures.push_back(std::move(fl));
        }
      }
    }
  }
}

// Gathers block results into a count, keeping at most max_failures failures.
CheckCount gather(const std::string& name, std::vector<BlockResult>& res, CheckReport& rep, size_t max_failures) {
  CheckCount cc;
  cc.name = name;
  size_t listed = 0;
  for (BlockResult& b : res) {
    cc.count += b.count;
    cc.failed += b.failed;
    for (CheckFailure& f : b.failures)
      if (listed < max_failures) {
        rep.failures.push_back(std::move(f));
        ++listed;
      }
  }
  return cc;
}


}  // namespace

// Runs the pentagon (kind 0) or hexagon (kind 1, 2 = reverse) blocks with the integer kernel when the tables
// are integral, else with the number-field kernel.
std::vector<BlockResult> run_equations(const Tables& T, int kind, int threads, const std::string& stage,
                                       const CheckOptions& opt, bool record, const std::vector<PentagonBlock>& pb,
                                       const std::vector<HexBlock>& hb) {
  auto go = [&](auto tag) {
    using W = decltype(tag);
    if (kind == 0)
      return run_parallel<W>(T, pb.size(), threads, stage, opt,
                             [&](size_t i, W& w, BlockResult& r) { pentagon_block(T, pb[i], w, r, opt, record); });
    return run_parallel<W>(T, hb.size(), threads, stage, opt, [&](size_t i, W& w, BlockResult& r) {
      hexagon_block(T, hb[i], kind == 2, w, r, opt, record);
    });
  };
  if (T.integral && !opt.force_field_kernel) return go(IntWorker(T));
  return go(Worker(T));
}

CheckReport check_model(const Model& M, const CheckOptions& opt) {
  auto t0 = std::chrono::steady_clock::now();
  CheckReport rep;
  const int n = M.label_count();
  auto L = [&](int a) { return lab(M, a); };
  auto add_failure = [&](CheckCount& cc, CheckFailure f) {
    ++cc.failed;
    size_t listed = 0;
    for (const CheckFailure& x : rep.failures) listed += x.check == cc.name;
    if (listed < opt.max_failures) rep.failures.push_back(std::move(f));
  };
  auto simple = [&](const std::string& check, std::string where, std::string what, int line = 0) {
    CheckFailure f;
    f.check = check;
    f.where = std::move(where);
    f.what = std::move(what);
    f.line = line;
    return f;
  };
  if (n == 0) throw InputError("the model has no labels");
  if (n > kMaxCheckLabels)
    throw ResourceError(fmt::format("model check supports at most {} labels (the model has {})", kMaxCheckLabels, n));

  // --- fusion rules
  {
    CheckCount cc;
    cc.name = "fusion_unit";
    for (int a = 0; a < n; ++a) {
      ++cc.count;
      bool ok = true;
      for (int b = 0; b < n; ++b) ok = ok && M.fusion(0, a, b) == (a == b) && M.fusion(a, 0, b) == (a == b);
      if (!ok)
        add_failure(cc, simple(cc.name, "a=" + L(a), fmt::format("{} x {} and {} x {} must both be exactly {}",
                                                                 L(0), L(a), L(a), L(0), L(a))));
    }
    rep.checks.push_back(cc);
  }
  {
    CheckCount cc;
    cc.name = "fusion_duals";
    for (int a = 0; a < n; ++a) {
      ++cc.count;
      int found = 0, dual = -1;
      bool mult_ok = true;
      for (int b = 0; b < n; ++b)
        if (M.fusion(a, b, 0) > 0) {
          ++found;
          dual = b;
          mult_ok = mult_ok && M.fusion(a, b, 0) == 1;
        }
      if (found != 1 || !mult_ok || M.fusion(dual, a, 0) != 1)
        add_failure(cc, simple(cc.name, "a=" + L(a),
                               fmt::format("exactly one label b with {} in a x b (and in b x a) is required; found {}",
                                           L(0), found)));
      else {
        bool nonempty = true;
        for (int b = 0; b < n; ++b) nonempty = nonempty && !M.channels(a, b).empty();
        if (!nonempty) add_failure(cc, simple(cc.name, "a=" + L(a), "some product a x b has no channel"));
      }
    }
    rep.checks.push_back(cc);
  }
  {
    CheckCount cc;
    cc.name = "fusion_associativity";
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          for (int d = 0; d < n; ++d) {
            ++cc.count;
            long left = 0, right = 0;
            for (int e = 0; e < n; ++e) {
              left += static_cast<long>(M.fusion(a, b, e)) * M.fusion(e, c, d);
              right += static_cast<long>(M.fusion(b, c, e)) * M.fusion(a, e, d);
            }
            if (left != right)
              add_failure(cc, simple(cc.name, fmt::format("a={} b={} c={} d={}", L(a), L(b), L(c), L(d)),
                                     fmt::format("(a x b) x c contains d {} times but a x (b x c) {} times", left,
                                                 right)));
          }
    rep.checks.push_back(cc);
  }
  if (M.has_r) {
    CheckCount cc;
    cc.name = "fusion_commutativity";
    for (int a = 0; a < n; ++a)
      for (int b = a + 1; b < n; ++b) {
        ++cc.count;
        bool ok = true;
        for (int c = 0; c < n; ++c) ok = ok && M.fusion(a, b, c) == M.fusion(b, a, c);
        if (!ok)
          add_failure(cc, simple(cc.name, fmt::format("a={} b={}", L(a), L(b)),
                                 "a braided model needs a x b = b x a"));
      }
    rep.checks.push_back(cc);
  }

  // --- F data
  {
    CheckCount cc;
    cc.name = "f_admissible";
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          for (int d = 0; d < n; ++d)
            for (int e : M.left_channels(a, b, c, d))
              for (int f : M.right_channels(a, b, c, d)) {
                ++cc.count;
                if (!M.f_given.count({a, b, c, d, e, f}))
                  add_failure(cc, simple(cc.name,
                                         fmt::format("a={} b={} c={} d={} e={} f={}", L(a), L(b), L(c), L(d), L(e),
                                                     L(f)),
                                         "admissible F-symbol [F^{abc}_d]_{ef} is missing"));
              }
    for (const auto& [k, v] : M.f_symbols()) {
      bool adm = M.fusion(k[0], k[1], k[4]) && M.fusion(k[4], k[2], k[3]) && M.fusion(k[1], k[2], k[5]) &&
                 M.fusion(k[0], k[5], k[3]);
      if (adm || v.is_zero()) continue;
      ++cc.count;
      auto it = M.f_line.find(k);
      add_failure(cc, simple(cc.name,
                             fmt::format("a={} b={} c={} d={} e={} f={}", L(k[0]), L(k[1]), L(k[2]), L(k[3]),
                                         L(k[4]), L(k[5])),
                             "nonzero F-symbol that the fusion rules do not allow", it == M.f_line.end() ? 0 : it->second));
    }
    rep.checks.push_back(cc);
  }
  std::vector<std::array<int, 4>> fblocks;
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        for (int d = 0; d < n; ++d)
          if (!M.left_channels(a, b, c, d).empty() || !M.right_channels(a, b, c, d).empty()) fblocks.push_back({a, b, c, d});
  auto block_matrix = [&](const std::array<int, 4>& B, std::vector<int>& rows, std::vector<int>& cols) {
    rows = M.left_channels(B[0], B[1], B[2], B[3]);
    cols = M.right_channels(B[0], B[1], B[2], B[3]);
    Matrix X(M.field, rows.size(), cols.size());
    for (size_t i = 0; i < rows.size(); ++i)
      for (size_t j = 0; j < cols.size(); ++j)
        if (const Scalar* v = M.f_symbol(B[0], B[1], B[2], B[3], rows[i], cols[j])) X(i, j) = *v;
    return X;
  };
  auto block_name = [&](const std::array<int, 4>& B) {
    return fmt::format("a={} b={} c={} d={}", L(B[0]), L(B[1]), L(B[2]), L(B[3]));
  };
  {
    CheckCount cc;
    cc.name = "f_invertible";
    for (const auto& B : fblocks) {
      ++cc.count;
      std::vector<int> rows, cols;
      Matrix X = block_matrix(B, rows, cols);
      if (rows.size() != cols.size())
        add_failure(cc, simple(cc.name, block_name(B),
                               fmt::format("F^{{abc}}_d is {}x{}, not square (fusion rules not associative)",
                                           rows.size(), cols.size())));
      else if (X.rank() != rows.size())
        add_failure(cc, simple(cc.name, block_name(B),
                               fmt::format("F^{{abc}}_d is singular (rank {} of {})", X.rank(), rows.size())));
    }
    rep.checks.push_back(cc);
  }
  {
    CheckCount cc;
    cc.name = "f_normalisation";
    for (const auto& B : fblocks) {
      if (B[0] != 0 && B[1] != 0 && B[2] != 0) continue;
      std::vector<int> rows, cols;
      Matrix X = block_matrix(B, rows, cols);
      for (size_t i = 0; i < rows.size(); ++i)
        for (size_t j = 0; j < cols.size(); ++j) {
          ++cc.count;
          if (!X(i, j).is_one()) {
            CheckFailure f = simple(cc.name, block_name(B) + fmt::format(" e={} f={}", L(rows[i]), L(cols[j])),
                                    "an F-symbol with the unit among a, b, c must be 1");
            f.residual = (X(i, j) - Scalar(M.field, 1)).str();
            f.residual_ball = ball_of(X(i, j) - Scalar(M.field, 1), opt.ball_digits);
            add_failure(cc, std::move(f));
          }
        }
    }
    rep.checks.push_back(cc);
  }

  // --- R data
  if (M.has_r) {
    CheckCount cc;
    cc.name = "r_admissible";
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c) {
          bool adm = M.fusion(a, b, c) > 0;
          const Scalar* v = M.r_symbol(a, b, c);
          if (adm) {
            ++cc.count;
            if (!M.r_given.count({a, b, c}))
              add_failure(cc, simple(cc.name, fmt::format("a={} b={} c={}", L(a), L(b), L(c)),
                                     "admissible R-symbol R^{ab}_c is missing"));
            else if (!v)
              add_failure(cc, simple(cc.name, fmt::format("a={} b={} c={}", L(a), L(b), L(c)),
                                     "R^{ab}_c must be nonzero (the exchange is invertible)"));
          } else if (v) {
            ++cc.count;
            auto it = M.r_line.find({a, b, c});
            add_failure(cc, simple(cc.name, fmt::format("a={} b={} c={}", L(a), L(b), L(c)),
                                   "nonzero R-symbol that the fusion rules do not allow",
                                   it == M.r_line.end() ? 0 : it->second));
          }
        }
    rep.checks.push_back(cc);
  }

  // --- pentagons and hexagons
  Tables T(M);
  int threads = thread_count(opt);
  {
    auto blocks = pentagon_blocks(T);
    auto res = run_equations(T, 0, threads, "pentagon", opt, true, blocks, {});
    rep.checks.push_back(gather("pentagon", res, rep, opt.max_failures));
  }
  if (M.has_r) {
    auto blocks = hexagon_blocks(T);
    for (bool inv : {false, true}) {
      std::string name = inv ? "hexagon_reverse" : "hexagon";
      auto res = run_equations(T, inv ? 2 : 1, threads, name, opt, true, {}, blocks);
      rep.checks.push_back(gather(name, res, rep, opt.max_failures));
    }
  } else {
    CheckCount cc;
    cc.name = "hexagon";
    cc.skipped = true;
    cc.note = "no R-symbols given (fusion category only)";
    rep.checks.push_back(cc);
  }

  // --- unitarity
  if (M.claims_unitary) {
    CheckCount cc;
    cc.name = "unitarity";
    for (const auto& B : fblocks) {
      std::vector<int> rows, cols;
      Matrix X = block_matrix(B, rows, cols);
      if (rows.size() != cols.size()) continue;
      ++cc.count;
      Matrix D = X * X.adjoint() - Matrix::identity(M.field, rows.size());
      if (!D.is_zero()) {
        CheckFailure f = simple(cc.name, block_name(B), "F^{abc}_d (F^{abc}_d)^dagger != 1 (gauge claimed unitary)");
        Scalar worst(M.field);
        for (size_t i = 0; i < D.rows() && worst.is_zero(); ++i)
          for (size_t j = 0; j < D.cols() && worst.is_zero(); ++j) worst = D(i, j);
        f.residual = worst.str();
        f.residual_ball = ball_of(worst, opt.ball_digits);
        add_failure(cc, std::move(f));
      }
    }
    for (const auto& [k, v] : M.r_symbols()) {
      ++cc.count;
      Scalar dev = v.abs2() - Scalar(M.field, 1);
      if (!dev.is_zero()) {
        CheckFailure f = simple(cc.name, fmt::format("R a={} b={} c={}", L(k[0]), L(k[1]), L(k[2])),
                                "|R^{ab}_c|^2 != 1 (gauge claimed unitary)");
        f.residual = dev.str();
        f.residual_ball = ball_of(dev, opt.ball_digits);
        add_failure(cc, std::move(f));
      }
    }
    rep.checks.push_back(cc);
  }

  for (const CheckCount& c : rep.checks) rep.ok = rep.ok && c.failed == 0;
  rep.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return rep;
}

EquationCount check_equations_only(const Model& M, int threads) {
  Tables T(M);
  CheckOptions opt;
  EquationCount out;
  auto pb = pentagon_blocks(T);
  auto res = run_equations(T, 0, threads, "pentagon", opt, false, pb, {});
  for (auto& r : res) out.pentagons += r.count, out.failed += r.failed;
  if (M.has_r) {
    auto hb = hexagon_blocks(T);
    for (bool inv : {false, true}) {
      auto hr = run_equations(T, inv ? 2 : 1, threads, "hexagon", opt, false, {}, hb);
      for (auto& r : hr) out.hexagons += r.count, out.failed += r.failed;
    }
  }
  return out;
}

EquationCount evaluate_equations_double(const Model& M, double* max_residual, double* loop_seconds, int repeat) {
  Tables T(M);
  T.make_double();
  auto pblocks = pentagon_blocks(T);
  auto hblocks = hexagon_blocks(T);
  auto t0 = std::chrono::steady_clock::now();
  EquationCount out;
  double worst = 0;
  for (int rep = 0; rep < std::max(1, repeat); ++rep) {
  out = EquationCount{};
  using C = std::complex<double>;
  auto F = [&](int a, int b, int c, int d, int e, int f) {
    int i = T.fid(a, b, c, d, e, f);
    return i < 0 ? C(0) : T.fd[static_cast<size_t>(i)];
  };
  auto R = [&](int a, int b, int c, bool inv) {
    int i = T.rid_(a, b, c);
    return i < 0 ? C(0) : (inv ? T.rid : T.rd)[static_cast<size_t>(i)];
  };
  int n = T.n;
  for (const PentagonBlock& B : pblocks) {
    const int a = B.a, b = B.b, c = B.c, d = B.d, e = B.e;
    std::vector<std::pair<int, int>> right;
    std::vector<int> pos(static_cast<size_t>(n) * n, -1);
    for (int l : T.chan(c, d))
      for (int k : T.chan(b, l))
        if (T.N(a, k, e)) {
          pos[static_cast<size_t>(k) * n + l] = static_cast<int>(right.size());
          right.emplace_back(k, l);
        }
    std::vector<C> acc(right.size());
    for (int f : T.chan(a, b))
      for (int g : T.chan(f, c)) {
        if (!T.N(g, d, e)) continue;
        std::fill(acc.begin(), acc.end(), C(0));
        for (int h : T.chan(b, c)) {
          C x1 = F(a, b, c, g, f, h);
          if (x1 == C(0)) continue;
          for (int k : T.chan(h, d)) {
            if (!T.N(a, k, e)) continue;
            C p = x1 * F(a, h, d, e, g, k);
            for (int l : T.chan(c, d)) {
              int ps = pos[static_cast<size_t>(k) * n + l];
              if (ps >= 0) acc[static_cast<size_t>(ps)] += p * F(b, c, d, k, h, l);
            }
          }
        }
        for (size_t j = 0; j < right.size(); ++j) {
          auto [k, l] = right[j];
          worst = std::max(worst, std::abs(F(f, c, d, e, g, l) * F(a, b, l, e, f, k) - acc[j]));
          ++out.pentagons;
        }
      }
  }
  if (M.has_r)
    for (bool inv : {false, true})
      for (const HexBlock& B : hblocks) {
        const int a = B.a, b = B.b, c = B.c, d = B.d;
        for (int e : T.chan(a, c)) {
          if (!T.N(e, b, d)) continue;
          for (int g : T.chan(c, b)) {
            if (!T.N(a, g, d)) continue;
            C lhs = inv ? R(a, c, e, true) * F(a, c, b, d, e, g) * R(b, c, g, true)
                        : R(c, a, e, false) * F(a, c, b, d, e, g) * R(c, b, g, false);
            for (int f : T.chan(a, b))
              lhs -= F(c, a, b, d, e, f) * (inv ? R(f, c, d, true) : R(c, f, d, false)) * F(a, b, c, d, f, g);
            worst = std::max(worst, std::abs(lhs));
            ++out.hexagons;
          }
        }
      }
  }
  if (loop_seconds)
    *loop_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() / std::max(1, repeat);
  if (max_residual) *max_residual = worst;
  return out;
}

}  // namespace zb
