// See session_event.h. The JSON shapes are the stored form documented in docs/session-schema.md.
#include "solver/asking/session_event.h"

#include <nlohmann/json.hpp>

namespace kith {

namespace {

using nlohmann::json;

json question_json(const AskedQuestion& q) {
  json j = {{"kind", q.kind}, {"anchor", q.anchor}, {"candidates", q.candidates}};
  if (q.repeat_of >= 0) j["repeat_of"] = q.repeat_of;
  return j;
}

json detail(const event::PersonAdded& e) { return {{"action", "add"}, {"name", e.name}, {"colour", e.colour}}; }
json detail(const event::PersonRenamed& e) { return {{"action", "rename"}, {"from", e.from}, {"name", e.name}}; }
json detail(const event::PersonColoured& e) { return {{"action", "colour"}, {"name", e.name}, {"colour", e.colour}}; }
json detail(const event::CantTell& e) {
  json j = question_json(e.question);  // the question's fields at the top level, beside who and when
  j["person"] = e.person;
  j["time"] = e.time;
  return j;
}
json detail(const event::CantTellUndone& e) { return {{"person", e.person}, {"question", question_json(e.question)}}; }
json detail(const event::Undone& e) { return {{"action", e.redo ? "redo" : "undo"}, {"what", e.what}}; }
json detail(const event::Reasked& e) {
  return {{"repeat_of", e.question.repeat_of},
          {"person", e.person},
          {"question", question_json(e.question)},
          {"judgments", e.judgments}};
}

}  // namespace

EventRecord to_record(const SessionEvent& event) {
  return std::visit(
      [](const auto& e) {
        // Names may hold any bytes; replace what is not UTF-8 rather than fail the write.
        return EventRecord{std::decay_t<decltype(e)>::kKind, detail(e).dump(-1, ' ', false, json::error_handler_t::replace)};
      },
      event);
}

}  // namespace kith
