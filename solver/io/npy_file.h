// NpyFile: reads a NumPy .npy array of features into Points.
//
// The format (NumPy's "NEP 1" file format, versions 1.0, 2.0 and 3.0): the magic bytes
// "\x93NUMPY", a major and a minor version byte, the header length (2 bytes little-endian in 1.0,
// 4 bytes in 2.0 and 3.0), then a Python dict literal such as
//   {'descr': '<f8', 'fortran_order': False, 'shape': (100, 50), }
// padded with spaces and ended by '\n', then the elements. kith reads little-endian float32
// ('<f4') and float64 ('<f8') in C order, shape (N,) or (N, F). Anything else, a header that does
// not parse, data cut short or extra, and NaN or infinite values throw LoadError with the byte
// offset (Problem::column, line 0) and what was expected.
// Pure functions; safe from any thread.
#pragma once
#include <string>
#include <string_view>

#include "solver/base/points.h"

namespace kith {

// True if `bytes` start with the .npy magic "\x93NUMPY".
bool looks_like_npy(std::string_view bytes);

struct NpyReadOptions {
  // Also little-endian int32 ('<i4') and int64 ('<i8'), e.g. a neighbour graph's indices; each
  // value must be at most 2^53 in size, so that it is exact as a double (default: false).
  bool allow_integers = false;
};

// Parses a whole .npy file held in memory; `source` names it in messages.
Points parse_npy(std::string_view bytes, const std::string& source, const NpyReadOptions& options = {});

// POINTS as a version 1.0 .npy file: little-endian float64 ('<f8'), C order, shape (N, D), the
// header padded so the data starts on a 64-byte boundary (as NumPy writes it).
std::string npy_bytes(const Points& points);

}  // namespace kith
