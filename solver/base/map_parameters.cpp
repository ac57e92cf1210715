// See map_parameters.h.
#include "solver/base/map_parameters.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

namespace kith {

namespace {

std::string number(double v) {
  std::ostringstream s;
  s.precision(6);
  s << v;
  return s.str();
}

// "" when lo <= v <= hi (and finite), else "NAME must be between LO and HI, got V".
std::string in_range(const char* name, double v, double lo, double hi, const char* extra = "") {
  if (std::isfinite(v) && v >= lo && v <= hi) return "";
  return std::string(name) + " must be between " + number(lo) + " and " + number(hi) + extra + ", got " + number(v);
}

}  // namespace

std::string MapParameters::check_perplexity(double perplexity, size_t item_count) {
  if (!std::isfinite(perplexity) || !(perplexity > 0)) return "perplexity must be a number above 0, got " + number(perplexity);
  if (item_count > 0 && !(perplexity < double(item_count)))
    return "perplexity must be smaller than the number of items (" + std::to_string(item_count) + "), got " +
           number(perplexity);
  return "";
}
std::string MapParameters::check_theta(double theta) { return in_range("theta", theta, 0.0, 1.5); }
std::string MapParameters::check_dof(double dof) { return in_range("dof", dof, 0.05, 100.0); }
std::string MapParameters::check_learning_rate(double learning_rate) {
  if (!std::isfinite(learning_rate)) return "learning rate must be a number (0 or less for auto), got " + number(learning_rate);
  return "";
}
std::string MapParameters::check_blend(double blend) { return in_range("blend", blend, 0.0, 1000.0); }
std::string MapParameters::check_exaggeration(double exaggeration) {
  return in_range("exaggeration", exaggeration, 0.01, 100.0);
}

bool MapParameters::IsValid(std::string* error, size_t item_count) const {
  std::string m;
  if (dims != 2 && dims != 3) m = "dims must be 2 or 3, got " + std::to_string(dims);
  if (m.empty()) m = check_perplexity(perplexity_for(item_count), item_count);
  if (m.empty()) m = check_theta(theta);
  if (m.empty()) m = check_dof(dof);
  if (m.empty()) m = check_learning_rate(learning_rate);
  if (m.empty()) m = check_blend(blend);
  if (m.empty()) m = check_exaggeration(exaggeration);
  if (m.empty() && (iterations < 1 || iterations > 10000000))
    m = "iterations must be between 1 and 10000000, got " + std::to_string(iterations);
  if (m.empty()) return true;
  if (error) *error = m;
  return false;
}

bool MapParameters::operator==(const MapParameters& o) const {
  return dims == o.dims && perplexity == o.perplexity && theta == o.theta && dof == o.dof &&
         learning_rate == o.learning_rate && blend == o.blend && exaggeration == o.exaggeration && seed == o.seed &&
         iterations == o.iterations && metric == o.metric;
}

const char* metric_name(Metric metric) { return metric == Metric::kCosine ? "cosine" : "euclidean"; }

bool parse_metric(const std::string& text, Metric* metric) {
  if (text == "euclidean") *metric = Metric::kEuclidean;
  else if (text == "cosine") *metric = Metric::kCosine;
  else return false;
  return true;
}

double MapParameters::perplexity_for(size_t item_count) const {
  if (perplexity != kDefaultPerplexity || item_count == 0) return perplexity;
  return std::min(kDefaultPerplexity, std::max(1.0, double(item_count - 1) / 3.0));
}

double MapParameters::perplexity_for_graph(size_t k) const { return perplexity_for(k + 1); }

std::string MapParameters::check_graph_perplexity(double perplexity, size_t k) {
  if (perplexity <= double(k)) return "";
  char buf[200];
  std::snprintf(buf, sizeof buf,
                "perplexity %g needs at least that many neighbours per item, and the neighbour graph has %zu; give "
                "--perplexity %zu or less (or a graph with more neighbours)",
                perplexity, k, k);
  return buf;
}

size_t neighbour_count(size_t item_count, double perplexity) {
  if (item_count < 2) return 0;
  return std::min(item_count - 1, size_t(std::floor(3.0 * perplexity)));
}

}  // namespace kith
