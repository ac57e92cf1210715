// The solver against scikit-learn 1.2 (Debian's python3-sklearn), on scikit-learn's bundled digits
// data (load_digits, the UCI optical recognition of handwritten digits set). Each check names the
// scikit-learn function it compares with; the scripts are in tests/reference/solver_digits.py.
#include <doctest/doctest.h>

#include <cstdio>
#include <fstream>
#include <map>
#include <sstream>

#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/measures/health.h"
#include "solver/features/neighbours.h"
#include "tests/approx.h"

namespace {

kith::Points parse_matrix(const std::string& text) {
  std::vector<std::vector<double>> rows;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) {
    std::istringstream ls(line);
    std::vector<double> r;
    double v;
    while (ls >> v) r.push_back(v);
    if (!r.empty()) rows.push_back(r);
  }
  REQUIRE(!rows.empty());
  kith::Points m(Eigen::Index(rows.size()), Eigen::Index(rows[0].size()));
  for (size_t i = 0; i < rows.size(); ++i) {
    REQUIRE(rows[i].size() == rows[0].size());
    for (size_t j = 0; j < rows[i].size(); ++j) m(Eigen::Index(i), Eigen::Index(j)) = rows[i][j];
  }
  return m;
}

void write_matrix(const std::string& path, const kith::Points& m) {
  std::FILE* f = std::fopen(path.c_str(), "w");
  REQUIRE(f != nullptr);
  for (Eigen::Index i = 0; i < m.rows(); ++i) {
    for (Eigen::Index j = 0; j < m.cols(); ++j) std::fprintf(f, "%s%.17g", j ? " " : "", m(i, j));
    std::fprintf(f, "\n");
  }
  std::fclose(f);
}

const kith::Points& digits() {
  static const kith::Points x = parse_matrix(kith::test::run_reference("solver_digits.py", "data"));
  return x;
}

double number(const std::string& s) { return std::stod(s); }

}  // namespace

TEST_CASE("solver reference: symmetrized P equals scikit-learn's _joint_probabilities_nn on the same neighbours") {
  if (!kith::test::reference_python_available()) return;
  const kith::Points& x = digits();
  REQUIRE(x.rows() == 1797);
  const size_t k = 90;  // floor(3 * perplexity)
  const auto g = kith::find_neighbours(x, k);
  kith::AffinityOptions o;
  o.perplexity = 30;
  const auto p = kith::joint_affinities(g, o);

  const std::string dir = kith::test::temp_dir("joint-p");
  kith::Points dist(Eigen::Index(g.n), Eigen::Index(k)), idx(Eigen::Index(g.n), Eigen::Index(k));
  for (size_t i = 0; i < g.n; ++i)
    for (size_t c = 0; c < k; ++c) {
      dist(Eigen::Index(i), Eigen::Index(c)) = g.distance2[i * k + c];
      idx(Eigen::Index(i), Eigen::Index(c)) = g.index[i * k + c];
    }
  write_matrix(dir + "/dist.txt", dist);
  write_matrix(dir + "/idx.txt", idx);
  const kith::Points ref =
      parse_matrix(kith::test::run_reference("solver_digits.py", "joint_p " + dir + "/dist.txt " + dir + "/idx.txt 30"));
  std::map<std::pair<int, int>, double> theirs;
  for (Eigen::Index r = 0; r < ref.rows(); ++r) theirs[{int(ref(r, 0)), int(ref(r, 1))}] = ref(r, 2);
  CHECK(theirs.size() == p.col.size());
  // scikit-learn rounds distances to float32 and stops its binary search at |H - log perplexity|
  // <= 1e-5 (nats), i.e. a perplexity off by up to 3e-4; kith works in double and stops at
  // |perplexity - 30| <= 1e-5. The resulting beta difference moves far neighbours' p_ij by up to
  // ~1.4e-4 relative on this data (measured); kRelTol leaves room for that, no more.
  constexpr double kRelTol = 3e-4;
  double worst = 0.0;
  for (size_t i = 0; i < p.n; ++i)
    for (int64_t e = p.row_ptr[i]; e < p.row_ptr[i + 1]; ++e) {
      const auto it = theirs.find({int(i), p.col[size_t(e)]});
      REQUIRE_MESSAGE(it != theirs.end(), "entry (" << i << ", " << p.col[size_t(e)] << ") missing in scikit-learn's P");
      worst = std::max(worst, std::abs(p.val[size_t(e)] - it->second) / it->second);
    }
  MESSAGE("largest relative difference from scikit-learn's P: " << worst);
  CHECK(worst <= kRelTol);
}

TEST_CASE("solver reference: trustworthiness equals sklearn.manifold.trustworthiness to 1e-9") {
  if (!kith::test::reference_python_available()) return;
  // Features: digits reduced by PCA to 20 dims. On the raw pixels (small integers) many feature
  // distances tie exactly, and scikit-learn's ranks of tied items follow numpy's unstable
  // argsort, which no other program can reproduce; with continuous features there are no ties.
  const kith::Points x = kith::fit_pca(digits(), 20).project(digits());
  const kith::Points y = kith::pca_start(x, 3, 1.0);  // any map will do; a PCA map is a fair one
  const std::string dir = kith::test::temp_dir("trust");
  write_matrix(dir + "/x.txt", x);
  write_matrix(dir + "/y.txt", y);
  for (int k : {5, 12}) {
    CAPTURE(k);
    const double theirs =
        number(kith::test::run_reference("solver_digits.py", "trust " + dir + "/x.txt " + dir + "/y.txt " + std::to_string(k)));
    CHECK(std::abs(kith::trustworthiness(x, y, k) - theirs) <= 1e-9);
  }
}

TEST_CASE("solver reference: digits 3-D, dof 2, same schedule: KL and trustworthiness at least scikit-learn's TSNE") {
  if (!kith::test::reference_python_available()) return;
  // Both get the same prepared features (digits, PCA to 50 dims as kith prepares them) and the
  // same PCA start; scikit-learn's TSNE(method='barnes_hut', learning_rate='auto', perplexity=30)
  // runs the schedule kith's Schedule copies (exaggeration 12 for 250 steps, momentum 0.5 then
  // 0.8, rate max(N/48, 50)). Iterations: kIterations for both, fewer than the usual 1000 to keep
  // this test's run time reasonable (the 1000-step comparison is in tests/bench/).
  constexpr int kIterations = 500;
  kith::FeaturePrepOptions prep;
  const kith::Points x = kith::prepare_features(digits(), prep);
  kith::FitOptions o;
  o.dims = 3;
  o.dof = 2;
  o.iterations = kIterations;
  const kith::FitResult fit = kith::fit_map(digits(), o);
  kith::test::assert_near(fit.features, x, 1e-12, 0.0, "prepared features");
  const kith::Points start = kith::pca_start(x, 3, 1e-4, o.seed);

  const std::string dir = kith::test::temp_dir("tsne");
  write_matrix(dir + "/x.txt", x);
  write_matrix(dir + "/start.txt", start);
  write_matrix(dir + "/kith.txt", fit.map);
  const kith::Points theirs = parse_matrix(kith::test::run_reference(
      "solver_digits.py", "tsne " + dir + "/x.txt " + dir + "/start.txt 2 " + std::to_string(kIterations)));
  write_matrix(dir + "/sklearn.txt", theirs);
  // KL with scikit-learn's own P (91 neighbours; kith used 90) and exact Q: if anything this
  // favours scikit-learn's map.
  const double kl_kith = number(kith::test::run_reference("solver_digits.py", "kl " + dir + "/x.txt " + dir + "/kith.txt 2"));
  const double kl_sk = number(kith::test::run_reference("solver_digits.py", "kl " + dir + "/x.txt " + dir + "/sklearn.txt 2"));
  const double trust_kith = kith::trustworthiness(x, fit.map, 5), trust_sk = kith::trustworthiness(x, theirs, 5);
  MESSAGE("KL kith " << kl_kith << " vs scikit-learn " << kl_sk << "; trustworthiness(5) kith " << trust_kith
                     << " vs scikit-learn " << trust_sk << "; kith's own final KL " << fit.summary.kl);
  CHECK(kl_kith <= 1.02 * kl_sk);
  CHECK(trust_kith >= trust_sk - 0.005);
}
