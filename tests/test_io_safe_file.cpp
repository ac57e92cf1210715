// The one safe file writer (solver/io/safe_file.h) and the writers built on it: a failure half
// way leaves the old file as it was and no temporary behind, nothing planted at a predictable
// name is followed, and a SQLite database is never written over.
#include <doctest/doctest.h>
#include <fcntl.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <cmath>
#include <csignal>
#include <cstring>
#include <filesystem>
#include <set>
#include <string>

#include "solver/io/judgment_io.h"
#include "solver/io/layout_writer.h"
#include "solver/io/npy_file.h"
#include "solver/io/png_file.h"
#include "solver/io/safe_file.h"
#include "tests/approx.h"
#include "tests/sessions_support.h"

namespace fs = std::filesystem;
using kith::test::file_bytes;
using kith::test::folder_listing;
using kith::test::write_bytes;

namespace {

// The header every SQLite 3 database file starts with (sqlite.org/fileformat.html, 1.3).
const std::string kSqliteHeader("SQLite format 3\0", 16);

bool is_symlink(const std::string& path) {
  struct stat st {};
  return ::lstat(path.c_str(), &st) == 0 && S_ISLNK(st.st_mode);
}

// Runs write_file_safely in a child process whose largest writable file is `limit` bytes
// (RLIMIT_FSIZE; the write past it fails with EFBIG), so the failure comes half way through a
// real write. Returns the writer's message, passed back through a pipe.
std::string write_with_file_size_limit(const std::string& path, const std::string& bytes, rlim_t limit) {
  int fds[2];
  REQUIRE(::pipe(fds) == 0);
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    ::close(fds[0]);
    std::signal(SIGXFSZ, SIG_IGN);  // a write past the limit then fails instead of killing the process
    rlimit rl{};
    ::getrlimit(RLIMIT_FSIZE, &rl);
    rl.rlim_cur = limit;
    ::setrlimit(RLIMIT_FSIZE, &rl);
    const std::string message = kith::write_file_safely(path, bytes);
    const ssize_t n = ::write(fds[1], message.data(), message.size());
    ::_exit(n == ssize_t(message.size()) ? 0 : 1);
  }
  ::close(fds[1]);
  std::string message;
  char buf[512];
  for (ssize_t n; (n = ::read(fds[0], buf, sizeof buf)) > 0;) message.append(buf, size_t(n));
  ::close(fds[0]);
  int status = 0;
  ::waitpid(pid, &status, 0);
  CHECK(WIFEXITED(status));
  return message;
}

}  // namespace

TEST_CASE("safe file: writes a new file, replaces one when allowed, leaves no temporary") {
  const std::string dir = kith::test::temp_dir("safe-file-basic");
  const std::string path = dir + "/layout.csv";
  CHECK(kith::write_file_safely(path, "first\n") == "");
  CHECK(file_bytes(path) == "first\n");
  CHECK(kith::write_file_safely(path, "second\n") == "");
  CHECK(file_bytes(path) == "second\n");

  kith::SafeWriteOptions keep;
  keep.replace = false;
  const std::string refused = kith::write_file_safely(path, "third\n", keep);
  CHECK(refused.find(path) == 0);
  CHECK(refused.find("already there") != std::string::npos);
  CHECK(file_bytes(path) == "second\n");
  CHECK(kith::write_file_safely(dir + "/new.csv", "", keep) == "");  // an empty file is a file
  CHECK(fs::file_size(dir + "/new.csv") == 0);
  CHECK(folder_listing(dir) == std::vector<std::string>{"layout.csv", "new.csv"});

  // A folder in the way, and a folder that is not there: refused with the path and the cause.
  fs::create_directories(dir + "/sub");
  CHECK(kith::write_file_safely(dir + "/sub", "x").find("is a folder") != std::string::npos);
  const std::string missing = kith::write_file_safely(dir + "/nowhere/out.csv", "x");
  CHECK(missing.find(dir + "/nowhere/out.csv: cannot write (") == 0);
  CHECK(missing.find("No such file or directory") != std::string::npos);
  CHECK(folder_listing(dir) == std::vector<std::string>{"layout.csv", "new.csv", "sub"});
}

TEST_CASE("safe file: a failure half way through the write leaves the old file byte for byte") {
  const std::string dir = kith::test::temp_dir("safe-file-fail");
  const std::string path = dir + "/judgments.csv";
  std::string old_bytes;
  for (int i = 0; i < 500; ++i) old_bytes += "anchor-" + std::to_string(i) + ",nearer,farther\n";
  write_bytes(path, old_bytes);
  const std::string new_bytes(1 << 20, 'n');  // 1 MiB, far past the 64 KiB the child may write
  const std::string message = write_with_file_size_limit(path, new_bytes, 64 * 1024);
  CAPTURE(message);
  CHECK(message.find(path + ": writing failed (") == 0);
  CHECK(message.find(std::strerror(EFBIG)) != std::string::npos);
  CHECK(file_bytes(path) == old_bytes);
  CHECK(folder_listing(dir) == std::vector<std::string>{"judgments.csv"});  // no temporary behind

  // The same limit with bytes that fit: written (the limit is what failed above, not the writer).
  CHECK(write_with_file_size_limit(path, "small\n", 64 * 1024) == "");
  CHECK(file_bytes(path) == "small\n");
  CHECK(folder_listing(dir) == std::vector<std::string>{"judgments.csv"});
}

TEST_CASE("safe file: links planted at predictable temporary names are not followed") {
  const std::string dir = kith::test::temp_dir("safe-file-links");
  const std::string victim = dir + "/victim.txt", path = dir + "/out.csv";
  write_bytes(victim, "keep me\n");
  // Every name a writer of the form "PATH + suffix" (or with the process id) might pick.
  const std::string pid = std::to_string(::getpid());
  const std::vector<std::string> planted = {path + ".tmp", path + ".part", path + ".tmp-" + pid,
                                            path + ".writing-" + pid, dir + "/.out.csv.tmp"};
  for (const std::string& name : planted) fs::create_symlink(victim, name);
  CHECK(kith::write_file_safely(path, "layout\n") == "");
  CHECK(file_bytes(path) == "layout\n");
  CHECK(file_bytes(victim) == "keep me\n");
  for (const std::string& name : planted) CHECK(is_symlink(name));  // left as they were, not written through

  // The exclusive create refuses a name that is a link, dangling or not, and writes nothing through it.
  errno = 0;
  CHECK(kith::create_new_file(planted[0]) == -1);
  CHECK(errno == EEXIST);
  fs::create_symlink(dir + "/not-there-yet", dir + "/dangling");
  CHECK(kith::create_new_file(dir + "/dangling") == -1);
  CHECK_FALSE(fs::exists(dir + "/not-there-yet"));
  CHECK(file_bytes(victim) == "keep me\n");

  // Temporary names are drawn afresh each time, beside the target, hidden, and start empty.
  std::set<std::string> names;
  for (int k = 0; k < 20; ++k) {
    std::string tmp, error;
    const int fd = kith::create_temp_beside(path, &tmp, &error);
    REQUIRE(fd >= 0);
    ::close(fd);
    CHECK(fs::path(tmp).parent_path() == fs::path(dir));
    CHECK(fs::path(tmp).filename().string().rfind(".out.csv.", 0) == 0);
    CHECK(fs::file_size(tmp) == 0);
    names.insert(tmp);
    fs::remove(tmp);
  }
  CHECK(names.size() == 20);

  // A link at the target itself is replaced as a name; what it pointed to is untouched.
  fs::create_symlink(victim, dir + "/linked.csv");
  CHECK(kith::write_file_safely(dir + "/linked.csv", "new\n") == "");
  CHECK_FALSE(is_symlink(dir + "/linked.csv"));
  CHECK(file_bytes(dir + "/linked.csv") == "new\n");
  CHECK(file_bytes(victim) == "keep me\n");
}

TEST_CASE("safe file: a SQLite database is never written over, whatever the options") {
  const std::string dir = kith::test::temp_dir("safe-file-sqlite");
  const std::string session = dir + "/box.kith";
  const std::string bytes = kSqliteHeader + std::string(4080, '\x01');
  write_bytes(session, bytes);
  CHECK(kith::is_sqlite_file(session));
  kith::SafeWriteOptions replace;
  replace.replace = true;
  const std::string refused = kith::write_file_safely(session, "id,x,y\n", replace);
  CHECK(refused.find(session + ": a SQLite database") == 0);
  CHECK(refused.find("will not overwrite") != std::string::npos);
  CHECK(file_bytes(session) == bytes);

  // Through a link, under another name, and through the writers built on the safe writer.
  fs::create_symlink(session, dir + "/layout.csv");
  CHECK(kith::write_file_safely(dir + "/layout.csv", "id,x,y\n").find("SQLite") != std::string::npos);
  CHECK(kith::write_judgments_csv(dir + "/layout.csv", {}, {}).find("SQLite") != std::string::npos);
  const std::vector<uint8_t> pixels(4 * 4 * 3, 200);
  CHECK(kith::write_png_file(session, pixels.data(), 4, 4, 3).find("SQLite") != std::string::npos);
  CHECK(file_bytes(session) == bytes);
  CHECK(folder_listing(dir) == std::vector<std::string>{"box.kith", "layout.csv"});

  // Fifteen bytes of the header, or the header without its NUL, are not a database.
  write_bytes(dir + "/notes.txt", "SQLite format 3 and some notes");
  CHECK_FALSE(kith::is_sqlite_file(dir + "/notes.txt"));
  CHECK(kith::write_file_safely(dir + "/notes.txt", "replaced\n") == "");
}

TEST_CASE("safe file: PNG bytes are a PNG of the asked size, written whole") {
  const std::string dir = kith::test::temp_dir("safe-file-png");
  std::vector<uint8_t> rgba(size_t(7) * 5 * 4, 0);
  for (size_t i = 0; i < rgba.size(); ++i) rgba[i] = uint8_t(i * 37);
  const std::string png = kith::png_bytes(rgba.data(), 7, 5, 4);
  REQUIRE(png.size() > 24);
  CHECK(png.substr(0, 8) == std::string("\x89PNG\r\n\x1a\n", 8));  // the PNG signature (RFC 2083, 3.1)
  auto be32 = [&](size_t at) {
    return (uint32_t(uint8_t(png[at])) << 24) | (uint32_t(uint8_t(png[at + 1])) << 16) |
           (uint32_t(uint8_t(png[at + 2])) << 8) | uint32_t(uint8_t(png[at + 3]));
  };
  CHECK(be32(16) == 7);  // IHDR width and height
  CHECK(be32(20) == 5);
  CHECK(kith::png_bytes(rgba.data(), 0, 5, 4).empty());
  CHECK(kith::write_png_file(dir + "/p.png", rgba.data(), 7, 5, 4) == "");
  CHECK(file_bytes(dir + "/p.png") == png);
  CHECK(kith::write_png_file(dir + "/q.png", rgba.data(), -1, 5, 4).find("could not be encoded") != std::string::npos);
  CHECK(folder_listing(dir) == std::vector<std::string>{"p.png"});
}

TEST_CASE("layout writer: one layout format for fit and export, as CSV, JSON and .npy") {
  kith::Collection c;
  c.ids = {"oak", "ash, \"white\"", "elm"};
  c.tags = {{"wood", {"hard", "hard", "soft"}}};
  kith::Points map(3, 3);
  map << 1.5, 2, 3, -0.25, 1e-7, 0, 10, 20, 30;
  kith::Layout layout;
  layout.collection = &c;
  layout.map = &map;
  CHECK(kith::layout_csv(layout) ==
        "id,x,y,z,wood\noak,1.5,2,3,hard\n\"ash, \"\"white\"\"\",-0.25,1e-07,0,hard\nelm,10,20,30,soft\n");
  layout.group = {1, -1, 0};
  layout.suspect = {0.25, std::nan(""), 1.0 / 3.0};
  // One format for fit and export: groups from 1 with 0 for none (so the column reads as
  // numbers), an empty score for an untagged item.
  CHECK(kith::layout_csv(layout) ==
        "id,x,y,z,wood,group,suspect_score\noak,1.5,2,3,hard,2,0.25\n"
        "\"ash, \"\"white\"\"\",-0.25,1e-07,0,hard,0,\nelm,10,20,30,soft,1,0.333333333\n");

  layout.header["iteration"] = 321;
  const auto doc = nlohmann::json::parse(kith::layout_json(layout));
  CHECK(doc["dims"] == 3);
  CHECK(doc["iteration"] == 321);
  REQUIRE(doc["items"].size() == 3);
  CHECK(doc["items"][1]["id"] == "ash, \"white\"");
  CHECK(doc["items"][1]["y"].get<double>() == 1e-7);
  CHECK(doc["items"][1]["group"] == 0);
  CHECK(doc["items"][1]["suspect_score"].is_null());
  CHECK(doc["items"][2]["tags"]["wood"] == "soft");
  CHECK(doc["items"][2]["group"] == 1);
  CHECK(doc["items"][0]["group"] == 2);
  CHECK(doc["items"][0]["suspect_score"].get<double>() == 0.25);

  // 2-D maps have no z; a map that does not match the items is refused and writes nothing.
  const std::string dir = kith::test::temp_dir("layout-writer");
  kith::Points flat = map.leftCols(2);
  layout.map = &flat;
  REQUIRE(kith::write_layout(dir + "/flat.JSON", layout) == "");
  CHECK_FALSE(nlohmann::json::parse(file_bytes(dir + "/flat.JSON"))["items"][0].contains("z"));
  REQUIRE(kith::write_layout(dir + "/flat.csv", layout) == "");
  CHECK(file_bytes(dir + "/flat.csv").rfind("id,x,y,wood,group,suspect_score\n", 0) == 0);
  kith::Points short_map = map.topRows(2);
  layout.map = &short_map;
  CHECK(kith::write_layout(dir + "/bad.csv", layout).find("differ in size") != std::string::npos);
  // .npy: the positions as NumPy writes them, the rest beside them in STEM.ids.csv.
  layout.map = &flat;
  REQUIRE(kith::write_layout(dir + "/flat.npy", layout) == "");
  CHECK(file_bytes(dir + "/flat.ids.csv").rfind("id,wood,group,suspect_score\noak,hard,2,0.25\n", 0) == 0);
  const std::string npy = file_bytes(dir + "/flat.npy");
  CHECK(npy.size() % 64 == 48);  // the header to a 64-byte boundary, then 3 x 2 doubles (48 bytes)
  CHECK(kith::parse_npy(npy, "flat.npy") == flat);
  // Both files are checked before either is written: without replace, an existing sidecar alone
  // stops the write, and the new .npy does not appear.
  kith::SafeWriteOptions keep;
  keep.replace = false;
  write_bytes(dir + "/other.ids.csv", "mine\n");
  CHECK(kith::write_layout(dir + "/other.npy", layout, {}, keep).find("other.ids.csv") != std::string::npos);
  CHECK(file_bytes(dir + "/other.ids.csv") == "mine\n");
  std::filesystem::remove(dir + "/other.ids.csv");
  CHECK(folder_listing(dir) == std::vector<std::string>{"flat.JSON", "flat.csv", "flat.ids.csv", "flat.npy"});
}
