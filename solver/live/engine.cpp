// Engine (see engine.h): the t-SNE + judgments model driven by LiveLoop (live_loop.h).
//
// [SECTION] options   [SECTION] the model: set-up, commands, heavy jobs, step, snapshot
// [SECTION] Engine
//
// What the model does with each command (all between iterations, on the worker):
//   AddJudgment / RetractJudgment   the blended objective's judgment set; the schedule goes on
//                                   (no early exaggeration again on a settled map)
//   Pin / Unpin                     hard pin: gradient row zero, and the row is put back exactly
//   DragTarget / ClearDrag          a held drag is a temporary pin: the item jumps to the target
//                                   and is held there until ClearDrag; its neighbours follow
//   SetBlend/Theta/LearningRate/Exaggeration   numbers, taken at once
//   SetPerplexity (heavy)           neighbours and P rebuilt on the helper thread, then swapped
// A setting is checked by setting_problem() (MapParameters) first; a refused command changes
// nothing. Each snapshot carries the judgment set in force (a new JudgmentSet, version + 1, after
// the judgments changed, else the same one) and the parameters in force.
//   InsertItems (heavy)             features re-prepared, neighbours and P rebuilt on the helper;
//                                   each new item starts at the affinity-weighted mean of its
//                                   existing neighbours' positions, and for a while only the new
//                                   items move (the rest of the map is not disturbed)
//   SetFeatures (heavy)             same items, new features: re-prepared, neighbours and P rebuilt on
//                                   the helper, swapped in, then a stretch of exaggeration to regroup
//   RemoveItems                     rows dropped from the map, P (renormalized), judgments, pins
//   Restart                         the first map again (PCA start, or from multiscale_above items
//                                   the multiscale start), optimizer state forgotten
// The first map: the PCA start, shown while neighbours and P are built on the worker; from
// multiscale_above items with features (no given graph or start) it is then replaced by the
// multiscale start (solver/fit/multiscale.h), which the schedule refines from its first step
// after early exaggeration.
#include "solver/live/engine.h"

#include <algorithm>
#include <chrono>
#include <future>
#include <cmath>
#include <map>
#include <random>
#include <set>
#include <sstream>
#include <stdexcept>
#include <unordered_set>

#include "solver/base/portable_random.h"
#include "solver/features/affinities.h"
#include "solver/features/feature_prep.h"
#include "solver/features/neighbours.h"
#include "solver/fit/multiscale.h"
#include "solver/fit/optimizer.h"
#include "solver/fit/schedule.h"
#include "solver/live/live_loop.h"
#include "solver/measures/health.h"
#include "solver/measures/judgment_health.h"
#include "solver/objective/blended_objective.h"
#include "solver/objective/judgment_term.h"
#include "solver/objective/neighbour_term.h"

namespace kith {

// ==== [SECTION] options =====================================================================

bool EngineOptions::IsValid(std::string* error, size_t item_count) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (!MapParameters::IsValid(error, item_count)) return false;
  if (threads < 0) return fail("threads must be >= 0 (0 = all)");
  if (!(settle_tolerance >= 0)) return fail("settle tolerance must be >= 0");
  if (slow_after < 0 || settle_after < 0) return fail("slow_after and settle_after must be >= 0");
  if (!(publish_interval_ms >= 0)) return fail("publish interval must be >= 0 ms");
  return true;
}

namespace {

// ==== [SECTION] the model ===================================================================

constexpr int kNewItemIterations = 100;  // iterations during which only newly inserted items move
constexpr int kSettleGrace = 50;         // iterations after exaggeration before the map may settle

bool finite_vector(const std::vector<double>& v) {
  for (double x : v)
    if (!std::isfinite(x)) return false;
  return true;
}

std::string item_problem(int32_t item, size_t n) {
  if (item < 0 || size_t(item) >= n)
    return "item " + std::to_string(item) + " is unknown (the map has " + std::to_string(n) + " items)";
  return "";
}

// P without the removed rows and columns, renumbered and renormalized to sum 1.
std::shared_ptr<const SparseAffinities> drop_items(const SparseAffinities& p, const std::vector<int32_t>& remap,
                                                   size_t kept) {
  auto q = std::make_shared<SparseAffinities>();
  q->n = kept;
  q->row_ptr.assign(kept + 1, 0);
  double total = 0.0;
  for (size_t i = 0; i < p.n; ++i) {
    if (remap[i] < 0) continue;
    for (int64_t e = p.row_ptr[i]; e < p.row_ptr[i + 1]; ++e)
      if (remap[size_t(p.col[size_t(e)])] >= 0) {
        q->col.push_back(remap[size_t(p.col[size_t(e)])]);
        q->val.push_back(p.val[size_t(e)]);
        total += p.val[size_t(e)];
      }
    q->row_ptr[size_t(remap[i]) + 1] = int64_t(q->col.size());
  }
  if (total > 0)
    for (double& v : q->val) v /= total;
  return q;
}

class EngineModel : public LiveModel {
 public:
  EngineModel(const Collection& collection, const EngineOptions& options, std::vector<Judgment> judgments, Points start)
      : options_(options), ids_(collection.ids), objective_(collection.size(), options.dims) {
    const size_t n = collection.size();
    if (n < 2)
      throw std::invalid_argument("the engine needs at least 2 items, the collection has " + std::to_string(n));
    if (collection.features.rows() != Eigen::Index(n))
      throw std::invalid_argument("the collection has " + std::to_string(n) + " ids but " +
                                  std::to_string(collection.features.rows()) + " feature rows");
    if (!collection.features.allFinite()) throw std::invalid_argument("the features contain NaN or infinite values");
    raw_ = std::make_shared<const Points>(collection.features);
    has_features_ = collection.features.cols() > 0;
    if (!collection.neighbours.empty()) {
      if (collection.neighbours.n != n)
        throw std::invalid_argument("the neighbour graph has " + std::to_string(collection.neighbours.n) +
                                    " items, the collection " + std::to_string(n));
      graph_ = std::make_shared<const NeighbourGraph>(collection.neighbours);
    }
    if (std::string error; !options.IsValid(&error, has_features_ || graph_ ? n : 0))
      throw std::invalid_argument(error);
    schedule_.learning_rate = options.learning_rate;
    perplexity_ = graph_ ? options.perplexity_for_graph(graph_->k) : options.perplexity_for(n);
    if (graph_)
      if (std::string e = MapParameters::check_graph_perplexity(perplexity_, graph_->k); !e.empty())
        throw std::invalid_argument(e);
    exaggeration_ = options.exaggeration;
    validate_judgments(judgments, n);
    objective_.set_judgments(std::move(judgments));
    objective_.set_blend(options.blend);
    objective_.set_alpha(options.dof);
    if (has_features_) prepared_ = std::make_shared<const Points>(prepare_features(*raw_, map_prep(options.metric)));
    if (start.size() > 0) {
      if (start.rows() != Eigen::Index(n) || start.cols() != options.dims)
        throw std::invalid_argument("the start map is " + std::to_string(start.rows()) + " x " +
                                    std::to_string(start.cols()) + ", expected " + std::to_string(n) + " x " +
                                    std::to_string(options.dims));
      if (!start.allFinite()) throw std::invalid_argument("the start map contains NaN or infinite values");
      y_ = std::move(start);
      // A given start is a settled map (e.g. a session's checkpoint): no early exaggeration again.
      schedule_it_ = schedule_.exaggeration_iterations;
    } else {
      y_ = initial_map();
    }
  }

  // The expensive set-up (neighbours and P) runs on the worker before the first iteration, so the
  // constructor returns quickly and the PCA start can be shown meanwhile.
  void ensure_ready() {
    if (ready_) return;
    ready_ = true;
    if (!has_features_ && !graph_) return;
    // The multiscale sample needs only the features: it is fitted on a thread of its own while
    // this one searches the neighbours of all items (HNSW builds its graph on one thread).
    std::future<MultiscaleSample> sample;
    if (schedule_it_ == 0 && multiscale()) {
      std::shared_ptr<const Points> x = prepared_;
      sample = std::async(std::launch::async, [x, mo = multiscale_options()] { return fit_multiscale_sample(*x, mo); });
    }
    auto p = graph_ ? std::make_shared<const SparseAffinities>(joint_affinities_from_graph(*graph_, perplexity_))
                    : build_affinities(*prepared_, perplexity_, options_);
    NeighbourTermOptions nto;
    nto.dof = options_.dof;
    nto.theta = options_.theta;
    nto.threads = options_.threads;
    neighbour_ = std::make_shared<NeighbourTerm>(p, nto);
    p_ = std::move(p);
    objective_.set_neighbour_term(neighbour_);
    if (sample.valid()) use_multiscale(place_from_sample(sample.get(), *p_, multiscale_options()));
  }

  bool multiscale() const {
    return has_features_ && !graph_ && options_.multiscale_above > 0 && n() >= options_.multiscale_above;
  }
  MultiscaleOptions multiscale_options() const {
    MultiscaleOptions mo;
    mo.dims = options_.dims;
    mo.dof = options_.dof;
    mo.perplexity = perplexity_;
    mo.theta = options_.theta;
    mo.seed = options_.seed;
    mo.threads = options_.threads;
    return mo;
  }
  // The multiscale start in place of the PCA start, the schedule past early exaggeration.
  void use_multiscale(Points start) {
    y_ = std::move(start);
    for (const auto& [i, p] : pins_) y_.row(i) = p;
    for (const auto& [i, t] : drags_) y_.row(i) = t;
    schedule_it_ = schedule_.exaggeration_iterations;
  }
  void start_multiscale() {
    if (multiscale() && p_) use_multiscale(multiscale_start(*prepared_, *p_, multiscale_options()));
  }

  static std::shared_ptr<const SparseAffinities> build_affinities(const Points& x, double perplexity,
                                                                  const EngineOptions& o) {
    return std::make_shared<const SparseAffinities>(joint_affinities_for(x, perplexity, {o.seed, o.threads}));
  }

  Points initial_map() const {
    const size_t n = ids_.size();
    if (has_features_) return pca_start(*prepared_, options_.dims, 1e-4, options_.seed);
    // Judgments-only collection: a small seeded Gaussian start.
    std::mt19937_64 rng(options_.seed);
    Points y(Eigen::Index(n), options_.dims);
    for (Eigen::Index i = 0; i < y.size(); ++i) y.data()[i] = normal(rng, 0.0, 1e-4);
    return y;
  }

  // ---- which commands are heavy ----
  bool heavy(const CommandBody& b) const override {
    return std::holds_alternative<cmd::SetPerplexity>(b) || std::holds_alternative<cmd::InsertItems>(b) ||
           std::holds_alternative<cmd::SetFeatures>(b);
  }
  bool reindexes(const CommandBody& b) const override {
    return std::holds_alternative<cmd::InsertItems>(b) || std::holds_alternative<cmd::RemoveItems>(b);
  }

  // ---- light commands ----
  std::string apply(const CommandBody& body) override {
    ensure_ready();
    if (std::string e = setting_problem(body, n()); !e.empty()) return e;
    try {
      return std::visit([&](const auto& c) { return apply_one(c); }, body);
    } catch (const std::exception& e) {
      return e.what();
    }
  }

  std::string position_problem(const std::vector<double>& p, bool allow_empty) const {
    if (p.empty() && allow_empty) return "";
    if (p.size() != size_t(options_.dims))
      return "a position needs " + std::to_string(options_.dims) + " numbers, got " + std::to_string(p.size());
    if (!finite_vector(p)) return "the position is not a finite number";
    return "";
  }

  std::string apply_one(const cmd::AddJudgment& c) {
    Judgment j = c.judgment;
    const std::string problem = judgment_problem(j, n());
    if (!problem.empty()) return "judgment: " + problem;
    // The window's judgments come with the id the feed or the session gave them; one posted
    // straight to the engine (tests, benchmarks) without one gets the next free id, deterministic
    // for replay.
    if (j.id < 0) {
      int64_t top = 0;
      for (const Judgment& k : objective_.judgments()) top = std::max(top, k.id);
      j.id = top + 1;
    }
    objective_.add_judgment(j);
    judgments_changed_ = true;
    return "";
  }
  std::string apply_one(const cmd::RetractJudgment& c) {
    if (!objective_.set_retracted(c.judgment_id, c.retracted))
      return "judgment " + std::to_string(c.judgment_id) + " is unknown";
    judgments_changed_ = true;
    return "";
  }
  // "" or "WHAT: what is wrong" with a command's item and position.
  std::string target_problem(const char* what, int32_t item, const std::vector<double>& position,
                             bool allow_empty) const {
    std::string e = item_problem(item, n());
    if (e.empty()) e = position_problem(position, allow_empty);
    return e.empty() ? e : what + (": " + e);
  }
  std::string apply_one(const cmd::Pin& c) {
    if (std::string e = target_problem("pin", c.item, c.position, true); !e.empty()) return e;
    if (!c.position.empty())
      for (int d = 0; d < options_.dims; ++d) y_(c.item, d) = c.position[size_t(d)];
    pins_[c.item] = y_.row(c.item);
    hold(c.item);
    return "";
  }
  std::string apply_one(const cmd::Unpin& c) {
    if (std::string e = item_problem(c.item, n()); !e.empty()) return "unpin: " + e;
    pins_.erase(c.item);
    release(c.item);
    return "";
  }
  std::string apply_one(const cmd::DragTarget& c) {
    if (std::string e = target_problem("drag", c.item, c.position, false); !e.empty()) return e;
    Eigen::RowVectorXd t(options_.dims);
    for (int d = 0; d < options_.dims; ++d) t(d) = c.position[size_t(d)];
    y_.row(c.item) = t;
    drags_[c.item] = t;
    if (pins_.count(c.item)) pins_[c.item] = t;  // dragging a pinned item moves its pin
    hold(c.item);
    return "";
  }
  std::string apply_one(const cmd::ClearDrag& c) {
    if (std::string e = item_problem(c.item, n()); !e.empty()) return "clear drag: " + e;
    drags_.erase(c.item);
    release(c.item);
    return "";
  }
  std::string apply_one(const cmd::SetBlend& c) {
    objective_.set_blend(c.blend);
    options_.blend = c.blend;
    return "";
  }
  std::string apply_one(const cmd::SetTheta& c) {
    options_.theta = c.theta;
    if (neighbour_) neighbour_->set_theta(c.theta);
    return "";
  }
  std::string apply_one(const cmd::SetLearningRate& c) {
    schedule_.learning_rate = c.learning_rate;
    options_.learning_rate = c.learning_rate;
    return "";
  }
  std::string apply_one(const cmd::SetExaggeration& c) {
    exaggeration_ = c.exaggeration;
    options_.exaggeration = c.exaggeration;
    return "";
  }
  std::string apply_one(const cmd::Restart&) {
    y_ = initial_map();
    for (const auto& [i, p] : pins_) y_.row(i) = p;
    for (const auto& [i, t] : drags_) y_.row(i) = t;
    optimizer_.reset();
    schedule_it_ = 0;
    start_multiscale();
    new_items_until_ = -1;
    regroup_until_ = 0;
    lr_scale_ = 1.0;
    return "";
  }
  std::string apply_one(const cmd::RemoveItems& c) {
    std::vector<int32_t> rows = c.items;
    std::sort(rows.begin(), rows.end());
    rows.erase(std::unique(rows.begin(), rows.end()), rows.end());
    for (int32_t i : rows)
      if (std::string e = item_problem(i, n()); !e.empty()) return "remove: " + e;
    if (n() - rows.size() < 2) return "remove: the map must keep at least 2 items";
    if (graph_) return "remove: " + kGivenGraph;
    if (has_features_ && !(perplexity_ < double(n() - rows.size())))
      return "remove: perplexity " + std::to_string(perplexity_) + " needs more than " +
             std::to_string(n() - rows.size()) + " items";
    std::vector<int32_t> remap(n(), -1);
    int32_t kept = 0;
    {
      size_t r = 0;
      for (size_t i = 0; i < n(); ++i) {
        if (r < rows.size() && rows[r] == int32_t(i)) {
          ++r;
          continue;
        }
        remap[i] = kept++;
      }
    }
    auto keep_rows = [&](const Points& m) {
      Points out(kept, m.cols());
      for (size_t i = 0; i < remap.size(); ++i)
        if (remap[i] >= 0) out.row(remap[i]) = m.row(Eigen::Index(i));
      return out;
    };
    y_ = keep_rows(y_);
    raw_ = std::make_shared<const Points>(keep_rows(*raw_));
    if (prepared_) prepared_ = std::make_shared<const Points>(keep_rows(*prepared_));
    std::vector<std::string> ids;
    for (size_t i = 0; i < remap.size(); ++i)
      if (remap[i] >= 0) ids.push_back(std::move(ids_[i]));
    ids_ = std::move(ids);
    objective_.remove_items(rows);  // and the judgments naming them
    judgments_changed_ = true;
    optimizer_.remove_rows(rows);
    if (p_) {
      p_ = drop_items(*p_, remap, size_t(kept));
      neighbour_->set_affinities(p_);
    }
    auto remap_map = [&](std::map<int32_t, Eigen::RowVectorXd>& m) {
      std::map<int32_t, Eigen::RowVectorXd> out;
      for (auto& [i, v] : m)
        if (remap[size_t(i)] >= 0) out[remap[size_t(i)]] = v;
      m.swap(out);
    };
    remap_map(pins_);
    remap_map(drags_);
    new_items_until_ = -1;
    regroup_until_ = 0;
    return "";
  }
  std::string apply_one(const cmd::Pause&) { return ""; }  // handled by the loop
  std::string apply_one(const cmd::Resume&) { return ""; }
  std::string apply_one(const cmd::SetPerplexity&) { return "internal: perplexity is a heavy command"; }
  std::string apply_one(const cmd::InsertItems&) { return "internal: insert is a heavy command"; }
  std::string apply_one(const cmd::SetFeatures&) { return "internal: new features is a heavy command"; }

  // Holds (pins and held drags) are hard pins in the objective.
  void hold(int32_t item) { objective_.pin(item); }
  void release(int32_t item) {
    if (!pins_.count(item) && !drags_.count(item)) objective_.unpin(item);
  }

  // ---- heavy commands ----
  Job prepare(const CommandBody& body, std::string* error) override {
    ensure_ready();
    const EngineOptions o = options_;
    if (const auto* c = std::get_if<cmd::SetPerplexity>(&body)) {
      const double perplexity = c->perplexity;
      if (!has_features_ && !graph_) return *error = "perplexity: this collection has no features", nullptr;
      if (std::string e = setting_problem(body, n()); !e.empty()) return *error = e, nullptr;
      if (graph_)
        if (std::string e = MapParameters::check_graph_perplexity(perplexity, graph_->k); !e.empty())
          return *error = "perplexity: " + e, nullptr;
      std::shared_ptr<const Points> x = prepared_;
      std::shared_ptr<const NeighbourGraph> graph = graph_;
      return [this, x, graph, perplexity, o]() -> Finish {
        auto p = graph ? std::make_shared<const SparseAffinities>(joint_affinities_from_graph(*graph, perplexity))
                       : build_affinities(*x, perplexity, o);
        return [this, p, perplexity] {
          p_ = p;
          perplexity_ = perplexity;
          options_.perplexity = perplexity;
          neighbour_->set_affinities(p_);
        };
      };
    }
    if (const auto* c = std::get_if<cmd::SetFeatures>(&body)) {
      if (!has_features_) return *error = "features: this collection has no features to replace", nullptr;
      if (graph_) return *error = "features: " + kGivenGraph, nullptr;
      if (c->features.rows() != raw_->rows() || c->features.cols() != raw_->cols())
        return *error = "features: the map has " + std::to_string(raw_->rows()) + " x " + std::to_string(raw_->cols()) +
                        " features, got " + std::to_string(c->features.rows()) + " x " +
                        std::to_string(c->features.cols()),
               nullptr;
      if (!c->features.allFinite()) return *error = "features: NaN or infinite values", nullptr;
      if (o.metric == Metric::kCosine && first_zero_row(c->features) >= 0)
        return *error = "features: row " + std::to_string(first_zero_row(c->features) + 1) +
                        " is all zeros, which has no cosine distance",
               nullptr;
      if (c->regroup_iterations < 0 || !(c->regroup_exaggeration >= 1.0) || !std::isfinite(c->regroup_exaggeration))
        return *error = "features: regroup iterations must be >= 0 and exaggeration >= 1", nullptr;
      auto raw = std::make_shared<const Points>(c->features);
      const double perplexity = perplexity_;
      const int regroup = c->regroup_iterations;
      const double factor = c->regroup_exaggeration;
      return [this, raw, perplexity, regroup, factor, o]() -> Finish {
        auto prepared = std::make_shared<const Points>(prepare_features(*raw, map_prep(o.metric)));
        auto p = build_affinities(*prepared, perplexity, o);
        return [this, raw, prepared, p, regroup, factor] {
          raw_ = raw;
          prepared_ = prepared;
          p_ = p;
          neighbour_->set_affinities(p_);
          regroup_until_ = schedule_it_ + int64_t(regroup);
          regroup_factor_ = factor;
        };
      };
    }
    const auto& c = std::get<cmd::InsertItems>(body);
    const size_t m = c.ids.size();
    if (m == 0) return *error = "insert: no items", nullptr;
    if (graph_) return *error = "insert: " + kGivenGraph, nullptr;
    if (c.features.rows() != Eigen::Index(m) || c.features.cols() != raw_->cols())
      return *error = "insert: " + std::to_string(m) + " ids need " + std::to_string(m) + " x " +
                      std::to_string(raw_->cols()) + " features, got " + std::to_string(c.features.rows()) + " x " +
                      std::to_string(c.features.cols()),
             nullptr;
    if (!c.features.allFinite()) return *error = "insert: the features contain NaN or infinite values", nullptr;
    if (o.metric == Metric::kCosine && has_features_ && first_zero_row(c.features) >= 0)
      return *error = "insert: row " + std::to_string(first_zero_row(c.features) + 1) +
                      " is all zeros, which has no cosine distance",
             nullptr;
    {
      std::unordered_set<std::string> seen(ids_.begin(), ids_.end());
      for (const std::string& id : c.ids)
        if (!seen.insert(id).second) return *error = "insert: id '" + id + "' is already in the map", nullptr;
    }
    std::shared_ptr<const Points> raw = raw_;
    Points extra = c.features;
    std::vector<std::string> new_ids = c.ids;
    const double perplexity = perplexity_;
    const bool has_features = has_features_;
    return [this, raw, extra, new_ids, perplexity, has_features, o]() -> Finish {
      const size_t n_old = size_t(raw->rows()), n_all = n_old + size_t(extra.rows());
      auto all = std::make_shared<Points>(Eigen::Index(n_all), raw->cols());
      all->topRows(raw->rows()) = *raw;
      all->bottomRows(extra.rows()) = extra;
      std::shared_ptr<const Points> prepared;
      std::shared_ptr<const SparseAffinities> p;
      // Placement weights: each new item's existing neighbours, weighted by p(j|i).
      std::vector<std::vector<std::pair<int32_t, double>>> place(size_t(extra.rows()));
      if (has_features) {
        prepared = std::make_shared<const Points>(prepare_features(*all, map_prep(o.metric)));
        NeighbourGraph graph;
        p = std::make_shared<const SparseAffinities>(
            joint_affinities_for(*prepared, perplexity, {o.seed, o.threads}, &graph));
        AffinityOptions ao;
        ao.perplexity = perplexity;
        const std::vector<double> cond = conditional_affinities(graph, ao);
        for (size_t i = n_old; i < n_all; ++i)
          for (size_t k = 0; k < graph.k; ++k) {
            const int32_t j = graph.index[i * graph.k + k];
            if (size_t(j) < n_old) place[i - n_old].push_back({j, cond[i * graph.k + k]});
          }
      }
      std::shared_ptr<const Points> all_const = all;
      return [this, all_const, prepared, p, place, new_ids] { finish_insert(all_const, prepared, p, place, new_ids); };
    };
  }

  void finish_insert(std::shared_ptr<const Points> raw, std::shared_ptr<const Points> prepared,
                     std::shared_ptr<const SparseAffinities> p,
                     const std::vector<std::vector<std::pair<int32_t, double>>>& place,
                     const std::vector<std::string>& new_ids) {
    const Eigen::Index n_old = y_.rows(), m = Eigen::Index(new_ids.size()), dims = y_.cols();
    const Eigen::RowVectorXd centre = y_.colwise().mean();
    const double radius = std::sqrt((y_.rowwise() - centre).squaredNorm() / double(n_old));
    // A little seeded jitter, so that new items with the same neighbours do not coincide (the
    // kernel's gradient between two coincident points is zero: they would never separate).
    std::mt19937_64 rng(options_.seed + uint64_t(n_old));
    const double spread = 1e-3 * std::max(radius, 1e-6);
    y_.conservativeResize(n_old + m, dims);
    for (Eigen::Index i = 0; i < m; ++i) {
      Eigen::RowVectorXd at = Eigen::RowVectorXd::Zero(dims);
      double w = 0.0;
      for (const auto& [j, pj] : place[size_t(i)]) {
        at += pj * y_.row(j);
        w += pj;
      }
      at = w > 0 ? Eigen::RowVectorXd(at / w) : Eigen::RowVectorXd(centre);
      for (Eigen::Index d = 0; d < dims; ++d) at(d) += normal(rng, 0.0, spread);
      y_.row(n_old + i) = at;
      ids_.push_back(new_ids[size_t(i)]);
    }
    raw_ = std::move(raw);
    prepared_ = std::move(prepared);
    objective_.resize(size_t(n_old + m));
    optimizer_.resize(n_old + m, dims);
    if (p) {
      p_ = std::move(p);
      neighbour_->set_affinities(p_);
    }
    // Only the new items move for a while; then the whole map goes on as before.
    moving_.assign(size_t(n_old + m), 0);
    for (Eigen::Index i = n_old; i < n_old + m; ++i) moving_[size_t(i)] = 1;
    new_items_until_ = schedule_it_ + kNewItemIterations;
  }

  // ---- one iteration ----
  StepReport step() override {
    ensure_ready();
    double factor = schedule_it_ < schedule_.exaggeration_iterations ? schedule_.early_exaggeration : exaggeration_;
    if (schedule_it_ < regroup_until_) factor = std::max(factor, regroup_factor_);
    if (neighbour_ && factor != current_factor_) {
      neighbour_->set_exaggeration(factor);
      current_factor_ = factor;
    }
    if (schedule_.reset_state_at_switch && schedule_.switches_at(schedule_it_)) optimizer_.reset();
    StepOptions so = schedule_.step_at(schedule_it_, n());
    so.learning_rate *= lr_scale_;
    before_ = y_;
    Masked masked{objective_, schedule_it_ < new_items_until_ ? &moving_ : nullptr};
    const StepResult r = optimizer_.step(masked, y_, so);
    StepReport report;
    report.cost = r.cost;
    report.finite = r.finite && y_.allFinite();
    if (!report.finite) {
      // Diverged: go back, forget momentum, take smaller steps from now on.
      y_ = before_;
      optimizer_.reset();
      lr_scale_ *= 0.5;
    }
    for (const auto& [i, p] : pins_) y_.row(i) = p;  // exactly, whatever rounding did
    for (const auto& [i, t] : drags_) y_.row(i) = t;
    ++schedule_it_;
    const Eigen::RowVectorXd centre = y_.colwise().mean();
    const double radius = std::sqrt((y_.rowwise() - centre).squaredNorm() / double(n())) + 1e-300;
    report.movement = (y_ - before_).rowwise().norm().mean() / radius;
    return report;
  }

  bool may_settle() const override {
    return schedule_it_ >= schedule_.exaggeration_iterations + kSettleGrace && schedule_it_ >= new_items_until_;
  }

  void fill(Snapshot& s) override {
    if (judgments_changed_ || !judgment_set_) {
      judgment_set_ = std::make_shared<const JudgmentSet>(objective_.judgments(), ++judgment_version_);
      judgments_changed_ = false;
    }
    s.judgments = judgment_set_;
    s.parameters = options_;
    s.parameters.perplexity = perplexity_;
    s.positions = y_;
    s.ids = ids_;
    s.pinned.assign(n(), 0);
    for (const auto& [i, p] : pins_) s.pinned[size_t(i)] = 1;
    const TermCosts costs = objective_.last_costs();
    s.neighbour_cost = costs.neighbour;
    s.judgment_cost = costs.judgment;
    s.pin_cost = costs.pin;
    s.health.kl = current_factor_ == 1.0 ? costs.neighbour : -1.0;
    s.health.judgment_agreement = judgment_agreement(y_, objective_.judgments());
    // Trustworthiness and neighbour recall now and then (every kHealthSeconds), on a fixed-seed
    // sample of at most kHealthSample items: about 40 ms of this thread at any N.
    const auto now = std::chrono::steady_clock::now();
    // A map that settles gets its figures then too, so a sleeping engine never shows stale ones.
    const bool settling = s.settled && health_at_ != schedule_it_;
    if (prepared_ && has_features_ && n() >= 12 && (now >= next_health_ || settling)) {
      next_health_ = now + std::chrono::seconds(kHealthSeconds);
      health_at_ = schedule_it_;
      HealthOptions ho;
      ho.sample_above = kHealthSample;
      ho.threads = 1;
      ho.trust_k = std::min<int>(ho.trust_k, int(std::min(n(), kHealthSample) / 2) - 1);
      ho.recall_k = std::min<int>(ho.recall_k, int(std::min(n(), kHealthSample)) - 1);
      try {
        const MapHealth h = measure_health(*prepared_, y_, ho);
        trust_ = h.trustworthiness;
        recall_ = h.neighbour_recall;
      } catch (const std::exception&) {
        trust_ = recall_ = -1.0;
      }
    }
    s.health.trustworthiness = trust_;
    s.health.neighbour_recall = recall_;
  }

  size_t n() const { return ids_.size(); }
  const Points& map() const { return y_; }

 private:
  // The blended objective with every row but the moving ones held (zero gradient).
  struct Masked : ObjectiveTerm {
    Masked(BlendedObjective& o, const std::vector<uint8_t>* m) : objective(o), moving(m) {}
    BlendedObjective& objective;
    const std::vector<uint8_t>* moving;
    double evaluate(const Points& y, Points* g) override {
      const double cost = objective.evaluate(y, g);
      if (g && moving)
        for (size_t i = 0; i < moving->size(); ++i)
          if (!(*moving)[i]) g->row(Eigen::Index(i)).setZero();
      return cost;
    }
  };

  EngineOptions options_;
  Schedule schedule_;
  std::vector<std::string> ids_;
  std::shared_ptr<const Points> raw_, prepared_;
  std::shared_ptr<const NeighbourGraph> graph_;  // given with the collection, else null
  // Why the item set and the features cannot change under a given graph.
  inline static const std::string kGivenGraph =
      "the map's neighbours come from a given neighbour graph of exactly these items, which kith cannot extend "
      "or recompute; make a new graph (scripts/neighbour_graph.py) and a new session";
  static constexpr int kHealthSeconds = 4;
  static constexpr size_t kHealthSample = 1000;
  std::chrono::steady_clock::time_point next_health_ = std::chrono::steady_clock::now() + std::chrono::seconds(1);
  double trust_ = -1.0, recall_ = -1.0;
  int64_t health_at_ = -1;  // schedule_it_ when they were measured
  bool has_features_ = false;
  bool ready_ = false;
  double perplexity_ = 30.0;
  double exaggeration_ = 1.0;
  int64_t regroup_until_ = 0;  // SetFeatures: exaggerate by regroup_factor_ until this iteration
  double regroup_factor_ = 1.0;
  double current_factor_ = 0.0;
  double lr_scale_ = 1.0;
  std::shared_ptr<const SparseAffinities> p_;
  std::shared_ptr<NeighbourTerm> neighbour_;
  std::shared_ptr<const JudgmentSet> judgment_set_;  // as last published; rebuilt when judgments_changed_
  uint64_t judgment_version_ = 0;
  bool judgments_changed_ = true;
  BlendedObjective objective_;
  GradientDescent optimizer_;
  Points y_, before_;
  int64_t schedule_it_ = 0;
  int64_t new_items_until_ = -1;
  std::vector<uint8_t> moving_;
  std::map<int32_t, Eigen::RowVectorXd> pins_, drags_;
};

LiveLoopOptions loop_options(const EngineOptions& o) {
  LiveLoopOptions l;
  l.publish_interval_ms = o.publish_interval_ms;
  l.settle_tolerance = o.settle_tolerance;
  l.slow_after = o.slow_after;
  l.settle_after = o.settle_after;
  l.settle_cap = o.settle_cap;
  l.start_paused = o.start_paused;
  return l;
}

std::unique_ptr<LiveModel> make_model(const Collection& c, const EngineOptions& o, std::vector<Judgment> j, Points s) {
  std::string error;
  if (!o.IsValid(&error)) throw std::invalid_argument("engine options: " + error);
  return std::make_unique<EngineModel>(c, o, std::move(j), std::move(s));
}

}  // namespace

// ==== [SECTION] Engine ======================================================================

struct Engine::Impl {
  Impl(const Collection& c, const EngineOptions& o, std::vector<Judgment> j, Points s)
      : loop(make_model(c, o, std::move(j), std::move(s)), loop_options(o)) {}
  LiveLoop loop;
};

Engine::Engine(const Collection& collection, const EngineOptions& options, std::vector<Judgment> judgments,
               Points start)
    : impl_(std::make_unique<Impl>(collection, options, std::move(judgments), std::move(start))) {}
Engine::~Engine() { stop(); }
void Engine::start() { impl_->loop.start(); }
void Engine::stop() { impl_->loop.stop(); }
uint64_t Engine::post(CommandBody body) { return impl_->loop.post(std::move(body)); }
std::shared_ptr<const Snapshot> Engine::latest() const { return impl_->loop.latest(); }
std::vector<Command> Engine::command_log() const { return impl_->loop.command_log(); }
void Engine::replay(const std::vector<Command>& log, uint64_t iterations) { impl_->loop.replay(log, iterations); }

}  // namespace kith
