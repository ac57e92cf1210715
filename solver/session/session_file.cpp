// See session_file.h.
#include "solver/session/session_file.h"

#include <fcntl.h>
#include <sqlite3.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <sys/sysmacros.h>
#include <unistd.h>

#include <atomic>
#include <cctype>
#include <chrono>
#include <cmath>
#include <condition_variable>
#include <csignal>
#include <cstring>
#include <ctime>
#include <exception>
#include <filesystem>
#include <fstream>
#include <memory>
#include <mutex>
#include <random>
#include <set>
#include <sstream>
#include <thread>

namespace kith::session_file {

// ==== [SECTION] checking a file without changing it =============================================

uint32_t be32(const unsigned char* p) {
  return (uint32_t(p[0]) << 24) | (uint32_t(p[1]) << 16) | (uint32_t(p[2]) << 8) | uint32_t(p[3]);
}

bool file_nonempty(const std::string& p) {
  std::error_code ec;
  return fs::exists(p, ec) && fs::file_size(p, ec) > 0;
}


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
  check_item_indices(d, path, info.schema_version);
  return info;
}

// Every stored item index against the collection: items numbered 0..N-1, and the tags, judgments,
// pins and map checkpoints naming only those. The first row out of place is named.
void check_item_indices(Db& d, const std::string& path, int schema_version) {
  if (schema_version < 1) return;
  Stmt n(d, "SELECT count(*) FROM items");
  n.step();
  const int64_t items = n.i64(0);
  const std::string range =
      "the collection's " + std::to_string(items) + " items (0.." + std::to_string(items - 1) + ")";
  auto damaged = [&](const std::string& table, const std::string& row, const std::string& what) {
    return SessionError(Kind::kCorrupt, path + ": damaged: table '" + table + "', " + row + ": " + what +
                                            ". The file was not changed; kith will not read or write it");
  };
  auto first = [&](const char* sql) {
    auto q = std::make_unique<Stmt>(d, sql);
    q->bind(1, items);
    return q;
  };
  auto outside = [&](int64_t i) { return "item " + std::to_string(i) + " is outside " + range; };
  if (auto q = first("SELECT item FROM items WHERE item < 0 OR item >= ?1 LIMIT 1"); q->step())
    throw damaged("items", "item " + std::to_string(q->i64(0)), outside(q->i64(0)));
  if (auto q = first("SELECT item, col FROM item_tags WHERE item < 0 OR item >= ?1 OR "
                     "col NOT IN (SELECT col FROM tag_columns) LIMIT 1");
      q->step())
    throw damaged("item_tags", "item " + std::to_string(q->i64(0)) + ", column " + std::to_string(q->i64(1)),
                  q->i64(0) < 0 || q->i64(0) >= items ? outside(q->i64(0)) : "no such tag column");
  if (auto q = first("SELECT judgment, anchor, nearer, farther FROM judgments WHERE anchor < 0 OR anchor >= ?1 OR "
                     "nearer < 0 OR nearer >= ?1 OR farther < 0 OR farther >= ?1 OR anchor = nearer OR "
                     "anchor = farther OR nearer = farther LIMIT 1");
      q->step()) {
    std::string what = "names the same item twice";
    for (int k = 1; k <= 3; ++k)
      if (q->i64(k) < 0 || q->i64(k) >= items) what = outside(q->i64(k));
    throw damaged("judgments", "judgment " + std::to_string(q->i64(0)), what);
  }
  if (auto q = first("SELECT item FROM pins WHERE item < 0 OR item >= ?1 LIMIT 1"); q->step())
    throw damaged("pins", "the pin of item " + std::to_string(q->i64(0)), outside(q->i64(0)));
  if (auto q = first("SELECT checkpoint, items, dims, length(positions) FROM checkpoints WHERE items != ?1 OR "
                     "dims < 1 OR dims > 3 OR length(positions) != items * dims * 8 LIMIT 1");
      q->step())
    throw damaged("checkpoints", "checkpoint " + std::to_string(q->i64(0)),
                  "a map of " + std::to_string(q->i64(1)) + " items x " + std::to_string(q->i64(2)) +
                      " dimensions in " + std::to_string(q->i64(3)) + " bytes, for " + range);
}

// ==== [SECTION] locks ===========================================================================

// Files this process has open as sessions, by (device, inode).
std::mutex g_open_mutex;
std::set<std::pair<dev_t, ino_t>> g_open_files;


// Registers a file as open in this process; false if it already is.
bool is_open_here(FileKey key) {
  std::lock_guard<std::mutex> lock(g_open_mutex);
  return g_open_files.count({key.dev, key.ino}) > 0;
}

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
  put("metric", metric_name(s.metric));
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
void write_schema_and_collection(Db& d, const Collection& c, const SessionSettings& settings,
                                 const std::string& reading) {
  exec(d, kSchemaV1);
  exec(d, kEventsTable);
  exec(d, kNeighboursTable);
  {
    Stmt m(d, "INSERT INTO meta(key, value) VALUES (?, ?)");
    m.bind(1, std::string("application")).bind(2, std::string(kApplicationMarker)).run();
    m.bind(1, std::string("created")).bind(2, iso_time(now_seconds())).run();
    m.bind(1, std::string("created_by")).bind(2, std::string("kith 0.1")).run();
    m.bind(1, std::string("source")).bind(2, c.source).run();
    m.bind(1, std::string("picture_column")).bind(2, c.picture_column).run();
    m.bind(1, std::string("id_column")).bind(2, c.id_column).run();
    m.bind(1, std::string("content")).bind(2, content_hash(c)).run();
    m.bind(1, std::string("reading")).bind(2, reading).run();
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
  const NeighbourGraph& g = c.neighbours;
  Stmt nb(d, "INSERT INTO neighbours(item, neighbours, distances) VALUES (?, ?, ?)");
  for (size_t i = 0; i < g.n; ++i)
    nb.bind(1, int64_t(i))
        .bind_blob(2, g.index.data() + i * g.k, g.k * sizeof(int32_t))
        .bind_blob(3, g.distance2.data() + i * g.k, g.k * sizeof(double))
        .run();
}

void validate_collection(const std::string& path, const Collection& c) {
  auto bad = [&](const std::string& what) { throw SessionError(Kind::kInvalid, path + ": cannot create: " + what); };
  if (c.size() == 0) bad("the collection is empty");
  if (c.features.rows() != 0 && size_t(c.features.rows()) != c.size())
    bad("the features have " + std::to_string(c.features.rows()) + " rows for " + std::to_string(c.size()) + " items");
  if (!c.feature_names.empty() && c.feature_names.size() != size_t(c.features.cols()))
    bad("feature names and feature columns differ in number");
  if (!c.pictures.empty() && c.pictures.size() != c.size()) bad("picture paths and items differ in number");
  if (!c.neighbours.empty() && c.neighbours.n != c.size())
    bad("the neighbour graph has " + std::to_string(c.neighbours.n) + " items, the collection " +
        std::to_string(c.size()));
  for (const auto& t : c.tags)
    if (t.values.size() != c.size()) bad("tag column '" + t.name + "' has the wrong number of values");
  std::set<std::string> seen;
  for (const auto& id : c.ids)
    if (!seen.insert(id).second) bad("the id '" + id + "' appears twice");
}

std::string creating_name(const fs::path& target, unsigned long n) {
  return (target.parent_path() /
          ("." + target.filename().string() + ".creating-" + std::to_string(::getpid()) + "-" + std::to_string(n)))
      .string();
}

size_t remove_stale_creations(const fs::path& target) {
  const std::string prefix = "." + target.filename().string() + ".creating-";
  std::error_code ec;
  std::vector<fs::path> stale;
  for (const auto& e : fs::directory_iterator(target.parent_path(), ec)) {
    const std::string name = e.path().filename().string();
    if (name.rfind(prefix, 0) != 0) continue;
    // PID-N, then nothing or -wal, -shm, -journal.
    const std::string rest = name.substr(prefix.size());
    char* end = nullptr;
    const long pid = std::strtol(rest.c_str(), &end, 10);
    if (pid <= 0 || *end != '-' || !std::isdigit(static_cast<unsigned char>(end[1]))) continue;
    const char* tail = end + 1;
    while (std::isdigit(static_cast<unsigned char>(*tail))) ++tail;
    const std::string suffix = tail;
    if (!suffix.empty() && suffix != "-wal" && suffix != "-shm" && suffix != "-journal") continue;
    if (::kill(pid_t(pid), 0) == 0 || errno != ESRCH) continue;  // its process lives (or is not ours to ask)
    if (suffix.empty()) {
      const int fd = ::open(e.path().c_str(), O_RDONLY | O_CLOEXEC | O_NOFOLLOW | O_NONBLOCK);
      if (fd >= 0) {
        const bool held = ::flock(fd, LOCK_EX | LOCK_NB) != 0;
        ::close(fd);
        if (held) continue;
      }
    }
    stale.push_back(e.path());
  }
  size_t removed = 0;
  for (const fs::path& p : stale) removed += fs::remove(p, ec) ? 1 : 0;
  return removed;
}

std::vector<std::string> log_files_beside(const std::string& path) {
  std::vector<std::string> found;
  std::error_code ec;
  for (const char* suffix : {"-wal", "-shm"})
    if (fs::exists(fs::symlink_status(path + suffix, ec))) found.push_back(path + suffix);
  return found;
}

}  // namespace kith::session_file
