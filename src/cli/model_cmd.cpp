// `zetabraid model check|info|compare|transform|make`: front end only; the mathematics lives in src/model/.
#include <fmt/format.h>
#include <unistd.h>

#include <chrono>
#include <numeric>
#include <optional>

#include "commands.hpp"
#include "zetabraid/detail/parallel.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/model/families.hpp"
#include "zetabraid/model/load.hpp"
#include "zetabraid/model/render.hpp"
#include "zetabraid/model/transform.hpp"

namespace zb::cli {

namespace {

// Progress on stderr, only on a terminal and only once a stage has run for more than a second.
struct Progress {
  bool tty = isatty(2) != 0;
  std::chrono::steady_clock::time_point start = std::chrono::steady_clock::now();
  bool shown = false;
  double last = 0;
  void operator()(const std::string& stage, double frac) {
    if (!tty) return;
    double el = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    if (el < 1.0 || el - last < 0.25) return;
    last = el;
    fmt::print(stderr, "\r  checking {:<16} {:5.1f}%  ({:.0f} s)", stage, 100.0 * frac, el);
    std::fflush(stderr);
    shown = true;
  }
  void finish() {
    if (shown) fmt::print(stderr, "\r{:60}\r", "");
  }
};

int run_check(const std::string& path, bool as_json, std::optional<int> threads) {
  CheckOptions opt;
  opt.threads = requested_thread_count(threads);
  Model m = load_model(path);
  auto prog = std::make_shared<Progress>();
  opt.progress = [prog](const std::string& s, double f) { (*prog)(s, f); };
  CheckReport rep = check_model(m, opt);
  prog->finish();
  fmt::print("{}", as_json ? check_report_json(m, path, rep) + "\n" : check_report_text(m, path, rep));
  return rep.ok ? kExitOk : kExitClaimFalse;
}

int run_compare(const std::string& pa, const std::string& pb, bool as_json, bool mirror, bool galois,
                const std::string& out) {
  Model a = load_model(pa), b = load_model(pb);
  CompareOptions opt;
  opt.try_mirror = mirror;
  opt.try_galois = galois;
  CompareResult r = compare_models(a, b, opt);
  std::string json = compare_json(r, pa, pb);
  if (!out.empty()) write_file_atomic(out, json + "\n");
  fmt::print("{}", as_json ? json + "\n" : compare_text(r, pa, pb));
  return r.verdict == CompareVerdict::kNotEquivalent ? kExitClaimFalse : kExitOk;
}

struct TransformOpts {
  std::string file, out = "-", relabel, galois_signs;
  std::uint64_t seed = 0;
  long galois = 1;
  bool mirror = false, invert_f = false, transpose_f = false;
};

// --galois K [--galois-signs "+-..."]: checked here so that bad values are input errors.
Model apply_galois_option(const Model& m, const TransformOpts& o, std::string* what) {
  const long n = static_cast<long>(m.field->conductor());
  if (std::gcd(((o.galois % n) + n) % n, n) != 1)
    throw InputError(fmt::format("--galois: {} is not prime to the conductor {} of the model's field", o.galois, n));
  const int nrad = m.field->radicand_count();
  RadicalMask signs = 0;
  if (!o.galois_signs.empty()) {
    if (static_cast<int>(o.galois_signs.size()) != nrad || o.galois_signs.find_first_not_of("+-") != std::string::npos)
      throw InputError(fmt::format("--galois-signs: expected one '+' or '-' per square-root radicand ({} here), found "
                                   "\"{}\"", nrad, printable(o.galois_signs)));
    for (int j = 0; j < nrad; ++j)
      if (o.galois_signs[static_cast<size_t>(j)] == '-') signs |= RadicalMask(1) << j;
  }
  *what += fmt::format(" --galois {}", o.galois);
  if (!o.galois_signs.empty()) *what += fmt::format(" --galois-signs {}", o.galois_signs);
  return galois_model(m, o.galois, signs);
}

int run_transform(const TransformOpts& o, bool gauge, bool galois) {
  Model m = load_model(o.file);
  std::string what;
  if (gauge) {
    m = apply_gauge(m, random_gauge(m, o.seed));
    what += fmt::format(" --gauge-seed {}", o.seed);
  }
  if (!o.relabel.empty()) {
    std::vector<int> perm;
    std::vector<std::string> names;
    parse_relabeling(m, o.relabel, &perm, &names);
    m = relabel_model(m, perm, names);
    what += fmt::format(" --relabel \"{}\"", o.relabel);
  }
  if (o.mirror) {
    m = mirror_model(m);
    what += " --mirror";
  }
  if (!galois && !o.galois_signs.empty()) throw InputError("model transform: --galois-signs needs --galois");
  if (galois) m = apply_galois_option(m, o, &what);
  if (o.invert_f || o.transpose_f) {
    if (o.invert_f) m = invert_f_blocks(m), what += " --invert-f";
    if (o.transpose_f) m = transpose_f_blocks(m), what += " --transpose-f";
    fmt::print(stderr, "note: with{}{} the output is generally NOT a consistent model in zetabraid's convention; it is "
                       "how the data look printed in another convention\n",
               o.invert_f ? " --invert-f" : "", o.transpose_f ? " --transpose-f" : "");
  }
  if (what.empty())
    throw InputError("model transform: give --gauge-seed, --relabel, --mirror, --galois, --invert-f or --transpose-f");
  m.source = fmt::format("zetabraid model transform{} of {} ({})", what, o.file, m.source);
  write_file_atomic(o.out, model_to_toml(m));
  return kExitOk;
}

}  // namespace

void add_model_commands(CLI::App& app, Action& action) {
  auto* model = app.add_subcommand("model", "anyon models: consistency checks, invariants, built-in families");
  model->require_subcommand(1);

  {
    auto* cmd = model->add_subcommand("check", "check every consistency equation of a model file exactly");
    struct Opts {
      std::string file;
      bool json = false;
      int threads = 0;
    };
    auto o = std::make_shared<Opts>();
    cmd->add_option("file", o->file, "model file (TOML, see docs/model-format.md)")->required();
    cmd->add_flag("--json", o->json, "one JSON object: ok, checks {name: {count, failed}}, failures");
    cmd->add_option("--threads", o->threads, "worker threads (default: all cores, at most 8)");
    cmd->callback([o, cmd, &action] {
      action = [o, cmd] {
        return run_check(o->file, o->json, cmd->count("--threads") ? std::optional<int>(o->threads) : std::nullopt);
      };
    });
  }
  {
    auto* cmd = model->add_subcommand("info", "exact invariants: dimensions, twists, S, T, indicators, c mod 8");
    struct Opts {
      std::string file;
      bool json = false;
      long digits = 15;
      bool unchecked = false;
    };
    auto o = std::make_shared<Opts>();
    cmd->add_option("file", o->file, "model file")->required();
    cmd->add_flag("--unchecked", o->unchecked,
                  "print invariants even when model check fails (each marked as computed from unverified data)");
    cmd->add_flag("--json", o->json, "one JSON object; every number as {exact, ball}");
    cmd->add_option("--digits", o->digits, "digits of the enclosures")->check(CLI::Range(1, 10000));
    cmd->callback([o, &action] {
      action = [o] {
        Model m = load_model(o->file);
        if (!o->unchecked) {
          // Invariants of inconsistent data mean nothing: refuse unless --unchecked.
          CheckOptions copt;
          copt.max_failures = 1;
          copt.max_suspects = 0;
          CheckReport rep = check_model(m, copt);
          if (!rep.ok) {
            fmt::print(stderr, "{}", model_info_refusal(m, o->file, rep));
            return kExitClaimFalse;
          }
        }
        Invariants inv = compute_invariants(m, o->digits);
        const bool verified = !o->unchecked;
        fmt::print("{}", o->json ? invariants_json(m, inv, o->digits, verified) + "\n"
                                 : invariants_text(m, inv, o->digits, verified));
        return inv.verlinde_ok ? kExitOk : kExitClaimFalse;
      };
    });
  }
  {
    auto* cmd = model->add_subcommand(
        "compare", "decide exactly whether two model files are the same up to gauge and relabelling (or mirror)");
    struct Opts {
      std::string a, b, out;
      bool json = false, no_mirror = false, galois = false;
    };
    auto o = std::make_shared<Opts>();
    cmd->add_option("a", o->a, "model file A")->required();
    cmd->add_option("b", o->b, "model file B")->required();
    cmd->add_flag("--json", o->json, "one JSON object: verdict, relabeling, gauge, differs");
    cmd->add_option("--out", o->out, "also write the JSON result to this file");
    cmd->add_flag("--no-mirror", o->no_mirror, "do not compare B with the mirror (complex conjugate) of A");
    cmd->add_flag("--galois", o->galois, "when not equivalent (nor mirror): also compare B with every Galois conjugate of A");
    cmd->callback([o, &action] {
      action = [o] { return run_compare(o->a, o->b, o->json, !o->no_mirror, o->galois, o->out); };
    });
  }
  {
    auto* cmd = model->add_subcommand("transform", "write a gauge-transformed, relabelled or mirrored copy of a model");
    auto o = std::make_shared<TransformOpts>();
    cmd->add_option("file", o->file, "model file")->required();
    cmd->add_option("--gauge-seed", o->seed, "apply a random exact gauge (small rationals times roots of unity)");
    cmd->add_option("--relabel", o->relabel, "\"a:b,c:d\": label a is called b afterwards");
    cmd->add_flag("--mirror", o->mirror, "complex-conjugate every F and R");
    cmd->add_option("--galois", o->galois,
                    "apply the Galois automorphism zeta -> zeta^K (K prime to the conductor) to every F and R");
    cmd->add_option("--galois-signs", o->galois_signs,
                    "with --galois: '+' or '-' per square-root radicand, sqrt(d_j) -> +-sqrt(sigma_K(d_j)) (default all +)");
    cmd->add_flag("--invert-f", o->invert_f,
                  "replace every F block by its inverse (output generally NOT a valid model in this convention)");
    cmd->add_flag("--transpose-f", o->transpose_f,
                  "replace every F block by its transpose (output generally NOT a valid model in this convention)");
    cmd->add_option("--out,-o", o->out, "output file (default: standard output)");
    cmd->callback([o, cmd, &action] {
      bool gauge = cmd->count("--gauge-seed") > 0, galois = cmd->count("--galois") > 0;
      action = [o, gauge, galois] { return run_transform(*o, gauge, galois); };
    });
  }
  {
    auto* make = model->add_subcommand("make", "write a model of a built-in family");
    make->require_subcommand(1);
    struct Opts {
      int level = 0;
      std::string out = "-";
      std::string gauge = "unitary";
      bool even = false;
      int order = 0, power = 1;
    };
    auto o = std::make_shared<Opts>();
    auto* su2 = make->add_subcommand("su2", "SU(2)_k from the quantum 6j-symbols (Kirillov-Reshetikhin 1989)");
    su2->add_option("--level,-k", o->level, "level k, 1..12")->required()->check(CLI::Range(1, 12));  // level 12 takes ~15 s here; 16 took 90 s
    su2->add_option("--out,-o", o->out, "output file (default: standard output)");
    su2->add_option("--gauge", o->gauge, "unitary (square roots of quantum integers) or cyclotomic (Q(zeta) only)")
        ->check(CLI::IsMember({"unitary", "cyclotomic"}));
    su2->add_flag("--even", o->even, "only the integer spins (the SO(3)_k-type subcategory)");
    su2->callback([o, &action] {
      action = [o] {
        Model m = make_su2(o->level, o->gauge == "cyclotomic" ? Su2Gauge::kCyclotomic : Su2Gauge::kUnitary, o->even);
        write_file_atomic(o->out, model_to_toml(m));
        return 0;
      };
    });
    auto* zn = make->add_subcommand("cyclic", "Z_N anyons: trivial F, R^{ab} = exp(2 pi i p a b/N)");
    zn->add_option("--order,-n", o->order, "N >= 1")->required()->check(CLI::Range(1, 200));
    zn->add_option("--power,-p", o->power, "p (an integer)");
    zn->add_option("--out,-o", o->out, "output file (default: standard output)");
    zn->callback([o, &action] {
      action = [o] {
        write_file_atomic(o->out, model_to_toml(make_cyclic(o->order, o->power)));
        return 0;
      };
    });
    auto* tc = make->add_subcommand("toric-code", "Z_2 x Z_2 toric-code anyons 1, e, m, f");
    tc->add_option("--out,-o", o->out, "output file (default: standard output)");
    tc->callback([o, &action] {
      action = [o] {
        write_file_atomic(o->out, model_to_toml(make_toric_code()));
        return 0;
      };
    });
    auto* tf = make->add_subcommand("three-fermion", "Z_2 x Z_2 with three fermions");
    tf->add_option("--out,-o", o->out, "output file (default: standard output)");
    tf->callback([o, &action] {
      action = [o] {
        write_file_atomic(o->out, model_to_toml(make_three_fermion()));
        return 0;
      };
    });
  }
}

}  // namespace zb::cli
