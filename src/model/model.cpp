#include "zetabraid/model/model.hpp"

#include "zetabraid/error.hpp"

namespace zb {

namespace {
std::uint64_t key6(int a, int b, int c, int d, int e, int f) {
  std::uint64_t k = 0;
  for (int v : {a, b, c, d, e, f}) k = (k << 10) | static_cast<std::uint64_t>(v);
  return k;
}
}  // namespace

Model::Model(const Model& o)
    : name(o.name), source(o.source), source_sha256(o.source_sha256), field(o.field), labels(o.labels), claims_unitary(o.claims_unitary),
      has_r(o.has_r), f_given(o.f_given), r_given(o.r_given), f_line(o.f_line), r_line(o.r_line),
      fusion_(o.fusion_), f_(o.f_), r_(o.r_) {
  for (auto& [k, v] : f_) f_index_[key6(k[0], k[1], k[2], k[3], k[4], k[5])] = &v;
}

Model& Model::operator=(const Model& o) {
  if (this != &o) {
    Model tmp(o);
    *this = std::move(tmp);
  }
  return *this;
}

void Model::clear_symbols() {
  f_.clear();
  r_.clear();
  f_index_.clear();
  f_given.clear();
  r_given.clear();
  f_line.clear();
  r_line.clear();
}

int Model::label_index(const std::string& name) const {
  for (size_t i = 0; i < labels.size(); ++i)
    if (labels[i] == name) return static_cast<int>(i);
  return -1;
}

void Model::init_fusion() { fusion_.assign(n() * n() * n(), 0); }

void Model::set_fusion(int a, int b, int c, int mult) {
  if (fusion_.size() != n() * n() * n()) init_fusion();
  fusion_[(static_cast<size_t>(a) * n() + b) * n() + c] = mult;
}

std::vector<int> Model::channels(int a, int b) const {
  std::vector<int> out;
  for (int c = 0; c < label_count(); ++c)
    if (fusion(a, b, c) > 0) out.push_back(c);
  return out;
}

std::vector<int> Model::left_channels(int a, int b, int c, int d) const {
  std::vector<int> out;
  for (int e = 0; e < label_count(); ++e)
    if (fusion(a, b, e) && fusion(e, c, d)) out.push_back(e);
  return out;
}

std::vector<int> Model::right_channels(int a, int b, int c, int d) const {
  std::vector<int> out;
  for (int f = 0; f < label_count(); ++f)
    if (fusion(b, c, f) && fusion(a, f, d)) out.push_back(f);
  return out;
}

int Model::dual(int a) const {
  for (int b = 0; b < label_count(); ++b)
    if (fusion(a, b, 0) > 0) return b;
  return -1;
}

const Scalar* Model::f_symbol(int a, int b, int c, int d, int e, int f) const {
  auto it = f_index_.find(key6(a, b, c, d, e, f));
  return it == f_index_.end() ? nullptr : it->second;
}

void Model::set_f_symbol(int a, int b, int c, int d, int e, int f, Scalar v) {
  if (label_count() > 1000) throw ResourceError("more than 1000 labels");
  auto [it, inserted] = f_.insert_or_assign({a, b, c, d, e, f}, std::move(v));
  f_index_[key6(a, b, c, d, e, f)] = &it->second;
  (void)inserted;
}

const Scalar* Model::r_symbol(int a, int b, int c) const {
  auto it = r_.find({a, b, c});
  return it == r_.end() ? nullptr : &it->second;
}

void Model::set_r_symbol(int a, int b, int c, Scalar v) { r_.insert_or_assign({a, b, c}, std::move(v)); }

}  // namespace zb
