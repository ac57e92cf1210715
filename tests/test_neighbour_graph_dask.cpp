// scripts/neighbour_graph.py on a Dask LocalCluster of 2 workers, 20,000 x 64 invented rows in
// three shards: its graph against scikit-learn 1.2's exact NearestNeighbors (Debian's
// python3-sklearn, algorithm='brute'), and kith's map from that graph against its map from the
// features themselves (same seed), compared by shape. The outside checks are tests/reference/neighbour_graph_check.py.
#include <doctest/doctest.h>

#include <cstdlib>
#include <filesystem>
#include <sstream>
#include <string>

#include "tests/approx.h"
#include "tests/sessions_support.h"

TEST_CASE("neighbour graph dask: 20,000 x 64 on a LocalCluster of 2 gives the exact graph and kith's map") {
  if (!kith::test::reference_python_available() ||
      std::system("/usr/bin/python3 -c 'import dask, distributed' >/dev/null 2>&1") != 0) {
    MESSAGE(
        "skipped: Debian's python3-dask and python3-distributed are not installed (bash scripts/quick.sh "
        "build installs them)");
    return;
  }
  const std::string dir = kith::test::temp_dir("kith-graph-dask");
  kith::test::run_reference("neighbour_graph_check.py", "write " + dir + " 20000 64 11");
  const std::string graph = dir + "/graph-indices.npy";
  const kith::test::KithRun made =
      kith::test::run_shell("/usr/bin/python3 " + std::string(KITH_SOURCE_DIR) + "/scripts/neighbour_graph.py " + dir +
                            "/shards -o " + graph + " --workers 2");
  CAPTURE(made.output);
  REQUIRE(made.code == 0);
  // An existing output is refused before any work.
  CHECK(kith::test::run_shell("/usr/bin/python3 " + std::string(KITH_SOURCE_DIR) + "/scripts/neighbour_graph.py " +
                              dir + "/x.npy -o " + graph)
            .code == 2);

  // The graph is exact: the same neighbours, in the same order, as scikit-learn's brute-force
  // search on a seeded sample of 2,000 rows, and distances equal to rounding (measured 1.8e-13
  // at most; kDistance allows about 50 times that).
  constexpr double kDistance = 1e-11;
  std::istringstream agree(
      kith::test::run_reference("neighbour_graph_check.py", "graph " + dir + "/x.npy " + graph + " 2000"));
  double same = 0, worst = 1;
  agree >> same >> worst;
  CHECK(same == 1.0);
  CHECK(worst < kDistance);

  // kith's map from the graph against its map from the features. The rows have rank 40, so the
  // PCA to 50 dimensions kith makes keeps every distance, and both maps start from the same PCA
  // start. They are not the same to the bit, for two reasons: at 20,000 items kith's own search
  // is HNSW (exact below 20,000, solver/features/neighbours.h), whose neighbours are nearly but
  // not all the exact ones; and kith squares the script's distances, square roots of sums in
  // numpy's order, so the last bits of P differ. t-SNE's steps carry both into a slightly
  // different layout of the same shape, so the check is scipy.spatial.procrustes disparity
  // (0 = the same shape up to shift, scale, rotation and mirroring; unrelated layouts give
  // nearly 1, the measure being the share of the sum of squares the best fit leaves). Measured 0.051 on a loaded
  // machine; kSameShape allows twice that.
  constexpr double kSameShape = 0.1;
  const std::string common = " --iterations 500 --seed 3 --threads 2 --quiet";
  REQUIRE(kith::test::run_kith("fit " + dir + "/x.npy -o " + dir + "/features.npy" + common).code == 0);
  REQUIRE(
      kith::test::run_kith("fit " + dir + "/x.npy --neighbours " + graph + " -o " + dir + "/graph.npy" + common).code ==
      0);
  std::istringstream shape(kith::test::run_reference("neighbour_graph_check.py",
                                                     "procrustes " + dir + "/features.npy " + dir + "/graph.npy"));
  double disparity = 1;
  int bytes_equal = 0;
  shape >> disparity >> bytes_equal;
  MESSAGE("procrustes disparity " << disparity << ", bytes equal " << bytes_equal);
  CHECK(disparity >= 0.0);
  CHECK(disparity < kSameShape);
}
