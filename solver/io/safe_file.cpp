// See safe_file.h.
#include "solver/io/safe_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <random>

namespace kith {
namespace {

std::string cause(int err) { return std::strerror(err); }

// The folder part of PATH ("." when it has none) and the file name part.
void split_path(const std::string& path, std::string* folder, std::string* name) {
  const size_t slash = path.find_last_of('/');
  if (slash == std::string::npos) {
    *folder = ".";
    *name = path;
  } else {
    *folder = slash == 0 ? "/" : path.substr(0, slash);
    *name = path.substr(slash + 1);
  }
}

// The test hook's byte budget (safe_file.h): SIZE_MAX when KITH_TEST_DISK_FULL_AFTER is not set.
size_t disk_full_after() {
  const char* v = std::getenv("KITH_TEST_DISK_FULL_AFTER");
  if (!v || !*v) return SIZE_MAX;
  char* end = nullptr;
  const unsigned long long n = std::strtoull(v, &end, 10);
  return end && *end == '\0' ? size_t(n) : SIZE_MAX;
}

int sync_file(int fd) {
  const char* v = std::getenv("KITH_TEST_FSYNC_FAILS");
  if (v && std::strcmp(v, "1") == 0) {
    errno = EIO;
    return -1;
  }
  return ::fsync(fd);
}

bool write_all(int fd, const std::string& bytes, int* err) {
  size_t done = 0;
  const size_t budget = disk_full_after();
  while (done < bytes.size()) {
    size_t want = bytes.size() - done;
    if (done >= budget) {
      *err = ENOSPC;
      return false;
    }
    want = std::min(want, budget - done);  // a short write, then ENOSPC, as on a full disk
    const ssize_t n = ::write(fd, bytes.data() + done, want);
    if (n < 0) {
      if (errno == EINTR) continue;
      *err = errno;
      return false;
    }
    if (n == 0) {
      *err = EIO;
      return false;
    }
    done += size_t(n);
  }
  return true;
}

// Moves TMP to PATH; without `replace`, only if PATH does not exist (atomically where the file
// system can: renameat2's RENAME_NOREPLACE, else a hard link).
int move_into_place(const std::string& tmp, const std::string& path, bool replace) {
  if (replace) return ::rename(tmp.c_str(), path.c_str()) == 0 ? 0 : errno;
  if (::renameat2(AT_FDCWD, tmp.c_str(), AT_FDCWD, path.c_str(), RENAME_NOREPLACE) == 0) return 0;
  if (errno != EINVAL && errno != ENOSYS) return errno;
  if (::link(tmp.c_str(), path.c_str()) != 0) return errno;
  ::unlink(tmp.c_str());
  return 0;
}

}  // namespace

bool is_sqlite_file(const std::string& path) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC | O_NONBLOCK);
  if (fd < 0) return false;
  char head[16] = {};
  ssize_t got = 0;
  while (got < 16) {
    const ssize_t n = ::read(fd, head + got, size_t(16 - got));
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) break;
    got += n;
  }
  ::close(fd);
  return got == 16 && std::memcmp(head, "SQLite format 3\0", 16) == 0;
}

bool same_file(const std::string& a, const std::string& b) {
  struct stat sa {
  }, sb{};
  return ::stat(a.c_str(), &sa) == 0 && ::stat(b.c_str(), &sb) == 0 && sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}

std::string check_write_target(const std::string& path, const SafeWriteOptions& options) {
  if (path.empty()) return "no file name given";
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return "";  // nothing there (or a dangling link, replaced as a name)
  if (S_ISDIR(st.st_mode)) return path + ": is a folder";
  if (is_sqlite_file(path)) return path + ": a SQLite database (a session?) is there; kith will not overwrite it";
  for (const std::string& input : options.inputs)
    if (same_file(path, input)) return path + ": that is the input (" + input + "); kith does not write over it";
  if (!options.replace) return path + ": a file is already there; kith does not write over it";
  return "";
}

std::string check_write_target(const std::string& path, bool replace) {
  SafeWriteOptions options;
  options.replace = replace;
  return check_write_target(path, options);
}

std::string fresh_name(const std::string& path) {
  struct stat st {};
  if (::lstat(path.c_str(), &st) != 0) return path;
  std::string folder, name;
  split_path(path, &folder, &name);
  const size_t dot = name.find_last_of('.');
  const std::string stem = dot == std::string::npos || dot == 0 ? name : name.substr(0, dot);
  const std::string ext = dot == std::string::npos || dot == 0 ? "" : name.substr(dot);
  const std::string prefix = path.size() > name.size() ? path.substr(0, path.size() - name.size()) : "";
  for (int k = 2;; ++k) {
    const std::string candidate = prefix + stem + "-" + std::to_string(k) + ext;
    if (::lstat(candidate.c_str(), &st) != 0) return candidate;
  }
}

int create_new_file(const std::string& name) {
  return ::open(name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0666);
}

int create_temp_beside(const std::string& path, std::string* temp_path, std::string* error) {
  std::string folder, name;
  split_path(path, &folder, &name);
  std::random_device entropy;
  std::mt19937_64 draw((uint64_t(entropy()) << 32) ^ entropy() ^ (uint64_t(::getpid()) << 16));
  int err = EEXIST;
  for (int attempt = 0; attempt < 64 && err == EEXIST; ++attempt) {
    char suffix[24];
    std::snprintf(suffix, sizeof suffix, "%012llx", static_cast<unsigned long long>(draw() & 0xffffffffffffULL));
    const std::string candidate = folder + "/." + name + "." + suffix + ".tmp";
    const int fd = create_new_file(candidate);
    if (fd >= 0) {
      *temp_path = candidate;
      return fd;
    }
    err = errno;
  }
  *error = path + ": cannot write (" + cause(err) + ")";
  return -1;
}

std::string write_file_safely(const std::string& path, const std::string& bytes, const SafeWriteOptions& options) {
  if (std::string problem = check_write_target(path, options); !problem.empty()) return problem;
  std::string tmp, error;
  const int fd = create_temp_beside(path, &tmp, &error);
  if (fd < 0) return error;
  auto fail = [&](const std::string& message) {
    ::unlink(tmp.c_str());
    return message;
  };
  int err = 0;
  if (!write_all(fd, bytes, &err)) {
    ::close(fd);
    return fail(path + ": writing failed (" + cause(err) + ")");
  }
  if (sync_file(fd) != 0) {
    err = errno;
    ::close(fd);
    return fail(path + ": writing failed (" + cause(err) + ")");
  }
  if (::close(fd) != 0) return fail(path + ": writing failed (" + cause(errno) + ")");
  // Checked again just before the rename: a session may have appeared there meanwhile.
  if (std::string problem = check_write_target(path, options); !problem.empty()) return fail(problem);
  if (const int e = move_into_place(tmp, path, options.replace); e != 0)
    return fail(e == EEXIST ? path + ": a file is already there; kith does not write over it"
                            : path + ": cannot replace (" + cause(e) + ")");
  std::string folder, name;
  split_path(path, &folder, &name);
  fsync_folder(folder);
  return "";
}

// Best effort: the rename is done and the new file complete; a folder that cannot be synced only
// means the rename might not survive a power cut.
void fsync_folder(const std::string& folder) {
  const int fd = ::open(folder.empty() ? "." : folder.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return;
  ::fsync(fd);
  ::close(fd);
}

int commit_temp_file(const std::string& tmp, const std::string& path, bool replace, std::string* error) {
  const int fd = ::open(tmp.c_str(), O_RDONLY | O_CLOEXEC | O_NOFOLLOW);
  if (fd < 0 || sync_file(fd) != 0) {
    const int err = errno;
    if (fd >= 0) ::close(fd);
    *error = path + ": writing failed (" + cause(err) + ")";
    return err;
  }
  ::close(fd);
  if (const int e = move_into_place(tmp, path, replace); e != 0) {
    *error = e == EEXIST ? path + ": a file is already there; kith does not write over it"
                         : path + ": cannot replace (" + cause(e) + ")";
    return e;
  }
  std::string folder, name;
  split_path(path, &folder, &name);
  fsync_folder(folder);
  return 0;
}

}  // namespace kith
