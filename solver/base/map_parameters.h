// MapParameters: the settings that shape a map, and the one rule that says which values are
// possible. Every path that takes a setting from a person (kith new, kith fit, the flat map, the
// session store, the report, the window's sliders and the live engine's commands) checks it here,
// before anything is recorded, so a value one path accepts is never refused by another.
//
//   perplexity  the effective number of neighbours of the t-SNE affinities; the neighbour graph
//               holds k = min(N - 1, floor(3 * perplexity)) neighbours (neighbour_count), so a
//               perplexity must stay below the item count N. The default, 30, means "30 or, on a
//               collection too small for it, (N - 1) / 3" (perplexity_for), so a small collection
//               works without a setting; a perplexity chosen by hand is taken as it is.
//   theta       the Barnes-Hut opening angle; 0 is exact repulsion, above 1.5 the approximation
//               is too coarse to be useful.
//   dof         the Student-t degrees of freedom of the map kernel (1 = the usual t-SNE kernel).
//   blend       the weight of the judgment term against the neighbour term (README, "Blend").
//   metric      how two items' features are compared: euclidean, or cosine: every row is divided
//               by its length first (a zero row is bad input), so that the squared distance of
//               two items is |u - v|^2 = 2 (1 - cos(x, y)), twice their cosine distance. The
//               perplexity calibration absorbs the factor 2, so a cosine map of rows is the
//               Euclidean map of the same rows scaled to length 1 (solver/features/feature_prep.h).
// Plain values; any thread.
#pragma once
#include <cstddef>
#include <cstdint>
#include <string>

namespace kith {

// How features are compared (see `metric` above).
enum class Metric { kEuclidean, kCosine };
const char* metric_name(Metric metric);  // "euclidean", "cosine"
// False (leaving *metric) when TEXT is neither name.
bool parse_metric(const std::string& text, Metric* metric);

struct MapParameters {
  int dims = 3;                // map dimensions, 2 or 3 (default: 3)
  static constexpr double kDefaultPerplexity = 30.0;
  double perplexity = kDefaultPerplexity;  // > 0 and below the item count (default: 30, see above)
  double theta = 0.5;          // Barnes-Hut angle, 0 .. 1.5 (default: 0.5)
  double dof = 1.0;            // Student-t degrees of freedom, 0.05 .. 100 (default: 1)
  // The dof a collection without features is fitted with unless one is given: measured on a
  // planted 3-D map of 60 items (README, "Judgments alone"; tests/test_judgments_alone_cli.cpp).
  static constexpr double kJudgmentsAloneDof = 2.0;
  double learning_rate = 0.0;  // <= 0: auto, see solver/fit/schedule.h (default: auto)
  double blend = 1.0;          // weight of judgments against features, 0 .. 1000 (default: 1)
  double exaggeration = 1.0;   // the neighbour term's factor after the early phase, 0.01 .. 100 (default: 1)
  uint64_t seed = 42;          // neighbour graph, start noise, questions (default: 42)
  int64_t iterations = 1000;   // gradient steps of a batch fit, 1 .. 10,000,000 (default: 1000)
  Metric metric = Metric::kEuclidean;  // feature distance (default: euclidean)

  // The first impossible value, as a readable message naming the setting, its range and what
  // was given. item_count > 0 also checks the perplexity against the collection's size.
  bool IsValid(std::string* error, size_t item_count = 0) const;
  bool operator==(const MapParameters& o) const;
  bool operator!=(const MapParameters& o) const { return !(*this == o); }

  // The perplexity a map of item_count items is built with (see above).
  double perplexity_for(size_t item_count) const;

  // The perplexity a map from a given neighbour graph of k neighbours per item is built with:
  // each item is calibrated over those k, so the default means "30 or, when the graph is too
  // small for it, k / 3" (as perplexity_for with k + 1 items); a perplexity chosen by hand is
  // taken as it is, and check_graph_perplexity says whether k neighbours can hold it.
  double perplexity_for_graph(size_t k) const;
  // "" or why PERPLEXITY cannot be reached over K neighbours (it must be at most K).
  static std::string check_graph_perplexity(double perplexity, size_t k);

  // One setting at a time, for a live command: "" or the message IsValid would give.
  static std::string check_perplexity(double perplexity, size_t item_count = 0);
  static std::string check_theta(double theta);
  static std::string check_dof(double dof);
  static std::string check_learning_rate(double learning_rate);
  static std::string check_blend(double blend);
  static std::string check_exaggeration(double exaggeration);
};

// Neighbours per item in the affinity graph: min(N - 1, floor(3 * perplexity)), the usual
// Barnes-Hut t-SNE rule (van der Maaten 2014, section 4.1).
size_t neighbour_count(size_t item_count, double perplexity);

}  // namespace kith
