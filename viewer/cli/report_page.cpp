// The HTML report page (see report_page.h).
// [SECTION] text helpers  [SECTION] pictures  [SECTION] page
#include "viewer/cli/report_page.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <map>
#include <sstream>

#include "solver/io/png_file.h"
#include "viewer/scene/colour_code.h"

namespace kith {

// ==== [SECTION] text helpers ================================================

std::string html_escape(const std::string& text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    const char* entity = c == '&'    ? "&amp;"
                         : c == '<'  ? "&lt;"
                         : c == '>'  ? "&gt;"
                         : c == '"'  ? "&quot;"
                         : c == '\'' ? "&#39;"
                                     : nullptr;
    if (entity)
      out += entity;
    else
      out += c;
  }
  return out;
}

std::string base64_encode(const std::string& bytes) {
  static const char* k = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
  std::string out;
  out.reserve((bytes.size() + 2) / 3 * 4);
  size_t i = 0;
  for (; i + 2 < bytes.size(); i += 3) {
    const uint32_t v = (uint32_t(uint8_t(bytes[i])) << 16) | (uint32_t(uint8_t(bytes[i + 1])) << 8) | uint8_t(bytes[i + 2]);
    out += k[v >> 18];
    out += k[(v >> 12) & 63];
    out += k[(v >> 6) & 63];
    out += k[v & 63];
  }
  if (i + 1 == bytes.size()) {
    const uint32_t v = uint32_t(uint8_t(bytes[i])) << 16;
    out += k[v >> 18];
    out += k[(v >> 12) & 63];
    out += "==";
  } else if (i + 2 == bytes.size()) {
    const uint32_t v = (uint32_t(uint8_t(bytes[i])) << 16) | (uint32_t(uint8_t(bytes[i + 1])) << 8);
    out += k[v >> 18];
    out += k[(v >> 12) & 63];
    out += k[(v >> 6) & 63];
    out += '=';
  }
  return out;
}

std::string external_reference(const std::string& html) {
  std::string lower = html;
  std::transform(lower.begin(), lower.end(), lower.begin(), [](unsigned char c) { return char(std::tolower(c)); });
  // Attributes that load something must hold inline data or a fragment.
  for (const char* attr : {"src=", "href=", "srcset=", "poster=", "data=", "action="}) {
    for (size_t at = lower.find(attr); at != std::string::npos; at = lower.find(attr, at + 1)) {
      if (at > 0 && (std::isalnum(static_cast<unsigned char>(lower[at - 1])) || lower[at - 1] == '-')) continue;
      size_t v = at + std::string(attr).size();
      if (v < lower.size() && (lower[v] == '"' || lower[v] == '\'')) ++v;
      if (lower.compare(v, 5, "data:") == 0 || lower.compare(v, 1, "#") == 0) continue;
      return html.substr(at, std::min<size_t>(60, html.size() - at));
    }
  }
  for (const char* bad : {"<link", "@import", "url(http", "url(//", "url(\"http", "url('http", "<iframe", "<object",
                          "<embed", "<script"}) {
    const size_t at = lower.find(bad);
    if (at != std::string::npos) return html.substr(at, std::min<size_t>(60, html.size() - at));
  }
  return "";
}

namespace {

std::string fmt(const char* format, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

// ==== [SECTION] pictures ====================================================

using Rgb8 = std::array<uint8_t, 3>;
constexpr Rgb8 rgb8(uint32_t hex) { return {uint8_t(hex >> 16), uint8_t(hex >> 8), uint8_t(hex)}; }
// Colours come from the code the window uses (viewer/scene/colour_code.h) on the paper ground, so
// an item has the same colour and mark here.
Rgb8 rgb8(const Rgb& c) {
  auto byte = [](float v) { return uint8_t(std::lround(std::clamp(v, 0.f, 1.f) * 255.f)); };
  return {byte(c.r), byte(c.g), byte(c.b)};
}
const Rgb8 kPaper = {0xFB, 0xF9, 0xF4};
const Rgb8 kInk = {0x22, 0x22, 0x22};

std::string hex(const Rgb8& c) {
  char buf[8];
  std::snprintf(buf, sizeof buf, "#%02x%02x%02x", c[0], c[1], c[2]);
  return buf;
}

class Raster {
 public:
  explicit Raster(int size) : size_(size), pixels_(size_t(size) * size_t(size) * 3) {
    for (size_t i = 0; i < pixels_.size(); i += 3) std::copy(kPaper.begin(), kPaper.end(), pixels_.begin() + long(i));
  }
  // A disc with a soft one-pixel edge; `ring` > 0 draws only an annulus of that width.
  void disc(double cx, double cy, double r, const Rgb8& c, double ring = 0.0) {
    const int x0 = std::max(0, int(std::floor(cx - r - 1))), x1 = std::min(size_ - 1, int(std::ceil(cx + r + 1)));
    const int y0 = std::max(0, int(std::floor(cy - r - 1))), y1 = std::min(size_ - 1, int(std::ceil(cy + r + 1)));
    for (int y = y0; y <= y1; ++y)
      for (int x = x0; x <= x1; ++x) {
        const double d = std::hypot(x + 0.5 - cx, y + 0.5 - cy);
        double a = std::clamp(r + 0.5 - d, 0.0, 1.0);
        if (ring > 0.0) a = std::min(a, std::clamp(d - (r - ring) + 0.5, 0.0, 1.0));
        if (a <= 0.0) continue;
        uint8_t* p = &pixels_[(size_t(y) * size_t(size_) + size_t(x)) * 3];
        for (int k = 0; k < 3; ++k) p[k] = uint8_t(std::lround(p[k] * (1 - a) + c[size_t(k)] * a));
      }
  }
  // An item's mark: a disc, a ring, a square or a diamond of about the disc's area.
  void mark(double cx, double cy, double r, const Rgb8& c, Mark m) {
    if (m == Mark::kDisc) return disc(cx, cy, r, c);
    if (m == Mark::kRing) return disc(cx, cy, r * 1.1, c, std::max(1.0, r * 0.55));
    const double half = m == Mark::kSquare ? r * 0.89 : r * 1.2;
    const int x0 = std::max(0, int(std::floor(cx - half - 1))), x1 = std::min(size_ - 1, int(std::ceil(cx + half + 1)));
    const int y0 = std::max(0, int(std::floor(cy - half - 1))), y1 = std::min(size_ - 1, int(std::ceil(cy + half + 1)));
    for (int y = y0; y <= y1; ++y)
      for (int x = x0; x <= x1; ++x) {
        const double dx = std::abs(x + 0.5 - cx), dy = std::abs(y + 0.5 - cy);
        const double d = m == Mark::kSquare ? std::max(dx, dy) : (dx + dy) / std::sqrt(2.0);
        const double edge = m == Mark::kSquare ? half : half / std::sqrt(2.0);
        const double a = std::clamp(edge + 0.5 - d, 0.0, 1.0);
        if (a <= 0.0) continue;
        uint8_t* p = &pixels_[(size_t(y) * size_t(size_) + size_t(x)) * 3];
        for (int k = 0; k < 3; ++k) p[k] = uint8_t(std::lround(p[k] * (1 - a) + c[size_t(k)] * a));
      }
  }
  std::string png() const { return png_bytes(pixels_.data(), size_, size_, 3); }

 private:
  int size_;
  std::vector<uint8_t> pixels_;
};

// Pixel positions of the view, fitted into the square with a margin, aspect kept, y up.
std::vector<std::array<double, 2>> to_pixels(const Points& view, int size) {
  std::vector<std::array<double, 2>> out(size_t(view.rows()));
  if (view.rows() == 0) return out;
  const Eigen::RowVectorXd lo = view.colwise().minCoeff(), hi = view.colwise().maxCoeff();
  const double span = std::max({hi[0] - lo[0], hi[1] - lo[1], 1e-12});
  const double margin = 0.05 * size, scale = (size - 2 * margin) / span;
  const double ox = margin + 0.5 * ((size - 2 * margin) - (hi[0] - lo[0]) * scale);
  const double oy = margin + 0.5 * ((size - 2 * margin) - (hi[1] - lo[1]) * scale);
  for (Eigen::Index i = 0; i < view.rows(); ++i)
    out[size_t(i)] = {ox + (view(i, 0) - lo[0]) * scale, size - (oy + (view(i, 1) - lo[1]) * scale)};
  return out;
}

double disc_radius(size_t n, int size) {
  // Larger discs for small collections, never below 1.2 px.
  return std::clamp(0.9 * size / std::sqrt(double(std::max<size_t>(n, 1))) * 0.35, 1.2, 5.0);
}

// A legend entry's swatch, in its mark's shape.
std::string swatch(const CodeEntry& e) {
  const char* shape = e.mark == Mark::kDisc ? "" : e.mark == Mark::kRing ? " ring" : e.mark == Mark::kSquare ? " square" : " diamond";
  const std::string colour = hex(rgb8(e.colour));
  return "<span class='sw" + std::string(shape) + "' style='background:" + colour + ";border-color:" + colour + "'></span>";
}

// The legend of a code: each value's swatch and name (count), or a ramp's bar and range.
std::string legend_html(const ColourCode& code) {
  std::ostringstream h;
  if (code.ramp) {
    h << " " << html_escape(ramp_label(code.lo, code.unit)) << "<span class='ramp' style='background:linear-gradient(to right";
    const Palette paper = Palette::paper();
    for (int k = 0; k <= 8; ++k) h << "," << hex(rgb8(paper.ramp(float(k) / 8)));
    h << ")'></span>" << html_escape(ramp_label(code.hi, code.unit));
    for (const CodeEntry& e : code.entries)
      if (e.count) h << swatch(e) << html_escape(e.label) << " (" << e.count << ")";
  } else {
    for (const CodeEntry& e : code.entries) h << swatch(e) << html_escape(e.label) << " (" << e.count << ")";
  }
  for (const std::string& note : code.notes) h << "<br><small>" << html_escape(note) << "</small>";
  return h.str();
}

ColourCode group_code_of(const Grouping& g, const Palette& palette) {
  std::vector<int> label(g.label.begin(), g.label.end());
  std::vector<std::string> names;
  for (size_t k = 0; k < g.groups.size(); ++k) names.push_back("group " + std::to_string(k + 1));
  return group_code("group", label, names, palette);
}

// An inline SVG holding the PNG and text labels.
std::string picture(const Raster& raster, int size, const std::string& caption,
                    const std::vector<std::pair<std::array<double, 2>, std::string>>& labels) {
  std::ostringstream s;
  s << "<figure><svg width='" << size << "' height='" << size << "' viewBox='0 0 "
    << size << ' ' << size << "' role='img'><image width='" << size << "' height='" << size
    << "' href='data:image/png;base64," << base64_encode(raster.png()) << "'/>";
  for (const auto& [at, text] : labels)
    s << "<text x='" << fmt("%.1f", at[0]) << "' y='" << fmt("%.1f", at[1]) << "' class='lbl'>" << html_escape(text)
      << "</text>";
  s << "</svg><figcaption>" << caption << "</figcaption></figure>\n";
  return s.str();
}

// ==== [SECTION] page ========================================================

const char* kStyle = R"(
body{font:15px/1.45 system-ui,sans-serif;background:#f6f3ec;color:#2b2b2b;margin:0;padding:24px 32px}
h1{font-weight:600;margin:0 0 4px}h2{font-weight:600;margin:28px 0 8px;border-bottom:1px solid #d8d2c4}
p.note{color:#6b665c;margin:2px 0 12px}
table{border-collapse:collapse;margin:4px 0 8px}td,th{padding:3px 10px;text-align:left;vertical-align:top}
th{font-weight:600;border-bottom:1px solid #cfc8b8}tr:nth-child(even) td{background:#efebe1}
td.num{text-align:right;font-variant-numeric:tabular-nums}
.pics{display:flex;flex-wrap:wrap;gap:18px}figure{margin:0;background:#fbf9f4;border:1px solid #ddd6c6;padding:6px}
figcaption{font-size:13px;color:#5a554b;margin-top:4px;max-width:560px}
.sw{display:inline-block;width:11px;height:11px;border-radius:50%;margin:0 4px 0 10px;vertical-align:-1px;box-sizing:border-box}
.sw.ring{background:none!important;border:3px solid}.sw.square{border-radius:0}.sw.diamond{border-radius:0;transform:rotate(45deg) scale(.85)}
.ramp{display:inline-block;width:160px;height:11px;margin:0 6px;vertical-align:-1px}
.lbl{font:bold 14px system-ui,sans-serif;fill:#222;paint-order:stroke;stroke:#fbf9f4;stroke-width:3px}
.bar{display:inline-block;height:9px;vertical-align:0}
)";

// kith's copper accent (Palette::kCopper) for the bars, the same as the window's.
std::string accent_style() {
  char css[96];
  std::snprintf(css, sizeof css, ".bar{background:#%06X}", unsigned(Palette::kCopper));
  return css;
}

}  // namespace

std::string report_html(const ReportContent& c) {
  const size_t n = c.ids.size();
  const int size = c.picture_size;
  const bool have_tags = c.tags.size() == n && n > 0;
  std::ostringstream h;
  h << "<!DOCTYPE html>\n<html lang='en'><head><meta charset='utf-8'><title>kith report: " << html_escape(c.title)
    << "</title><style>" << kStyle << accent_style() << "</style></head><body>\n";
  h << "<h1 id='kith-report'>" << html_escape(c.title) << "</h1><p class='note'>" << n << " items from "
    << html_escape(c.source) << (have_tags ? "; tag column '" + html_escape(c.tag_name) + "'" : std::string())
    << "</p>\n";

  // Health and fit figures.
  h << "<h2>Health</h2><table id='health'>";
  for (const auto& [name, value] : c.figures)
    h << "<tr><th>" << html_escape(name) << "</th><td class='num'>" << html_escape(value) << "</td></tr>";
  h << "</table>\n";

  // Pictures.
  const auto px = to_pixels(c.view, size);
  const double r = disc_radius(n, size);
  const Palette paper = Palette::paper();
  const ColourCode code = c.colour.colour.size() == n ? c.colour
                          : have_tags                 ? categorical_code(c.tag_name, c.tags, paper)
                                                      : plain_code("items", n, paper);
  const size_t ringed = c.suspects ? std::min(c.list_rows, c.suspects->ranking.size()) : 0;

  h << "<h2>The map</h2><p class='note'>Seen along the map's two widest directions. Colour: "
    << html_escape(code.title) << legend_html(code) << "</p><div class='pics'>\n";
  {
    Raster pic(size);
    for (size_t i = 0; i < n; ++i) pic.mark(px[i][0], px[i][1], r, rgb8(code.colour[i]), code.mark[i]);
    std::vector<std::pair<std::array<double, 2>, std::string>> labels;
    for (size_t s = 0; s < ringed; ++s) {
      const size_t i = size_t(c.suspects->ranking[s]);
      pic.mark(px[i][0], px[i][1], r, rgb8(code.colour[i]), code.mark[i]);  // on top of its crowd
      pic.disc(px[i][0], px[i][1], r + 3.5, kInk, 1.6);
    }
    h << picture(pic, size,
                 "Coloured by " + html_escape(code.title) +
                     (ringed ? "; rings mark the " + std::to_string(ringed) + " strongest suspects." : "."),
                 labels);
  }
  const ColourCode groups = c.groups ? group_code_of(*c.groups, paper) : ColourCode{};
  if (c.groups) {
    Raster pic(size);
    for (size_t i = 0; i < n; ++i) pic.mark(px[i][0], px[i][1], r, rgb8(groups.colour[i]), groups.mark[i]);
    std::vector<std::pair<std::array<double, 2>, std::string>> labels;
    for (size_t g = 0; g < c.groups->groups.size(); ++g) {
      double x = 0, y = 0;
      for (int32_t i : c.groups->groups[g].members) {
        x += px[size_t(i)][0];
        y += px[size_t(i)][1];
      }
      const double m = double(c.groups->groups[g].members.size());
      labels.push_back({{x / m - 5, y / m + 5}, std::to_string(g + 1)});
    }
    h << picture(pic, size, "Coloured by group (numbers as in the table); grey: in no group.", labels);
  }
  if (c.displacement) {
    Raster pic(size);
    const auto& d = c.displacement->distance;
    const ColourCode moved = ramp_code("moved by judgments", "map units", d, true, paper);
    std::vector<size_t> order(n);
    for (size_t i = 0; i < n; ++i) order[i] = i;
    std::sort(order.begin(), order.end(), [&](size_t a, size_t b) { return d[a] < d[b]; });  // most moved on top
    for (size_t i : order) pic.mark(px[i][0], px[i][1], r, rgb8(moved.colour[i]), Mark::kDisc);
    h << picture(pic, size, "Coloured by how far judgments moved each item:" + legend_html(moved), {});
  }
  h << "</div>\n";

  // Suspects.
  if (c.suspects) {
    const SuspectScores& s = *c.suspects;
    h << "<h2>Suspects</h2><p class='note'>Tagged items whose nearest neighbours mostly carry another tag. "
      << html_escape(s.summary()) << ".</p><table id='suspects'><tr><th>#</th><th>item</th><th>tag</th><th>score</th>"
      << "<th>neighbours lean to</th><th>features</th><th>map</th></tr>";
    for (size_t k = 0; k < std::min(c.list_rows, s.ranking.size()); ++k) {
      const size_t i = size_t(s.ranking[k]);
      auto num = [](double v) { return std::isnan(v) ? std::string("-") : fmt("%.2f", v); };
      h << "<tr><td class='num'>" << k + 1 << "</td><td>" << html_escape(c.ids[i]) << "</td><td>"
        << html_escape(have_tags ? c.tags[i] : "") << "</td><td class='num'>" << num(s.score[i])
        << " <span class='bar' style='width:" << int(std::lround(40 * (std::isnan(s.score[i]) ? 0 : s.score[i])))
        << "px'></span></td><td>" << html_escape(s.likely_tag[i]) << " (" << fmt("%.0f%%", 100 * s.likely_share[i])
        << ")</td><td class='num'>" << num(s.feature_score[i]) << "</td><td class='num'>" << num(s.map_score[i])
        << "</td></tr>";
    }
    h << "</table>\n";
  }

  // Groups.
  if (c.groups) {
    const Grouping& g = *c.groups;
    h << "<h2>Groups</h2><p class='note'>" << html_escape(g.summary())
      << ". Representatives are the members closest to the group's centre.</p><table id='groups'><tr><th>group</th>"
      << "<th>size</th><th>most common tags</th><th>purity</th><th>representatives</th></tr>";
    for (size_t k = 0; k < g.groups.size(); ++k) {
      const Group& grp = g.groups[k];
      h << "<tr><td class='num'>" << swatch(groups.entries[std::min(k, groups.entries.size() - 1)]) << k + 1 << "</td><td class='num'>" << grp.size << "</td><td>";
      for (size_t t = 0; t < grp.tags.size(); ++t)
        h << (t ? ", " : "") << html_escape(grp.tags[t].tag) << " " << fmt("%.0f%%", 100 * grp.tags[t].share);
      h << "</td><td class='num'>" << (grp.tags.empty() ? std::string("-") : fmt("%.2f", grp.purity)) << "</td><td>";
      for (size_t t = 0; t < grp.representatives.size(); ++t)
        h << (t ? ", " : "") << html_escape(c.ids[size_t(grp.representatives[t])]);
      h << "</td></tr>";
    }
    h << "</table>\n";
  }

  // Neighbourhoods.
  if (c.kept.size() == n && n > 0) {
    double mean = 0;
    for (double v : c.kept) mean += v;
    mean /= double(n);
    std::vector<size_t> order(n);
    for (size_t i = 0; i < n; ++i) order[i] = i;
    std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) { return c.kept[a] < c.kept[b]; });
    h << "<h2>Neighbourhoods the map keeps worst</h2><p class='note'>Share of each item's nearest neighbours in the "
         "features that are also its nearest in the map; the mean over all items is "
      << fmt("%.3f", mean) << ".</p><table id='kept'><tr><th>item</th><th>tag</th><th>kept</th></tr>";
    for (size_t k = 0; k < std::min(c.list_rows, n); ++k)
      h << "<tr><td>" << html_escape(c.ids[order[k]]) << "</td><td>" << html_escape(have_tags ? c.tags[order[k]] : "")
        << "</td><td class='num'>" << fmt("%.2f", c.kept[order[k]]) << "</td></tr>";
    h << "</table>\n";
  }

  // Displacement.
  if (c.displacement) {
    const Displacement& d = *c.displacement;
    h << "<h2>What the judgments moved</h2><p class='note'>Distance between each item's place in the map fitted "
         "from the features alone (aligned by rotation, scale and shift) and its place now; alignment rms "
      << fmt("%.3g", d.alignment.rms) << ".</p><table id='moved'><tr><th>item</th><th>tag</th><th>moved</th>"
      << (c.moved_by.size() == n ? "<th>judgments pulling it that way most</th>" : "") << "</tr>";
    for (size_t k = 0; k < std::min(c.list_rows, d.ranking.size()); ++k) {
      const size_t i = size_t(d.ranking[k]);
      h << "<tr><td>" << html_escape(c.ids[i]) << "</td><td>" << html_escape(have_tags ? c.tags[i] : "")
        << "</td><td class='num'>" << fmt("%.3g", d.distance[i]) << "</td>";
      if (c.moved_by.size() == n) h << "<td>" << html_escape(c.moved_by[i]) << "</td>";
      h << "</tr>";
    }
    h << "</table>\n";
  }
  h << "<p class='note'>Written by kith.</p></body></html>\n";
  return h.str();
}

}  // namespace kith
