// An anyon model: labels, fusion rules, F-symbols and (optionally) R-symbols, all exact.
//
// Conventions (documented in docs/model-format.md):
//  * F-symbols, multiplicity-free: for a fusion tree of a, b, c with total charge d,
//        |(a b -> e) c -> d>  =  sum_f  [F^{abc}_d]_{e f}  |a (b c -> f) -> d>,
//    i.e. [F^{abc}_d] changes the left-associated basis (rows e) into the right-associated basis (columns f).
//  * R-symbols: R^{ab}_c is the eigenvalue of the counterclockwise exchange of a and b in the fusion channel c,
//    mapping V^{ab}_c to V^{ba}_c (for a != b an isomorphism between distinct spaces in a fixed basis).
//  * Label 0 is the unit ("vacuum").
// Fusion multiplicities N_{ab}^c are stored as integers so that multiplicities > 1 can be added later (with
// vertex indices); the F/R accessors below are for the multiplicity-free case and loaders reject N > 1 today.
#pragma once
#include <array>
#include <map>
#include <optional>
#include <set>
#include <string>
#include <unordered_map>
#include <vector>

#include "zetabraid/field/scalar.hpp"

namespace zb {

struct Model {
  Model() = default;
  Model(const Model& o);             ///< deep copy (rebuilds the fast F index)
  Model& operator=(const Model& o);
  Model(Model&&) noexcept = default;
  Model& operator=(Model&&) noexcept = default;

  std::string name;
  std::string source;        ///< provenance text from the file (paper/formula or generating command)
  std::string source_sha256; ///< lower-case hex SHA-256 of the exact bytes parsed (empty when not from text)
  FieldPtr field;            ///< K(sqrt(d_1), ...) containing every value
  std::vector<std::string> labels;
  bool claims_unitary = false;
  bool has_r = false;

  int label_count() const { return static_cast<int>(labels.size()); }
  /// Index of a label name, or -1.
  int label_index(const std::string& name) const;

  /// N_{ab}^c.
  int fusion(int a, int b, int c) const { return fusion_[(static_cast<size_t>(a) * n() + b) * n() + c]; }
  void set_fusion(int a, int b, int c, int mult);
  /// Channels c with N_{ab}^c > 0, ascending.
  std::vector<int> channels(int a, int b) const;
  /// Row labels e of the block F^{abc}_d (a b -> e, e c -> d) and column labels f (b c -> f, a f -> d), ascending.
  std::vector<int> left_channels(int a, int b, int c, int d) const;
  std::vector<int> right_channels(int a, int b, int c, int d) const;
  /// The dual a* (N_{a a*}^0 = 1), or -1 if none.
  int dual(int a) const;

  /// One block F^{abc}_d: its outer labels, row labels e and column labels f (as left_channels/right_channels).
  struct FBlock {
    int a, b, c, d;
    std::vector<int> rows, cols;
  };
  /// Calls fn(const FBlock&) for every (a, b, c, d) whose block has a row or a column, in label order (a slowest,
  /// d fastest): the one loop over F-blocks. Callers that need square or nonempty blocks test rows/cols.
  template <class Fn>
  void for_each_f_block(Fn&& fn) const;

  /// [F^{abc}_d]_{ef}; nullptr when not stored (a zero, or not admissible).
  const Scalar* f_symbol(int a, int b, int c, int d, int e, int f) const;
  void set_f_symbol(int a, int b, int c, int d, int e, int f, Scalar v);
  /// R^{ab}_c; nullptr when not stored.
  const Scalar* r_symbol(int a, int b, int c) const;
  void set_r_symbol(int a, int b, int c, Scalar v);

  /// All stored F entries (key = {a,b,c,d,e,f}); all stored R entries (key = {a,b,c}).
  const std::map<std::array<int, 6>, Scalar>& f_symbols() const { return f_; }
  const std::map<std::array<int, 3>, Scalar>& r_symbols() const { return r_; }

  /// Resizes the fusion table for labels.size() labels (all zero).
  void init_fusion();
  /// Removes every F and R entry (fusion rules stay).
  void clear_symbols();

  /// F entries and R-symbols that the source (file or generator) gave explicitly, zeros included; used by the
  /// consistency checker to report missing data. Zero values are given but not stored (f_symbol() == nullptr).
  std::set<std::array<int, 6>> f_given;
  std::set<std::array<int, 3>> r_given;
  /// Source line of each given F entry / R-symbol (0 = unknown), for messages.
  std::map<std::array<int, 6>, int> f_line;
  std::map<std::array<int, 3>, int> r_line;

 private:
  size_t n() const { return labels.size(); }
  std::vector<int> fusion_;
  std::map<std::array<int, 6>, Scalar> f_;
  std::map<std::array<int, 3>, Scalar> r_;
  // Fast lookup for hot loops (pentagon checks): flattened index -> pointer into f_.
  std::unordered_map<std::uint64_t, const Scalar*> f_index_;
};

template <class Fn>
void Model::for_each_f_block(Fn&& fn) const {
  const int nl = label_count();
  std::vector<std::vector<int>> left(n()), right(n());
  FBlock blk{0, 0, 0, 0, {}, {}};
  for (int a = 0; a < nl; ++a)
    for (int b = 0; b < nl; ++b) {
      const std::vector<int> ab = channels(a, b);
      for (int c = 0; c < nl; ++c) {
        for (auto& v : left) v.clear();
        for (auto& v : right) v.clear();
        for (int e : ab)
          for (int d = 0; d < nl; ++d)
            if (fusion(e, c, d)) left[static_cast<size_t>(d)].push_back(e);
        for (int f = 0; f < nl; ++f) {
          if (!fusion(b, c, f)) continue;
          for (int d = 0; d < nl; ++d)
            if (fusion(a, f, d)) right[static_cast<size_t>(d)].push_back(f);
        }
        for (int d = 0; d < nl; ++d) {
          if (left[static_cast<size_t>(d)].empty() && right[static_cast<size_t>(d)].empty()) continue;
          blk.a = a, blk.b = b, blk.c = c, blk.d = d;
          blk.rows = left[static_cast<size_t>(d)];
          blk.cols = right[static_cast<size_t>(d)];
          fn(static_cast<const FBlock&>(blk));
        }
      }
    }
}

}  // namespace zb
