// kith describe: features computed from pictures (solver/features/picture_descriptors.h), written as a CSV
// that kith reads as a collection (id, picture, then one column per feature).
#include <algorithm>
#include <array>
#include <cctype>
#include <cstdio>
#include <filesystem>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "solver/features/picture_descriptors.h"
#include "solver/io/collection.h"
#include "solver/io/png_file.h"
#include "solver/io/safe_file.h"
#include "solver/io/text_fields.h"
#include "viewer/cli/commands.h"
#include "viewer/cli/flags.h"
#include "viewer/cli/map_source.h"
#include "viewer/cli/shared_flags.h"

namespace kith {
namespace {

namespace fs = std::filesystem;

const char* const kUsage =
    "usage: kith describe PICTURES -o features.csv [options]\n"
    "\n"
    "Computes features from PNG and JPEG pictures: CIELAB colour statistics, a coarse CIELAB\n"
    "histogram, texture energy and orientation at three scales, and a 4 x 4 layout thumbnail, each\n"
    "block weighted to the same spread over the pictures (see the README). PICTURES is a folder\n"
    "(searched recursively for .png, .jpg, .jpeg; the subfolder each picture sits in becomes its\n"
    "tag in a column 'folder'), one or more picture files, or an items table (CSV/TSV) with a\n"
    "column of picture paths, whose ids and tags are kept. Pictures that cannot be read are\n"
    "reported and left out, and so are the PNGs kith itself made (maps, pictures of a session),\n"
    "which carry a mark saying so. Feature columns with one value for every picture are left out.\n";

const char* const kFooter =
    "exit codes: 0 written, 2 bad usage, 3 bad input (no readable pictures, unreadable folder)\n";

const char* const kOptions =
    "  -o, --output FILE     the features CSV to write (required)\n"
    "  --force               replace FILE if it exists (never a session, a folder or an input)\n"
    "  --background RRGGBB   colour behind transparent pixels (default: ffffff)\n"
    "  --working-size N      longest side, in pixels, pictures are reduced to (default: 96)\n"
    "  --raw                 write the unweighted numbers (no block weighting)\n"
    "  --threads N           threads to use, 0 = all (default: 0)\n";

const char* const kTopFolder = "(top folder)";

bool is_picture_name(const fs::path& p) {
  std::string ext = p.extension().string();
  for (auto& c : ext) c = char(std::tolower(static_cast<unsigned char>(c)));
  return ext == ".png" || ext == ".jpg" || ext == ".jpeg";
}

bool parse_hex_colour(const std::string& s, std::array<double, 3>* out) {
  std::string t = !s.empty() && s[0] == '#' ? s.substr(1) : s;
  if (t.size() != 6 || t.find_first_not_of("0123456789abcdefABCDEF") != std::string::npos) return false;
  for (int k = 0; k < 3; ++k) (*out)[k] = std::stoi(t.substr(2 * k, 2), nullptr, 16) / 255.0;
  return true;
}

}  // namespace

int cmd_describe(const Args& args) {
  FlagReader flags("describe", kUsage, kOptions, kFooter);
  if (!flags.read(args)) return flags.stop();
  DescriptorOptions options;
  int threads = 0;
  if (!flags.integer("--working-size", &options.working_size) || !flags.integer("--threads", &threads, 0))
    return flags.usage_error();
  options.weight_blocks = !flags.has("--raw");
  if (flags.has("--background") && !parse_hex_colour(flags.text("--background"), &options.background))
    return flags.usage_error("--background expects a colour like ffffff, got '" + flags.text("--background") + "'");
  const std::vector<std::string>& inputs = flags.positional();
  const std::string output = flags.text("--output");
  if (inputs.empty()) return flags.usage_error("which pictures? give a folder, picture files or an items table");
  if (output.empty()) return flags.usage_error("where to? give -o features.csv");
  if (std::string error; !options.IsValid(&error)) return flags.usage_error(error);
  std::error_code ec;
  const SafeWriteOptions rule = output_rule(flags, inputs);
  if (const int refused = refuse_output(flags, output, rule)) return refused;

  // Gather pictures; ids are paths relative to the folder given, without the extension, or the
  // items table's ids.
  std::vector<std::string> paths, ids;
  std::vector<TagColumn> tags;
  std::vector<std::string> folders;  // for pictures found in folders or given one by one
  std::set<std::string> seen_ids;
  for (const auto& in : inputs) {
    if (!fs::exists(in, ec)) {
      std::fprintf(stderr, "kith describe: %s: no such file or folder\n", in.c_str());
      return kExitBadInput;
    }
    if (fs::is_directory(in, ec)) {
      std::vector<fs::path> found;
      fs::recursive_directory_iterator it(in, fs::directory_options::skip_permission_denied, ec), end;
      if (ec) {
        std::fprintf(stderr, "kith describe: %s: cannot read the folder (%s)\n", in.c_str(), ec.message().c_str());
        return kExitBadInput;
      }
      for (; it != end; it.increment(ec)) {
        if (ec) break;
        if (it->is_regular_file(ec) && is_picture_name(it->path())) found.push_back(it->path());
      }
      std::sort(found.begin(), found.end());
      for (const auto& p : found) {
        paths.push_back(p.string());
        const fs::path rel = fs::relative(p, in, ec);
        ids.push_back(fs::path(rel).replace_extension().generic_string());
        folders.push_back(rel.has_parent_path() ? rel.parent_path().generic_string() : kTopFolder);
      }
    } else if (is_picture_name(in)) {
      paths.push_back(in);
      ids.push_back(fs::path(in).stem().string());
      folders.push_back(kTopFolder);
    } else {  // an items table
      if (inputs.size() != 1) {
        std::fprintf(stderr, "kith describe: give one items table, or pictures and folders, not both\n");
        return kExitUsage;
      }
      LoadOptions load;
      load.allow_no_features = true;
      const std::optional<Collection> loaded = load_or_report("describe", in, load);
      if (!loaded) return kExitBadInput;
      const Collection& c = *loaded;
      if (c.pictures.empty()) {
        std::fprintf(stderr, "kith describe: %s: no column of picture paths found (values ending in .png, .jpg...)\n",
                     in.c_str());
        return kExitBadInput;
      }
      paths = c.pictures;
      ids = c.ids;
      tags = c.tags;
    }
  }
  // kith's own pictures (a map rendered into the pictures' folder, say) are no part of the collection.
  size_t n_kept = 0;
  for (size_t i = 0; i < paths.size(); ++i) {
    if (!is_kiths_png_file(paths[i])) {
      paths[n_kept] = paths[i];
      ids[n_kept] = ids[i];
      if (!folders.empty()) folders[n_kept] = folders[i];
      for (auto& t : tags) t.values[n_kept] = t.values[i];
      ++n_kept;
      continue;
    }
    std::fprintf(stderr, "kith describe: left out %s: a picture kith made, not one of the collection's\n",
                 paths[i].c_str());
  }
  const size_t own_count = paths.size() - n_kept;
  paths.resize(n_kept);
  ids.resize(n_kept);
  if (!folders.empty()) folders.resize(n_kept);
  for (auto& t : tags) t.values.resize(n_kept);
  if (paths.empty()) {
    std::fprintf(stderr, "kith describe: no .png, .jpg or .jpeg pictures found in %s\n", inputs.front().c_str());
    return kExitBadInput;
  }
  // The subfolders become a tag when there are at least two of them.
  const bool folder_tag = !folders.empty() && std::set<std::string>(folders.begin(), folders.end()).size() > 1;
  if (folder_tag) tags.push_back(TagColumn{"folder", folders});
  for (size_t i = 0; i < ids.size(); ++i) {
    std::string id = ids[i];
    for (int k = 2; !seen_ids.insert(id).second; ++k) id = ids[i] + "~" + std::to_string(k);
    ids[i] = id;
  }

  std::fprintf(stderr, "kith describe: reading %zu pictures...\n", paths.size());
  const DescribedPictures d = describe_pictures(paths, options, threads);
  for (const auto& p : d.skipped)
    std::fprintf(stderr, "kith describe: skipped %s: %s\n", p.file.c_str(), p.message.c_str());
  if (d.paths.size() < 2) {
    std::fprintf(stderr, "kith describe: %zu readable picture(s); a collection needs at least 2\n", d.paths.size());
    return kExitBadInput;
  }

  // Built in memory, then written through the safe writer: a failure never leaves half a file.
  const fs::path base = fs::absolute(fs::path(output), ec).parent_path();
  // A column with one value for every picture adds nothing (and kith check would say so).
  std::vector<int> kept;
  for (int c = 0; c < d.features.cols(); ++c)
    if (d.features.col(c).maxCoeff() > d.features.col(c).minCoeff()) kept.push_back(c);
  if (kept.empty()) {
    std::fprintf(stderr, "kith describe: the %zu pictures have the same features (are they all alike?)\n",
                 d.paths.size());
    return kExitBadInput;
  }
  const std::vector<std::string> names = descriptor_names();
  std::string text = "id,picture";
  for (const auto& t : tags) text += ',' + csv_field(t.name);
  for (int c : kept) text += ',' + names[size_t(c)];
  text += '\n';
  char buf[32];
  for (size_t r = 0; r < d.paths.size(); ++r) {
    const fs::path abs = fs::absolute(d.paths[r], ec);
    fs::path rel = fs::relative(abs, base, ec);
    if (ec || rel.empty()) rel = abs;
    text += csv_field(ids[d.input_index[r]]) + ',' + csv_field(rel.generic_string());
    for (const auto& t : tags) text += ',' + csv_field(t.values[d.input_index[r]]);
    for (int c : kept) {
      std::snprintf(buf, sizeof buf, ",%.9g", d.features(Eigen::Index(r), c));
      text += buf;
    }
    text += '\n';
  }
  if (const std::string problem = write_file_safely(output, text, rule); !problem.empty())
    return write_failed(flags, problem);
  std::printf("wrote %s: %zu pictures x %zu features\n", output.c_str(), d.paths.size(), kept.size());
  if (!d.skipped.empty()) std::printf("  left out, unreadable (listed above): %zu\n", d.skipped.size());
  if (own_count) std::printf("  left out, pictures kith made: %zu\n", own_count);
  if (kept.size() < size_t(d.features.cols()))
    std::printf("  left out, features with one value for every picture: %d\n",
                int(d.features.cols()) - int(kept.size()));
  if (folder_tag) std::printf("  tag 'folder': the subfolder each picture sits in\n");
  return kExitOk;
}

}  // namespace kith
