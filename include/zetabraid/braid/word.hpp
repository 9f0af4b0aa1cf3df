// Braid words: parsing, canonical text, inverse.
//
// Syntax (documented in docs/certificate-format.md and the README):
//   word   := { item }                 items separated by blanks or commas (blanks optional after ')' or digits)
//   item   := letter [ '^' power ] | '(' word ')' [ '^' power ] | integer
//   letter := 's' digits               generator sigma_k (k >= 1); s3^-1 is its inverse
//   integer:= ['+'|'-'] digits         plain signed form: 3 is s3, -3 is s3^-1
//   power  := ['+'|'-'] digits | '(' ['+'|'-'] digits ')'     any integer; x^0 is the empty word,
//                                       x^-m is the inverse of x repeated m times
// Product order: the LEFTMOST letter is applied FIRST: rho(l_1 l_2 ... l_L) = rho(l_L) ... rho(l_2) rho(l_1).
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "zetabraid/error.hpp"

namespace zb {

/// A braid word as a list of signed generator indices (k means sigma_k, -k its inverse), in application order,
/// with the 1-based source column of every letter (for error messages).
struct Word {
  std::vector<int> letters;
  std::vector<std::uint32_t> columns;

  size_t size() const { return letters.size(); }
  /// Canonical text: signed integers separated by single blanks ("1 -2 3"); empty word -> "".
  std::string canonical() const;
  /// Inverse word (reversed, signs flipped).
  Word inverse() const;
  /// Largest |k| occurring (0 for the empty word).
  int max_generator() const;
  /// Sum of the signs (the writhe of the closure).
  long writhe() const;
  /// Throws InputError naming the column when some |k| is outside 1..strands-1.
  void check_range(int strands) const;
};

struct WordLimits {
  size_t max_letters = 50'000'000;  ///< after expanding powers; beyond: ResourceError
  int max_depth = 256;              ///< parenthesis nesting
};

/// Parses a braid word; throws InputError "column C: ..." on malformed input.
Word parse_word(const std::string& text, const WordLimits& limits = {});

}  // namespace zb
