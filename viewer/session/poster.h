// The poster: every item's picture at its place in the flat layout (solver/fit/flat_map.h), on one
// page (PNG, PDF or SVG, drawn with cairo), with optional captions and the groups found in the
// flat layout (solver/measures/groups.h, as `kith export --flat` writes them) outlined in the
// palette's colours (viewer/scene/palette.h). Pictures are cards whose longer side is one unit;
// overlaps are removed by the card spacing step (solver/fit/card_spacing.h), and how well it keeps
// neighbourhoods is measured as the share of each item's 10 nearest neighbours in the flat layout
// that are still among its 10 nearest on the poster (neighbour recall, solver/measures/health.h).
// Items without a readable picture are neutral cards holding their caption (or id).
// Contact sheets (optional): one page per group (and one for items in no group) with its items in
// a grid, in the poster's reading order, each with its caption; in a PDF they are the pages after
// the poster, for PNG and SVG one file each beside it, STEM-group-N.EXT and STEM-no-group.EXT.
// Every file goes through write_file_safely (solver/io/safe_file.h) after all pages are drawn in
// memory, and none is written when any target is refused. Main thread (or any one thread).
#pragma once
#include <string>
#include <vector>

#include "solver/base/points.h"
#include "solver/fit/card_spacing.h"
#include "solver/io/collection.h"
#include "solver/io/safe_file.h"

namespace kith {

// The page, in points (1/72 inch). A3 and A2 are paper sizes (turned to suit the arrangement,
// PNGs at 150 pixels per inch); WxH is a page of W x H pixels at 96 per inch, as a screen shows it,
// which keeps its shape (the arrangement is given a quarter turn to suit it instead).
struct PosterPage {
  double width = 0, height = 0;  // points
  double png_scale = 1.0;        // PNG pixels per point
  bool paper = false;            // turn to suit the arrangement
  std::string name;              // "A3", "1600x900"
};
// "A3", "A2", "A4" or "WxH" (pixels, 64 to 20000 a side). False with *error saying what is accepted.
bool parse_poster_page(const std::string& text, PosterPage* page, std::string* error);

enum class PosterFormat { kPng, kPdf, kSvg };
// By the file's extension (.png, .pdf, .svg, any case); false for anything else.
bool poster_format_for(const std::string& path, PosterFormat* format);

struct PosterOptions {
  PosterPage page;              // (default: set by the caller, e.g. parse_poster_page("A3"))
  int caption_column = -2;      // -2 none, -1 the id, else a tag column (choose_caption) (default: none)
  std::string group_tag;        // the tag column that names the groups; "" = the first (default: "")
  bool contact_sheets = false;  // (default: off)
  std::string title;            // over the poster (default: none)
  CardSpacingOptions spacing;   // (default: its defaults)
};

struct PosterSummary {
  size_t items = 0, pictures = 0;  // items, and those drawn as their picture
  size_t groups = 0;
  double kept = 0.0;     // share of 10 nearest flat-layout neighbours kept on the poster
  Points centres;        // N x 2: the cards' centres after spacing (card units)
  double card_mm = 0.0;  // a card's longer side on the page, in millimetres
  int spacing_rounds = 0;
  size_t overlaps_at_start = 0;
  std::vector<std::string> files;   // written, the poster first
  bool captions_too_small = false;  // captions were asked for but the cards are too small to hold them
  double caption_mm = 0.0;          // the card size (mm) that captions need
  std::string refused;              // a target that may not be written (nothing was written then)
};

// The files a poster at OUT writes besides itself for GROUPS groups (+ one for items in no group
// when UNGROUPED), in that order; none for a PDF or without contact sheets.
std::vector<std::string> contact_sheet_files(const std::string& out, size_t groups, bool ungrouped,
                                             const PosterOptions& options);

// Share of each item's 10 nearest neighbours in FROM that are among its 10 nearest in TO
// (neighbour_recall, solver/measures/health.h; past 5,000 items on measure_health's fixed-seed
// sample, since it costs O(N^2)). 1 for fewer than 3 items.
double neighbours_kept(const Points& from, const Points& to);

// FLAT: N x 2 (the flat layout of COLLECTION). Returns "" or what went wrong (a refused or failed
// write names the file).
std::string write_poster(const Collection& collection, const Points& flat, const std::string& out,
                         const PosterOptions& options, const SafeWriteOptions& file, PosterSummary* summary);

}  // namespace kith
