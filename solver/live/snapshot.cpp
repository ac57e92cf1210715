#include "solver/live/snapshot.h"

namespace kith {

std::shared_ptr<const HealthHistory> HealthHistory::none() {
  static const std::shared_ptr<const HealthHistory> empty = std::make_shared<const HealthHistory>();
  return empty;
}

}  // namespace kith
