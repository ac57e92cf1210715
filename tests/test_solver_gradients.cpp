// Gradient checks for the neighbour term against central finite differences, and the fast
// repulsion paths against the slow obvious one.
#include <doctest/doctest.h>

#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <random>
#include <string>

#include "solver/features/affinities.h"
#include "solver/objective/neighbour_term.h"
#include "solver/features/neighbours.h"
#include "tests/approx.h"

namespace {

kith::Points random_points(int n, int d, uint64_t seed, double scale = 1.0) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0.0, scale);
  kith::Points x(n, d);
  for (int i = 0; i < n; ++i)
    for (int c = 0; c < d; ++c) x(i, c) = g(rng) + (i % 3) * 2.0 * scale;  // three loose clusters
  return x;
}

std::shared_ptr<const kith::SparseAffinities> affinities_for(const kith::Points& x, double perplexity) {
  const size_t k = std::min<size_t>(size_t(x.rows()) - 1, size_t(3 * perplexity));
  auto graph = kith::find_neighbours(x, k);
  kith::AffinityOptions o;
  o.perplexity = perplexity;
  return std::make_shared<kith::SparseAffinities>(kith::joint_affinities(graph, o));
}

}  // namespace

TEST_CASE("solver: neighbour term gradient equals central finite differences (exact path)") {
  // Step and tolerance: central differences have O(h^2) truncation error; with h = 1e-5 and
  // costs of order 1 the rounding error is ~1e-11 / h = 1e-6 in the worst element.
  constexpr double kStep = 1e-5, kAbsTol = 1e-6, kRelTol = 1e-5;
  const kith::Points x = random_points(60, 5, 7);
  auto p = affinities_for(x, 8.0);
  for (int dims : {2, 3})
    for (double dof : {1.0, 2.0, 0.7})
      for (double exaggeration : {1.0, 12.0}) {
        CAPTURE(dims);
        CAPTURE(dof);
        CAPTURE(exaggeration);
        kith::NeighbourTermOptions o;
        o.dof = dof;
        o.force_exact = true;
        kith::NeighbourTerm term(p, o);
        term.set_exaggeration(exaggeration);
        const kith::Points y = random_points(60, dims, 11, 0.7);
        kith::Points g;
        term.evaluate(y, &g);
        kith::test::assert_near(g, kith::test::central_differences(term, y, kStep), kAbsTol, kRelTol, "gradient");
      }
}

TEST_CASE("solver: cost at exaggeration 1 is KL(P||Q) computed the obvious way") {
  const kith::Points x = random_points(40, 4, 3);
  auto p = affinities_for(x, 6.0);
  const kith::Points y = random_points(40, 3, 5);
  for (double dof : {1.0, 2.0}) {
    kith::NeighbourTermOptions o;
    o.dof = dof;
    o.force_exact = true;
    kith::NeighbourTerm term(p, o);
    // Dense Q by definition: w_ij = (1 + d^2/dof)^(-(dof+1)/2), q = w / sum w.
    const Eigen::Index n = y.rows();
    Eigen::MatrixXd w(n, n);
    for (Eigen::Index i = 0; i < n; ++i)
      for (Eigen::Index j = 0; j < n; ++j)
        w(i, j) = i == j ? 0.0 : std::pow(1.0 + (y.row(i) - y.row(j)).squaredNorm() / dof, -(dof + 1) / 2);
    const double z = w.sum();
    double kl = 0.0;
    for (size_t i = 0; i < p->n; ++i)
      for (int64_t e = p->row_ptr[i]; e < p->row_ptr[i + 1]; ++e) {
        const double pij = p->val[size_t(e)];
        kl += pij * std::log(pij / (w(Eigen::Index(i), p->col[size_t(e)]) / z));
      }
    CHECK(term.evaluate(y, nullptr) == doctest::Approx(kl).epsilon(1e-12));
  }
}

TEST_CASE("solver: Barnes-Hut with theta = 0 equals the exact repulsion") {
  // The tree works in float32; the exact path in double. kRelTol allows float rounding.
  constexpr double kRelTol = 2e-5;
  const kith::Points x = random_points(700, 6, 21);
  auto p = affinities_for(x, 10.0);
  for (int dims : {2, 3})
    for (double dof : {1.0, 2.0, 1.5}) {
      CAPTURE(dims);
      CAPTURE(dof);
      const kith::Points y = random_points(700, dims, 4, 3.0);
      kith::NeighbourTermOptions exact, tree;
      exact.dof = tree.dof = dof;
      exact.force_exact = true;
      tree.exact_below = 0;
      tree.theta = 0.0;
      kith::NeighbourTerm a(p, exact), b(p, tree);
      kith::Points ga, gb;
      const double ca = a.evaluate(y, &ga), cb = b.evaluate(y, &gb);
      CHECK(cb == doctest::Approx(ca).epsilon(kRelTol));
      const double scale = ga.cwiseAbs().maxCoeff();
      kith::test::assert_near(gb, ga, kRelTol * scale, 0.0, "gradient theta=0 vs exact");
    }
}

TEST_CASE("solver: Barnes-Hut at theta = 0.5 is close to exact, and its own gradient is consistent") {
  const kith::Points x = random_points(2000, 6, 23);
  auto p = affinities_for(x, 15.0);
  const kith::Points y = random_points(2000, 3, 9, 4.0);
  kith::NeighbourTermOptions exact, tree;
  exact.force_exact = true;
  tree.exact_below = 0;
  kith::NeighbourTerm a(p, exact), b(p, tree);
  kith::Points ga, gb;
  const double ca = a.evaluate(y, &ga), cb = b.evaluate(y, &gb);
  // Common practice: theta = 0.5 keeps the repulsion within about 1% of exact.
  CHECK(cb == doctest::Approx(ca).epsilon(1e-3));
  CHECK((ga - gb).norm() / ga.norm() < 0.02);
}

TEST_CASE("solver: the same map and gradient whatever the thread count") {
  const kith::Points x = random_points(3000, 5, 31);
  auto p = affinities_for(x, 10.0);
  const kith::Points y = random_points(3000, 3, 2, 5.0);
  kith::Points g1, g2;
  double c1, c2;
  {
    kith::NeighbourTermOptions o;
    o.threads = 1;
    kith::NeighbourTerm t(p, o);
    c1 = t.evaluate(y, &g1);
  }
  {
    kith::NeighbourTermOptions o;
    o.threads = 3;
    kith::NeighbourTerm t(p, o);
    c2 = t.evaluate(y, &g2);
  }
  CHECK(c1 == c2);
  CHECK((g1.array() == g2.array()).all());
}

namespace {
// 24,000 items (above the local-order threshold) with random sparse P, rows of 12 .. 18 edges
// (full lanes and a tail).
std::shared_ptr<kith::SparseAffinities> random_sparse_p(int n) {
  std::mt19937_64 rng(5);
  std::uniform_int_distribution<int> pick(0, n - 1);
  auto p = std::make_shared<kith::SparseAffinities>();
  p->n = size_t(n);
  p->row_ptr.assign(size_t(n) + 1, 0);
  double total = 0.0;
  for (int i = 0; i < n; ++i) {
    for (int e = 0; e < 12 + i % 7; ++e) {
      int j = pick(rng);
      if (j == i) j = (j + 1) % n;
      p->col.push_back(j);
      p->val.push_back(1.0 + (e % 5));
      total += p->val.back();
    }
    p->row_ptr[size_t(i) + 1] = int64_t(p->col.size());
  }
  for (double& v : p->val) v /= total;
  return p;
}
constexpr int kLocalItems = 24000;
}  // namespace

TEST_CASE("solver: float attraction gradient bytes (child process)" * doctest::skip()) {
  const char* path = std::getenv("KITH_GRADIENT_BYTES");
  if (!path) return;
  kith::NeighbourTerm term(random_sparse_p(kLocalItems), {});
  const kith::Points y = random_points(kLocalItems, 3, 11, 5.0);
  kith::Points g;
  term.evaluate(y, &g);
  term.evaluate(y, &g);
  std::ofstream(path, std::ios::binary).write(reinterpret_cast<const char*>(g.data()), std::streamsize(g.size() * 8));
}

TEST_CASE("solver: attraction in float over the map's own order matches the double sum in table order") {
  // Above 20,000 items the attraction visits rows in the Barnes-Hut tree's Morton order of the
  // previous evaluation (cache locality) and sums in float, 8 edges at a time. The first
  // evaluation runs the obvious double loop in table order: the later ones must agree with it to
  // float rounding (kRelTol, relative to the largest gradient entry; measured about 1e-7), give
  // the same bits again and again, for 1 or 2 threads, and the same cost to float rounding.
  constexpr double kRelTol = 1e-5, kCostRelTol = 1e-6;
  const int n = kLocalItems;
  const auto p = random_sparse_p(n);
  const kith::Points y = random_points(n, 3, 11, 5.0);
  kith::Points first_local;
  for (int threads : {1, 2}) {
    kith::NeighbourTermOptions o;
    o.threads = threads;
    kith::NeighbourTerm term(p, o);
    kith::Points g1, g2, g3;
    const double c1 = term.evaluate(y, &g1);  // table order, double; the tree's order is kept
    const double c2 = term.evaluate(y, &g2);  // the map's order, float
    term.evaluate(y, &g3);
    const double scale = g1.cwiseAbs().maxCoeff();
    MESSAGE("largest difference " << (g2 - g1).cwiseAbs().maxCoeff() / scale << " of the largest entry");
    CHECK((g2 - g1).cwiseAbs().maxCoeff() <= kRelTol * scale);
    CHECK(g2.cwiseEqual(g3).all());
    CHECK(std::abs(c1 - c2) <= kCostRelTol * std::abs(c1));
    if (threads == 1) first_local = g2;
    else CHECK(g2.cwiseEqual(first_local).all());
  }
}

TEST_CASE("solver: float attraction gives the same bits without AVX2") {
  // The test binary runs itself with KITH_NO_AVX2=1 (the plain builds of the vector paths).
  kith::NeighbourTerm term(random_sparse_p(kLocalItems), {});
  const kith::Points y = random_points(kLocalItems, 3, 11, 5.0);
  kith::Points g;
  term.evaluate(y, &g);
  term.evaluate(y, &g);
  const std::string out = kith::test::temp_dir("gradient-bytes") + "/g.bin";
  const std::string self = std::filesystem::read_symlink("/proc/self/exe").string();
  const std::string command = "env KITH_GRADIENT_BYTES=" + out + " KITH_NO_AVX2=1 '" + self +
                              "' --no-skip '-tc=solver: float attraction gradient bytes (child process)' >/dev/null 2>&1";
  INFO(command);
  REQUIRE(std::system(command.c_str()) == 0);
  std::ifstream in(out, std::ios::binary);
  std::string bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  REQUIRE(bytes.size() == size_t(g.size()) * 8);
  CHECK(std::memcmp(bytes.data(), g.data(), bytes.size()) == 0);
}
