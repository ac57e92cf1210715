// Collection: the loaded items (ids, features, tags, optional pictures) and the readers that
// build one from CSV/TSV (RFC 4180) or a NumPy .npy file plus an optional CSV of ids and tags.
//
// Loading reports every problem with file, line and column and what was expected (LoadError);
// warnings (constant feature columns, missing pictures) are collected in Collection::warnings.
// Functions here are pure; a Collection is a value and may be read from many threads.
#pragma once
#include <cstddef>
#include <optional>
#include <stdexcept>
#include <string>
#include <unordered_map>
#include <vector>

#include "solver/base/neighbour_graph.h"
#include "solver/base/points.h"

namespace kith {

// Where and what: "items.csv:12:3: expected a number in feature column 'width', found 'abc'".
struct Problem {
  std::string file;
  long line = 0;    // 1-based; 0 when the problem is not tied to a line
  long column = 0;  // 1-based field number (CSV) or byte offset (.npy header); 0 when not known
  std::string message;
  std::string str() const;
};

// Features larger than this in size are refused: squared distances over many columns would
// overflow double's range (1e308) long before, e.g., 1e300.
constexpr double kMaxFeatureMagnitude = 1e100;

class LoadError : public std::runtime_error {
 public:
  explicit LoadError(Problem problem);
  const Problem& problem() const { return problem_; }

 private:
  Problem problem_;
};

struct TagColumn {
  std::string name;
  std::vector<std::string> values;  // one per item ("" where empty)
};

struct Collection {
  std::string source;                      // the file it was loaded from
  std::string id_column;                   // column the ids came from, "" if numbered (1.. for CSV, 0.. for .npy)
  std::vector<std::string> ids;            // unique, one per item
  std::vector<std::string> feature_names;  // one per feature column
  Points features;                         // N x F; F == 0 for a judgments-only collection
  std::vector<TagColumn> tags;
  std::string picture_column;              // name of the picture column, "" if none
  std::vector<std::string> pictures;       // resolved paths, one per item, or empty if none
  std::vector<Problem> warnings;
  std::vector<long> lines;                 // CSV/TSV: the line each item's row starts on; else empty
  NeighbourGraph neighbours;               // given with LoadOptions::neighbours, else empty (n == 0)

  size_t size() const { return ids.size(); }
  // Index of an item by id; nullopt if unknown. Uses the lookup table made by the loaders (or by
  // build_index() after changing ids by hand); without a matching table it searches linearly.
  // Never modifies the collection, so any number of threads may call it.
  std::optional<size_t> index_of(const std::string& id) const;
  void build_index();

 private:
  std::unordered_map<std::string, size_t> index_;
};

struct LoadOptions {
  std::string id_column;                  // (default: "id" if present, else the first unique text column)
  std::vector<std::string> exclude;       // numeric columns not to use as features (default: none)
  std::string picture_column;             // (default: the text column whose values end in .png/.jpg/.jpeg)
  std::string tags_csv;                   // for .npy: CSV of ids and tags, same row count (default: none)
  size_t min_items = 2;                   // fewer is an error (default: 2)
  bool allow_no_features = false;         // judgments-only collections (default: false)
  // A k-nearest-neighbour graph of the items (solver/io/neighbour_graph_file.h), read after them
  // into Collection::neighbours; the map's affinities then come from it (default: none).
  std::string neighbours;

  // False with a readable message when an option is impossible.
  bool is_valid(std::string* error) const;
};

// Reads .csv, .tsv (by extension or by sniffing tabs) or .npy. Throws LoadError.
//
// Column rules for CSV/TSV: a column is numeric when most of its non-empty values are numbers;
// any other value in a numeric column is then an error. The id column is options.id_column, else a
// column named "id" (any case), else the first text column whose values are all present and
// unique (not the picture column), else items are numbered from 1. Numeric columns are features
// unless excluded (excluded ones become tags); other text columns are tags. The picture column is
// options.picture_column, else the first text column whose values all end in an image extension;
// relative paths are resolved against the table's folder.
Collection load_collection(const std::string& path, const LoadOptions& options = {});

// The same from bytes in memory (the fuzz targets and tests use this). `name` stands for the file
// in messages, picks the format (.npy by its magic bytes; TSV by a .tsv/.tab name or by tabs in the
// header line) and is the folder picture paths are relative to. options.tags_csv is read from disk.
Collection load_collection_from_memory(std::string data, const std::string& name, const LoadOptions& options = {});

// The tag column every command and the window use when none is named: the first (in the file's
// order) whose values group items, that is with at least two distinct values and at least two
// tagged items per distinct value on average. A column of (nearly) unique values, such as a
// name, is a label, not a tag: it neither colours the map nor scores suspects by default.
// -1 when no column groups.
int default_tag_column(const Collection& collection);
// The tag column named NAME, or the default one when NAME is empty; null when there is none.
const TagColumn* find_tag_column(const Collection& collection, const std::string& name);

// The content of a collection as a short text, "fnv1a64:" and 16 hex digits (FNV-1a, 64 bits):
// its ids, feature names and values (bit for bit), tag columns and values, and the file names
// (not the folders) of its pictures; not the file it was read from nor how it was written. Two
// reads of the same data give the same text; a session keeps it so that opening the collection
// again can tell its own session from one made from another file of the same name.
std::string content_hash(const Collection& collection);
// The reading options that differ from the defaults, as the flags that give them
// ("--id name --exclude a,b"), "" for none: what a session keeps of how it was read.
std::string reading_flags(const LoadOptions& options);

}  // namespace kith
