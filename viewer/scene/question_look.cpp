#include "viewer/scene/question_look.h"

#include <utility>

namespace kith {

// Paper: warm off-white grounds, near-black ink; the badge a deep blue-slate with white.
QuestionLook QuestionLook::paper() {
  QuestionLook l;
  l.band = 0xFBF9F4;
  l.card = 0xFFFEFB;
  l.title = 0xECE7DC;
  l.field = 0xECE7DC;
  l.field_hover = 0xE2DBCC;
  l.field_active = 0xD5E3EC;
  l.button = 0xE6E0D2;
  l.button_hover = 0xD9D1BF;
  l.button_active = 0xC8D9E6;
  l.chosen = 0xD6E4EE;
  l.chosen_hover = 0xC8DBE8;
  l.badge = 0x23415A;
  l.key_chip = 0x4A463F;
  l.picked_chip = 0x1E5B3F;
  l.label_plate = 0xFFFDF8;
  l.notice = 0xFBE9DF;
  l.ink = 0x2B2A28;
  l.quiet = 0x5B574F;
  l.badge_ink = 0xFFFFFF;
  l.key_ink = 0xFFFFFF;
  l.picked_ink = 0xFFFFFF;
  l.label_ink = 0x2B2A28;
  l.notice_ink = 0x6E2A08;
  l.edge = 0x8A8376;
  return l;
}

// Night: slate grounds, warm light ink; badge and key chips light with dark ink.
QuestionLook QuestionLook::night() {
  QuestionLook l;
  l.band = 0x24282D;
  l.card = 0x2E3339;
  l.title = 0x30353B;
  l.field = 0x383E45;
  l.field_hover = 0x40464D;
  l.field_active = 0x2C4556;
  l.button = 0x3A4047;
  l.button_hover = 0x42484F;
  l.button_active = 0x2C4556;
  l.chosen = 0x2A4253;
  l.chosen_hover = 0x2F4A5D;
  l.badge = 0xE8D9B0;
  l.key_chip = 0xD9D4CA;
  l.picked_chip = 0x9FDCBF;
  l.label_plate = 0x2A2E33;
  l.notice = 0x4A2A1C;
  l.ink = 0xF1EDE4;
  l.quiet = 0xCDC8BE;
  l.badge_ink = 0x1F2226;
  l.key_ink = 0x1F2226;
  l.picked_ink = 0x1F2226;
  l.label_ink = 0xF1EDE4;
  l.notice_ink = 0xFFD9C4;
  l.edge = 0x7C838C;
  return l;
}

std::vector<TextPair> text_pairs(const QuestionLook& l) {
  std::vector<TextPair> out;
  // Text and secondary text go on every widget ground (a label, a hint or a value can sit on any).
  const std::pair<const char*, uint32_t> grounds[] = {
      {"band", l.band},
      {"card", l.card},
      {"title bar", l.title},
      {"text box", l.field},
      {"text box, hovered", l.field_hover},
      {"text box, in use", l.field_active},
      {"button", l.button},
      {"button, hovered", l.button_hover},
      {"button, pressed", l.button_active},
      {"chosen row", l.chosen},
      {"chosen row, hovered", l.chosen_hover},
  };
  for (const auto& [name, ground] : grounds) {
    out.push_back({name, l.ink, ground});
    out.push_back({name, l.quiet, ground});
  }
  out.push_back({"anchor badge", l.badge_ink, l.badge});
  out.push_back({"key chip", l.key_ink, l.key_chip});
  out.push_back({"picked chip", l.picked_ink, l.picked_chip});
  out.push_back({"map label", l.label_ink, l.label_plate});
  out.push_back({"notice", l.notice_ink, l.notice});
  return out;
}

std::vector<TextPair> edge_pairs(const QuestionLook& l) {
  return {{"card edge on the band", l.edge, l.band}, {"card edge on a card", l.edge, l.card}};
}

}  // namespace kith
