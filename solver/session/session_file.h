// The session file below the store: its schema, the checks of a file before SQLite opens it,
// the locks that keep two writers apart, and the writes that create one. Internal to
// solver/session (session_store.cpp, session_store_data.cpp). Functions are safe from any
// thread; the open-file registry is guarded by its own mutex.
#pragma once
#include <sys/types.h>

#include <mutex>
#include <set>

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include "solver/io/collection.h"
#include "solver/session/session_sqlite.h"
#include "solver/session/session_store.h"

namespace kith::session_file {

using namespace session_sqlite;
namespace fs = std::filesystem;

// ==== [SECTION] schema ==========================================================================

inline constexpr const char* kApplicationMarker = "kith session";

// Version 1. Documented in docs/session-schema.md; keep the two in step.
inline constexpr const char* kSchemaV1 = R"sql(
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
inline constexpr const char* kEventsTable = R"sql(
CREATE TABLE events(
  event INTEGER PRIMARY KEY AUTOINCREMENT,
  time REAL NOT NULL,
  kind TEXT NOT NULL,
  detail TEXT NOT NULL DEFAULT '{}');
CREATE TRIGGER events_are_never_deleted BEFORE DELETE ON events
  BEGIN SELECT RAISE(ABORT, 'events are never deleted'); END;
)sql";

// Version 4 adds the neighbour graph a session was made with (--neighbours): one row per item,
// its k neighbours' rows as int32 and their squared distances as float64, nearest first; no rows
// when the neighbours are searched in the features.
inline constexpr const char* kNeighboursTable = R"sql(
CREATE TABLE neighbours(
  item INTEGER PRIMARY KEY REFERENCES items(item),
  neighbours BLOB NOT NULL,
  distances BLOB NOT NULL);
)sql";

inline const char* const kRequiredTables[] = {"meta",      "settings", "feature_columns", "tag_columns", "items",
                                              "item_tags", "people",   "judgments",       "pins",        "checkpoints",
                                              "events",    "neighbours"};

// Migration steps: kMigrations[v - 1] takes a file from version v to v + 1; a step is SQL run
// inside the migration's transaction (after the backup copy is written).
// Version 3 records the feature metric; sessions made before it compared features Euclidean.
inline constexpr const char* kMetricSetting =
    "INSERT OR IGNORE INTO settings(key, value) VALUES ('metric', 'euclidean');";
inline const std::vector<const char*> kMigrations = {kEventsTable, kMetricSetting, kNeighboursTable};
static_assert(kSessionSchemaVersion == 4, "a new schema version needs its migration step here");
static_assert(kSessionSchemaVersion >= 1, "schema versions start at 1");


struct HeaderFacts {
  int user_version = 0;
  bool wal_present = false;
};

struct FileKey {
  dev_t dev = 0;
  ino_t ino = 0;
};

uint32_t be32(const unsigned char* p);
bool file_nonempty(const std::string& p);
HeaderFacts check_header(int fd, const std::string& path);
SessionInfo check_with_sqlite(const std::string& path, bool wal_present);
// Every stored item index (item_tags, judgments, pins, checkpoints) against the items table;
// throws SessionError (kCorrupt) naming the table and row. Part of check_with_sqlite.
void check_item_indices(Db& d, const std::string& path, int schema_version);
// Whether this process has the file open already (a second open would break POSIX locks).
bool is_open_here(FileKey key);
bool register_open(FileKey key);
void unregister_open(FileKey key);
long lock_holder(FileKey key);
std::string in_use_message(const std::string& path, FileKey key, bool this_process);
void write_settings(Db& d, const SessionSettings& s);
std::string iso_time(double t);
// The meta table also keeps the collection's content_hash (collection.h) as 'content' and the
// reading options it was read with as 'reading' (reading_flags, "" for the defaults).
void write_schema_and_collection(Db& d, const Collection& c, const SessionSettings& settings,
                                 const std::string& reading = "");
void validate_collection(const std::string& path, const Collection& c);

// The temporary name a create builds TARGET under: ".NAME.creating-PID-N" in the same folder.
std::string creating_name(const fs::path& target, unsigned long n);
// Leftovers of a create that was killed (a `kith new` stopped by SIGKILL or a power cut): every
// ".NAME.creating-PID-N" beside TARGET, with its -wal, -shm and -journal, whose process is gone
// and whose lock nobody holds (a create holds flock on its temporary throughout). Removes them;
// returns how many files went.
size_t remove_stale_creations(const fs::path& target);
// The write-ahead log and shared-memory index beside PATH ("PATH-wal", "PATH-shm") that exist.
std::vector<std::string> log_files_beside(const std::string& path);

}  // namespace kith::session_file
