// The asking screens. Index:
//   [SECTION] fonts and textures
//   [SECTION] keys, clicks, large type
//   [SECTION] drawing: turn banner, people, pair, grid, own judgment, marks in the map
//   [SECTION] state for dumps
#include "viewer/panels/panel_asking.h"

#include <epoxy/gl.h>
#include <imgui.h>

#include <algorithm>
#include <cmath>
#include <filesystem>

namespace kith {

// ============================================================================ [SECTION] fonts and textures

namespace {
ImFont* g_medium = nullptr;  // ids on cards, large type
ImFont* g_big = nullptr;     // whose turn
ImFont* g_huge = nullptr;    // whose turn, in large type

ImU32 rgb32(uint32_t rgb, float alpha = 1.f) {
  return IM_COL32((rgb >> 16) & 255, (rgb >> 8) & 255, rgb & 255, int(alpha * 255.f));
}
ImU32 colour32(const Rgb& c, float alpha = 1.f) { return ImGui::ColorConvertFloat4ToU32(ImVec4(c.r, c.g, c.b, alpha)); }
ImFont* font_or_current(ImFont* f) { return f ? f : ImGui::GetFont(); }
}  // namespace

void AskingPanel::load_fonts(float scale) {
  ImGuiIO& io = ImGui::GetIO();
  const char* candidates[] = {"/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf",
                              "/usr/share/fonts/dejavu/DejaVuSans.ttf"};
  // Latin plus the arrows the key hints use.
  static const ImWchar kRanges[] = {0x0020, 0x00FF, 0x2190, 0x2193, 0};
  static const ImWchar kArrows[] = {0x2190, 0x2193, 0};
  for (const char* path : candidates) {
    std::error_code ec;
    if (std::filesystem::exists(path, ec)) {
      if (!io.Fonts->ConfigData.empty()) {  // the arrows into the normal UI font too
        ImFontConfig merge;
        merge.MergeMode = true;
        io.Fonts->AddFontFromFileTTF(path, io.Fonts->ConfigData.back().SizePixels, &merge, kArrows);
      }
      g_medium = io.Fonts->AddFontFromFileTTF(path, 24.f * scale, nullptr, kRanges);
      g_big = io.Fonts->AddFontFromFileTTF(path, 44.f * scale, nullptr, kRanges);
      g_huge = io.Fonts->AddFontFromFileTTF(path, 64.f * scale, nullptr, kRanges);
      return;
    }
  }
  ImFontConfig c;
  c.SizePixels = 24.f * scale;
  g_medium = io.Fonts->AddFontDefault(&c);
  c.SizePixels = 44.f * scale;
  g_big = io.Fonts->AddFontDefault(&c);
}

AskingPanel::AskingPanel(const Collection& collection, MapView& view, DeskLinks links,
                         const std::unordered_map<std::string, int>& index_of_id)
    : collection_(collection),
      view_(view),
      index_of_id_(index_of_id),
      desk_(std::make_unique<AskingDesk>(collection, std::move(links))) {}

AskingPanel::~AskingPanel() {
  for (auto& [item, t] : textures_)
    if (t.id) glDeleteTextures(1, &t.id);
}

const AskingPanel::Texture* AskingPanel::texture(int item) {
  if (collection_.pictures.empty() || item < 0 || size_t(item) >= collection_.pictures.size()) return nullptr;
  auto it = textures_.find(item);
  if (it == textures_.end()) {
    if (textures_.size() > 96) {  // keep GL memory small: start over
      for (auto& [i, t] : textures_)
        if (t.id) glDeleteTextures(1, &t.id);
      textures_.clear();
    }
    Texture t;
    Picture pic;
    // Question cards are drawn larger than map cards: up to 512 pixels a side.
    if (load_picture(collection_.pictures[size_t(item)], &pic, 512) && pic.width > 0 && pic.height > 0) {
      glGenTextures(1, &t.id);
      glBindTexture(GL_TEXTURE_2D, t.id);
      glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MIN_FILTER, GL_LINEAR);
      glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MAG_FILTER, GL_LINEAR);
      glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_S, GL_CLAMP_TO_EDGE);
      glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_T, GL_CLAMP_TO_EDGE);
      glPixelStorei(GL_UNPACK_ALIGNMENT, 1);
      glTexImage2D(GL_TEXTURE_2D, 0, GL_RGBA, pic.width, pic.height, 0, GL_RGBA, GL_UNSIGNED_BYTE, pic.rgba.data());
      t.width = pic.width;
      t.height = pic.height;
    }
    it = textures_.emplace(item, t).first;  // an unreadable picture is remembered as none
  }
  return it->second.id ? &it->second : nullptr;
}

// ============================================================================ [SECTION] keys, clicks, large type

bool AskingPanel::handle_key(int key, int mods) {
  const bool was = desk_->asking();
  if (!desk_->key(key, mods)) return false;
  if (!was && desk_->asking()) view_.selection_changed();
  return true;
}

void AskingPanel::click_item(int item) {
  const std::string e = desk_->own().add(item);
  panel_message_ = e.empty() ? "" : e;
}

void AskingPanel::apply_large_type() {
  const bool want = desk_->large_type();
  if (want == large_applied_) return;
  ImGuiIO& io = ImGui::GetIO();
  ViewOptions o = view_.options();
  if (want) {
    io.FontDefault = g_medium;
    ImGui::GetStyle().ScaleAllSizes(1.5f);
    normal_point_size_ = o.point_size;
    normal_card_size_ = o.card_size;
    o.point_size = (o.point_size > 0 ? o.point_size : (collection_.size() <= 2000 ? 10.f : 6.f)) * 1.8f;
    o.card_size = o.card_size * 1.6f;
  } else {
    io.FontDefault = nullptr;
    ImGui::GetStyle().ScaleAllSizes(1.f / 1.5f);
    o.point_size = normal_point_size_;
    o.card_size = normal_card_size_;
  }
  view_.set_options(o);
  large_applied_ = want;
}

float AskingPanel::band_height() const {
  if (!desk_->asking()) return 0.f;
  const float h = ImGui::GetIO().DisplaySize.y;
  const bool grid = desk_->mode() == AskingMode::kGrid;
  return std::floor(h * (grid ? 0.48f : 0.40f) * (desk_->large_type() ? 1.25f : 1.f));
}

// The map framed in the part of the window the question screens leave free: between the turn
// banner and the band, with room to spare.
void AskingPanel::frame_map() {
  const ImGuiIO& io = ImGui::GetIO();
  const float h = io.DisplaySize.y;
  if (h <= 0.f) return;
  const float top = desk_->large_type() ? 150.f : 100.f;
  const float free = std::max(80.f, h - band_height() - top);
  Camera& cam = view_.camera();
  view_.fit_all(true);
  cam.zoom(std::log(h / free) / std::log(0.88f));
  const float fb = float(cam.height()) / h;
  cam.pan(0.f, -(h * 0.5f - (top + h - band_height()) * 0.5f) * fb);
  last_frame_time_ = ImGui::GetTime();
}

bool AskingPanel::question_out_of_view() const {
  const ImGuiIO& io = ImGui::GetIO();
  const Camera& cam = view_.camera();
  const float fb = float(cam.height()) / std::max(1.f, io.DisplaySize.y);
  const float bottom = (io.DisplaySize.y - band_height()) * fb;
  const float top = (desk_->large_type() ? 150.f : 100.f) * fb;  // under the turn banner
  for (int i : desk_->question_items()) {
    if (size_t(i) >= view_.positions().size()) continue;
    const Projected p = cam.project(view_.positions()[size_t(i)]);
    if (!p.visible || p.screen.x < 0 || p.screen.x > cam.width() || p.screen.y < top || p.screen.y > bottom)
      return true;
  }
  return false;
}

// ============================================================================ [SECTION] drawing

void AskingPanel::draw(float top, float inv_scale) {
  apply_large_type();
  const AskingMode mode = desk_->mode();
  if (mode == AskingMode::kOff) return;
  // The map keeps growing and moving while people answer: keep the question's items in sight.
  if (desk_->asking() && ImGui::GetTime() - last_frame_time_ > 1.5 && !view_.camera().moving() &&
      question_out_of_view())
    frame_map();
  draw_map_marks(inv_scale);
  draw_turn_banner(top);
  if (mode == AskingMode::kOwn) {
    draw_own(top);
    return;
  }
  draw_people(top);
  if (mode == AskingMode::kPair) draw_pair();
  if (mode == AskingMode::kGrid) draw_grid();
}

void AskingPanel::draw_turn_banner(float top) {
  const ImGuiIO& io = ImGui::GetIO();
  const auto& people = desk_->flow().people();
  const int turn = desk_->flow().turn();
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x * 0.5f, top + 8), ImGuiCond_Always, ImVec2(0.5f, 0.f));
  ImGui::SetNextWindowBgAlpha(0.92f);
  ImGui::Begin("##turn", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings |
                   ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoNav | ImGuiWindowFlags_NoInputs);
  ImGui::PushFont(font_or_current(desk_->large_type() && g_huge ? g_huge : g_big));
  const float h = ImGui::GetTextLineHeight();
  if (turn >= 0) {
    const ImVec2 at = ImGui::GetCursorScreenPos();
    ImGui::GetWindowDrawList()->AddCircleFilled(ImVec2(at.x + h * 0.4f, at.y + h * 0.55f), h * 0.36f,
                                                rgb32(people[size_t(turn)].colour));
    ImGui::Dummy(ImVec2(h * 0.85f, h));
    ImGui::SameLine();
    ImGui::Text("%s's turn", people[size_t(turn)].name.c_str());
  } else {
    ImGui::TextUnformatted("nobody listed");
  }
  ImGui::PopFont();
  std::string line;
  const std::string next = desk_->next_name();
  const TurnRule rule = desk_->flow_options().turn_rule;
  if (!next.empty() && rule != TurnRule::kFacilitator) line += "next: " + next + "   ";
  line += std::to_string(desk_->answered()) + " answers, " + std::to_string(desk_->judgments_made()) + " judgments";
  // A re-asked question is not marked on screen: the answer would not measure consistency then.
  ImGui::TextDisabled("%s", line.c_str());
  ImGui::End();
}

void AskingPanel::draw_people(float top) {
  const float w = desk_->large_type() ? 380.f : 270.f;
  ImGui::SetNextWindowPos(ImVec2(10, top + 8), ImGuiCond_Always);
  ImGui::SetNextWindowSize(ImVec2(w, 0), ImGuiCond_Always);
  ImGui::SetNextWindowBgAlpha(0.92f);
  if (!ImGui::Begin("People", nullptr,
                    ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoFocusOnAppearing |
                        ImGuiWindowFlags_NoResize)) {
    ImGui::End();
    return;
  }
  const auto& people = desk_->flow().people();
  const int turn = desk_->flow().turn();
  for (size_t p = 0; p < people.size(); ++p) {
    ImGui::PushID(int(p));
    const uint32_t c = people[p].colour;
    float rgb[3] = {((c >> 16) & 255) / 255.f, ((c >> 8) & 255) / 255.f, (c & 255) / 255.f};
    if (ImGui::ColorEdit3("##colour", rgb, ImGuiColorEditFlags_NoInputs | ImGuiColorEditFlags_NoLabel)) {
      const uint32_t nc = (uint32_t(std::lround(rgb[0] * 255)) << 16) | (uint32_t(std::lround(rgb[1] * 255)) << 8) |
                          uint32_t(std::lround(rgb[2] * 255));
      panel_message_ = desk_->set_colour(int(p), nc);
    }
    ImGui::SameLine();
    if (editing_ == int(p)) {
      ImGui::SetNextItemWidth(-1);
      ImGui::SetKeyboardFocusHere();
      if (ImGui::InputText("##rename", edit_name_, sizeof edit_name_, ImGuiInputTextFlags_EnterReturnsTrue)) {
        panel_message_ = desk_->rename_person(int(p), edit_name_);
        editing_ = -1;
      }
      if (ImGui::IsItemDeactivated() && !ImGui::IsItemDeactivatedAfterEdit()) editing_ = -1;
    } else {
      if (ImGui::Selectable(people[p].name.c_str(), int(p) == turn, ImGuiSelectableFlags_AllowDoubleClick)) {
        if (ImGui::IsMouseDoubleClicked(0)) {
          editing_ = int(p);
          std::snprintf(edit_name_, sizeof edit_name_, "%s", people[p].name.c_str());
        } else {
          panel_message_ = desk_->set_turn(int(p));
        }
      }
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("click: their turn now; double-click: rename");
    }
    ImGui::PopID();
  }
  ImGui::SetNextItemWidth(w - 90);
  bool add = ImGui::InputTextWithHint("##new", "name or pseudonym", new_name_, sizeof new_name_,
                                      ImGuiInputTextFlags_EnterReturnsTrue);
  ImGui::SameLine();
  add |= ImGui::Button("add");
  if (add) {
    const uint32_t colour = Palette::person_colour(people.size());
    panel_message_ = desk_->add_person(new_name_, colour);
    if (panel_message_.empty()) new_name_[0] = 0;
  }
  if (!panel_message_.empty()) ImGui::TextWrapped("%s", panel_message_.c_str());
  if (ImGui::TreeNode("turns and questions")) {
    QuestionFlowOptions o = desk_->flow_options();
    bool changed = false;
    int rule = int(o.turn_rule);
    ImGui::SetNextItemWidth(w * 0.5f);
    changed |= ImGui::Combo("turns", &rule, "after each answer\0after every n\0facilitator (W)\0");
    o.turn_rule = TurnRule(rule);
    if (o.turn_rule == TurnRule::kEveryN) {
      ImGui::SetNextItemWidth(w * 0.5f);
      changed |= ImGui::SliderInt("n", &o.turn_every, 1, 20);
    }
    int choice = int(desk_->picker_choice());
    ImGui::SetNextItemWidth(w * 0.5f);
    if (ImGui::Combo("picker", &choice, "most informative\0random\0about the selection\0"))
      desk_->set_picker_choice(PickerChoice(choice));
    float reask = float(o.reask_rate * 100.0);
    ImGui::SetNextItemWidth(w * 0.5f);
    if (ImGui::SliderFloat("re-ask", &reask, 0.f, 50.f, "%.0f %%")) o.reask_rate = reask / 100.0, changed = true;
    ImGui::SetNextItemWidth(w * 0.5f);
    changed |= ImGui::SliderInt("grid N", &o.grid_size, 3, 9);
    ImGui::SetNextItemWidth(w * 0.5f);
    changed |= ImGui::SliderInt("pick K", &o.grid_choose, 1, std::max(1, o.grid_size - 1));
    o.grid_choose = std::clamp(o.grid_choose, 1, std::max(1, o.grid_size - 1));
    if (changed) {
      std::string e;
      if (o.IsValid(&e))
        desk_->set_flow_options(o);
      else
        panel_message_ = e;
    }
    ImGui::TreePop();
  }
  ImGui::End();
}

void AskingPanel::card(int item, float side, const char* key_label, bool picked, uint32_t frame_rgb) {
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const ImVec2 at = ImGui::GetCursorScreenPos();
  const float pad = 6.f, caption = ImGui::GetTextLineHeightWithSpacing() * 1.1f;
  const ImVec2 end(at.x + side, at.y + side + caption);
  const ImU32 ground = ImGui::GetColorU32(ImGuiCol_FrameBg);
  dl->AddRectFilled(at, end, ground, 8.f);
  const Rgb col = view_.colour_of(item);
  const ImVec2 pic0(at.x + pad, at.y + pad), pic1(at.x + side - pad, at.y + side - pad);
  dl->PushClipRect(at, end, true);
  if (const Texture* t = texture(item)) {
    const float box = side - 2 * pad;
    const float s = box / float(std::max(t->width, t->height));
    const float w = t->width * s, h = t->height * s;
    const ImVec2 p0(pic0.x + (box - w) * 0.5f, pic0.y + (box - h) * 0.5f);
    dl->AddImage(ImTextureID(intptr_t(t->id)), p0, ImVec2(p0.x + w, p0.y + h));
  } else {
    // No picture: a swatch of the item's map colour, its id and tags.
    dl->AddRectFilled(pic0, pic1, colour32(col, 0.18f), 6.f);
    const float r = side * 0.16f;
    const ImVec2 c(at.x + side * 0.5f, pic0.y + r + side * 0.08f);
    dl->AddCircleFilled(c, r, colour32(col), 32);
    ImFont* f = font_or_current(g_medium);
    const float fs = std::min(f->FontSize, side * 0.14f);
    float y = c.y + r + side * 0.05f;
    const std::string& id = collection_.ids[size_t(item)];
    const ImVec2 ts = f->CalcTextSizeA(fs, FLT_MAX, 0.f, id.c_str());
    dl->AddText(f, fs, ImVec2(at.x + std::max(pad, (side - ts.x) * 0.5f), y), ImGui::GetColorU32(ImGuiCol_Text),
                id.c_str());
    y += fs * 1.2f;
    const float small = ImGui::GetFontSize();
    for (const auto& tag : collection_.tags) {
      if (y + small > pic1.y) break;
      if (size_t(item) >= tag.values.size() || tag.values[size_t(item)].empty()) continue;
      std::string line = tag.name + ": " + tag.values[size_t(item)];
      if (ImGui::CalcTextSize(line.c_str()).x > side - 2 * pad) line = tag.values[size_t(item)];  // the value alone
      const ImVec2 ls = ImGui::CalcTextSize(line.c_str());
      if (ls.x > side - 2 * pad) continue;  // never a clipped word
      dl->AddText(ImVec2(at.x + std::max(pad, (side - ls.x) * 0.5f), y), ImGui::GetColorU32(ImGuiCol_TextDisabled),
                  line.c_str());
      y += small * 1.15f;
    }
  }
  // Caption: the key, and the id (when the picture shows instead of it).
  std::string text = key_label ? std::string(key_label) : std::string();
  if (!collection_.pictures.empty()) {
    const std::string with_id = text + (text.empty() ? "" : "   ") + collection_.ids[size_t(item)];
    if (text.empty() || ImGui::CalcTextSize(with_id.c_str()).x <= side - 2 * pad)
      text = with_id;  // the key matters more
  }
  if (!text.empty()) {
    const ImVec2 ts = ImGui::CalcTextSize(text.c_str());
    dl->AddText(ImVec2(at.x + std::max(pad, (side - ts.x) * 0.5f), at.y + side + 1), ImGui::GetColorU32(ImGuiCol_Text),
                text.c_str());
  }
  dl->PopClipRect();
  // Frame: the map colour; thick in the person's colour when picked.
  if (picked)
    dl->AddRect(ImVec2(at.x - 3, at.y - 3), ImVec2(end.x + 3, end.y + 3), rgb32(frame_rgb), 10.f, 0, 6.f);
  else
    dl->AddRect(at, end, colour32(col, 0.9f), 8.f, 0, 2.f);
  ImGui::Dummy(ImVec2(side, side + caption));
}

namespace {
bool begin_band(float height) {
  const ImGuiIO& io = ImGui::GetIO();
  ImGui::SetNextWindowPos(ImVec2(0, io.DisplaySize.y - height), ImGuiCond_Always);
  ImGui::SetNextWindowSize(ImVec2(io.DisplaySize.x, height), ImGuiCond_Always);
  ImGui::SetNextWindowBgAlpha(0.95f);
  return ImGui::Begin("##question", nullptr,
                      ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoMove |
                          ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoNav |
                          ImGuiWindowFlags_NoBringToFrontOnFocus);
}
void centred_text(const char* text, float x0, float width, ImFont* font = nullptr) {
  if (font) ImGui::PushFont(font);
  const float w = ImGui::CalcTextSize(text).x;
  ImGui::SetCursorScreenPos(ImVec2(x0 + std::max(0.f, (width - w) * 0.5f), ImGui::GetCursorScreenPos().y));
  ImGui::TextUnformatted(text);
  if (font) ImGui::PopFont();
}
void no_question(const char* why) {
  ImGui::Dummy(ImVec2(1, 30));
  centred_text(why, 0, ImGui::GetIO().DisplaySize.x, g_medium);
}
// The band's vertical measures: a text line, the heading, the key line at the foot, a caption.
struct BandLines {
  float line, title_h, foot_h, caption;
};
BandLines band_lines() {
  const float line = ImGui::GetTextLineHeightWithSpacing();
  const float medium = g_medium ? g_medium->FontSize : line;
  return {line, medium * 1.3f, line * 1.6f, line * 1.1f};
}
}  // namespace

void AskingPanel::draw_pair() {
  const float band = band_height();
  if (!begin_band(band)) return ImGui::End();
  const Question& q = desk_->question();
  if (q.anchor < 0 || q.kind != QuestionKind::kPair || q.candidates.size() != 2) {
    no_question("waiting for the map to offer a question...");
    return ImGui::End();
  }
  const Question shown = q;
  const ImGuiIO& io = ImGui::GetIO();
  const auto [line, title_h, foot_h, caption] = band_lines();
  const float anchor_side = std::max(60.f, band - title_h - foot_h - caption - 24.f);
  const float side = std::floor(anchor_side * 0.82f);
  const float gap = std::max(40.f, io.DisplaySize.x * 0.06f);
  const float total = anchor_side + 2 * side + 2 * gap;
  const float x0 = std::floor((io.DisplaySize.x - total) * 0.5f);
  const float y0 = ImGui::GetCursorScreenPos().y;
  centred_text("Which is more like the one in the middle?", 0, io.DisplaySize.x, g_medium);
  const float cards_y = y0 + title_h;
  const float cand_y = cards_y + (anchor_side - side) * 0.5f;
  const uint32_t who =
      desk_->flow().turn() >= 0 ? desk_->flow().people()[size_t(desk_->flow().turn())].colour : 0x0072B2;
  ImGui::SetCursorScreenPos(ImVec2(x0, cand_y));
  card(shown.candidates[0], side, "\xe2\x86\x90  or 1", false, who);
  ImGui::SetCursorScreenPos(ImVec2(x0 + side + gap, cards_y));
  card(shown.anchor, anchor_side, nullptr, true, who);
  ImGui::SetCursorScreenPos(ImVec2(x0 + side + gap + anchor_side + gap, cand_y));
  card(shown.candidates[1], side, "\xe2\x86\x92  or 2", false, who);
  ImGui::SetCursorScreenPos(ImVec2(0, io.DisplaySize.y - foot_h));
  centred_text(
      "\xe2\x86\x90 / \xe2\x86\x92  closer      \xe2\x86\x93 or 0  can't tell      Backspace  undo      "
      "W  next person      A  grid questions      Esc  stop",
      0, io.DisplaySize.x);
  ImGui::End();
}

void AskingPanel::draw_grid() {
  const float band = band_height();
  if (!begin_band(band)) return ImGui::End();
  const Question& q = desk_->question();
  if (q.anchor < 0 || q.kind != QuestionKind::kGrid) {
    no_question("waiting for the map to offer a question...");
    return ImGui::End();
  }
  const Question shown = q;
  const ImGuiIO& io = ImGui::GetIO();
  const auto [line, title_h, foot_h, caption] = band_lines();
  const int n = int(shown.candidates.size());
  const int cols = n <= 4 ? n : (n + 1) / 2, rows = n <= 4 ? 1 : 2;
  const float avail_h = band - title_h - foot_h - 16.f;
  const float gap = 14.f;
  const float side = std::max(40.f, std::floor(std::min((avail_h - rows * caption - (rows - 1) * gap) / rows,
                                                        (io.DisplaySize.x * 0.72f - (cols - 1) * gap) / cols)));
  const float anchor_side = std::min(avail_h - caption, side * 1.5f);
  const float total = anchor_side + 40.f + cols * side + (cols - 1) * gap;
  const float x0 = std::floor((io.DisplaySize.x - total) * 0.5f);
  const float y0 = ImGui::GetCursorScreenPos().y;
  const std::string title = "Pick the " + std::to_string(shown.choose) + " most like the one on the left";
  centred_text(title.c_str(), 0, io.DisplaySize.x, g_medium);
  const float cards_y = y0 + title_h;
  const uint32_t who =
      desk_->flow().turn() >= 0 ? desk_->flow().people()[size_t(desk_->flow().turn())].colour : 0x0072B2;
  ImGui::SetCursorScreenPos(ImVec2(x0, cards_y + (avail_h - anchor_side - caption) * 0.5f));
  card(shown.anchor, anchor_side, nullptr, true, who);
  const auto& picks = desk_->grid_picks();
  for (int k = 0; k < n; ++k) {
    const int r = k / cols, c = k % cols;
    ImGui::SetCursorScreenPos(ImVec2(x0 + anchor_side + 40.f + c * (side + gap), cards_y + r * (side + caption + gap)));
    const std::string key = std::to_string(k + 1);
    const bool picked = std::find(picks.begin(), picks.end(), k) != picks.end();
    card(shown.candidates[size_t(k)], side, key.c_str(), picked, who);
  }
  ImGui::SetCursorScreenPos(ImVec2(0, io.DisplaySize.y - foot_h));
  const std::string foot = "1.." + std::to_string(n) +
                           "  pick / unpick      0  can't tell      Backspace  undo      "
                           "W  next person      A  pair questions      Esc  stop";
  centred_text(foot.c_str(), 0, io.DisplaySize.x);
  ImGui::End();
}

void AskingPanel::draw_own(float top) {
  const ImGuiIO& io = ImGui::GetIO();
  ImGui::SetNextWindowPos(ImVec2(io.DisplaySize.x * 0.5f, io.DisplaySize.y - 10), ImGuiCond_Always, ImVec2(0.5f, 1.f));
  ImGui::SetNextWindowBgAlpha(0.95f);
  ImGui::Begin("Your own judgment", nullptr,
               ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoMove |
                   ImGuiWindowFlags_NoCollapse);
  (void)top;
  OwnDraft& d = desk_->own();
  const char* names[3] = {"this one", "is more like", "than"};
  for (int s = 0; s < 3; ++s) {
    if (s) ImGui::SameLine(0, 24);
    const int item = d.slots()[size_t(s)];
    ImGui::BeginGroup();
    ImGui::TextDisabled("%s", names[s]);
    ImGui::PushFont(font_or_current(g_medium));
    if (item >= 0) {
      const Rgb col = view_.colour_of(item);
      const ImVec2 at = ImGui::GetCursorScreenPos();
      const float h = ImGui::GetTextLineHeight();
      ImGui::GetWindowDrawList()->AddCircleFilled(ImVec2(at.x + h * 0.35f, at.y + h * 0.55f), h * 0.3f, colour32(col));
      ImGui::Dummy(ImVec2(h * 0.75f, h));
      ImGui::SameLine();
      ImGui::TextUnformatted(collection_.ids[size_t(item)].c_str());
    } else {
      ImGui::TextDisabled(s == d.filled() ? "click an item" : "...");
    }
    ImGui::PopFont();
    ImGui::EndGroup();
  }
  ImGui::SetNextItemWidth(420);
  struct Ctx {
    const Collection* c;
  } ctx{&collection_};
  auto complete = [](ImGuiInputTextCallbackData* data) -> int {
    const Ctx* cx = static_cast<const Ctx*>(data->UserData);
    const std::string line(data->Buf, size_t(data->BufTextLen));
    const auto hits = complete_id(cx->c->ids, line, 1);
    if (!hits.empty()) {
      const std::string out = apply_completion(line, hits[0]);
      data->DeleteChars(0, data->BufTextLen);
      data->InsertChars(0, out.c_str());
    }
    return 0;
  };
  if (ImGui::InputTextWithHint(
          "##ownline", "or type ids: anchor nearer farther  (Tab completes)", own_line_, sizeof own_line_,
          ImGuiInputTextFlags_EnterReturnsTrue | ImGuiInputTextFlags_CallbackCompletion, complete, &ctx)) {
    std::array<int, 3> items{};
    const std::string e = parse_own_line(own_line_, index_of_id_, &items);
    if (!e.empty()) {
      panel_message_ = e;
    } else {
      d.clear();
      for (int i : items) d.add(i);
      panel_message_ = desk_->commit_own();
      if (d.filled() == 0) own_line_[0] = 0;
    }
  }
  const auto hits = complete_id(collection_.ids, own_line_, 6);
  if (!hits.empty()) {
    for (size_t k = 0; k < hits.size(); ++k) {
      if (k) ImGui::SameLine();
      if (ImGui::SmallButton(hits[k].c_str())) {
        const std::string out = apply_completion(own_line_, hits[k]);
        std::snprintf(own_line_, sizeof own_line_, "%s", out.c_str());
      }
    }
  }
  ImGui::TextDisabled("Enter  store      Backspace  clear the last (or take back the last stored)      Esc  leave");
  if (!panel_message_.empty()) ImGui::TextWrapped("%s", panel_message_.c_str());
  ImGui::End();
}

void AskingPanel::draw_map_marks(float inv_scale) {
  std::vector<int> items;
  const uint32_t who =
      desk_->flow().turn() >= 0 ? desk_->flow().people()[size_t(desk_->flow().turn())].colour : 0x0072B2;
  if (desk_->mode() == AskingMode::kOwn) {
    for (int i : desk_->own().slots())
      if (i >= 0) items.push_back(i);
  } else {
    items = desk_->question_items();
  }
  if (items.empty()) return;
  ImDrawList* dl = ImGui::GetBackgroundDrawList();
  const auto& pos = view_.positions();
  auto at = [&](int i) -> ImVec2 {
    const Projected p = view_.camera().project(pos[size_t(i)]);
    return ImVec2(p.screen.x * inv_scale, p.screen.y * inv_scale);
  };
  for (int i : items)
    if (size_t(i) >= pos.size()) return;
  auto shown = [&](int i) { return view_.camera().project(pos[size_t(i)]).visible; };
  const ImVec2 a = at(items[0]);
  for (size_t k = 1; k < items.size(); ++k)
    if (shown(items[0]) && shown(items[k])) dl->AddLine(a, at(items[k]), rgb32(who, 0.45f), 2.f);
  const float r = desk_->large_type() ? 16.f : 11.f;
  const ImU32 ink = ImGui::GetColorU32(ImGuiCol_Text);
  for (size_t k = 0; k < items.size(); ++k) {
    if (!shown(items[k])) continue;
    const ImVec2 p = at(items[k]);
    dl->AddCircle(p, k == 0 ? r * 1.4f : r, rgb32(who), 24, k == 0 ? 4.f : 2.5f);
    std::string label;
    if (desk_->mode() == AskingMode::kOwn)
      label = k == 0 ? "this" : k == 1 ? "nearer" : "farther";
    else if (k == 0)
      label = "anchor";
    else if (desk_->mode() == AskingMode::kPair)
      label = k == 1 ? "left" : "right";
    else
      label = std::to_string(k);
    dl->AddText(ImVec2(p.x + r + 4, p.y - r - 4), ink, label.c_str());
  }
}

// ============================================================================ [SECTION] state for dumps

nlohmann::json AskingPanel::state() {
  using nlohmann::json;
  json j;
  const AskingMode m = desk_->mode();
  j["mode"] = m == AskingMode::kOff ? "off" : m == AskingMode::kPair ? "pair" : m == AskingMode::kGrid ? "grid" : "own";
  j["turn"] = desk_->turn_name();
  j["large_type"] = desk_->large_type();
  json people = json::array();
  for (const Person& p : desk_->flow().people()) people.push_back({{"name", p.name}, {"colour", colour_hex(p.colour)}});
  j["people"] = people;
  auto ids = [&](const std::vector<int32_t>& v) {
    json a = json::array();
    for (int32_t i : v) a.push_back(collection_.ids[size_t(i)]);
    return a;
  };
  if (desk_->asking()) {
    const Question& q = desk_->question();
    if (q.anchor >= 0)
      j["question"] = {{"kind", q.kind == QuestionKind::kPair ? "pair" : "grid"},
                       {"anchor", collection_.ids[size_t(q.anchor)]},
                       {"candidates", ids(q.candidates)},
                       {"choose", q.choose},
                       {"reask", q.reask}};
    j["picks"] = desk_->grid_picks();
  }
  json answers = json::array();
  for (const Answer& a : desk_->flow().answers()) {
    json js = json::array();
    for (const Judgment& t : a.judgments)
      js.push_back({{"id", t.id},
                    {"anchor", collection_.ids[size_t(t.anchor)]},
                    {"nearer", collection_.ids[size_t(t.nearer)]},
                    {"farther", collection_.ids[size_t(t.farther)]},
                    {"person", t.person}});
    answers.push_back({{"person", a.person >= 0 ? desk_->flow().people()[size_t(a.person)].name : ""},
                       {"cant_tell", a.cant_tell},
                       {"undone", a.undone},
                       {"reask", a.question.reask},
                       {"chosen", ids(a.chosen)},
                       {"judgments", js}});
  }
  j["answers"] = answers;
  json own = json::array();
  for (int i : desk_->own().slots()) own.push_back(i >= 0 ? json(collection_.ids[size_t(i)]) : json(nullptr));
  j["own"] = own;
  j["message"] = desk_->message();
  return j;
}

}  // namespace kith
