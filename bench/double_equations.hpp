// The pentagon and hexagon equations of a model evaluated in complex double: the baseline the exact check is
// compared with in bench_models (a comparison only -- floating point decides nothing in zetabraid). Same loop
// structure as the exact drivers (src/model/equations.cpp): blocks of equations, a flat F index, channel lists.
#pragma once
#include <algorithm>
#include <chrono>
#include <complex>
#include <unordered_map>
#include <vector>

#include "zetabraid/detail/raii.hpp"
#include "zetabraid/model/check.hpp"

namespace zb::bench {

class DoubleEquations {
 public:
  using C = std::complex<double>;

  explicit DoubleEquations(const Model& m) : m_(m), n_(m.label_count()) {
    size_t n6 = 1;
    for (int i = 0; i < 6; ++i) n6 *= static_cast<size_t>(n_);
    dense_ = n_ <= 14;
    if (dense_) fdense_.assign(n6, -1);
    for (const auto& [k, v] : m.f_symbols()) {
      if (v.is_zero()) continue;
      size_t i = idx6(k[0], k[1], k[2], k[3], k[4], k[5]);
      (dense_ ? fdense_[i] : fsparse_[i]) = static_cast<int>(fvals_.size());
      fvals_.push_back(image(v));
    }
    ridx_.assign(static_cast<size_t>(n_) * n_ * n_, -1);
    for (const auto& [k, v] : m.r_symbols()) {
      if (v.is_zero()) continue;
      ridx_[(static_cast<size_t>(k[0]) * n_ + k[1]) * n_ + k[2]] = static_cast<int>(rvals_.size());
      rvals_.push_back(image(v));
      rinv_.push_back(image(v.inverse()));
    }
    ch_.resize(static_cast<size_t>(n_) * n_);
    for (int a = 0; a < n_; ++a)
      for (int b = 0; b < n_; ++b) ch_[static_cast<size_t>(a) * n_ + b] = m.channels(a, b);
    for (int a = 0; a < n_; ++a)
      for (int b = 0; b < n_; ++b)
        for (int c = 0; c < n_; ++c)
          for (int d = 0; d < n_; ++d) {
            std::vector<char> seen(static_cast<size_t>(n_));
            for (int f : chan(a, b))
              for (int g : chan(f, c))
                for (int e : chan(g, d)) seen[static_cast<size_t>(e)] = 1;
            for (int e = 0; e < n_; ++e)
              if (seen[static_cast<size_t>(e)]) pblocks_.push_back({a, b, c, d, e});
            bool any = false;
            for (int e : chan(a, c)) any = any || N(e, b, d);
            if (any) hblocks_.push_back({a, b, c, d});
          }
  }

  /// Evaluates every equation `repeat` times; returns the counts of one pass, the largest |residual| and the
  /// time of one pass (tables excluded).
  EquationCount run(double* max_residual, double* loop_seconds, int repeat) const {
    auto t0 = std::chrono::steady_clock::now();
    EquationCount out;
    double worst = 0;
    for (int r = 0; r < std::max(1, repeat); ++r) {
      out = EquationCount{};
      pentagons(out, worst);
      if (m_.has_r)
        for (bool inv : {false, true}) hexagons(inv, out, worst);
    }
    if (loop_seconds)
      *loop_seconds =
          std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() / std::max(1, repeat);
    if (max_residual) *max_residual = worst;
    return out;
  }

 private:
  const Model& m_;
  int n_;
  bool dense_;
  std::vector<int> fdense_;
  std::unordered_map<size_t, int> fsparse_;
  std::vector<C> fvals_, rvals_, rinv_;
  std::vector<int> ridx_;
  std::vector<std::vector<int>> ch_;
  struct PBlock {
    int a, b, c, d, e;
  };
  struct HBlock {
    int a, b, c, d;
  };
  std::vector<PBlock> pblocks_;
  std::vector<HBlock> hblocks_;

  static C image(const Scalar& s) {
    AcbT b;
    s.ball(b, 64);
    return C(arf_get_d(arb_midref(acb_realref(b.get())), ARF_RND_NEAR),
             arf_get_d(arb_midref(acb_imagref(b.get())), ARF_RND_NEAR));
  }
  size_t idx6(int a, int b, int c, int d, int e, int f) const {
    size_t N = static_cast<size_t>(n_);
    return ((((static_cast<size_t>(a) * N + b) * N + c) * N + d) * N + e) * N + f;
  }
  C F(int a, int b, int c, int d, int e, int f) const {
    size_t i = idx6(a, b, c, d, e, f);
    int id = -1;
    if (dense_) {
      id = fdense_[i];
    } else {
      auto it = fsparse_.find(i);
      if (it != fsparse_.end()) id = it->second;
    }
    return id < 0 ? C(0) : fvals_[static_cast<size_t>(id)];
  }
  C R(int a, int b, int c, bool inv) const {
    int i = ridx_[(static_cast<size_t>(a) * n_ + b) * n_ + c];
    return i < 0 ? C(0) : (inv ? rinv_ : rvals_)[static_cast<size_t>(i)];
  }
  const std::vector<int>& chan(int a, int b) const { return ch_[static_cast<size_t>(a) * n_ + b]; }
  bool N(int a, int b, int c) const { return m_.fusion(a, b, c) > 0; }

  void pentagons(EquationCount& out, double& worst) const {
    const int n = n_;
    for (const PBlock& B : pblocks_) {
      const int a = B.a, b = B.b, c = B.c, d = B.d, e = B.e;
      std::vector<std::pair<int, int>> right;
      std::vector<int> pos(static_cast<size_t>(n) * n, -1);
      for (int l : chan(c, d))
        for (int k : chan(b, l))
          if (N(a, k, e)) {
            pos[static_cast<size_t>(k) * n + l] = static_cast<int>(right.size());
            right.emplace_back(k, l);
          }
      std::vector<C> acc(right.size());
      for (int f : chan(a, b))
        for (int g : chan(f, c)) {
          if (!N(g, d, e)) continue;
          std::fill(acc.begin(), acc.end(), C(0));
          for (int h : chan(b, c)) {
            C x1 = F(a, b, c, g, f, h);
            if (x1 == C(0)) continue;
            for (int k : chan(h, d)) {
              if (!N(a, k, e)) continue;
              C p = x1 * F(a, h, d, e, g, k);
              for (int l : chan(c, d)) {
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
  }
  void hexagons(bool inv, EquationCount& out, double& worst) const {
    for (const HBlock& B : hblocks_) {
      const int a = B.a, b = B.b, c = B.c, d = B.d;
      for (int e : chan(a, c)) {
        if (!N(e, b, d)) continue;
        for (int g : chan(c, b)) {
          if (!N(a, g, d)) continue;
          C lhs = inv ? R(a, c, e, true) * F(a, c, b, d, e, g) * R(b, c, g, true)
                      : R(c, a, e, false) * F(a, c, b, d, e, g) * R(c, b, g, false);
          for (int f : chan(a, b))
            lhs -= F(c, a, b, d, e, f) * (inv ? R(f, c, d, true) : R(c, f, d, false)) * F(a, b, c, d, f, g);
          worst = std::max(worst, std::abs(lhs));
          ++out.hexagons;
        }
      }
    }
  }
};

}  // namespace zb::bench
