// Selection: the set of selected items, kept in the order they were chosen (the panel lists them
// that way) with a mask for O(1) membership. Window thread only.
#pragma once
#include <cstddef>
#include <cstdint>
#include <vector>

namespace kith {

class Selection {
 public:
  void resize(size_t n) {
    mask_.assign(n, 0);
    order_.clear();
  }
  size_t capacity() const { return mask_.size(); }
  bool contains(int item) const { return item >= 0 && size_t(item) < mask_.size() && mask_[item]; }
  void add(int item) {
    if (item < 0 || size_t(item) >= mask_.size() || mask_[item]) return;
    mask_[item] = 1;
    order_.push_back(item);
  }
  void remove(int item);
  void toggle(int item) { contains(item) ? remove(item) : add(item); }
  void clear() {
    for (int i : order_) mask_[i] = 0;
    order_.clear();
  }
  void set(const std::vector<int>& items) {
    clear();
    for (int i : items) add(i);
  }
  const std::vector<int>& items() const { return order_; }
  bool empty() const { return order_.empty(); }
  size_t size() const { return order_.size(); }

 private:
  std::vector<uint8_t> mask_;
  std::vector<int> order_;
};

}  // namespace kith
