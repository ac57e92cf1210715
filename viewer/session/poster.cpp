#include "viewer/session/poster.h"

#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <stdexcept>

#include "solver/features/picture_file.h"
#include "solver/io/png_file.h"
#include "solver/measures/groups.h"
#include "solver/measures/health.h"
#include "viewer/scene/palette.h"

namespace kith {
namespace {

// ==== [SECTION] sizes of things, in card units (a picture's longer side is 1) ===================
constexpr double kCaptionStrip = 0.24;  // caption strip under a picture
constexpr double kBlankHeight = 0.75;   // a card without a picture: 1 x 0.75
constexpr double kHullPad = 0.12;       // a group's outline keeps this clear of its cards
constexpr double kMmPerPoint = 25.4 / 72.0;
constexpr double kPrintPixelsPerPoint = 300.0 / 72.0;  // pictures in a PDF: 300 per inch at most
constexpr double kSvgPixelsPerPoint = 2.0 * 96.0 / 72.0;
constexpr double kPictureMemory = 256e6;   // bytes all decoded pictures may take together
constexpr uint32_t kBlankCard = 0xE4E0D8;  // neutral card: never a tag's colour
constexpr double kSmallestText = 4.0;      // points: captions smaller than this are left out
constexpr double kCaptionFont = 0.17;      // caption type size, in card units

struct Card {
  double w = 1, h = 1;   // the whole card, caption strip included
  double picture_h = 0;  // height of the picture part (0: no picture)
  std::string caption;   // "" = none
  int group = -1;
};

using SurfacePtr = std::unique_ptr<cairo_surface_t, decltype(&cairo_surface_destroy)>;
using ContextPtr = std::unique_ptr<cairo_t, decltype(&cairo_destroy)>;

cairo_status_t append_bytes(void* closure, const unsigned char* data, unsigned int length) {
  static_cast<std::string*>(closure)->append(reinterpret_cast<const char*>(data), length);
  return CAIRO_STATUS_SUCCESS;
}

void set_colour(cairo_t* cr, const Rgb& c, double alpha = 1.0) { cairo_set_source_rgba(cr, c.r, c.g, c.b, alpha); }

// TEXT cut with an ellipsis to fit WIDTH at the current font.
std::string fitted(cairo_t* cr, const std::string& text, double width) {
  cairo_text_extents_t e;
  cairo_text_extents(cr, text.c_str(), &e);
  if (e.x_advance <= width) return text;
  std::string t = text;
  while (!t.empty()) {
    do t.pop_back();
    while (!t.empty() && (static_cast<unsigned char>(t.back()) & 0xC0) == 0x80);  // whole UTF-8 characters
    if (!t.empty()) t.pop_back();
    const std::string candidate = t + "\xE2\x80\xA6";
    cairo_text_extents(cr, candidate.c_str(), &e);
    if (e.x_advance <= width) return candidate;
  }
  return "";
}

// Text centred on X with its baseline at Y, cut to WIDTH.
void centred_text(cairo_t* cr, const std::string& text, double x, double y, double width) {
  const std::string t = fitted(cr, text, width);
  cairo_text_extents_t e;
  cairo_text_extents(cr, t.c_str(), &e);
  cairo_move_to(cr, x - e.x_advance / 2, y);
  cairo_show_text(cr, t.c_str());
}

void font(cairo_t* cr, double size, bool bold = false) {
  cairo_select_font_face(cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                         bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
  cairo_set_font_size(cr, size);
}

// A decoded picture as a cairo surface (premultiplied ARGB), or null.
SurfacePtr picture_surface(const std::string& path, int side) {
  Rgba8Picture p;
  if (!decode_picture_rgba8(path, side, &p).empty()) return SurfacePtr(nullptr, cairo_surface_destroy);
  SurfacePtr s(cairo_image_surface_create(CAIRO_FORMAT_ARGB32, p.width, p.height), cairo_surface_destroy);
  if (cairo_surface_status(s.get()) != CAIRO_STATUS_SUCCESS) return SurfacePtr(nullptr, cairo_surface_destroy);
  cairo_surface_flush(s.get());
  unsigned char* data = cairo_image_surface_get_data(s.get());
  const int stride = cairo_image_surface_get_stride(s.get());
  for (int y = 0; y < p.height; ++y) {
    auto* row = reinterpret_cast<uint32_t*>(data + size_t(y) * size_t(stride));
    for (int x = 0; x < p.width; ++x) {
      const uint8_t* q = &p.rgba[(size_t(y) * size_t(p.width) + size_t(x)) * 4];
      const uint32_t a = q[3];
      auto pre = [a](uint32_t v) { return (v * a + 127) / 255; };
      row[x] = (a << 24) | (pre(q[0]) << 16) | (pre(q[1]) << 8) | pre(q[2]);
    }
  }
  cairo_surface_mark_dirty(s.get());
  return s;
}

// Draws SURFACE into the box (X, Y, W, H), scaled to fill it (the box has the picture's aspect).
void draw_picture(cairo_t* cr, cairo_surface_t* surface, double x, double y, double w, double h) {
  cairo_save(cr);
  cairo_rectangle(cr, x, y, w, h);
  cairo_clip(cr);
  cairo_translate(cr, x, y);
  cairo_scale(cr, w / cairo_image_surface_get_width(surface), h / cairo_image_surface_get_height(surface));
  cairo_set_source_surface(cr, surface, 0, 0);
  cairo_pattern_set_filter(cairo_get_source(cr), CAIRO_FILTER_GOOD);
  cairo_pattern_set_extend(cairo_get_source(cr), CAIRO_EXTEND_PAD);
  cairo_paint(cr);
  cairo_restore(cr);
}

// A card with its top-left corner at (X, Y), S points to the card unit.
void draw_card(cairo_t* cr, const Palette& pal, const Card& card, cairo_surface_t* picture, double x, double y,
               double s, bool captions) {
  const double w = card.w * s, h = card.h * s;
  const double line = std::max(0.25, 0.012 * s);
  if (picture) {
    const double ph = card.picture_h * s;
    draw_picture(cr, picture, x, y, w, ph);
    set_colour(cr, pal.card_frame);
    cairo_set_line_width(cr, line);
    cairo_rectangle(cr, x + line / 2, y + line / 2, w - line, ph - line);
    cairo_stroke(cr);
    if (captions && !card.caption.empty() && kCaptionFont * s >= kSmallestText) {
      font(cr, kCaptionFont * s);
      set_colour(cr, pal.ink);
      centred_text(cr, card.caption, x + w / 2, y + ph + 0.19 * s, w);
    }
    return;
  }
  const double r = 0.06 * s;
  cairo_new_sub_path(cr);
  cairo_arc(cr, x + w - r, y + r, r, -M_PI / 2, 0);
  cairo_arc(cr, x + w - r, y + h - r, r, 0, M_PI / 2);
  cairo_arc(cr, x + r, y + h - r, r, M_PI / 2, M_PI);
  cairo_arc(cr, x + r, y + r, r, M_PI, 1.5 * M_PI);
  cairo_close_path(cr);
  set_colour(cr, rgb_hex(kBlankCard));
  cairo_fill_preserve(cr);
  set_colour(cr, pal.card_frame);
  cairo_set_line_width(cr, line);
  cairo_stroke(cr);
  if (0.14 * s < kSmallestText) return;
  font(cr, 0.14 * s);
  set_colour(cr, pal.ink);
  centred_text(cr, card.caption, x + w / 2, y + h / 2 + 0.05 * s, w * 0.9);
}

// Convex hull (Andrew's monotone chain), counter-clockwise, of POINTS.
std::vector<Eigen::Vector2d> convex_hull(std::vector<Eigen::Vector2d> p) {
  std::sort(p.begin(), p.end(),
            [](const auto& a, const auto& b) { return a.x() < b.x() || (a.x() == b.x() && a.y() < b.y()); });
  if (p.size() < 3) return p;
  std::vector<Eigen::Vector2d> h(2 * p.size());
  size_t k = 0;
  auto cross = [](const Eigen::Vector2d& o, const Eigen::Vector2d& a, const Eigen::Vector2d& b) {
    return (a - o).x() * (b - o).y() - (a - o).y() * (b - o).x();
  };
  for (size_t i = 0; i < p.size(); ++i) {
    while (k >= 2 && cross(h[k - 2], h[k - 1], p[i]) <= 0) --k;
    h[k++] = p[i];
  }
  for (size_t i = p.size() - 1, t = k + 1; i > 0; --i) {
    while (k >= t && cross(h[k - 2], h[k - 1], p[i - 1]) <= 0) --k;
    h[k++] = p[i - 1];
  }
  h.resize(k - 1);
  return h;
}

// ==== [SECTION] one document: the pages of one format, drawn in memory =========================
class Document {
 public:
  Document(PosterFormat format, double width, double height, double png_scale) : format_(format) {
    if (format == PosterFormat::kPdf) {
      surface_ = cairo_pdf_surface_create_for_stream(append_bytes, &bytes_, width, height);
      cairo_pdf_surface_set_metadata(surface_, CAIRO_PDF_METADATA_CREATOR, "kith");
    } else if (format == PosterFormat::kSvg) {
      surface_ = cairo_svg_surface_create_for_stream(append_bytes, &bytes_, width, height);
      cairo_svg_surface_set_document_unit(surface_, CAIRO_SVG_UNIT_PT);
    } else {
      surface_ = cairo_image_surface_create(CAIRO_FORMAT_RGB24, int(std::lround(width * png_scale)),
                                            int(std::lround(height * png_scale)));
    }
    cr_ = cairo_create(surface_);
    if (format == PosterFormat::kPng) cairo_scale(cr_, png_scale, png_scale);
  }
  ~Document() {
    cairo_destroy(cr_);
    cairo_surface_destroy(surface_);
  }
  Document(const Document&) = delete;
  Document& operator=(const Document&) = delete;
  cairo_t* cr() { return cr_; }
  // A further page of a PDF, of the given size.
  void next_page(double width, double height) {
    cairo_show_page(cr_);
    cairo_pdf_surface_set_size(surface_, width, height);
  }
  // The file's bytes, or "" with *error.
  std::string finish(std::string* error) {
    if (cairo_status(cr_) != CAIRO_STATUS_SUCCESS) {
      *error = std::string("drawing failed (") + cairo_status_to_string(cairo_status(cr_)) + ")";
      return "";
    }
    if (format_ == PosterFormat::kPng) {
      cairo_surface_flush(surface_);
      if (cairo_surface_write_to_png_stream(surface_, append_bytes, &bytes_) != CAIRO_STATUS_SUCCESS) {
        *error = "the PNG could not be encoded";
        return "";
      }
      return mark_png_as_kiths(bytes_);
    }
    cairo_surface_finish(surface_);
    if (cairo_surface_status(surface_) != CAIRO_STATUS_SUCCESS) {
      *error = std::string("drawing failed (") + cairo_status_to_string(cairo_surface_status(surface_)) + ")";
      return "";
    }
    return bytes_;
  }

 private:
  PosterFormat format_;
  std::string bytes_;
  cairo_surface_t* surface_ = nullptr;
  cairo_t* cr_ = nullptr;
};

// ==== [SECTION] the plan: cards, where they go, the page ======================================
struct Plan {
  std::vector<Card> cards;
  std::vector<std::string> picture_paths;  // "" = no picture
  Grouping grouping;
  std::vector<std::string> group_names;               // "twill 80%", or ""
  Points centres;                                     // card units, y up
  double min_x = 0, max_y = 0, ext_w = 0, ext_h = 0;  // extent of the cards
  double page_w = 0, page_h = 0, margin = 0, title_size = 0;
  double scale = 0, left = 0, top = 0;  // points per card unit; where the extent starts
  double legend_h = 0;
};

// The grid of a contact sheet for N items in W x H: columns and the side of a cell.
void sheet_grid(size_t n, double w, double h, int* columns, double* cell) {
  *columns = 1;
  *cell = 0;
  for (size_t c = 1; c <= std::max<size_t>(n, 1); ++c) {
    const size_t rows = (n + c - 1) / c;
    const double side = std::min(w / double(c), h / double(std::max<size_t>(rows, 1)));
    if (side > *cell) {
      *cell = side;
      *columns = int(c);
    }
  }
}

std::string group_heading(const Plan& plan, int g) {
  if (g < 0) return "In no group";
  std::string s = "Group " + std::to_string(g + 1);
  if (!plan.group_names[size_t(g)].empty()) s += ": " + plan.group_names[size_t(g)];
  return s;
}

// Legend lines at the poster's foot: a swatch and the group's heading and size for each group.
double draw_legend(cairo_t* cr, const Palette& pal, const Plan& plan, double x0, double y0, double width, bool draw) {
  const double size = plan.title_size * 0.55;
  font(cr, size);
  double x = x0, y = y0 + size;
  for (size_t g = 0; g < plan.grouping.groups.size(); ++g) {
    const std::string text = group_heading(plan, int(g)) + " (" + std::to_string(plan.grouping.groups[g].size) + ")";
    cairo_text_extents_t e;
    cairo_text_extents(cr, text.c_str(), &e);
    const double item_w = size * 1.4 + e.x_advance + size * 1.5;
    if (x > x0 && x + item_w > x0 + width) {
      x = x0;
      y += size * 1.6;
    }
    if (draw) {
      set_colour(cr, pal.category(int(g)));
      cairo_rectangle(cr, x, y - size * 0.8, size, size);
      cairo_fill(cr);
      set_colour(cr, pal.ink);
      cairo_move_to(cr, x + size * 1.4, y);
      cairo_show_text(cr, text.c_str());
    }
    x += item_w;
  }
  return plan.grouping.groups.empty() ? 0.0 : y - y0 + size * 0.6;
}

// Page coordinates (points) of card I's top-left corner.
Eigen::Vector2d card_corner(const Plan& p, size_t i) {
  const Card& c = p.cards[i];
  const double x = p.left + p.scale * (p.centres(Eigen::Index(i), 0) - p.min_x - c.w / 2);
  const double y = p.top + p.scale * (p.max_y - p.centres(Eigen::Index(i), 1) - c.h / 2);
  return {x, y};
}

void draw_poster_page(cairo_t* cr, const Palette& pal, const Plan& p, const std::vector<SurfacePtr>& pictures,
                      const PosterOptions& o) {
  set_colour(cr, pal.ground);
  cairo_paint(cr);
  if (!o.title.empty()) {
    font(cr, p.title_size, true);
    set_colour(cr, pal.ink);
    cairo_move_to(cr, p.margin, p.margin + p.title_size);
    cairo_show_text(cr, fitted(cr, o.title, p.page_w * 0.6).c_str());
  }
  {
    font(cr, p.title_size * 0.55);
    set_colour(cr, pal.ink);
    const std::string what = std::to_string(p.cards.size()) + " items, " + std::to_string(p.grouping.groups.size()) +
                             (p.grouping.groups.size() == 1 ? " group" : " groups");
    cairo_text_extents_t e;
    cairo_text_extents(cr, what.c_str(), &e);
    cairo_move_to(cr, p.page_w - p.margin - e.x_advance, p.margin + p.title_size);
    cairo_show_text(cr, what.c_str());
  }
  draw_legend(cr, pal, p, p.margin, p.page_h - p.margin - p.legend_h, p.page_w - 2 * p.margin, true);

  // Group outlines under the cards: the hull of their members' corners, kept kHullPad clear.
  std::vector<std::vector<Eigen::Vector2d>> hulls(p.grouping.groups.size());
  const double pad = kHullPad * p.scale;
  for (size_t g = 0; g < hulls.size(); ++g) {
    std::vector<Eigen::Vector2d> corners;
    for (const int32_t i : p.grouping.groups[g].members) {
      const Eigen::Vector2d a = card_corner(p, size_t(i));
      const double w = p.cards[size_t(i)].w * p.scale, h = p.cards[size_t(i)].h * p.scale;
      for (const auto& d : {Eigen::Vector2d(-pad, -pad), Eigen::Vector2d(w + pad, -pad),
                            Eigen::Vector2d(w + pad, h + pad), Eigen::Vector2d(-pad, h + pad)})
        corners.push_back(a + d);
    }
    hulls[g] = convex_hull(corners);
    if (hulls[g].size() < 3) continue;
    cairo_new_path(cr);
    for (const auto& v : hulls[g]) cairo_line_to(cr, v.x(), v.y());
    cairo_close_path(cr);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    set_colour(cr, pal.category(int(g)), 0.10);
    cairo_fill_preserve(cr);
    set_colour(cr, pal.category(int(g)), 0.85);
    cairo_set_line_width(cr, std::clamp(0.03 * p.scale, 0.5, 1.5));
    cairo_stroke(cr);
  }
  for (size_t i = 0; i < p.cards.size(); ++i) {
    const Eigen::Vector2d a = card_corner(p, i);
    draw_card(cr, pal, p.cards[i], pictures[i].get(), a.x(), a.y(), p.scale, o.caption_column != -2);
  }
  // Group labels over the cards, at the top of each outline.
  font(cr, p.title_size * 0.5, true);
  for (size_t g = 0; g < hulls.size(); ++g) {
    if (hulls[g].empty()) continue;
    const auto top =
        std::min_element(hulls[g].begin(), hulls[g].end(), [](const auto& a, const auto& b) { return a.y() < b.y(); });
    const std::string text = group_heading(p, int(g));
    cairo_text_extents_t e;
    cairo_text_extents(cr, text.c_str(), &e);
    const double h = p.title_size * 0.75;
    const double x = std::clamp(top->x() - e.x_advance / 2, p.margin, p.page_w - p.margin - e.x_advance - h);
    const double y = std::max(top->y() - h * 0.5, p.margin);
    set_colour(cr, pal.ground, 0.92);
    cairo_rectangle(cr, x - h * 0.3, y, e.x_advance + h * 1.6, h);
    cairo_fill(cr);
    set_colour(cr, pal.category(int(g)));
    cairo_rectangle(cr, x - h * 0.15, y + h * 0.2, h * 0.6, h * 0.6);
    cairo_fill(cr);
    set_colour(cr, pal.ink);
    cairo_move_to(cr, x + h * 0.75, y + h * 0.75);
    cairo_show_text(cr, text.c_str());
  }
}

// One contact sheet: the heading, then MEMBERS in a grid, each with its caption (or id).
void draw_sheet(cairo_t* cr, const Palette& pal, const Plan& p, const std::vector<SurfacePtr>& pictures, int g,
                const std::vector<int32_t>& members, double w, double h) {
  set_colour(cr, pal.ground);
  cairo_paint(cr);
  const double m = std::min(w, h) * 0.05, ts = std::min(w, h) * 0.03;
  set_colour(cr, pal.category(g));
  cairo_rectangle(cr, m, m, ts, ts);
  cairo_fill(cr);
  font(cr, ts, true);
  set_colour(cr, pal.ink);
  cairo_move_to(cr, m + ts * 1.5, m + ts * 0.9);
  const std::string heading = group_heading(p, g) + " (" + std::to_string(members.size()) + " items)";
  cairo_show_text(cr, fitted(cr, heading, w - 2 * m - ts * 1.5).c_str());
  const double top = m + ts * 2.2;
  int columns = 1;
  double cell = 0;
  sheet_grid(members.size(), w - 2 * m, h - top - m, &columns, &cell);
  const bool captions = cell >= 24;
  const double strip = captions ? 0.16 * cell : 0.0;
  for (size_t k = 0; k < members.size(); ++k) {
    const size_t i = size_t(members[k]);
    const double cx = m + (w - 2 * m - cell * columns) / 2 + cell * double(k % size_t(columns)),
                 cy = top + cell * double(k / size_t(columns));
    const double room = cell * 0.9, avail_h = room - strip;
    const Card& card = p.cards[i];
    if (pictures[i]) {
      const double pw = card.w, ph = card.picture_h;
      const double s = std::min(room / pw, avail_h / ph);
      draw_picture(cr, pictures[i].get(), cx + (cell - pw * s) / 2, cy + cell * 0.05 + (avail_h - ph * s), pw * s,
                   ph * s);
    } else {
      Card blank = card;
      blank.h = kBlankHeight;
      const double s = std::min(room, avail_h / kBlankHeight);
      draw_card(cr, pal, blank, nullptr, cx + (cell - s) / 2, cy + cell * 0.05 + (avail_h - kBlankHeight * s), s,
                false);
    }
    if (captions) {
      font(cr, std::min(0.1 * cell, 11.0));
      set_colour(cr, pal.ink);
      centred_text(cr, card.caption, cx + cell / 2, cy + cell * 0.05 + room - strip * 0.25, room);
    }
  }
}

// The items of each contact sheet (groups in order, then those in no group), in the poster's
// reading order: bands of one card height from the top, left to right within a band.
std::vector<std::vector<int32_t>> sheet_members(const Plan& p) {
  std::vector<std::vector<int32_t>> sheets(p.grouping.groups.size() + 1);
  std::vector<int32_t> order(p.cards.size());
  for (size_t i = 0; i < order.size(); ++i) order[i] = int32_t(i);
  auto band = [&](int32_t i) { return std::floor((p.max_y - p.centres(i, 1)) / 1.2); };
  std::stable_sort(order.begin(), order.end(), [&](int32_t a, int32_t b) {
    return band(a) != band(b) ? band(a) < band(b) : p.centres(a, 0) < p.centres(b, 0);
  });
  for (const int32_t i : order) {
    const int g = p.grouping.label[size_t(i)];
    sheets[g < 0 ? sheets.size() - 1 : size_t(g)].push_back(i);
  }
  return sheets;
}

std::string caption_of(const Collection& c, size_t i, int column) {
  if (column >= 0 && size_t(column) < c.tags.size()) return c.tags[size_t(column)].values[i];
  return c.ids[i];
}

}  // namespace

// ==== [SECTION] the public functions ==========================================================
bool parse_poster_page(const std::string& text, PosterPage* page, std::string* error) {
  const struct {
    const char* name;
    double w_mm, h_mm;
  } kPaper[] = {{"A4", 210, 297}, {"A3", 297, 420}, {"A2", 420, 594}};
  for (const auto& p : kPaper)
    if (text == p.name || (text.size() == 2 && std::toupper(text[0]) == p.name[0] && text[1] == p.name[1])) {
      page->width = p.w_mm / kMmPerPoint;
      page->height = p.h_mm / kMmPerPoint;
      page->png_scale = 150.0 / 72.0;
      page->paper = true;
      page->name = p.name;
      return true;
    }
  int w = 0, h = 0;
  char x = 0, rest = 0;
  if (std::sscanf(text.c_str(), "%d%c%d%c", &w, &x, &h, &rest) == 3 && (x == 'x' || x == 'X') && w >= 64 && h >= 64 &&
      w <= 20000 && h <= 20000) {
    page->width = w * 72.0 / 96.0;
    page->height = h * 72.0 / 96.0;
    page->png_scale = 96.0 / 72.0;
    page->paper = false;
    page->name = std::to_string(w) + "x" + std::to_string(h);
    return true;
  }
  *error = "the poster's size is A4, A3, A2 or WxH in pixels (64 to 20000 a side), got '" + text + "'";
  return false;
}

bool poster_format_for(const std::string& path, PosterFormat* format) {
  std::string ext = std::filesystem::path(path).extension().string();
  for (char& ch : ext) ch = char(std::tolower(static_cast<unsigned char>(ch)));
  if (ext == ".png")
    *format = PosterFormat::kPng;
  else if (ext == ".pdf")
    *format = PosterFormat::kPdf;
  else if (ext == ".svg")
    *format = PosterFormat::kSvg;
  else
    return false;
  return true;
}

std::vector<std::string> contact_sheet_files(const std::string& out, size_t groups, bool ungrouped,
                                             const PosterOptions& o) {
  PosterFormat f = PosterFormat::kPng;
  std::vector<std::string> files;
  if (!o.contact_sheets || !poster_format_for(out, &f) || f == PosterFormat::kPdf) return files;
  const std::filesystem::path p(out);
  const std::string stem = (p.parent_path() / p.stem()).string(), ext = p.extension().string();
  for (size_t g = 0; g < groups; ++g) files.push_back(stem + "-group-" + std::to_string(g + 1) + ext);
  if (ungrouped) files.push_back(stem + "-no-group" + ext);
  return files;
}

double neighbours_kept(const Points& from, const Points& to) {
  const size_t n = size_t(from.rows());
  if (n < 3) return 1.0;
  HealthOptions o;
  o.recall_k = int(std::min<size_t>(10, n - 1));
  o.trust_k = 1;
  return n <= o.sample_above ? neighbour_recall(from, to, o.recall_k) : measure_health(from, to, o).neighbour_recall;
}

std::string write_poster(const Collection& c, const Points& flat, const std::string& out, const PosterOptions& o,
                         const SafeWriteOptions& file, PosterSummary* summary) {
  PosterFormat format;
  if (!poster_format_for(out, &format)) return out + ": a poster is a .png, .pdf or .svg file";
  const size_t n = c.size();
  if (size_t(flat.rows()) != n || flat.cols() != 2) return "the flat layout and the collection differ in size";
  if (n == 0) return "the collection is empty";
  const Palette pal = Palette::paper();
  Plan p;
  p.cards.resize(n);
  p.picture_paths.assign(n, "");
  // Cards: each picture's shape from its header, a caption strip when captions are asked for.
  const bool captions = o.caption_column != -2;
  size_t unreadable = 0;
  std::string first_problem;
  for (size_t i = 0; i < n; ++i) {
    Card& card = p.cards[i];
    card.caption = caption_of(c, i, o.caption_column);
    PictureHeader head;
    const std::string path = i < c.pictures.size() ? c.pictures[i] : "";
    const std::string problem = path.empty() ? "" : read_picture_header(path, 4.0, &head);
    if (path.empty() || !problem.empty()) {
      if (!problem.empty() && unreadable++ == 0) first_problem = path + ": " + problem;
      card.w = 1.0;
      card.h = kBlankHeight;
      continue;
    }
    p.picture_paths[i] = path;
    const double aspect = double(head.width) / double(head.height);
    card.w = aspect >= 1 ? 1.0 : aspect;
    card.picture_h = aspect >= 1 ? 1.0 / aspect : 1.0;
    card.h = card.picture_h + (captions ? kCaptionStrip : 0.0);
  }
  if (unreadable > 0)
    std::fprintf(stderr, "kith export: %zu pictures could not be read and are drawn as cards (first: %s)\n", unreadable,
                 first_problem.c_str());

  // Groups as in the flat layout's export, named by their most common tag.
  try {
    p.grouping = find_groups(flat);
  } catch (const std::exception& e) {
    p.grouping.label.assign(n, -1);
    std::fprintf(stderr, "kith export: no groups (%s)\n", e.what());
  }
  if (const TagColumn* tags = find_tag_column(c, o.group_tag)) describe_groups(&p.grouping, tags->values, 1);
  // A group is named by its most common tag only when at least half its tagged members share it
  // (our own rule of thumb: below that the name would mislead more than it tells).
  for (const Group& g : p.grouping.groups)
    p.group_names.push_back(g.tags.empty() || g.tags[0].share < 0.5
                                ? ""
                                : g.tags[0].tag + " " + std::to_string(int(std::lround(100 * g.tags[0].share))) + "%");
  for (size_t i = 0; i < n; ++i) p.cards[i].group = p.grouping.label[i];

  // Spacing, then the page: turned to suit the arrangement, the cards' extent fitted between the
  // title and the legend.
  std::vector<double> ws(n), hs(n);
  for (size_t i = 0; i < n; ++i) ws[i] = p.cards[i].w, hs[i] = p.cards[i].h;
  // A page of fixed shape (WxH) is not turned; the arrangement is, a quarter turn, when it is
  // wide on a tall page or tall on a wide one (a turn keeps every neighbourhood).
  Points places = flat;
  {
    const Eigen::RowVector2d extent = flat.colwise().maxCoeff() - flat.colwise().minCoeff();
    if (!o.page.paper && (extent(0) > extent(1)) != (o.page.width > o.page.height)) {
      places.col(0) = flat.col(1);
      places.col(1) = -flat.col(0);
    }
  }
  CardSpacing spaced;
  try {
    spaced = space_cards(places, ws, hs, o.spacing);
  } catch (const std::exception& e) {
    return std::string("the cards could not be spaced: ") + e.what();
  }
  p.centres = spaced.centres;
  double min_x = 1e300, max_x = -1e300, min_y = 1e300, max_y = -1e300;
  for (size_t i = 0; i < n; ++i) {
    const Eigen::Index r = Eigen::Index(i);
    min_x = std::min(min_x, p.centres(r, 0) - ws[i] / 2 - kHullPad);
    max_x = std::max(max_x, p.centres(r, 0) + ws[i] / 2 + kHullPad);
    min_y = std::min(min_y, p.centres(r, 1) - hs[i] / 2 - kHullPad);
    max_y = std::max(max_y, p.centres(r, 1) + hs[i] / 2 + kHullPad);
  }
  p.min_x = min_x;
  p.max_y = max_y;
  p.ext_w = max_x - min_x;
  p.ext_h = max_y - min_y;
  p.page_w = o.page.width;
  p.page_h = o.page.height;
  if (o.page.paper && (p.ext_w > p.ext_h) != (p.page_w > p.page_h)) std::swap(p.page_w, p.page_h);
  p.margin = 0.04 * std::min(p.page_w, p.page_h);
  p.title_size = 0.025 * std::min(p.page_w, p.page_h);
  {
    Document measure(PosterFormat::kPng, 8, 8, 1.0);
    p.legend_h = draw_legend(measure.cr(), pal, p, p.margin, 0, p.page_w - 2 * p.margin, false);
  }
  const double area_top = p.margin + p.title_size * 2.2;
  const double area_w = p.page_w - 2 * p.margin;
  const double area_h = p.page_h - area_top - p.margin - p.legend_h - (p.legend_h > 0 ? p.title_size : 0.0);
  if (area_h <= 0 || area_w <= 0) return "the page is too small for a poster";
  p.scale = std::min(area_w / p.ext_w, area_h / p.ext_h);
  p.left = p.margin + (area_w - p.scale * p.ext_w) / 2;
  p.top = area_top + (area_h - p.scale * p.ext_h) / 2;

  // Contact sheets: same page size as the poster, portrait or landscape as the poster is.
  const std::vector<std::vector<int32_t>> sheets =
      o.contact_sheets ? sheet_members(p) : std::vector<std::vector<int32_t>>{};
  double largest_cell = 0;
  for (const auto& members : sheets) {
    if (members.empty()) continue;
    int columns;
    double cell;
    const double m = std::min(p.page_w, p.page_h) * 0.05;
    sheet_grid(members.size(), p.page_w - 2 * m, p.page_h - 2.5 * m, &columns, &cell);
    largest_cell = std::max(largest_cell, cell);
  }

  // Pictures, decoded once at the largest size any page needs, within the memory allowed for them.
  const double per_point = format == PosterFormat::kPng   ? o.page.png_scale
                           : format == PosterFormat::kPdf ? kPrintPixelsPerPoint
                                                          : kSvgPixelsPerPoint;
  const double wanted = std::max(p.scale, largest_cell) * per_point;
  const double allowed = std::sqrt(kPictureMemory / 4.0 / double(n));
  const int side = int(std::clamp(std::min(wanted, allowed), 8.0, 1024.0));
  std::vector<SurfacePtr> pictures;
  pictures.reserve(n);
  for (size_t i = 0; i < n; ++i) {
    pictures.push_back(p.picture_paths[i].empty() ? SurfacePtr(nullptr, cairo_surface_destroy)
                                                  : picture_surface(p.picture_paths[i], side));
    if (!pictures.back() && !p.picture_paths[i].empty()) {
      p.cards[i].h = kBlankHeight;  // read at first, not now: a card (its place was kept for the picture)
      p.cards[i].picture_h = 0;
    }
  }

  // Draw every page in memory, then write.
  std::vector<std::pair<std::string, std::string>> files;  // path, bytes
  std::string error;
  {
    Document doc(format, p.page_w, p.page_h, o.page.png_scale);
    draw_poster_page(doc.cr(), pal, p, pictures, o);
    for (size_t s = 0; s < sheets.size(); ++s) {
      if (sheets[s].empty()) continue;
      const int g = s + 1 == sheets.size() ? -1 : int(s);
      if (format == PosterFormat::kPdf) {
        doc.next_page(p.page_w, p.page_h);
        draw_sheet(doc.cr(), pal, p, pictures, g, sheets[s], p.page_w, p.page_h);
      }
    }
    files.push_back({out, doc.finish(&error)});
    if (!error.empty()) return out + ": " + error;
  }
  const std::vector<std::string> sheet_paths =
      contact_sheet_files(out, p.grouping.groups.size(), o.contact_sheets && !sheets.back().empty(), o);
  for (size_t s = 0, k = 0; s < sheets.size() && k < sheet_paths.size(); ++s) {
    if (sheets[s].empty()) continue;
    Document doc(format, p.page_w, p.page_h, o.page.png_scale);
    draw_sheet(doc.cr(), pal, p, pictures, s + 1 == sheets.size() ? -1 : int(s), sheets[s], p.page_w, p.page_h);
    files.push_back({sheet_paths[k++], doc.finish(&error)});
    if (!error.empty()) return files.back().first + ": " + error;
  }
  for (const auto& f : files)
    if (const std::string problem = check_write_target(f.first, file); !problem.empty()) {
      summary->refused = f.first;
      return problem;
    }
  summary->files.clear();
  for (const auto& f : files) {
    if (const std::string problem = write_file_safely(f.first, f.second, file); !problem.empty()) return problem;
    summary->files.push_back(f.first);
  }

  summary->items = n;
  summary->pictures = 0;
  for (const auto& s : pictures) summary->pictures += s ? 1 : 0;
  summary->groups = p.grouping.groups.size();
  summary->card_mm = p.scale * kMmPerPoint;
  summary->captions_too_small = captions && kCaptionFont * p.scale < kSmallestText;
  summary->caption_mm = kSmallestText / kCaptionFont * kMmPerPoint;
  summary->spacing_rounds = spaced.rounds;
  summary->overlaps_at_start = spaced.overlaps_at_start;
  summary->centres = p.centres;
  summary->kept = neighbours_kept(flat, p.centres);
  return "";
}

}  // namespace kith
