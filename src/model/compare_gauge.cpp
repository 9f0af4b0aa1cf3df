// Exact multiplicative linear algebra for gauge equivalence (method and proof in compare_gauge.hpp).
#include "compare_gauge.hpp"

#include <fmt/format.h>

#include <map>
#include <optional>

#include "zetabraid/error.hpp"

namespace zb::detail {

namespace {

long checked_mul(long a, long b) {
  long r;
  if (__builtin_mul_overflow(a, b, &r)) throw ResourceError("gauge elimination: an integer exceeded 64 bits");
  return r;
}
long checked_add(long a, long b) {
  long r;
  if (__builtin_add_overflow(a, b, &r)) throw ResourceError("gauge elimination: an integer exceeded 64 bits");
  return r;
}

// Extended gcd: g = s a + t b, g > 0 (a != 0 or b != 0).
long ext_gcd(long a, long b, long* s, long* t) {
  long r0 = a, r1 = b, s0 = 1, s1 = 0, t0 = 0, t1 = 1;
  while (r1 != 0) {
    long q = r0 / r1, tmp;
    tmp = r0 - q * r1, r0 = r1, r1 = tmp;
    tmp = s0 - q * s1, s0 = s1, s1 = tmp;
    tmp = t0 - q * t1, t0 = t1, t1 = tmp;
  }
  if (r0 < 0) r0 = -r0, s0 = -s0, t0 = -t0;
  *s = s0, *t = t0;
  return r0;
}

// A row in elimination: dense exponents, its carried value and (optionally) its combination of input rows.
struct Work {
  std::vector<long> v;
  Scalar val;
  std::map<int, long> combo;
};

// x*p + y*q for rows (values: p.val^x q.val^y).
Work combine(const Work& p, long x, const Work& q, long y, bool track) {
  Work out{std::vector<long>(p.v.size(), 0), p.val.pow(x) * q.val.pow(y), {}};
  for (size_t i = 0; i < p.v.size(); ++i) out.v[i] = checked_add(checked_mul(p.v[i], x), checked_mul(q.v[i], y));
  if (track) {
    for (auto [r, e] : p.combo) out.combo[r] = checked_add(out.combo[r], checked_mul(e, x));
    for (auto [r, e] : q.combo) out.combo[r] = checked_add(out.combo[r], checked_mul(e, y));
    for (auto it = out.combo.begin(); it != out.combo.end();) it = it->second == 0 ? out.combo.erase(it) : std::next(it);
  }
  return out;
}

int lead(const std::vector<long>& v) {
  for (size_t i = 0; i < v.size(); ++i)
    if (v[i] != 0) return static_cast<int>(i);
  return -1;
}

// Runs the elimination on rows[0..stop); returns the index of the first row whose kernel value is not 1 (or -1),
// and fills basis (pivot column -> echelon row) and, when tracking, *loop with that row's combination.
int eliminate(int ncols, const std::vector<GaugeRow>& rows, size_t stop, bool track,
              std::vector<std::optional<Work>>* basis, Work* bad) {
  basis->assign(static_cast<size_t>(ncols), std::nullopt);
  for (size_t r = 0; r < stop; ++r) {
    Work w{std::vector<long>(static_cast<size_t>(ncols), 0), rows[r].ratio, {}};
    for (auto [c, e] : rows[r].exps) w.v[static_cast<size_t>(c)] = e;
    if (track) w.combo[static_cast<int>(r)] = 1;
    bool stored = false;
    for (int c = lead(w.v); c >= 0; c = lead(w.v)) {
      auto& slot = (*basis)[static_cast<size_t>(c)];
      if (!slot) {
        if (w.v[static_cast<size_t>(c)] < 0) w = combine(w, -1, w, 0, track);
        slot = std::move(w);
        stored = true;
        break;
      }
      const long a = slot->v[static_cast<size_t>(c)], b = w.v[static_cast<size_t>(c)];
      if (b % a == 0) {
        w = combine(w, 1, *slot, -(b / a), track);
        continue;
      }
      long s, t;
      const long g = ext_gcd(a, b, &s, &t);
      Work top = combine(*slot, s, w, t, track);              // leading entry g > 0
      Work rest = combine(*slot, b / g, w, -(a / g), track);  // leading entry 0; [[s t][b/g -a/g]] has det -1
      slot = std::move(top);
      w = std::move(rest);
    }
    // A row reduced to zero is an element of the kernel: its carried value must be exactly 1.
    if (!stored && !w.val.is_one()) {
      if (bad) *bad = std::move(w);
      return static_cast<int>(r);
    }
  }
  return -1;
}

}  // namespace

GaugeSolution solve_gauge(int ncols, const std::vector<GaugeRow>& rows, const FieldPtr& f) {
  GaugeSolution sol;
  std::vector<std::optional<Work>> basis;
  Work bad{{}, Scalar(f), {}};
  int failed = eliminate(ncols, rows, rows.size(), false, &basis, &bad);
  if (failed >= 0) {
    // Again with the combinations tracked, up to the failing row, to name the product.
    Work named{{}, Scalar(f), {}};
    int again = eliminate(ncols, rows, static_cast<size_t>(failed) + 1, true, &basis, &named);
    if (again != failed) throw InternalError("gauge elimination: the tracked run disagrees with the first one");
    sol.consistent = false;
    for (auto [r, e] : named.combo) sol.loop.emplace_back(r, e);
    sol.loop_value = named.val;
    return sol;
  }
  // Back substitution from the last pivot column: u_c^g = val / prod_{j > c} u_j^{v_j}; free columns get 1.
  sol.u.assign(static_cast<size_t>(ncols), Scalar(f, 1));
  sol.explicit_gauge = true;
  for (int c = ncols - 1; c >= 0; --c) {
    const auto& row = basis[static_cast<size_t>(c)];
    if (!row) continue;
    Scalar rhs = row->val;
    for (int j = c + 1; j < ncols; ++j)
      if (long e = row->v[static_cast<size_t>(j)]) rhs /= sol.u[static_cast<size_t>(j)].pow(e);
    const long g = row->v[static_cast<size_t>(c)];
    if (g == 1) {
      sol.u[static_cast<size_t>(c)] = rhs;
    } else if (rhs.is_one()) {
      sol.u[static_cast<size_t>(c)] = rhs;
    } else if (g == 2 && rhs.in_base() && rhs.is_real() && rhs.real_sign() > 0) {
      sol.u[static_cast<size_t>(c)] = f->sqrt(rhs.to_base());
    } else {
      sol.explicit_gauge = false;
      sol.note = fmt::format("with the free vertex factors set to 1 the gauge needs a {} of {} (it exists over C, so the "
                             "models are equivalent; no explicit gauge is printed)",
                             g == 2 ? "square root" : fmt::format("{}-th root", g), rhs.str());
      sol.u.clear();
      break;
    }
  }
  return sol;
}

}  // namespace zb::detail
