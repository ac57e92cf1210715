// SessionStore::Impl: the open file's state (connection, lock, checkpoint writer thread). Internal
// to solver/session. Its connection is guarded by `mutex`; the checkpoint writer has its own.
#pragma once
#include <unistd.h>

#include <atomic>
#include <condition_variable>
#include <mutex>
#include <string>
#include <thread>

#include "solver/session/session_file.h"
#include "solver/session/session_store.h"

namespace kith {

using namespace session_file;

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


}  // namespace kith
