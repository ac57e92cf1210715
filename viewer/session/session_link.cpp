#include "viewer/session/session_link.h"

#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <nlohmann/json.hpp>

namespace kith {

namespace fs = std::filesystem;

namespace {
double now_seconds() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}

bool writes_state(const CommandBody& body) {
  return std::holds_alternative<cmd::AddJudgment>(body) || std::holds_alternative<cmd::RetractJudgment>(body) ||
         std::holds_alternative<cmd::Pin>(body) || std::holds_alternative<cmd::Unpin>(body) ||
         std::holds_alternative<cmd::SetBlend>(body) || std::holds_alternative<cmd::SetPerplexity>(body) ||
         std::holds_alternative<cmd::SetTheta>(body);
}

// Judgments, pins and retractions are worth a file; a slider moved before anything else is not.
bool worth_a_file(const CommandBody& body) {
  return std::holds_alternative<cmd::AddJudgment>(body) || std::holds_alternative<cmd::RetractJudgment>(body) ||
         std::holds_alternative<cmd::Pin>(body);
}
}  // namespace

SessionLink::SessionLink(const std::string& path, bool read_only) : path_(path), read_only_(read_only) {
  SessionOpenOptions o;
  o.read_only = read_only;
  store_ = SessionStore::open(path, o);
  collection_ = store_->collection();
  judgments_ = store_->judgments();
  settings_ = store_->settings();
}

SessionLink::SessionLink(Collection collection, const MapParameters& parameters, const std::string& source,
                         const std::string& reading)
    : collection_(std::move(collection)), settings_(parameters), source_(source), reading_(reading) {}

SessionLink::~SessionLink() {
  try {
    if (store_) store_->flush_checkpoints();
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith: the last map checkpoint was not written: %s\n", e.what());
  }
}

Points SessionLink::start() const {
  if (!store_) return {};
  const auto c = store_->last_checkpoint();
  if (c && size_t(c->positions.rows()) == collection_.size()) return c->positions;
  return {};
}

void post_pins(const SessionStore& store, MapFeed& feed) {
  for (const SessionPin& p : store.pins()) feed.post(cmd::Pin{p.item, p.position});
}

std::vector<uint8_t> pinned_items(const SessionStore& store, size_t n) {
  std::vector<uint8_t> pinned(n, 0);
  for (const SessionPin& pin : store.pins())  // indices are checked on open; a guard all the same
    if (pin.item >= 0 && size_t(pin.item) < n) pinned[size_t(pin.item)] = 1;
  return pinned;
}

void SessionLink::post_pins(MapFeed& feed) const {
  if (store_) kith::post_pins(*store_, feed);
}

namespace {

// The folder and stem of the sessions a collection read from SOURCE starts.
std::pair<fs::path, std::string> session_place(const std::string& source, bool create) {
  const fs::path src(source);
  std::string stem = src.stem().string();
  if (stem.empty()) stem = "collection";
  fs::path dir = src.parent_path().empty() ? fs::path(".") : src.parent_path();
  if (::access(dir.c_str(), W_OK) != 0) {
    const char* xdg = std::getenv("XDG_DATA_HOME");
    const char* home = std::getenv("HOME");
    dir = (xdg && *xdg ? fs::path(xdg) : fs::path(home ? home : ".") / ".local" / "share") / "kith" / "sessions";
    std::error_code ec;
    if (create) fs::create_directories(dir, ec);
  }
  return {dir, stem};
}

fs::path numbered(const fs::path& dir, const std::string& stem, int k) {
  return dir / (k < 2 ? stem + ".kith" : stem + "-" + std::to_string(k) + ".kith");
}

}  // namespace

std::string SessionLink::path_for(const std::string& source) {
  const auto [dir, stem] = session_place(source, true);
  std::error_code ec;
  fs::path candidate = numbered(dir, stem, 1);
  for (int k = 2; fs::exists(candidate, ec) || fs::is_symlink(candidate, ec); ++k) candidate = numbered(dir, stem, k);
  return candidate.string();
}

std::string SessionLink::earlier_session(const std::string& source, const std::string& content_hash) {
  const auto [dir, stem] = session_place(source, false);
  std::error_code ec;
  for (int k = 1;; ++k) {
    const fs::path candidate = numbered(dir, stem, k);
    if (!fs::exists(candidate, ec) && !fs::is_symlink(candidate, ec)) return "";
    try {
      SessionOpenOptions o;
      o.read_only = true;
      if (SessionStore::open(candidate.string(), o)->content_hash() == content_hash) return candidate.string();
    } catch (const SessionError&) {
      // not a session, damaged, or made by a newer kith: not this collection's, and left alone
    }
  }
}

std::string SessionLink::ensure_store(const char* why) {
  if (store_) return "";
  if (read_only_) return "this session is open read-only: nothing can be saved";
  if (source_.empty()) return "";  // a generated collection: kept in memory only
  const std::string path = path_for(source_);
  try {
    SessionCreateOptions co;
    co.judgments = judgments_;
    co.reading = reading_;
    store_ = SessionStore::create(path, collection_, settings_, co);
    path_ = path;
    judgments_ = store_->judgments();
    std::fprintf(stderr, "kith: %s: started the session %s; everything from now on is saved there\n", why,
                 path.c_str());
    return "";
  } catch (const std::exception& e) {
    return std::string("could not start a session file for this collection: ") + e.what();
  }
}

std::string SessionLink::record(CommandBody& body) {
  if (!writes_state(body)) return "";
  if (read_only_) {
    if (std::holds_alternative<cmd::SetBlend>(body) || std::holds_alternative<cmd::SetPerplexity>(body) ||
        std::holds_alternative<cmd::SetTheta>(body))
      return "";  // trying settings out in a read-only window is fine; they are simply not kept
    return last_error_ = "read-only session: judgments and pins cannot be saved (open it without --read-only)";
  }
  if (!store_ && worth_a_file(body)) {
    if (std::string problem = ensure_store("your first judgment or pin"); !problem.empty())
      return last_error_ = problem;
  }
  // The settings as they would be after this command; checked again here, so a session never
  // holds a setting it could not be opened with (the window checked it before, MapFeed::prepare).
  SessionSettings next = settings_;
  if (auto* b = std::get_if<cmd::SetBlend>(&body)) next.blend = b->blend;
  if (auto* pp = std::get_if<cmd::SetPerplexity>(&body)) next.perplexity = pp->perplexity;
  if (auto* t = std::get_if<cmd::SetTheta>(&body)) next.theta = t->theta;
  if (std::string e; next != settings_ && !next.IsValid(&e, collection_.size())) return last_error_ = e;
  if (!store_) {
    // A generated collection: kept in memory (the feed gave a new judgment its id).
    if (auto* a = std::get_if<cmd::AddJudgment>(&body)) judgments_.push_back(a->judgment);
    if (auto* r = std::get_if<cmd::RetractJudgment>(&body))
      for (Judgment& j : judgments_)
        if (j.id == r->judgment_id) j.retracted = r->retracted;
    settings_ = next;
    return "";
  }
  try {
    if (auto* a = std::get_if<cmd::AddJudgment>(&body)) {
      a->judgment.id = store_->add_judgment(a->judgment);
      judgments_.push_back(a->judgment);
      if (print_saved_) {
        const Judgment& j = a->judgment;
        const auto& ids = collection_.ids;
        std::printf("saved judgment %lld: %s,%s,%s\n", static_cast<long long>(j.id), ids[size_t(j.anchor)].c_str(),
                    ids[size_t(j.nearer)].c_str(), ids[size_t(j.farther)].c_str());
        std::fflush(stdout);
      }
    } else if (auto* r = std::get_if<cmd::RetractJudgment>(&body)) {
      store_->set_retracted(r->judgment_id, r->retracted);
      for (Judgment& j : judgments_)
        if (j.id == r->judgment_id) j.retracted = r->retracted;
    } else if (auto* p = std::get_if<cmd::Pin>(&body)) {
      std::vector<double> where = p->position;
      if (where.empty() && last_ && p->item < last_->positions.rows())
        for (Eigen::Index d = 0; d < last_->positions.cols(); ++d) where.push_back(last_->positions(p->item, d));
      if (!where.empty()) store_->set_pin(p->item, where);
    } else if (auto* u = std::get_if<cmd::Unpin>(&body)) {
      store_->remove_pin(u->item);
    } else {
      store_->set_settings(next);
      settings_ = next;  // only once written
    }
    ++writes_;
    last_error_.clear();
  } catch (const std::exception& e) {
    // Not written, so not done: the window does not post it and shows this message.
    last_error_ = "could not write to the session " + path_ + ": " + e.what();
    std::fprintf(stderr, "kith: %s\n", last_error_.c_str());
    return last_error_;
  }
  return "";
}

void SessionLink::apply_person_event(const SessionEvent& event) {
  if (const auto* e = std::get_if<event::PersonRenamed>(&event)) {
    for (const SessionPerson& p : store_->people())
      if (p.name == e->from) return store_->rename_person(p.id, e->name);
    store_->add_person(e->name, "");
  } else if (const auto* e = std::get_if<event::PersonAdded>(&event)) {
    const int64_t id = store_->add_person(e->name, e->colour);  // an existing name: its id
    if (!e->colour.empty()) store_->set_person_colour(id, e->colour);
  } else if (const auto* e = std::get_if<event::PersonColoured>(&event)) {
    const int64_t id = store_->add_person(e->name, e->colour);
    if (!e->colour.empty()) store_->set_person_colour(id, e->colour);
  }
}

std::string SessionLink::record_event(const SessionEvent& event) {
  if (read_only_) return last_error_ = "read-only session: this cannot be saved (open it without --read-only)";
  if (std::string problem = ensure_store("a person or an answer"); !problem.empty()) return last_error_ = problem;
  if (!store_) return "";
  try {
    apply_person_event(event);  // the people table follows the window's list
    const EventRecord record = to_record(event);
    store_->add_event(record.kind, record.detail);
    ++writes_;
    last_error_.clear();
    return "";
  } catch (const std::exception& e) {
    last_error_ = "could not write to the session " + path_ + ": " + e.what();
    return last_error_;
  }
}

std::unique_ptr<MapFeed> SessionLink::recording(MapFeed& inner) {
  return std::make_unique<RecordingFeed>(inner, [this](CommandBody& body) { return record(body); });
}

WindowHooks SessionLink::hooks(WindowHooks base) {
  WindowHooks h = base;
  auto previous_snapshot = base.on_snapshot;
  h.on_snapshot = [this, previous_snapshot](const std::shared_ptr<const Snapshot>& s) {
    last_ = s;
    const double now = now_seconds();
    if (store_ && !read_only_ && now - last_checkpoint_ > 5.0) {
      last_checkpoint_ = now;
      store_->post_checkpoint(s->positions, s->iteration);
    }
    if (previous_snapshot) previous_snapshot(s);
  };
  h.record_event = [this](const SessionEvent& event) { return record_event(event); };
  h.title_state = [this] { return title_state(); };
  return h;
}

std::string SessionLink::title_state() const {
  if (!store_) {
    if (source_.empty()) return "not saved (a generated collection)";
    return "not saved yet: your first judgment or pin starts a session file";
  }
  const std::string name = fs::path(path_).filename().string();
  if (read_only_) return "session " + name + " (read-only)";
  if (!last_error_.empty()) return "session " + name + " (NOT SAVED: " + last_error_ + ")";
  return "session " + name + " (saved as you go)";
}

void SessionLink::final_checkpoint(const Snapshot& s) {
  if (!store_ || read_only_) return;
  try {
    store_->write_checkpoint(s.positions, s.iteration);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "kith: the last map checkpoint was not written: %s\n", e.what());
  }
}

std::string SessionLink::save_as(const std::string& path) {
  if (path.empty()) return "give a file name";
  std::error_code ec;
  if (fs::exists(path, ec)) return path + ": a file is already there; kith does not write over it";
  try {
    if (!store_) {
      SessionCreateOptions co;
      co.judgments = judgments_;
      store_ = SessionStore::create(path, collection_, settings_, co);
      judgments_ = store_->judgments();
    } else {
      if (last_) store_->write_checkpoint(last_->positions, last_->iteration);
      store_->save_copy(path);
      store_->flush_checkpoints();
      auto next = SessionStore::open(path);
      store_ = std::move(next);  // the old file is closed (and unlocked) here, complete
    }
    path_ = path;
    read_only_ = false;
    last_error_.clear();
    return "";
  } catch (const std::exception& e) {
    return e.what();
  }
}

}  // namespace kith
