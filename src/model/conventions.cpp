// Converting a model file's printed conventions into zetabraid's (see conventions.hpp).
#include "conventions.hpp"

#include <fmt/format.h>

#include <map>
#include <set>
#include <vector>

#include "zetabraid/error.hpp"

namespace zb {

const char* f_matrix_name(FileConventions::FMatrix v) {
  switch (v) {
    case FileConventions::FMatrix::kAsIs: return "as-zetabraid";
    case FileConventions::FMatrix::kTranspose: return "transpose";
    case FileConventions::FMatrix::kInverse: return "inverse";
    case FileConventions::FMatrix::kInverseTranspose: return "inverse-transpose";
  }
  return "?";
}

namespace {

using Block = std::vector<std::vector<Scalar>>;

// Exact inverse by Gauss-Jordan elimination; false when singular.
bool invert(Block& a, const FieldPtr& field) {
  const size_t n = a.size();
  Block inv(n, std::vector<Scalar>(n, Scalar(field)));
  for (size_t i = 0; i < n; ++i) inv[i][i] = Scalar(field, 1);
  for (size_t col = 0; col < n; ++col) {
    size_t piv = col;
    while (piv < n && a[piv][col].is_zero()) ++piv;
    if (piv == n) return false;
    std::swap(a[piv], a[col]);
    std::swap(inv[piv], inv[col]);
    const Scalar p = a[col][col].inverse();
    for (size_t j = 0; j < n; ++j) {
      a[col][j] *= p;
      inv[col][j] *= p;
    }
    for (size_t r = 0; r < n; ++r) {
      if (r == col || a[r][col].is_zero()) continue;
      const Scalar factor = a[r][col];
      for (size_t j = 0; j < n; ++j) {
        a[r][j] -= factor * a[col][j];
        inv[r][j] -= factor * inv[col][j];
      }
    }
  }
  a = std::move(inv);
  return true;
}

std::string block_name(const Model& m, const Model::FBlock& b) {
  auto l = [&](int i) { return m.labels[static_cast<size_t>(i)]; };
  return fmt::format("F.\"{} {} {} {}\"", l(b.a), l(b.b), l(b.c), l(b.d));
}

}  // namespace

void apply_conventions(Model& m, const FileConventions& c, const std::string& origin) {
  if (!c.inverts() && !c.r_clockwise) return;
  std::map<std::array<int, 6>, Scalar> f_new;
  std::set<std::array<int, 6>> given_new;
  std::map<std::array<int, 6>, int> line_new;
  if (!c.inverts()) {
    f_new = m.f_symbols();
    given_new = m.f_given;
    line_new = m.f_line;
  } else {
    m.for_each_f_block([&](const Model::FBlock& b) {
      if (b.rows.empty() || b.rows.size() != b.cols.size()) return;
      size_t n = b.rows.size(), given = 0;
      int first_line = 0;
      Block blk(n, std::vector<Scalar>(n, Scalar(m.field)));
      for (size_t i = 0; i < n; ++i)
        for (size_t j = 0; j < n; ++j) {
          std::array<int, 6> k{b.a, b.b, b.c, b.d, b.rows[i], b.cols[j]};
          if (!m.f_given.count(k)) continue;
          ++given;
          auto ln = m.f_line.find(k);
          if (ln != m.f_line.end() && ln->second && !first_line) first_line = ln->second;
          if (const Scalar* v = m.f_symbol(k[0], k[1], k[2], k[3], k[4], k[5])) blk[i][j] = *v;
        }
      if (given == 0) return;  // absent block: model check reports it as missing
      std::string where = first_line ? fmt::format("{}:{}", origin, first_line) : origin;
      if (given != n * n)
        throw InputError(fmt::format("{}: {}: f_matrix = \"{}\" needs every entry of the block to invert it ({} of "
                                     "{} given)",
                                     where, block_name(m, b), f_matrix_name(c.f_matrix), given, n * n));
      if (!invert(blk, m.field))
        throw InputError(fmt::format("{}: {}: f_matrix = \"{}\": the printed block is singular, so it has no "
                                     "inverse",
                                     where, block_name(m, b), f_matrix_name(c.f_matrix)));
      // F = (P^-1)^T with P re-oriented to rows e: entry (e_i, f_j) of F is entry (j, i) of the inverse.
      for (size_t i = 0; i < n; ++i)
        for (size_t j = 0; j < n; ++j) {
          std::array<int, 6> k{b.a, b.b, b.c, b.d, b.rows[i], b.cols[j]};
          given_new.insert(k);
          auto ln = m.f_line.find(k);
          line_new[k] = ln == m.f_line.end() ? 0 : ln->second;
          if (!blk[j][i].is_zero()) f_new.insert_or_assign(k, blk[j][i]);
        }
    });
    // Entries outside square blocks (not admissible) stay as given; model check reports them.
    for (const auto& k : m.f_given)
      if (!given_new.count(k)) {
        given_new.insert(k);
        line_new[k] = m.f_line.count(k) ? m.f_line.at(k) : 0;
        if (const Scalar* v = m.f_symbol(k[0], k[1], k[2], k[3], k[4], k[5])) f_new.insert_or_assign(k, *v);
      }
  }
  std::map<std::array<int, 3>, Scalar> r_new = m.r_symbols();
  if (c.r_clockwise)
    for (auto& [k, v] : r_new) v = v.inverse();  // stored R-symbols are nonzero
  auto r_given = m.r_given;
  auto r_line = m.r_line;
  m.clear_symbols();
  for (auto& [k, v] : f_new) m.set_f_symbol(k[0], k[1], k[2], k[3], k[4], k[5], v);
  for (auto& [k, v] : r_new) m.set_r_symbol(k[0], k[1], k[2], v);
  m.f_given = std::move(given_new);
  m.f_line = std::move(line_new);
  m.r_given = std::move(r_given);
  m.r_line = std::move(r_line);
}

}  // namespace zb
