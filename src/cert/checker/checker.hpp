// Private declarations of the independent checker (src/cert/checker/); see cert/checker/verify.hpp.
// Files: schema.cpp (strict JSON reading), numbers.cpp (bounded decimals and enclosures), letters.cpp (fusion
// trees and the letters from F and R), inputs.cpp (model, field, space, kept subspace, word), exact_path.cpp,
// interval_balls.cpp + interval_path.cpp, modular_path.cpp, verify.cpp (the dispatcher).
#pragma once
#include <array>
#include <map>
#include <memory>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <vector>

#include "zetabraid/cert/checker/verify.hpp"
#include "zetabraid/cert/verdict.hpp"
#include "zetabraid/detail/flint.hpp"
#include "zetabraid/linalg/matrix.hpp"
#include "zetabraid/linalg/modular_base.hpp"
#include "zetabraid/model/model.hpp"

namespace zb::checker {

using json = nlohmann::json;

/// A rejection: the certificate is false or malformed (exit 1).
struct Reject {
  std::string why;
};
[[noreturn]] void reject(const std::string& why);

/// The certificate or model cannot be read at all (exit 2 at the boundary).
struct Unreadable {
  std::string why;
};

// ---- schema.cpp: strict JSON reading
/// Parses JSON text; rejects malformed text and duplicate keys in any object (naming the key and its path).
json parse_strict(const std::string& text);
/// o must be an object with exactly these keys: names every unexpected key, and all missing keys at once.
void expect_keys(const json& o, const std::set<std::string>& keys, const std::string& where);
std::string str_of(const json& v, const std::string& where);
/// A non-negative integer <= max.
size_t uint_of(const json& v, const std::string& where, size_t max = (size_t(1) << 40));
bool bool_of(const json& v, const std::string& where);
void expect_null(const json& v, const std::string& where);
Scalar scalar_of(const json& v, const FieldPtr& f, const std::string& where);
Matrix matrix_of_rows(const json& v, size_t rows, size_t cols, const FieldPtr& f, const std::string& where);
/// A prime record {"p", "zeta", "roots"} validated for the field (modular base make_prime).
ModularPrime prime_of(const json& j, const Field& f, const std::string& where);
/// Lower-case hex SHA-256.
std::string sha256_hex(const std::string& bytes);

// ---- numbers.cpp: bounded decimals and enclosures
/// Largest |decimal exponent| and mantissa digits accepted in a certificate number.
inline constexpr long kMaxDecimalExponent = 400000;
inline constexpr size_t kMaxMantissaDigits = 64;
/// "[digits][.digits][e[+-]digits]" (unsigned) within the bounds above into x (an enclosure at prec bits).
bool parse_decimal(arb_t x, const std::string& s, long prec);
/// An enclosure "[m +/- r]" or "[+/- r]" (m may be negative) within the bounds, as arb_set_str reads it at prec.
bool parse_ball(arb_t x, const std::string& s, long prec);
/// The stated decimal bounds of an interval claim, re-derived from the enclosure text alone (section 5):
/// upper = max(ub, 2^-prec) rounded up to 6 digits, lower = lb rounded down when the ball is positive.
/// Returns whether the ball is positive. `ball` must have passed parse_ball.
bool derive_bounds(const std::string& ball, long prec, std::string* upper, std::string* lower);

// ---- letters.cpp: fusion trees and letters from F and R
/// Left-associated fusion trees of V(anyons; total) in the documented order (section 2).
class Trees {
 public:
  static constexpr size_t kMaxDimension = 20000;
  Trees(const Model& m, const std::vector<int>& anyons, int total);
  size_t dimension() const { return trees_.size(); }
  const std::vector<int>& tree(size_t i) const { return trees_[i]; }
  long index_of(const std::vector<int>& t) const;
  std::string label(const Model& m, size_t i) const;

 private:
  std::vector<std::vector<int>> trees_;
  std::map<std::vector<int>, size_t> index_;
};
/// dim V(labels; total) counted from the fusion rules alone (no trees built).
size_t count_trees(const Model& m, const std::vector<int>& labels, int total);

/// One letter as its nonzero exact entries, column by column.
struct LetterTable {
  size_t rows = 0, cols = 0;
  struct Entry {
    size_t row, col;
    Scalar value;
  };
  std::vector<Entry> entries;
  Matrix dense(const FieldPtr& f) const;
};

/// The letters of a word on their fusion spaces: each distinct (labels, letter) tabulated once, in
/// application order.
struct Letters {
  std::vector<std::unique_ptr<LetterTable>> distinct;
  std::vector<const LetterTable*> sequence;
  std::vector<int> end_labels;  ///< the anyon labels after the word
};

/// The generator action rebuilt from F and R (F-move, R, inverse F-move on basis vectors).
class Action {
 public:
  Action(const Model& m, int total);
  ~Action();
  const Trees& trees(const std::vector<int>& labels);
  /// THE routine building the letters of a word (signed generator indices) from F and R.
  Letters tabulate(const std::vector<int>& anyons, const std::vector<int>& word);

 private:
  struct Local;
  LetterTable letter(const std::vector<int>& labels, int k);
  std::vector<Scalar> apply(const std::vector<int>& labels, int k, size_t basis_index);
  const Local& local(int a, int b, int c, int d);
  Scalar rsym(int a, int b, int c) const;
  const Model& m_;
  int total_;
  std::map<std::vector<int>, std::unique_ptr<Trees>> spaces_;
  std::map<std::array<int, 4>, std::unique_ptr<Local>> locals_;
};

/// rho(word) applied to the columns of v exactly, letter by letter.
Matrix apply_letters(const std::vector<const LetterTable*>& seq, const Matrix& v);

// ---- inputs.cpp: the certificate's inputs, checked against the model
struct Inputs {
  Model model;
  std::vector<int> anyons;
  int total = 0;
  size_t dim = 0;
  Matrix keep{Field::make(1), 0, 0};  ///< dim x k, columns = kept basis vectors
  std::vector<bool> kept_rows;        ///< nonempty when the kept basis is a set of distinct tree basis vectors
  std::vector<int> word;              ///< signed generator indices
  std::unique_ptr<Action> action;
  Letters letters;
};
/// Reads and checks the sections model, field, space, keep and word; the model is found as VerifyOptions says.
void read_inputs(Inputs* x, const json& c, const std::string& cert_path, const VerifyOptions& opt);

// ---- the three paths: each returns the summary of what was verified, or rejects
std::string check_exact(const Inputs& x, const json& c, Verdict claim, RecheckRoute route);
std::string check_interval(const Inputs& x, const json& c, Verdict claim, long prec, bool plain);
std::string check_modular(const Inputs& x, const json& c, Verdict claim, long prec);

// ---- interval_balls.cpp: ball images of the kept columns and leakage enclosures
/// Plain path: rho(w) V as a left-to-right ball product at precision p.
void plain_image(acb_mat_t out, const Matrix& keep, const std::vector<const LetterTable*>& seq, long p);
/// Unitary path (every letter exactly unitary): midpoints in `mid`, err[j] >= ||column j - true column j||_2.
void unitary_image(acb_mat_t mid, mag_ptr err, const Matrix& keep, const std::vector<const LetterTable*>& seq, long p);
/// Sum of |W_rj|^2 over the rows outside the kept tree basis vectors.
void coordinate_leakage(arb_t leak, const acb_mat_t w, const std::vector<bool>& kept_rows, long p);
/// The same from midpoints with one 2-norm error bound per column.
void coordinate_leakage_bounded(arb_t leak, const acb_mat_t mid, mag_srcptr err, const std::vector<bool>& kept_rows,
                                long p);
/// Any kept basis V: the part D = W - V (G^-1 (V^* W)) outside span V, then tr(D^* D G^-1) (section 7).
void outside_leakage(arb_t leak, const acb_mat_t w, const Matrix& v, long p);

// ---- shared by the paths
/// The leak block's left factor: rows outside the kept coordinates, or 1 - V G^-1 V^*.
Matrix leak_post(const Inputs& x);
/// modular_path.cpp: proves hint == rho(w) V by images at the checker's own primes; returns a summary note.
std::string modular_equal(const Inputs& x, const Matrix& hint);
/// Fixed-precision enclosure text of an exact value (the format of claim.leakage.ball).
std::string ball128(const Scalar& s);

}  // namespace zb::checker
