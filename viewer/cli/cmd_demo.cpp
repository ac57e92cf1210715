// kith demo: the sample library of an interior studio (solver/demo/sample_library.h), features from
// its pictures (solver/features/picture_descriptors.h), and a simulated people (solver/demo/simulated_people.h)
// answering the most informative questions.
//   With a display: the live map in the window; K lets the people answer 10 questions (shift+K: 100).
//   Without one (or when the window cannot open): the measured story, headless and repeatable
//   (solver/demo/demo_trial.h): pictures of the features-only map, the first question and the map
//   after the answers, and the held-out agreement with the people's hidden distance, printed.
// Main thread only.
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <mutex>
#include <random>
#include <string>

#include "solver/features/block_weights.h"
#include "solver/io/collection.h"
#include "solver/demo/demo_trial.h"
#include "solver/features/picture_descriptors.h"
#include "solver/demo/sample_library.h"
#include "solver/demo/simulated_people.h"
#include "viewer/window/engine_feed.h"
#include "viewer/window/app.h"
#include "viewer/cli/commands.h"
#include "viewer/scene/map_feed.h"
#include "viewer/cli/map_source.h"
#include "viewer/window/offscreen_render.h"
#include "viewer/session/session_link.h"
#include "viewer/window/session_menu.h"

namespace kith {
namespace {

namespace fs = std::filesystem;

const char* kHelp =
    "usage: kith demo [options]\n"
    "\n"
    "Opens the demo: 600 fabric and paint swatches of an invented interior studio, laid out from\n"
    "features computed from their pictures. A simulated people of four people (one of whom sees\n"
    "colour differently) answers kith's most informative questions: press K in the window for 10\n"
    "answers, shift+K for 100, and watch the map and the 'agreement with the people's eye' figure.\n"
    "With no display the demo runs headless: it writes pictures of the map before and after the\n"
    "simulated people's answers and prints how much closer the map came to the people's hidden distance.\n"
    "The pictures of the library are drawn once into a cache folder.\n"
    "\n"
    "options:\n"
    "  --answers N       answers in the headless run (default: 100)\n"
    "  --blend B         weight of the answers against the features (default: 5)\n"
    "  --weights on|off  the answers also teach how much each block of picture features\n"
    "                    (colour, texture, layout) matters, and the map is rebuilt from the\n"
    "                    reweighted features, so it follows the people also where nobody was\n"
    "                    asked (default: on)\n"
    "  --seed N          seed of the headless run: map, people, questions and held-out triplets\n"
    "                    (default: 42)\n"
    "  --out DIR         where the headless run writes its PNGs (default: the library folder)\n"
    "  --library DIR     the sample library's folder (default: $XDG_CACHE_HOME/kith/demo or\n"
    "                    ~/.cache/kith/demo)\n"
    "  --no-window       the headless run even when there is a display\n"
    "  --size WxH        picture size of the headless run (default: 1280x800)\n"
    "\n"
    "exit codes: 0 ok, 1 internal error (e.g. no OpenGL at all), 2 bad usage, 3 the library folder\n"
    "cannot be written or read\n";

struct DemoData {
  SampleLibrary library;
  Collection collection;
  std::vector<PerceptualItem> perceptual;  // collection order
};

// Writes (or reuses) the library and loads it the way a user's folder is loaded: items table,
// then features from the pictures.
bool load_demo(const std::string& folder, DemoData* out) {
  SampleLibraryOptions lo;
  lo.folder = folder;
  try {
    out->library = ensure_sample_library(lo);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith demo: %s\n", e.what());
    return false;
  }
  std::printf("sample library: %s (%s)\n", out->library.folder.c_str(),
              out->library.generated ? "pictures drawn now" : "already there");
  try {
    LoadOptions load;
    load.allow_no_features = true;
    out->collection = load_collection(out->library.items_csv, load);
    describe_collection(out->collection);
  } catch (const LoadError& e) {
    std::fprintf(stderr, "kith demo: %s\n", e.problem().str().c_str());
    return false;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith demo: %s\n", e.what());
    return false;
  }
  std::unordered_map<std::string, const Swatch*> by_id;
  for (const auto& s : out->library.swatches) by_id[s.id] = &s;
  for (const auto& id : out->collection.ids) {
    auto it = by_id.find(id);
    if (it == by_id.end()) {
      std::fprintf(stderr, "kith demo: %s: item '%s' is not one of the library's swatches\n",
                   out->library.items_csv.c_str(), id.c_str());
      return false;
    }
    out->perceptual.push_back(perceptual_items({*it->second})[0]);
  }
  return true;
}

// ---- headless -------------------------------------------------------------------------------
int run_headless(const DemoData& d, DemoTrialOptions trial, uint64_t seed, const std::string& out_dir, int width,
                 int height) {
  SimulatedPeopleOptions po;
  set_trial_seed(seed, &trial, &po);
  SimulatedPeople people(d.perceptual, po);
  std::printf("features-only map, then %d answers from the simulated people (most informative questions)...\n",
              trial.answers);
  const DemoTrialResult r = run_demo_trial(d.collection.features, people, trial, [](int done, int total) {
    if (done % 20 == 0 || done == total) std::printf("  %d of %d answers\n", done, total), std::fflush(stdout);
  });

  std::error_code ec;
  fs::create_directories(out_dir, ec);
  RenderOptions ro;
  ro.width = width;
  ro.height = height;
  ro.title = "Studio sample library";
  for (size_t t = 0; t < d.collection.tags.size(); ++t)  // colour by collection line
    if (d.collection.tags[t].name == "line") ro.view.colour_by = ColourBy{ColourKind::kTag, int(t)};
  const std::string before = (fs::path(out_dir) / "demo-features-only.png").string();
  const std::string question = (fs::path(out_dir) / "demo-question.png").string();
  const std::string after = (fs::path(out_dir) / "demo-after-answers.png").string();
  std::string problem = render_map_png(d.collection, r.features_only_map, ro, before);
  if (problem.empty() && r.first_question.anchor >= 0) {
    RenderOptions rq = ro;
    rq.selected = {r.first_question.anchor, r.first_question.candidates[0], r.first_question.candidates[1]};
    rq.title = "Is " + d.collection.ids[size_t(r.first_question.anchor)] + " more like " +
               d.collection.ids[size_t(r.first_question.candidates[0])] + " or " +
               d.collection.ids[size_t(r.first_question.candidates[1])] + "?";
    problem = render_map_png(d.collection, r.features_only_map, rq, question);
  }
  if (problem.empty()) {
    RenderOptions ra = ro;
    ra.judgments = r.answers;
    problem = render_map_png(d.collection, r.final_map, ra, after);
  }
  std::printf("\n%s\n", r.BriefReport().c_str());
  std::printf("the people's answers the final map honours: %.3f\n", r.answers_satisfied);
  if (!problem.empty()) {
    std::fprintf(stderr, "kith demo: could not draw the map: %s\n", problem.c_str());
    return kExitInternal;
  }
  std::printf("pictures:\n  %s\n  %s\n  %s\n", before.c_str(), question.c_str(), after.c_str());
  return kExitOk;
}

// ---- the window -------------------------------------------------------------------------------
struct LiveDemo {
  const DemoData& data;
  MapFeed& feed;
  SimulatedPeople people;
  Picker picker{neighbourhood_picker()};  // as the headless run (solver/demo/demo_trial.h)
  std::vector<Judgment> truth;       // held-out triplets of the hidden distance
  std::vector<Judgment> answers;
  double first_agreement = -1.0;     // of the features-only map, when the first answer came
  std::vector<int> show;             // the last question, to select
  bool show_pending = false;
  bool learn_weights = true;         // the answers also reweight the feature blocks (--weights)
  DemoTrialOptions trial;           // regroup settings and weight options, as in the headless run
  std::vector<ColumnBlock> blocks;
  BlockWeightsResult weights;

  LiveDemo(const DemoData& d, MapFeed& f)
      : data(d), feed(f), people(d.perceptual), truth(people.truth_triplets(3000, 0, 3.0, 1234)) {
    if (d.collection.features.cols() == descriptor_size())
      for (const auto& b : descriptor_blocks()) blocks.push_back({b.name, b.begin, b.size});
  }

  // What the answers so far say about the feature blocks; the engine rebuilds the map's affinities
  // from the reweighted features off its hot loop and regroups (solver/features/block_weights.h).
  void reweight() {
    if (!learn_weights || blocks.empty() || answers.size() < size_t(trial.reweight_from)) return;
    weights = learn_block_weights(data.collection.features, blocks, answers, trial.weights);
    feed.post(cmd::SetFeatures{apply_block_weights(data.collection.features, blocks, weights.weights),
                               trial.regroup_iterations, trial.regroup_exaggeration});
  }

  std::string ask(int count) {
    auto snapshot = feed.latest();
    if (!snapshot || snapshot->positions.rows() != Eigen::Index(data.collection.size())) return "the map is not ready";
    if (first_agreement < 0) first_agreement = triplet_agreement(snapshot->positions, truth);
    for (int q = 0; q < count; ++q) {
      PickerInput in;
      in.map = &snapshot->positions;
      in.features = &data.collection.features;
      in.judgments = &answers;
      const Question question = picker.pair(in);
      if (question.anchor < 0) break;
      Judgment j = people.answer(question.anchor, question.candidates[0], question.candidates[1]);
      j.time = double(std::chrono::duration_cast<std::chrono::seconds>(
                          std::chrono::system_clock::now().time_since_epoch()).count());
      // Through prepare(): the session (when there is one) stores it and gives it its id first.
      CommandBody body = cmd::AddJudgment{j};
      if (const std::string refused = feed.prepare(body); !refused.empty()) return refused;
      answers.push_back(std::get<cmd::AddJudgment>(body).judgment);
      feed.post(std::move(body));
      show = {question.anchor, question.candidates[0], question.candidates[1]};
      show_pending = true;
    }
    if (answers.empty()) return "no question could be asked";
    reweight();
    const Judgment& last = answers.back();
    return last.person + ": " + data.collection.ids[size_t(last.anchor)] + " is more like " +
           data.collection.ids[size_t(last.nearer)] + " than " + data.collection.ids[size_t(last.farther)];
  }

  std::vector<std::string> lines() {
    std::vector<std::string> out;
    auto snapshot = feed.latest();
    char buf[160];
    std::snprintf(buf, sizeof buf, "answers: %zu   (K: 10 more, shift+K: 100)", answers.size());
    out.push_back(buf);
    if (snapshot && snapshot->positions.rows() == Eigen::Index(data.collection.size())) {
      const double now = triplet_agreement(snapshot->positions, truth);
      if (first_agreement >= 0)
        std::snprintf(buf, sizeof buf, "agreement with the people's eye: %.3f (features only: %.3f)", now,
                      first_agreement);
      else
        std::snprintf(buf, sizeof buf, "agreement with the people's eye: %.3f", now);
      out.push_back(buf);
    }
    out.push_back("(held-out: 3000 triplets of the hidden perceptual distance that are never asked)");
    if (!weights.weights.empty()) {
      out.push_back("what the answers say matters (feature block weights, 1 = as computed):");
      for (size_t b = 0; b < blocks.size(); ++b) {
        std::snprintf(buf, sizeof buf, "  %-20s %.2f", blocks[b].name.c_str(), weights.weights[b]);
        out.push_back(buf);
      }
    } else if (!learn_weights) {
      out.push_back("feature block weights: off (--weights off)");
    }
    for (const auto& m : people.members())
      out.push_back("  " + m.name + (m.contrarian ? ": sees lightness and pattern, not hue" : ": noise " +
                                                                                                std::to_string(int(m.noise))));
    return out;
  }
};

int run_live(const DemoData& d, const EngineOptions& eo, const DemoTrialOptions& trial, const WindowOptions& hidden,
             bool* opened) {
  std::unique_ptr<MapFeed> feed = make_engine_feed(d.collection, eo);
  if (!feed) {
    std::fprintf(stderr, "kith demo: this build has no live engine; showing the headless run instead\n");
    return kExitInternal;
  }
  // The answers (the people's or a person's) are kept like any collection's: the first one starts
  // a session file in the library folder (sample-library.kith, then -2, ...), shown in the title.
  SessionLink link(d.collection, eo, (fs::path(d.library.folder) / "sample-library.csv").string());
  std::unique_ptr<MapFeed> recorded = link.recording(*feed);
  LiveDemo live(d, *recorded);
  live.trial = trial;
  live.learn_weights = trial.learn_weights;
  WindowOptions wo = hidden;  // frames, script, screenshot: test hooks
  wo.title = "Studio sample library";
  for (size_t t = 0; t < d.collection.tags.size(); ++t)  // colour by collection line
    if (d.collection.tags[t].name == "line") wo.view.colour_by = ColourBy{ColourKind::kTag, int(t)};
  WindowHooks hooks;
  hooks.on_open = [&] { *opened = true; };
  hooks.on_key = [&](int key, int mods) -> std::string {
    if (key != 'K') return "";
    return live.ask((mods & 1) ? 100 : 10);  // GLFW_MOD_SHIFT == 1
  };
  hooks.take_selection = [&](std::vector<int>* items) {
    if (!live.show_pending) return false;
    live.show_pending = false;
    *items = live.show;
    return true;
  };
  hooks.panel_title = "Simulated people";
  hooks.panel_lines = [&] { return live.lines(); };
  SessionMenu menu(link, *recorded);
  const int code = run_window(d.collection, *recorded, wo, menu.hooks(link.hooks(hooks)));
  if (auto s = feed->latest()) link.final_checkpoint(*s);
  return code;
}

}  // namespace

int cmd_demo(const Args& args) {
  FlagReader flags(args, "demo");
  if (flags.flag("--help") || flags.flag("-h")) {
    std::fputs(kHelp, stdout);
    return kExitOk;
  }
  DemoTrialOptions trial;
  std::string library = default_sample_folder(), out_dir;
  int width = 1280, height = 800;
  double number = 0;
  uint64_t seed = 42;
  if (auto v = flags.value("--answers")) {
    if (!parse_number(*v, &number) || number < 0 || number > 100000 || number != double(int(number))) {
      std::fprintf(stderr, "kith demo: --answers expects a whole number from 0 to 100000, got '%s'\n", v->c_str());
      return kExitUsage;
    }
    trial.answers = int(number);
  }
  if (auto v = flags.value("--blend")) {
    if (!parse_number(*v, &number) || !(number >= 0) || number > 1000) {
      std::fprintf(stderr, "kith demo: --blend expects a number from 0 to 1000, got '%s'\n", v->c_str());
      return kExitUsage;
    }
    trial.blend = number;
  }
  if (auto v = flags.value("--weights")) {
    if (*v != "on" && *v != "off") {
      std::fprintf(stderr, "kith demo: --weights expects on or off, got '%s'\n", v->c_str());
      return kExitUsage;
    }
    trial.learn_weights = *v == "on";
  }
  if (auto v = flags.value("--seed")) {
    if (!parse_number(*v, &number) || number < 0 || number > 1e9 || number != double(int64_t(number))) {
      std::fprintf(stderr, "kith demo: --seed expects a whole number from 0 to 1000000000, got '%s'\n", v->c_str());
      return kExitUsage;
    }
    seed = uint64_t(number);
  }
  if (auto v = flags.value("--library")) library = *v;
  if (auto v = flags.value("--out")) out_dir = *v;
  if (auto v = flags.value("--size"); v && !parse_size(*v, &width, &height)) {
    std::fprintf(stderr, "kith demo: --size expects WxH, e.g. 1280x800, got '%s'\n", v->c_str());
    return kExitUsage;
  }
  const bool no_window = flags.flag("--no-window");
  WindowOptions hidden;  // undocumented test hooks, as for kith open
  if (auto v = flags.value("--frames"); v && parse_number(*v, &number) && number >= 0) hidden.frames = int(number);
  if (auto v = flags.value("--script")) hidden.script = *v;
  if (auto v = flags.value("--screenshot")) hidden.screenshot = *v;
  std::vector<std::string> rest;
  if (!flags.finish(&rest) || !rest.empty()) {
    if (!flags.error().empty()) std::fprintf(stderr, "kith %s\n", flags.error().c_str());
    else std::fprintf(stderr, "kith demo: unexpected '%s' (kith demo --help)\n", rest.front().c_str());
    return kExitUsage;
  }

  DemoData d;
  if (!load_demo(library, &d)) return kExitBadInput;
  if (out_dir.empty()) out_dir = d.library.folder;

  if (!no_window && display_available()) {
    EngineOptions eo;
    eo.blend = trial.blend;
    bool opened = false;
    const int rc = run_live(d, eo, trial, hidden, &opened);
    if (opened || rc == kExitOk) return rc;
    std::fprintf(stderr, "kith demo: no window could be opened; running headless instead\n");
  }
  return run_headless(d, trial, seed, out_dir, width, height);
}

}  // namespace kith
