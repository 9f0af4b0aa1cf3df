#include "zetabraid/braid/word.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cstdlib>
#include <limits>

#include "zetabraid/io/input_file.hpp"

namespace zb {

namespace {
size_t sat_add(size_t a, size_t b) { return a > std::numeric_limits<size_t>::max() - b ? std::numeric_limits<size_t>::max() : a + b; }
size_t sat_mul(size_t a, unsigned long b) {
  if (a == 0 || b == 0) return 0;
  return a > std::numeric_limits<size_t>::max() / b ? std::numeric_limits<size_t>::max() : a * b;
}
unsigned long magnitude(long e) { return e < 0 ? 0UL - static_cast<unsigned long>(e) : static_cast<unsigned long>(e); }
}  // namespace

Word::Word() : seqs_(1), lengths_(1, 0) {}

Word Word::from_letters(const std::vector<int>& letters, const std::vector<std::uint32_t>& columns) {
  Word w;
  w.seqs_[0].reserve(letters.size());
  for (size_t i = 0; i < letters.size(); ++i)
    w.seqs_[0].push_back({letters[i], 0, 1, i < columns.size() ? columns[i] : 0});
  w.finish();
  return w;
}

std::uint32_t Word::add_sequence() {
  seqs_.emplace_back();
  lengths_.push_back(0);
  return static_cast<std::uint32_t>(seqs_.size() - 1);
}

void Word::append(std::uint32_t seq, const Item& item) { seqs_[seq].push_back(item); }

void Word::finish() {
  lengths_.assign(seqs_.size(), 0);
  for (size_t s = seqs_.size(); s-- > 0;) {  // groups refer only to later sequences
    size_t len = 0;
    for (const Item& it : seqs_[s])
      len = sat_add(len, sat_mul(it.letter ? 1 : lengths_[it.group], magnitude(it.exponent)));
    lengths_[s] = len;
  }
}

void Word::set_source(std::string name, std::vector<std::uint32_t> line_starts) {
  source_ = std::move(name);
  line_starts_ = std::move(line_starts);
}

std::string Word::where(std::uint32_t column) const {
  if (source_.empty()) return fmt::format("column {}", column);
  auto it = std::upper_bound(line_starts_.begin(), line_starts_.end(), column);
  size_t line = static_cast<size_t>(it - line_starts_.begin());
  std::uint32_t start = line ? line_starts_[line - 1] : 1;
  return fmt::format("{}:{}:{}", printable(source_), line, column - start + 1);
}

std::vector<int> Word::expand() const {
  std::vector<int> out;
  out.reserve(size());
  for_each_letter([&](int l, std::uint32_t) { out.push_back(l); });
  return out;
}

std::string Word::canonical() const {
  std::string s;
  s.reserve(std::min<size_t>(size(), size_t{1} << 28) * 3);
  bool first = true;
  for_each_letter([&](int l, std::uint32_t) {
    if (!first) s += ' ';
    first = false;
    s += std::to_string(l);
  });
  return s;
}

Word Word::inverse() const {
  Word w = *this;
  std::reverse(w.seqs_[0].begin(), w.seqs_[0].end());
  for (Item& it : w.seqs_[0]) it.exponent = -it.exponent;
  return w;
}

int Word::max_generator() const {
  int m = 0;
  for (const auto& seq : seqs_)
    for (const Item& it : seq) m = std::max(m, std::abs(it.letter));
  return m;
}

long Word::writhe() const {
  std::vector<long> w(seqs_.size(), 0);
  for (size_t s = seqs_.size(); s-- > 0;)
    for (const Item& it : seqs_[s]) w[s] += it.exponent * (it.letter ? (it.letter > 0 ? 1 : -1) : w[it.group]);
  return w[0];
}

void Word::check_range(int strands) const {
  const Item* bad = nullptr;
  for (const auto& seq : seqs_)
    for (const Item& it : seq) {
      int k = std::abs(it.letter);
      if (it.letter && (k < 1 || k > strands - 1) && (!bad || it.column < bad->column)) bad = &it;
    }
  if (!bad) return;
  int k = std::abs(bad->letter);
  if (strands < 2)
    throw InputError(fmt::format("{}: generator s{} out of range: {} anyon(s) admit no generators", where(bad->column),
                                 k, strands));
  throw InputError(fmt::format("{}: generator s{} out of range: {} anyons have generators s1..s{}", where(bad->column),
                               k, strands, strands - 1));
}

namespace {

class WordParser {
 public:
  WordParser(const std::string& t, const WordLimits& l, const std::string* file) : s_(t), lim_(l), file_(file) {
    if (file_) {
      lines_.push_back(1);
      for (size_t i = 0; i < s_.size(); ++i)
        if (s_[i] == '\n') lines_.push_back(static_cast<std::uint32_t>(i + 2));
      w_.set_source(*file_, lines_);
    }
  }

  Word parse() {
    sequence(0, 0);
    skip();
    if (p_ < s_.size()) {
      if (s_[p_] == ')') fail("unmatched ')'");
      fail(fmt::format("unexpected character '{}'", printable(std::string(1, s_[p_]))));
    }
    w_.finish();
    return std::move(w_);
  }

 private:
  [[noreturn]] void fail(const std::string& what) const { fail_at(p_, what); }
  [[noreturn]] void fail_at(size_t pos, const std::string& what) const {
    throw InputError(fmt::format("{}: {} in braid word (expected s<k>, s<k>^<power>, (<word>)^<power> or a "
                                 "signed integer)",
                                 w_.where(static_cast<std::uint32_t>(pos + 1)), what));
  }
  [[noreturn]] void too_long(size_t at) const {
    throw ResourceError(fmt::format("{}: braid word longer than {} letters", w_.where(static_cast<std::uint32_t>(at + 1)),
                                    lim_.max_letters));
  }
  bool blank(char c) const { return std::isspace(static_cast<unsigned char>(c)) || c == ','; }
  void skip() {
    while (p_ < s_.size()) {
      if (blank(s_[p_])) ++p_;
      else if (file_ && s_[p_] == '#')
        while (p_ < s_.size() && s_[p_] != '\n') ++p_;
      else break;
    }
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
  // Appends `item` (length `len` before the power) to sequence seq, whose length so far is *total.
  void add(std::uint32_t seq, const Word::Item& item, size_t len, size_t* total, size_t at) {
    size_t m = magnitude(item.exponent);
    if (len && m > lim_.max_letters / len) too_long(at);
    *total += len * m;
    if (*total > lim_.max_letters) too_long(at);
    w_.append(seq, item);
  }
  // Parses items up to ')' or the end into a new sequence; returns its expanded length.
  size_t sequence(std::uint32_t seq, int depth) {
    if (depth > lim_.max_depth) fail("parentheses nested too deeply");
    size_t total = 0;
    for (;;) {
      skip();
      if (p_ >= s_.size() || s_[p_] == ')') return total;
      size_t start = p_;
      char c = s_[p_];
      const std::uint32_t column = static_cast<std::uint32_t>(start + 1);
      if (c == 's' || c == 'S') {
        ++p_;
        long k = digits("generator index");
        if (k < 1) fail_at(start, "generator index must be at least 1");
        long e = 1;
        if (p_ < s_.size() && s_[p_] == '^') {
          ++p_;
          e = power();
        }
        if (e != 0) add(seq, {static_cast<int>(k), 0, e, column}, 1, &total, start);
      } else if (c == '(') {
        ++p_;
        const std::uint32_t child = w_.add_sequence();
        size_t len = sequence(child, depth + 1);
        if (p_ >= s_.size() || s_[p_] != ')') fail_at(start, "unclosed '('");
        ++p_;
        long e = 1;
        if (p_ < s_.size() && s_[p_] == '^') {
          ++p_;
          e = power();
        }
        if (e == 0 || len == 0) w_.drop_from(child);  // nothing to keep: no unreachable sequences
        else add(seq, {0, child, e, column}, len, &total, start);
      } else if (c == '-' || c == '+' || std::isdigit(static_cast<unsigned char>(c))) {
        int sign = 1;
        if (c == '-' || c == '+') {
          sign = c == '-' ? -1 : 1;
          ++p_;
        }
        long k = digits("generator index");
        if (k < 1) fail_at(start, "generator index must be at least 1 (0 is not a generator)");
        if (p_ < s_.size() && s_[p_] == '^') fail("a plain integer letter takes no exponent (write s3^2 or 3 3)");
        add(seq, {static_cast<int>(sign * k), 0, 1, column}, 1, &total, start);
        continue;
      } else {
        fail(fmt::format("unexpected character '{}'", printable(std::string(1, c))));
      }
      if (p_ < s_.size() && !(blank(s_[p_]) || s_[p_] == ')' || s_[p_] == '(' || s_[p_] == 's' || s_[p_] == 'S' ||
                              (file_ && s_[p_] == '#')))
        fail(fmt::format("unexpected character '{}'", printable(std::string(1, s_[p_]))));
    }
  }

  const std::string& s_;
  const WordLimits& lim_;
  const std::string* file_;
  std::vector<std::uint32_t> lines_;
  Word w_;
  size_t p_ = 0;
};

}  // namespace

void Word::drop_from(std::uint32_t seq) {
  seqs_.resize(seq);
  lengths_.resize(seq);
}

Word parse_word(const std::string& text, const WordLimits& limits) { return WordParser(text, limits, nullptr).parse(); }

Word read_word_file(const std::string& path, const WordLimits& limits) {
  std::string text = read_input_file(path, kMaxWordFileBytes, "word file");
  if (text.size() >= std::numeric_limits<std::uint32_t>::max()) throw ResourceError("word file too large");
  return WordParser(text, limits, &path).parse();
}

Word free_reduce(const Word& w) {
  std::vector<int> letters;
  std::vector<std::uint32_t> columns;
  w.for_each_letter([&](int l, std::uint32_t col) {
    if (!letters.empty() && letters.back() == -l) {
      letters.pop_back();
      columns.pop_back();
    } else {
      letters.push_back(l);
      columns.push_back(col);
    }
  });
  Word r = Word::from_letters(letters, columns);
  r.set_source(w.source(), w.line_starts());
  return r;
}

}  // namespace zb
