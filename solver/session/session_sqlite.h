// Small RAII helpers over SQLite's C API for the session store (session_store.cpp and its parts):
// a connection, prepared statements, transactions. Internal to solver/session. Not thread-safe by
// themselves: the store guards each connection with its mutex.
#pragma once
#include <sqlite3.h>

#include <chrono>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <string>
#include <vector>

#include "solver/session/session_store.h"

namespace kith::session_sqlite {

using Kind = SessionError::Kind;
namespace fs = std::filesystem;


inline double now_seconds() {
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

[[noreturn]] inline void fail_sql(sqlite3* db, const std::string& path, const std::string& what) {
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

inline void exec(Db& d, const char* sql) {
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

inline void open_db(Db& d, const std::string& path, const std::string& uri, int flags) {
  d.path = path;
  const int rc = sqlite3_open_v2(uri.c_str(), &d.db, flags | SQLITE_OPEN_URI | SQLITE_OPEN_NOMUTEX, nullptr);
  if (rc != SQLITE_OK) fail_sql(d.db, path, "opening");
  sqlite3_extended_result_codes(d.db, 1);
  sqlite3_busy_timeout(d.db, 10000);
}

// file: URI for a path (percent-encodes what the URI syntax reserves).
inline std::string file_uri(const std::string& path, const std::string& query) {
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
inline bool little_endian() {
  const uint16_t one = 1;
  unsigned char b;
  std::memcpy(&b, &one, 1);
  return b == 1;
}


}  // namespace kith::session_sqlite
