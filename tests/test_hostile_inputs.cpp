// kith used as a hostile user would (issue 15's checks): every case runs the built kith and
// asserts the exit code, the message, and that every file that was there before is byte for byte
// as it was. Outputs onto a session (also one held open by another process, and through a link),
// onto the command's input and onto an existing file, with and without --force; a full disk (a
// small tmpfs mount when the test may mount one, and always the writer's injected failure); a
// stale -wal beside `kith new --force`; what a killed `kith new` leaves; item indices out of range
// in a session; Latin-1 ids to JSON; /dev/zero and a FIFO as input; formula-looking names; seeds
// out of range.
#include <doctest/doctest.h>
#include <fcntl.h>
#include <signal.h>
#include <sqlite3.h>
#include <sys/file.h>
#include <sys/mount.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <filesystem>
#include <map>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "solver/session/session_store.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"
#include "tests/window_support.h"

namespace fs = std::filesystem;
using kith::SessionStore;
using kith::test::file_bytes;
using kith::test::folder_listing;
using kith::test::KithRun;
using kith::test::run_kith;
using kith::test::run_shell;
using kith::test::write_bytes;

namespace {

const std::string kPngSignature("\x89PNG\r\n\x1a\n", 8);  // RFC 2083, 3.1

bool has(const KithRun& r, const std::string& text) { return r.output.find(text) != std::string::npos; }

// Every regular file under DIR (links not followed) with its bytes: what "unchanged" is checked against.
std::map<std::string, std::string> snapshot(const std::string& dir) {
  std::map<std::string, std::string> files;
  for (const auto& e : fs::recursive_directory_iterator(dir))
    if (e.is_regular_file() && !e.is_symlink()) files[e.path().string()] = file_bytes(e.path().string());
  return files;
}

// A session made by `kith new` with a map checkpoint and two judgments, for the exports.
std::string session_with_map(const std::string& dir, const std::string& name, const std::string& items) {
  const std::string path = dir + "/" + name;
  REQUIRE(run_kith("new " + items + " -o " + path + " --perplexity 5").code == 0);
  auto store = SessionStore::open(path);
  const size_t n = store->item_count();
  kith::Points map(Eigen::Index(n), 3);
  for (Eigen::Index i = 0; i < map.rows(); ++i) map.row(i) << double(i % 5), double(i % 3), 0.1 * double(i);
  store->write_checkpoint(map, 100);
  for (int k = 0; k < 2; ++k) {
    kith::Judgment j;
    j.anchor = k;
    j.nearer = k + 1;
    j.farther = k + 2;
    j.person = "Ines";
    store->add_judgment(j);
  }
  return path;
}

void sql(const std::string& path, const std::string& statement) {
  sqlite3* db = nullptr;
  REQUIRE(sqlite3_open_v2(path.c_str(), &db, SQLITE_OPEN_READWRITE, nullptr) == SQLITE_OK);
  char* error = nullptr;
  const int rc = sqlite3_exec(db, statement.c_str(), nullptr, nullptr, &error);
  const std::string message = error ? error : "";
  sqlite3_free(error);
  sqlite3_close(db);
  REQUIRE_MESSAGE(rc == SQLITE_OK, statement << ": " << message);
}

size_t temporaries_in(const std::string& dir) {
  size_t n = 0;
  for (const std::string& name : folder_listing(dir)) n += name.find(".tmp") != std::string::npos ? 1 : 0;
  return n;
}

}  // namespace

TEST_CASE(
    "hostile inputs: render, report and export never write over a session, a link to one, an input, or a file without "
    "--force") {
  const std::string dir = kith::test::temp_dir("hostile-outputs");
  const std::string items = kith::test::write_swatches_csv(dir, 30);
  const std::string session = session_with_map(dir, "box.kith", items);
  const std::string other = session_with_map(dir, "other.kith", items);
  fs::create_symlink(other, dir + "/link.png");
  fs::create_symlink(other, dir + "/link.csv");
  write_bytes(dir + "/old.png", "an old picture\n");
  write_bytes(dir + "/old.html", "<p>an old report</p>\n");
  write_bytes(dir + "/old.csv", "id,x\nsw0,1\n");
  // The other session is open read-write in this process all along, as a window would hold it.
  auto held = SessionStore::open(other);
  const auto before = snapshot(dir);

  const std::string render = "render " + items + " --iterations 0 --size 64x48 -o ";
  const std::string report = "report " + items + " --iterations 250 --perplexity 5 -o ";
  const std::string exp = "export " + session + " ";
  struct Case {
    std::string args, message;
  };
  const std::vector<Case> refused = {
      {render + other, "a SQLite database"},
      {render + other + " --force", "a SQLite database"},
      {render + dir + "/link.png --force", "a SQLite database"},
      {render + items + " --force", "that is the input"},
      {render + dir + "/old.png", "already there"},
      {report + other + " --force", "a SQLite database"},
      {report + dir + "/link.png --force", "a SQLite database"},
      {report + items + " --force", "that is the input"},
      {report + dir + "/old.html", "already there"},
      {"report " + session + " -o " + session + " --force", "a SQLite database"},
      {exp + "--picture " + other + " --force", "a SQLite database"},
      {exp + "--picture " + dir + "/link.png --force", "a SQLite database"},
      {exp + "--judgments " + dir + "/link.csv --force", "a SQLite database"},
      {exp + "--layout " + session + " --force", "a SQLite database"},
      {exp + "--picture " + dir + "/old.png", "already there"},
      {exp + "--judgments " + dir + "/old.csv", "already there"},
      {exp + "--layout " + dir + "/old.csv", "already there"},
      {exp + "--layout " + dir + "/new.csv --judgments " + dir + "/new.csv", "named by another export"},
      {"new " + items + " -o " + items + " --force", "that is the input"},
      {"fit " + items + " -o " + dir + "/link.csv --force --iterations 250", "a SQLite database"},
  };
  for (const Case& c : refused) {
    CAPTURE(c.args);
    const KithRun r = run_kith(c.args);
    CHECK(r.code == 2);
    CHECK(has(r, c.message));
    if (c.message == "already there") CHECK(has(r, "give --force to replace it"));
    CHECK(snapshot(dir) == before);
    CHECK(temporaries_in(dir) == 0);
  }

  // With --force an existing file that is not a session is replaced whole.
  KithRun r = run_kith(render + dir + "/old.png --force");
  CHECK(r.code == 0);
  CHECK(file_bytes(dir + "/old.png").substr(0, 8) == kPngSignature);
  r = run_kith(exp + "--picture " + dir + "/old.png --force --size 64x48");
  CHECK(r.code == 0);
  CHECK(file_bytes(dir + "/old.png").substr(0, 8) == kPngSignature);
  r = run_kith(exp + "--judgments " + dir + "/old.csv --force");
  CHECK(r.code == 0);
  CHECK(file_bytes(dir + "/old.csv").rfind("anchor,nearer,farther", 0) == 0);
  r = run_kith(report + dir + "/old.html --force");
  CHECK(r.code == 0);
  CHECK(file_bytes(dir + "/old.html").find("<html") != std::string::npos);
  // The sessions and the input are still as they were.
  CHECK(file_bytes(session) == before.at(session));
  CHECK(file_bytes(other) == before.at(other));
  CHECK(file_bytes(items) == before.at(items));
  CHECK(temporaries_in(dir) == 0);
}

TEST_CASE("hostile inputs: a full disk is an error, the old file stays and no temporary is left") {
  const std::string dir = kith::test::temp_dir("hostile-full-disk");
  const std::string items = kith::test::write_swatches_csv(dir, 30);
  const std::string session = session_with_map(dir, "box.kith", items);
  const std::string old_png = "an old picture that must survive\n";

  // A real full file system where the test may mount one (root, mount allowed): a 64 KiB tmpfs.
  const std::string small = dir + "/small";
  fs::create_directories(small);
  const bool mounted = ::geteuid() == 0 && ::mount("tmpfs", small.c_str(), "tmpfs", 0, "size=64k") == 0;
  if (mounted) {
    MESSAGE("full disk: a 64 KiB tmpfs mounted at " << small << " (run as root)");
    write_bytes(small + "/map.png", old_png);
    write_bytes(small + "/filler", std::string(56 * 1024, 'f'));  // one 4 KiB page is left, less than the picture
    const KithRun r = run_kith("render " + items + " --iterations 0 --size 640x480 -o " + small + "/map.png --force");
    CHECK(r.code == 1);
    CHECK(has(r, small + "/map.png: writing failed (No space left on device)"));
    CHECK(file_bytes(small + "/map.png") == old_png);
    const KithRun e = run_kith("export " + session + " --picture " + small + "/map.png --force --size 640x480");
    CHECK(e.code == 1);
    CHECK(has(e, "No space left on device"));
    CHECK(file_bytes(small + "/map.png") == old_png);
    CHECK(folder_listing(small) == std::vector<std::string>{"filler", "map.png"});
    CHECK(::umount(small.c_str()) == 0);
  } else {
    MESSAGE("full disk: no tmpfs mount allowed here; the writer's injected failure only");
  }

  // Always: the writer's test hook (solver/io/safe_file.h) fails the write after N bytes with
  // ENOSPC, or the fsync with EIO, in the kith process itself.
  write_bytes(dir + "/map.png", old_png);
  write_bytes(dir + "/judgments.csv", "anchor,nearer,farther\n");
  const auto before = snapshot(dir);
  const std::vector<std::pair<std::string, std::string>> cases = {
      {"KITH_TEST_DISK_FULL_AFTER=100 ",
       "render " + items + " --iterations 0 --size 64x48 -o " + dir + "/map.png --force"},
      {"KITH_TEST_DISK_FULL_AFTER=0 ", "export " + session + " --picture " + dir + "/map.png --force --size 64x48"},
      {"KITH_TEST_DISK_FULL_AFTER=10 ", "export " + session + " --judgments " + dir + "/judgments.csv --force"},
      {"KITH_TEST_FSYNC_FAILS=1 ", "export " + session + " --picture " + dir + "/map.png --force --size 64x48"},
      {"KITH_TEST_DISK_FULL_AFTER=5 ", "fit " + items + " --iterations 250 --perplexity 5 -o " + dir + "/new.json"},
  };
  for (const auto& [env, args] : cases) {
    CAPTURE(env + args);
    const KithRun r = run_shell(env + std::string(KITH_BINARY) + " " + args);
    CHECK(r.code == 1);
    CHECK(has(r, "writing failed"));
    CHECK(has(r, env.find("FSYNC") != std::string::npos ? "Input/output error" : "No space left on device"));
    CHECK_FALSE(has(r, "wrote"));
    CHECK(snapshot(dir) == before);
    CHECK(temporaries_in(dir) == 0);
  }
  CHECK_FALSE(fs::exists(dir + "/new.json"));
}

TEST_CASE("hostile inputs: kith new --force never takes in a stale -wal, and cleans what a killed kith new left") {
  const std::string dir = kith::test::temp_dir("hostile-new");
  const std::string items = kith::test::write_swatches_csv(dir, 30);
  const std::string path = dir + "/box.kith";
  REQUIRE(run_kith("new " + items + " -o " + path).code == 0);
  // A writer killed with judgments in its log: the -wal (and -shm) stay beside the file.
  const pid_t writer = ::fork();
  REQUIRE(writer >= 0);
  if (writer == 0) {
    auto store = SessionStore::open(path);
    for (int k = 0; k < 5; ++k) {
      kith::Judgment j;
      j.anchor = k;
      j.nearer = k + 1;
      j.farther = k + 2;
      store->add_judgment(j);
    }
    ::kill(::getpid(), SIGKILL);
  }
  int status = 0;
  ::waitpid(writer, &status, 0);
  REQUIRE(WIFSIGNALED(status));
  REQUIRE(fs::file_size(path + "-wal") > 0);
  CHECK(SessionStore::inspect(path).judgments == 5);  // the log holds them

  // While another process holds the session, --force is refused and nothing changes.
  {
    auto live = SessionStore::open(path);
    const auto before = snapshot(dir);
    const KithRun r = run_kith("new " + items + " -o " + path + " --force");
    CHECK(r.code == 3);
    CHECK(has(r, "open in another kith process"));
    CHECK(snapshot(dir) == before);
  }
  // Killed again, so the log is stale with no one holding the file.
  const pid_t again = ::fork();
  REQUIRE(again >= 0);
  if (again == 0) {
    auto store = SessionStore::open(path);
    kith::Judgment j;
    j.anchor = 7, j.nearer = 8, j.farther = 9;
    store->add_judgment(j);
    ::kill(::getpid(), SIGKILL);
  }
  ::waitpid(again, &status, 0);
  REQUIRE(fs::file_size(path + "-wal") > 0);
  KithRun r = run_kith("new " + items + " -o " + path + " --force");
  CHECK(r.code == 0);
  CHECK(r.output.find("0 judgments") != std::string::npos);
  CHECK(SessionStore::inspect(path).judgments == 0);
  CHECK(SessionStore::open(path)->judgments().empty());

  // A log left with no session at all: refused without --force (naming it), removed with it.
  const std::string lone = dir + "/lone.kith";
  fs::copy_file(path, lone);
  {
    auto store = SessionStore::open(lone);
    kith::Judgment j;
    j.anchor = 1, j.nearer = 2, j.farther = 3;
    store->add_judgment(j);
    fs::copy_file(lone + "-wal", dir + "/kept-wal");  // the log as a killed writer leaves it
  }
  fs::remove(lone);
  fs::copy_file(dir + "/kept-wal", lone + "-wal");
  const std::string wal_bytes = file_bytes(lone + "-wal");
  r = run_kith("new " + items + " -o " + lone);
  CHECK(r.code == 2);
  CHECK(has(r, lone + "-wal is there"));
  CHECK(has(r, "--force"));
  CHECK(file_bytes(lone + "-wal") == wal_bytes);
  CHECK_FALSE(fs::exists(lone));
  r = run_kith("new " + items + " -o " + lone + " --force");
  CHECK(r.code == 0);
  CHECK(SessionStore::inspect(lone).judgments == 0);

  // What a kill -9 during `kith new` leaves: ".NAME.creating-PID-N" with its -wal and -shm. Those of
  // a process that is gone are removed by the next `kith new` of that name; one whose process
  // lives and holds its lock (here this test) is left alone, and so is anything else.
  const pid_t gone = ::fork();
  REQUIRE(gone >= 0);
  if (gone == 0) ::_exit(0);
  ::waitpid(gone, &status, 0);
  const std::string stale = dir + "/.fresh.kith.creating-" + std::to_string(gone) + "-12345";
  for (const char* suffix : {"", "-wal", "-shm", "-journal"}) write_bytes(stale + suffix, "half a session");
  const std::string live = dir + "/.fresh.kith.creating-" + std::to_string(::getpid()) + "-777";
  write_bytes(live, "being made");
  const int live_fd = ::open(live.c_str(), O_RDONLY);
  REQUIRE(::flock(live_fd, LOCK_EX) == 0);
  write_bytes(dir + "/.fresh.kith.creating-notes", "not a leftover");
  r = run_kith("new " + items + " -o " + dir + "/fresh.kith");
  CHECK(r.code == 0);
  for (const char* suffix : {"", "-wal", "-shm", "-journal"}) CHECK_FALSE(fs::exists(stale + suffix));
  CHECK(file_bytes(live) == "being made");
  CHECK(file_bytes(dir + "/.fresh.kith.creating-notes") == "not a leftover");
  ::close(live_fd);

  // And a real kill -9 of `kith new` part way: killed as soon as its ".creating" file shows (20,000
  // items, so the build takes a while); then the next `kith new` of that name leaves none.
  const std::string big = dir + "/big";
  fs::create_directories(big);
  const std::string big_items = kith::test::write_swatches_csv(big, 20000);
  auto creating = [&] {
    size_t n = 0;
    for (const std::string& name : folder_listing(big)) n += name.rfind(".k.kith.creating-", 0) == 0 ? 1 : 0;
    return n;
  };
  int killed_with_leftovers = 0;
  for (int round = 0; round < 5; ++round) {
    run_shell("( " + std::string(KITH_BINARY) + " new " + big_items + " -o " + big +
              "/k.kith --force >/dev/null 2>&1 & " + "p=$!; for t in $(seq 1 2000); do ls -a " + big +
              " | grep -q '^\\.k\\.kith\\.creating' && break; " + "sleep 0.002; done; kill -9 $p; wait $p )");
    killed_with_leftovers += creating() > 0 ? 1 : 0;
    r = run_kith("new " + big_items + " -o " + big + "/k.kith --force");
    CHECK(r.code == 0);
    CHECK(creating() == 0);
  }
  MESSAGE("kith new killed with SIGKILL while building: "
          << killed_with_leftovers << " of 5 kills left .creating files, each removed by the next kith new");
  CHECK(killed_with_leftovers >= 1);
}

TEST_CASE(
    "hostile inputs: a session naming items beyond its collection is refused by every reader, and judge writes "
    "nothing") {
  const std::string dir = kith::test::temp_dir("hostile-indices");
  const std::string items = kith::test::write_swatches_csv(dir, 30);
  struct Damage {
    std::string table, statement, names;
  };
  const std::vector<Damage> damages = {
      {"pins", "INSERT INTO pins(item, x, y, z, time) VALUES (999, 0, 0, 0, 1)", "the pin of item 999"},
      {"judgments", "UPDATE judgments SET anchor = 30 WHERE judgment = 2", "judgment 2"},
      {"judgments", "UPDATE judgments SET farther = -4 WHERE judgment = 1", "judgment 1"},
      {"checkpoints", "UPDATE checkpoints SET items = 31", "checkpoint"},
      {"item_tags", "UPDATE item_tags SET item = 45 WHERE item = 3 AND col = 0", "item 45"},
  };
  int k = 0;
  for (const Damage& d : damages) {
    CAPTURE(d.statement);
    const std::string path = session_with_map(dir, "damaged" + std::to_string(k++) + ".kith", items);
    sql(path, d.statement);
    const auto before = snapshot(dir);
    for (const std::string& args :
         {"export " + path + " --picture " + dir + "/p.png", "export " + path + " --judgments " + dir + "/j.csv",
          "judge " + path + " --add sw1,sw2,sw3", "report " + path + " -o " + dir + "/r.html"}) {
      CAPTURE(args);
      const KithRun r = run_kith(args);
      CHECK(r.code == 3);  // not a crash (-1), not an internal error (1)
      CHECK(has(r, path + ": damaged: table '" + d.table + "', " + d.names));
      CHECK(snapshot(dir) == before);
    }
    CHECK_THROWS_AS(SessionStore::inspect(path), kith::SessionError);
  }
}

TEST_CASE("hostile inputs: Latin-1 ids to JSON, /dev/zero and a FIFO as input, formula names, seeds out of range") {
  const std::string dir = kith::test::temp_dir("hostile-text");
  // Latin-1 bytes (0xE9 is e acute there) in ids: the JSON holds U+FFFD, the loader warns once, with the line.
  std::string latin = "id,warmth,gloss\n";
  for (int i = 0; i < 20; ++i)
    latin += (i == 3   ? std::string("caf\xE9")
              : i == 5 ? std::string("\xC3\x28")
                       : "item" + std::to_string(i)) +
             "," + std::to_string(i % 4) + "," + std::to_string((i * 3) % 7) + "\n";
  write_bytes(dir + "/latin.csv", latin);
  KithRun r = run_kith("fit " + dir + "/latin.csv -o " + dir + "/map.json --iterations 250 --perplexity 5 --quiet");
  CHECK(r.code == 0);
  CHECK(has(r, "latin.csv:5: the file is not UTF-8 text (byte 0xE9"));
  size_t warnings = 0;
  for (size_t at = 0; (at = r.output.find("not UTF-8", at)) != std::string::npos; ++at) ++warnings;
  CHECK(warnings == 1);
  const auto doc = nlohmann::json::parse(file_bytes(dir + "/map.json"));
  CHECK(doc["items"][3]["id"] == "caf\xEF\xBF\xBD");
  CHECK(doc["items"][5]["id"] == "\xEF\xBF\xBD(");
  CHECK(temporaries_in(dir) == 0);

  // Not regular files: refused at once, never read until memory runs out or waited on forever.
  const std::string fifo = dir + "/pipe.csv";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  fs::create_symlink("/dev/zero", dir + "/zero.csv");
  for (const std::string& input : {std::string("/dev/zero"), fifo, dir + "/zero.csv"}) {
    CAPTURE(input);
    r = run_shell("timeout 20 " + std::string(KITH_BINARY) + " check " + input);
    CHECK(r.code == 3);
    CHECK(has(r, "expected a regular file"));
    r = run_shell("timeout 20 " + std::string(KITH_BINARY) + " new " + input + " -o " + dir + "/s.kith");
    CHECK(r.code == 3);
    CHECK_FALSE(fs::exists(dir + "/s.kith"));
    // ... and as a session.
    for (const std::string& args : {"export " + input + " --layout " + dir + "/l.csv",
                                    "judge " + input + " --add a,b,c", "report " + input + " -o " + dir + "/r.html"}) {
      CAPTURE(args);
      r = run_shell("timeout 20 " + std::string(KITH_BINARY) + " " + args);
      CHECK(r.code == 3);
      CHECK((has(r, "not a regular file") || has(r, "expected a regular file")));
    }
  }
  // Nor does kith new --force over a FIFO wait on it.
  r = run_shell("timeout 20 " + std::string(KITH_BINARY) + " new " + kith::test::write_swatches_csv(dir, 12) + " -o " +
                fifo + " --force");
  CHECK(r.code != 124);

  // Formula-looking person names are exported neutralized (a leading apostrophe), and read back as they were.
  const std::string items = kith::test::write_swatches_csv(dir, 12);
  write_bytes(dir + "/j.csv",
              "anchor,nearer,farther,person\n"
              "sw0,sw1,sw2,\"=HYPERLINK(\"\"http://example.invalid\"\",\"\"x\"\")\"\n"
              "sw1,sw2,sw3,+cmd|' /C calc'!A0\n"
              "sw2,sw3,sw4,@SUM(1+1)\n"
              "sw3,sw4,sw5,-2+3\n");
  REQUIRE(run_kith("new " + items + " -o " + dir + "/f.kith --judgments " + dir + "/j.csv").code == 0);
  REQUIRE(run_kith("export " + dir + "/f.kith --judgments " + dir + "/out.csv").code == 0);
  const std::string out = file_bytes(dir + "/out.csv");
  CHECK(out.find(",\"'=HYPERLINK(") != std::string::npos);
  CHECK(out.find(",'+cmd|") != std::string::npos);
  CHECK(out.find(",'@SUM(1+1),") != std::string::npos);
  CHECK(out.find(",'-2+3,") != std::string::npos);
  REQUIRE(run_kith("new " + items + " -o " + dir + "/g.kith --judgments " + dir + "/out.csv").code == 0);
  std::vector<std::string> people;
  for (const kith::Judgment& j : SessionStore::open(dir + "/g.kith")->judgments()) people.push_back(j.person);
  CHECK(people == std::vector<std::string>{"=HYPERLINK(\"http://example.invalid\",\"x\")", "+cmd|' /C calc'!A0",
                                           "@SUM(1+1)", "-2+3"});
  // --raw-csv writes them exactly as they are.
  REQUIRE(run_kith("export " + dir + "/f.kith --judgments " + dir + "/raw.csv --raw-csv").code == 0);
  const std::string raw = file_bytes(dir + "/raw.csv");
  CHECK(raw.find(",\"=HYPERLINK(") != std::string::npos);
  CHECK(raw.find(",+cmd|") != std::string::npos);
  CHECK(raw.find(",@SUM(1+1),") != std::string::npos);
  CHECK(raw.find("'") == raw.find("' /C calc"));  // no apostrophe added anywhere

  // Seeds outside 0..2^63-1 are refused with a message, before anything is written.
  for (const std::string& seed : {"-1", "1e300", "9223372036854775808", "18446744073709551616", "1.5", ""}) {
    CAPTURE(seed);
    r = run_kith("fit " + items + " -o " + dir + "/seeded.csv --iterations 250 --perplexity 3 --seed '" + seed + "'");
    CHECK(r.code == 2);
    CHECK(has(r, "kith fit: --seed"));
    CHECK_FALSE(fs::exists(dir + "/seeded.csv"));
  }
  r = run_kith("fit " + items + " -o " + dir + "/seeded.csv --iterations 250 --perplexity 3 --seed=-1");
  CHECK(r.code == 2);
  CHECK(has(r, "kith fit: --seed"));
  r = run_kith("fit " + items + " -o " + dir +
               "/seeded.csv --iterations 250 --perplexity 3 --seed 9223372036854775807");
  CHECK(r.code == 0);
}

TEST_CASE("hostile inputs: the window's pictures take a fresh name instead of writing over a file or a session") {
  KITH_SKIP_WITHOUT_XVFB();
  const std::string dir = kith::test::temp_dir("hostile-window-pictures");
  const std::string items = kith::test::write_swatches_csv(dir, 30);
  const std::string session = session_with_map(dir, "box.kith", items);
  write_bytes(dir + "/shot.png", "an old picture\n");
  const auto before = snapshot(dir);
  const int code = kith::test::open_with_script(items + " --frames 40 --screenshot " + session, dir, "script",
                                                "5 shot " + dir + "/shot.png\n10 shot " + dir + "/shot.png\n");
  CHECK(code == 0);
  for (const auto& [path, bytes] : before) CHECK(file_bytes(path) == bytes);
  CHECK(file_bytes(dir + "/shot-2.png").substr(0, 8) == kPngSignature);
  CHECK(file_bytes(dir + "/shot-3.png").substr(0, 8) == kPngSignature);
  CHECK(file_bytes(dir + "/box-2.kith").substr(0, 8) == kPngSignature);  // the screenshot, beside the session
  const std::string log = file_bytes(dir + "/script.log");
  CHECK(log.find("saved " + dir + "/shot-2.png (" + dir + "/shot.png is already there)") != std::string::npos);
}
