// Batch fit (see fit.h).
#include "solver/fit/fit.h"

#include <chrono>
#include <cmath>
#include <cstdio>

#include "solver/objective/blended_objective.h"
#include "solver/fit/blended_fit.h"
#include "solver/features/feature_prep.h"
#include "solver/objective/neighbour_term.h"
#include "solver/features/neighbours.h"
#include "solver/fit/optimizer.h"

namespace kith {
namespace {
using Clock = std::chrono::steady_clock;
double since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }
}  // namespace

bool FitOptions::IsValid(std::string* error, size_t n) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (!MapParameters::IsValid(error, n)) return false;
  if (threads < 0) return fail("threads must be 0 (all) or more");
  if (pca_dims < 0) return fail("pca dims must be 0 (never) or more");
  return true;
}

std::string FitSummary::BriefReport() const {
  char buf[256];
  std::snprintf(buf, sizeof buf, "%lld steps, KL %.4f, %.1f s (%.1f s set-up, %.1f steps a second), learning rate %.4g%s",
                static_cast<long long>(iterations), kl, seconds, setup_seconds,
                seconds > setup_seconds ? double(iterations) / (seconds - setup_seconds) : 0.0, learning_rate,
                stopped_early ? ", stopped early" : "");
  return buf;
}

FitSummary run_schedule(ObjectiveTerm& objective, const std::function<void(double)>& set_exaggeration, Points& y,
                        const LoopOptions& options, const ProgressFn& progress) {
  const auto t0 = Clock::now();
  FitSummary summary;
  const size_t n = size_t(y.rows());
  const Schedule& s = options.schedule;
  summary.learning_rate = s.learning_rate_for(n);
  GradientDescent gd;
  double exaggeration = -1.0;
  StepResult last;
  for (int64_t step = 0; step < options.iterations; ++step) {
    const int64_t it = options.first + step;
    const double e = s.exaggeration_at(it);
    if (e != exaggeration) {
      if (set_exaggeration) set_exaggeration(e);
      exaggeration = e;
    }
    if (s.reset_state_at_switch && s.switches_at(it) && step > 0) gd.reset();
    last = gd.step(objective, y, s.step_at(it, n));
    const double biggest = y.cwiseAbs().maxCoeff();
    if (!last.finite || !(biggest <= options.explode_above)) {
      char buf[200];
      std::snprintf(buf, sizeof buf,
                    "the map diverged at iteration %lld (%s); try a smaller learning rate or check the features",
                    static_cast<long long>(it + 1), last.finite ? "coordinates exploded" : "NaN or infinite values");
      throw DivergenceError(buf);
    }
    summary.iterations = step + 1;
    const bool report = (step + 1) % std::max(1, options.progress_every) == 0 || step + 1 == options.iterations;
    if (report && progress) {
      FitProgress p;
      p.iteration = step + 1;
      p.total = options.iterations;
      p.cost = last.cost;
      p.exaggerating = e != 1.0;
      const double t = since(t0);
      p.iterations_per_second = t > 0 ? double(step + 1) / t : 0.0;
      p.seconds_left = p.iterations_per_second > 0 ? double(options.iterations - step - 1) / p.iterations_per_second : 0;
      if (!progress(p)) {
        summary.stopped_early = true;
        break;
      }
    }
  }
  if (set_exaggeration) set_exaggeration(1.0);
  summary.kl = objective.evaluate(y, nullptr);
  summary.seconds = since(t0);
  return summary;
}

namespace {

// No features: the judgments' t-STE term alone (no KL term, so no exaggeration) from a seeded
// Gaussian start of standard deviation kJudgmentsStartScale.
constexpr double kJudgmentsStartScale = 1e-2;
// The map's first column's standard deviation at the start (as scikit-learn's init='pca'), also
// of the Gaussian start of a map from a given graph without features.
constexpr double kStartScale = 1e-4;

FitResult fit_judgments_alone(size_t n, const FitOptions& options, const ProgressFn& progress) {
  const auto t0 = Clock::now();
  FitResult r;
  r.features_note = "no features: placed from " + std::to_string(options.judgments.size()) + " judgments alone";
  BlendedObjective objective(n, options.dims);
  objective.set_alpha(options.dof);
  objective.set_judgments(options.judgments);  // throws JudgmentError for an unknown item
  r.map = random_start(n, options.dims, options.seed, kJudgmentsStartScale);
  LoopOptions loop;
  loop.schedule.learning_rate = options.learning_rate;
  loop.schedule.exaggeration_iterations = 0;  // nothing to exaggerate
  loop.iterations = options.iterations;
  r.summary = run_schedule(objective, {}, r.map, loop, progress);
  r.summary.kl = 0.0;  // there is no KL term
  r.summary.seconds = since(t0);
  return r;
}

}  // namespace

FitResult fit_map(const Points& features, const FitOptions& options, const ProgressFn& progress) {
  const auto t0 = Clock::now();
  const size_t n = size_t(features.rows());
  std::string error;
  if (n < 3) throw std::invalid_argument("a map needs at least 3 items (got " + std::to_string(n) + ")");
  const NeighbourGraph* graph = options.neighbours && !options.neighbours->empty() ? options.neighbours : nullptr;
  if (graph && graph->n != n)
    throw std::invalid_argument("the neighbour graph has " + std::to_string(graph->n) + " items, the features " +
                                std::to_string(n));
  if (features.cols() < 1 && !graph && options.judgments.empty())
    throw std::invalid_argument("the items have no feature columns and there are no judgments to place them by");
  if (!options.IsValid(&error, features.cols() > 0 || graph ? n : 0)) throw std::invalid_argument(error);
  if (features.cols() < 1 && !graph) return fit_judgments_alone(n, options, progress);
  const double perplexity = graph ? options.perplexity_for_graph(graph->k) : options.perplexity_for(n);
  if (graph)
    if (std::string e = MapParameters::check_graph_perplexity(perplexity, graph->k); !e.empty())
      throw std::invalid_argument(e);
  for (Eigen::Index i = 0; i < features.rows(); ++i)
    for (Eigen::Index c = 0; c < features.cols(); ++c)
      if (!std::isfinite(features(i, c)))
        throw std::invalid_argument("feature value at row " + std::to_string(i + 1) + ", column " +
                                    std::to_string(c + 1) + " is not a finite number");
  FitResult r;
  StageLog* stages = options.stages;
  if (features.cols() > 0) {
    if (stages) stages->begin("prepare features");
    FeaturePrepOptions prep;
    prep.standardize = options.standardize;
    prep.max_dims = options.pca_dims;
    prep.metric = options.metric;
    r.features = prepare_features(features, prep, &r.features_note);
  }
  if (graph) {
    if (stages) stages->begin("affinities (given graph)");
    r.p = std::make_shared<SparseAffinities>(joint_affinities_from_graph(*graph, perplexity));
    r.features_note = (r.features_note.empty() ? "" : r.features_note + "; ") + "neighbours from the given graph (" +
                      std::to_string(graph->k) + " an item)";
  } else {
    // The graph (12 bytes per neighbour) is not kept once P exists.
    AffinitySearch search;
    search.seed = options.seed;
    search.threads = options.threads;
    search.exact = options.exact;
    search.stages = stages;
    r.p = std::make_shared<SparseAffinities>(joint_affinities_for(r.features, perplexity, search));
    if (r.p->neighbour_recall >= 0) {
      char buf[128];
      std::snprintf(buf, sizeof buf, "; HNSW found %.1f%% of the exact neighbours of %zu sampled items",
                    100.0 * r.p->neighbour_recall, r.p->recall_sample);
      r.features_note += buf;
    }
  }
  if (stages) stages->begin(features.cols() > 0 ? "start (PCA)" : "start (random)");
  r.map = features.cols() > 0 ? pca_start(r.features, options.dims, kStartScale, options.seed)
                              : random_start(n, options.dims, options.seed, kStartScale);
  const double setup = since(t0);
  if (stages) stages->begin("optimize");

  NeighbourTermOptions topt;
  topt.dof = options.dof;
  topt.theta = options.theta;
  topt.force_exact = options.exact;
  topt.threads = options.threads;
  auto term = std::make_shared<NeighbourTerm>(r.p, topt);
  LoopOptions loop;
  loop.schedule.learning_rate = options.learning_rate;
  loop.iterations = options.iterations;
  if (options.judgments.empty()) {
    r.summary = run_schedule(
        *term, [&term](double e) { term->set_exaggeration(e); }, r.map, loop, progress);
  } else {
    // KL + blend x judgments (solver/objective/blended_objective.h); throws JudgmentError (an
    // invalid_argument) for a judgment naming an unknown item or the same item twice.
    BlendedObjective blended(n, options.dims);
    blended.set_neighbour_term(term);
    blended.set_alpha(options.dof);
    blended.set_blend(options.blend);
    blended.set_judgments(options.judgments);
    r.summary = run_schedule(
        blended, [&term](double e) { term->set_exaggeration(e); }, r.map, loop, progress);
    r.summary.kl = blended.last_costs().neighbour;
  }
  if (stages) stages->end();
  r.summary.setup_seconds = setup;
  r.summary.seconds = since(t0);
  return r;
}

}  // namespace kith
