// Published conventions of a model file ([conventions] table, docs/model-format.md "Conventions of a printed
// table"): how the printed F- and R-symbols relate to zetabraid's, and their conversion on load.
#pragma once
#include <array>
#include <string>

#include "zetabraid/model/model.hpp"

namespace zb {

struct FileConventions {
  /// How the printed F matrix relates to [F^{abc}_d]_{ef} (e: channel of a x b, f: channel of b x c):
  ///   kAsIs             |(ab->x)c->d> = sum_y P_{xy} |a(bc->y)->d>   (P = F, rows e)
  ///   kTranspose        |(ab->y)c->d> = sum_x P_{xy} |a(bc->x)->d>   (P = F^T, rows f)
  ///   kInverse          |a(bc->x)->d> = sum_y P_{xy} |(ab->y)c->d>   (P = F^-1, rows f)
  ///   kInverseTranspose |a(bc->y)->d> = sum_x P_{xy} |(ab->x)c->d>   (P = (F^-1)^T, rows e)
  /// x is the printed row index, y the printed column index.
  enum class FMatrix { kAsIs, kTranspose, kInverse, kInverseTranspose };
  FMatrix f_matrix = FMatrix::kAsIs;
  bool r_clockwise = false;  ///< the printed R^{ab}_c is the clockwise exchange, the inverse of zetabraid's
  /// Where letter a, b, c, d, e (channel of a x b), f (channel of b x c) stands in a six-label F key; the
  /// four-label key "a b c d" lists a, b, c, d in the order they have in the six-label key.
  std::array<int, 6> f_key_pos{0, 1, 2, 3, 4, 5};
  int line = 0;  ///< line of the [conventions] table (0: absent)

  /// The printed row index is the channel f of b x c (not e of a x b).
  bool rows_are_right() const { return f_matrix == FMatrix::kTranspose || f_matrix == FMatrix::kInverse; }
  bool inverts() const { return f_matrix == FMatrix::kInverse || f_matrix == FMatrix::kInverseTranspose; }
};

/// The names accepted for f_matrix ("as-zetabraid", "transpose", "inverse", "inverse-transpose").
const char* f_matrix_name(FileConventions::FMatrix v);

/// Converts a model whose F entries are stored as read (entry {a,b,c,d,e,f} holding the printed value at row/column
/// (e,f) or (f,e) per rows_are_right, i.e. already re-oriented to rows e) and whose R-symbols are as printed, into
/// zetabraid's conventions: for the inverse conventions every block is inverted and transposed (a block given only
/// in part, or singular, is an InputError naming `origin`, the line and the block); clockwise R-symbols are
/// inverted.
void apply_conventions(Model& m, const FileConventions& c, const std::string& origin);

}  // namespace zb
