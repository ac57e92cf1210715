// NeighbourTerm (see neighbour_term.h).
//
// [SECTION] index
//   kernel helpers          w(t) with t = 1 / (1 + d^2 / dof)
//   attraction and cost     sparse P, double precision, chunks of rows
//   exact repulsion         O(N^2), double precision, the reference for the tree
//   Barnes-Hut              Morton-ordered octree / quadtree in float32, group walk
//   evaluate                combines the parts; ordered reductions
//
// Cost with exaggeration e (P scaled by e, as scikit-learn does during early exaggeration):
//   C_e = sum_ij e p_ij log(e p_ij) - e sum_ij p_ij log w_ij + log Z
// which is KL(P||Q) at e = 1 and whose gradient is exactly the (e p_ij - q_ij) form in the header
// (sum p = 1). Determinism: every parallel loop works on fixed chunks that write their own
// partial sums, reduced in chunk order, so the result is the same for any thread count.
#include "solver/neighbour_term.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <stdexcept>
#include <vector>

#include "solver/parallel.h"

namespace kith {
namespace {

// ============================================================================ kernel helpers
enum class Kernel { kOne, kTwo, kGeneral };

Kernel kernel_of(double dof) { return dof == 1.0 ? Kernel::kOne : dof == 2.0 ? Kernel::kTwo : Kernel::kGeneral; }

// w = t^((dof+1)/2)
template <Kernel K, typename T>
inline T kernel_w(T t, T half_exponent) {
  if constexpr (K == Kernel::kOne) {
    (void)half_exponent;
    return t;
  } else if constexpr (K == Kernel::kTwo) {
    (void)half_exponent;
    return t * std::sqrt(t);
  } else {
    return std::pow(t, half_exponent);
  }
}

constexpr size_t kRowChunk = 512;

// ============================================================================ tree
template <int D>
struct Tree {
  // Points in Morton order, float32, structure of arrays.
  std::vector<float> px[D];
  std::vector<int32_t> order;  // sorted position -> item
  // Nodes in breadth-first order; a node's children are contiguous.
  std::vector<int32_t> begin, end, first_child, child_count;
  std::vector<float> cx[D], mass, size2, lo[D], hi[D];
  std::vector<int32_t> leaves;
};

template <int D>
void build_tree(const Points& y, size_t leaf_size, Tree<D>& t) {
  const Eigen::Index n = y.rows();
  constexpr int kBits = D == 3 ? 21 : 31;
  double mn[D], mx[D];
  for (int d = 0; d < D; ++d) {
    mn[d] = y.col(d).minCoeff();
    mx[d] = y.col(d).maxCoeff();
  }
  double extent = 0;
  for (int d = 0; d < D; ++d) extent = std::max(extent, mx[d] - mn[d]);
  if (!(extent > 0)) extent = 1.0;
  const double cells = double(uint64_t(1) << kBits);
  const double scale = cells / extent;
  std::vector<std::pair<uint64_t, int32_t>> keys(static_cast<size_t>(n));
  for (Eigen::Index i = 0; i < n; ++i) {
    uint64_t code = 0;
    uint64_t q[D];
    for (int d = 0; d < D; ++d) {
      double v = (y(i, d) - mn[d]) * scale;
      q[d] = v >= cells ? (uint64_t(1) << kBits) - 1 : uint64_t(std::max(v, 0.0));
    }
    for (int b = kBits - 1; b >= 0; --b)
      for (int d = 0; d < D; ++d) code = (code << 1) | ((q[d] >> b) & 1u);
    keys[size_t(i)] = {code, int32_t(i)};
  }
  std::sort(keys.begin(), keys.end());
  t.order.resize(size_t(n));
  for (int d = 0; d < D; ++d) t.px[d].resize(size_t(n));
  for (Eigen::Index s = 0; s < n; ++s) {
    t.order[size_t(s)] = keys[size_t(s)].second;
    for (int d = 0; d < D; ++d) t.px[d][size_t(s)] = float(y(keys[size_t(s)].second, d));
  }
  t.begin.assign(1, 0);
  t.end.assign(1, int32_t(n));
  t.first_child.assign(1, -1);
  t.child_count.assign(1, 0);
  std::vector<int> level(1, 0);
  t.leaves.clear();
  for (size_t q = 0; q < t.begin.size(); ++q) {
    const int32_t b = t.begin[q], e = t.end[q];
    int lev = level[q];
    if (size_t(e - b) <= leaf_size) {
      t.leaves.push_back(int32_t(q));
      continue;
    }
    // Descend levels until the range splits in two or more cells (skipping single-child chains).
    for (; lev < kBits; ++lev) {
      const int shift = D * (kBits - lev - 1);
      const uint64_t first = (keys[size_t(b)].first >> shift) & ((1u << D) - 1);
      const uint64_t last = (keys[size_t(e - 1)].first >> shift) & ((1u << D) - 1);
      if (first != last) break;
    }
    if (lev == kBits) {  // all codes equal (coincident points): a leaf, however big
      t.leaves.push_back(int32_t(q));
      continue;
    }
    const int shift = D * (kBits - lev - 1);
    t.first_child[q] = int32_t(t.begin.size());
    int32_t start = b;
    uint64_t digit = (keys[size_t(b)].first >> shift) & ((1u << D) - 1);
    for (int32_t s = b + 1; s <= e; ++s) {
      const uint64_t dg = s < e ? (keys[size_t(s)].first >> shift) & ((1u << D) - 1) : ~uint64_t(0);
      if (dg != digit) {
        t.begin.push_back(start);
        t.end.push_back(s);
        t.first_child.push_back(-1);
        t.child_count.push_back(0);
        level.push_back(lev + 1);
        ++t.child_count[q];
        start = s;
        digit = dg;
      }
    }
  }
  // Summaries bottom-up (children have larger indices than their parent).
  const size_t m = t.begin.size();
  t.mass.assign(m, 0.f);
  t.size2.assign(m, 0.f);
  for (int d = 0; d < D; ++d) {
    t.cx[d].assign(m, 0.f);
    t.lo[d].assign(m, 0.f);
    t.hi[d].assign(m, 0.f);
  }
  std::vector<double> sum(m * D, 0.0);
  for (size_t q = m; q-- > 0;) {
    float l[D], h[D];
    for (int d = 0; d < D; ++d) {
      l[d] = INFINITY;
      h[d] = -INFINITY;
    }
    if (t.child_count[q] == 0) {
      for (int32_t s = t.begin[q]; s < t.end[q]; ++s)
        for (int d = 0; d < D; ++d) {
          const float v = t.px[d][size_t(s)];
          sum[q * D + d] += v;
          l[d] = std::min(l[d], v);
          h[d] = std::max(h[d], v);
        }
    } else {
      for (int32_t c = t.first_child[q]; c < t.first_child[q] + t.child_count[q]; ++c)
        for (int d = 0; d < D; ++d) {
          sum[q * D + d] += sum[size_t(c) * D + d];
          l[d] = std::min(l[d], t.lo[d][size_t(c)]);
          h[d] = std::max(h[d], t.hi[d][size_t(c)]);
        }
    }
    const double count = double(t.end[q] - t.begin[q]);
    t.mass[q] = float(count);
    float side = 0.f;
    for (int d = 0; d < D; ++d) {
      t.cx[d][q] = float(sum[q * D + d] / count);
      t.lo[d][q] = l[d];
      t.hi[d][q] = h[d];
      side = std::max(side, h[d] - l[d]);
    }
    t.size2[q] = side * side;
  }
}

// Interaction list of one group: far nodes (centre of mass, mass) and near points (mass 1),
// padded with zero-mass entries to a multiple of kLanes.
constexpr int kLanes = 8;
template <int D>
struct InteractionList {
  std::vector<float> x[D], m;
  void clear() {
    for (int d = 0; d < D; ++d) x[d].clear();
    m.clear();
  }
  void add(const float* p, float mass) {
    for (int d = 0; d < D; ++d) x[d].push_back(p[d]);
    m.push_back(mass);
  }
  void pad() {
    while (m.size() % kLanes) {
      for (int d = 0; d < D; ++d) x[d].push_back(0.f);
      m.push_back(0.f);
    }
  }
};

template <int D>
void build_list(const Tree<D>& t, int32_t group, float theta2, InteractionList<D>& list, std::vector<int32_t>& stack) {
  list.clear();
  const int32_t gb = t.begin[size_t(group)], ge = t.end[size_t(group)];
  float glo[D], ghi[D];
  for (int d = 0; d < D; ++d) {
    glo[d] = t.lo[d][size_t(group)];
    ghi[d] = t.hi[d][size_t(group)];
  }
  stack.clear();
  stack.push_back(0);
  while (!stack.empty()) {
    const size_t q = size_t(stack.back());
    stack.pop_back();
    const bool contains_group = t.begin[q] <= gb && ge <= t.end[q];
    if (!contains_group) {
      float dmin2 = 0.f;
      for (int d = 0; d < D; ++d) {
        const float c = t.cx[d][q];
        const float gap = std::max(std::max(glo[d] - c, c - ghi[d]), 0.f);
        dmin2 += gap * gap;
      }
      if (t.size2[q] < theta2 * dmin2) {
        float c[D];
        for (int d = 0; d < D; ++d) c[d] = t.cx[d][q];
        list.add(c, t.mass[q]);
        continue;
      }
    }
    if (t.child_count[q] == 0) {
      for (int32_t s = t.begin[q]; s < t.end[q]; ++s) {
        float p[D];
        for (int d = 0; d < D; ++d) p[d] = t.px[d][size_t(s)];
        list.add(p, 1.f);
      }
    } else {
      for (int32_t c = t.first_child[q] + t.child_count[q] - 1; c >= t.first_child[q]; --c) stack.push_back(c);
    }
  }
  list.pad();
}

// Sum over the list of m w and m w t (y_i - x) for one target point; lanes keep the order fixed.
template <int D, Kernel K>
inline void apply_list(const InteractionList<D>& list, const float* yi, float inv_dof, float half_exponent,
                       double& z_out, double* f_out) {
  float z[kLanes] = {}, f[D][kLanes] = {};
  const size_t len = list.m.size();
  const float* xs[D];
  for (int d = 0; d < D; ++d) xs[d] = list.x[d].data();
  const float* ms = list.m.data();
  for (size_t k = 0; k < len; k += kLanes) {
    for (int l = 0; l < kLanes; ++l) {
      float diff[D], d2 = 0.f;
      for (int d = 0; d < D; ++d) {
        diff[d] = yi[d] - xs[d][k + size_t(l)];
        d2 += diff[d] * diff[d];
      }
      const float t = 1.f / (1.f + d2 * inv_dof);
      const float mw = ms[k + size_t(l)] * kernel_w<K>(t, half_exponent);
      z[l] += mw;
      const float q = mw * t;
      for (int d = 0; d < D; ++d) f[d][l] += q * diff[d];
    }
  }
  double zs = 0.0;
  for (int l = 0; l < kLanes; ++l) zs += double(z[l]);
  z_out = zs;
  for (int d = 0; d < D; ++d) {
    double s = 0.0;
    for (int l = 0; l < kLanes; ++l) s += double(f[d][l]);
    f_out[d] = s;
  }
}

}  // namespace

// ============================================================================ Impl
struct NeighbourTerm::Impl {
  std::shared_ptr<const SparseAffinities> p;
  NeighbourTermOptions options;
  double exaggeration = 1.0;
  double p_log_p = 0.0;  // sum p log p, cached per P
  Points attraction, repulsion;
  Tree<2> tree2;
  Tree<3> tree3;

  void set_p(std::shared_ptr<const SparseAffinities> np) {
    if (!np) throw std::invalid_argument("NeighbourTerm: null affinities");
    p = std::move(np);
    double s = 0.0;
    for (double v : p->val)
      if (v > 0) s += v * std::log(v);
    p_log_p = s;
  }

  // attraction(i) = sum_j p_ij t_ij (y_i - y_j); returns sum_ij p_ij log(1 + d_ij^2 / dof).
  double attract(const Points& y) {
    const Eigen::Index n = y.rows(), dims = y.cols();
    attraction.setZero(n, dims);
    const size_t chunks = (size_t(n) + kRowChunk - 1) / kRowChunk;
    std::vector<double> partial(chunks, 0.0);
    const double inv_dof = 1.0 / options.dof;
    const SparseAffinities& P = *p;
    parallel_for(chunks, options.threads, [&](size_t c) {
      double s = 0.0;
      for (size_t i = c * kRowChunk; i < std::min(size_t(n), (c + 1) * kRowChunk); ++i) {
        double f[3] = {0, 0, 0};
        const double* yi = &y(Eigen::Index(i), 0);
        for (int64_t e = P.row_ptr[i]; e < P.row_ptr[i + 1]; ++e) {
          const double* yj = &y(P.col[size_t(e)], 0);
          double diff[3], d2 = 0.0;
          for (Eigen::Index d = 0; d < dims; ++d) {
            diff[d] = yi[d] - yj[d];
            d2 += diff[d] * diff[d];
          }
          const double u = d2 * inv_dof;
          const double pv = P.val[size_t(e)];
          const double pt = pv / (1.0 + u);
          for (Eigen::Index d = 0; d < dims; ++d) f[d] += pt * diff[d];
          s += pv * std::log1p(u);
        }
        for (Eigen::Index d = 0; d < dims; ++d) attraction(Eigen::Index(i), d) = f[d];
      }
      partial[c] = s;
    });
    double total = 0.0;
    for (double v : partial) total += v;
    return total;
  }

  // Exact repulsion: repulsion(i) = sum_{j != i} w_ij t_ij (y_i - y_j); returns Z.
  template <Kernel K>
  double repel_exact(const Points& y) {
    const Eigen::Index n = y.rows(), dims = y.cols();
    repulsion.setZero(n, dims);
    const size_t chunks = (size_t(n) + 63) / 64;
    std::vector<double> partial(chunks, 0.0);
    const double inv_dof = 1.0 / options.dof, half = (options.dof + 1.0) / 2.0;
    parallel_for(chunks, options.threads, [&](size_t c) {
      double z = 0.0;
      for (Eigen::Index i = Eigen::Index(c) * 64; i < std::min(n, Eigen::Index(c + 1) * 64); ++i) {
        double f[3] = {0, 0, 0};
        for (Eigen::Index j = 0; j < n; ++j) {
          if (j == i) continue;
          double diff[3], d2 = 0.0;
          for (Eigen::Index d = 0; d < dims; ++d) {
            diff[d] = y(i, d) - y(j, d);
            d2 += diff[d] * diff[d];
          }
          const double t = 1.0 / (1.0 + d2 * inv_dof);
          const double w = kernel_w<K>(t, half);
          z += w;
          for (Eigen::Index d = 0; d < dims; ++d) f[d] += w * t * diff[d];
        }
        for (Eigen::Index d = 0; d < dims; ++d) repulsion(i, d) = f[d];
      }
      partial[c] = z;
    });
    double total = 0.0;
    for (double v : partial) total += v;
    return total;
  }

  template <int D, Kernel K>
  double repel_tree(const Points& y, Tree<D>& t) {
    constexpr size_t kLeafSize = 16;
    constexpr size_t kGroupsPerChunk = 8;
    build_tree<D>(y, kLeafSize, t);
    const Eigen::Index n = y.rows();
    repulsion.setZero(n, D);
    const size_t groups = t.leaves.size();
    const size_t chunks = (groups + kGroupsPerChunk - 1) / kGroupsPerChunk;
    std::vector<double> partial(chunks, 0.0);
    const float theta2 = float(options.theta * options.theta);
    const float inv_dof = float(1.0 / options.dof), half = float((options.dof + 1.0) / 2.0);
    parallel_for(chunks, options.threads, [&](size_t c) {
      InteractionList<D> list;
      std::vector<int32_t> stack;
      double z = 0.0;
      for (size_t g = c * kGroupsPerChunk; g < std::min(groups, (c + 1) * kGroupsPerChunk); ++g) {
        const int32_t leaf = t.leaves[g];
        build_list<D>(t, leaf, theta2, list, stack);
        for (int32_t s = t.begin[size_t(leaf)]; s < t.end[size_t(leaf)]; ++s) {
          float yi[D];
          for (int d = 0; d < D; ++d) yi[d] = t.px[d][size_t(s)];
          double zi, f[D];
          apply_list<D, K>(list, yi, inv_dof, half, zi, f);
          z += zi - 1.0;  // the point itself is in its own near list with w = 1 and zero force
          const Eigen::Index item = t.order[size_t(s)];
          for (int d = 0; d < D; ++d) repulsion(item, d) = f[d];
        }
      }
      partial[c] = z;
    });
    double total = 0.0;
    for (double v : partial) total += v;
    return total;
  }

  template <Kernel K>
  double repel(const Points& y) {
    const bool exact = options.force_exact || size_t(y.rows()) < options.exact_below;
    if (exact) return repel_exact<K>(y);
    if (y.cols() == 3) return repel_tree<3, K>(y, tree3);
    return repel_tree<2, K>(y, tree2);
  }
};

NeighbourTerm::NeighbourTerm(std::shared_ptr<const SparseAffinities> p, NeighbourTermOptions options)
    : impl_(std::make_unique<Impl>()) {
  if (!(options.dof > 0)) throw std::invalid_argument("NeighbourTerm: dof must be positive");
  if (!(options.theta >= 0)) throw std::invalid_argument("NeighbourTerm: theta must be >= 0");
  impl_->options = options;
  impl_->set_p(std::move(p));
}

NeighbourTerm::~NeighbourTerm() = default;

void NeighbourTerm::set_affinities(std::shared_ptr<const SparseAffinities> p) { impl_->set_p(std::move(p)); }
void NeighbourTerm::set_exaggeration(double factor) { impl_->exaggeration = factor; }
void NeighbourTerm::set_theta(double theta) { impl_->options.theta = theta; }
const NeighbourTermOptions& NeighbourTerm::options() const { return impl_->options; }

// ============================================================================ evaluate
double NeighbourTerm::evaluate(const Points& y, Points* gradient) {
  Impl& m = *impl_;
  if (size_t(y.rows()) != m.p->n)
    throw std::invalid_argument("NeighbourTerm: map has " + std::to_string(y.rows()) + " rows, affinities " +
                                std::to_string(m.p->n));
  if (y.cols() != 2 && y.cols() != 3) throw std::invalid_argument("NeighbourTerm: map must have 2 or 3 columns");
  const double dof = m.options.dof, e = m.exaggeration;
  const double p_log_t = m.attract(y);
  double z;
  switch (kernel_of(dof)) {
    case Kernel::kOne: z = m.repel<Kernel::kOne>(y); break;
    case Kernel::kTwo: z = m.repel<Kernel::kTwo>(y); break;
    default: z = m.repel<Kernel::kGeneral>(y); break;
  }
  // -sum p log w = (dof+1)/2 sum p log(1 + d^2/dof)
  const double cost = e * (m.p_log_p + std::log(e)) + e * 0.5 * (dof + 1.0) * p_log_t + std::log(z);
  if (gradient) {
    const double c = 2.0 * (dof + 1.0) / dof;
    gradient->resize(y.rows(), y.cols());
    *gradient = c * (e * m.attraction - m.repulsion / z);
  }
  return cost;
}

}  // namespace kith
