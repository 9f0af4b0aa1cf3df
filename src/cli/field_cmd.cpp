// `zetabraid field eval`: exact evaluation of expressions in Q(zeta_N) and its square-root extensions.
#include <fmt/format.h>

#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/io/input_file.hpp"

namespace zb::cli {

namespace {

// A positive decimal integer option, read as text so that "-5" is refused instead of wrapping around
// (CLI11 reads unsigned options through strtoull, which accepts a minus sign).
unsigned long positive_option(const std::string& text, const char* option, const char* what, unsigned long max) {
  bool digits = !text.empty() && text.size() <= 19 && text.find_first_not_of("0123456789") == std::string::npos;
  unsigned long v = digits ? std::stoul(text) : 0;
  if (!digits || v == 0 || v > max)
    throw InputError(fmt::format("{} '{}': {} must be a positive integer (at most {})", option, printable(text),
                                 what, max));
  return v;
}

}  // namespace

void add_field_commands(CLI::App& app, Action& action) {
  auto* field = app.add_subcommand("field", "exact arithmetic in cyclotomic fields");
  field->require_subcommand(1);
  auto* eval = field->add_subcommand("eval", "evaluate exact expressions: canonical form and a certified enclosure");
  struct Opts {
    std::string conductor;
    std::vector<std::string> exprs;
    bool json = false;
    long digits = 20;
    std::string max_bits;
  };
  auto o = std::make_shared<Opts>();
  eval->add_option("--conductor,-N", o->conductor, "N of Q(zeta_N); zeta = exp(2*pi*i/N)")->required();
  eval->add_option("expr", o->exprs, "expressions (see README: Exact expressions)")->required();
  eval->add_flag("--json", o->json, "one JSON object per value: {expr, exact, ball}");
  eval->add_option("--digits", o->digits, "significant digits of the enclosure")->check(CLI::Range(1, 100000));
  eval->add_option("--max-bits", o->max_bits,
                   fmt::format("size limit of every exact value, in bits (default {})", kDefaultMaxValueBits));
  eval->callback([o, &action] {
    action = [o] {
      FieldPtr f = Field::make(positive_option(o->conductor, "--conductor", "the conductor", 1UL << 40));
      ExpressionLimits limits;
      if (!o->max_bits.empty())
        limits.max_bits = static_cast<long>(positive_option(o->max_bits, "--max-bits", "the bit limit", 1UL << 40));
      long prec = static_cast<long>(o->digits * 3.33) + 16;
      acb_t b;
      acb_init(b);
      std::string out;
      try {
        for (const std::string& e : o->exprs) {
          Scalar v = parse_expression(e, f, limits);
          v.ball(b, prec);
          std::string exact = v.str(), ball = ball_str(b, o->digits);
          if (o->json)
            out += nlohmann::json{{"expr", e}, {"exact", exact}, {"ball", ball}}.dump() + "\n";
          else
            out += fmt::format("{}\n  enclosure: {}\n", exact, ball);
        }
      } catch (...) {
        acb_clear(b);
        throw;
      }
      acb_clear(b);
      fmt::print("{}", out);
      return 0;
    };
  });
}

}  // namespace zb::cli
