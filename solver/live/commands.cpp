// See commands.h.
#include "solver/live/commands.h"

namespace kith {

int32_t command_item(const CommandBody& body) {
  if (auto* p = std::get_if<cmd::Pin>(&body)) return p->item;
  if (auto* p = std::get_if<cmd::Unpin>(&body)) return p->item;
  if (auto* p = std::get_if<cmd::DragTarget>(&body)) return p->item;
  if (auto* p = std::get_if<cmd::ClearDrag>(&body)) return p->item;
  return -1;
}

}  // namespace kith
