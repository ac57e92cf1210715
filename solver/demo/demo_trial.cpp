// See demo_trial.h.
#include "solver/demo/demo_trial.h"
#include "solver/measures/judgment_health.h"

#include <algorithm>
#include <cstdio>
#include <memory>
#include <stdexcept>

#include <cmath>
#include <random>

#include "solver/features/affinities.h"
#include "solver/objective/blended_objective.h"
#include "solver/features/feature_prep.h"
#include "solver/fit/fit.h"
#include "solver/objective/neighbour_term.h"
#include "solver/features/neighbours.h"
#include "solver/features/picture_descriptors.h"
#include "solver/base/portable_random.h"

namespace kith {

PickerOptions demo_picker() {
  PickerOptions o;
  o.near_candidates = 4;
  o.feature_candidates = 8;
  o.random_candidates = 28;
  o.anchors_scored = 1;
  o.scored_places = 0;
  o.local_share = 0.0;
  o.response = PickerResponse::kTSTE;
  return o;
}


bool DemoTrialOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (answers < 0) return fail("answers must be >= 0");
  if (grid_size < 3 || grid_choose < 1 || grid_choose >= grid_size)
    return fail("a grid needs at least 3 candidates and 1 <= choose < candidates");
  if (local_k < 1) return fail("local_k must be >= 1");
  if (fit_iterations < 1 || iterations_between < 0 || settle_iterations < 0) return fail("iterations must be >= 0");
  if (!(blend >= 0.0)) return fail("blend must be >= 0");
  if (heldout_triplets < 10) return fail("at least 10 held-out triplets are needed");
  if (reweight_every < 1) return fail("reweight_every must be >= 1");
  if (reweight_from < 1) return fail("reweight_from must be >= 1");
  if (regroup_iterations < 0) return fail("regroup_iterations must be >= 0");
  if (!(regroup_exaggeration >= 1.0) || !std::isfinite(regroup_exaggeration))
    return fail("regroup_exaggeration must be >= 1");
  if (ask_pool != 0 && ask_pool < grid_size + 1) return fail("ask_pool must be 0 or hold at least a grid (grid_size + 1 items)");
  if (!weights.IsValid(error)) return false;
  if (!column_metric.IsValid(error)) return false;
  return picker.IsValid(error);
}

double triplet_agreement(const Points& y, const std::vector<Judgment>& triplets) {
  return judgment_agreement(y, triplets);  // the one definition (solver/measures/judgment_health.h)
}

std::vector<Judgment> unnamed_triplets(const std::vector<Judgment>& triplets, const std::vector<Judgment>& judgments,
                                       size_t items) {
  std::vector<uint8_t> named(items, 0);
  auto name = [&](int32_t i) {
    if (i >= 0 && size_t(i) < items) named[size_t(i)] = 1;
  };
  for (const Judgment& j : judgments) name(j.anchor), name(j.nearer), name(j.farther);
  auto is_named = [&](int32_t i) { return i >= 0 && size_t(i) < items && named[size_t(i)]; };
  std::vector<Judgment> out;
  for (const Judgment& t : triplets)
    if (!is_named(t.anchor) && !is_named(t.nearer) && !is_named(t.farther)) out.push_back(t);
  return out;
}

Points reweighted_features(const Points& features, const std::vector<ColumnBlock>& blocks,
                           const std::vector<Judgment>& judgments, const DemoTrialOptions& options,
                           BlockWeightsResult* block_weights, FeatureMetricResult* column_metric) {
  if (options.metric == FeatureMetricKind::kColumns) {
    FeatureMetricOptions mo = options.column_metric;
    mo.blocks = options.weights;  // the first stage is the block weights' own
    *column_metric = learn_feature_metric(features, blocks, judgments, mo);
    *block_weights = column_metric->blocks;
    return apply_column_weights(features, column_metric->weights);
  }
  *block_weights = learn_block_weights(features, blocks, judgments, options.weights);
  *column_metric = {};
  return apply_block_weights(features, blocks, block_weights->weights);
}

void set_trial_seed(uint64_t seed, DemoTrialOptions* trial, SimulatedPeopleOptions* people) {
  const uint64_t shift = seed - 42;  // wraps for seeds below 42, which is fine for seeds
  if (trial) {
    trial->seed = seed;
    trial->heldout_seed = 1234 + shift;
    trial->picker.seed = 1 + shift;
  }
  if (people) people->seed = 7 + shift;
}

std::vector<int32_t> hidden_neighbours(const SimulatedPeople& people, int k) {
  const int32_t n = int32_t(people.size());
  if (k < 1 || k >= n) throw std::invalid_argument("hidden_neighbours: k must be in 1 .. N-1");
  std::vector<int32_t> out(size_t(n) * size_t(k));
  std::vector<std::pair<double, int32_t>> row(size_t(n - 1));
  for (int32_t i = 0; i < n; ++i) {
    size_t at = 0;
    for (int32_t j = 0; j < n; ++j)
      if (j != i) row[at++] = {people.distance(i, j), j};
    std::partial_sort(row.begin(), row.begin() + k, row.end());
    for (int c = 0; c < k; ++c) out[size_t(i) * size_t(k) + size_t(c)] = row[size_t(c)].second;
  }
  return out;
}

double local_agreement(const Points& y, const std::vector<int32_t>& hidden, int k) {
  const Eigen::Index n = y.rows();
  if (k < 1 || hidden.size() != size_t(n) * size_t(k)) throw std::invalid_argument("local_agreement: shapes differ");
  std::vector<std::pair<double, int32_t>> row(size_t(n - 1));
  double total = 0.0;
  for (Eigen::Index i = 0; i < n; ++i) {
    size_t at = 0;
    for (Eigen::Index j = 0; j < n; ++j)
      if (j != i) row[at++] = {(y.row(i) - y.row(j)).squaredNorm(), int32_t(j)};
    std::partial_sort(row.begin(), row.begin() + k, row.end());
    int shared = 0;
    for (int c = 0; c < k; ++c)
      for (int h = 0; h < k; ++h)
        if (row[size_t(c)].second == hidden[size_t(i) * size_t(k) + size_t(h)]) ++shared;
    total += double(shared) / double(k);
  }
  return total / double(n);
}

std::string DemoTrialResult::BriefReport() const {
  char buf[420];
  std::snprintf(buf, sizeof buf,
                "held-out agreement with the hidden distance: %.3f features only -> %.3f after %d answers (%zu "
                "judgments; control without answers %.3f; %zu held-out triplets); local 10-NN %.3f -> %.3f "
                "(control %.3f)",
                agreement_before, agreement_after, answered, judgments.size(), agreement_control, heldout,
                local_before, local_after, local_control);
  std::string out = buf;
  if (unnamed_triplets > 0) {
    std::snprintf(buf, sizeof buf, "; on the %zu held-out triplets no answer named %.3f -> %.3f (control %.3f)",
                  unnamed_triplets, unnamed_before, unnamed_after, unnamed_control);
    out += buf;
  }
  if (!column_metric.weights.empty()) out += "; " + column_metric.report();
  if (!blocks.empty() && !weights.weights.empty())
    out += "; block weights learned from the answers: " + weights.report(blocks);
  else if (!blocks.empty())
    out += "; too few answers to learn block weights from yet";
  return out;
}

DemoTrialResult run_demo_trial(const Points& features, SimulatedPeople& people, const DemoTrialOptions& options,
                                 const std::function<void(int, int)>& progress) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  if (size_t(features.rows()) != people.size())
    throw std::invalid_argument("the simulated people knows " + std::to_string(people.size()) + " items, the features have " +
                                std::to_string(features.rows()));
  DemoTrialResult r;
  const auto heldout = people.truth_triplets(options.heldout_triplets, 0, options.heldout_gap, options.heldout_seed);
  r.heldout = heldout.size();
  const int local_k = std::min<int>(options.local_k, int(people.size()) - 1);
  const std::vector<int32_t> hidden = hidden_neighbours(people, local_k);

  // The trial's recorded figures (tests/bench/RESULTS-demo.md, README) were measured with exact
  // repulsion, which its few hundred items had before the switch moved to 100 items; the trial
  // keeps it (here and in the answered map's term below) so those figures still hold.
  FitOptions fo;
  fo.exact = true;
  fo.perplexity = options.perplexity;
  fo.iterations = options.fit_iterations;
  fo.seed = options.seed;
  fo.threads = options.threads;
  FitResult fit = fit_map(features, fo);
  r.features_only_map = fit.map;
  r.agreement_before = triplet_agreement(fit.map, heldout);
  r.local_before = local_agreement(fit.map, hidden, local_k);

  const size_t n = size_t(features.rows());
  NeighbourTermOptions no;
  no.threads = options.threads;
  no.force_exact = true;
  // Every stretch of steps the answered map takes is recorded (steps, exaggeration), and the control
  // replays exactly the same stretches.
  std::vector<std::pair<int, double>> stretches;
  auto continue_map = [&](BlendedObjective& objective, NeighbourTerm& term, Points& y, int64_t* at, int steps,
                          double exaggeration, std::vector<std::pair<int, double>>* record) {
    if (steps <= 0) return;
    if (record) record->push_back({steps, exaggeration});
    LoopOptions loop;
    loop.first = *at;
    loop.iterations = steps;
    if (exaggeration > 1.0) {  // exaggerated from `at` to `at + steps`, then back to the usual schedule
      loop.schedule.early_exaggeration = exaggeration;
      loop.schedule.exaggeration_iterations = *at + steps;
    }
    run_schedule(objective, [&](double e) { term.set_exaggeration(e); }, y, loop);
    *at += steps;
  };

  // The blocks whose weights the answers teach.
  if (options.learn_weights) {
    r.blocks = options.blocks;
    if (r.blocks.empty() && features.cols() == descriptor_size())
      for (const auto& b : descriptor_blocks()) r.blocks.push_back({b.name, b.begin, b.size});
  }
  FeaturePrepOptions prep;
  prep.standardize = fo.standardize;
  prep.max_dims = fo.pca_dims;
  Points picker_features = fit.features;
  // Weights from the judgments so far; the prepared reweighted features and their affinities.
  auto relearn = [&](BlockWeightsResult* weights, FeatureMetricResult* columns, Points* prepared) {
    *prepared = prepare_features(reweighted_features(features, r.blocks, r.judgments, options, weights, columns), prep);
    return std::make_shared<SparseAffinities>(joint_affinities_for(*prepared, fo.perplexity_for(n), {fo.seed, fo.threads}));
  };
  auto relearning_due_at_end = [&](int answered) {
    return !r.blocks.empty() && answered >= options.reweight_from && answered % options.reweight_every != 0;
  };

  auto term = std::make_shared<NeighbourTerm>(fit.p, no);
  BlendedObjective objective(n, int(fit.map.cols()));
  objective.set_neighbour_term(term);
  objective.set_blend(options.blend);
  Points y = fit.map;
  int64_t at = options.fit_iterations;
  // The control: the same stretches without answers, the features as given; it catches up with the
  // answered map's stretches whenever it is measured.
  auto control_term = std::make_shared<NeighbourTerm>(fit.p, no);
  BlendedObjective control(n, int(fit.map.cols()));
  control.set_neighbour_term(control_term);
  Points yc = fit.map;
  int64_t at_c = options.fit_iterations;
  size_t control_done = 0;
  auto catch_up_control = [&] {
    for (; control_done < stretches.size(); ++control_done)
      continue_map(control, *control_term, yc, &at_c, stretches[control_done].first, stretches[control_done].second,
                   nullptr);
  };

  // Finishes copies of the answered map and of the control as step 4 does, and measures them.
  auto measure_branch = [&](int answered) {
    TrialPoint point;
    point.answered = answered;
    point.judgments = r.judgments.size();
    std::vector<std::pair<int, double>> finish;
    Points yb = y;
    int64_t at_b = at;
    auto branch_term = std::make_shared<NeighbourTerm>(fit.p, no);
    branch_term->set_affinities(term->affinities());
    BlendedObjective branch(n, int(fit.map.cols()));
    branch.set_neighbour_term(branch_term);
    branch.set_blend(options.blend);
    branch.set_judgments(r.judgments);
    if (relearning_due_at_end(answered)) {
      BlockWeightsResult w;
      FeatureMetricResult c;
      Points prepared;
      branch_term->set_affinities(relearn(&w, &c, &prepared));
      continue_map(branch, *branch_term, yb, &at_b, options.regroup_iterations, options.regroup_exaggeration, &finish);
    }
    continue_map(branch, *branch_term, yb, &at_b, options.settle_iterations, 1.0, &finish);
    point.agreement = triplet_agreement(yb, heldout);
    point.local = local_agreement(yb, hidden, local_k);
    const auto unnamed = unnamed_triplets(heldout, r.judgments, n);
    point.unnamed_triplets = unnamed.size();
    if (!unnamed.empty()) {
      point.unnamed = triplet_agreement(yb, unnamed);
      point.unnamed_before = triplet_agreement(fit.map, unnamed);
    }
    if (options.control) {
      catch_up_control();
      Points ycb = yc;
      int64_t at_cb = at_c;
      auto cterm = std::make_shared<NeighbourTerm>(fit.p, no);
      BlendedObjective cbranch(n, int(fit.map.cols()));
      cbranch.set_neighbour_term(cterm);
      for (const auto& [steps, exaggeration] : finish) continue_map(cbranch, *cterm, ycb, &at_cb, steps, exaggeration, nullptr);
      point.agreement_control = triplet_agreement(ycb, heldout);
      point.local_control = local_agreement(ycb, hidden, local_k);
      if (!unnamed.empty()) point.unnamed_control = triplet_agreement(ycb, unnamed);
    }
    r.curve.push_back(point);
  };
  std::vector<int> checkpoints = options.checkpoints;
  std::sort(checkpoints.begin(), checkpoints.end());
  size_t next_checkpoint = 0;
  while (next_checkpoint < checkpoints.size() && checkpoints[next_checkpoint] <= 0) ++next_checkpoint;

  // The items questions may name: all, or a fixed few (the picker sees only their rows).
  if (options.ask_pool > 0) {
    if (size_t(options.ask_pool) > n) throw std::invalid_argument("ask_pool is larger than the collection");
    std::vector<int32_t> all(n);
    for (size_t i = 0; i < n; ++i) all[i] = int32_t(i);
    std::mt19937_64 pool_rng(options.pool_seed);
    shuffle(all.begin(), all.end(), pool_rng);
    r.pool.assign(all.begin(), all.begin() + options.ask_pool);
    std::sort(r.pool.begin(), r.pool.end());
  }
  std::vector<int32_t> pool_index(n, -1);
  for (size_t k = 0; k < r.pool.size(); ++k) pool_index[size_t(r.pool[k])] = int32_t(k);
  Picker picker(options.picker);
  const bool grid = options.question == QuestionKind::kGrid;
  auto ask = [&](PickerInput in) {
    if (r.pool.empty())
      return grid ? picker.grid(in, options.grid_size, options.grid_choose) : picker.pair(in);
    const Eigen::Index m = Eigen::Index(r.pool.size());
    Points sub_map(m, y.cols()), sub_features(m, picker_features.cols());
    for (Eigen::Index k = 0; k < m; ++k) {
      sub_map.row(k) = y.row(r.pool[size_t(k)]);
      sub_features.row(k) = picker_features.row(r.pool[size_t(k)]);
    }
    std::vector<Judgment> sub_judgments = r.judgments;  // every one names pool items only
    for (Judgment& j : sub_judgments)
      j.anchor = pool_index[size_t(j.anchor)], j.nearer = pool_index[size_t(j.nearer)],
      j.farther = pool_index[size_t(j.farther)];
    in.map = &sub_map;
    in.features = &sub_features;
    in.judgments = &sub_judgments;
    Question q = grid ? picker.grid(in, options.grid_size, options.grid_choose) : picker.pair(in);
    if (q.anchor >= 0) q.anchor = r.pool[size_t(q.anchor)];
    for (int32_t& c : q.candidates) c = r.pool[size_t(c)];
    return q;
  };
  for (int q = 0; q < options.answers; ++q) {
    PickerInput in;
    in.map = &y;
    in.features = &picker_features;
    in.judgments = &r.judgments;
    const Question question = ask(in);
    if (question.anchor < 0 || question.candidates.size() < 2) break;
    if (q == 0) r.first_question = question;
    std::vector<Judgment> given;
    if (grid && int(question.candidates.size()) > options.grid_choose)
      given = people.answer_grid(question.anchor, question.candidates, options.grid_choose);
    else
      given = {people.answer(question.anchor, question.candidates[0], question.candidates[1])};
    for (Judgment& j : given) {
      j.id = int64_t(r.judgments.size());
      r.judgments.push_back(j);
      objective.add_judgment(j);
    }
    r.answered = q + 1;
    if (!r.blocks.empty() && q + 1 >= options.reweight_from && (q + 1) % options.reweight_every == 0) {
      term->set_affinities(relearn(&r.weights, &r.column_metric, &picker_features));
      continue_map(objective, *term, y, &at, options.regroup_iterations, options.regroup_exaggeration, &stretches);
    }
    continue_map(objective, *term, y, &at, options.iterations_between, 1.0, &stretches);
    if (progress) progress(q + 1, options.answers);
    for (; next_checkpoint < checkpoints.size() && checkpoints[next_checkpoint] == q + 1; ++next_checkpoint)
      measure_branch(q + 1);
  }
  if (relearning_due_at_end(r.answered)) {
    term->set_affinities(relearn(&r.weights, &r.column_metric, &picker_features));
    continue_map(objective, *term, y, &at, options.regroup_iterations, options.regroup_exaggeration, &stretches);
  }
  continue_map(objective, *term, y, &at, options.settle_iterations, 1.0, &stretches);
  r.final_map = y;
  r.agreement_after = triplet_agreement(y, heldout);
  r.local_after = local_agreement(y, hidden, local_k);
  r.answers_satisfied = r.judgments.empty() ? -1.0 : triplet_agreement(y, r.judgments);

  const auto unnamed = unnamed_triplets(heldout, r.judgments, n);
  r.unnamed_triplets = unnamed.size();
  if (!unnamed.empty()) {
    r.unnamed_before = triplet_agreement(r.features_only_map, unnamed);
    r.unnamed_after = triplet_agreement(y, unnamed);
  }
  if (options.control) {
    catch_up_control();
    r.control_map = yc;
    if (!unnamed.empty()) r.unnamed_control = triplet_agreement(yc, unnamed);
    r.agreement_control = triplet_agreement(yc, heldout);
    r.local_control = local_agreement(yc, hidden, local_k);
  }
  return r;
}

}  // namespace kith
