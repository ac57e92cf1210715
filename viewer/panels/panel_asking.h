// AskingPanel: the asking screens drawn with Dear ImGui over the live map, on an AskingDesk
// (viewer/scene/asking_desk.h, the logic). Pair screen: the anchor large in the middle, the two
// candidates either side; grid screen: the anchor and N numbered candidates; both in a band at
// the bottom so the map above stays visible and moving, with the question's items ringed in it.
// Whose turn it is is shown large at the top; the people panel (add, rename, colour, turn rule,
// picker, re-ask rate, grid size, the caption column) sits at the left. Items show their picture
// when the collection has pictures, else a neutral card with their caption (or id) and tags,
// never in a tag's colour; a tag line too long for its card ends in an ellipsis. The anchor
// carries a badge ("this one"), each candidate its key; a click on a candidate answers as its key
// does, and the band's buttons do what the keys do. The marks in the map are labelled without
// overlaps (viewer/scene/label_placement.h); the window's short messages and notices show in the
// band's status line, not over the map. Every colour is from QuestionLook
// (viewer/scene/question_look.h), on the paper or the night ground. Large type (B, big) swaps in
// bigger fonts for every text, the heading included, and bigger cards and discs.
// Window thread only, with the ImGui and GL contexts current.
#pragma once
#include <functional>
#include <memory>
#include <nlohmann/json.hpp>
#include <string>
#include <unordered_map>
#include <vector>

#include "viewer/scene/asking_desk.h"
#include "viewer/scene/label_placement.h"
#include "viewer/scene/map_view.h"
#include "viewer/scene/question_look.h"

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
  bool run(KeyAction a);  // the same for an action already known (a button, a menu entry)
  // What the band's buttons and a click on a card do: the window's path for an asking key (which
  // also shows or hides the panels). Set by the window; unset, buttons go straight to the desk.
  std::function<void(KeyAction)> on_action;
  // The tag column whose value the cards show as their caption; -1: the item's id.
  void set_caption(int column) { caption_ = column; }
  int caption() const { return caption_; }
  // The window's short message and its notice (a refusal; "" when none), shown in the band's
  // status line while a question screen is up (the window then draws no toast, notice or
  // selection labels over the map); `dismiss` clears the notice.
  void set_status(const std::string& message, const std::string& notice, std::function<void()> dismiss);
  // Pushes the question screens' colours (QuestionLook, on the view's ground) onto ImGui's style
  // for what the window draws over them (the hover tooltip); returns how many to pop.
  int push_colours();
  const std::string& message() const { return desk_->message(); }
  // While making an own judgment, a left click on an item fills the next slot (true = used).
  bool wants_item_clicks() const { return desk_->mode() == AskingMode::kOwn; }
  void click_item(int item);

  // The screens; call between ImGui::NewFrame and ImGui::Render. `top` is below the menu bar.
  // `inv_scale` turns framebuffer pixels into ImGui pixels.
  void draw(float top, float inv_scale);
  // The part of the window the docked panels leave to the map (window pixels): the own-judgment
  // window sits at its bottom, clear of every panel.
  void set_free_area(float x0, float y0, float x1, float y1) { free_area_ = {x0, y0, x1, y1}; }
  // Height of the band at the bottom in ImGui pixels (0 when no question screen is up).
  float band_height() const;
  // Frames the map in the part of the window above the question band.
  void frame_map();
  // For state dumps: mode, people, turn, the question on screen, every answer, and the screen's
  // layout as drawn in the last frame (regions, texts with the box each must fit, map labels).
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
  void draw_map_marks(float inv_scale, float top);
  void draw_status(float y, float height);
  void heading(const std::string& full, float y);
  uint32_t turn_colour() const;  // whose turn it is, as a colour for rings and frames
  // The band's buttons, flowed into rows from `y`; returns the height used. `measure_only`: no drawing.
  float draw_foot(float y, bool measure_only);
  // One item as a neutral card at (x, y): picture or caption, id and tags; `key` its key chip
  // (nullptr for the anchor, which gets the badge), `action` what a click on it does.
  void card(int item, float x, float y, float width, float height, const char* key, bool picked, uint32_t person_rgb,
            KeyAction action);
  void apply_large_type();
  std::string caption_of(int item) const;
  // Text of a role, for the dump: drawn at `rect`, inside `box`; `full` when it was shortened.
  void note_text(const char* role, const std::string& text, const std::string& full, const ScreenRect& rect,
                 const ScreenRect& box);
  void note_region(const char* name, const ScreenRect& rect);
  void act(KeyAction a);
  struct NotedText {
    std::string role, text, full;
    ScreenRect rect, box;
  };
  struct NotedLabel {
    std::string text;
    int item = -1;
    ScreenRect rect;
    bool clear = true;
  };
  std::vector<NotedText> texts_, texts_drawn_;
  std::vector<std::pair<std::string, ScreenRect>> regions_, regions_drawn_;
  std::vector<NotedLabel> labels_;
  float heading_px_ = 0.f;
  QuestionLook look_;
  int caption_ = -1;
  std::string status_message_, status_notice_;
  std::function<void()> dismiss_notice_;
  ScreenRect banner_rect_, people_rect_, own_rect_;
  ScreenRect free_area_;  // empty: the whole window

  const Collection& collection_;
  MapView& view_;
  const std::unordered_map<std::string, int>& index_of_id_;
  std::unique_ptr<AskingDesk> desk_;
  std::unordered_map<int, Texture> textures_;
  bool large_applied_ = false;
  bool show_turns_ = false;  // the People panel's "turns and questions" fold
  float normal_point_size_ = 0.f, normal_picture_size_ = 0.f;
  char new_name_[64] = "";
  char own_line_[256] = "";
  int editing_ = -1;
  char edit_name_[64] = "";
  std::string panel_message_;
  double last_frame_time_ = -10.0;
  bool question_out_of_view() const;
  float map_top() const;
};

}  // namespace kith
