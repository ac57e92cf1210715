// AskingPanel: the asking screens drawn with Dear ImGui over the live map, on an AskingDesk
// (viewer/scene/asking_desk.h, the logic). Pair screen: the anchor large in the middle, the two
// candidates either side; grid screen: the anchor and N numbered candidates; both in a band at
// the bottom so the map above stays visible and moving, with the question's items ringed in it.
// Whose turn it is is shown large at the top; the people panel (add, rename, colour, turn rule,
// picker, re-ask rate, grid size) sits at the left. Items show their picture when the collection
// has pictures, else a swatch of their map colour with id and tags. Large type (B, big) swaps in a
// bigger font and bigger cards and discs for a shared screen.
// Window thread only, with the ImGui and GL contexts current.
#pragma once
#include <memory>
#include <nlohmann/json.hpp>
#include <string>
#include <unordered_map>
#include <vector>

#include "viewer/scene/asking_desk.h"
#include "viewer/scene/map_view.h"

struct ImFont;

namespace kith {

class AskingPanel {
 public:
  // Adds the medium and large fonts to ImGui's atlas: call after the normal font is loaded and
  // before the first frame. `scale` is the window's content scale.
  static void load_fonts(float scale);

  AskingPanel(const Collection& collection, MapView& view, DeskLinks links,
              const std::unordered_map<std::string, int>& index_of_id);
  ~AskingPanel();

  AskingDesk& desk() { return *desk_; }
  // A key the window has not used otherwise; true when it was an asking key. message() says what happened.
  bool handle_key(int key, int mods);
  const std::string& message() const { return desk_->message(); }
  // While making an own judgment, a left click on an item fills the next slot (true = used).
  bool wants_item_clicks() const { return desk_->mode() == AskingMode::kOwn; }
  void click_item(int item);

  // The screens; call between ImGui::NewFrame and ImGui::Render. `top` is below the menu bar.
  // `inv_scale` turns framebuffer pixels into ImGui pixels.
  void draw(float top, float inv_scale);
  // Height of the band at the bottom in ImGui pixels (0 when no question screen is up).
  float band_height() const;
  // Frames the map in the part of the window above the question band.
  void frame_map();
  // For state dumps: mode, people, turn, the question on screen, every answer.
  nlohmann::json state();

 private:
  struct Texture {
    unsigned id = 0;
    int width = 0, height = 0;
  };
  const Texture* texture(int item);
  void draw_turn_banner(float top);
  void draw_people(float top);
  void draw_pair();
  void draw_grid();
  void draw_own(float top);
  void draw_map_marks(float inv_scale);
  // One item as a card at the cursor: picture (or colour swatch, id and tags), framed.
  void card(int item, float side, const char* key_label, bool picked, uint32_t frame_rgb);
  void apply_large_type();

  const Collection& collection_;
  MapView& view_;
  const std::unordered_map<std::string, int>& index_of_id_;
  std::unique_ptr<AskingDesk> desk_;
  std::unordered_map<int, Texture> textures_;
  bool large_applied_ = false;
  float normal_point_size_ = 0.f, normal_card_size_ = 96.f;
  char new_name_[64] = "";
  char own_line_[256] = "";
  int editing_ = -1;
  char edit_name_[64] = "";
  std::string panel_message_;
  double last_frame_time_ = -10.0;
  bool question_out_of_view() const;
};

}  // namespace kith
