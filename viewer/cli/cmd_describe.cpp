// kith describe: features computed from pictures (solver/features/picture_descriptors.h), written as a CSV
// that kith reads as a collection (id, picture, then one column per feature).
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <set>
#include <string>
#include <vector>

#include "solver/io/text_fields.h"
#include "solver/io/collection.h"
#include "solver/features/picture_descriptors.h"
#include "viewer/cli/commands.h"

namespace kith {
namespace {

namespace fs = std::filesystem;

const char* kUsage =
    "usage: kith describe PICTURES -o features.csv [options]\n"
    "\n"
    "Computes features from PNG and JPEG pictures: CIELAB colour statistics, a coarse CIELAB\n"
    "histogram, texture energy and orientation at three scales, and a 4 x 4 layout thumbnail, each\n"
    "block weighted to the same spread over the pictures (see the README). PICTURES is a folder\n"
    "(searched recursively for .png, .jpg, .jpeg), one or more picture files, or an items table\n"
    "(CSV/TSV) with a column of picture paths, whose ids and tags are kept. Pictures that cannot\n"
    "be read are reported and left out.\n"
    "\n"
    "options:\n"
    "  -o, --output FILE     the features CSV to write (required)\n"
    "  --force               replace FILE if it exists\n"
    "  --background RRGGBB   colour behind transparent pixels (default: ffffff)\n"
    "  --working-size N      longest side, in pixels, pictures are reduced to (default: 96)\n"
    "  --raw                 write the unweighted numbers (no block weighting)\n"
    "  --threads N           threads to use, 0 = all (default: 0)\n"
    "\n"
    "exit codes: 0 written, 2 bad usage, 3 bad input (no readable pictures, unreadable folder)\n";

bool is_picture_name(const fs::path& p) {
  std::string ext = p.extension().string();
  for (auto& c : ext) c = char(std::tolower(static_cast<unsigned char>(c)));
  return ext == ".png" || ext == ".jpg" || ext == ".jpeg";
}

// A CSV field (RFC 4180): quoted when it holds a comma, quote or line break.

bool parse_hex_colour(const std::string& s, std::array<double, 3>* out) {
  std::string t = s[0] == '#' ? s.substr(1) : s;
  if (t.size() != 6 || t.find_first_not_of("0123456789abcdefABCDEF") != std::string::npos) return false;
  for (int k = 0; k < 3; ++k) (*out)[k] = std::stoi(t.substr(2 * k, 2), nullptr, 16) / 255.0;
  return true;
}

}  // namespace

int cmd_describe(const Args& args) {
  std::vector<std::string> inputs;
  std::string output;
  bool force = false;
  int threads = 0;
  DescriptorOptions options;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string& a = args[i];
    auto value = [&](const char* what) -> const std::string* {
      if (i + 1 >= args.size()) {
        std::fprintf(stderr, "kith describe: %s needs %s\n", a.c_str(), what);
        return nullptr;
      }
      return &args[++i];
    };
    try {
      if (a == "--help" || a == "-h") {
        std::fputs(kUsage, stdout);
        return kExitOk;
      } else if (a == "-o" || a == "--output") {
        const auto* v = value("a file name");
        if (!v) return kExitUsage;
        output = *v;
      } else if (a == "--force") {
        force = true;
      } else if (a == "--raw") {
        options.weight_blocks = false;
      } else if (a == "--background") {
        const auto* v = value("a colour RRGGBB");
        if (!v) return kExitUsage;
        if (v->empty() || !parse_hex_colour(*v, &options.background)) {
          std::fprintf(stderr, "kith describe: --background expects a colour like ffffff, got '%s'\n", v->c_str());
          return kExitUsage;
        }
      } else if (a == "--working-size") {
        const auto* v = value("a number of pixels");
        if (!v) return kExitUsage;
        options.working_size = std::stoi(*v);
      } else if (a == "--threads") {
        const auto* v = value("a number");
        if (!v) return kExitUsage;
        threads = std::stoi(*v);
      } else if (!a.empty() && a[0] == '-') {
        std::fprintf(stderr, "kith describe: unknown option '%s' (kith describe --help)\n", a.c_str());
        return kExitUsage;
      } else {
        inputs.push_back(a);
      }
    } catch (const std::exception&) {
      std::fprintf(stderr, "kith describe: %s expects a whole number, got '%s'\n", a.c_str(), args[i].c_str());
      return kExitUsage;
    }
  }
  std::string error;
  if (inputs.empty() || output.empty()) {
    std::fputs(kUsage, stderr);
    return kExitUsage;
  }
  if (!options.IsValid(&error)) {
    std::fprintf(stderr, "kith describe: %s\n", error.c_str());
    return kExitUsage;
  }
  if (threads < 0) {
    std::fprintf(stderr, "kith describe: --threads must be 0 or more\n");
    return kExitUsage;
  }
  std::error_code ec;
  if (fs::exists(output, ec) && !force) {
    std::fprintf(stderr, "kith describe: %s already exists; pass --force to replace it\n", output.c_str());
    return kExitUsage;
  }

  // Gather pictures; ids are paths relative to the folder given, without the extension, or the
  // items table's ids.
  std::vector<std::string> paths, ids;
  std::vector<TagColumn> tags;
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
        ids.push_back(fs::relative(p, in, ec).replace_extension().generic_string());
      }
    } else if (is_picture_name(in)) {
      paths.push_back(in);
      ids.push_back(fs::path(in).stem().string());
    } else {  // an items table
      if (inputs.size() != 1) {
        std::fprintf(stderr, "kith describe: give one items table, or pictures and folders, not both\n");
        return kExitUsage;
      }
      LoadOptions load;
      load.allow_no_features = true;
      Collection c;
      try {
        c = load_collection(in, load);
      } catch (const LoadError& e) {
        std::fprintf(stderr, "kith describe: %s\n", e.problem().str().c_str());
        return kExitBadInput;
      }
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
  if (paths.empty()) {
    std::fprintf(stderr, "kith describe: no .png, .jpg or .jpeg pictures found in %s\n", inputs.front().c_str());
    return kExitBadInput;
  }
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

  // Write next to the target, then rename, so a failure never leaves half a file.
  const fs::path out_path(output);
  const fs::path tmp = out_path.parent_path() / (out_path.filename().string() + ".part");
  const fs::path base = fs::absolute(out_path, ec).parent_path();
  {
    std::ofstream out(tmp, std::ios::binary);
    if (!out) {
      std::fprintf(stderr, "kith describe: cannot write %s\n", tmp.string().c_str());
      return kExitBadInput;
    }
    out << "id,picture";
    for (const auto& t : tags) out << ',' << csv_field(t.name);
    for (const auto& n : descriptor_names()) out << ',' << n;
    out << '\n';
    char buf[32];
    for (size_t r = 0; r < d.paths.size(); ++r) {
      const fs::path abs = fs::absolute(d.paths[r], ec);
      fs::path rel = fs::relative(abs, base, ec);
      if (ec || rel.empty()) rel = abs;
      out << csv_field(ids[d.input_index[r]]) << ',' << csv_field(rel.generic_string());
      for (const auto& t : tags) out << ',' << csv_field(t.values[d.input_index[r]]);
      for (int c = 0; c < d.features.cols(); ++c) {
        std::snprintf(buf, sizeof buf, "%.9g", d.features(Eigen::Index(r), c));
        out << ',' << buf;
      }
      out << '\n';
    }
    if (!out.flush()) {
      std::fprintf(stderr, "kith describe: writing %s failed\n", tmp.string().c_str());
      fs::remove(tmp, ec);
      return kExitBadInput;
    }
  }
  fs::rename(tmp, out_path, ec);
  if (ec) {
    std::fprintf(stderr, "kith describe: cannot move %s to %s: %s\n", tmp.string().c_str(), output.c_str(),
                 ec.message().c_str());
    return kExitBadInput;
  }
  std::printf("wrote %s: %zu pictures x %d features (%zu skipped)\n", output.c_str(), d.paths.size(),
              int(d.features.cols()), d.skipped.size());
  return kExitOk;
}

}  // namespace kith
