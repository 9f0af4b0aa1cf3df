// `zetabraid braid ...`, `zetabraid certify`, `zetabraid verify`: option parsing and printing only.
#include <fmt/format.h>

#include <algorithm>
#include <thread>

#include <nlohmann/json.hpp>

#include "commands.hpp"
#include "zetabraid/braid/checks.hpp"
#include "zetabraid/braid/invariant.hpp"
#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/cert/checker/verify.hpp"
#include "zetabraid/detail/parallel.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/model/load.hpp"

namespace zb::cli {

namespace {

using ojson = nlohmann::ordered_json;

std::string ball_of(const Scalar& s, long digits = 20) {
  acb_t b;
  acb_init(b);
  s.ball(b, static_cast<long>(digits * 3.33) + 32);
  std::string out = ball_str(b, digits);
  acb_clear(b);
  return out;
}

ojson value_json(const Scalar& s) { return {{"exact", s.str()}, {"ball", ball_of(s)}}; }

ojson matrix_json(const Matrix& m) {
  ojson rows = ojson::array();
  for (size_t i = 0; i < m.rows(); ++i) {
    ojson r = ojson::array();
    for (size_t j = 0; j < m.cols(); ++j) r.push_back(m(i, j).str());
    rows.push_back(r);
  }
  return rows;
}

std::string matrix_text(const Matrix& m, const std::string& indent) {
  std::string s;
  for (size_t i = 0; i < m.rows(); ++i) {
    s += indent + "[";
    for (size_t j = 0; j < m.cols(); ++j) s += (j ? ", " : "") + m(i, j).str();
    s += "]\n";
  }
  return s;
}

struct SpaceOpts {
  std::string model, anyons, total;
  bool json = false;
};

void add_space_options(CLI::App* c, SpaceOpts& o) {
  c->add_option("--model", o.model, "model file (TOML)")->required();
  c->add_option("--anyons", o.anyons, "anyon labels, e.g. \"t t t t\"")->required();
  c->add_option("--total", o.total, "total charge label")->required();
  c->add_flag("--json", o.json, "one JSON object");
}

Word read_word(const std::string& word, const std::string& file) {
  if (!word.empty() && !file.empty()) throw InputError("give --word or --word-file, not both");
  if (file.empty()) return parse_word(word);
  return read_word_file(file);  // comments, blanks, limits; errors name FILE:LINE:COLUMN
}

}  // namespace

void add_braid_commands(CLI::App& app, Action& action) {
  // ---- braid basis / generators / check / invariant
  auto* braid = app.add_subcommand("braid", "fusion-tree bases, generator matrices, braid-relation checks, link invariants");
  braid->require_subcommand(1);

  {
    auto* c = braid->add_subcommand("basis", "the left-associated fusion-tree basis of V(anyons; total)");
    auto o = std::make_shared<SpaceOpts>();
    add_space_options(c, *o);
    c->callback([o, &action] {
      action = [o] {
        Model m = load_model(o->model);
        FusionSpace sp(m, parse_anyons(m, o->anyons), parse_label(m, o->total, "total charge"));
        sp.require_nonzero();
        if (o->json) {
          ojson b = ojson::array();
          for (size_t i = 0; i < sp.dimension(); ++i) b.push_back(sp.label(i));
          fmt::print("{}\n", ojson{{"dimension", sp.dimension()}, {"basis", b}}.dump());
        } else {
          fmt::print("V({}; {}): dimension {}\nbasis (intermediate charges x1..xn of (((a1 a2 -> x2) a3 -> x3) ...)):\n",
                     label_names(m, sp.anyons()), m.labels[static_cast<size_t>(sp.total())], sp.dimension());
          for (size_t i = 0; i < sp.dimension(); ++i) fmt::print("  {:4}  {}\n", i + 1, sp.label(i));
        }
        return 0;
      };
    });
  }
  {
    auto* c = braid->add_subcommand("subspace", "the kept subspace of a charge spec (--keep) as exact basis vectors");
    auto o = std::make_shared<SpaceOpts>();
    auto keep = std::make_shared<std::string>();
    add_space_options(c, *o);
    c->add_option("--keep", *keep, "charges of consecutive groups, e.g. \"1-3:t,4-6:t\"")->required();
    c->callback([o, keep, &action] {
      action = [o, keep] {
        Model m = load_model(o->model);
        FusionSpace sp(m, parse_anyons(m, o->anyons), parse_label(m, o->total, "total charge"));
        sp.require_nonzero();
        auto groups = parse_keep(m, *keep, sp.anyon_count());
        Subspace s = subspace_from_groups(sp, groups);
        Matrix cols = s.basis.transpose();
        if (o->json) {
          fmt::print("{}\n", ojson{{"dimension", sp.dimension()},
                                   {"kept_dimension", s.kept()},
                                   {"coordinate", s.coordinate},
                                   {"basis", matrix_json(cols)}}
                                 .dump());
        } else {
          fmt::print("kept subspace {} of V({}; {}): dimension {} of {}{}\n", keep_canonical(m, groups),
                     label_names(m, sp.anyons()), o->total, s.kept(), sp.dimension(),
                     s.coordinate ? " (spanned by tree basis vectors)" : " (columns of the charge projector)");
          if (s.coordinate)
            for (size_t c2 : s.coordinates) fmt::print("  {:4}  {}\n", c2 + 1, sp.label(c2));
          else
            fmt::print("basis vectors (one per line, usable with certify --keep-file):\n{}",
                       [&] {
                         std::string t;
                         for (size_t j = 0; j < cols.rows(); ++j) {
                           for (size_t i = 0; i < cols.cols(); ++i) t += (i ? ", " : "") + cols(j, i).str();
                           t += "\n";
                         }
                         return t;
                       }());
        }
        return 0;
      };
    });
  }
  {
    auto* c = braid->add_subcommand("generators", "exact matrices of the generators s_i (and inverses)");
    auto o = std::make_shared<SpaceOpts>();
    auto which = std::make_shared<std::vector<int>>();
    add_space_options(c, *o);
    c->add_option("--generator", *which, "signed generator index (3 = s3, -3 = s3^-1); default all s_i");
    c->callback([o, which, &action] {
      action = [o, which] {
        Model m = load_model(o->model);
        std::vector<int> an = parse_anyons(m, o->anyons);
        BraidGenerators g(m, parse_label(m, o->total, "total charge"));
        g.space(an).require_nonzero();
        std::vector<int> ks = *which;
        if (ks.empty())
          for (int i = 1; i < static_cast<int>(an.size()); ++i) ks.push_back(i);
        ojson out = ojson::array();
        for (int k : ks) {
          const Matrix& mat = g.matrix(an, k);
          std::string name = fmt::format("s{}{}", std::abs(k), k < 0 ? "^-1" : "");
          if (o->json)
            out.push_back({{"generator", name}, {"matrix", matrix_json(mat)}});
          else
            fmt::print("{} ({} x {}):\n{}", name, mat.rows(), mat.cols(), matrix_text(mat, "  "));
        }
        if (o->json) fmt::print("{}\n", out.dump());
        return 0;
      };
    });
  }
  {
    auto* c = braid->add_subcommand("check", "braid relations, eigenvalues, Hecke relation, full twist, image algebra");
    auto o = std::make_shared<SpaceOpts>();
    auto maxdim = std::make_shared<size_t>(64);
    auto algdim = std::make_shared<size_t>(13);
    add_space_options(c, *o);
    c->add_option("--max-dimension", *maxdim, "refuse larger spaces (exact dense checks)");
    c->add_option("--algebra-limit", *algdim,
                  "compute the image-algebra dimension for spaces up to this dimension (cost ~ dim^6)");
    c->callback([o, maxdim, algdim, &action] {
      action = [o, maxdim, algdim] {
        Model m = load_model(o->model);
        std::vector<int> an = parse_anyons(m, o->anyons);
        BraidGenerators g(m, parse_label(m, o->total, "total charge"));
        BraidCheckOptions opt;
        opt.max_dimension = *maxdim;
        opt.max_algebra_dimension = *algdim;
        BraidReport r = check_braid_representation(g, an, opt);
        if (o->json) {
          ojson rel = ojson::array();
          for (const auto& x : r.relations) rel.push_back({{"relation", x.name}, {"holds", x.holds}});
          ojson eig = ojson::array();
          for (const auto& e : r.eigen) {
            ojson ev = ojson::array();
            for (const auto& v : e.eigenvalues)
              ev.push_back({{"value", value_json(v.value)}, {"multiplicity", v.multiplicity}, {"source", v.source}});
            eig.push_back({{"generator", fmt::format("s{}{}", e.generator, e.squared ? "^2" : "")},
                           {"eigenvalues", ev},
                           {"complete", e.complete},
                           {"hecke", e.hecke_checked ? ojson(e.hecke_holds) : ojson(nullptr)}});
          }
          ojson out{{"ok", r.ok()}, {"dimension", r.dimension}, {"relations", rel}, {"eigenvalues", eig}};
          out["full_twist"] = r.twist_checked
                                  ? ojson{{"holds", r.twist_holds}, {"scalar", value_json(*r.twist_expected)}}
                                  : ojson(nullptr);
          out["algebra_dimension"] = r.algebra_dimension >= 0 ? ojson(r.algebra_dimension) : ojson(nullptr);
          out["irreducible"] = r.algebra_dimension >= 0
                                   ? ojson(static_cast<size_t>(r.algebra_dimension) == r.dimension * r.dimension)
                                   : ojson(nullptr);
          fmt::print("{}\n", out.dump());
        } else {
          fmt::print("V({}; {}): dimension {}\n", label_names(m, an), o->total, r.dimension);
          size_t good = 0;
          for (const auto& x : r.relations) good += x.holds;
          fmt::print("braid relations: {} of {} hold exactly\n", good, r.relations.size());
          for (const auto& x : r.relations)
            if (!x.holds) fmt::print("  FAILS: {}\n", x.name);
          for (const auto& e : r.eigen) {
            fmt::print("s{}{}: eigenvalues{}\n", e.generator, e.squared ? "^2" : "",
                       e.complete ? " (diagonalisable, multiplicities add up to the dimension)"
                                  : " (INCOMPLETE: multiplicities do not add up)");
            for (const auto& v : e.eigenvalues)
              fmt::print("  {} = {}  multiplicity {}   {}\n", v.source, v.value.str(), v.multiplicity,
                         ball_of(v.value, 12));
            if (e.hecke_checked)
              fmt::print("  quadratic relation (s - l1)(s - l2) = 0: {}\n", e.hecke_holds ? "holds" : "FAILS");
          }
          if (r.twist_checked)
            fmt::print("full twist (s1...s{})^{} = theta_c/theta_a^n = {}: {}\n", an.size() - 1, an.size(),
                       r.twist_expected->str(), r.twist_holds ? "holds" : "FAILS");
          if (r.algebra_dimension < 0 && r.twist_checked)
            fmt::print("image algebra: not computed (dimension {} > --algebra-limit {})\n", r.dimension, *algdim);
          if (r.algebra_dimension >= 0)
            fmt::print("image algebra: dimension {} of {} ({})\n", r.algebra_dimension, r.dimension * r.dimension,
                       static_cast<size_t>(r.algebra_dimension) == r.dimension * r.dimension
                           ? "full matrix algebra: irreducible (Burnside)"
                           : "not the full matrix algebra: reducible (Burnside)");
          fmt::print("{}\n", r.ok() ? "all checks hold" : "SOME CHECKS FAIL");
        }
        return r.ok() ? 0 : 1;
      };
    });
  }
  {
    auto* c = braid->add_subcommand("invariant", "link invariant of the braid closure (quantum trace, framing-corrected)");
    struct O {
      std::string model, strands, word, word_file;
      bool json = false;
    };
    auto o = std::make_shared<O>();
    c->add_option("--model", o->model, "model file")->required();
    c->add_option("--strands,--anyons", o->strands, "strand labels, e.g. \"t t t\"")->required();
    c->add_option("--word", o->word, "braid word");
    c->add_option("--word-file", o->word_file, "file holding the braid word");
    c->add_flag("--json", o->json, "one JSON object");
    c->callback([o, &action] {
      action = [o] {
        Model m = load_model(o->model);
        std::vector<int> st = parse_anyons(m, o->strands);
        Word w = read_word(o->word, o->word_file);
        LinkInvariant li = link_invariant(m, st, w);
        if (o->json) {
          fmt::print("{}\n", ojson{{"components", li.components},
                                   {"writhe", w.writhe()},
                                   {"quantum_trace", value_json(li.quantum_trace)},
                                   {"invariant", value_json(li.invariant)},
                                   {"writhe_normalised", value_json(li.writhe_normalised)}}
                                 .dump());
        } else {
          fmt::print("closure: {} component(s), writhe {}\n", li.components, w.writhe());
          fmt::print("quantum trace sum_c d_c tr rho_c(w) (framed): {}\n  enclosure: {}\n", li.quantum_trace.str(),
                     ball_of(li.quantum_trace));
          fmt::print("invariant (framing-corrected, unknot = 1): {}\n  enclosure: {}\n", li.invariant.str(),
                     ball_of(li.invariant));
          if (li.components > 1)
            fmt::print("total-writhe normalisation theta^-w Q/d: {}\n  enclosure: {}\n", li.writhe_normalised.str(),
                       ball_of(li.writhe_normalised));
        }
        return 0;
      };
    });
  }

  // ---- certify
  {
    auto* c = app.add_subcommand("certify", "decide whether a braid word leaks out of a kept subspace (exactly or by "
                                            "rigorous interval bounds), optionally writing a certificate");
    struct O {
      std::string model, anyons, total, keep, keep_file, word, word_file, method = "auto", out, gp;
      long precision = 0;
      int threads = 0;
      bool json = false;
    };
    auto o = std::make_shared<O>();
    c->add_option("--model", o->model, "model file")->required();
    c->add_option("--anyons", o->anyons, "anyon labels, e.g. \"t t t t t t\"")->required();
    c->add_option("--total", o->total, "total charge label")->required();
    c->add_option("--keep", o->keep, "kept subspace as charges of consecutive groups, e.g. \"1-3:t,4-6:t\"");
    c->add_option("--keep-file", o->keep_file, "kept subspace as exact basis vectors (one per line, ',' separated)");
    c->add_option("--word", o->word, "braid word, e.g. \"s1 s2^-1 (s3 s2)^4\" or \"1 -2 3\"");
    c->add_option("--word-file", o->word_file, "file holding the braid word");
    c->add_option("--method", o->method,
                  "exact | interval | modular | auto (exact unless the word is long); modular decides leak-free / "
                  "leaks by modular images with a norm bound, without the leakage value");
    c->add_option("--threads", o->threads,
                  "worker threads of the product engines (default: all cores, at most 8; same result at any count)");
    c->add_option("--precision", o->precision, "interval working precision in bits (default: raised until decided)");
    c->add_option("--out", o->out, "write a certificate (JSON, docs/certificate-format.md)");
    c->add_option("--export-gp", o->gp, "write a self-contained PARI/GP script re-checking the claim");
    c->add_flag("--json", o->json, "one JSON object");
    c->callback([o, c, &action] {
      action = [o, c] {
        if (!c->count("--word") && o->word_file.empty())
          throw InputError("give the braid word with --word or --word-file");
        if (!o->keep.empty() && !o->keep_file.empty()) throw InputError("give --keep or --keep-file, not both");
        CertifyOptions opt;
        opt.method = parse_method(o->method);
        if (c->count("--precision") && (o->precision < 16 || o->precision > opt.max_precision))
          throw InputError(fmt::format("--precision must be {}..{} bits, got {}", 16, opt.max_precision, o->precision));
        opt.precision = o->precision;
        if (c->count("--threads") && (o->threads < 1 || o->threads > kMaxThreads))
          throw InputError(fmt::format("--threads must be 1..{} (omit it for all cores, at most {})", kMaxThreads,
                                       kMaxDefaultThreads));
        opt.threads = thread_count(o->threads);
        if (c->count("--out") && o->out.empty()) throw InputError("--out needs a file name");
        if (c->count("--export-gp") && o->gp.empty()) throw InputError("--export-gp needs a file name");
        Model m = load_model(o->model);
        std::vector<int> an = parse_anyons(m, o->anyons);
        int total = parse_label(m, o->total, "total charge");
        Word w = read_word(o->word, o->word_file);
        BraidGenerators g(m, total);
        const FusionSpace& sp = g.space(an);
        sp.require_nonzero();
        w.check_range(static_cast<int>(an.size()));
        Subspace keep = whole_space(sp);
        std::string kind = "all", spec;
        if (!o->keep.empty()) {
          auto groups = parse_keep(m, o->keep, static_cast<int>(an.size()));
          keep = subspace_from_groups(sp, groups);
          kind = "charges";
          spec = keep_canonical(m, groups);
        } else if (!o->keep_file.empty()) {
          keep = subspace_from_text(sp, read_input_file(o->keep_file, kMaxKeepFileBytes, "keep file"), o->keep_file);
          kind = "vectors";
        }
        CertifyResult r = certify(g, an, keep, w, opt);
        CertificateInputs ci{o->model, &m, an, total, kind, spec, &keep, &sp, &w};
        if (!o->out.empty()) write_file_atomic(o->out, certificate_json(ci, r));
        if (!o->gp.empty()) write_file_atomic(o->gp, export_gp(ci, r));
        if (o->json) {
          ojson leak{{"exact", r.leakage ? ojson(r.leakage->str()) : ojson(nullptr)},
                     {"ball", r.leakage_ball.empty() ? ojson(nullptr) : ojson(r.leakage_ball)},
                     {"upper", r.leakage_upper.empty() ? ojson(nullptr) : ojson(r.leakage_upper)},
                     {"lower", r.leakage_lower.empty() ? ojson(nullptr) : ojson(r.leakage_lower)}};
          if (!r.unitary) leak["note"] = "the leakage value needs a model that claims a unitary gauge";
          ojson out{{"verdict", verdict_name(r.verdict)},
                    {"method", method_name(r.method)},
                    {"dimension", r.dimension},
                    {"kept_dimension", r.kept},
                    {"letters", r.letters},
                    {"leakage", leak},
                    {"action", r.action ? matrix_json(*r.action) : ojson(nullptr)},
                    {"precision_bits", r.precision}};
          if (r.method == Method::kInterval) out["accuracy_bits"] = r.accuracy_bits;
          if (r.modular) {
            const ModularZeroResult& z = *r.modular;
            out["proof"] = z.nonzero ? ojson{{"kind", "nonzero-image"}, {"prime", z.witness.p}, {"row", z.row},
                                             {"col", z.col}, {"value", z.value}}
                                     : ojson{{"kind", "norm-bound"}, {"primes", z.primes.size()},
                                             {"bound_bits", z.bound_bits}};
          }
          out["certificate"] = o->out.empty() ? ojson(nullptr) : ojson(o->out);
          fmt::print("{}\n", out.dump());
        } else {
          fmt::print("fusion space V({}; {}): dimension {}; kept subspace ({}): dimension {}\n", label_names(m, an),
                     o->total, r.dimension, kind == "charges" ? spec : kind, r.kept);
          fmt::print("word: {} letters; method: {}{}\n", r.letters, method_name(r.method),
                     r.method == Method::kInterval ? fmt::format(" ({} bits)", r.precision) : std::string());
          fmt::print("verdict: {}\n", verdict_name(r.verdict));
          if (r.leakage)
            fmt::print("leakage ||P_out rho(w) P_in||_F^2 = {}\n  enclosure: {}\n", r.leakage->str(), r.leakage_ball);
          else if (r.method == Method::kExact && !r.unitary)
            fmt::print("leakage value: needs a model that claims a unitary gauge (leak-free was decided exactly)\n");
          if (r.modular) {
            const ModularZeroResult& z = *r.modular;
            if (z.nonzero)
              fmt::print("proof: entry ({}, {}) of the leak block is {} != 0 mod p = {} (a ring map, so the entry is "
                         "not 0)\n", z.row, z.col, z.value, z.witness.p);
            else
              fmt::print("proof: the leak block vanishes mod {} primes whose product exceeds the norm bound {} "
                         "(a nonzero entry would have a larger norm)\n", z.primes.size(),
                         z.norm_bound.rfind("0*", 0) == 0 ? std::string("0") : fmt::format("2^{}", z.bound_bits));
          }
          if (r.method == Method::kInterval) {
            fmt::print("leakage <= {} (rigorous; enclosure {}, {} bits of accuracy)\n", r.leakage_upper,
                       r.leakage_ball, r.accuracy_bits);
            if (!r.leakage_lower.empty()) fmt::print("leakage >= {} > 0: the braid leaks\n", r.leakage_lower);
          }
          if (r.action) {
            fmt::print("induced action on the kept subspace ({} x {}){}:\n{}", r.action->rows(), r.action->cols(),
                       r.verdict == Verdict::kLeakFree ? "" : " (compression P_in rho(w) P_in)",
                       r.kept <= 8 ? matrix_text(*r.action, "  ") : std::string("  (omitted: use --json)\n"));
          }
          if (!o->out.empty()) fmt::print("certificate written to {}\n", o->out);
          if (!o->gp.empty()) fmt::print("PARI/GP re-check script written to {}\n", o->gp);
        }
        return r.verdict == Verdict::kLeaks ? 1 : 0;
      };
    });
  }

  // ---- verify
  {
    auto* c = app.add_subcommand("verify", "re-check a certificate independently (exit 0 verified, 1 rejected)");
    struct O {
      std::string cert, via = "exact";
      VerifyOptions opt;
      bool json = false;
    };
    auto o = std::make_shared<O>();
    c->add_option("certificate", o->cert, "certificate file (JSON)")->required();
    c->add_option("--model", o->opt.model_override,
                  "model file to use instead of model.file of the certificate (needed when model.file is absolute "
                  "or leaves the certificate's folder)");
    c->add_option("--via", o->via, "exact | modular: how an exact certificate's image is re-checked (left-to-right "
                                   "in the number field, or modular images with a norm bound)");
    c->add_flag("--plain-interval", o->opt.plain_interval,
                "interval certificates: re-check with a plain left-to-right ball product even when every letter is "
                "unitary (a slower cross-check of the default error-bound propagation)");
    c->add_flag("--json", o->json, "one JSON object {verified, reason, summary}");
    c->callback([o, &action] {
      action = [o] {
        o->opt.route = parse_route(o->via);
        VerifyOutcome v = verify_certificate(o->cert, o->opt);
        if (o->json)
          fmt::print("{}\n", ojson{{"verified", v.verified}, {"reason", v.reason}, {"summary", v.summary}}.dump());
        else if (v.verified)
          fmt::print("VERIFIED: {}\n", v.summary);
        else
          fmt::print("REJECTED: {}\n", v.reason);
        return v.verified ? 0 : 1;
      };
    });
  }
}

}  // namespace zb::cli
