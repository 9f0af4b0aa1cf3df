// Braid words as trees (powers kept), word files, free reduction. Fixed seeds; the random words are generated
// together with their expansion (written out letter by letter by the generator: an independent slow path).
#include <doctest/doctest.h>

#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <random>

#include "support/random.hpp"
#include "zetabraid/braid/word.hpp"
#include "zetabraid/error.hpp"

using namespace zb;

namespace {

std::vector<int> inverse_of(const std::vector<int>& w) {
  std::vector<int> r(w.rbegin(), w.rend());
  for (int& l : r) l = -l;
  return r;
}

// Random word text with letters (s<k>^e), plain integers and nested groups with powers (negative, zero), and its
// expansion.
std::string random_text(std::mt19937_64& rng, std::vector<int>* letters, int depth = 0) {
  std::string s;
  int items = 1 + static_cast<int>(rng() % 4);
  for (int i = 0; i < items; ++i) {
    int kind = static_cast<int>(rng() % (depth < 3 ? 4 : 2));
    int k = 1 + static_cast<int>(rng() % 3);
    long e = static_cast<long>(rng() % 6) - 2;
    std::vector<int> base;
    if (kind == 0) {
      s += "s" + std::to_string(k) + "^" + (e < 0 ? "(" + std::to_string(e) + ")" : std::to_string(e)) + " ";
      base = {k};
    } else if (kind == 1) {
      int l = rng() % 2 ? -k : k;
      s += std::to_string(l) + " ";
      letters->push_back(l);
      continue;
    } else {
      std::string inner = random_text(rng, &base, depth + 1);
      s += "(" + inner + ")^" + std::to_string(e) + " ";
    }
    std::vector<int> b = e < 0 ? inverse_of(base) : base;
    for (long r = 0; r < (e < 0 ? -e : e); ++r) letters->insert(letters->end(), b.begin(), b.end());
  }
  return s;
}

// Free reduction the slow way: remove the first adjacent inverse pair until there is none.
std::vector<int> reduce_slowly(std::vector<int> w) {
  for (bool again = true; again;) {
    again = false;
    for (size_t i = 0; i + 1 < w.size(); ++i)
      if (w[i] == -w[i + 1]) {
        w.erase(w.begin() + static_cast<long>(i), w.begin() + static_cast<long>(i) + 2);
        again = true;
        break;
      }
  }
  return w;
}

std::string temp_file(const std::string& text) {
  std::string path = "/tmp/zb_test_word_" + std::to_string(::getpid()) + ".txt";
  std::ofstream(path) << text;
  return path;
}

}  // namespace

TEST_CASE("word trees: expansion, size, writhe, inverse and canonical text against the generator's expansion") {
  std::mt19937_64 rng(20261203);
  for (int trial = 0; trial < 300; ++trial) {
    std::vector<int> want;
    std::string text = random_text(rng, &want);
    CAPTURE(text);
    Word w = parse_word(text);
    CHECK(w.expand() == want);
    CHECK(w.size() == want.size());
    long writhe = 0;
    int maxg = 0;
    std::string canon;
    for (int l : want) {
      writhe += l > 0 ? 1 : -1;
      maxg = std::max(maxg, std::abs(l));
      canon += (canon.empty() ? "" : " ") + std::to_string(l);
    }
    CHECK(w.writhe() == writhe);
    CHECK(w.max_generator() == maxg);
    CHECK(w.canonical() == canon);
    CHECK(w.inverse().expand() == inverse_of(want));
    CHECK(w.inverse().size() == want.size());
    CHECK(parse_word(w.canonical()).expand() == want);  // canonical text reads back
  }
}

TEST_CASE("word trees keep the powers as written") {
  Word w = parse_word("(s1 s2^-1)^300 s3^5");
  CHECK(w.size() == 605);
  REQUIRE(w.sequences()[0].size() == 2);
  CHECK(w.sequences()[0][0].letter == 0);
  CHECK(w.sequences()[0][0].exponent == 300);
  CHECK(w.sequences()[0][1].letter == 3);
  CHECK(w.sequences()[0][1].exponent == 5);
  CHECK(w.sequences().size() == 2);
  // Groups raised to the power 0 leave nothing behind: no range error from s9 in a 4-anyon word.
  Word z = parse_word("((s9)^2 s1)^0 s2");
  CHECK(z.canonical() == "2");
  CHECK(z.sequences().size() == 1);
  CHECK_NOTHROW(z.check_range(4));
  // A huge expansion is rejected on the tree, before anything is expanded.
  CHECK_THROWS_AS(parse_word("((s1 s2)^1000000000)^1000000000"), ResourceError);
  WordLimits lim;
  lim.max_letters = 10;
  CHECK_NOTHROW(parse_word("(s1 s2)^5", lim));
  CHECK_THROWS_AS(parse_word("(s1 s2)^5 s1", lim), ResourceError);
  CHECK_THROWS_AS(parse_word("((s1)^4)^3", lim), ResourceError);
  // The range check names the column of the offending letter, wherever it sits in the tree.
  CHECK_THROWS_WITH_AS(parse_word("s1 (s2 s7^3)^2").check_range(6), doctest::Contains("column 8: generator s7"),
                       InputError);
}

TEST_CASE("free reduction equals repeated removal of adjacent inverse pairs (random words, fixed seed)") {
  std::mt19937_64 rng(4711);
  for (int trial = 0; trial < 400; ++trial) {
    size_t len = rng() % 40;
    std::vector<int> letters = zbtest::random_letters(rng, {1, 2}, len);  // few generators: many cancellations
    Word w = Word::from_letters(letters);
    CHECK(free_reduce(w).expand() == reduce_slowly(letters));
  }
  CHECK(free_reduce(parse_word("s3 s3^-1")).size() == 0);
  CHECK(free_reduce(parse_word("s1 s2 s2^-1 s1^-1 s3")).canonical() == "3");
  CHECK(free_reduce(parse_word("(s1 s2)^3 (s1 s2)^-3")).size() == 0);
  CHECK(free_reduce(parse_word("s1 s2 s1")).canonical() == "1 2 1");  // negative control: nothing cancels
  // Surviving letters keep their columns.
  CHECK_THROWS_WITH_AS(free_reduce(parse_word("s1 s1^-1 s9")).check_range(4), doctest::Contains("column 10"),
                       InputError);
}

TEST_CASE("word files: comments, lines, errors naming FILE:LINE:COLUMN, directories refused") {
  std::string path = temp_file("# a comment\ns1 s2  # trailing\n(s1 s2^-1)^2\n");
  Word w = read_word_file(path);
  CHECK(w.canonical() == "1 2 1 -2 1 -2");
  std::remove(path.c_str());

  path = temp_file("s1 s2\n  s3 x4\n");
  CHECK_THROWS_WITH_AS(read_word_file(path), doctest::Contains((path + ":2:6: unexpected character 'x'").c_str()), InputError);
  std::remove(path.c_str());

  path = temp_file("s1\n\n   s7\n");
  Word far = read_word_file(path);
  CHECK_THROWS_WITH_AS(far.check_range(4), doctest::Contains((path + ":3:4: generator s7 out of range").c_str()), InputError);
  std::remove(path.c_str());

  path = temp_file("s1 # (s2\n)");  // a comment hides the '(' : the ')' is unmatched
  CHECK_THROWS_WITH_AS(read_word_file(path), doctest::Contains(":2:1: unmatched ')'"), InputError);
  std::remove(path.c_str());

  CHECK_THROWS_AS(read_word_file("/tmp"), InputError);  // a directory is not a word file
  CHECK_THROWS_AS(read_word_file("/nonexistent/zb/word.txt"), InputError);
  // '#' is a comment only in files.
  CHECK_THROWS_AS(parse_word("s1 # s2"), InputError);
}

TEST_CASE("braid word syntax") {
  CHECK(parse_word("s1 s2^-1 s3").canonical() == "1 -2 3");
  CHECK(parse_word("1 -2 3").canonical() == "1 -2 3");
  CHECK(parse_word("(s1 s2^-1)^3").canonical() == "1 -2 1 -2 1 -2");
  CHECK(parse_word("(s1 s2)^-2").canonical() == "-2 -1 -2 -1");
  CHECK(parse_word("s1^3,s2^(-2)").canonical() == "1 1 1 -2 -2");
  CHECK(parse_word("s1s2").canonical() == "1 2");
  CHECK(parse_word("((s1)^2 s2)^0 s3").canonical() == "3");
  CHECK(parse_word("").size() == 0);
  CHECK(parse_word("s1 s2 s1^-1").writhe() == 1);
  CHECK(parse_word("1 2 -3").inverse().canonical() == "3 -2 -1");
  // errors carry the column
  auto col = [](const std::string& w) -> std::string {
    try {
      parse_word(w);
    } catch (const InputError& e) {
      return std::string(e.what()).substr(0, std::string(e.what()).find(':'));
    }
    return "no error";
  };
  CHECK(col("s1 x2") == "column 4");
  CHECK(col("s1 (s2") == "column 4");
  CHECK(col("s1 s2)") == "column 6");
  CHECK(col("s0") == "column 1");
  CHECK(col("0") == "column 1");
  CHECK(col("s1^") == "column 4");
  CHECK(col("s1 3^2") == "column 5");
  CHECK_THROWS_AS(parse_word("(s1)^1000000000 (s2)^1000"), ResourceError);
  Word w = parse_word("s1  s7");
  CHECK_THROWS_WITH_AS(w.check_range(6), doctest::Contains("column 5: generator s7 out of range"), InputError);
  CHECK_NOTHROW(w.check_range(8));
}
