#include "undertow/compare/neighbour_field.hpp"

#include <algorithm>
#include <cmath>
#include <nanoflann.hpp>

#include "undertow/error.hpp"

namespace undertow::compare {

// nanoflann's data-set interface over the field's own arrays.
struct NeighbourField::Tree {
  const std::vector<double>* x;
  const std::vector<double>* y;
  std::size_t kdtree_get_point_count() const { return x->size(); }
  double kdtree_get_pt(std::size_t i, std::size_t dim) const {
    return dim == 0 ? (*x)[i] : (*y)[i];
  }
  template <class Box> bool kdtree_get_bbox(Box&) const { return false; }
  using Index = nanoflann::KDTreeSingleIndexAdaptor<nanoflann::L2_Simple_Adaptor<double, Tree>,
                                                    Tree, 2, std::size_t>;
  std::unique_ptr<Index> index;
};

NeighbourField::NeighbourField(std::vector<double> x, std::vector<double> y,
                               std::vector<std::array<double, 3>> values)
    : x_(std::move(x)), y_(std::move(y)), v_(std::move(values)), tree_(std::make_unique<Tree>()) {
  if (x_.size() != y_.size() || x_.size() != v_.size())
    throw std::logic_error("NeighbourField: one position and one value per source");
  if (x_.empty()) throw InputError("the simulation has no young sources to compare with");
  tree_->x = &x_, tree_->y = &y_;
  // the index builds itself and keeps a reference to *tree_, whose address never changes
  tree_->index =
      std::make_unique<Tree::Index>(2, *tree_, nanoflann::KDTreeSingleIndexAdaptorParams(16));
}

NeighbourField::~NeighbourField() = default;
NeighbourField::NeighbourField(NeighbourField&& o) noexcept
    : x_(std::move(o.x_)), y_(std::move(o.y_)), v_(std::move(o.v_)), tree_(std::move(o.tree_)) {
  if (tree_) tree_->x = &x_, tree_->y = &y_;
}
NeighbourField& NeighbourField::operator=(NeighbourField&& o) noexcept {
  x_ = std::move(o.x_), y_ = std::move(o.y_), v_ = std::move(o.v_), tree_ = std::move(o.tree_);
  if (tree_) tree_->x = &x_, tree_->y = &y_;
  return *this;
}

namespace {
// Nearest first; equal distances by index, so the choice never depends on the tree's layout.
void sort_by_distance(std::vector<std::pair<std::size_t, double>>& m) {
  std::sort(m.begin(), m.end(), [](const auto& a, const auto& b) {
    return a.second != b.second ? a.second < b.second : a.first < b.first;
  });
}
} // namespace

std::vector<std::size_t> NeighbourField::nearest(double x, double y, std::size_t k) const {
  k = std::min(k, x_.size());
  // one more than asked, so a tie at the k-th distance is broken by index below
  const std::size_t ask = std::min(k + 1, x_.size());
  std::vector<std::size_t> idx(ask);
  std::vector<double> d2(ask);
  const double q[2] = {x, y};
  const std::size_t got = tree_->index->knnSearch(q, ask, idx.data(), d2.data());
  std::vector<std::pair<std::size_t, double>> m;
  for (std::size_t j = 0; j < got; ++j)
    m.emplace_back(idx[j], d2[j]);
  sort_by_distance(m);
  std::vector<std::size_t> out;
  for (std::size_t j = 0; j < std::min(k, m.size()); ++j)
    out.push_back(m[j].first);
  return out;
}

std::vector<std::size_t> NeighbourField::within(double x, double y, double r) const {
  std::vector<std::pair<std::size_t, double>> m;
  const double q[2] = {x, y};
  tree_->index->radiusSearch(q, r * r, m, nanoflann::SearchParams(32, 0, false));
  sort_by_distance(m);
  std::vector<std::size_t> out;
  for (const auto& p : m)
    out.push_back(p.first);
  return out;
}

SampleMoments NeighbourField::moments(const std::vector<std::size_t>& chosen, double x,
                                      double y) const {
  SampleMoments s;
  s.k = chosen.size();
  if (chosen.empty()) return s;
  for (auto j : chosen)
    for (int a = 0; a < 3; ++a)
      s.mean[std::size_t(a)] += v_[j][std::size_t(a)];
  for (auto& m : s.mean)
    m /= double(s.k);
  for (auto j : chosen) {
    const double e0 = v_[j][0] - s.mean[0], e1 = v_[j][1] - s.mean[1], e2 = v_[j][2] - s.mean[2];
    s.ss[0] += e0 * e0, s.ss[1] += e0 * e1, s.ss[2] += e0 * e2;
    s.ss[3] += e1 * e1, s.ss[4] += e1 * e2, s.ss[5] += e2 * e2;
    s.radius_kpc = std::max(s.radius_kpc, std::hypot(x_[j] - x, y_[j] - y));
  }
  return s;
}

} // namespace undertow::compare
