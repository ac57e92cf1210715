#include "viewer/scene/colour_code.h"

#include <algorithm>
#include <cctype>
#include <utility>
#include <cmath>
#include <cstdio>
#include <map>

#include "solver/io/collection.h"

namespace kith {

const char* mark_name(Mark mark) {
  switch (mark) {
    case Mark::kDisc: return "disc";
    case Mark::kRing: return "ring";
    case Mark::kSquare: return "square";
    case Mark::kDiamond: return "diamond";
  }
  return "disc";
}

namespace {

constexpr size_t kColours = Palette::kCategorical.size();

// Code k (0..kCodedValues-1): colour k mod 12, mark k / 12.
CodeEntry coded(size_t k, const std::string& label, size_t count, const std::string& value, const Palette& palette) {
  return {label, palette.category(int(k % kColours)), Mark(k / kColours), count, value};
}

void note_shared_colours(size_t coded_values, ColourCode* code) {
  if (coded_values <= kColours) return;
  std::string marks;
  for (size_t m = 1; m * kColours < coded_values; ++m) marks += std::string(m > 1 ? ", then " : "") + mark_name(Mark(m)) + "s";
  code->notes.push_back("values past the " + std::to_string(kColours) + "th repeat the colours in order, drawn as " +
                        marks + "; the legend shows each value's mark");
}

// Each item i takes the colour and mark of entry entry_of(i), or the muted disc when that is < 0.
template <typename EntryOf>
void paint_items(size_t n, const Palette& palette, ColourCode* code, EntryOf entry_of) {
  code->colour.assign(n, palette.muted);
  code->mark.assign(n, Mark::kDisc);
  for (size_t i = 0; i < n; ++i)
    if (const long e = entry_of(i); e >= 0) {
      code->colour[i] = code->entries[size_t(e)].colour;
      code->mark[i] = code->entries[size_t(e)].mark;
    }
}

}  // namespace

ColourCode categorical_code(const std::string& title, const std::vector<std::string>& values, const Palette& palette) {
  ColourCode code;
  code.title = title;
  const size_t n = values.size();
  std::map<std::string, size_t> counts;
  size_t none = 0;
  for (const auto& v : values) v.empty() ? void(++none) : void(++counts[v]);
  std::vector<std::pair<std::string, size_t>> order(counts.begin(), counts.end());  // by value
  std::stable_sort(order.begin(), order.end(), [](const auto& a, const auto& b) { return a.second > b.second; });
  std::map<std::string, size_t> index;
  const size_t named = std::min(order.size(), kCodedValues);
  for (size_t k = 0; k < named; ++k) {
    index[order[k].first] = k;
    code.entries.push_back(coded(k, order[k].first, order[k].second, order[k].first, palette));
  }
  size_t other = 0;
  for (size_t k = named; k < order.size(); ++k) other += order[k].second;
  note_shared_colours(named, &code);
  if (other)
    code.notes.push_back(std::to_string(order.size() - named) + " rarer values (" + std::to_string(other) +
                         " items) share the grey of 'other'");
  if (other) code.entries.push_back({"other", palette.muted, Mark::kDisc, other, ""});
  if (none) code.entries.push_back({"no value", palette.muted, Mark::kDisc, none, ""});
  paint_items(n, palette, &code, [&](size_t i) {
    const auto it = index.find(values[i]);
    return it == index.end() ? -1L : long(it->second);
  });
  return code;
}

ColourCode group_code(const std::string& title, const std::vector<int>& groups, const std::vector<std::string>& names,
                      const Palette& palette) {
  ColourCode code;
  code.title = title;
  const size_t n = groups.size();
  std::vector<size_t> count(names.size(), 0);
  size_t none = 0;
  for (int g : groups) (g >= 0 && size_t(g) < count.size()) ? void(++count[size_t(g)]) : void(++none);
  const size_t named = std::min(names.size(), kCodedValues);
  for (size_t g = 0; g < named; ++g) code.entries.push_back(coded(g, names[g], count[g], "", palette));
  note_shared_colours(named, &code);
  size_t rest = none;
  for (size_t g = named; g < names.size(); ++g) rest += count[g];
  if (rest) code.entries.push_back({"no group", palette.muted, Mark::kDisc, rest, ""});
  paint_items(n, palette, &code, [&](size_t i) {
    const int g = groups[i];
    return g < 0 || size_t(g) >= named ? -1L : long(g);
  });
  return code;
}

ColourCode ramp_code(const std::string& title, const std::string& unit, const std::vector<double>& values,
                     bool from_zero, const Palette& palette) {
  ColourCode code;
  code.title = title;
  code.ramp = true;
  code.unit = unit;
  const size_t n = values.size();
  double lo = INFINITY, hi = -INFINITY;
  size_t none = 0;
  for (double v : values) {
    if (!std::isfinite(v)) {
      ++none;
      continue;
    }
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  if (lo > hi) lo = hi = 0.0;  // no value at all
  if (from_zero) lo = std::min(lo, 0.0);
  code.lo = lo;
  code.hi = hi;
  const double span = hi - lo;
  code.colour.assign(n, palette.muted);
  code.mark.assign(n, Mark::kDisc);
  for (size_t i = 0; i < n; ++i)
    if (std::isfinite(values[i])) code.colour[i] = palette.ramp(span > 0 ? float((values[i] - lo) / span) : 0.f);
  for (double t : {0.0, 0.25, 0.5, 0.75, 1.0}) {
    if (span <= 0 && t > 0) break;  // one value: one stop
    code.entries.push_back({ramp_label(lo + t * span, unit), palette.ramp(float(t)), Mark::kDisc, 0, ""});
  }
  if (none) code.entries.push_back({"no value", palette.muted, Mark::kDisc, none, ""});
  return code;
}

ColourCode plain_code(const std::string& title, size_t n, const Palette& palette) {
  ColourCode code;
  code.title = title;
  code.colour.assign(n, palette.category(0));
  code.mark.assign(n, Mark::kDisc);
  code.entries.push_back({"item", palette.category(0), Mark::kDisc, n, ""});
  return code;
}

ColourCode collection_code(const Collection& c, const ColourBy& by, const Palette& palette) {
  if (by.kind == ColourKind::kTag && by.tag_column >= 0 && size_t(by.tag_column) < c.tags.size()) {
    const TagColumn& t = c.tags[size_t(by.tag_column)];
    return categorical_code(t.name, t.values, palette);
  }
  if (by.kind == ColourKind::kColumn && by.feature_column >= 0 && by.feature_column < c.features.cols()) {
    const Eigen::Index f = by.feature_column;
    std::vector<double> v(c.size());
    for (size_t i = 0; i < v.size(); ++i) v[i] = c.features(Eigen::Index(i), f);
    const std::string& name = c.feature_names[size_t(f)];
    return ramp_code(name, unit_in_name(name), v, false, palette);
  }
  return plain_code("items", c.size(), palette);
}

bool colour_by_name(const Collection& c, const std::string& name, ColourBy* by, std::string* why) {
  if (name == "plain") return *by = {ColourKind::kPlain, -1, -1}, true;
  for (size_t t = 0; t < c.tags.size(); ++t)
    if (c.tags[t].name == name) return *by = {ColourKind::kTag, int(t), -1}, true;
  for (size_t f = 0; f < c.feature_names.size(); ++f)
    if (c.feature_names[f] == name) return *by = {ColourKind::kColumn, -1, int(f)}, true;
  if (name == "judgments") return *by = {ColourKind::kJudgments, -1, -1}, true;
  std::string list;
  for (const TagColumn& t : c.tags) list += (list.empty() ? "" : ", ") + t.name;
  std::string numbers;
  for (const std::string& f : c.feature_names) numbers += (numbers.empty() ? "" : ", ") + f;
  *why = "no column named '" + name + "' (tag columns: " + (list.empty() ? "none" : list) +
         "; numeric columns: " + (numbers.empty() ? "none" : numbers) + "; or 'judgments', 'plain')";
  return false;
}

std::string unit_in_name(const std::string& name) {
  if (name.size() < 3) return "";
  const char close = name.back();
  const char open = close == ')' ? '(' : close == ']' ? '[' : 0;
  if (open) {
    const size_t at = name.rfind(open);
    if (at == std::string::npos || at == 0) return "";
    std::string unit = name.substr(at + 1, name.size() - at - 2);
    while (!unit.empty() && unit.front() == ' ') unit.erase(unit.begin());
    while (!unit.empty() && unit.back() == ' ') unit.pop_back();
    return unit;
  }
  // A common unit after the last underscore, as in caffeine_mg or water_temp_c.
  static const std::pair<const char*, const char*> kSuffixes[] = {
      {"mg", "mg"}, {"g", "g"},     {"kg", "kg"}, {"ml", "ml"}, {"l", "l"},     {"mm", "mm"},       {"cm", "cm"},
      {"m", "m"},   {"km", "km"},   {"c", "\xc2\xb0""C"}, {"f", "\xc2\xb0""F"}, {"s", "s"}, {"seconds", "s"}, {"ms", "ms"},
      {"min", "min"}, {"minutes", "minutes"}, {"h", "h"}, {"hours", "hours"}, {"days", "days"}, {"pct", "%"},
      {"percent", "%"}, {"kcal", "kcal"}, {"usd", "USD"}, {"eur", "EUR"}};
  const size_t at = name.rfind('_');
  if (at == std::string::npos || at == 0 || at + 1 >= name.size()) return "";
  std::string suffix = name.substr(at + 1);
  for (char& ch : suffix) ch = char(std::tolower(static_cast<unsigned char>(ch)));
  for (const auto& [text, unit] : kSuffixes)
    if (suffix == text) return unit;
  return "";
}

std::string ramp_label(double value, const std::string& unit) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.3g", std::abs(value) < 5e-13 ? 0.0 : value);
  return unit.empty() ? std::string(buf) : std::string(buf) + " " + unit;
}

}  // namespace kith
