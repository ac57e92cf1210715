// Points: an N x d matrix, one item per row. Used for map positions (d = 2 or 3) and features.
// Row-major so that an item's coordinates are contiguous, which the neighbour searches, the
// Barnes-Hut tree and OpenGL uploads all want. A plain value type: the usual Eigen rules apply to
// sharing between threads (const access from many threads is fine).
#pragma once
#include <Eigen/Core>

namespace kith {

using Points = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

}  // namespace kith
