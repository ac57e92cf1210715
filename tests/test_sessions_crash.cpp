// Crash safety and locking with real processes: a child adds judgments through the store and is
// killed with SIGKILL at random moments; every judgment it acknowledged (through a pipe, after
// add_judgment returned) must be in the file afterwards, and the file must pass
// PRAGMA integrity_check. A second process opening a session is refused read-write. A session
// open in a kith window under Xvfb, killed mid-answer, keeps every judgment the window showed.
#include <doctest/doctest.h>
#include <signal.h>
#include <sqlite3.h>
#include <fcntl.h>
#include <poll.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
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
      do j.nearer = item(rng);
      while (j.nearer == j.anchor);
      do j.farther = item(rng);
      while (j.farther == j.anchor || j.farther == j.nearer);
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

// Forks a child that runs CHILD(the write end of a new pipe) and then exits (127 if CHILD returns);
// the parent gets the child's pid and keeps only the read end, in FDS[0].
template <class Child>
pid_t fork_piped(int fds[2], Child child) {
  REQUIRE(::pipe(fds) == 0);
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    ::close(fds[0]);
    child(fds[1]);
    ::_exit(127);
  }
  ::close(fds[1]);
  return pid;
}

// Waits for the child's first line of output on FD (when FIRST_LINE; a minute at most), then
// WAIT_US more; kills it with SIGKILL, reaps it and reads the rest of its output into *OUT
// (closing FD). Returns its wait status.
int kill_mid_output(pid_t pid, int fd, int wait_us, bool first_line, std::string* out) {
  char buf[4096];
  ssize_t got;
  pollfd ready{fd, POLLIN, 0};
  while (first_line && out->find('\n') == std::string::npos && ::poll(&ready, 1, 60000) == 1 &&
         (got = ::read(fd, buf, sizeof buf)) > 0)
    out->append(buf, size_t(got));
  ::usleep(useconds_t(wait_us));
  ::kill(pid, SIGKILL);
  int status = 0;
  ::waitpid(pid, &status, 0);
  while ((got = ::read(fd, buf, sizeof buf)) > 0) out->append(buf, size_t(got));
  ::close(fd);
  return status;
}

// The acknowledgements in a child's output, printed with FORMAT ("... %lld: %255s"): id -> the
// "anchor,nearer,farther" ids. A line cut by the kill is not one: a whole line ends in a newline.
size_t read_acks(const std::string& out, const char* format, std::map<int64_t, std::string>* acks) {
  size_t found = 0;
  std::istringstream lines(out);
  std::string line;
  while (std::getline(lines, line)) {
    long long id = 0;
    char triple[256] = {};
    if (std::sscanf(line.c_str(), format, &id, triple) == 2 && !lines.eof()) {
      (*acks)[id] = triple;
      ++found;
    }
  }
  return found;
}

// How many of ACKS the session at PATH does not hold as acknowledged (missing, other items, or
// another person).
int count_losses(const std::string& path, const std::map<int64_t, std::string>& acks, const std::string& person) {
  auto store = SessionStore::open(path);
  const std::vector<std::string> ids = store->item_ids();
  std::map<int64_t, kith::Judgment> kept;
  for (const auto& j : store->judgments()) kept[j.id] = j;
  int losses = 0;
  for (const auto& [id, triple] : acks) {
    auto it = kept.find(id);
    if (it == kept.end()) {
      ++losses;
      continue;
    }
    const auto& j = it->second;
    const std::string stored = ids[size_t(j.anchor)] + "," + ids[size_t(j.nearer)] + "," + ids[size_t(j.farther)];
    if (stored != triple || j.person != person) ++losses;
  }
  return losses;
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
    const int wait = delay_us(rng);
    int fds[2];
    const pid_t pid = fork_piped(fds, [&](int out) { child_adds_judgments(path, out, round, n_items); });
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
    if (WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL)
      ++kills;
    else
      ++child_errors;
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
  std::printf(
      "sessions crash test: %d kills (SIGKILL), %zu rounds killed after at least one acknowledgement, "
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
      do b = item(rng);
      while (b == a);
      do c = item(rng);
      while (c == a || c == b);
      argv_s.push_back("--add");
      argv_s.push_back(collection.ids[size_t(a)] + "," + collection.ids[size_t(b)] + "," + collection.ids[size_t(c)]);
    }
    const int wait = delay_us(rng);
    int fds[2];
    const pid_t pid = fork_piped(fds, [&](int out) {
      ::dup2(out, 1);
      ::close(out);
      std::vector<char*> argv;
      for (auto& s : argv_s) argv.push_back(s.data());
      argv.push_back(nullptr);
      ::execv(KITH_BINARY, argv.data());
    });
    // Even rounds: the random delay starts at the first line kith prints, so these kills land
    // while judgments are being written even when start-up is slow (a loaded or sanitized build).
    std::string out;
    const int status = kill_mid_output(pid, fds[0], wait, round % 2 == 0, &out);
    if (WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL) ++kills;
    // A round whose child finished its adds before the kill landed is a clean run, not a failure.
    if (WIFEXITED(status) && WEXITSTATUS(status) == 0) ++finished;
    acknowledged += read_acks(out, "added judgment %lld: %255s", &all_acks);
    if (integrity_check(path) != "ok") ++failed_checks;
    losses += count_losses(path, all_acks, "cli");
  }
  std::printf(
      "sessions crash test (kith judge): %d kills, %zu judgments reported added, %d lost, %d failed "
      "integrity checks\n",
      kills, acknowledged, losses, failed_checks);
  CHECK(kills + finished == rounds);  // every child was either killed or finished cleanly
  CHECK(kills >= rounds / 2);
  CHECK(acknowledged > 0);
  CHECK(losses == 0);
  CHECK(failed_checks == 0);
}

namespace {

// An X server for a whole test (Xvfb, which xvfb-run starts too), so a test can kill the window
// alone. The display is chosen by the server (-displayfd); stopped when this goes.
struct XServer {
  pid_t pid = -1;
  std::string display;
  XServer() {
    // Two servers starting at once can pick the same display and one then exits: try again.
    for (int attempt = 0; attempt < 5 && display.empty(); ++attempt) {
      int fds[2];
      pid = fork_piped(fds, [](int out) {
        const std::string fd = std::to_string(out);
        ::execlp("Xvfb", "Xvfb", "-displayfd", fd.c_str(), "-screen", "0", "1280x800x24", "-nolisten", "tcp",
                 static_cast<char*>(nullptr));
      });
      std::string number;
      char c = 0;
      while (::read(fds[0], &c, 1) == 1 && c != '\n') number += c;
      ::close(fds[0]);
      ::usleep(300000);
      const bool alive = ::waitpid(pid, nullptr, WNOHANG) == 0;
      if (alive && !number.empty() && std::filesystem::exists("/tmp/.X11-unix/X" + number)) display = ":" + number;
      else stop();
    }
  }
  void stop() {
    ::kill(pid, SIGTERM);
    ::waitpid(pid, nullptr, 0);
  }
  ~XServer() {
    if (!display.empty()) stop();
  }
};

}  // namespace

TEST_CASE("sessions window: killed with SIGKILL mid-answer 20 times, every saved judgment is kept and the file opens") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("sessions-window-crash");
  const std::string path = dir + "/workshop.kith";
  SessionStore::create(path, kith::test::swatch_collection(60, 4, 21)).reset();
  // Pair questions (A), then an answer every third frame, left and right in turn.
  {
    std::ofstream script(dir + "/answers.txt");
    script << "3 key A\n";
    for (int f = 8, k = 0; f < 60000; f += 3, ++k) script << f << " key " << (k % 2 ? "RIGHT" : "LEFT") << "\n";
  }
  XServer x;
  REQUIRE_MESSAGE(!x.display.empty(), "Xvfb did not start");
  std::mt19937 rng(404);  // fixed: the same kill moments every run
  std::uniform_int_distribution<int> delay_us(30000, 900000);
  const int rounds = 20;
  int kills = 0, losses = 0, failed_checks = 0, failed_opens = 0, rounds_with_acks = 0;
  size_t acknowledged = 0;
  std::map<int64_t, std::string> all_acks;
  for (int round = 0; round < rounds; ++round) {
    const int wait = delay_us(rng);
    int fds[2];
    const pid_t pid = fork_piped(fds, [&](int out) {
      ::setenv("DISPLAY", x.display.c_str(), 1);
      ::dup2(out, 1);
      ::close(out);
      const std::string log = dir + "/window-" + std::to_string(round) + ".log";
      const int err = ::open(log.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
      ::dup2(err, 2);
      const std::string script = dir + "/answers.txt";
      ::execl(KITH_BINARY, "kith", "open", path.c_str(), "--people", "Ana", "--frames", "60000", "--no-vsync",
              "--script", script.c_str(), "--print-saved", static_cast<char*>(nullptr));
    });
    // The delay starts at the first saved judgment, so the kill lands while answers are written.
    std::string out;
    const int status = kill_mid_output(pid, fds[0], wait, true, &out);
    if (WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL) ++kills;
    const size_t acks = read_acks(out, "saved judgment %lld: %255s", &all_acks);
    acknowledged += acks;
    rounds_with_acks += acks > 0;
    if (integrity_check(path) != "ok") ++failed_checks;
    try {
      losses += count_losses(path, all_acks, "Ana");
    } catch (const std::exception& e) {
      ++failed_opens;
      MESSAGE("round " << round << ": the session does not open: " << e.what());
    }
  }
  std::printf("sessions crash test (window): %d kills, %zu judgments saved, %d lost, %d failed integrity checks, "
              "%d failed opens\n",
              kills, acknowledged, losses, failed_checks, failed_opens);
  CHECK(kills == rounds);
  CHECK(rounds_with_acks >= rounds / 2);  // most kills landed after answers were being written
  CHECK(losses == 0);
  CHECK(failed_checks == 0);
  CHECK(failed_opens == 0);
}
