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

#include "solver/demo/demo_trial.h"
#include "solver/demo/sample_library.h"
#include "solver/demo/simulated_people.h"
#include "solver/features/block_weights.h"
#include "solver/features/picture_descriptors.h"
#include "solver/io/collection.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/shared_flags.h"
#include "viewer/scene/map_feed.h"
#include "viewer/session/session_link.h"
#include "viewer/window/app.h"
#include "viewer/window/engine_feed.h"
#include "viewer/window/offscreen_render.h"
#include "viewer/window/session_menu.h"

namespace kith {
namespace {

namespace fs = std::filesystem;

const char* const kUsage =
    "usage: kith demo [options]\n"
    "\n"
    "Opens the demo: 600 fabric and paint swatches of an invented interior studio, laid out from\n"
    "features computed from their pictures. Four simulated people (one of whom sees colour\n"
    "differently) answer kith's most informative questions: press K in the window for 10\n"
    "answers, shift+K for 100, and watch the map and the 'agreement with the people's eye' figure.\n"
    "With no display the demo runs headless: it writes pictures of the map before and after the\n"
    "simulated people's answers and prints how much closer the map came to the people's hidden distance.\n"
    "The pictures of the library are drawn once into a cache folder. The seed also sets the\n"
    "headless run's people, questions and held-out triplets.\n";

const char* const kFooter =
    "exit codes: 0 ok, 1 internal error (e.g. no OpenGL at all), 2 bad usage, 3 the library folder\n"
    "cannot be written or read\n";

const char* const kOptions =
    "  --answers N           answers in the headless run (default: 100)\n"
    "  --questions grid|pairs  grid: which 2 of 8 swatches are most like the one shown (12\n"
    "                        judgments an answer, as the window asks); pairs: which of 2 (one\n"
    "                        judgment) (default: grid)\n"
    "  --weights blocks|columns|off  the answers also teach how much the picture features\n"
    "                        matter (blocks: one weight for each block -- colour, texture, layout;\n"
    "                        columns: a weight per feature, pulled toward the blocks' and kept where\n"
    "                        it predicts held-out answers better), and the map is rebuilt from the\n"
    "                        reweighted features, so it follows the people also where nobody was\n"
    "                        asked; on = blocks (default: blocks)\n"
    "  --out DIR             where the headless run writes its PNGs (default: the library folder)\n"
    "  --library DIR         the sample library's folder (default: $XDG_CACHE_HOME/kith/demo or\n"
    "                        ~/.cache/kith/demo)\n"
    "  --no-window           the headless run even when there is a display\n"
    "  --size WxH            picture size of the headless run, and the window's size (default: 1280x800)\n";
const char* const kHidden = "--frames N, --script FILE, --screenshot FILE";  // test hooks, not in the help

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
  if (trial.question == QuestionKind::kGrid)
    std::printf("features-only map, then %d answers from the simulated people (most informative grid questions: "
                "%d candidates, pick %d, so %d judgments an answer)...\n",
                trial.answers, trial.grid_size, trial.grid_choose, trial.grid_choose * (trial.grid_size - trial.grid_choose));
  else
    std::printf("features-only map, then %d answers from the simulated people (most informative pair questions)...\n",
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
  SafeWriteOptions file;  // the demo's own three pictures are replaced on each run (never a session)
  file.replace = true;
  std::string problem = render_map_png(d.collection, r.features_only_map, ro, before, file);
  if (problem.empty() && r.first_question.anchor >= 0) {
    RenderOptions rq = ro;
    const Question& fq = r.first_question;
    rq.selected = {fq.anchor};
    for (int32_t c : fq.candidates) rq.selected.push_back(c);
    if (fq.candidates.size() == 2)
      rq.title = "Is " + d.collection.ids[size_t(fq.anchor)] + " more like " + d.collection.ids[size_t(fq.candidates[0])] +
                 " or " + d.collection.ids[size_t(fq.candidates[1])] + "?";
    else
      rq.title = "Which " + std::to_string(trial.grid_choose) + " of these " + std::to_string(fq.candidates.size()) +
                 " are most like " + d.collection.ids[size_t(fq.anchor)] + "?";
    problem = render_map_png(d.collection, r.features_only_map, rq, question, file);
  }
  if (problem.empty()) {
    RenderOptions ra = ro;
    ra.judgments = r.judgments;
    problem = render_map_png(d.collection, r.final_map, ra, after, file);
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
  Picker picker{demo_picker()};  // as the headless run (solver/demo/demo_trial.h)
  std::vector<Judgment> truth;       // held-out triplets of the hidden distance
  std::vector<Judgment> answers;     // the judgments of every answer so far
  int answered = 0;                  // questions answered
  double first_agreement = -1.0;     // of the features-only map, when the first answer came
  std::vector<int> show;             // the last question, to select
  bool show_pending = false;
  bool learn_weights = true;         // the answers also reweight the feature blocks (--weights)
  DemoTrialOptions trial;           // regroup settings and weight options, as in the headless run
  std::vector<ColumnBlock> blocks;
  BlockWeightsResult weights;
  FeatureMetricResult column_metric;

  LiveDemo(const DemoData& d, MapFeed& f)
      : data(d), feed(f), people(d.perceptual), truth(people.truth_triplets(3000, 0, 3.0, 1234)) {
    if (d.collection.features.cols() == descriptor_size())
      for (const auto& b : descriptor_blocks()) blocks.push_back({b.name, b.begin, b.size});
  }

  // What the answers so far say about the feature blocks; the engine rebuilds the map's affinities
  // from the reweighted features off its hot loop and regroups (solver/features/block_weights.h).
  void reweight() {
    if (!learn_weights || blocks.empty() || answered < trial.reweight_from) return;
    feed.post(cmd::SetFeatures{reweighted_features(data.collection.features, blocks, answers, trial, &weights,
                                                   &column_metric),
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
      const bool grid = trial.question == QuestionKind::kGrid;
      const Question question = grid ? picker.grid(in, trial.grid_size, trial.grid_choose) : picker.pair(in);
      if (question.anchor < 0 || question.candidates.size() < 2) break;
      std::vector<Judgment> given;
      if (grid && int(question.candidates.size()) > trial.grid_choose)
        given = people.answer_grid(question.anchor, question.candidates, trial.grid_choose);
      else
        given = {people.answer(question.anchor, question.candidates[0], question.candidates[1])};
      const double now = double(std::chrono::duration_cast<std::chrono::seconds>(
                                    std::chrono::system_clock::now().time_since_epoch()).count());
      for (Judgment& j : given) {
        j.time = now;
        // Through prepare(): the session (when there is one) stores it and gives it its id first.
        CommandBody body = cmd::AddJudgment{j};
        if (const std::string refused = feed.prepare(body); !refused.empty()) return refused;
        answers.push_back(std::get<cmd::AddJudgment>(body).judgment);
        feed.post(std::move(body));
      }
      ++answered;
      show = {question.anchor};
      for (int32_t c : question.candidates) show.push_back(c);
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
    std::snprintf(buf, sizeof buf, "answers: %d, judgments: %zu   (K: 10 more, shift+K: 100)", answered, answers.size());
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
      if (!column_metric.weights.empty()) out.push_back("  and per feature: " + column_metric.report());
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
  DemoTrialOptions trial;
  MapParameters settings;  // the demo's blend and seed
  settings.blend = trial.blend;
  FlagReader flags("demo", kUsage, kOptions + map_flags({"--blend", "--seed"}, settings), kFooter, kHidden);
  if (!flags.read(args)) return flags.stop();
  int width = 1280, height = 800;
  std::string weights = !trial.learn_weights                              ? "off"
                        : trial.metric == FeatureMetricKind::kColumns ? "columns"
                                                                      : "blocks";
  std::string questions = trial.question == QuestionKind::kGrid ? "grid" : "pairs";
  WindowOptions hidden;  // undocumented test hooks, as for kith open
  if (!flags.integer("--answers", &trial.answers, 0, 100000) || !flags.choice("--weights", &weights, {"blocks", "columns", "on", "off"}) ||
      !flags.choice("--questions", &questions, {"grid", "pairs"}) ||
      !flags.size("--size", &width, &height) || !flags.integer("--frames", &hidden.frames, 0) ||
      !read_map_flags(flags, &settings))
    return flags.usage_error();
  if (std::string e; !settings.IsValid(&e)) return flags.usage_error(e);
  if (!flags.positional().empty()) return flags.usage_error("unexpected '" + flags.positional().front() + "'");
  trial.blend = settings.blend;
  trial.learn_weights = weights != "off";
  trial.metric = weights == "columns" ? FeatureMetricKind::kColumns : FeatureMetricKind::kBlocks;
  trial.question = questions == "grid" ? QuestionKind::kGrid : QuestionKind::kPair;
  const uint64_t seed = settings.seed;
  const std::string library = flags.text("--library", default_sample_folder());
  std::string out_dir = flags.text("--out");
  const bool no_window = flags.has("--no-window");
  // The window takes the size too when it is given (e.g. to look at it at 1024x640).
  if (flags.has("--size")) hidden.width = width, hidden.height = height;
  hidden.script = flags.text("--script");
  hidden.screenshot = flags.text("--screenshot");

  DemoData d;
  if (!load_demo(library, &d)) return kExitBadInput;
  if (out_dir.empty()) out_dir = d.library.folder;

  if (std::string e; !settings.IsValid(&e, d.collection.size())) return flags.usage_error(e);

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
