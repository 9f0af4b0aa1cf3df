// `zetabraid certify` and `zetabraid verify`: option parsing, one call into the library (cert/request.hpp,
// cert/checker/verify.hpp), printing of the renderings of cert/render.hpp, exit codes.
#include <fmt/format.h>

#include "commands.hpp"
#include "zetabraid/cert/render.hpp"
#include "zetabraid/error.hpp"

namespace zb::cli {

void add_certify_commands(CLI::App& app, Action& action) {
  {
    auto* c = app.add_subcommand("certify", "decide whether a braid word leaks out of a kept subspace (exactly or by "
                                            "rigorous interval bounds), optionally writing a certificate");
    struct O {
      CertifyArguments args;
      std::string word, out, gp;
      long precision = 0;
      int threads = 0;
      bool json = false;
    };
    auto o = std::make_shared<O>();
    CertifyArguments& a = o->args;
    c->add_option("--model", a.model_path, "model file")->required();
    c->add_option("--anyons", a.anyons, "anyon labels, e.g. \"t t t t t t\"")->required();
    c->add_option("--total", a.total, "total charge label")->required();
    c->add_option("--keep", a.keep_spec, "kept subspace as charges of consecutive groups, e.g. \"1-3:t,4-6:t\"");
    c->add_option("--keep-file", a.keep_file, "kept subspace as exact basis vectors (one per line, ',' separated)");
    c->add_option("--word", o->word, "braid word, e.g. \"s1 s2^-1 (s3 s2)^4\" or \"1 -2 3\"");
    c->add_option("--word-file", a.word_file, "file holding the braid word");
    c->add_option("--method", a.method,
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
        CertifyArguments a = o->args;
        if (c->count("--word")) a.word = o->word;
        if (c->count("--precision")) a.precision = o->precision;
        if (c->count("--threads")) a.threads = o->threads;
        if (c->count("--out") && o->out.empty()) throw InputError("--out needs a file name");
        if (c->count("--export-gp") && o->gp.empty()) throw InputError("--export-gp needs a file name");
        CertifyRequest req(a);
        CertifyResult r = req.run();
        if (!o->out.empty()) write_file_atomic(o->out, req.certificate(r));
        if (!o->gp.empty()) write_file_atomic(o->gp, req.gp_script(r));
        CertifyFiles files{o->out, o->gp};
        fmt::print("{}", o->json ? certify_json(r, files) + "\n" : certify_text(req, r, files));
        return r.verdict == Verdict::kLeaks ? kExitClaimFalse : kExitOk;
      };
    });
  }
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
        fmt::print("{}", o->json ? verify_json(v) + "\n" : verify_text(v));
        return v.verified ? kExitOk : kExitClaimFalse;
      };
    });
  }
}

}  // namespace zb::cli
