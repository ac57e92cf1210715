// Feature preparation before the neighbour search, and the PCA start of the map.
//   metric:       under Metric::kCosine each row is first divided by its length (unit_rows,
//                 neighbours.h), so every later step -- PCA, the neighbour search, the affinities,
//                 the health figures -- compares items by the Euclidean distance of unit rows,
//                 whose square is 2 (1 - cos): the cosine metric is decided here, once
//   standardize:  x_ic <- (x_ic - mean_c) / std_c   (population std; constant columns left at 0)
//   reduce:       when F > max_dims, project the centred features on their first max_dims
//                 principal axes (eigenvectors of the covariance, largest variance first)
//   pca start:    Y = centred X projected on the first `dims` axes, scaled so that column 0 has
//                 standard deviation 1e-4 (as scikit-learn's init='pca' does)
// Signs of principal axes are fixed (largest-magnitude loading positive), so results are
// deterministic. The eigen decomposition lives in pca.cpp. Pure functions; any thread.
#pragma once
#include <cstdint>
#include <string>

#include "solver/base/map_parameters.h"
#include "solver/base/points.h"

namespace kith {

struct FeaturePrepOptions {
  bool standardize = false;  // scale every feature column to unit variance (default: false)
  int max_dims = 50;         // PCA down to this many dims when wider; 0 = never (default: 50)
  Metric metric = Metric::kEuclidean;  // kCosine: rows scaled to length 1 after standardizing (default: euclidean)
};

struct Pca {
  Eigen::RowVectorXd mean;     // 1 x F
  Eigen::MatrixXd axes;        // F x m, columns are unit principal axes
  Eigen::VectorXd variances;   // m, population variances along the axes
  Points project(const Points& x) const;  // (x - mean) * axes
};

// The preparation every map path uses: the defaults with the map's metric.
inline FeaturePrepOptions map_prep(Metric metric) {
  FeaturePrepOptions o;
  o.metric = metric;
  return o;
}

// The first m principal axes of x's rows (m <= F).
Pca fit_pca(const Points& x, int m);

// Standardization, the metric's unit rows and reduction as above (in that order); throws
// std::invalid_argument for a row without direction under cosine; `note` (if given) gets a one-line description.
Points prepare_features(const Points& x, const FeaturePrepOptions& options, std::string* note = nullptr);

// The PCA start of a map with `dims` columns; column 0 has standard deviation `first_std`.
// Columns beyond the number of features (e.g. 2 features, a 3-D map) get seeded Gaussian noise of
// that same standard deviation, so that they can unfold.
Points pca_start(const Points& x, int dims, double first_std = 1e-4, uint64_t seed = 42);

// Classical (Torgerson) scaling of a matrix of squared distances d2 (n x n, symmetric): the
// double-centred B = -1/2 J d2 J, its `dims` largest eigenvalues l_c and unit eigenvectors v_c
// (signs fixed as for PCA), coordinates v_c sqrt(max(l_c, 0)). Euclidean distances are recovered
// exactly when d2 comes from points in `dims` dimensions.
Points classical_scaling(const Eigen::MatrixXd& d2, int dims);

}  // namespace kith
