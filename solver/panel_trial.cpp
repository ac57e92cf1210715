// See panel_trial.h.
#include "solver/panel_trial.h"

#include <cstdio>
#include <memory>
#include <stdexcept>

#include "solver/blended_objective.h"
#include "solver/fit.h"
#include <random>
#include "solver/neighbour_term.h"

namespace kith {

bool PanelTrialOptions::IsValid(std::string* error) const {
  auto fail = [&](const std::string& m) {
    if (error) *error = m;
    return false;
  };
  if (answers < 0) return fail("answers must be >= 0");
  if (fit_iterations < 1 || iterations_between < 0 || settle_iterations < 0) return fail("iterations must be >= 0");
  if (!(blend >= 0.0)) return fail("blend must be >= 0");
  if (heldout_triplets < 10) return fail("at least 10 held-out triplets are needed");
  return picker.IsValid(error);
}

double triplet_agreement(const Points& y, const std::vector<Judgment>& triplets) {
  if (triplets.empty()) return -1.0;
  double s = 0.0;
  for (const auto& t : triplets) {
    const double dn = (y.row(t.anchor) - y.row(t.nearer)).squaredNorm();
    const double df = (y.row(t.anchor) - y.row(t.farther)).squaredNorm();
    s += dn < df ? 1.0 : dn == df ? 0.5 : 0.0;
  }
  return s / double(triplets.size());
}

std::string PanelTrialResult::BriefReport() const {
  char buf[256];
  std::snprintf(buf, sizeof buf,
                "held-out agreement with the hidden distance: %.3f features only -> %.3f after %zu answers "
                "(control without answers %.3f; %zu held-out triplets)",
                agreement_before, agreement_after, answers.size(), agreement_control, heldout);
  return buf;
}

PanelTrialResult run_panel_trial(const Points& features, SimulatedPanel& panel, const PanelTrialOptions& options,
                                 const std::function<void(int, int)>& progress) {
  std::string error;
  if (!options.IsValid(&error)) throw std::invalid_argument(error);
  if (size_t(features.rows()) != panel.size())
    throw std::invalid_argument("the panel knows " + std::to_string(panel.size()) + " items, the features have " +
                                std::to_string(features.rows()));
  PanelTrialResult r;
  const auto heldout = panel.truth_triplets(options.heldout_triplets, 0, options.heldout_gap, options.heldout_seed);
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
  LoopOptions loop;
  loop.first = options.fit_iterations;
  auto continue_map = [&](BlendedObjective& objective, NeighbourTerm& term, Points& y, int64_t* at, int steps) {
    if (steps <= 0) return;
    loop.first = *at;
    loop.iterations = steps;
    run_schedule(objective, [&](double e) { term.set_exaggeration(e); }, y, loop);
    *at += steps;
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
    in.features = &fit.features;
    in.judgments = &r.answers;
    const Question question = picker.pair(in);
    if (question.anchor < 0 || question.candidates.size() < 2) break;
    if (q == 0) r.first_question = question;
    Judgment j = panel.answer(question.anchor, question.candidates[0], question.candidates[1]);
    j.id = int64_t(r.answers.size());
    r.answers.push_back(j);
    objective.add_judgment(j);
    continue_map(objective, *term, y, &at, options.iterations_between);
    if (progress) progress(q + 1, options.answers);
  }
  continue_map(objective, *term, y, &at, options.settle_iterations);
  r.final_map = y;
  r.agreement_after = triplet_agreement(y, heldout);
  r.answers_satisfied = r.answers.empty() ? -1.0 : triplet_agreement(y, r.answers);

  if (options.control) {  // the same steps, no answers
    auto control_term = std::make_shared<NeighbourTerm>(fit.p, no);
    BlendedObjective control(n, int(fit.map.cols()));
    control.set_neighbour_term(control_term);
    Points yc = fit.map;
    int64_t at_c = options.fit_iterations;
    continue_map(control, *control_term, yc, &at_c,
                 int(r.answers.size()) * options.iterations_between + options.settle_iterations);
    r.control_map = yc;
    r.agreement_control = triplet_agreement(yc, heldout);
  }
  return r;
}

}  // namespace kith
