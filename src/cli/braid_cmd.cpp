// `zetabraid braid basis|subspace|generators|check|invariant`: option parsing, calls into the library, printing
// of the renderings of braid/render.hpp. The certificate commands are in certify_cmd.cpp.
#include <fmt/format.h>

#include "commands.hpp"
#include "zetabraid/braid/render.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/model/load.hpp"

namespace zb::cli {

namespace {

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
        fmt::print("{}", o->json ? fusion_space_json(sp) + "\n" : fusion_space_text(sp));
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
        fmt::print("{}", o->json ? subspace_json(sp, s) + "\n" : subspace_text(sp, keep_canonical(m, groups), s));
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
        GeneratorMatrices mats;
        for (int k : ks) mats.emplace_back(k, &g.matrix(an, k));
        fmt::print("{}", o->json ? generators_json(mats) + "\n" : generators_text(mats));
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
        fmt::print("{}", o->json ? braid_report_json(r) + "\n"
                                 : braid_report_text(m, an, g.total(), r, opt));
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
        fmt::print("{}", o->json ? link_invariant_json(li, w.writhe()) + "\n" : link_invariant_text(li, w.writhe()));
        return 0;
      };
    });
  }
}

}  // namespace zb::cli
