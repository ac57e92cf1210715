// MapAlignment: the similarity transform that best lays one map over another (orthogonal
// Procrustes with scale; Schoenemann 1966, Gower 1975):
//   minimise sum_i | s * r_i R + t - c_i |^2  over rotation/reflection R (R^T R = I), scale s > 0
//   and translation t, for reference rows r_i and current rows c_i (row vectors).
//   With A, B the centred maps and A^T B = U S V^T (SVD):  R = U V^T,  s = trace(S) / |A|_F^2,
//   t = mean(c) - s * mean(r) R.
// Reflections are allowed: a mirrored map is the same map. Used to compare the judgment-free
// reference map with the current one. Pure functions; any thread. (SVD: kept in its own .cpp.)
#pragma once
#include <Eigen/Core>

#include "solver/base/points.h"

namespace kith {

struct MapAlignment {
  Eigen::MatrixXd rotation;        // dims x dims
  Eigen::RowVectorXd translation;  // dims
  double scale = 1.0;
  double rms = 0.0;                // sqrt(mean_i |aligned r_i - c_i|^2)
};

// Throws std::invalid_argument if the maps differ in shape or are empty.
MapAlignment align_maps(const Points& reference, const Points& current, bool allow_scale = true);
// s * p R + t, row by row.
Points apply_alignment(const MapAlignment& alignment, const Points& points);

}  // namespace kith
