// QuestionLook: the question screens' colours, one table per ground (paper and night), and the
// list of every text / background pair those screens draw, so that one test
// (tests/test_question_look.cpp) checks each pair's contrast ratio on both grounds.
//
// Every surface a question screen draws text on is opaque and takes one of the grounds below;
// every text on it takes the ink its pair names. The panels draw from this table only (the
// widget library's own colours are replaced by these while a question screen is up), so a pair
// that is not listed here is not drawn. Items never take a tag's colour on these screens: cards
// are neutral, and the colours of people (who is answering) are used for rings and frames only,
// never under text.
// Pure data; any thread.
#pragma once
#include <cstdint>
#include <vector>

namespace kith {

struct QuestionLook {
  // Grounds: the band, the banner and the people panel ...
  uint32_t band = 0;
  uint32_t card = 0;   // a card (pictureless items are drawn as a neutral card of this colour)
  uint32_t title = 0;  // the people panel's title bar
  uint32_t field = 0, field_hover = 0, field_active = 0;     // text boxes, sliders
  uint32_t button = 0, button_hover = 0, button_active = 0;  // buttons
  uint32_t chosen = 0, chosen_hover = 0;                     // the chosen row (whose turn)
  uint32_t badge = 0;                                        // the anchor badge ("this one")
  uint32_t key_chip = 0;                                     // a card's key ("1", "left  1")
  uint32_t picked_chip = 0;                                  // a grid card's "picked" mark
  uint32_t label_plate = 0;                                  // labels in the map above the band
  uint32_t notice = 0;  // a message that something was not done (not saved, refused)
  // ... inks.
  uint32_t ink = 0;    // text
  uint32_t quiet = 0;  // secondary text: tag lines, counts, hints
  uint32_t badge_ink = 0, key_ink = 0, picked_ink = 0, label_ink = 0, notice_ink = 0;
  // Not text: card edges and the band's top edge (checked at 3:1 against what they sit on).
  uint32_t edge = 0;

  static QuestionLook paper();
  static QuestionLook night();
  static QuestionLook for_ground(bool dark) { return dark ? night() : paper(); }
};

// One text colour on one ground, named for the test's messages.
struct TextPair {
  const char* what;
  uint32_t text;
  uint32_t ground;
};
// Every text / ground pair the question screens draw.
std::vector<TextPair> text_pairs(const QuestionLook& look);
// The outlines that must stand out from their ground (card edge on band and card).
std::vector<TextPair> edge_pairs(const QuestionLook& look);

}  // namespace kith
