// The demo's measured claim over several seeds (solver/demo/demo_trial.h): held-out agreement
// with the simulated people's hidden distance, and the local 10-NN measure, for the features-only
// map, after 25, 50, 100 and 200 answers (the curve of one run per seed, solver/demo/demo_trial.h
// checkpoints), the control without answers, and the ceilings (solver/demo/demo_ceilings.h).
// Prints markdown tables with the medians and, with --svg, draws the curve.
//   build/tests/bench_demo [--seeds S] [--questions grid|pairs] [--picker informative|random]
//                          [--blend B] [--weights on|off] [--checkpoints 25,50,100,200]
//                          [--count SWATCHES] [--ceilings on|off] [--svg FILE] [--threads T]
//                          [--scenario demo|hue-blind|scale-heavy|pattern-first|light-first]
//                          [--metric blocks|columns] [--pool ITEMS] [--regroup STEPS]
//                          [--regroup-exaggeration E]
// --pool lets the questions name only that many items (drawn once), to measure the answers' reach:
// agreement on the held-out triplets none of whose items an answer named ("unnamed"), per seed and
// as medians (features-only map, after the last checkpoint, control).
// The last lines give trustworthiness against the features and a one-line summary (scenario, blend,
// held-out before / after the last checkpoint / control / t-SNE ceiling, local after / ceiling,
// trustworthiness before / after), for choosing the defaults.
// Not built by default: cmake --build build --target bench_demo
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "solver/demo/demo_ceilings.h"
#include "solver/demo/demo_trial.h"
#include "solver/demo/sample_library.h"
#include "solver/features/picture_descriptors.h"
#include "solver/measures/health.h"
#include "tests/bench/bench_common.h"

namespace {

using kith::bench::median;

// The curve: x = answers, y = median agreement; the ceilings as flat lines. Two panels.
void write_svg(const std::string& path, const std::vector<int>& xs, const std::vector<double> after[2],
               const std::vector<double> control[2], const double tsne[2], const double mds[2], const char* what) {
  std::FILE* f = std::fopen(path.c_str(), "w");
  if (!f) {
    std::fprintf(stderr, "bench_demo: cannot write %s\n", path.c_str());
    return;
  }
  const int W = 900, H = 380, pw = 380, ph = 260, top = 50, left[2] = {70, 510};
  const char* titles[2] = {"held-out triplets agreeing", "local: shared 10 nearest"};
  std::fprintf(f, "<svg xmlns='http://www.w3.org/2000/svg' width='%d' height='%d' font-family='sans-serif' font-size='13'>\n", W, H);
  std::fprintf(f, "<rect width='%d' height='%d' fill='#fbf8f1'/>\n", W, H);
  std::fprintf(f, "<text x='%d' y='24' font-size='15'>Demo: agreement with the people's hidden distance against answers (%s; medians of 5 seeds)</text>\n", 20, what);
  const double xmax = xs.empty() ? 1 : xs.back();
  for (int p = 0; p < 2; ++p) {
    const double lo = p == 0 ? 0.6 : 0.2, hi = p == 0 ? 1.0 : 1.0;
    auto X = [&](double a) { return left[p] + pw * a / xmax; };
    auto Y = [&](double v) { return top + ph * (1.0 - (v - lo) / (hi - lo)); };
    std::fprintf(f, "<text x='%d' y='%d'>%s</text>\n", left[p], top - 8, titles[p]);
    std::fprintf(f, "<rect x='%d' y='%d' width='%d' height='%d' fill='none' stroke='#888'/>\n", left[p], top, pw, ph);
    for (int t = 0; t <= 4; ++t) {
      const double v = lo + (hi - lo) * t / 4.0;
      std::fprintf(f, "<text x='%d' y='%.1f' text-anchor='end' fill='#555'>%.2f</text>\n", left[p] - 6, Y(v) + 4, v);
    }
    for (int x : xs)
      std::fprintf(f, "<text x='%.1f' y='%d' text-anchor='middle' fill='#555'>%d</text>\n", X(x), top + ph + 18, x);
    std::fprintf(f, "<text x='%.1f' y='%d' text-anchor='middle'>answers</text>\n", X(xmax / 2), top + ph + 38);
    auto flat = [&](double v, const char* colour, const char* label) {
      std::fprintf(f, "<line x1='%d' x2='%d' y1='%.1f' y2='%.1f' stroke='%s' stroke-dasharray='6,4'/>\n", left[p],
                   left[p] + pw, Y(v), Y(v), colour);
      std::fprintf(f, "<text x='%d' y='%.1f' fill='%s' text-anchor='end'>%s %.2f</text>\n", left[p] + pw - 4, Y(v) - 4,
                   colour, label, v);
    };
    flat(tsne[p], "#0072B2", "t-SNE of the hidden distance");
    flat(mds[p], "#CC79A7", "metric MDS of it");
    auto line = [&](const std::vector<double>& v, const char* colour) {
      std::string pts;
      char buf[64];
      for (size_t i = 0; i < v.size() && i < xs.size(); ++i) {
        std::snprintf(buf, sizeof buf, "%.1f,%.1f ", X(xs[i]), Y(v[i]));
        pts += buf;
        std::fprintf(f, "<circle cx='%.1f' cy='%.1f' r='3' fill='%s'/>\n", X(xs[i]), Y(v[i]), colour);
      }
      std::fprintf(f, "<polyline points='%s' fill='none' stroke='%s' stroke-width='2'/>\n", pts.c_str(), colour);
    };
    line(control[p], "#999999");
    line(after[p], "#D55E00");
  }
  std::fprintf(f, "<text x='70' y='%d' fill='#D55E00'>with the answers</text><text x='220' y='%d' fill='#999999'>control: same steps, no answers</text>\n", H - 12, H - 12);
  std::fprintf(f, "</svg>\n");
  std::fclose(f);
}

}  // namespace

int main(int argc, char** argv) {
  int seeds = 5, count = kith::SampleLibraryOptions{}.count, threads = 2;
  double blend = kith::DemoTrialOptions{}.blend;
  std::string questions = "grid", picker = "informative", weights = "on", ceilings = "on", svg, scenario = "demo",
              metric = "blocks";
  int pool = 0, regroup = kith::DemoTrialOptions{}.regroup_iterations;
  double regroup_exaggeration = kith::DemoTrialOptions{}.regroup_exaggeration;
  std::vector<int> checkpoints = {25, 50, 100, 200};
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string k = argv[i], v = argv[i + 1];
    if (k == "--seeds") seeds = std::atoi(v.c_str());
    else if (k == "--questions") questions = v;
    else if (k == "--picker") picker = v;
    else if (k == "--blend") blend = std::atof(v.c_str());
    else if (k == "--weights") weights = v;
    else if (k == "--count") count = std::atoi(v.c_str());
    else if (k == "--ceilings") ceilings = v;
    else if (k == "--svg") svg = v;
    else if (k == "--scenario") scenario = v;
    else if (k == "--threads") threads = std::atoi(v.c_str());
    else if (k == "--metric") metric = v;
    else if (k == "--pool") pool = std::atoi(v.c_str());
    else if (k == "--regroup") regroup = std::atoi(v.c_str());
    else if (k == "--regroup-exaggeration") regroup_exaggeration = std::atof(v.c_str());
    else if (k == "--checkpoints") checkpoints = kith::bench::int_list(v);
    else {
      std::fprintf(stderr, "bench_demo: unknown option %s\n", k.c_str());
      return 2;
    }
  }
  std::sort(checkpoints.begin(), checkpoints.end());
  kith::SampleLibraryOptions lo;
  lo.count = count;
  const auto swatches = kith::make_swatches(lo);
  const kith::Points f = kith::swatch_features(swatches);
  if (metric != "columns" && metric != "blocks") {
    std::fprintf(stderr, "bench_demo: --metric is columns or blocks, not %s\n", metric.c_str());
    return 2;
  }
  std::printf("scenario %s, swatches %d, %s questions, %s picker, blend %.2f, weights %s (%s), questions name %s, "
              "checkpoints", scenario.c_str(), count, questions.c_str(), picker.c_str(), blend, weights.c_str(),
              metric.c_str(), pool ? (std::to_string(pool) + " items").c_str() : "any item");
  for (int c : checkpoints) std::printf(" %d", c);
  std::printf("\n\n| seed | measure | features only |");
  for (int c : checkpoints) std::printf(" %d answers | control |", c);
  std::printf(" t-SNE ceiling | MDS ceiling |\n|---|---|---|");
  for (size_t c = 0; c < checkpoints.size(); ++c) std::printf("---|---|");
  std::printf("---|---|\n");
  // [measure][checkpoint] over seeds
  const size_t C = checkpoints.size();
  std::vector<std::vector<double>> after[2], control[2];
  std::vector<double> before[2], tsne[2], mds[2];
  for (int m = 0; m < 2; ++m) after[m].assign(C, {}), control[m].assign(C, {});
  std::vector<size_t> judgments(C, 0);
  std::vector<double> trust_before, trust_after;  // against the features, k = 10
  std::vector<double> unnamed[3], unnamed_count;  // features only, after the last checkpoint, control
  for (int s = 0; s < seeds; ++s) {
    kith::DemoTrialOptions o;
    kith::SimulatedPeopleOptions po;
    if (!kith::bench::seeded_scenario(uint64_t(42 + s), scenario, &o, &po))
      return std::fprintf(stderr, "bench_demo: unknown scenario %s\n", scenario.c_str()), 2;
    o.answers = checkpoints.empty() ? 0 : checkpoints.back();
    o.checkpoints = checkpoints;
    o.blend = blend;
    o.learn_weights = weights == "on";
    o.question = questions == "pairs" ? kith::QuestionKind::kPair : kith::QuestionKind::kGrid;
    if (picker == "random") o.picker.rule = kith::PickerRule::kRandom;
    o.threads = threads;
    o.metric = metric == "blocks" ? kith::FeatureMetricKind::kBlocks : kith::FeatureMetricKind::kColumns;
    o.ask_pool = pool;
    o.regroup_iterations = regroup;
    o.regroup_exaggeration = regroup_exaggeration;
    kith::SimulatedPeople people(kith::perceptual_items(swatches), po);
    const auto r = kith::run_demo_trial(f, people, o);
    kith::DemoCeilings ceil;
    if (ceilings == "on") {
      const auto heldout = people.truth_triplets(o.heldout_triplets, 0, o.heldout_gap, o.heldout_seed);
      kith::CeilingOptions co;
      co.threads = threads;
      ceil = kith::demo_ceilings(people, heldout, kith::hidden_neighbours(people, o.local_k), o.local_k, co);
    }
    if (!r.curve.empty()) {
      const auto& last = r.curve.back();
      unnamed[0].push_back(last.unnamed_before);
      unnamed[1].push_back(last.unnamed);
      unnamed[2].push_back(last.unnamed_control);
      unnamed_count.push_back(double(last.unnamed_triplets));
      std::printf("| %d | unnamed (%zu triplets) | %.3f | after %d answers %.3f | control %.3f | %s |\n", 42 + s,
                  last.unnamed_triplets, last.unnamed_before, last.answered, last.unnamed, last.unnamed_control,
                  o.metric == kith::FeatureMetricKind::kColumns ? r.column_metric.report().c_str()
                                                                : r.weights.report(r.blocks).c_str());
    }
    trust_before.push_back(kith::trustworthiness(f, r.features_only_map, 10, threads));
    trust_after.push_back(kith::trustworthiness(f, r.final_map, 10, threads));
    const double b[2] = {r.agreement_before, r.local_before};
    const double t[2] = {ceil.tsne_heldout, ceil.tsne_local}, md[2] = {ceil.mds_heldout, ceil.mds_local};
    for (int m = 0; m < 2; ++m) {
      before[m].push_back(b[m]);
      tsne[m].push_back(t[m]);
      mds[m].push_back(md[m]);
      std::printf("| %d | %s | %.3f |", 42 + s, m == 0 ? "held-out" : "local 10-NN", b[m]);
      for (size_t c = 0; c < C && c < r.curve.size(); ++c) {
        const auto& p = r.curve[c];
        const double a = m == 0 ? p.agreement : p.local, k = m == 0 ? p.agreement_control : p.local_control;
        after[m][c].push_back(a);
        control[m][c].push_back(k);
        judgments[c] = p.judgments;
        std::printf(" %.3f | %.3f |", a, k);
      }
      std::printf(" %.3f | %.3f |\n", t[m], md[m]);
    }
    std::fflush(stdout);
  }
  std::vector<double> after_median[2], control_median[2];
  double tsne_median[2], mds_median[2];
  for (int m = 0; m < 2; ++m) {
    std::printf("| median | %s | %.3f |", m == 0 ? "held-out" : "local 10-NN", median(before[m]));
    after_median[m].push_back(median(before[m]));
    control_median[m].push_back(median(before[m]));
    for (size_t c = 0; c < C; ++c) {
      after_median[m].push_back(median(after[m][c]));
      control_median[m].push_back(median(control[m][c]));
      std::printf(" %.3f | %.3f |", after_median[m].back(), control_median[m].back());
    }
    tsne_median[m] = median(tsne[m]);
    mds_median[m] = median(mds[m]);
    std::printf(" %.3f | %.3f |\n", tsne_median[m], mds_median[m]);
  }
  std::printf("\ntrustworthiness against the features (k = 10), medians: features-only map %.3f, after %d answers %.3f\n",
              median(trust_before), checkpoints.empty() ? 0 : checkpoints.back(), median(trust_after));
  std::printf("summary | %s | %.2f | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f |\n", scenario.c_str(), blend,
              median(before[0]), C ? median(after[0][C - 1]) : -1.0, C ? median(control[0][C - 1]) : -1.0,
              median(tsne[0]), C ? median(after[1][C - 1]) : -1.0, median(tsne[1]), median(trust_before),
              median(trust_after));
  std::printf("reach | %s | %s | pool %d | unnamed triplets %.0f | features only %.3f | after %.3f | control %.3f |\n",
              scenario.c_str(), metric.c_str(), pool, median(unnamed_count), median(unnamed[0]), median(unnamed[1]),
              median(unnamed[2]));
  std::printf("\njudgments at the checkpoints:");
  for (size_t c = 0; c < C; ++c) std::printf(" %d answers = %zu judgments;", checkpoints[c], judgments[c]);
  std::printf("\n");
  if (!svg.empty()) {
    std::vector<int> xs = {0};
    for (int c : checkpoints) xs.push_back(c);
    const std::string what = questions + " questions, blend " + std::to_string(blend).substr(0, 4);
    write_svg(svg, xs, after_median, control_median, tsne_median, mds_median, what.c_str());
    std::printf("curve: %s\n", svg.c_str());
  }
  return 0;
}
