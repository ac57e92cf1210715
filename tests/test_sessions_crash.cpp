// Crash safety and locking with real processes: a child adds judgments through the store and is
// killed with SIGKILL at random moments; every judgment it acknowledged (through a pipe, after
// add_judgment returned) must be in the file afterwards, and the file must pass
// PRAGMA integrity_check. A second process opening a session is refused read-write. A session
// open in a kith window under Xvfb, killed mid-answer, keeps every judgment the window showed.
#include <doctest/doctest.h>
#include <signal.h>
#include <sqlite3.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <map>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"

using kith::SessionError;
using kith::SessionStore;

namespace {

struct Ack {
  int64_t id;
  int32_t anchor, nearer, farther;
  int32_t round;
};

// The child: opens the session and adds judgments until it is killed, acknowledging each one
// after the store said it was written. Every fifth judgment it also posts a map checkpoint, so
// kills land in the writer thread's transactions too. Never returns.
[[noreturn]] void child_adds_judgments(const std::string& path, int ack_fd, int round, int n_items) {
  try {
    auto store = SessionStore::open(path);
    std::mt19937 rng(uint32_t(round) * 7919u + 1u);
    std::uniform_int_distribution<int> item(0, n_items - 1);
    for (uint64_t k = 0;; ++k) {
      kith::Judgment j;
      j.anchor = item(rng);
      do j.nearer = item(rng); while (j.nearer == j.anchor);
      do j.farther = item(rng); while (j.farther == j.anchor || j.farther == j.nearer);
      j.person = "round " + std::to_string(round);
      j.kind = kith::JudgmentKind::kPair;
      const Ack ack{store->add_judgment(j), j.anchor, j.nearer, j.farther, round};
      if (::write(ack_fd, &ack, sizeof ack) != ssize_t(sizeof ack)) ::_exit(4);
      if (k % 5 == 0) store->post_checkpoint(kith::Points::Random(n_items, 3), k);
    }
  } catch (const std::exception& e) {
    std::fprintf(stderr, "crash-test child: %s\n", e.what());
    ::_exit(3);
  }
}

std::string integrity_check(const std::string& path) {
  sqlite3* db = nullptr;
  std::string result;
  if (sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READONLY, nullptr) != SQLITE_OK) {
    result = "cannot open";
  } else {
    sqlite3_stmt* s = nullptr;
    sqlite3_prepare_v2(db, "PRAGMA integrity_check", -1, &s, nullptr);
    while (sqlite3_step(s) == SQLITE_ROW) result += reinterpret_cast<const char*>(sqlite3_column_text(s, 0));
    sqlite3_finalize(s);
  }
  sqlite3_close(db);
  return result;
}

}  // namespace

TEST_CASE("sessions: killed at random moments, a session keeps every acknowledged judgment") {
  const std::string dir = kith::test::temp_dir("sessions-crash");
  const std::string path = dir + "/workshop.kith";
  const int n_items = 60;
  SessionStore::create(path, kith::test::swatch_collection(n_items, 4, 11)).reset();

  std::mt19937 rng(2026);  // fixed seed: the same kill moments every run
  std::uniform_int_distribution<int> delay_us(200, 80000);
  const int rounds = 60;
  int kills = 0, losses = 0, failed_checks = 0, child_errors = 0;
  size_t acknowledged = 0, unacknowledged_but_kept = 0, kills_with_acks = 0;
  std::map<int64_t, Ack> all_acks;
  for (int round = 0; round < rounds; ++round) {
    int fds[2];
    REQUIRE(::pipe(fds) == 0);
    const int wait = delay_us(rng);
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
      ::close(fds[0]);
      child_adds_judgments(path, fds[1], round, n_items);
    }
    ::close(fds[1]);
    // Odd rounds: killed at a random moment after the fork (start-up, opening, writing).
    // Even rounds: killed at a random moment after the first acknowledgement, so half the kills
    // land while judgments are being written however slow a loaded machine makes the start-up.
    Ack ack{};
    size_t this_round = 0;
    if (round % 2 == 0 && ::read(fds[0], &ack, sizeof ack) == ssize_t(sizeof ack)) {
      all_acks[ack.id] = ack;
      ++this_round;
    }
    ::usleep(useconds_t(wait));
    ::kill(pid, SIGKILL);
    int status = 0;
    ::waitpid(pid, &status, 0);
    if (WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL) ++kills;
    else ++child_errors;
    while (::read(fds[0], &ack, sizeof ack) == ssize_t(sizeof ack)) {
      all_acks[ack.id] = ack;
      ++this_round;
    }
    ::close(fds[0]);
    acknowledged += this_round;
    if (this_round > 0) ++kills_with_acks;

    // The file as the crash left it (with its WAL) must be sound...
    const std::string check = integrity_check(path);
    if (check != "ok") {
      ++failed_checks;
      MESSAGE("round " << round << ": integrity_check says " << check);
    }
    // ...and hold every judgment acknowledged in this and every earlier round.
    auto store = SessionStore::open(path);
    std::map<int64_t, kith::Judgment> kept;
    for (const auto& j : store->judgments()) kept[j.id] = j;
    for (const auto& [id, a] : all_acks) {
      auto it = kept.find(id);
      if (it == kept.end() || it->second.anchor != a.anchor || it->second.nearer != a.nearer ||
          it->second.farther != a.farther || it->second.person != "round " + std::to_string(a.round))
        ++losses;
    }
    unacknowledged_but_kept = kept.size() - all_acks.size();
  }
  std::printf("sessions crash test: %d kills (SIGKILL), %zu rounds killed after at least one acknowledgement, "
              "%zu judgments acknowledged, %d lost, %zu written but killed before acknowledging, "
              "%d failed integrity checks\n",
              kills, kills_with_acks, acknowledged, losses, unacknowledged_but_kept, failed_checks);
  CHECK(child_errors == 0);
  CHECK(kills >= 50);
  CHECK(kills_with_acks >= rounds / 2);  // the kills must land while judgments are being written, not only at start-up
  CHECK(losses == 0);
  CHECK(failed_checks == 0);
  CHECK(integrity_check(path) == "ok");
}

TEST_CASE("sessions: a second process is refused read-write and may open read-only") {
  const std::string dir = kith::test::temp_dir("sessions-lock");
  const std::string path = dir + "/shared.kith";
  {
    auto store = SessionStore::create(path, kith::test::swatch_collection(20, 3, 2));
    kith::Judgment j;
    j.anchor = 0, j.nearer = 1, j.farther = 2, j.person = "Ines";
    store->add_judgment(j);
  }
  int ready[2], done[2];
  REQUIRE(::pipe(ready) == 0);
  REQUIRE(::pipe(done) == 0);
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    int code = 0;
    try {
      auto store = SessionStore::open(path);
      kith::Judgment j;
      j.anchor = 3, j.nearer = 4, j.farther = 5;
      store->add_judgment(j);
      char c = 'R';
      if (::write(ready[1], &c, 1) != 1) code = 4;
      if (::read(done[0], &c, 1) != 1) code = 5;
    } catch (...) {
      code = 3;
    }
    ::_exit(code);
  }
  char c = 0;
  REQUIRE(::read(ready[0], &c, 1) == 1);
  try {
    SessionStore::open(path);
    FAIL("a second process opened the session read-write");
  } catch (const SessionError& e) {
    const std::string m = e.what();
    CAPTURE(m);
    CHECK(e.kind() == SessionError::Kind::kInUse);
    CHECK(m.find("another kith process (process " + std::to_string(pid) + ")") != std::string::npos);
    CHECK(m.find("read-only") != std::string::npos);
  }
  CHECK(SessionStore::inspect(path).in_use);
  // Read-only works meanwhile and sees the other process's committed judgment.
  CHECK(SessionStore::open(path, {true})->judgment_count() == 2);
  // create --force will not replace it under the other process's feet either.
  kith::SessionCreateOptions force;
  force.overwrite = true;
  CHECK_THROWS_AS(SessionStore::create(path, kith::test::swatch_collection(5, 1, 1), {}, force), SessionError);
  c = 'D';
  REQUIRE(::write(done[1], &c, 1) == 1);
  int status = 0;
  ::waitpid(pid, &status, 0);
  CHECK(WIFEXITED(status));
  CHECK(WEXITSTATUS(status) == 0);
  for (int fd : {ready[0], ready[1], done[0], done[1]}) ::close(fd);
  // The other process closed it: now it opens read-write here.
  CHECK(SessionStore::open(path)->judgment_count() == 2);
  CHECK_FALSE(SessionStore::inspect(path).in_use);
}

TEST_CASE("sessions: kith judge killed at random moments loses no judgment it reported") {
  const std::string dir = kith::test::temp_dir("sessions-crash-cli");
  const std::string path = dir + "/workshop.kith";
  const int n_items = 40;
  const kith::Collection collection = kith::test::swatch_collection(n_items, 3, 12);
  SessionStore::create(path, collection).reset();
  std::mt19937 rng(77);
  std::uniform_int_distribution<int> item(0, n_items - 1), delay_us(2000, 150000);
  const int rounds = 15;
  int kills = 0, finished = 0, losses = 0, failed_checks = 0;
  size_t acknowledged = 0;
  std::map<int64_t, std::string> all_acks;  // id -> "a,n,f" as printed
  for (int round = 0; round < rounds; ++round) {
    std::vector<std::string> argv_s = {"kith", "judge", path, "--person", "cli"};
    for (int k = 0; k < 200; ++k) {
      int a = item(rng), b, c;
      do b = item(rng); while (b == a);
      do c = item(rng); while (c == a || c == b);
      argv_s.push_back("--add");
      argv_s.push_back(collection.ids[size_t(a)] + "," + collection.ids[size_t(b)] + "," + collection.ids[size_t(c)]);
    }
    int fds[2];
    REQUIRE(::pipe(fds) == 0);
    const int wait = delay_us(rng);
    const pid_t pid = ::fork();
    REQUIRE(pid >= 0);
    if (pid == 0) {
      ::dup2(fds[1], 1);
      ::close(fds[0]);
      ::close(fds[1]);
      std::vector<char*> argv;
      for (auto& s : argv_s) argv.push_back(s.data());
      argv.push_back(nullptr);
      ::execv(KITH_BINARY, argv.data());
      ::_exit(127);
    }
    ::close(fds[1]);
    std::string out;
    char buf[4096];
    ssize_t got;
    // Even rounds: the random delay starts at the first line kith prints, so these kills land
    // while judgments are being written even when start-up is slow (a loaded or sanitized build).
    if (round % 2 == 0)
      while (out.find('\n') == std::string::npos && (got = ::read(fds[0], buf, sizeof buf)) > 0)
        out.append(buf, size_t(got));
    ::usleep(useconds_t(wait));
    ::kill(pid, SIGKILL);
    int status = 0;
    ::waitpid(pid, &status, 0);
    if (WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL) ++kills;
    // A round whose child finished its adds before the kill landed is a clean run, not a failure.
    if (WIFEXITED(status) && WEXITSTATUS(status) == 0) ++finished;
    while ((got = ::read(fds[0], buf, sizeof buf)) > 0) out.append(buf, size_t(got));
    ::close(fds[0]);
    std::istringstream lines(out);
    std::string line;
    while (std::getline(lines, line)) {
      long long id = 0;
      char triple[256] = {};
      // A line cut by the kill is not an acknowledgement; a whole one ends in a newline, which
      // getline removed, so only parse lines followed by one.
      if (std::sscanf(line.c_str(), "added judgment %lld: %255s", &id, triple) == 2 && !lines.eof()) {
        all_acks[id] = triple;
        ++acknowledged;
      }
    }
    if (integrity_check(path) != "ok") ++failed_checks;
    auto store = SessionStore::open(path);
    std::map<int64_t, kith::Judgment> kept;
    for (const auto& j : store->judgments()) kept[j.id] = j;
    for (const auto& [id, triple] : all_acks) {
      auto it = kept.find(id);
      if (it == kept.end()) {
        ++losses;
        continue;
      }
      const auto& j = it->second;
      const std::string stored = collection.ids[size_t(j.anchor)] + "," + collection.ids[size_t(j.nearer)] + "," +
                                 collection.ids[size_t(j.farther)];
      if (stored != triple || j.person != "cli") ++losses;
    }
  }
  std::printf("sessions crash test (kith judge): %d kills, %zu judgments reported added, %d lost, %d failed "
              "integrity checks\n",
              kills, acknowledged, losses, failed_checks);
  CHECK(kills + finished == rounds);  // every child was either killed or finished cleanly
  CHECK(kills >= rounds / 2);
  CHECK(acknowledged > 0);
  CHECK(losses == 0);
  CHECK(failed_checks == 0);
}

TEST_CASE("sessions: a window killed mid-answer keeps every judgment it showed as made, and the file opens") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("sessions-crash-window");
  const std::string path = dir + "/round.kith";
  const kith::Collection collection = kith::test::swatch_collection(120, 6, 11);
  SessionStore::create(path, collection).reset();
  std::mt19937 rng(515);  // fixed seed: the same kill points every run
  std::uniform_int_distribution<int> after_dump(1, 12), delay_ms(0, 120);
  const int rounds = 20, answers = 40;
  int kills = 0, kills_mid_answering = 0, losses = 0, failed_checks = 0, refused_opens = 0;
  std::map<int64_t, std::string> acknowledged;  // stored id -> "anchor,nearer,farther"
  for (int round = 0; round < rounds; ++round) {
    // Each answer is preceded by a state dump (written whole, then renamed): the judgments a dump
    // lists under the asking panel's answers are the ones the window showed as made.
    std::ostringstream script;
    script << "2 key A\n";  // asking at once: the map need not settle for questions to be asked
    const std::string prefix = dir + "/r" + std::to_string(round) + "-";
    for (int k = 0; k < answers; ++k)
      script << 4 + 3 * k << " dump " << prefix << k << ".json\n"
             << 5 + 3 * k << (k % 2 ? " key LEFT\n" : " key RIGHT\n");
    script << 4 + 3 * answers << " quit\n";
    kith::test::write_bytes(dir + "/script.txt", script.str());
    const std::string pid_file = dir + "/kith.pid";
    std::filesystem::remove(pid_file);
    const std::string command = std::string(kith::test::kXvfb) + "sh -c 'echo $$ > " + pid_file + "; exec " +
                                KITH_BINARY + " open " + path +
                                " --people Ana,Ben --size 640x400 --no-vsync --frames 1000 --script " + dir +
                                "/script.txt' > " + dir + "/window.log 2>&1";
    const pid_t shell = ::fork();
    REQUIRE(shell >= 0);
    if (shell == 0) {
      ::execl("/bin/sh", "sh", "-c", command.c_str(), static_cast<char*>(nullptr));
      ::_exit(127);
    }
    // Killed a random time after a random dump (so mid-answering, however slow the start-up).
    const int wait_for = after_dump(rng);
    bool reached = false;
    for (int tick = 0; tick < 1200 && !reached; ++tick) {  // at most 60 s
      reached = std::filesystem::exists(prefix + std::to_string(wait_for) + ".json");
      if (!reached) ::usleep(50000);
    }
    ::usleep(useconds_t(delay_ms(rng)) * 1000);
    const long pid = std::atol(kith::test::file_bytes(pid_file).c_str());
    if (pid > 0 && ::kill(pid_t(pid), SIGKILL) == 0) ++kills;
    int status = 0;
    ::waitpid(shell, &status, 0);
    kills_mid_answering += reached ? 1 : 0;
    // Every dump of this round that is there is whole; each lists the answers made so far.
    for (int k = 0; k < answers; ++k) {
      const std::string dump = prefix + std::to_string(k) + ".json";
      if (!std::filesystem::exists(dump)) continue;
      const auto state = nlohmann::json::parse(kith::test::file_bytes(dump));
      for (const auto& answer : state["asking"]["answers"])
        for (const auto& j : answer["judgments"])
          acknowledged[j["id"].get<int64_t>()] = j["anchor"].get<std::string>() + "," + j["nearer"].get<std::string>() +
                                                 "," + j["farther"].get<std::string>();
    }
    if (integrity_check(path) != "ok") ++failed_checks;
    try {
      auto store = SessionStore::open(path);
      std::map<int64_t, std::string> kept;
      for (const auto& j : store->judgments())
        kept[j.id] = collection.ids[size_t(j.anchor)] + "," + collection.ids[size_t(j.nearer)] + "," +
                     collection.ids[size_t(j.farther)];
      for (const auto& [id, triple] : acknowledged) losses += kept.count(id) && kept[id] == triple ? 0 : 1;
    } catch (const SessionError& e) {
      ++refused_opens;
      MESSAGE("round " << round << ": the session does not open: " << e.what());
    }
  }
  std::printf(
      "sessions crash test (window): %d kills (SIGKILL) of kith open, %d after answering began, %zu judgments "
      "shown as made, %d lost, %d failed integrity checks, %d refused opens\n",
      kills, kills_mid_answering, acknowledged.size(), losses, failed_checks, refused_opens);
  CHECK(kills == rounds);
  CHECK(kills_mid_answering == rounds);
  CHECK(acknowledged.size() >= size_t(rounds));
  CHECK(losses == 0);
  CHECK(failed_checks == 0);
  CHECK(refused_opens == 0);
}
