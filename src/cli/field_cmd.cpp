// `zetabraid field eval`: exact evaluation of expressions in Q(zeta_N) and its square-root extensions.
#include <fmt/format.h>

#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "zetabraid/field/expression.hpp"

namespace zb::cli {

void add_field_commands(CLI::App& app, Action& action) {
  auto* field = app.add_subcommand("field", "exact arithmetic in cyclotomic fields");
  field->require_subcommand(1);
  auto* eval = field->add_subcommand("eval", "evaluate exact expressions: canonical form and a certified enclosure");
  struct Opts {
    unsigned long conductor = 0;
    std::vector<std::string> exprs;
    bool json = false;
    long digits = 20;
  };
  auto o = std::make_shared<Opts>();
  eval->add_option("--conductor,-N", o->conductor, "N of Q(zeta_N); zeta = exp(2*pi*i/N)")->required();
  eval->add_option("expr", o->exprs, "expressions (see README: Exact expressions)")->required();
  eval->add_flag("--json", o->json, "one JSON object per value: {expr, exact, ball}");
  eval->add_option("--digits", o->digits, "significant digits of the enclosure")->check(CLI::Range(1, 100000));
  eval->callback([o, &action] {
    action = [o] {
      FieldPtr f = Field::make(o->conductor);
      long prec = static_cast<long>(o->digits * 3.33) + 16;
      acb_t b;
      acb_init(b);
      std::string out;
      try {
        for (const std::string& e : o->exprs) {
          Scalar v = parse_expression(e, f);
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
