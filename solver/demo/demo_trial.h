// DemoTrial: the demo's story, measured headlessly and deterministically (fixed seeds; the same
// bits for any thread count and on every x86-64 machine, see solver/base/portable_math.h):
//   1. the features-only map: fit_map (solver/fit/fit.h) on the features;
//   2. agreement of that map with the hidden perceptual distance on held-out triplets
//      (SimulatedPeople::truth_triplets, never asked), and the local measure: of each item's 10
//      nearest by the hidden distance, the share among its 10 nearest in the map;
//   3. `answers` times: the picker (solver/asking/picker.h, most informative by default) chooses a
//      question on the current map -- a grid (anchor + grid_size candidates, pick grid_choose,
//      as the window asks; grid_choose x (grid_size - grid_choose) judgments per answer) or a
//      pair (one judgment) -- the simulated people answers it, the judgments join the blended
//      objective (KL + blend * t-STE) and the map takes `iterations_between` more steps;
//      Every `reweight_every` answers from `reweight_from` on (and after the last) the answers also teach the features'
//      metric: block weights (solver/features/block_weights.h, the default) or a weight per feature
//      column pulled toward them (solver/features/feature_metric.h) are learned from all answers so
//      far and the t-SNE affinities are rebuilt from the reweighted features, so the whole map follows the
//      people, not only the items it was asked about (learn_weights; on by default), and the map
//      takes `regroup_iterations` steps with exaggerated affinities to regroup;
//   4. `settle_iterations` more steps, then the same measures again, also on the held-out triplets
//      none of whose items any answer named (the reach of the answers; with `ask_pool` the
//      questions name only a fixed few items).
// At each of `checkpoints` (numbers of answers) a copy of the map is finished as in 4 (relearning
// first when due, then settling) and measured, and so is the control, which gives the curve of
// agreement against answers from one run.
// A control run takes exactly the same stretches of steps (and exaggerations) without the answers, so the change can be told
// apart from the effect of merely optimizing longer. `kith demo` with no display and the tests use
// it; the window uses the live engine instead. Any thread; nothing shared.
#pragma once
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "solver/features/block_weights.h"
#include "solver/features/feature_metric.h"
#include "solver/base/judgment.h"
#include "solver/base/points.h"
#include "solver/asking/question_flow.h"
#include "solver/asking/picker.h"
#include "solver/demo/simulated_people.h"

namespace kith {

// The most informative rule with the settings the demo uses: candidates from the anchor's
// neighbourhood in the map (4) and the features (8) and from anywhere (28), the t-STE answer
// model, one anchor per question. With grid questions (seed 42, 100 answers, blend 5) these gave
// 0.729 held-out agreement where the earlier neighbourhood settings (24 nearest in the map, 8
// random) gave 0.704: with noisy people, a grid of near neighbours asks mostly what they cannot
// tell apart (tests/bench/RESULTS-demo.md).
PickerOptions demo_picker();

// What the answers teach about the features' metric (see DemoTrialOptions::metric).
enum class FeatureMetricKind { kBlocks, kColumns };

struct DemoTrialOptions {
  int answers = 100;               // questions the people answers (default: 100)
  QuestionKind question = QuestionKind::kGrid;     // grid or pair questions (default: grid)
  int grid_size = QuestionFlowOptions{}.grid_size;      // N candidates in a grid (default: as the window, 8)
  int grid_choose = QuestionFlowOptions{}.grid_choose;  // K picked (default: as the window, 2)
  std::vector<int> checkpoints;    // answers after which the curve is measured (default: none)
  int local_k = 10;                // neighbours of the local measure (default: 10)
  int fit_iterations = 750;        // steps of the features-only map (default: 750)
  int iterations_between = 10;     // steps after each answer (default: 10)
  int settle_iterations = 300;     // steps after the last answer (default: 300)
  double blend = 5.0;              // weight of the judgments (default: 5; see the README's demo section)
  double perplexity = 30.0;        // (default: 30)
  PickerOptions picker = demo_picker();  // (default: most informative, the demo's settings)
  size_t heldout_triplets = 3000;  // held-out truth triplets (default: 3000)
  double heldout_gap = 3.0;        // least |d(a,b) - d(a,c)| of a held-out triplet, CIEDE2000 units (default: 3)
  uint64_t heldout_seed = 1234;    // (default: 1234)
  uint64_t seed = 42;              // the fit's seed (default: 42)
  bool control = true;             // also run the control without answers (default: true)
  bool learn_weights = true;       // answers also teach the feature blocks' weights (default: true)
  int reweight_every = 10;         // answers between two relearnings of the weights (default: 10)
  int reweight_from = 30;          // no relearning before this many answers: 10 answers say too little
                                   // about five blocks (they gave 0.680 -> 0.611, 30 gave 0.704) (default: 30)
  std::vector<ColumnBlock> blocks; // the feature blocks; empty = the picture descriptors' blocks when the
                                   // features have descriptor_size() columns, else no reweighting (default: empty)
  BlockWeightOptions weights;      // (default: see block_weights.h)
  FeatureMetricKind metric = FeatureMetricKind::kBlocks;  // what the answers teach about the features:
                                   // one weight per block, or per column pulled toward them; the blocks
                                   // reach unnamed items as far or further (default: blocks;
                                   // tests/bench/RESULTS-demo.md "Reach beyond the named items")
  FeatureMetricOptions column_metric;  // (default: see feature_metric.h)
  int ask_pool = 0;                // questions name only this many items, drawn once from pool_seed,
                                   // to measure the reach of answers beyond them; 0 = any item (default: 0)
  uint64_t pool_seed = 99;         // (default: 99)
  int regroup_iterations = 100;    // after each reweighting, steps with the affinities exaggerated, so that
                                   // groups can move past each other into the new arrangement (default: 100)
  double regroup_exaggeration = 12; // (default: 12, as the first fit)
  int threads = 0;                 // inside one evaluation, 0 = all (default: 0)
  bool IsValid(std::string* error) const;
};

// One point of the curve: the map finished after `answered` answers, and the control.
struct TrialPoint {
  int answered = 0;
  size_t judgments = 0;
  double agreement = -1.0, agreement_control = -1.0;  // held-out triplets
  double local = -1.0, local_control = -1.0;          // the local measure
  // Held-out triplets none of whose three items any answer so far named: the map, the control and
  // the features-only map on the same triplets (-1 when there are none).
  double unnamed = -1.0, unnamed_control = -1.0, unnamed_before = -1.0;
  size_t unnamed_triplets = 0;
};

struct DemoTrialResult {
  Points features_only_map;          // after step 1
  Points final_map;                  // after step 4
  Points control_map;                // the control (empty if not run)
  int answered = 0;                  // questions answered
  std::vector<Judgment> judgments;   // the answers' judgments, in the order given
  Question first_question;           // what was asked first (for the README's picture)
  double agreement_before = -1.0;    // held-out agreement of the features-only map
  double agreement_after = -1.0;     // ... of the final map
  double agreement_control = -1.0;   // ... of the control map (-1 if not run)
  double local_before = -1.0, local_after = -1.0, local_control = -1.0;  // the local measure
  std::vector<TrialPoint> curve;     // at the checkpoints, in order
  double answers_satisfied = -1.0;   // fraction of the people's answers the final map satisfies
  size_t heldout = 0;                // number of held-out triplets
  std::vector<ColumnBlock> blocks;   // the blocks reweighted (empty if the weights were not learned)
  BlockWeightsResult weights;        // the block weights learned from all the answers
  FeatureMetricResult column_metric; // the columns' weights, with FeatureMetricKind::kColumns
  std::vector<int32_t> pool;         // the items questions could name (empty = any)
  // Held-out triplets no answer named (see TrialPoint), for the features-only, final and control maps.
  double unnamed_before = -1.0, unnamed_after = -1.0, unnamed_control = -1.0;
  size_t unnamed_triplets = 0;
  std::string BriefReport() const;   // one line
};


// Fraction of the triplets the map satisfies (a tie counts one half).
double triplet_agreement(const Points& y, const std::vector<Judgment>& triplets);

// The triplets none of whose three items any of the judgments names.
std::vector<Judgment> unnamed_triplets(const std::vector<Judgment>& triplets, const std::vector<Judgment>& judgments,
                                       size_t items);

// Each item's k nearest by the hidden distance (ties by index), row-major n x k.
std::vector<int32_t> hidden_neighbours(const SimulatedPeople& people, int k);
// The local measure: mean over items of |hidden k nearest ∩ k nearest in the map| / k.
double local_agreement(const Points& y, const std::vector<int32_t>& hidden, int k);

// The features reweighted by what the judgments teach, as options.metric says: block weights, or a
// weight per column pulled toward them (options.column_metric; its block stage is options.weights).
// Fills both results (column_metric empty with kBlocks). The trial and the window's demo use it.
Points reweighted_features(const Points& features, const std::vector<ColumnBlock>& blocks,
                           const std::vector<Judgment>& judgments, const DemoTrialOptions& options,
                           BlockWeightsResult* block_weights, FeatureMetricResult* column_metric);

// Every seed of a run from one number: the map's, the held-out triplets', the picker's and the
// people's. Seed 42 gives the defaults above (and SimulatedPeopleOptions' seed 7).
void set_trial_seed(uint64_t seed, DemoTrialOptions* trial, SimulatedPeopleOptions* people);

// Progress: called after each answer with (answers so far, total); may be empty.
DemoTrialResult run_demo_trial(const Points& features, SimulatedPeople& people, const DemoTrialOptions& options,
                                 const std::function<void(int, int)>& progress = {});

}  // namespace kith
