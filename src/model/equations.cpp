// Pentagon and hexagon drivers (equations in check.hpp, arithmetic in equation_kernel.hpp).
//
// Work is split by blocks of equations sharing their outer labels; parallel_for hands the blocks out, each block
// writes its own result, and the results are gathered in block order, so the report is the same at any thread
// count. Each thread borrows a kernel (scratch space and a radicand cache) from a small pool.
#include "equations.hpp"

#include <fmt/format.h>

#include <atomic>
#include <chrono>
#include <memory>
#include <mutex>
#include <thread>

#include "equation_kernel.hpp"
#include "zetabraid/detail/parallel.hpp"

namespace zb::equations {

namespace {

std::string lab(const Model& m, int a) { return m.labels[static_cast<size_t>(a)]; }

std::string ball_of(const Scalar& s, long digits) {
  AcbT b;
  s.ball(b, static_cast<long>(static_cast<double>(digits) * 3.33) + 16);
  return ball_str(b, digits);
}

struct BlockResult {
  long count = 0, failed = 0;
  std::vector<CheckFailure> failures;
};

struct PentagonBlock {
  int a, b, c, d, e;
};

// Every (a, b, c, d; e) with some fusion tree ((a b) c) d -> e.
std::vector<PentagonBlock> pentagon_blocks(const EquationTables& T) {
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

struct HexBlock {
  int a, b, c, d;
};

// Every (a, b, c, d) with some tree (a c -> e) b -> d.
std::vector<HexBlock> hexagon_blocks(const EquationTables& T) {
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

// One pentagon block: every (f,g) x (k,l).
template <class K>
void pentagon_block(const EquationTables& T, const PentagonBlock& B, K& w, BlockResult& r, const CheckOptions& opt,
                    bool record) {
  using V = typename K::Value;
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
        if (y1 && y2) w.addmul(lhs, *y1, *y2);  // unreduced, like acc[j]: one reduction per equation
        w.scale(lhs);
        w.sub(lhs, acc[j]);
        w.finish(lhs);
        ++r.count;
        if (w.is_zero(lhs)) continue;
        ++r.failed;
        if (!record || r.failures.size() >= opt.max_failures) continue;
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

// The hexagons of one block (a,b,c,d); inverse selects the reverse equation.
template <class K>
void hexagon_block(const EquationTables& T, const HexBlock& B, bool inverse, K& w, BlockResult& r,
                   const CheckOptions& opt, bool record) {
  using V = typename K::Value;
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
      if (w.is_zero(lhs)) continue;
      ++r.failed;
      if (!record || r.failures.size() >= opt.max_failures) continue;
      const Model& M = T.M;
      Scalar res = w.unscale(lhs, 2);
      CheckFailure fl;
      fl.check = inverse ? "hexagon_reverse" : "hexagon";
      fl.where = fmt::format("a={} b={} c={} d={} e={} g={}", lab(M, a), lab(M, b), lab(M, c), lab(M, d), lab(M, e),
                             lab(M, g));
      fl.what = inverse ? "(R^{ac}_e)^-1 [F^{acb}_d]_{eg} (R^{bc}_g)^-1 - sum_f [F^{cab}_d]_{ef} (R^{fc}_d)^-1 "
                          "[F^{abc}_d]_{fg} != 0"
                        : "R^{ca}_e [F^{acb}_d]_{eg} R^{cb}_g - sum_f [F^{cab}_d]_{ef} R^{cf}_d [F^{abc}_d]_{fg} != 0";
      fl.residual = res.str();
      fl.residual_ball = ball_of(res, opt.ball_digits);
      r.failures.push_back(std::move(fl));
    }
  }
}

// Kernels (scratch space, radicand caches) lent to the threads of one run; a returned kernel is reused.
template <class K, class Arith>
class KernelPool {
 public:
  KernelPool(const EquationTables& T, Arith arith) : T_(T), arith_(std::move(arith)) {}
  std::unique_ptr<K> take() {
    {
      std::lock_guard<std::mutex> g(mu_);
      if (!free_.empty()) {
        std::unique_ptr<K> k = std::move(free_.back());
        free_.pop_back();
        return k;
      }
    }
    return std::make_unique<K>(T_, arith_);
  }
  void give_back(std::unique_ptr<K> k) {
    std::lock_guard<std::mutex> g(mu_);
    free_.push_back(std::move(k));
  }

 private:
  const EquationTables& T_;
  Arith arith_;
  std::mutex mu_;
  std::vector<std::unique_ptr<K>> free_;
};

enum class Kind { kPentagon, kHexagon, kHexagonReverse };

struct Run {
  const EquationTables& T;
  const CheckOptions& opt;
  int threads;
  bool record;  // keep failures (with their residuals) or only count
  const std::vector<PentagonBlock>& pentagons;
  const std::vector<HexBlock>& hexagons;

  // One result per block, in block order, from the given arithmetic.
  template <class Arith>
  std::vector<BlockResult> blocks(Kind kind, const std::string& stage, Arith arith) const {
    using K = EquationKernel<Arith>;
    KernelPool<K, Arith> pool(T, std::move(arith));
    const size_t total = kind == Kind::kPentagon ? pentagons.size() : hexagons.size();
    std::vector<BlockResult> res(total);
    const std::thread::id caller = std::this_thread::get_id();
    auto last = std::chrono::steady_clock::now();
    std::atomic<size_t> done{0};
    parallel_for(total, threads, [&](size_t i) {
      std::unique_ptr<K> w = pool.take();
      if (kind == Kind::kPentagon)
        pentagon_block(T, pentagons[i], *w, res[i], opt, record);
      else
        hexagon_block(T, hexagons[i], kind == Kind::kHexagonReverse, *w, res[i], opt, record);
      pool.give_back(std::move(w));
      size_t d = done.fetch_add(1, std::memory_order_relaxed) + 1;
      // Progress from the checking thread only, at most every 100 ms.
      if (opt.progress && std::this_thread::get_id() == caller) {
        auto now = std::chrono::steady_clock::now();
        if (now - last >= std::chrono::milliseconds(100)) {
          last = now;
          opt.progress(stage, static_cast<double>(d) / static_cast<double>(total));
        }
      }
    });
    return res;
  }
  // The integer arithmetic when the tables are integral (unless the options ask for the field), else the field.
  std::vector<BlockResult> blocks(Kind kind, const std::string& stage) const {
    if (T.integral && !opt.force_field_kernel) return blocks(kind, stage, T.integer_arith());
    return blocks(kind, stage, T.field_arith());
  }
};

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

void check_pentagons_hexagons(const Model& M, const CheckOptions& opt, CheckReport& rep) {
  EquationTables T(M);
  std::vector<PentagonBlock> pb = pentagon_blocks(T);
  std::vector<HexBlock> hb = M.has_r ? hexagon_blocks(T) : std::vector<HexBlock>{};
  Run run{T, opt, thread_count(opt.threads), true, pb, hb};
  {
    auto res = run.blocks(Kind::kPentagon, "pentagon");
    rep.checks.push_back(gather("pentagon", res, rep, opt.max_failures));
  }
  if (M.has_r) {
    for (bool inv : {false, true}) {
      std::string name = inv ? "hexagon_reverse" : "hexagon";
      auto res = run.blocks(inv ? Kind::kHexagonReverse : Kind::kHexagon, name);
      rep.checks.push_back(gather(name, res, rep, opt.max_failures));
    }
  } else {
    CheckCount cc;
    cc.name = "hexagon";
    cc.skipped = true;
    cc.note = "no R-symbols given (fusion category only)";
    rep.checks.push_back(cc);
  }
}

}  // namespace zb::equations

namespace zb {

EquationCount check_equations_only(const Model& M, int threads) {
  using namespace equations;
  EquationTables T(M);
  CheckOptions opt;
  EquationCount out;
  std::vector<PentagonBlock> pb = pentagon_blocks(T);
  std::vector<HexBlock> hb = M.has_r ? hexagon_blocks(T) : std::vector<HexBlock>{};
  Run run{T, opt, thread_count(threads), false, pb, hb};
  for (const BlockResult& r : run.blocks(Kind::kPentagon, "pentagon")) out.pentagons += r.count, out.failed += r.failed;
  if (M.has_r)
    for (Kind k : {Kind::kHexagon, Kind::kHexagonReverse})
      for (const BlockResult& r : run.blocks(k, "hexagon")) out.hexagons += r.count, out.failed += r.failed;
  return out;
}

}  // namespace zb
