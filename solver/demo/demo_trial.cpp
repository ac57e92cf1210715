// See demo_trial.h.
#include "solver/demo/demo_trial.h"
#include "solver/measures/judgment_health.h"

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

namespace kith {

PickerOptions neighbourhood_picker() {
  PickerOptions o;
  o.near_candidates = 24;
  o.feature_candidates = 8;
  o.random_candidates = 8;
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
  if (fit_iterations < 1 || iterations_between < 0 || settle_iterations < 0) return fail("iterations must be >= 0");
  if (!(blend >= 0.0)) return fail("blend must be >= 0");
  if (heldout_triplets < 10) return fail("at least 10 held-out triplets are needed");
  if (reweight_every < 1) return fail("reweight_every must be >= 1");
  if (reweight_from < 1) return fail("reweight_from must be >= 1");
  if (regroup_iterations < 0) return fail("regroup_iterations must be >= 0");
  if (!(regroup_exaggeration >= 1.0) || !std::isfinite(regroup_exaggeration))
    return fail("regroup_exaggeration must be >= 1");
  if (!weights.IsValid(error)) return false;
  return picker.IsValid(error);
}

double triplet_agreement(const Points& y, const std::vector<Judgment>& triplets) {
  return judgment_agreement(y, triplets);  // the one definition (solver/measures/judgment_health.h)
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

std::string DemoTrialResult::BriefReport() const {
  char buf[320];
  std::snprintf(buf, sizeof buf,
                "held-out agreement with the hidden distance: %.3f features only -> %.3f after %zu answers "
                "(control without answers %.3f; %zu held-out triplets)",
                agreement_before, agreement_after, answers.size(), agreement_control, heldout);
  std::string out = buf;
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

  FitOptions fo;
  fo.perplexity = options.perplexity;
  fo.iterations = options.fit_iterations;
  fo.seed = options.seed;
  fo.threads = options.threads;
  FitResult fit = fit_map(features, fo);
  r.features_only_map = fit.map;
  r.agreement_before = triplet_agreement(fit.map, heldout);

  const size_t n = size_t(features.rows());
  NeighbourTermOptions no;
  no.threads = options.threads;
  // Every stretch of steps the answered map takes is recorded (steps, exaggeration), and the control
  // replays exactly the same stretches.
  std::vector<std::pair<int, double>> stretches;
  auto continue_map = [&](BlendedObjective& objective, NeighbourTerm& term, Points& y, int64_t* at, int steps,
                          double exaggeration, bool record) {
    if (steps <= 0) return;
    if (record) stretches.push_back({steps, exaggeration});
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
  Points picker_features = fit.features;
  auto reweight = [&](NeighbourTerm& term) {
    r.weights = learn_block_weights(features, r.blocks, r.answers, options.weights);
    FeaturePrepOptions prep;
    prep.standardize = fo.standardize;
    prep.max_dims = fo.pca_dims;
    picker_features = prepare_features(apply_block_weights(features, r.blocks, r.weights.weights), prep);
    term.set_affinities(std::make_shared<SparseAffinities>(
        joint_affinities_for(picker_features, fo.perplexity_for(n), {fo.seed, fo.threads})));
  };

  auto term = std::make_shared<NeighbourTerm>(fit.p, no);
  BlendedObjective objective(n, int(fit.map.cols()));
  objective.set_neighbour_term(term);
  objective.set_blend(options.blend);
  Points y = fit.map;
  int64_t at = options.fit_iterations;
  Picker picker(options.picker);
  for (int q = 0; q < options.answers; ++q) {
    PickerInput in;
    in.map = &y;
    in.features = &picker_features;
    in.judgments = &r.answers;
    const Question question = picker.pair(in);
    if (question.anchor < 0 || question.candidates.size() < 2) break;
    if (q == 0) r.first_question = question;
    Judgment j = people.answer(question.anchor, question.candidates[0], question.candidates[1]);
    j.id = int64_t(r.answers.size());
    r.answers.push_back(j);
    objective.add_judgment(j);
    if (!r.blocks.empty() && q + 1 >= options.reweight_from && (q + 1) % options.reweight_every == 0) {
      reweight(*term);
      continue_map(objective, *term, y, &at, options.regroup_iterations, options.regroup_exaggeration, true);
    }
    continue_map(objective, *term, y, &at, options.iterations_between, 1.0, true);
    if (progress) progress(q + 1, options.answers);
  }
  if (!r.blocks.empty() && r.answers.size() >= size_t(options.reweight_from) &&
      r.answers.size() % size_t(options.reweight_every) != 0) {
    reweight(*term);
    continue_map(objective, *term, y, &at, options.regroup_iterations, options.regroup_exaggeration, true);
  }
  continue_map(objective, *term, y, &at, options.settle_iterations, 1.0, true);
  r.final_map = y;
  r.agreement_after = triplet_agreement(y, heldout);
  r.answers_satisfied = r.answers.empty() ? -1.0 : triplet_agreement(y, r.answers);

  if (options.control) {  // the same stretches of steps, no answers, the features as given
    auto control_term = std::make_shared<NeighbourTerm>(fit.p, no);
    BlendedObjective control(n, int(fit.map.cols()));
    control.set_neighbour_term(control_term);
    Points yc = fit.map;
    int64_t at_c = options.fit_iterations;
    for (const auto& [steps, exaggeration] : stretches)
      continue_map(control, *control_term, yc, &at_c, steps, exaggeration, false);
    r.control_map = yc;
    r.agreement_control = triplet_agreement(yc, heldout);
  }
  return r;
}

}  // namespace kith
