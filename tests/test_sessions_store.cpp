// Session store: round trip of everything a session holds, and refusal of files that are not
// sound sessions (each with its own message, each left byte for byte as it was).
#include <doctest/doctest.h>
#include <sqlite3.h>

#include <algorithm>
#include <filesystem>
#include <random>
#include <set>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"

using kith::SessionError;
using kith::SessionStore;
namespace fs = std::filesystem;

namespace {

std::vector<kith::Judgment> random_judgments(size_t count, int n_items, uint32_t seed) {
  std::mt19937 rng(seed);
  std::uniform_int_distribution<int> item(0, n_items - 1);
  static const char* kPeople[] = {"Ines", "Tomasz", "", "guest 7"};
  std::vector<kith::Judgment> out;
  for (size_t k = 0; k < count; ++k) {
    kith::Judgment j;
    do {
      j.anchor = item(rng);
      j.nearer = item(rng);
      j.farther = item(rng);
    } while (j.anchor == j.nearer || j.anchor == j.farther || j.nearer == j.farther);
    j.person = kPeople[k % 4];
    j.time = 1.7e9 + double(k) * 1.25 + 1.0 / 7.0;
    j.kind = static_cast<kith::JudgmentKind>(k % 5);
    j.weight = 0.5 + double(k % 3);
    out.push_back(j);
  }
  return out;
}

void check_same_judgment(const kith::Judgment& a, const kith::Judgment& b) {
  CHECK(a.id == b.id);
  CHECK(a.anchor == b.anchor);
  CHECK(a.nearer == b.nearer);
  CHECK(a.farther == b.farther);
  CHECK(a.person == b.person);
  CHECK(a.time == b.time);
  CHECK(a.kind == b.kind);
  CHECK(a.weight == b.weight);
  CHECK(a.retracted == b.retracted);
}

std::string make_session(const std::string& dir, size_t n = 120) {
  const std::string path = dir + "/base.kith";
  auto store = SessionStore::create(path, kith::test::swatch_collection(n, 6, 5));
  store->add_judgments(random_judgments(300, int(n), 9));
  kith::Points map = kith::Points::Random(Eigen::Index(n), 3);
  store->write_checkpoint(map, 10);
  return path;
}

}  // namespace

TEST_CASE("sessions: a session closes and reopens identical, and the map continues from its checkpoint") {
  const std::string dir = kith::test::temp_dir("sessions-roundtrip");
  const std::string pictures = dir + "/photos";
  fs::create_directories(pictures);
  const size_t n = 300;
  const kith::Collection original = kith::test::swatch_collection(n, 8, 3, pictures);
  for (size_t i = 0; i < n; i += 2) kith::test::write_bytes(original.pictures[i], "png");  // odd ones are missing
  const std::string path = dir + "/studio.kith";

  kith::SessionSettings settings;
  settings.perplexity = 17.5;
  settings.blend = 0.3;
  settings.theta = 0.65;
  settings.dof = 0.7;
  settings.seed = 123456789012345ull;
  settings.learning_rate = 200;

  auto judgments = random_judgments(500, int(n), 17);
  std::vector<kith::Judgment> expected;
  kith::Points last_map;
  std::vector<kith::SessionPin> expected_pins;
  {
    auto store = SessionStore::create(path, original, settings);
    REQUIRE(store->settings() == settings);
    CHECK(store->add_person("Ines", "#0072b2") >= 0);
    // 100 one at a time (each its own committed transaction), the rest in batches.
    for (size_t k = 0; k < 100; ++k) judgments[k].id = store->add_judgment(judgments[k]);
    for (size_t k = 100; k < 500; k += 100) {
      std::vector<kith::Judgment> batch(judgments.begin() + long(k), judgments.begin() + long(k + 100));
      const auto ids = store->add_judgments(batch);
      REQUIRE(ids.size() == 100);
      for (size_t b = 0; b < 100; ++b) judgments[k + b].id = ids[b];
    }
    for (size_t k = 0; k < 500; k += 7) {
      store->set_retracted(judgments[k].id);
      judgments[k].retracted = true;
    }
    for (size_t k = 0; k < 500; k += 49) {  // some restored again
      store->set_retracted(judgments[k].id, false);
      judgments[k].retracted = false;
    }
    expected = judgments;
    for (int32_t item : {3, 77, 150, 299}) {
      std::vector<double> pos = {item * 0.5, -1.0 / 3.0, 1e-7 * item};
      store->set_pin(item, pos);
      expected_pins.push_back({item, pos, 0});
    }
    store->set_pin(42, {1, 2, 3});
    store->remove_pin(42);
    store->set_value("palette", "paper");
    for (int c = 0; c < 5; ++c) {
      last_map = kith::Points::Random(Eigen::Index(n), 3) * (c + 1);
      store->post_checkpoint(last_map, uint64_t(1000 + c));
      store->flush_checkpoints();
    }
    CHECK(store->checkpoint_count() == 3);  // keeps the last three
  }

  auto store = SessionStore::open(path);
  CHECK(store->settings() == settings);
  CHECK(store->value("palette").value_or("") == "paper");
  CHECK_FALSE(store->value("nothing").has_value());

  const kith::Collection back = store->collection();
  CHECK(back.ids == original.ids);
  CHECK(back.feature_names == original.feature_names);
  CHECK(back.picture_column == original.picture_column);
  CHECK(back.pictures == original.pictures);
  REQUIRE(back.tags.size() == original.tags.size());
  for (size_t t = 0; t < back.tags.size(); ++t) {
    CHECK(back.tags[t].name == original.tags[t].name);
    CHECK(back.tags[t].values == original.tags[t].values);
  }
  // Bit for bit: the features are stored as float64 BLOBs.
  kith::test::assert_near(back.features, original.features, 0.0, 0.0, "features");
  CHECK(back.warnings.size() == n / 2);  // the odd pictures never existed

  const auto stored = store->judgments();
  REQUIRE(stored.size() == expected.size());
  for (size_t k = 0; k < stored.size(); ++k) check_same_judgment(stored[k], expected[k]);
  std::set<std::string> names;
  for (const auto& p : store->people()) names.insert(p.name);
  CHECK(names == std::set<std::string>{"Ines", "Tomasz", "guest 7"});
  CHECK(store->people().front().colour == "#0072b2");

  const auto pins = store->pins();
  REQUIRE(pins.size() == expected_pins.size());
  for (size_t k = 0; k < pins.size(); ++k) {
    CHECK(pins[k].item == expected_pins[k].item);
    CHECK(pins[k].position == expected_pins[k].position);
  }

  const auto checkpoint = store->last_checkpoint();
  REQUIRE(checkpoint.has_value());
  CHECK(checkpoint->iteration == 1004);
  kith::test::assert_near(checkpoint->positions, last_map, 0.0, 0.0, "checkpoint");

  // The map continues: a new checkpoint written after reopening becomes the last one, and the
  // judgments added after reopening get ids after the old ones.
  kith::Points moved = checkpoint->positions * 0.5;
  store->write_checkpoint(moved, checkpoint->iteration + 50);
  CHECK(store->last_checkpoint()->iteration == 1054);
  kith::Judgment more = random_judgments(1, int(n), 99).front();
  CHECK(store->add_judgment(more) > stored.back().id);

  // Same session on another machine: pictures moved away. It still opens, and says which are missing.
  store.reset();
  fs::rename(pictures, dir + "/photos-elsewhere");
  auto moved_store = SessionStore::open(path);
  CHECK(moved_store->missing_pictures().size() == n);
  CHECK(moved_store->collection().warnings.size() == n);
  CHECK(moved_store->judgment_count() == 501);
}

TEST_CASE("sessions: judgments are never deleted, and bad writes are refused") {
  const std::string dir = kith::test::temp_dir("sessions-writes");
  const std::string path = make_session(dir, 30);
  auto store = SessionStore::open(path);
  const size_t before = store->judgment_count();
  kith::Judgment bad;
  bad.anchor = 1;
  bad.nearer = 1;
  bad.farther = 2;
  CHECK_THROWS_AS(store->add_judgment(bad), SessionError);
  bad.nearer = 30;  // no such item
  CHECK_THROWS_AS(store->add_judgment(bad), SessionError);
  bad.nearer = 3;
  bad.weight = 0;
  CHECK_THROWS_AS(store->add_judgment(bad), SessionError);
  // A batch with one bad judgment adds none.
  auto batch = random_judgments(10, 30, 4);
  batch[7].farther = -1;
  CHECK_THROWS_AS(store->add_judgments(batch), SessionError);
  CHECK(store->judgment_count() == before);
  CHECK_THROWS_AS(store->set_retracted(999999), SessionError);
  CHECK_THROWS_AS(store->write_checkpoint(kith::Points::Zero(29, 3), 1), SessionError);
  kith::SessionSettings s;
  s.dims = 4;
  CHECK_THROWS_AS(store->set_settings(s), SessionError);
  store.reset();

  // Even a direct DELETE through SQLite is stopped by the schema's trigger.
  sqlite3* db = nullptr;
  REQUIRE(sqlite3_open(path.c_str(), &db) == SQLITE_OK);
  CHECK(sqlite3_exec(db, "DELETE FROM judgments", nullptr, nullptr, nullptr) != SQLITE_OK);
  sqlite3_close(db);
  CHECK(SessionStore::open(path)->judgment_count() == before);

  // A read-only store refuses writes.
  auto ro = SessionStore::open(path, {true});
  CHECK(ro->judgment_count() == before);
  try {
    ro->add_judgment(random_judgments(1, 30, 1).front());
    FAIL("a read-only store accepted a judgment");
  } catch (const SessionError& e) {
    CHECK(e.kind() == SessionError::Kind::kReadOnly);
  }
}

TEST_CASE("sessions: create never overwrites unless asked, and then atomically") {
  const std::string dir = kith::test::temp_dir("sessions-create");
  const std::string path = make_session(dir, 20);
  const std::string before = kith::test::file_bytes(path);
  try {
    SessionStore::create(path, kith::test::swatch_collection(10, 2, 1));
    FAIL("create overwrote an existing file");
  } catch (const SessionError& e) {
    CHECK(e.kind() == SessionError::Kind::kExists);
    CHECK(std::string(e.what()).find("--force") != std::string::npos);
  }
  CHECK(kith::test::file_bytes(path) == before);
  // Not a session either: a user's own file is not replaced without being asked.
  kith::test::write_bytes(dir + "/notes.txt", "my notes");
  CHECK_THROWS_AS(SessionStore::create(dir + "/notes.txt", kith::test::swatch_collection(10, 2, 1)), SessionError);
  CHECK(kith::test::file_bytes(dir + "/notes.txt") == "my notes");
  // Asked: replaced, and no temporary files left behind.
  kith::SessionCreateOptions force;
  force.overwrite = true;
  CHECK(SessionStore::create(path, kith::test::swatch_collection(10, 2, 1), {}, force)->item_count() == 10);
  CHECK(kith::test::folder_listing(dir) == std::vector<std::string>{"base.kith", "notes.txt"});
  // A collection with a repeated id is refused before any file is made.
  auto dup = kith::test::swatch_collection(5, 2, 1);
  dup.ids[3] = dup.ids[1];
  CHECK_THROWS_AS(SessionStore::create(dir + "/dup.kith", dup), SessionError);
  CHECK_FALSE(fs::exists(dir + "/dup.kith"));
}

TEST_CASE("sessions: corrupt, truncated, foreign and newer files are refused, each unchanged") {
  const std::string dir = kith::test::temp_dir("sessions-refuse");
  const std::string base = make_session(dir, 200);
  const std::string good = kith::test::file_bytes(base);
  REQUIRE(good.size() > 8192 * 8);
  fs::remove(base);

  struct Case {
    const char* name;
    std::string bytes;
    SessionError::Kind kind;
    const char* words;  // part of the message that only this case gives
  };
  std::vector<Case> cases;
  {
    std::string corrupt = good;
    // Scribble over a b-tree page in the middle (page size 8192): header intact, structure broken.
    const size_t page = 8192 * 4;
    for (size_t k = 0; k < 8192; ++k) corrupt[page + k] = char((k * 131 + 7) & 0xff);
    cases.push_back({"corrupt", corrupt, SessionError::Kind::kCorrupt, "damaged"});
  }
  cases.push_back({"truncated", good.substr(0, good.size() / 2 + 123), SessionError::Kind::kTruncated, "truncated"});
  cases.push_back({"tiny", good.substr(0, 60), SessionError::Kind::kTruncated, "shorter than a SQLite header"});
  {
    std::string newer = good;
    newer[63] = char(kith::kSessionSchemaVersion + 1);  // PRAGMA user_version is bytes 60..63, big-endian
    cases.push_back({"newer", newer, SessionError::Kind::kNewerVersion, "newer kith"});
  }
  cases.push_back({"text", "id,weave\nswatch-1,twill\n", SessionError::Kind::kNotSession, "not a SQLite database"});
  cases.push_back({"empty", "", SessionError::Kind::kNotSession, "empty"});
  {
    // Another program's SQLite database.
    const std::string other = dir + "/other.db";
    sqlite3* db = nullptr;
    REQUIRE(sqlite3_open(other.c_str(), &db) == SQLITE_OK);
    REQUIRE(sqlite3_exec(db, "CREATE TABLE recipes(name TEXT); INSERT INTO recipes VALUES ('soup');", nullptr,
                         nullptr, nullptr) == SQLITE_OK);
    sqlite3_close(db);
    cases.push_back({"foreign", kith::test::file_bytes(other), SessionError::Kind::kNotSession, "another program"});
    fs::remove(other);
  }
  {
    // kith's application id, but no meta table (a stranger's collision, or a damaged create).
    const std::string other = dir + "/other.db";
    sqlite3* db = nullptr;
    REQUIRE(sqlite3_open(other.c_str(), &db) == SQLITE_OK);
    REQUIRE(sqlite3_exec(db, "PRAGMA application_id = 1802073192; PRAGMA user_version = 1; CREATE TABLE t(x);",
                         nullptr, nullptr, nullptr) == SQLITE_OK);
    sqlite3_close(db);
    cases.push_back({"no-meta", kith::test::file_bytes(other), SessionError::Kind::kNotSession, "no meta table"});
    fs::remove(other);
  }

  std::set<std::string> messages;
  for (const auto& c : cases) {
    CAPTURE(c.name);
    const std::string path = dir + "/" + c.name + ".kith";
    kith::test::write_bytes(path, c.bytes);
    const auto listing = kith::test::folder_listing(dir);
    for (bool read_only : {false, true}) {
      try {
        SessionStore::open(path, {read_only});
        FAIL("opened a bad file");
      } catch (const SessionError& e) {
        CHECK(e.kind() == c.kind);
        const std::string m = e.what();
        CAPTURE(m);
        CHECK(m.find(c.words) != std::string::npos);
        CHECK(m.find(path) != std::string::npos);  // says which file
        if (!read_only) messages.insert(m.substr(path.size()));
      }
      CHECK_THROWS_AS(SessionStore::inspect(path), SessionError);
      CHECK(kith::test::file_bytes(path) == c.bytes);            // byte for byte
      CHECK(kith::test::folder_listing(dir) == listing);         // no -wal, -shm, backup or temp files
    }
    // And create() will not replace it either.
    CHECK_THROWS_AS(SessionStore::create(path, kith::test::swatch_collection(3, 1, 1)), SessionError);
    CHECK(kith::test::file_bytes(path) == c.bytes);
  }
  CHECK(messages.size() == cases.size());  // each its own message

  // The sound file itself opens (the checks are not just refusing everything).
  kith::test::write_bytes(dir + "/good.kith", good);
  CHECK(SessionStore::inspect(dir + "/good.kith").judgments == 300);
  CHECK(SessionStore::open(dir + "/good.kith")->judgment_count() == 300);
}

TEST_CASE("sessions: a version 1 file is migrated after a backup, and keeps every judgment") {
  const std::string dir = kith::test::temp_dir("kith-migrate");
  const std::string path = make_session(dir);
  size_t judgments_before = 0;
  {
    auto store = SessionStore::open(path);
    judgments_before = store->judgment_count();
  }
  // Make it a version 1 file, as kith 0.1 wrote them: no events table (nor the later neighbours).
  sqlite3* db = nullptr;
  REQUIRE(sqlite3_open(path.c_str(), &db) == SQLITE_OK);
  REQUIRE(sqlite3_exec(db, "DROP TABLE events; DROP TABLE neighbours; PRAGMA user_version = 1;", nullptr, nullptr, nullptr) == SQLITE_OK);
  sqlite3_close(db);

  auto store = SessionStore::open(path);
  const std::string backup = store->migration_backup();
  REQUIRE_FALSE(backup.empty());
  CHECK(backup.find(".schema-v1") != std::string::npos);
  CHECK(store->judgment_count() == judgments_before);
  const int64_t e = store->add_event("cant_tell", R"({"anchor":"swatch-1"})");
  CHECK(e > 0);
  REQUIRE(store->events().size() == 1);
  CHECK(store->events()[0].kind == "cant_tell");
  CHECK(store->settings().metric == kith::Metric::kEuclidean);  // sessions before version 3 were Euclidean
  store.reset();

  // The backup is still a version 1 session with the same judgments.
  REQUIRE(sqlite3_open_v2(backup.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK);
  sqlite3_stmt* q = nullptr;
  REQUIRE(sqlite3_prepare_v2(db, "SELECT (SELECT count(*) FROM judgments), (SELECT user_version FROM pragma_user_version)",
                             -1, &q, nullptr) == SQLITE_OK);
  REQUIRE(sqlite3_step(q) == SQLITE_ROW);
  CHECK(size_t(sqlite3_column_int64(q, 0)) == judgments_before);
  CHECK(sqlite3_column_int(q, 1) == 1);
  sqlite3_finalize(q);
  sqlite3_close(db);
}

// The value of one key of a session's settings table, "" when there is no such row.
static std::string setting_row(const std::string& path, const char* key) {
  sqlite3* db = nullptr;
  REQUIRE(sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) == SQLITE_OK);
  sqlite3_stmt* q = nullptr;
  REQUIRE(sqlite3_prepare_v2(db, "SELECT value FROM settings WHERE key = ?", -1, &q, nullptr) == SQLITE_OK);
  sqlite3_bind_text(q, 1, key, -1, SQLITE_TRANSIENT);
  std::string value;
  if (sqlite3_step(q) == SQLITE_ROW) value = reinterpret_cast<const char*>(sqlite3_column_text(q, 0));
  sqlite3_finalize(q);
  sqlite3_close(db);
  return value;
}

TEST_CASE("sessions: a version 2 file (no metric) is migrated and opens as euclidean, and a cosine session keeps it") {
  const std::string dir = kith::test::temp_dir("kith-migrate-metric");
  kith::MapParameters cosine;
  cosine.metric = kith::Metric::kCosine;
  const std::string path = dir + "/cosine.kith";
  SessionStore::create(path, kith::test::swatch_collection(40, 4, 2), cosine).reset();
  CHECK(setting_row(path, "metric") == "cosine");
  CHECK(SessionStore::open(path, {true})->settings() == cosine);

  // As kith wrote version 2 files: no metric row.
  sqlite3* db = nullptr;
  REQUIRE(sqlite3_open(path.c_str(), &db) == SQLITE_OK);
  REQUIRE(sqlite3_exec(db, "DELETE FROM settings WHERE key = 'metric'; DROP TABLE neighbours; PRAGMA user_version = 2;", nullptr, nullptr,
                       nullptr) == SQLITE_OK);
  sqlite3_close(db);
  CHECK(SessionStore::inspect(path).schema_version == 2);
  {
    auto store = SessionStore::open(path);
    CHECK(store->migration_backup().find(".schema-v2") != std::string::npos);
    CHECK(store->settings().metric == kith::Metric::kEuclidean);
  }
  CHECK(setting_row(path, "metric") == "euclidean");  // the step wrote it
  CHECK(SessionStore::inspect(path).schema_version == kith::kSessionSchemaVersion);

  // A metric kith does not know is damage, named.
  REQUIRE(sqlite3_open(path.c_str(), &db) == SQLITE_OK);
  REQUIRE(sqlite3_exec(db, "UPDATE settings SET value = 'manhattan' WHERE key = 'metric';", nullptr, nullptr,
                       nullptr) == SQLITE_OK);
  sqlite3_close(db);
  try {
    SessionStore::open(path, {true})->settings();
    FAIL("an unknown metric was read");
  } catch (const SessionError& e) {
    CHECK(e.kind() == SessionError::Kind::kCorrupt);
    CHECK(std::string(e.what()).find("'manhattan'") != std::string::npos);
  }
}

// A graph of the collection's rows: each item's K nearest others by squared Euclidean distance,
// computed here by brute force.
static kith::NeighbourGraph brute_graph(const kith::Collection& c, size_t k) {
  kith::NeighbourGraph g;
  g.n = c.size();
  g.k = k;
  for (size_t i = 0; i < g.n; ++i) {
    std::vector<std::pair<double, int32_t>> d;
    for (size_t j = 0; j < g.n; ++j)
      if (j != i) d.push_back({(c.features.row(Eigen::Index(i)) - c.features.row(Eigen::Index(j))).squaredNorm(), int32_t(j)});
    std::sort(d.begin(), d.end());
    for (size_t a = 0; a < k; ++a) {
      g.index.push_back(d[a].second);
      g.distance2.push_back(d[a].first);
    }
  }
  return g;
}

TEST_CASE("sessions: a given neighbour graph is kept, changes the content hash, and a version 3 file opens without one") {
  const std::string dir = kith::test::temp_dir("kith-graph-session");
  kith::Collection c = kith::test::swatch_collection(40, 4, 7);
  const std::string plain_hash = kith::content_hash(c);
  c.neighbours = brute_graph(c, 9);
  CHECK(kith::content_hash(c) != plain_hash);
  const std::string path = dir + "/graph.kith";
  SessionStore::create(path, c, kith::MapParameters{}).reset();
  {
    const kith::Collection back = SessionStore::open(path, {true})->collection();
    CHECK(back.neighbours.n == 40);
    CHECK(back.neighbours.k == 9);
    CHECK(back.neighbours.index == c.neighbours.index);
    CHECK(back.neighbours.distance2 == c.neighbours.distance2);
    CHECK(kith::content_hash(back) == kith::content_hash(c));
  }
  // Damage: a row naming the item itself is refused with a message, not used.
  sqlite3* db = nullptr;
  REQUIRE(sqlite3_open(path.c_str(), &db) == SQLITE_OK);
  {
    sqlite3_stmt* q = nullptr;
    REQUIRE(sqlite3_prepare_v2(db, "UPDATE neighbours SET neighbours = ? WHERE item = 3", -1, &q, nullptr) == SQLITE_OK);
    std::vector<int32_t> self(9, 3);
    sqlite3_bind_blob(q, 1, self.data(), int(self.size() * sizeof(int32_t)), SQLITE_TRANSIENT);
    REQUIRE(sqlite3_step(q) == SQLITE_DONE);
    sqlite3_finalize(q);
  }
  sqlite3_close(db);
  try {
    SessionStore::open(path, {true})->collection();
    FAIL("a damaged graph was read");
  } catch (const SessionError& e) {
    CHECK(e.kind() == SessionError::Kind::kCorrupt);
    CHECK(std::string(e.what()).find("neighbour graph") != std::string::npos);
  }

  // As kith wrote version 3 files: no neighbours table. It is migrated and has no graph.
  const std::string old = dir + "/v3.kith";
  SessionStore::create(old, kith::test::swatch_collection(40, 4, 7), kith::MapParameters{}).reset();
  REQUIRE(sqlite3_open(old.c_str(), &db) == SQLITE_OK);
  REQUIRE(sqlite3_exec(db, "DROP TABLE neighbours; PRAGMA user_version = 3;", nullptr, nullptr, nullptr) == SQLITE_OK);
  sqlite3_close(db);
  CHECK(SessionStore::inspect(old).schema_version == 3);
  {
    auto store = SessionStore::open(old);
    CHECK(store->migration_backup().find(".schema-v3") != std::string::npos);
    CHECK(store->collection().neighbours.empty());
    CHECK(store->content_hash() == plain_hash);  // a session made before graphs is still found by its collection
  }
  CHECK(SessionStore::inspect(old).schema_version == kith::kSessionSchemaVersion);
}

TEST_CASE("sessions: events and renamed people are kept, a copy saved as is complete and never overwrites") {
  const std::string dir = kith::test::temp_dir("kith-events");
  const std::string path = make_session(dir);
  auto store = SessionStore::open(path);
  const int64_t ines = store->add_person("Ines", "#0072b2");
  store->add_person("Tomasz");
  CHECK_THROWS_AS(store->rename_person(ines, "Tomasz"), SessionError);  // names stay unique
  store->rename_person(ines, "Ines R.");
  for (const auto& j : store->judgments()) CHECK(j.person != "Ines");
  store->add_event("person", R"({"name":"Ines R.","renamed_from":"Ines"})");
  store->add_event("cant_tell", R"({"anchor":"a","candidates":["b","c"],"person":"Tomasz"})");
  CHECK_THROWS_AS(store->add_event("", "{}"), SessionError);

  const std::string copy = dir + "/copy.kith";
  store->save_copy(copy);
  const std::string copy_bytes = kith::test::file_bytes(copy);
  CHECK_THROWS_AS(store->save_copy(copy), SessionError);  // exists: refused
  CHECK(kith::test::file_bytes(copy) == copy_bytes);       // and untouched
  CHECK_THROWS_AS(store->save_copy(path), SessionError);  // never over the session itself
  const size_t judgments = store->judgment_count();
  store->add_event("after", "{}");  // the original goes on being written
  store.reset();

  auto reopened = SessionStore::open(copy);
  CHECK(reopened->judgment_count() == judgments);
  REQUIRE(reopened->events().size() == 2);
  CHECK(reopened->events()[1].kind == "cant_tell");
  bool renamed = false;
  for (const auto& p : reopened->people()) renamed = renamed || p.name == "Ines R.";
  CHECK(renamed);
  CHECK(reopened->last_checkpoint().has_value());
}
