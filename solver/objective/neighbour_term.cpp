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
#include "solver/objective/neighbour_term.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <immintrin.h>
#include <stdexcept>
#include <vector>

#include "solver/base/portable_math.h"
#include "solver/base/parallel.h"

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
    return T(pm::pow(double(t), double(half_exponent)));  // libm's pow differs between CPUs
  }
}

constexpr size_t kRowChunk = 512;

// The AVX2 paths are used where the CPU has them; KITH_NO_AVX2 set (to anything) in the environment
// takes the plain ones, so a test can show both give the same bits on one machine.
bool have_avx2() {
  static const bool yes = __builtin_cpu_supports("avx2") && std::getenv("KITH_NO_AVX2") == nullptr;
  return yes;
}

// sum_e p[e] log(1 + u[e]) for u >= 0, vectorized: x = 1 + u = m 2^e with m in [sqrt(1/2), sqrt(2)),
// log m = 2 atanh(s), s = (m - 1)/(m + 1), |s| <= 0.172, series to s^17 (error ~1e-15). Four
// lanes summed in a fixed order; the AVX2 and the plain version do the same IEEE operations, so
// they agree to the last bit. libm's log1p here cost more than the whole attraction.
constexpr double kLn2 = 0.6931471805599453, kSqrt2 = 1.4142135623730951;
inline double log_series(double m, double e) {
  const double s = (m - 1.0) / (m + 1.0), s2 = s * s;
  const double poly =
      1.0 + s2 * (1.0 / 3 + s2 * (1.0 / 5 + s2 * (1.0 / 7 + s2 * (1.0 / 9 + s2 * (1.0 / 11 + s2 * (1.0 / 13 +
      s2 * (1.0 / 15 + s2 * (1.0 / 17))))))));
  return e * kLn2 + 2.0 * s * poly;
}
inline double log_one_plus(double u) {
  const double x = 1.0 + u;
  uint64_t bits;
  std::memcpy(&bits, &x, sizeof bits);
  double e = double(int64_t(bits >> 52) - 1023);
  bits = (bits & 0x000fffffffffffffULL) | 0x3ff0000000000000ULL;
  double m;
  std::memcpy(&m, &bits, sizeof m);
  if (m > kSqrt2) {
    m = m * 0.5;
    e = e + 1.0;
  }
  return log_series(m, e);
}
double sum_p_log1p_plain(const double* p, const double* u, size_t n) {
  double acc[4] = {0, 0, 0, 0};
  size_t k = 0;
  for (; k + 4 <= n; k += 4)
    for (int l = 0; l < 4; ++l) acc[l] = acc[l] + p[k + size_t(l)] * log_one_plus(u[k + size_t(l)]);
  double tail = 0.0;
  for (; k < n; ++k) tail += p[k] * log_one_plus(u[k]);
  return ((acc[0] + acc[1]) + (acc[2] + acc[3])) + tail;
}
__attribute__((target("avx2"))) double sum_p_log1p_avx2(const double* p, const double* u, size_t n) {
  const __m256d one = _mm256_set1_pd(1.0), half = _mm256_set1_pd(0.5), sqrt2 = _mm256_set1_pd(kSqrt2);
  const __m256i mant_mask = _mm256_set1_epi64x(0x000fffffffffffffLL), one_bits = _mm256_set1_epi64x(0x3ff0000000000000LL);
  const __m256i magic_i = _mm256_set1_epi64x(0x4330000000000000LL);  // 2^52: exact int -> double for 0 <= e < 2^52
  const __m256d magic_d = _mm256_set1_pd(4503599627370496.0 + 1023.0);
  __m256d acc = _mm256_setzero_pd();
  size_t k = 0;
  for (; k + 4 <= n; k += 4) {
    const __m256d x = _mm256_add_pd(one, _mm256_loadu_pd(u + k));
    const __m256i bits = _mm256_castpd_si256(x);
    // biased exponent (0 .. 2047) as a double, minus the bias
    __m256d e = _mm256_sub_pd(_mm256_castsi256_pd(_mm256_or_si256(_mm256_srli_epi64(bits, 52), magic_i)), magic_d);
    __m256d m = _mm256_castsi256_pd(_mm256_or_si256(_mm256_and_si256(bits, mant_mask), one_bits));
    const __m256d big = _mm256_cmp_pd(m, sqrt2, _CMP_GT_OQ);
    m = _mm256_blendv_pd(m, _mm256_mul_pd(m, half), big);
    e = _mm256_blendv_pd(e, _mm256_add_pd(e, one), big);
    const __m256d s = _mm256_div_pd(_mm256_sub_pd(m, one), _mm256_add_pd(m, one));
    const __m256d s2 = _mm256_mul_pd(s, s);
    __m256d poly = _mm256_set1_pd(1.0 / 17);
    for (double c : {1.0 / 15, 1.0 / 13, 1.0 / 11, 1.0 / 9, 1.0 / 7, 1.0 / 5, 1.0 / 3, 1.0})
      poly = _mm256_add_pd(_mm256_set1_pd(c), _mm256_mul_pd(s2, poly));
    const __m256d lg = _mm256_add_pd(_mm256_mul_pd(e, _mm256_set1_pd(kLn2)),
                                     _mm256_mul_pd(_mm256_mul_pd(_mm256_set1_pd(2.0), s), poly));
    acc = _mm256_add_pd(acc, _mm256_mul_pd(_mm256_loadu_pd(p + k), lg));
  }
  alignas(32) double lanes[4];
  _mm256_store_pd(lanes, acc);
  double tail = 0.0;
  for (; k < n; ++k) tail += p[k] * log_one_plus(u[k]);
  return ((lanes[0] + lanes[1]) + (lanes[2] + lanes[3])) + tail;
}

// ============================================================================ tree
template <int D>
struct Node {
  float c[D];       // centre of mass
  float size2;      // (largest side of the tight bounding box)^2
  float lo[D], hi[D];
  float mass;       // number of points
  int32_t begin, end;            // range of Morton-sorted points
  int32_t first_child, child_count;
};

template <int D>
struct Tree {
  // Points in Morton order, float32, structure of arrays.
  std::vector<float> px[D];
  std::vector<int32_t> order;  // sorted position -> item
  std::vector<Node<D>> nodes;  // breadth-first; a node's children are contiguous
  std::vector<int32_t> groups; // nodes whose points share one interaction list, in Morton order
};

template <int D>
void build_tree(const Points& y, size_t leaf_size, size_t group_size, Tree<D>& t) {
  const Eigen::Index n = y.rows();
  constexpr int kBits = D == 3 ? 21 : 31;
  constexpr uint64_t kDigit = (1u << D) - 1;
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
      const double v = (y(i, d) - mn[d]) * scale;
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
  t.nodes.clear();
  t.nodes.push_back(Node<D>{});
  t.nodes[0].begin = 0;
  t.nodes[0].end = int32_t(n);
  t.nodes[0].first_child = -1;
  t.nodes[0].child_count = 0;
  std::vector<int> level(1, 0);
  for (size_t q = 0; q < t.nodes.size(); ++q) {
    const int32_t b = t.nodes[q].begin, e = t.nodes[q].end;
    int lev = level[q];
    if (size_t(e - b) <= leaf_size) continue;
    // Descend levels until the range splits in two or more cells (no single-child chains).
    for (; lev < kBits; ++lev) {
      const int shift = D * (kBits - lev - 1);
      if (((keys[size_t(b)].first >> shift) & kDigit) != ((keys[size_t(e - 1)].first >> shift) & kDigit)) break;
    }
    if (lev == kBits) continue;  // all codes equal (coincident points): a leaf, however big
    const int shift = D * (kBits - lev - 1);
    t.nodes[q].first_child = int32_t(t.nodes.size());
    int32_t start = b;
    uint64_t digit = (keys[size_t(b)].first >> shift) & kDigit;
    int32_t children = 0;
    for (int32_t s = b + 1; s <= e; ++s) {
      const uint64_t dg = s < e ? (keys[size_t(s)].first >> shift) & kDigit : ~uint64_t(0);
      if (dg != digit) {
        Node<D> child{};
        child.begin = start;
        child.end = s;
        child.first_child = -1;
        child.child_count = 0;
        t.nodes.push_back(child);
        level.push_back(lev + 1);
        ++children;
        start = s;
        digit = dg;
      }
    }
    t.nodes[q].child_count = children;
  }
  // Summaries bottom-up (children have larger indices than their parent).
  const size_t m = t.nodes.size();
  std::vector<double> sum(m * D, 0.0);
  for (size_t q = m; q-- > 0;) {
    Node<D>& nd = t.nodes[q];
    float l[D], h[D];
    for (int d = 0; d < D; ++d) {
      l[d] = INFINITY;
      h[d] = -INFINITY;
    }
    if (nd.child_count == 0) {
      for (int32_t s = nd.begin; s < nd.end; ++s)
        for (int d = 0; d < D; ++d) {
          const float v = t.px[d][size_t(s)];
          sum[q * D + d] += v;
          l[d] = std::min(l[d], v);
          h[d] = std::max(h[d], v);
        }
    } else {
      for (int32_t c = nd.first_child; c < nd.first_child + nd.child_count; ++c)
        for (int d = 0; d < D; ++d) {
          sum[q * D + d] += sum[size_t(c) * D + d];
          l[d] = std::min(l[d], t.nodes[size_t(c)].lo[d]);
          h[d] = std::max(h[d], t.nodes[size_t(c)].hi[d]);
        }
    }
    const double count = double(nd.end - nd.begin);
    nd.mass = float(count);
    float side = 0.f;
    for (int d = 0; d < D; ++d) {
      nd.c[d] = float(sum[q * D + d] / count);
      nd.lo[d] = l[d];
      nd.hi[d] = h[d];
      side = std::max(side, h[d] - l[d]);
    }
    nd.size2 = side * side;
  }
  // Groups: the highest nodes with at most group_size points (or leaves), in Morton order.
  t.groups.clear();
  std::vector<int32_t> stack{0};
  while (!stack.empty()) {
    const int32_t q = stack.back();
    stack.pop_back();
    const Node<D>& nd = t.nodes[size_t(q)];
    if (nd.child_count == 0 || size_t(nd.end - nd.begin) <= group_size) {
      t.groups.push_back(q);
    } else {
      for (int32_t c = nd.first_child + nd.child_count - 1; c >= nd.first_child; --c) stack.push_back(c);
    }
  }
}

// Interaction list of one group: far nodes (centre of mass, mass) and near points (mass 1),
// padded with zero-mass entries to a multiple of kLanes.
constexpr int kLanes = 8;
template <int D>
struct InteractionList {
  std::vector<float> x[D], m;
  size_t size = 0;
  void clear() { size = 0; }
  void reserve_more(size_t extra) {
    if (size + extra > m.size()) {
      const size_t cap = std::max(2 * m.size(), size + extra + kLanes);
      for (int d = 0; d < D; ++d) x[d].resize(cap);
      m.resize(cap);
    }
  }
  void add(const float* p, float mass) {
    reserve_more(1);
    for (int d = 0; d < D; ++d) x[d][size] = p[d];
    m[size++] = mass;
  }
  void add_range(const std::vector<float>* px, int32_t b, int32_t e) {
    const size_t count = size_t(e - b);
    reserve_more(count);
    for (int d = 0; d < D; ++d) std::copy(px[d].begin() + b, px[d].begin() + e, x[d].begin() + long(size));
    std::fill(m.begin() + long(size), m.begin() + long(size + count), 1.f);
    size += count;
  }
  void pad() {
    reserve_more(kLanes);
    while (size % kLanes) {
      for (int d = 0; d < D; ++d) x[d][size] = 0.f;
      m[size++] = 0.f;
    }
  }
};

template <int D>
void build_list(const Tree<D>& t, int32_t group, float theta2, InteractionList<D>& list, std::vector<int32_t>& stack) {
  list.clear();
  const Node<D>& g = t.nodes[size_t(group)];
  const int32_t gb = g.begin, ge = g.end;
  stack.clear();
  stack.push_back(0);
  while (!stack.empty()) {
    const Node<D>& nd = t.nodes[size_t(stack.back())];
    stack.pop_back();
    const bool contains_group = nd.begin <= gb && ge <= nd.end;
    if (!contains_group) {
      float dmin2 = 0.f;
      for (int d = 0; d < D; ++d) {
        const float c = nd.c[d];
        const float gap = std::max(std::max(g.lo[d] - c, c - g.hi[d]), 0.f);
        dmin2 += gap * gap;
      }
      if (nd.size2 < theta2 * dmin2) {
        list.add(nd.c, nd.mass);
        continue;
      }
    }
    if (nd.child_count == 0) {
      list.add_range(t.px, nd.begin, nd.end);
    } else {
      for (int32_t c = nd.first_child + nd.child_count - 1; c >= nd.first_child; --c) stack.push_back(c);
    }
  }
  list.pad();
}

// Sum over the list of m w and m w t (y_i - x) for one target point; lanes keep the order fixed.
template <int D, Kernel K>
__attribute__((always_inline)) inline void apply_list(const InteractionList<D>& list, const float* yi, float inv_dof,
                                                      float half_exponent, double& z_out, double* f_out) {
  float z[kLanes] = {}, f[D][kLanes] = {};
  const size_t len = list.size;
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

// All points of one group against its list. Compiled twice (AVX2 and baseline) and chosen at run
// time; both do the same IEEE operations lane by lane (no contraction), so results are identical.
template <int D, Kernel K>
__attribute__((always_inline)) inline double apply_group_body(const Tree<D>& t, const Node<D>& g,
                                                              const InteractionList<D>& list, float inv_dof,
                                                              float half, Points& repulsion) {
  double z = 0.0;
  for (int32_t s = g.begin; s < g.end; ++s) {
    float yi[D];
    for (int d = 0; d < D; ++d) yi[d] = t.px[d][size_t(s)];
    double zi, f[D];
    apply_list<D, K>(list, yi, inv_dof, half, zi, f);
    z += zi - 1.0;  // the point itself is in its own near list with w = 1 and zero force
    const Eigen::Index item = t.order[size_t(s)];
    for (int d = 0; d < D; ++d) repulsion(item, d) = f[d];
  }
  return z;
}
template <int D, Kernel K>
__attribute__((target("avx2"))) double apply_group_avx2(const Tree<D>& t, const Node<D>& g,
                                                        const InteractionList<D>& list, float inv_dof, float half,
                                                        Points& repulsion) {
  return apply_group_body<D, K>(t, g, list, inv_dof, half, repulsion);
}
template <int D, Kernel K>
double apply_group_plain(const Tree<D>& t, const Node<D>& g, const InteractionList<D>& list, float inv_dof,
                         float half, Points& repulsion) {
  return apply_group_body<D, K>(t, g, list, inv_dof, half, repulsion);
}

}  // namespace

// ============================================================================ local order
// P with rows and columns renumbered in a recent Morton order of the map (the Barnes-Hut tree's),
// rebuilt every kLocalRefresh evaluations and whenever P changes. The attraction reads y_j for
// every neighbour j of i; in the item order of the table those reads land anywhere in the map
// (at 100,000 items most miss the near caches), in the map's Morton order mostly close by. Each
// row keeps its entries in P's own order. In this order the attraction runs in float, 8 edges
// at a time (attract_rows_*): the same bits for any thread count and with or without AVX2, within
// about 1e-6 relative of the double sum in table order (tests/test_solver_gradients.cpp).
constexpr int kLocalRefresh = 50;
constexpr size_t kLocalAbove = 20000;  // below this the map fits in the near caches anyway

struct LocalOrder {
  bool ready = false;
  int age = 0;                  // evaluations since the last rebuild
  std::vector<int32_t> order;   // position -> item
  SparseAffinities p;           // P[order, order]
  std::vector<float> pf;        // p.val in float, for the float attraction
  std::vector<float> yf[3];     // the map's columns in `order`, float

  void gather(const Points& m) {
    for (Eigen::Index d = 0; d < m.cols(); ++d) {
      yf[d].resize(order.size());
      for (size_t s = 0; s < order.size(); ++s) yf[d][s] = float(m(order[s], d));
    }
  }
  void rebuild(const SparseAffinities& P, const std::vector<int32_t>& new_order) {
    order = new_order;
    std::vector<int32_t> position(order.size());
    for (size_t s = 0; s < order.size(); ++s) position[size_t(order[s])] = int32_t(s);
    p.n = P.n;
    p.row_ptr.assign(P.n + 1, 0);
    p.col.resize(P.col.size());
    p.val.resize(P.val.size());
    int64_t at = 0;
    for (size_t s = 0; s < order.size(); ++s) {
      const size_t i = size_t(order[s]);
      for (int64_t e = P.row_ptr[i]; e < P.row_ptr[i + 1]; ++e, ++at) {
        p.col[size_t(at)] = position[size_t(P.col[size_t(e)])];
        p.val[size_t(at)] = P.val[size_t(e)];
      }
      p.row_ptr[s + 1] = at;
    }
    pf.assign(p.val.begin(), p.val.end());
    ready = true;
    age = 0;
  }
  void forget() {
    ready = false;
    p = SparseAffinities{};
    pf.clear();
    order.clear();
  }
};

// Attraction of rows [r0, r1) in the local order, in float: each row's edges in lanes of kLanes
// (a short row's last lanes one by one), the lanes added in double in a fixed order. Writes
// u = d^2 / dof of every edge (from e0 on) for the cost. Compiled twice like the repulsion;
// both builds do the same IEEE operations lane by lane.
template <int D>
__attribute__((always_inline)) inline void attract_rows_body(const LocalOrder& L, size_t r0, size_t r1,
                                                             float inv_dof, int64_t e0, double* us, Points& out) {
  const int32_t* col = L.p.col.data();
  const float* pv = L.pf.data();
  const float* ys[D];
  for (int d = 0; d < D; ++d) ys[d] = L.yf[d].data();
  for (size_t i = r0; i < r1; ++i) {
    float yi[D];
    for (int d = 0; d < D; ++d) yi[d] = ys[d][i];
    float f[D][kLanes] = {};
    const int64_t end = L.p.row_ptr[i + 1];
    int64_t k = L.p.row_ptr[i];
    for (; k + kLanes <= end; k += kLanes)
      for (int l = 0; l < kLanes; ++l) {
        const int32_t j = col[k + l];
        float diff[D], d2 = 0.f;
        for (int d = 0; d < D; ++d) {
          diff[d] = yi[d] - ys[d][j];
          d2 += diff[d] * diff[d];
        }
        const float u = d2 * inv_dof;
        const float pt = pv[k + l] / (1.f + u);
        for (int d = 0; d < D; ++d) f[d][l] += pt * diff[d];
        us[k + l - e0] = double(u);
      }
    for (int l = 0; k < end; ++k, ++l) {
      const int32_t j = col[k];
      float diff[D], d2 = 0.f;
      for (int d = 0; d < D; ++d) {
        diff[d] = yi[d] - ys[d][j];
        d2 += diff[d] * diff[d];
      }
      const float u = d2 * inv_dof;
      const float pt = pv[k] / (1.f + u);
      for (int d = 0; d < D; ++d) f[d][l] += pt * diff[d];
      us[k - e0] = double(u);
    }
    for (int d = 0; d < D; ++d) {
      double sum = 0.0;
      for (int l = 0; l < kLanes; ++l) sum += double(f[d][l]);
      out(L.order[i], d) = sum;
    }
  }
}
template <int D>
__attribute__((target("avx2"))) void attract_rows_avx2(const LocalOrder& L, size_t r0, size_t r1, float inv_dof,
                                                       int64_t e0, double* us, Points& out) {
  attract_rows_body<D>(L, r0, r1, inv_dof, e0, us, out);
}
template <int D>
void attract_rows_plain(const LocalOrder& L, size_t r0, size_t r1, float inv_dof, int64_t e0, double* us,
                        Points& out) {
  attract_rows_body<D>(L, r0, r1, inv_dof, e0, us, out);
}

// ============================================================================ Impl
struct NeighbourTerm::Impl {
  std::shared_ptr<const SparseAffinities> p;
  NeighbourTermOptions options;
  double exaggeration = 1.0;
  double p_log_p = 0.0;  // sum p log p, cached per P
  Points attraction, repulsion;
  Tree<2> tree2;
  Tree<3> tree3;
  LocalOrder local;

  // After an evaluation that built a tree: renumber P in the tree's order now and then.
  void refresh_local(const Points& y) {
    if (size_t(y.rows()) < kLocalAbove) return;
    const bool tree = !(options.force_exact || size_t(y.rows()) < options.exact_below);
    if (!tree) return;
    if (local.ready && ++local.age < kLocalRefresh) return;
    local.rebuild(*p, y.cols() == 3 ? tree3.order : tree2.order);
  }

  void set_p(std::shared_ptr<const SparseAffinities> np) {
    if (!np) throw std::invalid_argument("NeighbourTerm: null affinities");
    p = std::move(np);
    local.forget();
    double s = 0.0;
    for (double v : p->val)
      if (v > 0) s += v * pm::log(v);
    p_log_p = s;
  }

  // attraction(i) = sum_j p_ij t_ij (y_i - y_j); returns sum_ij p_ij log(1 + d_ij^2 / dof).
  // Above kLocalAbove items (once the tree gave an order) in float over the local order
  // (attract_rows_*), else in double over P as given.
  double attract(const Points& y) {
    const Eigen::Index n = y.rows(), dims = y.cols();
    attraction.resize(n, dims);
    const bool use_local = local.ready && local.order.size() == size_t(n);
    if (use_local) local.gather(y);
    const SparseAffinities& P = use_local ? local.p : *p;
    const size_t chunks = (size_t(n) + kRowChunk - 1) / kRowChunk;
    std::vector<double> partial(chunks, 0.0);
    const double inv_dof = 1.0 / options.dof;
    const bool avx2 = have_avx2();
    parallel_for(chunks, options.threads, [&](size_t c) {
      const size_t r0 = c * kRowChunk, r1 = std::min(size_t(n), (c + 1) * kRowChunk);
      const int64_t e0 = P.row_ptr[r0];
      std::vector<double> us(size_t(P.row_ptr[r1] - e0));
      if (use_local) {
        const float fi = float(inv_dof);
        if (dims == 3)
          avx2 ? attract_rows_avx2<3>(local, r0, r1, fi, e0, us.data(), attraction)
               : attract_rows_plain<3>(local, r0, r1, fi, e0, us.data(), attraction);
        else
          avx2 ? attract_rows_avx2<2>(local, r0, r1, fi, e0, us.data(), attraction)
               : attract_rows_plain<2>(local, r0, r1, fi, e0, us.data(), attraction);
      } else {
        for (size_t i = r0; i < r1; ++i) {
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
            us[size_t(e - e0)] = u;
          }
          for (Eigen::Index d = 0; d < dims; ++d) attraction(Eigen::Index(i), d) = f[d];
        }
      }
      partial[c] = avx2 ? sum_p_log1p_avx2(&P.val[size_t(e0)], us.data(), us.size())
                        : sum_p_log1p_plain(&P.val[size_t(e0)], us.data(), us.size());
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
    constexpr size_t kLeafSize = 8, kGroupSize = 64, kGroupsPerChunk = 4;
    build_tree<D>(y, kLeafSize, kGroupSize, t);
    const Eigen::Index n = y.rows();
    repulsion.setZero(n, D);
    const size_t groups = t.groups.size();
    const size_t chunks = (groups + kGroupsPerChunk - 1) / kGroupsPerChunk;
    std::vector<double> partial(chunks, 0.0);
    const float theta2 = float(options.theta * options.theta);
    const float inv_dof = float(1.0 / options.dof), half = float((options.dof + 1.0) / 2.0);
    const bool avx2 = have_avx2();
    parallel_for(chunks, options.threads, [&](size_t c) {
      InteractionList<D> list;
      std::vector<int32_t> stack;
      double z = 0.0;
      for (size_t g = c * kGroupsPerChunk; g < std::min(groups, (c + 1) * kGroupsPerChunk); ++g) {
        const int32_t group = t.groups[g];
        build_list<D>(t, group, theta2, list, stack);
        const Node<D>& nd = t.nodes[size_t(group)];
        z += avx2 ? apply_group_avx2<D, K>(t, nd, list, inv_dof, half, repulsion)
                  : apply_group_plain<D, K>(t, nd, list, inv_dof, half, repulsion);
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
std::shared_ptr<const SparseAffinities> NeighbourTerm::affinities() const { return impl_->p; }
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
  m.refresh_local(y);
  // -sum p log w = (dof+1)/2 sum p log(1 + d^2/dof)
  const double cost = e * (m.p_log_p + pm::log(e)) + e * 0.5 * (dof + 1.0) * p_log_t + pm::log(z);
  if (gradient) {
    const double c = 2.0 * (dof + 1.0) / dof;
    gradient->resize(y.rows(), y.cols());
    *gradient = c * (e * m.attraction - m.repulsion / z);
  }
  return cost;
}

}  // namespace kith
