// Orthogonal Procrustes alignment (see map_alignment.h). Own file: Eigen's SVD is slow to compile.
#include "solver/fit/map_alignment.h"

#include <Eigen/SVD>
#include <cmath>
#include <stdexcept>
#include <string>

namespace kith {

MapAlignment align_maps(const Points& reference, const Points& current, bool allow_scale) {
  if (reference.rows() != current.rows() || reference.cols() != current.cols() || reference.rows() == 0)
    throw std::invalid_argument("map alignment: the maps are " + std::to_string(reference.rows()) + " x " +
                                std::to_string(reference.cols()) + " and " + std::to_string(current.rows()) + " x " +
                                std::to_string(current.cols()));
  const Eigen::RowVectorXd mr = reference.colwise().mean(), mc = current.colwise().mean();
  const Eigen::MatrixXd a = reference.rowwise() - mr;
  const Eigen::MatrixXd b = current.rowwise() - mc;
  const Eigen::JacobiSVD<Eigen::MatrixXd> svd(a.transpose() * b, Eigen::ComputeFullU | Eigen::ComputeFullV);
  MapAlignment out;
  out.rotation = svd.matrixU() * svd.matrixV().transpose();
  const double norm_a = a.squaredNorm();
  out.scale = allow_scale && norm_a > 0.0 ? svd.singularValues().sum() / norm_a : 1.0;
  out.translation = mc - out.scale * mr * out.rotation;
  out.rms = std::sqrt((apply_alignment(out, reference) - current).squaredNorm() / double(reference.rows()));
  return out;
}

Points apply_alignment(const MapAlignment& alignment, const Points& points) {
  Points out = alignment.scale * (points * alignment.rotation);
  out.rowwise() += alignment.translation;
  return out;
}

}  // namespace kith
