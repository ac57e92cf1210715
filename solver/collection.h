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

#include "solver/points.h"

namespace kith {

// Where and what: "items.csv:12:3: expected a number in feature column 'width', found 'abc'".
struct Problem {
  std::string file;
  long line = 0;    // 1-based; 0 when the problem is not tied to a line
  long column = 0;  // 1-based field number (CSV) or byte offset (.npy header); 0 when not known
  std::string message;
  std::string str() const;
};

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
  std::vector<std::string> ids;            // unique, one per item
  std::vector<std::string> feature_names;  // one per feature column
  Points features;                         // N x F; F == 0 for a judgments-only collection
  std::vector<TagColumn> tags;
  std::string picture_column;              // name of the picture column, "" if none
  std::vector<std::string> pictures;       // resolved paths, one per item, or empty if none
  std::vector<Problem> warnings;

  size_t size() const { return ids.size(); }
  // Index of an item by id; nullopt if unknown. Builds its lookup table on first use.
  std::optional<size_t> index_of(const std::string& id) const;

 private:
  mutable std::unordered_map<std::string, size_t> index_;
};

struct LoadOptions {
  std::string id_column;                  // (default: "id" if present, else the first unique text column)
  std::vector<std::string> exclude;       // numeric columns not to use as features (default: none)
  std::string picture_column;             // (default: the text column whose values end in .png/.jpg/.jpeg)
  std::string tags_csv;                   // for .npy: CSV of ids and tags, same row count (default: none)
  size_t min_items = 2;                   // fewer is an error (default: 2)
  bool allow_no_features = false;         // judgments-only collections (default: false)
};

// Reads .csv, .tsv (by extension or by sniffing tabs) or .npy. Throws LoadError.
Collection load_collection(const std::string& path, const LoadOptions& options = {});

}  // namespace kith
