// SessionStore: one session = one SQLite file (.kith, WAL mode) holding the collection (ids, tags,
// picture paths, features as BLOBs), settings, people, judgments (never deleted; retraction is a
// flag), pins, the last few map checkpoints and a schema version. Schema: docs/session-schema.md.
//
// Durability. Every judgment, retraction, pin and settings change is one SQLite transaction on a
// connection with synchronous=FULL, so it is on disk (WAL fsynced) before the call returns: a
// killed process or a power cut cannot lose it. Map checkpoints go through a writer thread with
// its own connection (synchronous=NORMAL: a power cut may lose the newest checkpoints, never a
// judgment, and the map is recomputed from an older one); post_checkpoint() only swaps the
// positions into a latest-wins slot and returns at once.
//
// Safety on open. Before anything can write, the file is checked without changing a byte: the
// raw 100-byte header (SQLite magic, kith's application_id, schema version, size against the
// header's page count), then a read-only, immutable SQLite connection (no -wal/-shm files are
// created) runs quick_check and reads the meta table. Each failure throws SessionError with its
// own Kind and message. A read-write open takes flock(LOCK_EX) on the file itself (released by the
// kernel when the process dies, so there are no stale lock files); a second kith process is
// refused with Kind::kInUse and told to open read-only. Older schema versions are migrated after a
// backup copy is written next to the file.
//
// Threads: all public methods may be called from any thread (a mutex guards the main
// connection); the checkpoint writer thread is internal. One SessionStore per file per process
// (a second open of the same file in the same process is refused too; closing any descriptor of a
// file would silently drop SQLite's POSIX locks on it).
#pragma once
#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/base/judgment.h"
#include "solver/base/map_parameters.h"
#include "solver/base/points.h"

namespace kith {

// The schema version this build writes (PRAGMA user_version). Older files are migrated.
constexpr int kSessionSchemaVersion = 4;
// PRAGMA application_id of every session: the bytes 'k','i','t','h'.
constexpr int32_t kSessionApplicationId = 0x6B697468;

class SessionError : public std::runtime_error {
 public:
  enum class Kind {
    kNotFound,       // no such file
    kExists,         // create: the file exists and overwrite was not asked for
    kInUse,          // another kith process has it open read-write
    kNotSession,     // not a SQLite file, or a SQLite file that kith did not make
    kTruncated,      // shorter than its own header says
    kCorrupt,        // SQLite's quick_check or a read failed
    kNewerVersion,   // made by a newer kith
    kReadOnly,       // a write on a read-only store
    kInvalid,        // bad argument (unknown item, bad weight, ...)
    kIo,             // the operating system refused (permissions, disk full, ...)
  };
  SessionError(Kind kind, const std::string& message) : std::runtime_error(message), kind_(kind) {}
  Kind kind() const { return kind_; }

 private:
  Kind kind_;
};
const char* to_string(SessionError::Kind kind);

// A session's map settings are MapParameters (solver/base/map_parameters.h), checked by its
// IsValid with the session's item count before they are written.
using SessionSettings = MapParameters;

struct SessionPerson {
  int64_t id = -1;
  std::string name;    // any name or pseudonym, unique in the session
  std::string colour;  // "#rrggbb" or "" (the viewer's choice)
};

struct SessionPin {
  int32_t item = -1;
  std::vector<double> position;  // dims numbers
  double time = 0.0;             // seconds since the Unix epoch
};

// An event as stored (solver/asking/session_event.h builds them): a "can't tell" answer, a person added or renamed,
// a re-asked question. `detail` is a JSON object as text.
struct StoredEvent {
  int64_t id = -1;
  double time = 0.0;  // seconds since the Unix epoch
  std::string kind;
  std::string detail;
};

struct MapCheckpoint {
  int64_t id = -1;
  double time = 0.0;  // seconds since the Unix epoch
  uint64_t iteration = 0;
  Points positions;  // N x dims, bit for bit what was written
};

struct SessionOpenOptions {
  bool read_only = false;      // no lock, no writes; allowed while another process writes (default: false)
  int checkpoints_to_keep = 3; // older map checkpoints are deleted after each write (default: 3)
};

struct SessionCreateOptions {
  bool overwrite = false;       // replace an existing file (atomically, by rename) (default: false)
  int checkpoints_to_keep = 3;  // (default: 3)
  std::vector<Judgment> judgments;  // written with the collection, in the same transaction (default: none)
  // How the collection was read: the reading flags (reading_flags in collection.h), kept so that
  // `kith check SESSION` can say so and a reading option given with the session can be refused
  // with the reason. (default: "", the defaults)
  std::string reading;
};

// What a check of a file found (SessionStore::inspect): nothing is changed.
struct SessionInfo {
  int schema_version = 0;
  size_t items = 0;
  size_t judgments = 0;
  bool in_use = false;  // another process holds the read-write lock
};

class SessionStore {
 public:
  // Creates PATH from a collection. The file is built under a temporary name in the same folder
  // and renamed into place, so a crash leaves either no file or a complete one, and an existing
  // file is replaced only when asked (and never while another kith process has it open).
  static std::unique_ptr<SessionStore> create(const std::string& path, const Collection& collection,
                                              const SessionSettings& settings = {},
                                              const SessionCreateOptions& options = {});
  // Opens an existing session; throws SessionError (see Kind) and leaves a refused file unchanged.
  static std::unique_ptr<SessionStore> open(const std::string& path, const SessionOpenOptions& options = {});
  // Validates PATH exactly as open() does, without locking or changing anything. Throws SessionError.
  static SessionInfo inspect(const std::string& path);

  ~SessionStore();  // writes any pending checkpoint, then closes
  SessionStore(const SessionStore&) = delete;
  SessionStore& operator=(const SessionStore&) = delete;

  const std::string& path() const;
  bool read_only() const;
  // A backup written before a migration on open, "" if none.
  const std::string& migration_backup() const;

  // ---- the collection (fixed when the session is created) ----
  Collection collection() const;  // pictures as stored; warnings list pictures not found now
  size_t item_count() const;
  std::vector<std::string> item_ids() const;  // in item order, without loading the features
  // The collection's content_hash (collection.h): as stored when the session was made, or, for a
  // session made before kith kept it, computed from the stored collection.
  std::string content_hash() const;
  // The reading flags the collection was read with ("" for the defaults or when not kept).
  std::string reading() const;
  // Items whose stored picture path does not name a readable file on this machine.
  std::vector<size_t> missing_pictures() const;

  // ---- settings ----
  SessionSettings settings() const;
  void set_settings(const SessionSettings& settings);  // committed before it returns
  // Free-form values for the viewer (view state, recent choices); committed before it returns.
  void set_value(const std::string& key, const std::string& value);
  std::optional<std::string> value(const std::string& key) const;

  // ---- people ----
  int64_t add_person(const std::string& name, const std::string& colour = "");  // existing: its id
  void set_person_colour(int64_t person, const std::string& colour);
  void rename_person(int64_t person, const std::string& name);  // judgments keep the person, now renamed
  std::vector<SessionPerson> people() const;

  // ---- events: committed before these return; never deleted ----
  int64_t add_event(const std::string& kind, const std::string& detail_json);
  std::vector<StoredEvent> events() const;  // in the order written

  // A complete, consistent copy of the session at PATH (SQLite VACUUM INTO), for "save as".
  // Refuses (Kind::kExists) when PATH exists; this store stays the one being written.
  void save_copy(const std::string& path) const;

  // ---- judgments: committed before these return; never deleted ----
  // Returns the new id. A person named for the first time is added. time 0 means now.
  int64_t add_judgment(const Judgment& judgment);
  // All or none, in one transaction; returns the new ids in order.
  std::vector<int64_t> add_judgments(const std::vector<Judgment>& judgments);
  void set_retracted(int64_t judgment_id, bool retracted = true);
  std::vector<Judgment> judgments() const;  // every judgment ever made, in id order
  size_t judgment_count() const;

  // ---- pins ----
  void set_pin(int32_t item, const std::vector<double>& position);
  void remove_pin(int32_t item);
  std::vector<SessionPin> pins() const;

  // ---- map checkpoints ----
  // Hands the positions to the writer thread and returns at once; a newer post replaces one not
  // yet written. The caller never waits for the disk.
  void post_checkpoint(Points positions, uint64_t iteration);
  // Waits until every posted checkpoint is written (or has failed; the error is rethrown).
  void flush_checkpoints();
  // Writes one now on the calling thread (one transaction); returns its id.
  int64_t write_checkpoint(const Points& positions, uint64_t iteration);
  std::optional<MapCheckpoint> last_checkpoint() const;
  size_t checkpoint_count() const;

  struct Impl;

 private:
  explicit SessionStore(std::unique_ptr<Impl> impl);
  std::unique_ptr<Impl> impl_;
};

}  // namespace kith
