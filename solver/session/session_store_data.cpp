// SessionStore: reads and writes of an open session (see session_store.h).
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

#include "solver/io/safe_file.h"
#include "solver/session/session_store_impl.h"

namespace kith {

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

namespace {

std::optional<std::string> meta_value(Db& d, const char* key) {
  Stmt m(d, "SELECT value FROM meta WHERE key = ?");
  m.bind(1, std::string(key));
  if (m.step()) return m.text(0);
  return std::nullopt;
}

// The neighbours table (schema version 4): none, or one row per item with the same k.
void read_neighbours(Db& d, const std::string& path, size_t n, NeighbourGraph* g) {
  Stmt q(d, "SELECT item, neighbours, distances FROM neighbours ORDER BY item");
  size_t row = 0;
  auto damaged = [&](const std::string& what) {
    throw SessionError(Kind::kCorrupt, path + ": damaged: the neighbour graph " + what);
  };
  while (q.step()) {
    if (size_t(q.i64(0)) != row || row >= n) damaged("rows are not 0..N-1");
    const auto idx = q.blob(1), dist = q.blob(2);
    if (row == 0) {
      g->k = idx.second / sizeof(int32_t);
      g->index.resize(n * g->k);
      g->distance2.resize(n * g->k);
    }
    if (g->k == 0 || idx.second != g->k * sizeof(int32_t) || dist.second != g->k * sizeof(double))
      damaged("has rows of different lengths");
    std::memcpy(g->index.data() + row * g->k, idx.first, idx.second);
    std::memcpy(g->distance2.data() + row * g->k, dist.first, dist.second);
    ++row;
  }
  if (row == 0) return;
  if (row != n) damaged("has " + std::to_string(row) + " rows for " + std::to_string(n) + " items");
  for (size_t e = 0; e < g->index.size(); ++e)
    if (g->index[e] < 0 || size_t(g->index[e]) >= n || size_t(g->index[e]) == e / g->k ||
        !(g->distance2[e] >= 0) || !std::isfinite(g->distance2[e]))
      damaged("names a row outside 0..N-1, an item as its own neighbour, or a bad distance");
  g->n = n;
}

}  // namespace

std::string SessionStore::content_hash() const {
  {
    std::lock_guard<std::mutex> lock(impl_->mutex);
    if (auto stored = meta_value(impl_->db, "content")) return *stored;
  }
  return kith::content_hash(collection());
}

std::string SessionStore::reading() const {
  std::lock_guard<std::mutex> lock(impl_->mutex);
  return meta_value(impl_->db, "reading").value_or("");
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
  read_neighbours(d, impl_->path, n, &c.neighbours);
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
    if (k == "metric") {
      if (!parse_metric(v, &s.metric))
        throw SessionError(Kind::kCorrupt, impl_->path + ": damaged: setting 'metric' is '" + v +
                                               "', not euclidean or cosine");
      continue;
    }
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
  // Refused as the safe file writer refuses (solver/io/safe_file.h): any file there, a session or not.
  if (const std::string problem = check_write_target(path, /*replace=*/false); !problem.empty())
    throw SessionError(Kind::kExists, problem);
  std::string tmp, error;  // an empty new file under an unpredictable name: VACUUM INTO fills it
  const int fd = create_temp_beside(path, &tmp, &error);
  if (fd < 0) throw SessionError(Kind::kIo, error);
  ::close(fd);
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
  // Refused if the name appeared meanwhile: never clobber.
  const int e = commit_temp_file(tmp, path, false, &error);
  fs::remove(tmp, ec);
  if (e != 0) throw SessionError(e == EEXIST ? Kind::kExists : Kind::kIo, error);
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
