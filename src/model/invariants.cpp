#include "zetabraid/model/invariants.hpp"
#include "zetabraid/error.hpp"
namespace zb {
Invariants compute_invariants(const Model& m, long) { throw InputError("model info: not yet implemented"); return Invariants(m.field); }
std::string invariants_text(const Model&, const Invariants&, long) { return ""; }
std::string invariants_json(const Model&, const Invariants&, long) { return ""; }
}
