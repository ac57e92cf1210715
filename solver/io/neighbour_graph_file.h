// Reading a k-nearest-neighbour graph made outside kith (e.g. by scripts/neighbour_graph.py on a
// Dask cluster), for `--neighbours GRAPH`. Two forms:
//   GRAPH.csv (or .tsv)  a header row naming the columns id, neighbour, distance (any order), then
//                        one row per edge: an item's id, the id of one of its neighbours, and the
//                        distance between them (not squared), in the collection's ids;
//   NAME-indices.npy     an (N, k) array of whole numbers, row i holding the rows (0-based, in the
//                        collection's order) of item i's neighbours, with NAME-distances.npy
//                        beside it: the (N, k) distances, float32 or float64;
//   GRAPH.npz            the same two arrays in one file, named indices and distances, as
//                        numpy.savez(GRAPH, indices=..., distances=...) writes it (members stored;
//                        a compressed one is refused with a message).
// Every item needs the same number k of neighbours; an edge from an item to itself is dropped
// (with a warning), and when any is, every item keeps its k - 1 nearest others. The order of the
// edges does not matter: each item's neighbours are sorted nearest first (ties by row). Distances
// must be finite, at least 0 and at most 1e100. Any other problem throws LoadError naming the
// file, the line (CSV) or the array position [row, column] (.npy) and what was expected.
// Pure functions; safe from any thread.
#pragma once
#include <string>
#include <vector>

#include "solver/base/neighbour_graph.h"
#include "solver/io/collection.h"

namespace kith {

// "NAME-distances.npy" for "NAME-indices.npy"; "" when PATH is not named so.
std::string graph_distances_path(const std::string& indices_path);

// Reads PATH as the graph of COLLECTION (its ids and row order). Warnings (self-edges dropped)
// are appended to *warnings when given. The graph's distance2 holds the squared distances.
NeighbourGraph read_neighbour_graph(const std::string& path, const Collection& collection,
                                    std::vector<Problem>* warnings = nullptr);

// The same from text or bytes in memory: a CSV/TSV table, or the two .npy files' bytes.
NeighbourGraph parse_neighbour_graph_csv(std::string text, const std::string& source, const Collection& collection,
                                         std::vector<Problem>* warnings = nullptr);
NeighbourGraph parse_neighbour_graph_npy(std::string_view indices, const std::string& indices_source,
                                         std::string_view distances, const std::string& distances_source,
                                         const Collection& collection, std::vector<Problem>* warnings = nullptr);

}  // namespace kith
