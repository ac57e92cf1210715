// SessionStore implementation. Index:
//   [SECTION] SQLite helpers
//   [SECTION] schema
//   [SECTION] checking a file without changing it
//   [SECTION] locks
//   [SECTION] Impl and the checkpoint writer
//   [SECTION] create / open / inspect
//   [SECTION] reads and writes
#include "solver/session/session_store.h"

#include <fcntl.h>
#include <sqlite3.h>
#include <sys/file.h>
#include <sys/sysmacros.h>
#include <sys/stat.h>
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

double now_seconds() {
  return std::chrono::duration<double>(std::chrono::system_clock::now().time_since_epoch()).count();
}

// ==== [SECTION] SQLite helpers ==================================================================

struct Db {
  sqlite3* db = nullptr;
  std::string path;
  Db() = default;
  Db(const Db&) = delete;
  Db& operator=(const Db&) = delete;
  ~Db() { close(); }
  void close() {
    if (db) sqlite3_close_v2(db);
    db = nullptr;
  }
};

[[noreturn]] void fail_sql(sqlite3* db, const std::string& path, const std::string& what) {
  const int code = db ? sqlite3_extended_errcode(db) : SQLITE_ERROR;
  const std::string msg = db ? sqlite3_errmsg(db) : "out of memory";
  const int primary = code & 0xff;
  Kind kind = Kind::kIo;
  if (primary == SQLITE_CORRUPT || primary == SQLITE_NOTADB) kind = Kind::kCorrupt;
  else if (primary == SQLITE_BUSY || primary == SQLITE_LOCKED) kind = Kind::kInUse;
  else if (primary == SQLITE_READONLY) kind = Kind::kReadOnly;
  else if (primary == SQLITE_CONSTRAINT) kind = Kind::kInvalid;
  throw SessionError(kind, path + ": " + what + ": " + msg);
}

void exec(Db& d, const char* sql) {
  char* err = nullptr;
  if (sqlite3_exec(d.db, sql, nullptr, nullptr, &err) != SQLITE_OK) {
    sqlite3_free(err);
    fail_sql(d.db, d.path, std::string("running '") + std::string(sql).substr(0, 60) + "'");
  }
}

class Stmt {
 public:
  Stmt(Db& d, const char* sql) : d_(d) {
    if (sqlite3_prepare_v2(d.db, sql, -1, &s_, nullptr) != SQLITE_OK)
      fail_sql(d.db, d.path, std::string("preparing '") + std::string(sql).substr(0, 60) + "'");
  }
  ~Stmt() { sqlite3_finalize(s_); }
  Stmt(const Stmt&) = delete;
  Stmt& operator=(const Stmt&) = delete;

  Stmt& bind(int i, int64_t v) { return check(sqlite3_bind_int64(s_, i, v)); }
  Stmt& bind(int i, int v) { return check(sqlite3_bind_int64(s_, i, v)); }
  Stmt& bind(int i, double v) { return check(sqlite3_bind_double(s_, i, v)); }
  Stmt& bind(int i, const std::string& v) {
    return check(sqlite3_bind_text(s_, i, v.data(), int(v.size()), SQLITE_TRANSIENT));
  }
  Stmt& bind_blob(int i, const void* p, size_t n) {
    return check(sqlite3_bind_blob64(s_, i, n ? p : "", n, SQLITE_TRANSIENT));
  }
  Stmt& bind_null(int i) { return check(sqlite3_bind_null(s_, i)); }
  // true: a row is ready; false: done.
  bool step() {
    const int rc = sqlite3_step(s_);
    if (rc == SQLITE_ROW) return true;
    if (rc == SQLITE_DONE) return false;
    fail_sql(d_.db, d_.path, "reading or writing");
  }
  void run() {
    step();
    reset();
  }
  void reset() {
    sqlite3_reset(s_);
    sqlite3_clear_bindings(s_);
  }
  int64_t i64(int c) const { return sqlite3_column_int64(s_, c); }
  double f64(int c) const { return sqlite3_column_double(s_, c); }
  bool is_null(int c) const { return sqlite3_column_type(s_, c) == SQLITE_NULL; }
  std::string text(int c) const {
    const auto* p = reinterpret_cast<const char*>(sqlite3_column_text(s_, c));
    return p ? std::string(p, size_t(sqlite3_column_bytes(s_, c))) : std::string();
  }
  std::pair<const void*, size_t> blob(int c) const {
    const void* p = sqlite3_column_blob(s_, c);
    return {p, size_t(sqlite3_column_bytes(s_, c))};
  }

 private:
  Stmt& check(int rc) {
    if (rc != SQLITE_OK) fail_sql(d_.db, d_.path, "binding a value");
    return *this;
  }
  Db& d_;
  sqlite3_stmt* s_ = nullptr;
};

// A transaction that rolls back unless committed.
class Transaction {
 public:
  explicit Transaction(Db& d) : d_(d) { exec(d_, "BEGIN IMMEDIATE"); }
  ~Transaction() {
    if (!done_) sqlite3_exec(d_.db, "ROLLBACK", nullptr, nullptr, nullptr);
  }
  void commit() {
    exec(d_, "COMMIT");
    done_ = true;
  }

 private:
  Db& d_;
  bool done_ = false;
};

void open_db(Db& d, const std::string& path, const std::string& uri, int flags) {
  d.path = path;
  const int rc = sqlite3_open_v2(uri.c_str(), &d.db, flags | SQLITE_OPEN_URI | SQLITE_OPEN_NOMUTEX, nullptr);
  if (rc != SQLITE_OK) fail_sql(d.db, path, "opening");
  sqlite3_extended_result_codes(d.db, 1);
  sqlite3_busy_timeout(d.db, 10000);
}

// file: URI for a path (percent-encodes what the URI syntax reserves).
std::string file_uri(const std::string& path, const std::string& query) {
  std::string abs = fs::absolute(path).string();
  std::string out = "file:";
  for (unsigned char c : abs) {
    if (c == '%' || c == '?' || c == '#' || c < 0x20) {
      char buf[4];
      std::snprintf(buf, sizeof buf, "%%%02X", c);
      out += buf;
    } else {
      out += char(c);
    }
  }
  return out + "?" + query;
}

static_assert(sizeof(double) == 8, "features are stored as IEEE-754 float64");
bool little_endian() {
  const uint16_t one = 1;
  unsigned char b;
  std::memcpy(&b, &one, 1);
  return b == 1;
}


// ==== [SECTION] schema ==========================================================================

constexpr const char* kApplicationMarker = "kith session";

// Version 1. Documented in docs/session-schema.md; keep the two in step.
constexpr const char* kSchemaV1 = R"sql(
CREATE TABLE meta(key TEXT PRIMARY KEY, value TEXT NOT NULL) WITHOUT ROWID;
CREATE TABLE settings(key TEXT PRIMARY KEY, value TEXT NOT NULL) WITHOUT ROWID;
CREATE TABLE feature_columns(col INTEGER PRIMARY KEY, name TEXT NOT NULL);
CREATE TABLE tag_columns(col INTEGER PRIMARY KEY, name TEXT NOT NULL);
CREATE TABLE items(
  item INTEGER PRIMARY KEY,
  id TEXT NOT NULL UNIQUE,
  picture TEXT,
  features BLOB NOT NULL);
CREATE TABLE item_tags(
  item INTEGER NOT NULL REFERENCES items(item),
  col INTEGER NOT NULL REFERENCES tag_columns(col),
  value TEXT NOT NULL,
  PRIMARY KEY(item, col)) WITHOUT ROWID;
CREATE TABLE people(
  person INTEGER PRIMARY KEY,
  name TEXT NOT NULL UNIQUE,
  colour TEXT NOT NULL DEFAULT '');
CREATE TABLE judgments(
  judgment INTEGER PRIMARY KEY AUTOINCREMENT,
  anchor INTEGER NOT NULL REFERENCES items(item),
  nearer INTEGER NOT NULL REFERENCES items(item),
  farther INTEGER NOT NULL REFERENCES items(item),
  person INTEGER REFERENCES people(person),
  time REAL NOT NULL,
  kind TEXT NOT NULL,
  weight REAL NOT NULL CHECK (weight > 0),
  retracted INTEGER NOT NULL DEFAULT 0 CHECK (retracted IN (0, 1)),
  retracted_time REAL);
CREATE TRIGGER judgments_are_never_deleted BEFORE DELETE ON judgments
  BEGIN SELECT RAISE(ABORT, 'judgments are never deleted; retract them instead'); END;
CREATE TABLE pins(
  item INTEGER PRIMARY KEY REFERENCES items(item),
  x REAL NOT NULL, y REAL NOT NULL, z REAL,
  time REAL NOT NULL);
CREATE TABLE checkpoints(
  checkpoint INTEGER PRIMARY KEY,
  time REAL NOT NULL,
  iteration INTEGER NOT NULL,
  items INTEGER NOT NULL,
  dims INTEGER NOT NULL,
  positions BLOB NOT NULL);
)sql";

// Version 2 adds the events table: what happened that is not a judgment (a "can't tell" answer,
// a person added or renamed, a re-asked question), as JSON, kept like judgments (never deleted).
constexpr const char* kEventsTable = R"sql(
CREATE TABLE events(
  event INTEGER PRIMARY KEY AUTOINCREMENT,
  time REAL NOT NULL,
  kind TEXT NOT NULL,
  detail TEXT NOT NULL DEFAULT '{}');
CREATE TRIGGER events_are_never_deleted BEFORE DELETE ON events
  BEGIN SELECT RAISE(ABORT, 'events are never deleted'); END;
)sql";

const char* const kRequiredTables[] = {"meta",   "settings",  "feature_columns", "tag_columns", "items",
                                       "item_tags", "people", "judgments",       "pins",        "checkpoints",
                                       "events"};

// Migration steps: kMigrations[v - 1] takes a file from version v to v + 1; a step is SQL run
// inside the migration's transaction (after the backup copy is written).
const std::vector<const char*> kMigrations = {kEventsTable};
static_assert(kSessionSchemaVersion == 2, "a new schema version needs its migration step here");
static_assert(kSessionSchemaVersion >= 1, "schema versions start at 1");

// ==== [SECTION] checking a file without changing it =============================================

uint32_t be32(const unsigned char* p) {
  return (uint32_t(p[0]) << 24) | (uint32_t(p[1]) << 16) | (uint32_t(p[2]) << 8) | uint32_t(p[3]);
}

bool file_nonempty(const std::string& p) {
  std::error_code ec;
  return fs::exists(p, ec) && fs::file_size(p, ec) > 0;
}

struct HeaderFacts {
  int user_version = 0;
  bool wal_present = false;
};

// The raw 100-byte SQLite header, read through `fd` (so no other descriptor of the file is opened
// and closed; see the header comment about POSIX locks).
HeaderFacts check_header(int fd, const std::string& path) {
  struct stat st {};
  if (fstat(fd, &st) != 0) throw SessionError(Kind::kIo, path + ": cannot read: " + std::strerror(errno));
  if (!S_ISREG(st.st_mode)) throw SessionError(Kind::kNotSession, path + ": not a regular file, so not a kith session");
  if (st.st_size == 0)
    throw SessionError(Kind::kNotSession, path + ": the file is empty, so it is not a kith session");
  unsigned char h[100] = {};
  const ssize_t got = pread(fd, h, sizeof h, 0);
  if (got < 0) throw SessionError(Kind::kIo, path + ": cannot read: " + std::strerror(errno));
  static const char kMagic[16] = "SQLite format 3";  // 15 characters and a NUL
  const bool magic = std::memcmp(h, kMagic, size_t(std::min<ssize_t>(got, 16))) == 0;
  if (!magic)
    throw SessionError(Kind::kNotSession,
                       path + ": not a kith session: it is not a SQLite database (its first bytes do not read "
                              "'SQLite format 3')");
  if (got < 100)
    throw SessionError(Kind::kTruncated, path + ": truncated: only " + std::to_string(got) +
                                             " bytes, shorter than a SQLite header (100 bytes)");
  HeaderFacts facts;
  facts.user_version = int(be32(h + 60));
  const uint32_t app_id = be32(h + 68);
  if (app_id != uint32_t(kSessionApplicationId))
    throw SessionError(Kind::kNotSession, path + ": not a kith session: a SQLite database made by another program "
                                                 "(application id " + std::to_string(app_id) + ", kith's is " +
                                                 std::to_string(kSessionApplicationId) + ")");
  uint32_t page_size = (uint32_t(h[16]) << 8) | h[17];
  if (page_size == 1) page_size = 65536;
  const uint32_t pages = be32(h + 28);
  const bool size_valid = be32(h + 24) == be32(h + 92) && pages > 0;
  facts.wal_present = file_nonempty(path + "-wal");
  // With a WAL present the main file may lag behind (a checkpoint in progress); the WAL is then
  // replayed by SQLite and the size check would be wrong.
  if (!facts.wal_present && size_valid && uint64_t(pages) * page_size > uint64_t(st.st_size))
    throw SessionError(Kind::kTruncated, path + ": truncated: the file has " + std::to_string(st.st_size) +
                                             " bytes but its header says " + std::to_string(uint64_t(pages) * page_size) +
                                             " (copied or downloaded only in part?)");
  if (facts.user_version > kSessionSchemaVersion)
    throw SessionError(Kind::kNewerVersion,
                       path + ": made by a newer kith (session schema version " + std::to_string(facts.user_version) +
                           "; this kith reads versions up to " + std::to_string(kSessionSchemaVersion) +
                           "). Open it with a newer kith; the file was not changed");
  return facts;
}

// Checks with SQLite on a read-only connection. No -wal: immutable=1, which takes no locks and
// creates no files. A -wal present (a live writer, or a crash): mode=ro, which reads the WAL.
SessionInfo check_with_sqlite(const std::string& path, bool wal_present) {
  Db d;
  open_db(d, path, file_uri(path, wal_present ? "mode=ro" : "mode=ro&immutable=1"), SQLITE_OPEN_READONLY);
  auto corrupt = [&](const std::string& what) {
    return SessionError(Kind::kCorrupt, path + ": damaged: " + what +
                                            ". The file was not changed; a backup copy, if there is one, may help");
  };
  SessionInfo info;
  std::string problems;
  try {
    Stmt q(d, "PRAGMA quick_check(5)");
    while (q.step()) {
      const std::string line = q.text(0);
      if (line != "ok") problems += (problems.empty() ? "" : "; ") + line;
    }
    Stmt v(d, "PRAGMA user_version");
    v.step();
    info.schema_version = int(v.i64(0));
  } catch (const SessionError& e) {
    std::string what = e.what();
    if (what.rfind(path + ": ", 0) == 0) what = what.substr(path.size() + 2);
    throw corrupt("SQLite cannot read it (" + what + ")");
  }
  if (!problems.empty()) throw corrupt("SQLite's check found: " + problems);
  if (info.schema_version > kSessionSchemaVersion)
    throw SessionError(Kind::kNewerVersion, path + ": made by a newer kith (session schema version " +
                                                std::to_string(info.schema_version) + "; this kith reads versions up to " +
                                                std::to_string(kSessionSchemaVersion) + "). The file was not changed");
  {
    Stmt t(d, "SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = 'meta'");
    t.step();
    if (t.i64(0) == 0)
      throw SessionError(Kind::kNotSession,
                         path + ": not a kith session: a SQLite database with kith's application id but no meta table");
  }
  {
    Stmt m(d, "SELECT value FROM meta WHERE key = 'application'");
    if (!m.step() || m.text(0) != kApplicationMarker)
      throw SessionError(Kind::kNotSession, path + ": not a kith session: its meta table does not say 'kith session'");
  }
  if (info.schema_version < 1)
    throw SessionError(Kind::kNotSession, path + ": not a kith session: no schema version (user_version 0)");
  if (info.schema_version == kSessionSchemaVersion) {
    for (const char* table : kRequiredTables) {
      Stmt t(d, "SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = ?");
      t.bind(1, std::string(table));
      t.step();
      if (t.i64(0) == 0) throw corrupt(std::string("the table '") + table + "' is missing");
    }
    Stmt c(d, "SELECT (SELECT count(*) FROM items), (SELECT count(*) FROM judgments)");
    c.step();
    info.items = size_t(c.i64(0));
    info.judgments = size_t(c.i64(1));
  }
  return info;
}

// ==== [SECTION] locks ===========================================================================

// Files this process has open as sessions, by (device, inode).
std::mutex g_open_mutex;
std::set<std::pair<dev_t, ino_t>> g_open_files;

struct FileKey {
  dev_t dev = 0;
  ino_t ino = 0;
};

// Registers a file as open in this process; false if it already is.
bool register_open(FileKey key) {
  std::lock_guard<std::mutex> lock(g_open_mutex);
  return g_open_files.insert({key.dev, key.ino}).second;
}
void unregister_open(FileKey key) {
  std::lock_guard<std::mutex> lock(g_open_mutex);
  g_open_files.erase({key.dev, key.ino});
}

// The pid holding a flock on an inode, from /proc/locks (0 if not found).
long lock_holder(FileKey key) {
  std::ifstream in("/proc/locks");
  std::string line;
  while (std::getline(in, line)) {
    std::istringstream s(line);
    std::string num, type, mode, access, pid, where;
    s >> num >> type;
    if (type == "->") s >> type;
    s >> mode >> access >> pid >> where;
    if (type != "FLOCK") continue;
    // where: MAJOR:MINOR:INODE in hex:hex:decimal
    unsigned maj = 0, min = 0;
    unsigned long long ino = 0;
    if (std::sscanf(where.c_str(), "%x:%x:%llu", &maj, &min, &ino) == 3 && ino == key.ino &&
        maj == major(key.dev) && min == minor(key.dev))
      return std::atol(pid.c_str());
  }
  return 0;
}

std::string in_use_message(const std::string& path, FileKey key, bool this_process) {
  if (this_process) return path + ": already open in this kith process; close it there first";
  const long pid = lock_holder(key);
  return path + ": open in another kith process" + (pid > 0 ? " (process " + std::to_string(pid) + ")" : "") +
         ", so it cannot be opened for writing here. Open it read-only (kith open --read-only), or close it there "
         "first";
}

}  // namespace

// ==== [SECTION] Impl and the checkpoint writer ==================================================

struct SessionStore::Impl {
  std::string path;
  bool read_only = false;
  int keep = 3;
  std::string backup;
  FileKey key;
  bool registered = false;
  int lock_fd = -1;

  mutable std::mutex mutex;  // guards db
  mutable Db db;

  // Checkpoint writer: latest-wins slot, its own connection.
  std::mutex slot_mutex;
  std::condition_variable slot_cv;
  std::optional<std::pair<Points, uint64_t>> slot;
  bool writing = false;
  bool stopping = false;
  std::exception_ptr writer_error;
  std::thread writer;

  ~Impl() {
    stop_writer();
    db.close();
    if (lock_fd >= 0) ::close(lock_fd);  // after every connection is closed (POSIX locks)
    if (registered) unregister_open(key);
  }

  void require_writable() const {
    if (read_only) throw SessionError(Kind::kReadOnly, path + ": opened read-only; changes are not allowed");
  }

  void start_writer() {
    writer = std::thread([this] { writer_loop(); });
  }

  void stop_writer() {
    if (!writer.joinable()) return;
    {
      std::lock_guard<std::mutex> lock(slot_mutex);
      stopping = true;
    }
    slot_cv.notify_all();
    writer.join();
  }

  void writer_loop() {
    Db wdb;
    try {
      open_db(wdb, path, file_uri(path, "mode=rw"), SQLITE_OPEN_READWRITE);
      // A power cut may lose the newest checkpoints (the map is recomputed from an older one); a
      // judgment is never in this connection's transactions.
      exec(wdb, "PRAGMA synchronous = NORMAL");
    } catch (...) {
      std::lock_guard<std::mutex> lock(slot_mutex);
      writer_error = std::current_exception();
    }
    for (;;) {
      std::pair<Points, uint64_t> job;
      {
        std::unique_lock<std::mutex> lock(slot_mutex);
        slot_cv.wait(lock, [&] { return stopping || slot.has_value(); });
        if (!slot) return;  // stopping and nothing left
        job = std::move(*slot);
        slot.reset();
        writing = true;
      }
      std::exception_ptr error;
      try {
        if (!wdb.db) std::rethrow_exception(writer_error);
        write_checkpoint_on(wdb, job.first, job.second);
        // Copy the WAL into the main file here, off the caller's thread, so the main
        // connection's commits rarely have a WAL checkpoint to do.
        sqlite3_wal_checkpoint_v2(wdb.db, nullptr, SQLITE_CHECKPOINT_PASSIVE, nullptr, nullptr);
      } catch (...) {
        error = std::current_exception();
      }
      {
        std::lock_guard<std::mutex> lock(slot_mutex);
        writing = false;
        if (error) writer_error = error;
      }
      slot_cv.notify_all();
    }
  }

  int64_t write_checkpoint_on(Db& d, const Points& positions, uint64_t iteration) {
    if (positions.rows() != Eigen::Index(item_count_unlocked_on(d)))
      throw SessionError(Kind::kInvalid, path + ": a map checkpoint needs one row per item (" +
                                             std::to_string(positions.rows()) + " rows given)");
    if (positions.cols() != 2 && positions.cols() != 3)
      throw SessionError(Kind::kInvalid, path + ": a map checkpoint must be 2-D or 3-D");
    Transaction t(d);
    Stmt ins(d, "INSERT INTO checkpoints(time, iteration, items, dims, positions) VALUES (?, ?, ?, ?, ?)");
    ins.bind(1, now_seconds()).bind(2, int64_t(iteration)).bind(3, int64_t(positions.rows()));
    ins.bind(4, int64_t(positions.cols())).bind_blob(5, positions.data(), size_t(positions.size()) * 8);
    ins.run();
    const int64_t id = sqlite3_last_insert_rowid(d.db);
    Stmt del(d, "DELETE FROM checkpoints WHERE checkpoint NOT IN "
                "(SELECT checkpoint FROM checkpoints ORDER BY checkpoint DESC LIMIT ?)");
    del.bind(1, int64_t(std::max(keep, 1))).run();
    t.commit();
    return id;
  }

  size_t items = 0;  // fixed when the session is created; set once on open
  size_t item_count_unlocked_on(Db&) const { return items; }
  void count_items() {
    Stmt c(db, "SELECT count(*) FROM items");
    c.step();
    items = size_t(c.i64(0));
  }

  int64_t person_id(const std::string& name, const std::string& colour) {
    Stmt f(db, "SELECT person FROM people WHERE name = ?");
    f.bind(1, name);
    if (f.step()) return f.i64(0);
    Stmt ins(db, "INSERT INTO people(name, colour) VALUES (?, ?)");
    ins.bind(1, name).bind(2, colour).run();
    return sqlite3_last_insert_rowid(db.db);
  }

  void check_item(int64_t item, const char* what) {
    const size_t n = item_count_unlocked_on(db);
    if (item < 0 || size_t(item) >= n)
      throw SessionError(Kind::kInvalid, path + ": " + what + " " + std::to_string(item) +
                                             " is not an item of this session (it has " + std::to_string(n) + ")");
  }

  int64_t insert_judgment(const Judgment& j) {
    check_item(j.anchor, "judgment anchor");
    check_item(j.nearer, "judgment nearer item");
    check_item(j.farther, "judgment farther item");
    if (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther)
      throw SessionError(Kind::kInvalid, path + ": a judgment needs three different items");
    if (!(j.weight > 0) || !std::isfinite(j.weight))
      throw SessionError(Kind::kInvalid, path + ": a judgment's weight must be > 0");
    Stmt ins(db, "INSERT INTO judgments(anchor, nearer, farther, person, time, kind, weight, retracted, "
                 "retracted_time) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)");
    ins.bind(1, int64_t(j.anchor)).bind(2, int64_t(j.nearer)).bind(3, int64_t(j.farther));
    if (j.person.empty()) ins.bind_null(4);
    else ins.bind(4, person_id(j.person, ""));
    const double t = j.time > 0 ? j.time : now_seconds();
    ins.bind(5, t).bind(6, std::string(to_string(j.kind))).bind(7, j.weight).bind(8, int64_t(j.retracted ? 1 : 0));
    if (j.retracted) ins.bind(9, t);
    else ins.bind_null(9);
    ins.run();
    return sqlite3_last_insert_rowid(db.db);
  }

  void configure_main_connection() {
    exec(db, "PRAGMA foreign_keys = ON");
    // FULL: the WAL is fsynced at every commit, so an acknowledged change survives a power cut.
    exec(db, "PRAGMA synchronous = FULL");
    exec(db, "PRAGMA journal_size_limit = 67108864");
  }
};

namespace {

void write_settings(Db& d, const SessionSettings& s) {
  Stmt up(d, "INSERT INTO settings(key, value) VALUES (?, ?) ON CONFLICT(key) DO UPDATE SET value = excluded.value");
  auto put = [&](const char* key, const std::string& value) { up.bind(1, std::string(key)).bind(2, value).run(); };
  auto num = [](double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return std::string(buf);
  };
  put("dims", std::to_string(s.dims));
  put("perplexity", num(s.perplexity));
  put("blend", num(s.blend));
  put("theta", num(s.theta));
  put("dof", num(s.dof));
  put("learning_rate", num(s.learning_rate));
  put("seed", std::to_string(s.seed));
  put("exaggeration", num(s.exaggeration));
  put("iterations", std::to_string(s.iterations));
}

std::string iso_time(double t) {
  const std::time_t tt = std::time_t(t);
  std::tm tm{};
  gmtime_r(&tt, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
  return buf;
}

// Inside the caller's transaction.
void write_schema_and_collection(Db& d, const Collection& c, const SessionSettings& settings) {
  exec(d, kSchemaV1);
  exec(d, kEventsTable);
  {
    Stmt m(d, "INSERT INTO meta(key, value) VALUES (?, ?)");
    m.bind(1, std::string("application")).bind(2, std::string(kApplicationMarker)).run();
    m.bind(1, std::string("created")).bind(2, iso_time(now_seconds())).run();
    m.bind(1, std::string("created_by")).bind(2, std::string("kith 0.1")).run();
    m.bind(1, std::string("source")).bind(2, c.source).run();
    m.bind(1, std::string("picture_column")).bind(2, c.picture_column).run();
    m.bind(1, std::string("id_column")).bind(2, c.id_column).run();
  }
  write_settings(d, settings);
  {
    Stmt fc(d, "INSERT INTO feature_columns(col, name) VALUES (?, ?)");
    for (size_t i = 0; i < c.feature_names.size(); ++i) fc.bind(1, int64_t(i)).bind(2, c.feature_names[i]).run();
    Stmt tc(d, "INSERT INTO tag_columns(col, name) VALUES (?, ?)");
    for (size_t i = 0; i < c.tags.size(); ++i) tc.bind(1, int64_t(i)).bind(2, c.tags[i].name).run();
  }
  Stmt it(d, "INSERT INTO items(item, id, picture, features) VALUES (?, ?, ?, ?)");
  Stmt tg(d, "INSERT INTO item_tags(item, col, value) VALUES (?, ?, ?)");
  const Eigen::Index f = c.features.cols();
  for (size_t i = 0; i < c.size(); ++i) {
    it.bind(1, int64_t(i)).bind(2, c.ids[i]);
    if (i < c.pictures.size() && !c.pictures[i].empty()) it.bind(3, c.pictures[i]);
    else it.bind_null(3);
    if (f > 0) it.bind_blob(4, c.features.data() + Eigen::Index(i) * f, size_t(f) * 8);
    else it.bind_blob(4, nullptr, 0);
    it.run();
    for (size_t col = 0; col < c.tags.size(); ++col) {
      if (i >= c.tags[col].values.size()) continue;
      tg.bind(1, int64_t(i)).bind(2, int64_t(col)).bind(3, c.tags[col].values[i]).run();
    }
  }
}

void validate_collection(const std::string& path, const Collection& c) {
  auto bad = [&](const std::string& what) { throw SessionError(Kind::kInvalid, path + ": cannot create: " + what); };
  if (c.size() == 0) bad("the collection is empty");
  if (c.features.rows() != 0 && size_t(c.features.rows()) != c.size())
    bad("the features have " + std::to_string(c.features.rows()) + " rows for " + std::to_string(c.size()) + " items");
  if (!c.feature_names.empty() && c.feature_names.size() != size_t(c.features.cols()))
    bad("feature names and feature columns differ in number");
  if (!c.pictures.empty() && c.pictures.size() != c.size()) bad("picture paths and items differ in number");
  for (const auto& t : c.tags)
    if (t.values.size() != c.size()) bad("tag column '" + t.name + "' has the wrong number of values");
  std::set<std::string> seen;
  for (const auto& id : c.ids)
    if (!seen.insert(id).second) bad("the id '" + id + "' appears twice");
}

void fsync_dir(const fs::path& dir) {
  const int fd = ::open(dir.empty() ? "." : dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd >= 0) {
    ::fsync(fd);
    ::close(fd);
  }
}

}  // namespace

// ==== [SECTION] create / open / inspect =========================================================

SessionStore::SessionStore(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
SessionStore::~SessionStore() = default;

SessionInfo SessionStore::inspect(const std::string& path) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0)
    throw SessionError(errno == ENOENT ? Kind::kNotFound : Kind::kIo, path + ": " + std::strerror(errno));
  const FileKey key{st.st_dev, st.st_ino};
  {
    std::lock_guard<std::mutex> lock(g_open_mutex);
    if (g_open_files.count({key.dev, key.ino}))
      throw SessionError(Kind::kInUse, in_use_message(path, key, true));
  }
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
  const bool exists = fs::exists(fs::symlink_status(path, ec));
  if (exists && !options.overwrite)
    throw SessionError(Kind::kExists, path + ": already exists; kith will not overwrite it (use --force to replace "
                                             "it, or choose another name)");
  if (exists) {
    // Never replace a session another process is writing.
    struct stat st {};
    if (::stat(path.c_str(), &st) == 0) {
      const FileKey key{st.st_dev, st.st_ino};
      {
        std::lock_guard<std::mutex> lock(g_open_mutex);
        if (g_open_files.count({key.dev, key.ino})) throw SessionError(Kind::kInUse, in_use_message(path, key, true));
      }
      const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
      if (fd >= 0) {
        const bool busy = ::flock(fd, LOCK_EX | LOCK_NB) != 0;
        ::close(fd);
        if (busy) throw SessionError(Kind::kInUse, in_use_message(path, key, false));
      }
    }
  }
  const fs::path target = fs::absolute(path);
  std::random_device rd;
  const std::string tmp = (target.parent_path() / ("." + target.filename().string() + ".creating-" +
                                                   std::to_string(::getpid()) + "-" + std::to_string(rd())))
                              .string();
  auto cleanup = [&] {
    fs::remove(tmp, ec);
    fs::remove(tmp + "-wal", ec);
    fs::remove(tmp + "-shm", ec);
    fs::remove(tmp + "-journal", ec);
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
      write_schema_and_collection(d, collection, settings);
      staging.items = collection.size();
      for (const Judgment& j : options.judgments) staging.insert_judgment(j);
      t.commit();
    }
    exec(d, "PRAGMA wal_checkpoint(TRUNCATE)");
    d.close();  // last connection: the WAL is folded in and removed
    {
      const int fd = ::open(tmp.c_str(), O_RDONLY | O_CLOEXEC);
      if (fd >= 0) {
        ::fsync(fd);
        ::close(fd);
      }
    }
    if (exists) {
      if (::rename(tmp.c_str(), target.c_str()) != 0)
        throw SessionError(Kind::kIo, path + ": cannot replace: " + std::strerror(errno));
    } else {
      // link() fails if the name appeared meanwhile: never clobber.
      if (::link(tmp.c_str(), target.c_str()) != 0) {
        const int err = errno;
        throw SessionError(err == EEXIST ? Kind::kExists : Kind::kIo,
                           path + ": cannot create: " + std::strerror(err));
      }
      fs::remove(tmp, ec);
    }
    fsync_dir(target.parent_path());
  } catch (...) {
    cleanup();
    throw;
  }
  cleanup();
  SessionOpenOptions o;
  o.checkpoints_to_keep = options.checkpoints_to_keep;
  return open(path, o);
}

// ==== [SECTION] reads and writes ================================================================

const std::string& SessionStore::path() const { return impl_->path; }
bool SessionStore::read_only() const { return impl_->read_only; }
const std::string& SessionStore::migration_backup() const { return impl_->backup; }

size_t SessionStore::item_count() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  return impl_->item_count_unlocked_on(impl_->db);
}

std::vector<std::string> SessionStore::item_ids() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<std::string> ids;
  ids.reserve(impl_->items);
  Stmt q(impl_->db, "SELECT id FROM items ORDER BY item");
  while (q.step()) ids.push_back(q.text(0));
  return ids;
}

Collection SessionStore::collection() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Db& d = impl_->db;
  Collection c;
  {
    Stmt m(d, "SELECT key, value FROM meta WHERE key IN ('source', 'picture_column', 'id_column')");
    while (m.step()) {
      const std::string k = m.text(0);
      (k == "source" ? c.source : k == "id_column" ? c.id_column : c.picture_column) = m.text(1);
    }
  }
  {
    Stmt f(d, "SELECT name FROM feature_columns ORDER BY col");
    while (f.step()) c.feature_names.push_back(f.text(0));
    Stmt t(d, "SELECT name FROM tag_columns ORDER BY col");
    while (t.step()) c.tags.push_back(TagColumn{t.text(0), {}});
  }
  const size_t n = impl_->item_count_unlocked_on(d);
  const Eigen::Index fcols = Eigen::Index(c.feature_names.size());
  c.ids.reserve(n);
  c.features.resize(Eigen::Index(n), fcols);
  std::vector<std::string> pictures(n);
  bool any_picture = false;
  Stmt it(d, "SELECT item, id, picture, features FROM items ORDER BY item");
  size_t row = 0;
  while (it.step()) {
    if (size_t(it.i64(0)) != row) throw SessionError(Kind::kCorrupt, impl_->path + ": damaged: item rows are not 0..N-1");
    c.ids.push_back(it.text(1));
    if (!it.is_null(2)) {
      pictures[row] = it.text(2);
      any_picture = true;
    }
    const auto b = it.blob(3);
    if (b.second != size_t(fcols) * 8)
      throw SessionError(Kind::kCorrupt, impl_->path + ": damaged: item '" + c.ids.back() + "' has " +
                                             std::to_string(b.second) + " bytes of features, expected " +
                                             std::to_string(fcols * 8));
    if (fcols > 0) std::memcpy(c.features.data() + Eigen::Index(row) * fcols, b.first, b.second);
    ++row;
  }
  for (auto& t : c.tags) t.values.assign(n, "");
  Stmt tg(d, "SELECT item, col, value FROM item_tags");
  while (tg.step()) {
    const size_t i = size_t(tg.i64(0)), col = size_t(tg.i64(1));
    if (i < n && col < c.tags.size()) c.tags[col].values[i] = tg.text(2);
  }
  c.build_index();
  if (any_picture) {
    c.pictures = std::move(pictures);
    for (size_t i = 0; i < n; ++i) {
      std::error_code ec;
      if (!c.pictures[i].empty() && !fs::is_regular_file(c.pictures[i], ec))
        c.warnings.push_back(Problem{impl_->path, 0, 0, "picture of '" + c.ids[i] + "' not found: " + c.pictures[i]});
    }
  }
  return c;
}

std::vector<size_t> SessionStore::missing_pictures() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<size_t> missing;
  Stmt it(impl_->db, "SELECT item, picture FROM items WHERE picture IS NOT NULL AND picture <> '' ORDER BY item");
  while (it.step()) {
    std::error_code ec;
    if (!fs::is_regular_file(it.text(1), ec)) missing.push_back(size_t(it.i64(0)));
  }
  return missing;
}

SessionSettings SessionStore::settings() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  SessionSettings s;
  Stmt q(impl_->db, "SELECT key, value FROM settings");
  while (q.step()) {
    const std::string k = q.text(0), v = q.text(1);
    try {
      if (k == "dims") s.dims = std::stoi(v);
      else if (k == "perplexity") s.perplexity = std::stod(v);
      else if (k == "blend") s.blend = std::stod(v);
      else if (k == "theta") s.theta = std::stod(v);
      else if (k == "dof") s.dof = std::stod(v);
      else if (k == "learning_rate") s.learning_rate = std::stod(v);
      else if (k == "seed") s.seed = std::stoull(v);
      else if (k == "exaggeration") s.exaggeration = std::stod(v);
      else if (k == "iterations") s.iterations = std::stoll(v);
    } catch (const std::exception&) {
      throw SessionError(Kind::kCorrupt, impl_->path + ": damaged: setting '" + k + "' is '" + v + "', not a number");
    }
  }
  return s;
}

void SessionStore::set_settings(const SessionSettings& settings) {
  impl_->require_writable();
  std::string error;
  if (!settings.IsValid(&error, impl_->items)) throw SessionError(Kind::kInvalid, impl_->path + ": " + error);
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Transaction t(impl_->db);
  write_settings(impl_->db, settings);
  t.commit();
}

void SessionStore::set_value(const std::string& key, const std::string& value) {
  impl_->require_writable();
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt up(impl_->db,
          "INSERT INTO settings(key, value) VALUES (?, ?) ON CONFLICT(key) DO UPDATE SET value = excluded.value");
  up.bind(1, "ui." + key).bind(2, value).run();
}

std::optional<std::string> SessionStore::value(const std::string& key) const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt q(impl_->db, "SELECT value FROM settings WHERE key = ?");
  q.bind(1, "ui." + key);
  if (q.step()) return q.text(0);
  return std::nullopt;
}

int64_t SessionStore::add_person(const std::string& name, const std::string& colour) {
  impl_->require_writable();
  if (name.empty()) throw SessionError(Kind::kInvalid, impl_->path + ": a person needs a name (a pseudonym is fine)");
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Transaction t(impl_->db);
  const int64_t id = impl_->person_id(name, colour);
  t.commit();
  return id;
}

void SessionStore::set_person_colour(int64_t person, const std::string& colour) {
  impl_->require_writable();
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt up(impl_->db, "UPDATE people SET colour = ? WHERE person = ?");
  up.bind(1, colour).bind(2, person).run();
  if (sqlite3_changes(impl_->db.db) == 0)
    throw SessionError(Kind::kInvalid, impl_->path + ": no person with id " + std::to_string(person));
}

void SessionStore::rename_person(int64_t person, const std::string& name) {
  impl_->require_writable();
  if (name.empty()) throw SessionError(Kind::kInvalid, impl_->path + ": a person needs a name (a pseudonym is fine)");
  std::lock_guard<std::mutex> lock(impl_->mutex);
  {
    Stmt taken(impl_->db, "SELECT person FROM people WHERE name = ?");
    taken.bind(1, name);
    if (taken.step() && taken.i64(0) != person)
      throw SessionError(Kind::kInvalid, impl_->path + ": someone is already called '" + name + "'");
  }
  Stmt up(impl_->db, "UPDATE people SET name = ? WHERE person = ?");
  up.bind(1, name).bind(2, person).run();
  if (sqlite3_changes(impl_->db.db) == 0)
    throw SessionError(Kind::kInvalid, impl_->path + ": no person with id " + std::to_string(person));
}

int64_t SessionStore::add_event(const std::string& kind, const std::string& detail) {
  impl_->require_writable();
  if (kind.empty()) throw SessionError(Kind::kInvalid, impl_->path + ": an event needs a kind");
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt ins(impl_->db, "INSERT INTO events(time, kind, detail) VALUES (?, ?, ?)");
  ins.bind(1, now_seconds()).bind(2, kind).bind(3, detail.empty() ? std::string("{}") : detail).run();
  return sqlite3_last_insert_rowid(impl_->db.db);
}

std::vector<StoredEvent> SessionStore::events() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<StoredEvent> out;
  Stmt q(impl_->db, "SELECT event, time, kind, detail FROM events ORDER BY event");
  while (q.step()) out.push_back(StoredEvent{q.i64(0), q.f64(1), q.text(2), q.text(3)});
  return out;
}

void SessionStore::save_copy(const std::string& path) const {
  std::error_code ec;
  if (fs::exists(path, ec))
    throw SessionError(Kind::kExists, path + ": a file is already there; kith does not write over it");
  const std::string tmp = path + ".copying-" + std::to_string(::getpid());
  fs::remove(tmp, ec);
  {
    std::lock_guard<std::mutex> lock(impl_->mutex);
    try {
      Stmt vac(impl_->db, "VACUUM INTO ?");  // a consistent copy, read through the WAL
      vac.bind(1, tmp).run();
    } catch (...) {
      fs::remove(tmp, ec);
      throw;
    }
  }
  // link() refuses if the name appeared meanwhile: never clobber.
  if (::link(tmp.c_str(), path.c_str()) != 0) {
    const int err = errno;
    fs::remove(tmp, ec);
    throw SessionError(err == EEXIST ? Kind::kExists : Kind::kIo, path + ": cannot write the copy: " + std::strerror(err));
  }
  fs::remove(tmp, ec);
  fsync_dir(fs::absolute(path).parent_path());
}

std::vector<SessionPerson> SessionStore::people() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<SessionPerson> out;
  Stmt q(impl_->db, "SELECT person, name, colour FROM people ORDER BY person");
  while (q.step()) out.push_back(SessionPerson{q.i64(0), q.text(1), q.text(2)});
  return out;
}

int64_t SessionStore::add_judgment(const Judgment& judgment) { return add_judgments({judgment}).front(); }

std::vector<int64_t> SessionStore::add_judgments(const std::vector<Judgment>& judgments) {
  impl_->require_writable();
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<int64_t> ids;
  ids.reserve(judgments.size());
  Transaction t(impl_->db);
  for (const auto& j : judgments) ids.push_back(impl_->insert_judgment(j));
  t.commit();
  return ids;
}

void SessionStore::set_retracted(int64_t judgment_id, bool retracted) {
  impl_->require_writable();
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt up(impl_->db, "UPDATE judgments SET retracted = ?, retracted_time = ? WHERE judgment = ?");
  up.bind(1, int64_t(retracted ? 1 : 0));
  if (retracted) up.bind(2, now_seconds());
  else up.bind_null(2);
  up.bind(3, judgment_id).run();
  if (sqlite3_changes(impl_->db.db) == 0)
    throw SessionError(Kind::kInvalid, impl_->path + ": no judgment with id " + std::to_string(judgment_id));
}

std::vector<Judgment> SessionStore::judgments() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<Judgment> out;
  Stmt q(impl_->db,
         "SELECT j.judgment, j.anchor, j.nearer, j.farther, p.name, j.time, j.kind, j.weight, j.retracted "
         "FROM judgments j LEFT JOIN people p ON p.person = j.person ORDER BY j.judgment");
  while (q.step()) {
    Judgment j;
    j.id = q.i64(0);
    j.anchor = int32_t(q.i64(1));
    j.nearer = int32_t(q.i64(2));
    j.farther = int32_t(q.i64(3));
    j.person = q.text(4);
    j.time = q.f64(5);
    if (!judgment_kind_from_string(q.text(6), &j.kind))
      throw SessionError(Kind::kCorrupt, impl_->path + ": damaged: judgment " + std::to_string(j.id) +
                                             " has an unknown kind '" + q.text(6) + "'");
    j.weight = q.f64(7);
    j.retracted = q.i64(8) != 0;
    out.push_back(std::move(j));
  }
  return out;
}

size_t SessionStore::judgment_count() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt q(impl_->db, "SELECT count(*) FROM judgments");
  q.step();
  return size_t(q.i64(0));
}

void SessionStore::set_pin(int32_t item, const std::vector<double>& position) {
  impl_->require_writable();
  if (position.size() != 2 && position.size() != 3)
    throw SessionError(Kind::kInvalid, impl_->path + ": a pin's position needs 2 or 3 numbers");
  for (double v : position)
    if (!std::isfinite(v)) throw SessionError(Kind::kInvalid, impl_->path + ": a pin's position must be finite");
  std::lock_guard<std::mutex> lock(impl_->mutex);
  impl_->check_item(item, "pinned item");
  Stmt up(impl_->db,
          "INSERT INTO pins(item, x, y, z, time) VALUES (?, ?, ?, ?, ?) ON CONFLICT(item) DO UPDATE SET "
          "x = excluded.x, y = excluded.y, z = excluded.z, time = excluded.time");
  up.bind(1, int64_t(item)).bind(2, position[0]).bind(3, position[1]);
  if (position.size() == 3) up.bind(4, position[2]);
  else up.bind_null(4);
  up.bind(5, now_seconds()).run();
}

void SessionStore::remove_pin(int32_t item) {
  impl_->require_writable();
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt del(impl_->db, "DELETE FROM pins WHERE item = ?");
  del.bind(1, int64_t(item)).run();
}

std::vector<SessionPin> SessionStore::pins() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  std::vector<SessionPin> out;
  Stmt q(impl_->db, "SELECT item, x, y, z, time FROM pins ORDER BY item");
  while (q.step()) {
    SessionPin p;
    p.item = int32_t(q.i64(0));
    p.position = {q.f64(1), q.f64(2)};
    if (!q.is_null(3)) p.position.push_back(q.f64(3));
    p.time = q.f64(4);
    out.push_back(std::move(p));
  }
  return out;
}

void SessionStore::post_checkpoint(Points positions, uint64_t iteration) {
  impl_->require_writable();
  {
    std::lock_guard<std::mutex> lock(impl_->slot_mutex);
    impl_->slot = std::make_pair(std::move(positions), iteration);
  }
  impl_->slot_cv.notify_all();
}

void SessionStore::flush_checkpoints() {
  if (impl_->read_only) return;
  std::unique_lock<std::mutex> lock(impl_->slot_mutex);
  impl_->slot_cv.wait(lock, [&] { return !impl_->slot && !impl_->writing; });
  if (impl_->writer_error) {
    std::exception_ptr e = impl_->writer_error;
    impl_->writer_error = nullptr;
    std::rethrow_exception(e);
  }
}

int64_t SessionStore::write_checkpoint(const Points& positions, uint64_t iteration) {
  impl_->require_writable();
  std::lock_guard<std::mutex> lock(impl_->mutex);
  return impl_->write_checkpoint_on(impl_->db, positions, iteration);
}

std::optional<MapCheckpoint> SessionStore::last_checkpoint() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt q(impl_->db,
         "SELECT checkpoint, time, iteration, items, dims, positions FROM checkpoints ORDER BY checkpoint DESC LIMIT 1");
  if (!q.step()) return std::nullopt;
  MapCheckpoint c;
  c.id = q.i64(0);
  c.time = q.f64(1);
  c.iteration = uint64_t(q.i64(2));
  const Eigen::Index rows = Eigen::Index(q.i64(3)), cols = Eigen::Index(q.i64(4));
  const auto b = q.blob(5);
  if (b.second != size_t(rows * cols) * 8)
    throw SessionError(Kind::kCorrupt, impl_->path + ": damaged: map checkpoint " + std::to_string(c.id) +
                                           " has the wrong size");
  c.positions.resize(rows, cols);
  if (b.second) std::memcpy(c.positions.data(), b.first, b.second);
  return c;
}

size_t SessionStore::checkpoint_count() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  Stmt q(impl_->db, "SELECT count(*) FROM checkpoints");
  q.step();
  return size_t(q.i64(0));
}

}  // namespace kith
