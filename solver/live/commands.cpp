// See commands.h.
#include "solver/live/commands.h"

#include "solver/base/map_parameters.h"

namespace kith {

int32_t command_item(const CommandBody& body) {
  if (auto* p = std::get_if<cmd::Pin>(&body)) return p->item;
  if (auto* p = std::get_if<cmd::Unpin>(&body)) return p->item;
  if (auto* p = std::get_if<cmd::DragTarget>(&body)) return p->item;
  if (auto* p = std::get_if<cmd::ClearDrag>(&body)) return p->item;
  return -1;
}

std::string setting_problem(const CommandBody& body, size_t item_count) {
  using P = MapParameters;
  if (auto* c = std::get_if<cmd::SetBlend>(&body)) return P::check_blend(c->blend);
  if (auto* c = std::get_if<cmd::SetTheta>(&body)) return P::check_theta(c->theta);
  if (auto* c = std::get_if<cmd::SetLearningRate>(&body)) return P::check_learning_rate(c->learning_rate);
  if (auto* c = std::get_if<cmd::SetExaggeration>(&body)) return P::check_exaggeration(c->exaggeration);
  if (auto* c = std::get_if<cmd::SetPerplexity>(&body)) return P::check_perplexity(c->perplexity, item_count);
  return "";
}

}  // namespace kith
