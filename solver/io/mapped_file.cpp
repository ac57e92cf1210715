// MappedFile (see mapped_file.h).
#include "solver/io/mapped_file.h"

#include <fcntl.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <utility>

#include "solver/io/collection.h"
#include "solver/io/csv_table.h"

namespace kith {

MappedFile::MappedFile(const std::string& path) {
  struct stat st {};
  const int fd = open_regular_file(path, &st);
  size_ = size_t(st.st_size);
  if (size_ > 0) {
    void* p = ::mmap(nullptr, size_, PROT_READ, MAP_PRIVATE, fd, 0);
    const int map_errno = errno;
    ::close(fd);
    if (p == MAP_FAILED) throw LoadError(Problem{path, 0, 0, std::string("cannot map the file: ") + std::strerror(map_errno)});
    // Read once, front to back.
    ::madvise(p, size_, MADV_SEQUENTIAL);
    data_ = p;
  } else {
    ::close(fd);
  }
}

MappedFile::~MappedFile() {
  if (data_) ::munmap(data_, size_);
}

MappedFile::MappedFile(MappedFile&& other) noexcept
    : data_(std::exchange(other.data_, nullptr)), size_(std::exchange(other.size_, 0)) {}

MappedFile& MappedFile::operator=(MappedFile&& other) noexcept {
  if (this != &other) {
    if (data_) ::munmap(data_, size_);
    data_ = std::exchange(other.data_, nullptr);
    size_ = std::exchange(other.size_, 0);
  }
  return *this;
}

}  // namespace kith
