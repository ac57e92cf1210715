// Benchmark: the Judgments panel's work per refresh at 50,000 judgments (solver/measures/judgment_review.h):
// filtering, same-question figures, per-person agreement with the map and the strongly violated
// list, each timed as the median of 15 runs. Prints a table (milliseconds).
//   cmake --build build --target bench_judgment_review && build/tests/bench_judgment_review
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <functional>
#include <random>
#include <string>
#include <vector>

#include "solver/measures/judgment_health.h"
#include "solver/measures/judgment_review.h"

using namespace kith;

namespace {
double median_ms(const std::function<void()>& f) {
  std::vector<double> t;
  for (int k = 0; k < 15; ++k) {
    const auto a = std::chrono::steady_clock::now();
    f();
    t.push_back(std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - a).count());
  }
  std::sort(t.begin(), t.end());
  return t[t.size() / 2];
}
}  // namespace

int main() {
  std::printf(
      "| items | judgments | filter (person + item text) | same question | agreement with map | violated (p < 0.1) "
      "|\n");
  std::printf("|---|---|---|---|---|---|\n");
  for (const size_t m : {5000, 50000}) {
    const int n = 10000;
    std::mt19937 rng(5);
    std::normal_distribution<double> g(0.0, 1.0);
    Points y(n, 3);
    for (int i = 0; i < n; ++i)
      for (int d = 0; d < 3; ++d) y(i, d) = 5.0 * g(rng);
    std::vector<std::string> ids;
    for (int i = 0; i < n; ++i) ids.push_back("item-" + std::to_string(i));
    std::uniform_int_distribution<int> item(0, n - 1);
    std::vector<Judgment> js;
    while (js.size() < m) {
      Judgment j;
      j.id = int64_t(js.size() + 1);
      j.anchor = item(rng), j.nearer = item(rng), j.farther = item(rng);
      if (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther) continue;
      j.person = "person " + std::to_string(rng() % 12);
      js.push_back(j);
      if (rng() % 10 == 0) {  // a re-asked question
        Judgment again = j;
        again.id++;
        again.person = "person " + std::to_string(rng() % 12);
        js.push_back(again);
      }
    }
    JudgmentFilter f;
    f.any_person = false;
    f.person = "person 3";
    f.item = "item-12";
    size_t sink = 0;
    const double t_filter = median_ms([&] { sink += filter_judgments(js, ids, f).size(); });
    const double t_same = median_ms([&] { sink += same_question_agreement(js).size(); });
    const double t_agree = median_ms([&] { sink += per_person_agreement(y, js).size(); });
    const double t_viol = median_ms([&] { sink += strongly_violated(y, js).size(); });
    std::printf("| %d | %zu | %.1f | %.1f | %.1f | %.1f |\n", n, js.size(), t_filter, t_same, t_agree, t_viol);
    if (sink == 0) std::printf("(nothing found)\n");
  }
  return 0;
}
