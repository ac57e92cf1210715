// MappedFile: a file mapped read-only into memory (POSIX mmap), so a large .npy array of
// features is parsed straight from the page cache instead of being copied into a string first:
// a million rows of 50 float64 values are 400 MB that are then not held twice. The pages are
// the file's own and the system drops them under memory pressure. An empty file maps to an
// empty view. Throws LoadError (solver/io/collection.h) naming the path when the file cannot be
// opened, is not a regular file, or cannot be mapped.
// Move-only; the view is valid while the object lives. Const access from many threads is fine.
#pragma once
#include <cstddef>
#include <string>
#include <string_view>

namespace kith {

class MappedFile {
 public:
  explicit MappedFile(const std::string& path);
  ~MappedFile();
  MappedFile(MappedFile&& other) noexcept;
  MappedFile& operator=(MappedFile&& other) noexcept;
  MappedFile(const MappedFile&) = delete;
  MappedFile& operator=(const MappedFile&) = delete;

  std::string_view bytes() const { return {static_cast<const char*>(data_), size_}; }

 private:
  void* data_ = nullptr;
  size_t size_ = 0;
};

}  // namespace kith
