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
#include <iterator>

#include "viewer/panels/ui_style.h"
#include "viewer/scene/text_fit.h"

namespace kith {

// ============================================================================ [SECTION] fonts and textures

namespace {
ImFont* g_medium = nullptr;  // ids on cards, large type
ImFont* g_big = nullptr;     // whose turn
ImFont* g_huge = nullptr;    // whose turn, in large type

ImU32 rgb32(uint32_t rgb, float alpha = 1.f) {
  return IM_COL32((rgb >> 16) & 255, (rgb >> 8) & 255, rgb & 255, int(alpha * 255.f));
}
ImFont* font_or_current(ImFont* f) { return f ? f : ImGui::GetFont(); }
}  // namespace

void AskingPanel::load_fonts(float scale) {
  ImGuiIO& io = ImGui::GetIO();
  const char* candidates[] = {"/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf",
                              "/usr/share/fonts/dejavu/DejaVuSans.ttf"};
  // Latin plus the ellipsis of shortened text and the arrows the key hints use.
  static const ImWchar kRanges[] = {0x0020, 0x00FF, 0x2026, 0x2026, 0x2190, 0x2193, 0};
  static const ImWchar kArrows[] = {0x2026, 0x2026, 0x2190, 0x2193, 0};
  for (const char* path : candidates) {
    std::error_code ec;
    if (std::filesystem::exists(path, ec)) {
      if (!io.Fonts->ConfigData.empty()) {  // the ellipsis and the arrows into the normal UI font too
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
    // Question cards are drawn larger than the map's pictures: up to 512 pixels a side.
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
  return run(asking_key_action(desk_->mode(), key, mods, desk_->flow_options().grid_size));
}

bool AskingPanel::run(KeyAction a) {
  const bool was = desk_->asking();
  if (!desk_->act(a)) return false;
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
    normal_picture_size_ = o.picture_size;
    o.point_size = (o.point_size > 0 ? o.point_size : (collection_.size() <= 2000 ? 10.f : 6.f)) * 1.8f;
    o.picture_size = std::min(view_.picture_size() * 1.6f, 160.f);
  } else {
    io.FontDefault = nullptr;
    ImGui::GetStyle().ScaleAllSizes(1.f / 1.5f);
    o.point_size = normal_point_size_;
    o.picture_size = normal_picture_size_;
  }
  view_.set_options(o);
  large_applied_ = want;
  if (desk_->asking()) {  // the band's height changed: frame the map in what it leaves (next frame's banner)
    banner_rect_ = {};
    frame_map();
  }
}

float AskingPanel::band_height() const {
  if (!desk_->asking()) return 0.f;
  const float h = ImGui::GetIO().DisplaySize.y;
  const bool grid = desk_->mode() == AskingMode::kGrid;
  // Big type on a short screen gives the band more of it: the question matters more than the map.
  const float large = h < 720.f ? (grid ? 1.3f : 1.45f) : 1.25f;
  return std::floor(h * (grid ? 0.48f : 0.40f) * (desk_->large_type() ? large : 1.f));
}

// The map framed in the part of the window the question screens leave free: between the turn
// banner and the band, with room to spare.
void AskingPanel::frame_map() {
  const ImGuiIO& io = ImGui::GetIO();
  const float h = io.DisplaySize.y;
  if (h <= 0.f) return;
  const float top = map_top();
  const float free = std::max(80.f, h - band_height() - top);
  Camera& cam = view_.camera();
  view_.fit_all(true);
  cam.zoom(std::log(h / free) / std::log(0.88f));
  const float fb = float(cam.height()) / h;
  cam.pan(0.f, -(h * 0.5f - (top + h - band_height()) * 0.5f) * fb);
  last_frame_time_ = ImGui::GetTime();
}

// The top of the map's free part: under the turn banner (as drawn last), else a guess.
float AskingPanel::map_top() const {
  if (banner_rect_.y1 > 0.f) return banner_rect_.y1 + 8.f;
  return desk_->large_type() ? 150.f : 100.f;
}

bool AskingPanel::question_out_of_view() const {
  const ImGuiIO& io = ImGui::GetIO();
  const Camera& cam = view_.camera();
  const float fb = float(cam.height()) / std::max(1.f, io.DisplaySize.y);
  const float bottom = (io.DisplaySize.y - band_height()) * fb;
  const float top = map_top() * fb;  // under the turn banner
  for (int i : desk_->question_items()) {
    if (size_t(i) >= view_.positions().size()) continue;
    const Projected p = cam.project(view_.positions()[size_t(i)]);
    if (!p.visible || p.screen.x < 0 || p.screen.x > cam.width() || p.screen.y < top || p.screen.y > bottom)
      return true;
  }
  return false;
}

// ============================================================================ [SECTION] drawing

namespace {
ImVec4 v4(uint32_t rgb, float alpha = 1.f) { return ImGui::ColorConvertU32ToFloat4(rgb32(rgb, alpha)); }
ScreenRect rect_of(ImVec2 a, ImVec2 b) { return {a.x, a.y, b.x, b.y}; }
ScreenRect window_rect() {
  const ImVec2 p = ImGui::GetWindowPos(), s = ImGui::GetWindowSize();
  return {p.x, p.y, p.x + s.x, p.y + s.y};
}
ScreenRect screen_rect() { return {0.f, 0.f, ImGui::GetIO().DisplaySize.x, ImGui::GetIO().DisplaySize.y}; }

// The widget library's colours replaced by the question screens' table while they are drawn, so
// every widget there (panel, text boxes, buttons, rows, tooltips, pop-ups) draws one of its pairs.
int push_look(const QuestionLook& l) {
  const std::pair<ImGuiCol, uint32_t> parts[] = {
      {ImGuiCol_Text, l.ink},
      {ImGuiCol_TextDisabled, l.quiet},
      {ImGuiCol_WindowBg, l.band},
      {ImGuiCol_PopupBg, l.band},
      {ImGuiCol_Border, l.edge},
      {ImGuiCol_FrameBg, l.field},
      {ImGuiCol_FrameBgHovered, l.field_hover},
      {ImGuiCol_FrameBgActive, l.field_active},
      {ImGuiCol_TitleBg, l.title},
      {ImGuiCol_TitleBgActive, l.title},
      {ImGuiCol_TitleBgCollapsed, l.title},
      {ImGuiCol_Button, l.button},
      {ImGuiCol_ButtonHovered, l.button_hover},
      {ImGuiCol_ButtonActive, l.button_active},
      {ImGuiCol_Header, l.chosen},
      {ImGuiCol_HeaderHovered, l.chosen_hover},
      {ImGuiCol_HeaderActive, l.chosen_hover},
      {ImGuiCol_TextSelectedBg, l.field_active},
      {ImGuiCol_ScrollbarBg, l.band},
      {ImGuiCol_ScrollbarGrab, l.edge},
      {ImGuiCol_SliderGrab, l.edge},
      {ImGuiCol_SliderGrabActive, l.ink},
      {ImGuiCol_CheckMark, l.ink},
      {ImGuiCol_Separator, l.edge},
  };
  for (const auto& [part, rgb] : parts) ImGui::PushStyleColor(part, v4(rgb));
  ImGui::PushStyleColor(ImGuiCol_ChildBg, v4(l.band, 0.f));  // a child shows the band through
  return int(std::size(parts)) + 1;
}

// A text's width in FONT at SIZE, for fit_text.
std::function<float(const std::string&)> width_in(ImFont* font, float size) {
  return [font, size](const std::string& t) { return font->CalcTextSizeA(size, FLT_MAX, 0.f, t.c_str()).x; };
}
}  // namespace

void AskingPanel::note_text(const char* role, const std::string& text, const std::string& full, const ScreenRect& rect,
                            const ScreenRect& box) {
  texts_.push_back({role, text, full, rect, box});
}
void AskingPanel::note_region(const char* name, const ScreenRect& rect) { regions_.push_back({name, rect}); }

int AskingPanel::push_colours() {
  look_ = QuestionLook::for_ground(view_.options().dark);
  return push_look(look_);
}

void AskingPanel::set_status(const std::string& message, const std::string& notice, std::function<void()> dismiss) {
  status_message_ = message;
  status_notice_ = notice;
  dismiss_notice_ = std::move(dismiss);
}

void AskingPanel::act(KeyAction a) {
  if (on_action) on_action(a);
  else run(a);
}

std::string AskingPanel::caption_of(int item) const {
  if (caption_ >= 0 && size_t(caption_) < collection_.tags.size()) {
    const auto& v = collection_.tags[size_t(caption_)].values;
    if (size_t(item) < v.size() && !v[size_t(item)].empty()) return v[size_t(item)];
  }
  return collection_.ids[size_t(item)];
}

void AskingPanel::draw(float top, float inv_scale) {
  apply_large_type();
  const AskingMode mode = desk_->mode();
  texts_.clear();
  regions_.clear();
  labels_.clear();
  if (mode == AskingMode::kOff) {
    texts_drawn_.clear();
    regions_drawn_.clear();
    return;
  }
  const int pushed = push_colours();
  // The map keeps growing and moving while people answer: keep the question's items in sight.
  if (desk_->asking() && ImGui::GetTime() - last_frame_time_ > 1.5 && !view_.camera().moving() &&
      question_out_of_view())
    frame_map();
  if (mode == AskingMode::kOwn) {
    if (desk_->flow().turn() >= 0) draw_turn_banner(top);  // whose judgment it is, when anyone is listed
    draw_own(top);
  } else {
    draw_people(top);
    draw_turn_banner(top);
    if (mode == AskingMode::kPair) draw_pair();
    if (mode == AskingMode::kGrid) draw_grid();
  }
  draw_map_marks(inv_scale, top);
  ImGui::PopStyleColor(pushed);
  texts_drawn_ = texts_;
  regions_drawn_ = regions_;
}

// Whose turn, large, centred in the part of the top the people panel leaves free.
void AskingPanel::draw_turn_banner(float top) {
  const ImGuiIO& io = ImGui::GetIO();
  const auto& people = desk_->flow().people();
  const int turn = desk_->flow().turn();
  const float x0 = desk_->mode() == AskingMode::kOwn ? 10.f : people_rect_.x1 + 10.f;
  const float free = std::max(120.f, io.DisplaySize.x - 10.f - x0);
  ImGui::SetNextWindowPos(ImVec2(x0 + free * 0.5f, top + 8), ImGuiCond_Always, ImVec2(0.5f, 0.f));
  ImGui::SetNextWindowBgAlpha(1.f);
  ImGui::SetNextWindowSizeConstraints(ImVec2(0, 0), ImVec2(free, FLT_MAX));
  ImGui::Begin("##turn", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings |
                   ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoNav | ImGuiWindowFlags_NoInputs);
  const ImGuiStyle& style = ImGui::GetStyle();
  const float inner = free - 2 * style.WindowPadding.x;
  const bool short_screen = io.DisplaySize.y < 720.f;  // the huge font would leave the map no room
  ImFont* big = font_or_current(desk_->large_type() && g_huge && !short_screen ? g_huge : g_big);
  ImGui::PushFont(big);
  const float h = ImGui::GetTextLineHeight();
  if (turn >= 0) {
    const ImVec2 at = ImGui::GetCursorScreenPos();
    ImGui::GetWindowDrawList()->AddCircleFilled(ImVec2(at.x + h * 0.4f, at.y + h * 0.55f), h * 0.36f,
                                                rgb32(people[size_t(turn)].colour));
    ImGui::Dummy(ImVec2(h * 0.85f, h));
    ImGui::SameLine();
    const std::string full = people[size_t(turn)].name + "'s turn";
    const std::string text = fit_text(full, inner - h * 0.85f - style.ItemSpacing.x, width_in(big, big->FontSize));
    const ImVec2 p = ImGui::GetCursorScreenPos();
    ImGui::TextUnformatted(text.c_str());
    note_text("turn", text, full, rect_of(p, ImVec2(p.x + ImGui::CalcTextSize(text.c_str()).x, p.y + h)), screen_rect());
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
  const std::string counts = fit_text(line, inner, width_in(ImGui::GetFont(), ImGui::GetFontSize()));
  const ImVec2 p = ImGui::GetCursorScreenPos();
  ImGui::TextDisabled("%s", counts.c_str());
  note_text("counts", counts, line, rect_of(p, ImVec2(p.x + ImGui::CalcTextSize(counts.c_str()).x, p.y + ImGui::GetTextLineHeight())),
            screen_rect());
  banner_rect_ = window_rect();
  note_region("banner", banner_rect_);
  ImGui::End();
}

namespace {
// A whole-number setting on kith's slider (value beside it); true when it changed.
bool int_slider(const char* label, int* value, int lo, int hi) {
  float v = float(*value);
  if (!value_slider(label, &v, float(lo), float(hi), "%.0f").changed) return false;
  const int now = std::clamp(int(std::lround(v)), lo, hi);
  const bool changed = now != *value;
  *value = now;
  return changed;
}
}  // namespace

void AskingPanel::draw_people(float top) {
  const ImGuiIO& io = ImGui::GetIO();
  const float w = desk_->large_type() ? 360.f : 260.f;
  ImGui::SetNextWindowPos(ImVec2(10, top + 8), ImGuiCond_Always);
  // Never down into the band: the list scrolls instead.
  const float most = std::max(80.f, io.DisplaySize.y - band_height() - top - 18.f);
  ImGui::SetNextWindowSize(ImVec2(w, 0), ImGuiCond_Always);
  ImGui::SetNextWindowSizeConstraints(ImVec2(w, 0), ImVec2(w, most));
  ImGui::SetNextWindowBgAlpha(1.f);
  const bool open = ImGui::Begin("People", nullptr,
                                 ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_NoSavedSettings |
                                     ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoFocusOnAppearing |
                                     ImGuiWindowFlags_NoResize | ImGuiWindowFlags_NoCollapse);
  panel_heading("People", nullptr);
  people_rect_ = window_rect();
  note_region("people", people_rect_);
  if (!open) return ImGui::End();
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
  // The box takes what the "add" button leaves (less when the panel scrolls).
  const ImGuiStyle& style = ImGui::GetStyle();
  ImGui::SetNextItemWidth(ImGui::GetContentRegionAvail().x - ImGui::CalcTextSize("add").x -
                          2 * style.FramePadding.x - style.ItemSpacing.x);
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
  // Big type is the facilitator's choice, here rather than among the answer buttons.
  if (bool big = desk_->large_type(); chip("big type  (B)", &big)) act({AskingAction::kLargeType});
  if (!collection_.tags.empty()) {  // what the cards show under (or instead of) the picture
    const std::string now = caption_ >= 0 ? collection_.tags[size_t(caption_)].name : "id";
    ImGui::SetNextItemWidth(w * 0.5f);
    if (ImGui::BeginCombo("card caption", now.c_str())) {
      if (ImGui::Selectable("id", caption_ < 0)) caption_ = -1;
      for (size_t t = 0; t < collection_.tags.size(); ++t)
        if (ImGui::Selectable(collection_.tags[t].name.c_str(), caption_ == int(t))) caption_ = int(t);
      ImGui::EndCombo();
    }
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("the column the question cards show (kith open --caption)");
  }
  if (fold("turns and questions", &show_turns_)) {
    QuestionFlowOptions o = desk_->flow_options();
    bool changed = false;
    int rule = int(o.turn_rule);
    ImGui::SetNextItemWidth(w * 0.5f);
    changed |= ImGui::Combo("turns", &rule, "after each answer\0after every n\0facilitator (W)\0");
    o.turn_rule = TurnRule(rule);
    if (o.turn_rule == TurnRule::kEveryN) changed |= int_slider("every n answers", &o.turn_every, 1, 20);
    int choice = int(desk_->picker_choice());
    ImGui::SetNextItemWidth(w * 0.5f);
    if (ImGui::Combo("picker", &choice, "most informative\0random\0about the selection\0"))
      desk_->set_picker_choice(PickerChoice(choice));
    float reask = float(o.reask_rate * 100.0);
    if (value_slider("re-ask", &reask, 0.f, 50.f, "%.0f %%").changed) o.reask_rate = reask / 100.0, changed = true;
    changed |= int_slider("grid N", &o.grid_size, 3, 9);
    changed |= int_slider("pick K", &o.grid_choose, 1, std::max(1, o.grid_size - 1));
    o.grid_choose = std::clamp(o.grid_choose, 1, std::max(1, o.grid_size - 1));
    if (changed) {
      std::string e;
      if (o.IsValid(&e))
        desk_->set_flow_options(o);
      else
        panel_message_ = e;
    }
  }
  ImGui::End();
}


namespace {
// A chip: TEXT on a rounded plate of GROUND, its top-left at `at` (or its centre, `centred`).
ScreenRect chip(ImDrawList* dl, ImFont* font, float size, ImVec2 at, const std::string& text, uint32_t ink,
                uint32_t ground, bool centred = false) {
  const ImVec2 ts = font->CalcTextSizeA(size, FLT_MAX, 0.f, text.c_str());
  const ImVec2 pad(size * 0.45f, size * 0.18f);
  ImVec2 p0 = at;
  if (centred) p0 = ImVec2(at.x - ts.x * 0.5f - pad.x, at.y - ts.y * 0.5f - pad.y);
  const ImVec2 p1(p0.x + ts.x + 2 * pad.x, p0.y + ts.y + 2 * pad.y);
  dl->AddRectFilled(p0, p1, rgb32(ground), size * 0.3f);
  dl->AddText(font, size, ImVec2(p0.x + pad.x, p0.y + pad.y), rgb32(ink), text.c_str());
  return {p0.x, p0.y, p1.x, p1.y};
}
float chip_height(float size) { return size * (1.f + 0.36f) + 2.f; }
}  // namespace

void AskingPanel::card(int item, float x, float y, float side_w, float side, const char* key, bool picked,
                       uint32_t person_rgb, KeyAction action) {
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const bool anchor = key == nullptr;
  const ScreenRect box{x, y, x + side_w, y + side};
  const ImVec2 at(x, y), end(x + side_w, y + side);
  ImFont* body = ImGui::GetFont();
  const float body_px = ImGui::GetFontSize();
  const float pad = std::max(6.f, side * 0.05f);
  // A click answers as the card's key does.
  ImGui::SetCursorScreenPos(at);
  ImGui::PushID(item);
  const bool clicked = ImGui::InvisibleButton("##card", ImVec2(side_w, side));
  const bool hovered = ImGui::IsItemHovered() && action.action != AskingAction::kNone;
  ImGui::PopID();
  if (clicked && action.action != AskingAction::kNone) act(action);
  dl->AddRectFilled(at, end, rgb32(look_.card), 8.f);
  dl->PushClipRect(at, end, true);
  const float top_room = anchor ? chip_height(body_px) * 0.5f + 2.f : chip_height(body_px) + 4.f;
  const float inner = side_w - 2 * pad;
  // The key chip; a picked card's says so, in the picked colours (on a card too narrow for that,
  // the key alone in those colours, and the word on its own chip where there is room for it).
  auto chip_width = [&](const std::string& t) { return body->CalcTextSizeA(body_px, FLT_MAX, 0.f, t.c_str()).x + body_px * 0.9f; };
  std::string key_text = anchor ? "" : picked ? std::string(key) + "  picked" : std::string(key);
  const bool word_apart = picked && chip_width(key_text) > side_w - 12.f;
  if (word_apart) key_text = key;
  auto key_chip = [&](ImVec2 where) {
    const ScreenRect k = chip(dl, body, body_px, where, key_text, picked ? look_.picked_ink : look_.key_ink,
                              picked ? look_.picked_chip : look_.key_chip);
    note_text(picked ? "picked" : "key", key_text, key_text, k, box);
    return k;
  };
  const Texture* t = texture(item);
  if (t) {
    // The picture, clear of everything; under it a strip with the key chip and the caption.
    const float strip = chip_height(body_px) + 2.f;
    const float above = anchor ? top_room : 0.f;
    const float bw = inner, bh = side - 2 * pad - strip - above;
    const float s = std::min(bw / float(t->width), bh / float(t->height));
    const float w = t->width * s, h = t->height * s;
    const ImVec2 p0(x + pad + (bw - w) * 0.5f, y + pad + above + (bh - h) * 0.5f);
    dl->AddImage(ImTextureID(intptr_t(t->id)), p0, ImVec2(p0.x + w, p0.y + h));
    if (word_apart && chip_width("picked") <= side_w - 12.f) {
      const ScreenRect r = chip(dl, body, body_px, ImVec2(x + side_w * 0.5f, y + 6.f + chip_height(body_px) * 0.5f),
                                "picked", look_.picked_ink, look_.picked_chip, true);
      note_text("picked", "picked", "picked", r, box);
    }
    const float strip_y = y + side - pad - strip;
    float left = x + pad;
    if (!anchor) left = key_chip(ImVec2(left, strip_y + 1.f)).x1 + 6.f;
    const float room = x + side_w - pad - left;
    const std::string full = caption_of(item);
    const std::string text = fit_text(full, room, width_in(body, body_px));
    if (!text.empty()) {
      const ImVec2 ts = body->CalcTextSizeA(body_px, FLT_MAX, 0.f, text.c_str());
      const ImVec2 tp(std::floor(left + (room - ts.x) * 0.5f), strip_y + (strip - ts.y) * 0.5f);
      dl->AddText(body, body_px, tp, rgb32(look_.ink), text.c_str());
      note_text("caption", text, full, rect_of(tp, ImVec2(tp.x + ts.x, tp.y + ts.y)), box);
    }
  } else {
    // No picture: a neutral card with the caption (or id) large, the id under a caption, the tags.
    ImFont* title_font = font_or_current(desk_->large_type() && g_big ? g_big : g_medium);
    const float title_px = std::min(title_font->FontSize, std::max(body_px, side * 0.17f));
    float ty = y + pad + top_room;
    auto line = [&](const char* role, const std::string& full, ImFont* f, float px, uint32_t ink) {
      const std::string text = fit_text(full, inner, width_in(f, px));
      const ImVec2 ts = f->CalcTextSizeA(px, FLT_MAX, 0.f, text.c_str());
      const ImVec2 tp(x + (side_w - ts.x) * 0.5f, ty);
      dl->AddText(f, px, tp, rgb32(ink), text.c_str());
      note_text(role, text, full, rect_of(tp, ImVec2(tp.x + ts.x, tp.y + ts.y)), box);
      ty += px * 1.2f;
    };
    // A title too long for one line breaks at a space onto a second (shortened there if need be).
    const std::string title = caption_of(item);
    const auto title_width = width_in(title_font, title_px);
    size_t cut = std::string::npos;
    if (title_width(title) > inner)
      for (size_t k = title.find(' '); k != std::string::npos; k = title.find(' ', k + 1))
        if (title_width(title.substr(0, k)) <= inner) cut = k;
    if (cut == std::string::npos) {
      line("title", title, title_font, title_px, look_.ink);
    } else {
      line("title", title.substr(0, cut), title_font, title_px, look_.ink);
      line("title", title.substr(cut + 1), title_font, title_px, look_.ink);
    }
    std::vector<std::string> lines;
    if (caption_of(item) != collection_.ids[size_t(item)]) lines.push_back(collection_.ids[size_t(item)]);
    for (size_t c = 0; c < collection_.tags.size(); ++c) {
      const auto& tag = collection_.tags[c];
      if (int(c) == caption_ || size_t(item) >= tag.values.size() || tag.values[size_t(item)].empty()) continue;
      lines.push_back(tag.name + ": " + tag.values[size_t(item)]);
    }
    // Lines that have no room left say how many are not shown, rather than vanish.
    const int room = int(std::floor((y + side - pad - ty) / (body_px * 1.2f)));
    const int shown = int(lines.size()) <= room ? int(lines.size()) : std::max(0, room - 1);
    for (int k = 0; k < shown; ++k) line("tag", lines[size_t(k)], body, body_px, look_.quiet);
    if (shown < int(lines.size()) && room > 0)
      line("more", "+" + std::to_string(lines.size() - size_t(shown)) + " more", body, body_px, look_.quiet);
  }
  dl->PopClipRect();
  // Edges: the anchor and picked cards in the colour of whoever answers; others neutral.
  if (picked)
    dl->AddRect(ImVec2(x - 3, y - 3), ImVec2(end.x + 3, end.y + 3), rgb32(person_rgb), 10.f, 0, 6.f);
  else if (anchor)
    dl->AddRect(at, end, rgb32(person_rgb), 8.f, 0, 4.f);
  else
    dl->AddRect(at, end, rgb32(look_.edge), 8.f, 0, hovered ? 3.f : 1.5f);
  // The anchor's badge on the top edge; a text card's key chip at its top left.
  if (anchor) {
    const ScreenRect b =
        chip(dl, body, body_px, ImVec2(x + side_w * 0.5f, y), "this one", look_.badge_ink, look_.badge, true);
    note_text("badge", "this one", "this one", b, screen_rect());
  } else if (!t) {
    key_chip(ImVec2(x + 6, y + 6));
  }
}

namespace {
bool begin_band(float height) {
  const ImGuiIO& io = ImGui::GetIO();
  ImGui::SetNextWindowPos(ImVec2(0, io.DisplaySize.y - height), ImGuiCond_Always);
  ImGui::SetNextWindowSize(ImVec2(io.DisplaySize.x, height), ImGuiCond_Always);
  ImGui::SetNextWindowBgAlpha(1.f);
  return ImGui::Begin("##question", nullptr,
                      ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoMove |
                          ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoNav |
                          ImGuiWindowFlags_NoBringToFrontOnFocus | ImGuiWindowFlags_NoScrollWithMouse);
}
// The heading's font: medium, or big in large type.
ImFont* heading_font(bool large) { return font_or_current(large && g_big ? g_big : g_medium); }
}  // namespace

// The band's buttons: what the keys do, each labelled with its key.
float AskingPanel::draw_foot(float y, bool measure_only) {
  const ImGuiIO& io = ImGui::GetIO();
  const ImGuiStyle& style = ImGui::GetStyle();
  const bool pair = desk_->mode() == AskingMode::kPair;
  struct Entry {
    std::string label;
    KeyAction action;
  };
  const std::vector<Entry> entries = {
      {"0  can't tell", {AskingAction::kCantTell}},
      {"Backspace  undo", {AskingAction::kUndo}},
      {"W  next person", {AskingAction::kNextPerson}},
      {pair ? "A  grid questions" : "A  pair questions", {pair ? AskingAction::kStartGrid : AskingAction::kStartPair}},
      {"Esc  stop", {AskingAction::kLeave}},
  };
  const float margin = 8.f, spacing = style.ItemSpacing.x * 1.5f;
  const float row_h = ImGui::GetFrameHeight() + style.ItemSpacing.y;
  // Rows: as many buttons as fit the width, each row centred.
  std::vector<std::vector<size_t>> rows(1);
  std::vector<float> widths, row_w(1, 0.f);
  for (size_t k = 0; k < entries.size(); ++k) {
    const float w = ImGui::CalcTextSize(entries[k].label.c_str()).x + style.FramePadding.x * 2;
    widths.push_back(w);
    if (!rows.back().empty() && row_w.back() + spacing + w > io.DisplaySize.x - 2 * margin) {
      rows.emplace_back();
      row_w.push_back(0.f);
    }
    row_w.back() += (rows.back().empty() ? 0.f : spacing) + w;
    rows.back().push_back(k);
  }
  if (measure_only) return rows.size() * row_h;
  for (size_t r = 0; r < rows.size(); ++r) {
    float x = std::floor((io.DisplaySize.x - row_w[r]) * 0.5f);
    for (size_t k : rows[r]) {
      ImGui::SetCursorScreenPos(ImVec2(x, y + r * row_h));
      if (ImGui::Button(entries[k].label.c_str())) act(entries[k].action);
      note_text("button", entries[k].label, entries[k].label, rect_of(ImGui::GetItemRectMin(), ImGui::GetItemRectMax()),
                screen_rect());
      x += widths[k] + spacing;
    }
  }
  return rows.size() * row_h;
}

// One line for the window's messages: a notice on its own plate with an OK button, else the last
// message, quiet.
void AskingPanel::draw_status(float y, float height) {
  const ImGuiIO& io = ImGui::GetIO();
  ImDrawList* dl = ImGui::GetWindowDrawList();
  ImFont* f = ImGui::GetFont();
  const float px = ImGui::GetFontSize();
  const float margin = 12.f;
  const ScreenRect box{0.f, y, io.DisplaySize.x, y + height};
  if (!status_notice_.empty()) {
    const float ok_w = ImGui::CalcTextSize("OK").x + ImGui::GetStyle().FramePadding.x * 2 + 16.f;
    const std::string text = fit_text(status_notice_, io.DisplaySize.x - 2 * margin - ok_w - px, width_in(f, px));
    const float w = f->CalcTextSizeA(px, FLT_MAX, 0.f, text.c_str()).x;
    const float x = std::floor((io.DisplaySize.x - w - ok_w) * 0.5f);
    const ScreenRect r = chip(dl, f, px, ImVec2(x, y + (height - chip_height(px)) * 0.5f), text, look_.notice_ink, look_.notice);
    note_text("notice", text, status_notice_, r, box);
    ImGui::SetCursorScreenPos(ImVec2(r.x1 + 8.f, y + (height - ImGui::GetFrameHeight()) * 0.5f));
    if (ImGui::SmallButton("OK") && dismiss_notice_) dismiss_notice_();
    return;
  }
  if (status_message_.empty()) return;
  const std::string text = fit_text(status_message_, io.DisplaySize.x - 2 * margin, width_in(f, px));
  const ImVec2 ts = f->CalcTextSizeA(px, FLT_MAX, 0.f, text.c_str());
  const ImVec2 tp(std::floor((io.DisplaySize.x - ts.x) * 0.5f), y + (height - ts.y) * 0.5f);
  dl->AddText(f, px, tp, rgb32(look_.quiet), text.c_str());
  note_text("status", text, status_message_, rect_of(tp, ImVec2(tp.x + ts.x, tp.y + ts.y)), box);
}

// The heading at the top of the band: medium, or big in large type.
void AskingPanel::heading(const std::string& full, float y) {
  const ImGuiIO& io = ImGui::GetIO();
  ImFont* hf = heading_font(desk_->large_type());
  heading_px_ = hf->FontSize;
  const std::string text = fit_text(full, io.DisplaySize.x - 24.f, width_in(hf, hf->FontSize));
  const ImVec2 ts = hf->CalcTextSizeA(hf->FontSize, FLT_MAX, 0.f, text.c_str());
  const ImVec2 tp(std::floor((io.DisplaySize.x - ts.x) * 0.5f), y);
  ImGui::GetWindowDrawList()->AddText(hf, hf->FontSize, tp, rgb32(look_.ink), text.c_str());
  note_text("heading", text, full, rect_of(tp, ImVec2(tp.x + ts.x, tp.y + ts.y)), window_rect());
}

uint32_t AskingPanel::turn_colour() const {
  const int t = desk_->flow().turn();
  return t >= 0 ? desk_->flow().people()[size_t(t)].colour : Palette::person_colour(0);
}

namespace {
// The band's parts from the top: the heading, the cards, the status line, the buttons.
struct BandLayout {
  float top, heading_y, heading_h, cards_y, cards_h, status_y, status_h, foot_y;
};
}  // namespace

// Shared by the pair and grid screens: the band's window, its heading, its status line and
// buttons; returns false (band closed) when there is no question to show.
static BandLayout band_layout(float band, float foot_h, bool large) {
  const ImGuiIO& io = ImGui::GetIO();
  BandLayout b{};
  b.top = io.DisplaySize.y - band;
  const float margin = 8.f;
  b.heading_y = b.top + margin;
  b.heading_h = heading_font(large)->FontSize * 1.25f;
  b.status_h = ImGui::GetFontSize() * 1.6f;
  b.foot_y = io.DisplaySize.y - margin - foot_h;
  b.status_y = b.foot_y - b.status_h;
  b.cards_y = b.heading_y + b.heading_h;
  b.cards_h = std::max(40.f, b.status_y - b.cards_y - 4.f);
  return b;
}

void AskingPanel::draw_pair() {
  const float band = band_height();
  if (!begin_band(band)) return ImGui::End();
  const ImGuiIO& io = ImGui::GetIO();
  note_region("band", window_rect());
  const BandLayout b = band_layout(band, draw_foot(0, true), desk_->large_type());
  const Question& q = desk_->question();
  if (q.anchor < 0 || q.kind != QuestionKind::kPair || q.candidates.size() != 2) {
    heading("Waiting for the map to offer a question...", b.heading_y);
  } else {
    const Question shown = q;
    heading("Which is more like this one, left or right?", b.heading_y);
    const float badge = chip_height(ImGui::GetFontSize()) * 0.5f;
    // Cards with text only are wider than tall (the band is short, the screen wide); pictures square.
    const float aspect = collection_.pictures.empty() ? 1.5f : 1.f;
    const float anchor_h = std::floor(b.cards_h - badge), side_h = std::floor(anchor_h * 0.82f);
    float anchor_w = anchor_h * aspect, side_w = side_h * aspect;
    const float gap = std::max(28.f, io.DisplaySize.x * 0.04f);
    // Three cards and two gaps within the width: narrower first, then smaller.
    const float most = io.DisplaySize.x - 24.f;
    if (anchor_w + 2 * side_w + 2 * gap > most) {
      const float k = (most - 2 * gap) / (anchor_w + 2 * side_w);
      anchor_w = std::floor(anchor_w * k), side_w = std::floor(side_w * k);
    }
    const float total = anchor_w + 2 * side_w + 2 * gap;
    const float x0 = std::floor((io.DisplaySize.x - total) * 0.5f);
    const float ay = b.cards_y + badge, cy = ay + (anchor_h - side_h) * 0.5f;
    const uint32_t who = turn_colour();
    card(shown.candidates[0], x0, cy, side_w, side_h, "\xe2\x86\x90  1", false, who, {AskingAction::kLeft});
    card(shown.anchor, x0 + side_w + gap, ay, anchor_w, anchor_h, nullptr, false, who, {});
    card(shown.candidates[1], x0 + side_w + gap + anchor_w + gap, cy, side_w, side_h, "\xe2\x86\x92  2", false, who,
         {AskingAction::kRight});
  }
  draw_status(b.status_y, b.status_h);
  draw_foot(b.foot_y, false);
  ImGui::End();
}

void AskingPanel::draw_grid() {
  const float band = band_height();
  if (!begin_band(band)) return ImGui::End();
  const ImGuiIO& io = ImGui::GetIO();
  note_region("band", window_rect());
  const BandLayout b = band_layout(band, draw_foot(0, true), desk_->large_type());
  const Question& q = desk_->question();
  if (q.anchor < 0 || q.kind != QuestionKind::kGrid) {
    heading("Waiting for the map to offer a question...", b.heading_y);
  } else {
    const Question shown = q;
    heading("Pick the " + std::to_string(shown.choose) + " most like this one", b.heading_y);
    const int n = int(shown.candidates.size());
    const int cols = n <= 4 ? n : (n + 1) / 2, rows = n <= 4 ? 1 : 2;
    const float badge = chip_height(ImGui::GetFontSize()) * 0.5f;
    const float gap = 12.f, apart = 36.f;
    const float avail_h = b.cards_h;
    const float aspect = collection_.pictures.empty() ? 1.4f : 1.f;
    const float side = std::floor((avail_h - (rows - 1) * gap) / rows);
    const float anchor_side = std::floor(std::min(avail_h - badge, side * 1.5f));
    float side_w = side * aspect, anchor_w = anchor_side * aspect;
    const float most = io.DisplaySize.x - 24.f;
    const float want = anchor_w + apart + cols * side_w + (cols - 1) * gap;
    if (want > most) {  // narrower cards, so all fit the width
      const float k = (most - apart - (cols - 1) * gap) / (anchor_w + cols * side_w);
      side_w = std::floor(side_w * k), anchor_w = std::floor(anchor_w * k);
    }
    const float total = anchor_w + apart + cols * side_w + (cols - 1) * gap;
    const float x0 = std::floor((io.DisplaySize.x - total) * 0.5f);
    const float grid_h = rows * side + (rows - 1) * gap;
    const uint32_t who = turn_colour();
    card(shown.anchor, x0, b.cards_y + std::max(badge, (grid_h - anchor_side) * 0.5f), anchor_w, anchor_side, nullptr,
         false, who, {});
    const auto& picks = desk_->grid_picks();
    for (int k = 0; k < n; ++k) {
      const int r = k / cols, c = k % cols;
      const std::string key = std::to_string(k + 1);
      const bool picked = std::find(picks.begin(), picks.end(), k) != picks.end();
      card(shown.candidates[size_t(k)], x0 + anchor_w + apart + c * (side_w + gap), b.cards_y + r * (side + gap), side_w,
           side, key.c_str(), picked, who, {AskingAction::kPick, k});
    }
  }
  draw_status(b.status_y, b.status_h);
  draw_foot(b.foot_y, false);
  ImGui::End();
}


void AskingPanel::draw_own(float top) {
  const ImGuiIO& io = ImGui::GetIO();
  // At the bottom of the free map area, clear of the docked panels and the engine strip.
  const bool area = free_area_.x1 > free_area_.x0 && free_area_.y1 > free_area_.y0;
  const float cx = area ? (free_area_.x0 + free_area_.x1) * 0.5f : io.DisplaySize.x * 0.5f;
  const float bottom = area ? free_area_.y1 - 10.f : io.DisplaySize.y - 10.f;
  if (area) ImGui::SetNextWindowSizeConstraints(ImVec2(0, 0), ImVec2(free_area_.x1 - free_area_.x0 - 12.f, FLT_MAX));
  ImGui::SetNextWindowPos(ImVec2(cx, bottom), ImGuiCond_Always, ImVec2(0.5f, 1.f));
  ImGui::SetNextWindowBgAlpha(1.f);
  ImGui::Begin("Your own judgment", nullptr,
               ImGuiWindowFlags_NoTitleBar | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings |
                   ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoCollapse);
  panel_heading("Your own judgment", nullptr);
  (void)top;
  own_rect_ = window_rect();
  note_region("own", own_rect_);
  OwnDraft& d = desk_->own();
  const char* names[3] = {"this one", "is more like", "than"};
  for (int s = 0; s < 3; ++s) {
    if (s) ImGui::SameLine(0, 24);
    const int item = d.slots()[size_t(s)];
    ImGui::BeginGroup();
    ImGui::TextDisabled("%s", names[s]);
    ImGui::PushFont(font_or_current(g_medium));
    if (item >= 0) {
      ImGui::TextUnformatted(caption_of(item).c_str());
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
  if (!status_notice_.empty() || !status_message_.empty())
    ImGui::TextWrapped("%s", (status_notice_.empty() ? status_message_ : status_notice_).c_str());
  ImGui::End();
}

// The question's items ringed in the map, each labelled on a plate placed clear of the other
// labels, the rings, the banner, the people panel and the band (label_placement.h); a label set
// farther out gets a thin line to its ring.
void AskingPanel::draw_map_marks(float inv_scale, float top) {
  std::vector<int> items;
  const uint32_t who = turn_colour();
  const bool own = desk_->mode() == AskingMode::kOwn;
  if (own) {
    for (int i : desk_->own().slots())
      if (i >= 0) items.push_back(i);
  } else {
    items = desk_->question_items();
  }
  if (items.empty()) return;
  const auto& pos = view_.positions();
  for (int i : items)
    if (size_t(i) >= pos.size()) return;
  ImDrawList* dl = ImGui::GetBackgroundDrawList();
  const ImGuiIO& io = ImGui::GetIO();
  std::vector<ImVec2> at(items.size());
  std::vector<bool> shown(items.size());
  for (size_t k = 0; k < items.size(); ++k) {
    const Projected p = view_.camera().project(pos[size_t(items[k])]);
    at[k] = ImVec2(p.screen.x * inv_scale, p.screen.y * inv_scale);
    shown[k] = p.visible;
  }
  for (size_t k = 1; k < items.size(); ++k)
    if (shown[0] && shown[k]) dl->AddLine(at[0], at[k], rgb32(who, 0.45f), 2.f);
  const float r = desk_->large_type() ? 16.f : 11.f;
  ImFont* f = ImGui::GetFont();
  const float px = ImGui::GetFontSize();
  const ImVec2 pad(px * 0.4f, px * 0.15f);
  // The free part of the map: under the menu, above the band (or the own-judgment window).
  const float bottom = io.DisplaySize.y - band_height();  // the own-judgment window is among the regions
  const ScreenRect area{0.f, top, io.DisplaySize.x, bottom};
  std::vector<ScreenRect> obstacles;
  for (const auto& [name, rect] : regions_) obstacles.push_back(rect);
  std::vector<LabelRequest> requests;
  std::vector<std::string> texts;
  std::vector<size_t> which;
  for (size_t k = 0; k < items.size(); ++k) {
    if (!shown[k] || at[k].y > bottom || at[k].y < top) continue;
    std::string label;
    if (own) label = k == 0 ? "this one" : k == 1 ? "nearer" : "farther";
    else if (k == 0) label = "this one";
    else if (desk_->mode() == AskingMode::kPair) label = k == 1 ? "left" : "right";
    else label = std::to_string(k);
    const ImVec2 ts = f->CalcTextSizeA(px, FLT_MAX, 0.f, label.c_str());
    const float ring = k == 0 ? r * 1.4f : r;
    requests.push_back({at[k].x, at[k].y, ring + 2.f, ts.x + 2 * pad.x, ts.y + 2 * pad.y});
    texts.push_back(label);
    which.push_back(k);
  }
  const std::vector<PlacedLabel> placed = place_labels(requests, area, obstacles);
  for (size_t k = 0; k < items.size(); ++k)
    if (shown[k]) dl->AddCircle(at[k], k == 0 ? r * 1.4f : r, rgb32(who), 24, k == 0 ? 4.f : 2.5f);
  for (size_t n = 0; n < placed.size(); ++n) {
    const ScreenRect& q = placed[n].rect;
    const ImVec2 p = at[which[n]];
    if (placed[n].moved) {  // a line from the ring to the nearest point of the plate
      const ImVec2 near(std::clamp(p.x, q.x0, q.x1), std::clamp(p.y, q.y0, q.y1));
      dl->AddLine(p, near, rgb32(look_.label_ink, 0.8f), 1.f);
    }
    dl->AddRectFilled(ImVec2(q.x0, q.y0), ImVec2(q.x1, q.y1), rgb32(look_.label_plate), 4.f);
    dl->AddRect(ImVec2(q.x0, q.y0), ImVec2(q.x1, q.y1), rgb32(look_.edge), 4.f, 0, 1.f);
    dl->AddText(f, px, ImVec2(q.x0 + pad.x, q.y0 + pad.y), rgb32(look_.label_ink), texts[n].c_str());
    labels_.push_back({texts[n], items[which[n]], q, placed[n].clear});
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
  j["caption"] = caption_ >= 0 ? json(collection_.tags[size_t(caption_)].name) : json("id");
  // The screen as drawn in the last frame, in window pixels: [x0, y0, x1, y1].
  auto r4 = [](const ScreenRect& r) { return json::array({r.x0, r.y0, r.x1, r.y1}); };
  json screen;
  screen["ground"] = look_.band == QuestionLook::night().band ? "night" : "paper";
  screen["heading_px"] = heading_px_;
  screen["body_px"] = ImGui::GetFontSize();
  json regions = json::array(), texts = json::array(), labels = json::array();
  for (const auto& [name, rect] : regions_drawn_) regions.push_back({{"name", name}, {"rect", r4(rect)}});
  for (const NotedText& t : texts_drawn_)
    texts.push_back({{"role", t.role}, {"text", t.text}, {"full", t.full}, {"rect", r4(t.rect)}, {"box", r4(t.box)}});
  for (const NotedLabel& l : labels_)
    labels.push_back({{"text", l.text}, {"item", collection_.ids[size_t(l.item)]}, {"rect", r4(l.rect)}, {"clear", l.clear}});
  screen["regions"] = regions;
  screen["texts"] = texts;
  screen["labels"] = labels;
  j["screen"] = screen;
  return j;
}

}  // namespace kith
