// IndexedWord: the one word type the product engines take (see word_product.hpp).
#include <fmt/format.h>

#include <limits>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/word_product.hpp"

namespace zb {

namespace {
size_t sat_add(size_t a, size_t b) { return a > std::numeric_limits<size_t>::max() - b ? std::numeric_limits<size_t>::max() : a + b; }
size_t sat_mul(size_t a, std::uint64_t b) {
  if (a == 0 || b == 0) return 0;
  return a > std::numeric_limits<size_t>::max() / b ? std::numeric_limits<size_t>::max() : a * static_cast<size_t>(b);
}
}  // namespace

IndexedWord::IndexedWord() : seqs_(1), lengths_(1, 0) {}

IndexedWord IndexedWord::from_letters(const std::vector<const Matrix*>& letters) {
  IndexedWord w;
  for (const Matrix* m : letters) w.append_letter(0, w.letter(m));
  w.finish();
  return w;
}

std::uint32_t IndexedWord::letter(const Matrix* m) {
  if (!m) throw MathError("null letter in a word product");
  // Braid words have few distinct letters: a linear scan of them (a hash map beyond 32).
  if (letters_.size() <= 32) {
    for (size_t q = 0; q < letters_.size(); ++q)
      if (letters_[q] == m) return static_cast<std::uint32_t>(q);
  } else {
    auto it = index_.find(m);
    if (it != index_.end()) return it->second;
  }
  if (letters_.size() >= std::numeric_limits<std::uint32_t>::max()) throw ResourceError("too many distinct letters");
  const auto q = static_cast<std::uint32_t>(letters_.size());
  letters_.push_back(m);
  index_.emplace(m, q);
  return q;
}

std::uint32_t IndexedWord::add_sequence() {
  seqs_.emplace_back();
  lengths_.push_back(0);
  return static_cast<std::uint32_t>(seqs_.size() - 1);
}

void IndexedWord::append_letter(std::uint32_t seq, std::uint32_t index, std::uint64_t repeat) {
  if (repeat == 0) return;
  auto& items = seqs_[seq];
  if (!items.empty() && !items.back().group && items.back().index == index && items.back().repeat <= UINT64_MAX - repeat)
    items.back().repeat += repeat;
  else
    items.push_back({index, false, repeat});
}

void IndexedWord::append_group(std::uint32_t seq, std::uint32_t group, std::uint64_t repeat) {
  if (group <= seq) throw MathError("IndexedWord: a group must refer to a later sequence");
  if (repeat == 0 || seqs_[group].empty()) return;
  seqs_[seq].push_back({group, true, repeat});
}

void IndexedWord::finish() {
  const size_t ns = seqs_.size();
  lengths_.assign(ns, 0);
  std::vector<size_t> in(ns, 0), out(ns, 0);
  const FieldPtr& f = letters_.empty() ? FieldPtr() : letters_.front()->field();
  for (const Matrix* m : letters_)
    if (m->field() != f) throw MathError("letters of one word from different fields");
  for (size_t s = ns; s-- > 0;) {
    size_t len = 0, pos = 0;
    for (const Item& it : seqs_[s]) {
      size_t a, b;  // columns, rows of the item
      if (it.group) {
        if (it.index <= s || it.index >= ns) throw MathError("IndexedWord: bad group reference");
        a = in[it.index];
        b = out[it.index];
        len = sat_add(len, sat_mul(lengths_[it.index], it.repeat));
      } else {
        if (it.index >= letters_.size()) throw MathError("IndexedWord: bad letter index");
        a = letters_[it.index]->cols();
        b = letters_[it.index]->rows();
        len = sat_add(len, static_cast<size_t>(it.repeat));
      }
      if (it.repeat > 1 && a != b)
        throw MathError(fmt::format("a non-square factor ({}x{}) raised to the power {}", b, a, it.repeat));
      if (pos > 0 && a != out[s])
        throw MathError(fmt::format("letter {} ({}x{}) does not compose with the factor before it ({} rows)",
                                    sat_add(pos, 1), b, a, out[s]));
      if (pos == 0) in[s] = a;
      out[s] = b;
      pos = sat_add(pos, 1);
    }
    lengths_[s] = len;
  }
  cols_ = in[0];
  rows_ = out[0];
}

std::vector<std::uint32_t> IndexedWord::expand() const {
  std::vector<std::uint32_t> out;
  out.reserve(length());
  for_each([&](std::uint32_t i) { out.push_back(i); });
  return out;
}

std::vector<const Matrix*> IndexedWord::expand_pointers() const {
  std::vector<const Matrix*> out;
  out.reserve(length());
  for_each([&](std::uint32_t i) { out.push_back(letters_[i]); });
  return out;
}

}  // namespace zb
