// kith fit: a map computed headlessly from a collection's features (solver/fit/fit.h), written as a
// layout CSV or JSON, with a progress line on stderr and the map's health at the end.
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>

#include "solver/io/text_fields.h"
#include "solver/io/collection.h"
#include "solver/fit/fit.h"
#include "solver/measures/health.h"
#include "solver/measures/judgment_health.h"
#include "solver/io/judgment_io.h"
#include "solver/measures/map_findings.h"
#include "viewer/cli/commands.h"

namespace kith {
namespace {

namespace fs = std::filesystem;

const char* kUsage =
    "usage: kith fit ITEMS -o layout.csv|layout.json [options]\n"
    "\n"
    "Computes a t-SNE map of ITEMS (CSV, TSV or .npy; see 'kith check') from its feature columns and\n"
    "writes it. CSV: id,x,y,z (id,x,y in 2-D) then the tag columns; JSON: the same per item, plus\n"
    "the options and the map's health. Progress (iteration, KL, iterations per second, time left)\n"
    "goes to stderr; the health figures (KL, trustworthiness, neighbour recall) to stdout.\n"
    "\n"
    "options:\n"
    "  -o, --output FILE       layout to write, .csv or .json (required)\n"
    "  --force                 replace FILE if it exists\n"
    "  --dims 2|3              map dimensions (default: 3)\n"
    "  --perplexity P          effective number of neighbours, 0 < P < number of items (default: 30)\n"
    "  --iterations N          gradient steps, the first 250 with early exaggeration (default: 1000)\n"
    "  --theta T               Barnes-Hut angle, 0 (exact forces via the tree) .. 1.5 (default: 0.5)\n"
    "  --dof D                 Student-t degrees of freedom of the map kernel (default: 1)\n"
    "  --seed S                seed of the neighbour graph and start noise (default: 42)\n"
    "  --exact                 exact neighbours and exact O(N^2) forces (slow above a few thousand)\n"
    "  --learning-rate R       step size; 0 = auto, max(N/48, 50) (default: auto)\n"
    "  --standardize           scale every feature column to unit variance first\n"
    "  --threads N             threads, 0 = all (default: 0)\n"
    "  --quiet                 no progress line\n"
    "  --judgments FILE        blend people's judgments in (CSV anchor,nearer,farther[,person][,time]\n"
    "                          [,kind][,weight] by id); reports how many the map agrees with\n"
    "  --blend B               weight of the judgments against the features, >= 0; 1 = as strong\n"
    "                          as the features on the items they name (default: 1)\n"
    "  --skip-bad-judgments    use the good rows of a judgments file with bad ones (default: refuse)\n"
    "  --suspects              add each tagged item's suspect score (0..1: the share of its 10 nearest\n"
    "                          neighbours, in the features and the map, tagged otherwise; see README)\n"
    "  --groups                add each item's group in the map (DBSCAN, automatic radius; 0 = none)\n"
    "  --tag COLUMN            the tag column suspects are judged by (default: the first)\n"
    "\n"
    "exit codes: 0 written, 1 the optimization diverged (nothing written), 2 bad usage (or the\n"
    "            output cannot be written), 3 bad input data\n";


std::string lower_extension(const std::string& path) {
  std::string ext = fs::path(path).extension().string();
  for (auto& c : ext) c = char(std::tolower(static_cast<unsigned char>(c)));
  return ext;
}

std::string format_seconds(double s) {
  char buf[32];
  if (s < 60)
    std::snprintf(buf, sizeof buf, "%.0fs", s);
  else
    std::snprintf(buf, sizeof buf, "%dm%02ds", int(s) / 60, int(s) % 60);
  return buf;
}

// Extra per-item columns (suspect score, group) from --suspects / --groups; "" = no value.
struct ExtraColumns {
  std::vector<std::string> names;
  std::vector<std::vector<std::string>> values;  // [column][item]
};

bool write_layout(const std::string& path, const Collection& c, const FitResult& r, const FitOptions& o,
                  const MapHealth& h, std::string* error, const ExtraColumns& extra = {}) {
  // Written beside the target and renamed into place, so a failure never leaves half a file.
  const std::string tmp = path + ".tmp-" + std::to_string(::getpid());
  {
    std::ofstream out(tmp, std::ios::binary);
    if (!out) {
      *error = "cannot write " + path;
      return false;
    }
    const char* axes[] = {"x", "y", "z"};
    if (lower_extension(path) == ".csv") {
      out << "id";
      for (int d = 0; d < o.dims; ++d) out << ',' << axes[d];
      for (const auto& t : c.tags) out << ',' << csv_field(t.name);
      for (const auto& name : extra.names) out << ',' << csv_field(name);
      out << '\n';
      char num[40];
      for (size_t i = 0; i < c.size(); ++i) {
        out << csv_field(c.ids[i]);
        for (int d = 0; d < o.dims; ++d) {
          std::snprintf(num, sizeof num, ",%.9g", r.map(Eigen::Index(i), d));
          out << num;
        }
        for (const auto& t : c.tags) out << ',' << csv_field(t.values[i]);
        for (const auto& column : extra.values) out << ',' << csv_field(column[i]);
        out << '\n';
      }
    } else {
      nlohmann::json j;
      j["source"] = c.source;
      j["dims"] = o.dims;
      j["options"] = {{"perplexity", o.perplexity}, {"iterations", o.iterations}, {"theta", o.theta},
                      {"dof", o.dof}, {"seed", o.seed}, {"exact", o.exact},
                      {"learning_rate", r.summary.learning_rate}, {"standardize", o.standardize}};
      j["health"] = {{"kl", h.kl}, {"trustworthiness", h.trustworthiness},
                     {"neighbour_recall", h.neighbour_recall}, {"measured_on", h.sample}};
      if (!o.judgments.empty()) {
        j["options"]["blend"] = o.blend;
        j["options"]["judgments"] = o.judgments.size();
        j["health"]["judgment_agreement"] = judgment_agreement(r.map, o.judgments);
      }
      nlohmann::json items = nlohmann::json::array();
      for (size_t i = 0; i < c.size(); ++i) {
        nlohmann::json it;
        it["id"] = c.ids[i];
        for (int d = 0; d < o.dims; ++d) it[axes[d]] = r.map(Eigen::Index(i), d);
        if (!c.tags.empty()) {
          nlohmann::json tags = nlohmann::json::object();
          for (const auto& t : c.tags) tags[t.name] = t.values[i];
          it["tags"] = tags;
        }
        for (size_t e = 0; e < extra.names.size(); ++e)
          it[extra.names[e]] = extra.values[e][i].empty() ? nlohmann::json() : nlohmann::json::parse(extra.values[e][i]);
        items.push_back(it);
      }
      j["items"] = items;
      out << j.dump(1) << '\n';
    }
    out.flush();
    if (!out) {
      *error = "could not finish writing " + path;
      return false;
    }
  }
  std::error_code ec;
  fs::rename(tmp, path, ec);
  if (ec) {
    fs::remove(tmp, ec);
    *error = "cannot write " + path;
    return false;
  }
  return true;
}

}  // namespace

int cmd_fit(const Args& args) {
  std::string input, output;
  bool force = false, quiet = false, skip_bad_judgments = false, want_suspects = false, want_groups = false;
  std::string judgments_path, suspect_tag;
  FitOptions o;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string& a = args[i];
    auto value = [&]() -> const std::string* {
      if (i + 1 >= args.size()) {
        std::fprintf(stderr, "kith fit: %s needs a value (kith fit --help)\n", a.c_str());
        return nullptr;
      }
      return &args[++i];
    };
    auto number = [&](double* out) -> bool {
      const std::string* v = value();
      if (!v) return false;
      try {
        size_t used = 0;
        *out = std::stod(*v, &used);
        if (used != v->size()) throw std::invalid_argument("trailing");
        return true;
      } catch (const std::exception&) {
        std::fprintf(stderr, "kith fit: %s expects a number, got '%s'\n", a.c_str(), v->c_str());
        return false;
      }
    };
    auto whole = [&](double x, const char* what) {
      if (x != std::floor(x) || std::abs(x) > 1e15) {
        std::fprintf(stderr, "kith fit: %s expects a whole number, got %g\n", what, x);
        return false;
      }
      return true;
    };
    double x = 0;
    if (a == "--help" || a == "-h") {
      std::fputs(kUsage, stdout);
      return kExitOk;
    } else if (a == "-o" || a == "--output") {
      const std::string* v = value();
      if (!v) return kExitUsage;
      output = *v;
    } else if (a == "--force") {
      force = true;
    } else if (a == "--suspects") {
      want_suspects = true;
    } else if (a == "--groups") {
      want_groups = true;
    } else if (a == "--tag") {
      const std::string* v = value();
      if (!v) return kExitUsage;
      suspect_tag = *v;
    } else if (a == "--quiet") {
      quiet = true;
    } else if (a == "--judgments") {
      const std::string* v = value();
      if (!v) return kExitUsage;
      judgments_path = *v;
    } else if (a == "--blend") {
      if (!number(&o.blend)) return kExitUsage;
    } else if (a == "--skip-bad-judgments") {
      skip_bad_judgments = true;
    } else if (a == "--exact") {
      o.exact = true;
    } else if (a == "--standardize") {
      o.standardize = true;
    } else if (a == "--dims") {
      if (!number(&x) || !whole(x, "--dims")) return kExitUsage;
      o.dims = int(x);
    } else if (a == "--perplexity") {
      if (!number(&o.perplexity)) return kExitUsage;
    } else if (a == "--iterations") {
      if (!number(&x) || !whole(x, "--iterations")) return kExitUsage;
      o.iterations = int64_t(x);
    } else if (a == "--theta") {
      if (!number(&o.theta)) return kExitUsage;
    } else if (a == "--dof") {
      if (!number(&o.dof)) return kExitUsage;
    } else if (a == "--seed") {
      if (!number(&x) || !whole(x, "--seed") || x < 0) return kExitUsage;
      o.seed = uint64_t(x);
    } else if (a == "--learning-rate") {
      if (!number(&o.learning_rate)) return kExitUsage;
    } else if (a == "--threads") {
      if (!number(&x) || !whole(x, "--threads")) return kExitUsage;
      o.threads = int(x);
    } else if (!a.empty() && a[0] == '-') {
      std::fprintf(stderr, "kith fit: unknown option '%s' (kith fit --help)\n", a.c_str());
      return kExitUsage;
    } else if (input.empty()) {
      input = a;
    } else {
      std::fprintf(stderr, "kith fit: only one ITEMS file, got '%s' and '%s'\n", input.c_str(), a.c_str());
      return kExitUsage;
    }
  }
  if (input.empty() || output.empty()) {
    std::fprintf(stderr, "kith fit: need ITEMS and -o FILE\n%s", kUsage);
    return kExitUsage;
  }
  const std::string ext = lower_extension(output);
  if (ext != ".csv" && ext != ".json") {
    std::fprintf(stderr, "kith fit: the output must end in .csv or .json, got '%s'\n", output.c_str());
    return kExitUsage;
  }
  if (fs::exists(output) && !force) {
    std::fprintf(stderr, "kith fit: %s exists; add --force to replace it\n", output.c_str());
    return kExitUsage;
  }
  std::string error;
  if (!o.IsValid(&error)) {
    std::fprintf(stderr, "kith fit: %s\n", error.c_str());
    return kExitUsage;
  }

  Collection c;
  try {
    c = load_collection(input);
  } catch (const LoadError& e) {
    std::fprintf(stderr, "kith fit: %s\n", e.problem().str().c_str());
    return kExitBadInput;
  }
  if (c.features.cols() == 0) {
    std::fprintf(stderr, "kith fit: %s has no feature columns (numbers) to compute a map from\n", input.c_str());
    return kExitBadInput;
  }
  if (c.size() < 3) {
    std::fprintf(stderr, "kith fit: %s has %zu items; a map needs at least 3\n", input.c_str(), c.size());
    return kExitBadInput;
  }
  if (!o.IsValid(&error, c.size())) {
    std::fprintf(stderr, "kith fit: %s\n", error.c_str());
    return kExitUsage;
  }

  if (!judgments_path.empty()) {
    JudgmentReadOptions jo;
    jo.skip_bad_rows = skip_bad_judgments;
    const JudgmentReadResult jr = read_judgments_csv(judgments_path, c.ids, jo);
    for (const auto& p : jr.problems) std::fprintf(stderr, "kith fit: %s\n", describe(p).c_str());
    if (!jr.ok() && !skip_bad_judgments) {
      std::fprintf(stderr, "kith fit: %zu of %zu judgment rows are bad; nothing imported (--skip-bad-judgments uses the rest)\n",
                   jr.bad_rows, jr.rows);
      return kExitBadInput;
    }
    o.judgments = jr.judgments;
    if (!quiet)
      std::fprintf(stderr, "kith fit: %zu judgments from %s, blend %g\n", o.judgments.size(), judgments_path.c_str(),
                   o.blend);
  }

  const bool tty = ::isatty(2);
  ProgressFn progress;
  if (!quiet)
    progress = [&](const FitProgress& p) {
      std::fprintf(stderr, "%siteration %lld/%lld  %s %.4f  %.1f it/s  %s left%s", tty ? "\r" : "",
                   static_cast<long long>(p.iteration), static_cast<long long>(p.total),
                   p.exaggerating ? "KL (exaggerated)" : "KL", p.cost, p.iterations_per_second,
                   format_seconds(p.seconds_left).c_str(), tty ? "   " : "\n");
      return true;
    };
  if (!quiet)
    std::fprintf(stderr, "kith fit: %zu items, %ld features, %d-D map, perplexity %g\n", c.size(),
                 long(c.features.cols()), o.dims, o.perplexity);
  FitResult r;
  try {
    r = fit_map(c.features, o, progress);
  } catch (const DivergenceError& e) {
    std::fprintf(stderr, "%skith fit: %s; nothing written\n", tty && !quiet ? "\n" : "", e.what());
    return kExitInternal;
  } catch (const std::invalid_argument& e) {
    std::fprintf(stderr, "%skith fit: %s: %s\n", tty && !quiet ? "\n" : "", input.c_str(), e.what());
    return kExitBadInput;
  }
  if (tty && !quiet) std::fprintf(stderr, "\n");
  HealthOptions ho;
  ho.seed = o.seed;
  ho.threads = o.threads;
  MapHealth h = measure_health(r.features, r.map, ho);
  h.kl = r.summary.kl;
  ExtraColumns extra;
  std::string findings_note;
  if (want_suspects || want_groups) {
    const std::vector<std::string>* tags = nullptr;
    for (const auto& t : c.tags)
      if (suspect_tag.empty() ? tags == nullptr : t.name == suspect_tag) tags = &t.values;
    if (!suspect_tag.empty() && !tags) {
      std::fprintf(stderr, "kith fit: --tag: %s has no tag column '%s'; nothing written\n", input.c_str(),
                   suspect_tag.c_str());
      return kExitUsage;
    }
    FindingsOptions fo;
    fo.search.seed = o.seed;
    const MapFindings f = find_structure(r.features, r.map, want_suspects ? tags : nullptr, fo);
    if (want_suspects && !tags) {
      std::fprintf(stderr, "kith fit: --suspects: %s has no tag column; nothing written\n", input.c_str());
      return kExitUsage;
    }
    char num[32];
    if (want_suspects) {
      extra.names.push_back("suspect");
      extra.values.emplace_back(c.size());
      for (size_t i = 0; i < c.size(); ++i)
        if (!std::isnan(f.suspects.score[i])) {
          std::snprintf(num, sizeof num, "%.4f", f.suspects.score[i]);
          extra.values.back()[i] = num;
        }
      findings_note += "suspects: " + f.suspects.summary() + "\n";
    }
    if (want_groups) {
      extra.names.push_back("group");
      extra.values.emplace_back(c.size());
      for (size_t i = 0; i < c.size(); ++i) extra.values.back()[i] = std::to_string(f.groups.label[i] + 1);
      findings_note += "groups: " + f.groups.summary() + "\n";
    }
  }
  if (!write_layout(output, c, r, o, h, &error, extra)) {
    std::fprintf(stderr, "kith fit: %s\n", error.c_str());
    return kExitUsage;
  }
  std::printf("wrote %s (%zu items)\n", output.c_str(), c.size());
  std::printf("fit: %s; %s\n", r.summary.BriefReport().c_str(), r.features_note.c_str());
  std::printf("health: %s\n", h.BriefReport().c_str());
  if (!o.judgments.empty()) {
    std::printf("judgments: %zu, the map agrees with %.1f%%\n", o.judgments.size(),
                100.0 * judgment_agreement(r.map, o.judgments));
    for (const auto& pa : per_person_agreement(r.map, o.judgments))
      if (!pa.person.empty())
        std::printf("  %s: %zu judgments, %.1f%% agreed\n", pa.person.c_str(), pa.judgments, 100.0 * pa.agreement);
  }
  std::fputs(findings_note.c_str(), stdout);
  return kExitOk;
}

}  // namespace kith
