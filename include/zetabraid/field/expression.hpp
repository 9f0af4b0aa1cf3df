// The exact-expression syntax (documented in README.md, "Exact expressions").
//
//   expr   := ['+'|'-'] term { ('+'|'-') term }
//   term   := factor { ('*'|'/') factor }
//   factor := ['+'|'-'] power
//   power  := atom [ '^' integer ]          integer: optionally signed, optionally in parentheses
//   atom   := integer | 'zeta' | 'i' | 'sqrt(' expr ')' | 'conj(' expr ')' | 'exp(' phase ')' | '(' expr ')'
//   phase  := a product/quotient/sum whose value is r*pi*i with r rational, e.g. 2*pi*i*3/20
//
// 'zeta' is exp(2*pi*i/N). exp(2*pi*i*p/q) is accepted when it lies in Q(zeta_N) (q divides N, or 2N for odd N).
#pragma once
#include <map>
#include <string>

#include "zetabraid/error.hpp"
#include "zetabraid/field/scalar.hpp"

namespace zb {

/// A malformed or unsupported expression; column() is 1-based.
class ExpressionError : public InputError {
 public:
  ExpressionError(const std::string& what, size_t column)
      : InputError("column " + std::to_string(column) + ": " + what), column_(column), message_(what) {}
  size_t column() const { return column_; }
  /// The message without the "column C: " prefix (for callers that give their own location).
  const std::string& message() const { return message_; }

 private:
  size_t column_;
  std::string message_;
};

/// Deepest nesting the parser accepts: each '(' (also of sqrt( conj( exp( and of an exponent) and each unary sign
/// counts one level. Used by the check and its message (README, "Limits").
inline constexpr int kMaxExpressionDepth = 256;

/// Default bound on the size of every value the parser produces, intermediate results included: the sum of the
/// bits of all stored numerator coefficients and denominators (Scalar::size_bits), 2^22 bits = 512 KiB.
inline constexpr long kDefaultMaxValueBits = 1L << 22;

struct ExpressionLimits {
  size_t max_length = 1 << 20;             ///< characters
  int max_depth = kMaxExpressionDepth;     ///< nesting of parentheses and unary signs
  long max_exponent = 100000;              ///< |e| in x^e
  /// Bound on Scalar::size_bits of every value (and every intermediate value) of an expression; powers and
  /// inverses are estimated before they are computed. Exceeding it throws ResourceError naming the limit.
  long max_bits = kDefaultMaxValueBits;
};

/// Parses and evaluates text in field f. Throws ExpressionError (an InputError) on malformed input and
/// ResourceError ("column C: ... more than the limit of B bits ...") when a value would exceed limits.max_bits.
Scalar parse_expression(const std::string& text, const FieldPtr& f, const ExpressionLimits& limits = {});

/// As above, with named constants: an identifier that is not built in (zeta, i, sqrt, conj, exp, pi) is looked
/// up in names (values must belong to f). Used by the model loader for declared square roots and constants.
Scalar parse_expression(const std::string& text, const FieldPtr& f, const std::map<std::string, Scalar>& names,
                        const ExpressionLimits& limits = {});

}  // namespace zb
