// SessionStore: creating, opening and inspecting a session file. Its parts: session_sqlite.h
// (SQLite helpers), session_file.* (schema, checks, locks), session_store_impl.h (the open file's
// state), session_store_data.cpp (reads and writes).
#include "solver/session/session_store.h"

#include <fcntl.h>
#include <sqlite3.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <sys/sysmacros.h>
#include <unistd.h>

#include <atomic>
#include <chrono>
#include <cmath>
#include <condition_variable>
#include <cstring>
#include <ctime>
#include <exception>
#include <filesystem>
#include <fstream>
#include <mutex>
#include <random>
#include <set>
#include <sstream>
#include <thread>

#include "solver/io/safe_file.h"
#include "solver/session/session_store_impl.h"

namespace kith {

namespace fs = std::filesystem;
using Kind = SessionError::Kind;

const char* to_string(SessionError::Kind kind) {
  switch (kind) {
    case Kind::kNotFound: return "not found";
    case Kind::kExists: return "exists";
    case Kind::kInUse: return "in use";
    case Kind::kNotSession: return "not a session";
    case Kind::kTruncated: return "truncated";
    case Kind::kCorrupt: return "corrupt";
    case Kind::kNewerVersion: return "newer version";
    case Kind::kReadOnly: return "read-only";
    case Kind::kInvalid: return "invalid";
    case Kind::kIo: return "input/output";
  }
  return "unknown";
}

namespace {

// A FIFO, a device or a folder is refused before anything opens it (opening a FIFO would wait for
// a writer forever, and /dev/zero never ends).
void refuse_unless_regular(const std::string& path, const struct stat& st) {
  if (!S_ISREG(st.st_mode)) throw SessionError(Kind::kNotSession, path + ": not a regular file, so not a kith session");
}

}  // namespace

// ==== [SECTION] create / open / inspect =========================================================

SessionStore::SessionStore(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
SessionStore::~SessionStore() = default;

SessionInfo SessionStore::inspect(const std::string& path) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0)
    throw SessionError(errno == ENOENT ? Kind::kNotFound : Kind::kIo, path + ": " + std::strerror(errno));
  refuse_unless_regular(path, st);
  const FileKey key{st.st_dev, st.st_ino};
  if (is_open_here(key)) throw SessionError(Kind::kInUse, in_use_message(path, key, true));
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) throw SessionError(Kind::kIo, path + ": cannot read: " + std::strerror(errno));
  HeaderFacts facts;
  bool in_use = false;
  try {
    facts = check_header(fd, path);
    if (::flock(fd, LOCK_SH | LOCK_NB) != 0) in_use = true;
  } catch (...) {
    ::close(fd);
    throw;
  }
  ::close(fd);
  SessionInfo info = check_with_sqlite(path, facts.wal_present);
  info.in_use = in_use;
  return info;
}

std::unique_ptr<SessionStore> SessionStore::open(const std::string& path, const SessionOpenOptions& options) {
  if (!little_endian()) throw SessionError(Kind::kIo, "sessions need a little-endian machine");
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0)
    throw SessionError(errno == ENOENT ? Kind::kNotFound : Kind::kIo,
                       path + ": " + (errno == ENOENT ? std::string("no such session file") : std::strerror(errno)));
  refuse_unless_regular(path, st);
  auto impl = std::make_unique<Impl>();
  impl->path = path;
  impl->read_only = options.read_only;
  impl->keep = std::max(1, options.checkpoints_to_keep);
  impl->key = {st.st_dev, st.st_ino};
  if (!register_open(impl->key)) throw SessionError(Kind::kInUse, in_use_message(path, impl->key, true));
  impl->registered = true;

  // The descriptor that holds the lock; SQLite's connections come later and close first.
  impl->lock_fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (impl->lock_fd < 0) throw SessionError(Kind::kIo, path + ": cannot read: " + std::strerror(errno));
  if (!options.read_only) {
    if (::access(path.c_str(), W_OK) != 0)
      throw SessionError(Kind::kReadOnly, path + ": the file is read-only on disk; open it read-only "
                                                 "(kith open --read-only) or change its permissions");
    if (::flock(impl->lock_fd, LOCK_EX | LOCK_NB) != 0)
      throw SessionError(Kind::kInUse, in_use_message(path, impl->key, false));
  }
  const HeaderFacts facts = check_header(impl->lock_fd, path);
  const SessionInfo info = check_with_sqlite(path, facts.wal_present);

  if (options.read_only) {
    // Nobody writing and no WAL: immutable (creates nothing). A WAL: a live writer or a crash, read
    // through it.
    open_db(impl->db, path, file_uri(path, facts.wal_present ? "mode=ro" : "mode=ro&immutable=1"),
            SQLITE_OPEN_READONLY);
    impl->count_items();
    return std::unique_ptr<SessionStore>(new SessionStore(std::move(impl)));
  }

  open_db(impl->db, path, file_uri(path, "mode=rw"), SQLITE_OPEN_READWRITE);
  exec(impl->db, "PRAGMA journal_mode = WAL");
  impl->configure_main_connection();
  if (info.schema_version < kSessionSchemaVersion) {
    // Backup first (VACUUM INTO reads through any WAL), then every step in one transaction.
    std::string backup = path + ".schema-v" + std::to_string(info.schema_version) + ".bak";
    for (int k = 1; fs::exists(backup); ++k)
      backup = path + ".schema-v" + std::to_string(info.schema_version) + "-" + std::to_string(k) + ".bak";
    Stmt vac(impl->db, "VACUUM INTO ?");
    vac.bind(1, backup).run();
    Transaction t(impl->db);
    for (int v = info.schema_version; v < kSessionSchemaVersion; ++v) exec(impl->db, kMigrations[size_t(v - 1)]);
    exec(impl->db, ("PRAGMA user_version = " + std::to_string(kSessionSchemaVersion)).c_str());
    t.commit();
    impl->backup = backup;
  }
  impl->count_items();
  impl->start_writer();
  return std::unique_ptr<SessionStore>(new SessionStore(std::move(impl)));
}

std::unique_ptr<SessionStore> SessionStore::create(const std::string& path, const Collection& collection,
                                                   const SessionSettings& settings,
                                                   const SessionCreateOptions& options) {
  if (!little_endian()) throw SessionError(Kind::kIo, "sessions need a little-endian machine");
  std::string error;
  if (!settings.IsValid(&error, collection.ids.size()))
    throw SessionError(Kind::kInvalid, path + ": cannot create: " + error);
  validate_collection(path, collection);
  std::error_code ec;
  const fs::path target = fs::absolute(path);
  remove_stale_creations(target);  // what a killed create left beside the target
  const bool exists = fs::exists(fs::symlink_status(path, ec));
  if (exists && !options.overwrite)
    throw SessionError(Kind::kExists, path + ": already exists; kith will not overwrite it (use --force to replace "
                                             "it, or choose another name)");
  // A session's write-ahead log (-wal) and its index (-shm) left beside the target by a writer
  // that was killed would be read as part of the new file: its frames would come back. They go
  // with the file they belong to, only with --force, and only while nobody holds that file.
  const std::vector<std::string> logs = log_files_beside(path);
  if (!logs.empty() && !options.overwrite)
    throw SessionError(Kind::kExists, path + ": " + logs.front() +
                                          " is there, the log of an earlier session of that "
                                          "name; a new session would take its changes in. Use --force to remove "
                                          "it, or choose another name");
  // Never replace a session another process is writing: its lock is held from here to the rename.
  int held = -1;
  auto release = [&] {
    if (held >= 0) ::close(held);
    held = -1;
  };
  if (exists) {
    struct stat st {};
    if (::stat(path.c_str(), &st) == 0) {
      const FileKey key{st.st_dev, st.st_ino};
      if (is_open_here(key)) throw SessionError(Kind::kInUse, in_use_message(path, key, true));
      held = ::open(path.c_str(), O_RDONLY | O_CLOEXEC | O_NONBLOCK);  // a FIFO there must not hang
      if (held >= 0 && ::flock(held, LOCK_EX | LOCK_NB) != 0) {
        release();
        throw SessionError(Kind::kInUse, in_use_message(path, key, false));
      }
    }
  }
  std::random_device rd;
  const std::string tmp = creating_name(target, rd());
  auto cleanup = [&] {
    fs::remove(tmp, ec);
    fs::remove(tmp + "-wal", ec);
    fs::remove(tmp + "-shm", ec);
    fs::remove(tmp + "-journal", ec);
  };
  // The temporary is made new (never a file or link planted there) and locked while it is built,
  // so the next create can tell a live one from one left by a killed process.
  const int tmp_fd = create_new_file(tmp);
  if (tmp_fd < 0) {
    const int err = errno;
    release();
    throw SessionError(Kind::kIo, path + ": cannot create: " + std::strerror(err));
  }
  ::flock(tmp_fd, LOCK_EX);
  auto finish = [&] {
    cleanup();
    ::close(tmp_fd);
    release();
  };
  try {
    // Everything goes into the temporary file in one transaction; the staging Impl is only used
    // for its judgment checks and inserts (no lock, no writer thread).
    Impl staging;
    staging.path = path;  // for messages
    Db& d = staging.db;
    open_db(d, tmp, file_uri(tmp, "mode=rwc"), SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
    exec(d, "PRAGMA page_size = 8192");
    exec(d, ("PRAGMA application_id = " + std::to_string(kSessionApplicationId)).c_str());
    exec(d, ("PRAGMA user_version = " + std::to_string(kSessionSchemaVersion)).c_str());
    exec(d, "PRAGMA journal_mode = WAL");
    exec(d, "PRAGMA synchronous = FULL");
    {
      Transaction t(d);
      write_schema_and_collection(d, collection, settings, options.reading);
      staging.items = collection.size();
      for (const Judgment& j : options.judgments) staging.insert_judgment(j);
      t.commit();
    }
    exec(d, "PRAGMA wal_checkpoint(TRUNCATE)");
    d.close();  // last connection: the WAL is folded in and removed
    if (exists || !logs.empty()) {
      for (const std::string& log : log_files_beside(path))
        if (::unlink(log.c_str()) != 0 && errno != ENOENT)
          throw SessionError(Kind::kIo, path + ": cannot remove " + log + ": " + std::strerror(errno));
    }
    // SQLite built the file in place, so it takes the safe writer's last steps (fsync, move into
    // place, fsync of the folder) rather than write_file_safely; without `exists` the move is
    // refused if the name appeared meanwhile: never clobber.
    if (std::string error; const int e = commit_temp_file(tmp, target.string(), exists, &error))
      throw SessionError(e == EEXIST ? Kind::kExists : Kind::kIo, error);
  } catch (...) {
    finish();
    throw;
  }
  finish();
  SessionOpenOptions o;
  o.checkpoints_to_keep = options.checkpoints_to_keep;
  return open(path, o);
}

}  // namespace kith
