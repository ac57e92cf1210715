#include "viewer/scene/selection.h"

#include <algorithm>

namespace kith {

void Selection::remove(int item) {
  if (!contains(item)) return;
  mask_[item] = 0;
  order_.erase(std::find(order_.begin(), order_.end(), item));
}

}  // namespace kith
