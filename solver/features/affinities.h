// Perplexity-calibrated affinities (van der Maaten & Hinton 2008).
//   p(j|i) = exp(-beta_i d2_ij) / sum_k exp(-beta_i d2_ik) over i's k nearest neighbours,
//   beta_i found by binary search so that 2^H(P_i) = perplexity,
//   P = (P_cond + P_cond^T) / (2N), a symmetric sparse matrix summing to 1.
// Pure functions; safe from any thread.
#pragma once
#include <cstdint>
#include <vector>

#include "solver/base/stage_log.h"
#include "solver/features/neighbours.h"

namespace kith {

// Symmetric sparse P in CSR form: row i's entries are col[row_ptr[i] .. row_ptr[i+1]).
struct SparseAffinities {
  size_t n = 0;
  std::vector<int64_t> row_ptr;  // n + 1 entries
  std::vector<int32_t> col;
  std::vector<double> val;
  // The neighbour search's measured share of exact neighbours (NeighbourGraph::recall), carried
  // so the fit can report it; -1 when exact or given.
  double neighbour_recall = -1.0;
  size_t recall_sample = 0;
};

struct AffinityOptions {
  double perplexity = 30.0;   // target perplexity (default: 30)
  double tolerance = 1e-5;    // |perplexity_i - target| allowed (default: 1e-5)
  int max_steps = 200;        // binary search steps per item (default: 200)
};

// Conditional p(j|i) on the graph (row-stochastic, same layout as the graph), with each beta_i.
std::vector<double> conditional_affinities(const NeighbourGraph& graph, const AffinityOptions& options,
                                           std::vector<double>* betas = nullptr);
// Symmetrized and normalized P.
SparseAffinities joint_affinities(const NeighbourGraph& graph, const AffinityOptions& options);

// How joint_affinities_for searches the neighbours.
struct AffinitySearch {
  uint64_t seed = 42;   // HNSW's graph (default: 42)
  int threads = 0;      // 0 = all (default: 0)
  bool exact = false;   // exact neighbours at any size (default: false, exact below NeighbourOptions' threshold)
  // The neighbours' metric (neighbours.h). Features from prepare_features already carry the map's
  // metric in their rows (feature_prep.h), so the map's paths leave this at euclidean.
  Metric metric = Metric::kEuclidean;  // (default: euclidean)
  // Receives a "neighbours" and an "affinities" stage when given (not owned; default: none).
  StageLog* stages = nullptr;
};

// The one path from (prepared) features to P: the k = neighbour_count(N, perplexity) nearest
// neighbours (solver/base/map_parameters.h), then joint_affinities. When `graph` is given it
// receives the neighbour graph too.
SparseAffinities joint_affinities_for(const Points& features, double perplexity, const AffinitySearch& search = {},
                                      NeighbourGraph* graph = nullptr);

// The one path from a given graph (solver/io/neighbour_graph_file.h) to P: each item's
// k = min(graph.k, neighbour_count(N, perplexity)) nearest neighbours (rows are nearest first),
// then joint_affinities. The same as joint_affinities_for when the graph holds the neighbours and
// distances that search finds.
SparseAffinities joint_affinities_from_graph(const NeighbourGraph& graph, double perplexity);

}  // namespace kith
