#include "zetabraid/braid/word.hpp"

#include <fmt/format.h>

#include <cctype>
#include <cstdlib>

namespace zb {

std::string Word::canonical() const {
  std::string s;
  s.reserve(letters.size() * 3);
  for (size_t i = 0; i < letters.size(); ++i) {
    if (i) s += ' ';
    s += std::to_string(letters[i]);
  }
  return s;
}

Word Word::inverse() const {
  Word w;
  w.letters.assign(letters.rbegin(), letters.rend());
  w.columns.assign(columns.rbegin(), columns.rend());
  for (int& l : w.letters) l = -l;
  return w;
}

int Word::max_generator() const {
  int m = 0;
  for (int l : letters) m = std::max(m, std::abs(l));
  return m;
}

long Word::writhe() const {
  long w = 0;
  for (int l : letters) w += l > 0 ? 1 : -1;
  return w;
}

void Word::check_range(int strands) const {
  for (size_t i = 0; i < letters.size(); ++i) {
    int k = std::abs(letters[i]);
    if (k < 1 || k > strands - 1) {
      unsigned col = i < columns.size() ? columns[i] : 0;
      if (strands < 2)
        throw InputError(fmt::format("column {}: generator s{} out of range: {} anyon(s) admit no generators", col, k,
                                     strands));
      throw InputError(fmt::format("column {}: generator s{} out of range: {} anyons have generators s1..s{}", col, k,
                                   strands, strands - 1));
    }
  }
}

namespace {

class WordParser {
 public:
  WordParser(const std::string& t, const WordLimits& l) : s_(t), lim_(l) {}

  Word parse() {
    Word w = sequence(0);
    skip();
    if (p_ < s_.size()) {
      if (s_[p_] == ')') fail("unmatched ')'");
      fail(fmt::format("unexpected character '{}'", s_[p_]));
    }
    return w;
  }

 private:
  [[noreturn]] void fail(const std::string& what) const { fail_at(p_, what); }
  [[noreturn]] void fail_at(size_t pos, const std::string& what) const {
    throw InputError(fmt::format("column {}: {} in braid word (expected s<k>, s<k>^<power>, (<word>)^<power> or a "
                                 "signed integer)",
                                 pos + 1, what));
  }
  void skip() {
    while (p_ < s_.size() && (std::isspace(static_cast<unsigned char>(s_[p_])) || s_[p_] == ',')) ++p_;
  }
  long digits(const char* what) {
    size_t start = p_;
    long v = 0;
    while (p_ < s_.size() && std::isdigit(static_cast<unsigned char>(s_[p_]))) {
      v = v * 10 + (s_[p_] - '0');
      if (v > 1'000'000'000L) fail_at(start, fmt::format("{} too large", what));
      ++p_;
    }
    if (p_ == start) fail(fmt::format("expected digits ({})", what));
    return v;
  }
  long power() {
    // after '^'
    bool paren = p_ < s_.size() && s_[p_] == '(';
    if (paren) ++p_;
    int sign = 1;
    if (p_ < s_.size() && (s_[p_] == '-' || s_[p_] == '+')) sign = s_[p_++] == '-' ? -1 : 1;
    long v = sign * digits("exponent");
    if (paren) {
      if (p_ >= s_.size() || s_[p_] != ')') fail("expected ')' closing the exponent");
      ++p_;
    }
    return v;
  }
  void append_power(Word& out, const Word& base, long e, size_t at) {
    if (e == 0) return;
    const Word b = e > 0 ? base : base.inverse();
    unsigned long m = static_cast<unsigned long>(e > 0 ? e : -e);
    if (b.size() && m > lim_.max_letters / b.size() + 1)
      throw ResourceError(fmt::format("column {}: braid word longer than {} letters", at + 1, lim_.max_letters));
    for (unsigned long r = 0; r < m; ++r) {
      out.letters.insert(out.letters.end(), b.letters.begin(), b.letters.end());
      out.columns.insert(out.columns.end(), b.columns.begin(), b.columns.end());
      if (out.size() > lim_.max_letters)
        throw ResourceError(fmt::format("column {}: braid word longer than {} letters", at + 1, lim_.max_letters));
    }
  }
  Word sequence(int depth) {
    if (depth > lim_.max_depth) fail("parentheses nested too deeply");
    Word w;
    for (;;) {
      skip();
      if (p_ >= s_.size() || s_[p_] == ')') return w;
      size_t start = p_;
      char c = s_[p_];
      Word item;
      if (c == 's' || c == 'S') {
        ++p_;
        long k = digits("generator index");
        if (k < 1) fail_at(start, "generator index must be at least 1");
        item.letters.push_back(static_cast<int>(k));
        item.columns.push_back(static_cast<std::uint32_t>(start + 1));
      } else if (c == '(') {
        ++p_;
        item = sequence(depth + 1);
        if (p_ >= s_.size() || s_[p_] != ')') fail_at(start, "unclosed '('");
        ++p_;
      } else if (c == '-' || c == '+' || std::isdigit(static_cast<unsigned char>(c))) {
        int sign = 1;
        if (c == '-' || c == '+') {
          sign = c == '-' ? -1 : 1;
          ++p_;
        }
        long k = digits("generator index");
        if (k < 1) fail_at(start, "generator index must be at least 1 (0 is not a generator)");
        item.letters.push_back(static_cast<int>(sign * k));
        item.columns.push_back(static_cast<std::uint32_t>(start + 1));
        if (p_ < s_.size() && s_[p_] == '^') fail("a plain integer letter takes no exponent (write s3^2 or 3 3)");
        w.letters.insert(w.letters.end(), item.letters.begin(), item.letters.end());
        w.columns.insert(w.columns.end(), item.columns.begin(), item.columns.end());
        continue;
      } else {
        fail(fmt::format("unexpected character '{}'", c));
      }
      long e = 1;
      if (p_ < s_.size() && s_[p_] == '^') {
        ++p_;
        e = power();
      }
      append_power(w, item, e, start);
      if (p_ < s_.size() && !(std::isspace(static_cast<unsigned char>(s_[p_])) || s_[p_] == ',' || s_[p_] == ')' ||
                              s_[p_] == '(' || s_[p_] == 's' || s_[p_] == 'S'))
        fail(fmt::format("unexpected character '{}'", s_[p_]));
    }
  }

  const std::string& s_;
  const WordLimits& lim_;
  size_t p_ = 0;
};

}  // namespace

Word parse_word(const std::string& text, const WordLimits& limits) { return WordParser(text, limits).parse(); }

}  // namespace zb
