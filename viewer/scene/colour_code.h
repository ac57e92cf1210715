// ColourCode: how the items are coloured for one choice of what colours them, the one rule that
// the window, `kith render`, `kith export --picture` and the HTML report all follow, so an item
// has the same colour and mark everywhere.
//
// Values (a tag column, groups) take the palette's twelve categorical colours, most common value
// first; past twelve values the colours repeat with another mark (ring, then square, then diamond),
// so up to 48 values stay told apart, and the legend says which values share a colour. Numbers (a
// numeric column, judgments per item, how far items moved, suspect scores) take a sequential
// ramp interpolated in CIELAB and spaced by equal CIEDE2000 steps, light to dark on paper and dark
// to light at night, with a legend giving the range and the unit. Pure logic; any thread.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include "viewer/scene/palette.h"

namespace kith {

struct Collection;

// What colours the map. kMeasure and kGroup colour by values given from outside (MapView's
// set_measure / set_groups), e.g. the structure panel's suspect scores and groups.
enum class ColourKind { kTag, kDisplacement, kJudgments, kPlain, kMeasure, kGroup, kColumn };

struct ColourBy {
  ColourKind kind = ColourKind::kTag;  // (default: a tag column, if any)
  int tag_column = -1;                 // kTag: -1 = default_tag_column() (solver/io/collection.h) (default: -1)
  int feature_column = -1;             // kColumn: a numeric (feature) column, its raw values on a ramp
};

// The mark an item is drawn with (PointVertex flags bits 8-9, points.frag, the report's raster).
enum class Mark : uint8_t { kDisc = 0, kRing = 1, kSquare = 2, kDiamond = 3 };
constexpr int kMarkCount = 4;
const char* mark_name(Mark mark);  // "disc", "ring", "square", "diamond"

struct CodeEntry {
  std::string label;   // the value, or a number on the ramp with its unit
  Rgb colour;
  Mark mark = Mark::kDisc;
  size_t count = 0;    // items with this value (0 on a ramp's stops)
  std::string value;   // the tag value itself ("" for none / other / ramp stops)
};

struct ColourCode {
  std::string title;            // what colours the map, e.g. "family" or "caffeine (mg)"
  std::vector<Rgb> colour;      // per item
  std::vector<Mark> mark;       // per item
  std::vector<CodeEntry> entries;  // values in legend order (most items first), then other / none; or ramp stops
  std::vector<std::string> notes;  // e.g. which values share a colour
  bool ramp = false;            // a continuous measure (entries are stops from lo to hi)
  double lo = 0.0, hi = 0.0;    // the ramp's range
  std::string unit;             // the ramp's unit ("" when the column names none)
};

// Most values told apart by colour and mark; past them, values share the muted colour as "other".
constexpr size_t kCodedValues = Palette::kCategorical.size() * size_t(kMarkCount);

// Values, one per item; "" is no value (muted). Order: most items first, ties by value.
ColourCode categorical_code(const std::string& title, const std::vector<std::string>& values, const Palette& palette);
// Groups 0..names.size()-1 per item, -1 none; colours in group order.
ColourCode group_code(const std::string& title, const std::vector<int>& groups, const std::vector<std::string>& names,
                      const Palette& palette);
// Numbers, one per item (NaN: no value, muted). The ramp runs from the smallest value (or 0 when
// `from_zero`) to the largest.
ColourCode ramp_code(const std::string& title, const std::string& unit, const std::vector<double>& values,
                     bool from_zero, const Palette& palette);
// The code for the kinds a collection alone decides (kTag, kColumn, kPlain); any other kind
// gives the plain code.
ColourCode collection_code(const Collection& collection, const ColourBy& by, const Palette& palette);
// The name a choice goes by in --colour: a tag or numeric column's name, or one of the words
// below. Returns false (and `why`, listing the choices) when `name` names nothing.
bool colour_by_name(const Collection& collection, const std::string& name, ColourBy* by, std::string* why);
// The words --colour takes besides column names.
constexpr const char* kColourWords[] = {"plain", "judgments"};

// One colour for every item.
ColourCode plain_code(const std::string& title, size_t n, const Palette& palette);

// The unit a column's name gives in brackets at its end ("caffeine (mg)" -> "mg", "length [cm]"
// -> "cm") or as a common unit after its last underscore ("caffeine_mg" -> "mg", "water_temp_c"
// -> "°C", "share_pct" -> "%"); else "".
std::string unit_in_name(const std::string& column_name);

// A value on a ramp with its unit, e.g. "12.5 mg", "0.25".
std::string ramp_label(double value, const std::string& unit);

}  // namespace kith
