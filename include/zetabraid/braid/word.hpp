// Braid words: parsing (powers kept as written), canonical text, inverse, free reduction, word files.
//
// Syntax (documented in docs/certificate-format.md and the README):
//   word   := { item }                 items separated by blanks or commas (blanks optional after ')' or digits)
//   item   := letter [ '^' power ] | '(' word ')' [ '^' power ] | integer
//   letter := 's' digits               generator sigma_k (k >= 1); s3^-1 is its inverse
//   integer:= ['+'|'-'] digits         plain signed form: 3 is s3, -3 is s3^-1
//   power  := ['+'|'-'] digits | '(' ['+'|'-'] digits ')'     any integer; x^0 is the empty word,
//                                       x^-m is the inverse of x repeated m times
// Product order: the LEFTMOST letter is applied FIRST: rho(l_1 l_2 ... l_L) = rho(l_L) ... rho(l_2) rho(l_1).
//
// A Word keeps the structure the user wrote: a tree of sequences whose items are letters or groups, each with a
// nonzero exponent ((s1 s2^-1)^300 is one group item with exponent 300, not 600 letters). Whoever needs the
// letters one by one uses for_each_letter or expand(); lengths, writhe and the range check work on the tree.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "zetabraid/error.hpp"

namespace zb {

class Word {
 public:
  /// One item of a sequence: the letter `letter` (signed generator index, nonzero) or, when letter == 0, the
  /// sequence `group`; raised to the nonzero power `exponent` (x^-m is the inverse of x repeated m times).
  struct Item {
    int letter = 0;
    std::uint32_t group = 0;
    long exponent = 1;
    std::uint32_t column = 0;  ///< 1-based source position of the item (0: not from text)
  };

  /// The empty word.
  Word();
  /// A flat word from signed generator indices (columns optional, one per letter).
  static Word from_letters(const std::vector<int>& letters, const std::vector<std::uint32_t>& columns = {});

  /// Sequences of the tree; sequence 0 is the whole word. Groups refer only to later sequences.
  const std::vector<std::vector<Item>>& sequences() const { return seqs_; }
  /// Number of letters after expanding every power (saturates at SIZE_MAX).
  size_t size() const { return lengths_[0]; }
  /// Letters of sequence s after expansion (saturating).
  size_t length(std::uint32_t s) const { return lengths_[s]; }
  /// Calls f(letter, column) for every letter in application order, powers expanded.
  template <class F>
  void for_each_letter(F&& f) const {
    walk(0, false, f);
  }
  /// The letters, powers expanded (size() of them: check size() first for huge words).
  std::vector<int> expand() const;
  /// Canonical text: the expanded letters as signed integers separated by single blanks ("1 -2 3"); empty -> "".
  std::string canonical() const;
  /// Inverse word (items reversed, exponents negated; groups shared, so the tree stays the same size).
  Word inverse() const;
  /// Largest |k| occurring (0 for the empty word).
  int max_generator() const;
  /// Sum of the signs of the expanded letters (the writhe of the closure).
  long writhe() const;
  /// Throws InputError naming the position (column, or file:line:column for words read from a file) when some
  /// |k| is outside 1..strands-1.
  void check_range(int strands) const;
  /// Where a 1-based source position is: "column C", or "FILE:LINE:COL" for words read by read_word_file.
  std::string where(std::uint32_t column) const;
  /// The file a word was read from ("" otherwise) and the 1-based positions where its lines start.
  const std::string& source() const { return source_; }
  const std::vector<std::uint32_t>& line_starts() const { return line_starts_; }

  // Building (the parser and the library's own constructions).
  std::uint32_t add_sequence();
  void append(std::uint32_t seq, const Item& item);
  /// Recomputes the expanded lengths (call after building).
  void finish();
  void set_source(std::string name, std::vector<std::uint32_t> line_starts);
  /// Removes sequences seq, seq + 1, ... (a group being built that turned out empty or raised to the power 0).
  void drop_from(std::uint32_t seq);

 private:
  template <class F>
  void walk(std::uint32_t s, bool inverse, F& f) const {
    const std::vector<Item>& items = seqs_[s];
    for (size_t x = 0; x < items.size(); ++x) {
      const Item& it = items[inverse ? items.size() - 1 - x : x];
      const bool inv = inverse != (it.exponent < 0);
      const unsigned long m = static_cast<unsigned long>(it.exponent < 0 ? -it.exponent : it.exponent);
      for (unsigned long r = 0; r < m; ++r) {
        if (it.letter) f(inv ? -it.letter : it.letter, it.column);
        else walk(it.group, inv, f);
      }
    }
  }
  std::vector<std::vector<Item>> seqs_;
  std::vector<size_t> lengths_;
  std::string source_;                     // file name for messages ("" for text given directly)
  std::vector<std::uint32_t> line_starts_;  // 1-based positions where lines start (file words)
};

struct WordLimits {
  size_t max_letters = 50'000'000;  ///< after expanding powers; beyond: ResourceError
  int max_depth = 256;              ///< parenthesis nesting
};

/// Parses a braid word; throws InputError "column C: ..." on malformed input, ResourceError when the expansion
/// would exceed limits.max_letters (decided on the tree: nothing is expanded).
Word parse_word(const std::string& text, const WordLimits& limits = {});

/// Reads a word file (at most kMaxWordFileBytes, regular files only: io/input_file.hpp): blanks and newlines
/// separate items, '#' starts a comment up to the end of the line. Errors name FILE:LINE:COLUMN.
Word read_word_file(const std::string& path, const WordLimits& limits = {});

/// Free reduction: the word with every adjacent pair k, -k cancelled until none is left (stack-based, linear in
/// the expanded length; the result is flat and keeps the surviving letters' columns).
Word free_reduce(const Word& w);

}  // namespace zb
