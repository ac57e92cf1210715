// PanelTrial: the demo's story, measured headlessly and deterministically (one thread, fixed seeds):
//   1. the features-only map: fit_map (solver/fit.h) on the features;
//   2. agreement of that map with the hidden perceptual distance on held-out triplets
//      (SimulatedPanel::truth_triplets, never asked);
//   3. `answers` times: the picker (solver/picker.h, most informative by default) chooses a pair
//      question on the current map, the simulated panel answers it, the answer joins the blended
//      objective (KL + blend * t-STE) and the map takes `iterations_between` more steps;
//   4. `settle_iterations` more steps, then the same held-out agreement again.
// A control run takes exactly the same steps without the answers, so the change can be told
// apart from the effect of merely optimizing longer. `kith demo` with no display and the tests use
// it; the window uses the live engine instead. Any thread; nothing shared.
#pragma once
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "solver/judgment.h"
#include "solver/points.h"
#include "solver/question_flow.h"
#include "solver/picker.h"
#include "solver/simulated_panel.h"

namespace kith {

struct PanelTrialOptions {
  int answers = 100;               // questions the panel answers (default: 100)
  int fit_iterations = 750;        // steps of the features-only map (default: 750)
  int iterations_between = 10;     // steps after each answer (default: 10)
  int settle_iterations = 300;     // steps after the last answer (default: 300)
  double blend = 5.0;              // weight of the judgments (default: 5; see the README's demo section)
  double perplexity = 30.0;        // (default: 30)
  PickerOptions picker;            // (default: most informative)
  size_t heldout_triplets = 3000;  // held-out truth triplets (default: 3000)
  double heldout_gap = 3.0;        // least |d(a,b) - d(a,c)| of a held-out triplet, CIEDE2000 units (default: 3)
  uint64_t heldout_seed = 1234;    // (default: 1234)
  uint64_t seed = 42;              // the fit's seed (default: 42)
  bool control = true;             // also run the control without answers (default: true)
  int threads = 0;                 // inside one evaluation, 0 = all (default: 0)
  bool IsValid(std::string* error) const;
};

struct PanelTrialResult {
  Points features_only_map;          // after step 1
  Points final_map;                  // after step 4
  Points control_map;                // the control (empty if not run)
  std::vector<Judgment> answers;     // in the order given
  Question first_question;           // what was asked first (for the README's picture)
  double agreement_before = -1.0;    // held-out agreement of the features-only map
  double agreement_after = -1.0;     // ... of the final map
  double agreement_control = -1.0;   // ... of the control map (-1 if not run)
  double answers_satisfied = -1.0;   // fraction of the panel's answers the final map satisfies
  size_t heldout = 0;                // number of held-out triplets
  std::string BriefReport() const;   // one line
};


// Fraction of the triplets the map satisfies (a tie counts one half).
double triplet_agreement(const Points& y, const std::vector<Judgment>& triplets);

// Progress: called after each answer with (answers so far, total); may be empty.
PanelTrialResult run_panel_trial(const Points& features, SimulatedPanel& panel, const PanelTrialOptions& options,
                                 const std::function<void(int, int)>& progress = {});

}  // namespace kith
