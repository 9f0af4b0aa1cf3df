// Which entry is wrong (private to src/model/): every pentagon and hexagon equation written out as a list of
// terms over named symbols (F entries and R-symbols), evaluated with plain Scalar arithmetic. Used
//   * when the file lacks some admissible symbol: equations that need it are skipped ("not checked") instead of
//     being evaluated with a made-up value, and the symbol is reported once by name;
//   * when an equation fails: every symbol is ranked by the failing (and passing) equations involving it, and
//     the top suspects get a one-entry repair: the symbol becomes an unknown x, a failing equation linear in x
//     is solved exactly, and the value is kept only when every equation involving the symbol then holds exactly
//     (and, for F, its block stays normalised, invertible and, when claimed, unitary; for R, nonzero and, when
//     claimed, of modulus 1).
// This is the slow, plain path; the fast drivers (equations.cpp) stay the ones that check complete data.
#pragma once
#include <array>
#include <string>
#include <vector>

#include "zetabraid/model/check.hpp"

namespace zb::blame {

enum class EqKind { kPentagon, kHexagon, kHexagonReverse };

/// One F entry or R-symbol that some equation involves.
struct Symbol {
  bool is_r = false;
  std::array<int, 6> key{};    ///< a, b, c, d, e, f (F) or a, b, c (R)
  bool given = false;          ///< listed by the file (or filled by f_unlisted / r_unlisted)
  const Scalar* value = nullptr;  ///< nullptr when zero or not given
  int line = 0;
};

/// sign * prod value(id)^power (power +-1).
struct Term {
  int sign = 1;
  std::vector<std::pair<int, int>> factors;  ///< (symbol id, power)
};

struct Equation {
  EqKind kind;
  std::array<int, 9> labels{};  ///< pentagon: a b c d e f g k l; hexagon: a b c d e g
  std::vector<Term> terms;
  std::vector<int> symbols;     ///< distinct symbol ids involved, ascending
  bool missing = false;         ///< needs a symbol the file does not give
};

struct EquationSet {
  std::vector<Symbol> symbols;
  std::vector<Equation> eqs;
  long terms = 0;
};

/// Every pentagon and (with R-symbols) hexagon equation, in the order of the fast drivers. ResourceError when the
/// model has more than `max_terms` terms in all.
EquationSet enumerate_equations(const Model& m, long max_terms);

/// The kinds' check names and conditions, as the fast drivers write them.
std::string check_name(EqKind k);
std::string equation_where(const Model& m, const Equation& e);

/// True when some admissible F entry (or, with R-symbols, R-symbol) is not given by the file.
bool has_missing_symbols(const Model& m);

enum Status : signed char { kPass = 0, kFail = 1, kNotChecked = 2 };

/// The residual (left side minus right side) of eq; symbol `sub` (when >= 0) takes the value *x instead of its own.
/// A factor of value zero makes its term zero (R-inverse terms of a zero R were left out when enumerating).
Scalar residual(const Model& m, const EquationSet& E, const Equation& eq, int sub = -1, const Scalar* x = nullptr);

/// Pass / fail / not checked for every equation (parallel over thread_count(threads) workers).
std::vector<Status> evaluate(const Model& m, const EquationSet& E, int threads);

/// The pentagon and hexagon counts, failures (at most opt.max_failures per check) and missing symbols of an
/// evaluated set, appended to rep (used instead of the fast drivers when symbols are missing).
void report_equations(const Model& m, const CheckOptions& opt, const EquationSet& E, const std::vector<Status>& st,
                      CheckReport& rep);

/// Ranks suspects, tries one-entry repairs for the first opt.max_suspects, and adds the source lines of the
/// symbols involved to every listed pentagon/hexagon failure.
void find_suspects(const Model& m, const CheckOptions& opt, const EquationSet& E, const std::vector<Status>& st,
                   CheckReport& rep);

/// "F^{a b c}_d[e,f]" or "R^{a b}_c".
std::string symbol_name(const Model& m, const Symbol& s);

}  // namespace zb::blame
