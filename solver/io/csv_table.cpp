// CsvTable parsing: one pass over the text, unescaping each field in place (the write position
// never passes the read position), so no per-field allocation.
#include "solver/io/csv_table.h"

#include <unistd.h>

#include <fcntl.h>

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <sys/stat.h>

#include "solver/base/memory.h"
#include "solver/io/collection.h"

namespace kith {
namespace {

bool ends_with(const std::string& s, const char* suffix) {
  const size_t n = std::strlen(suffix);
  if (s.size() < n) return false;
  for (size_t i = 0; i < n; ++i)
    if (std::tolower(static_cast<unsigned char>(s[s.size() - n + i])) != suffix[i]) return false;
  return true;
}

char choose_separator(const std::string& text, size_t start, const std::string& source) {
  if (ends_with(source, ".tsv") || ends_with(source, ".tab")) return '\t';
  if (ends_with(source, ".csv")) return ',';
  size_t tabs = 0, commas = 0;
  for (size_t i = start; i < text.size() && text[i] != '\n' && text[i] != '\r'; ++i) {
    tabs += text[i] == '\t';
    commas += text[i] == ',';
  }
  return tabs > commas ? '\t' : ',';
}

// A short, printable rendering of one character for messages.
std::string show_char(char c) {
  if (c == '\t') return "a tab";
  if (static_cast<unsigned char>(c) < 32 || c == 127) {
    char buf[16];
    std::snprintf(buf, sizeof buf, "byte 0x%02x", static_cast<unsigned char>(c));
    return buf;
  }
  return std::string("'") + c + "'";
}

[[noreturn]] void fail(const std::string& source, long line, long column, std::string message) {
  throw LoadError(Problem{source, line, column, std::move(message)});
}

}  // namespace

CsvTable parse_csv(std::string text, const std::string& source, char separator) {
  CsvTable table;
  table.source = source;
  size_t i = 0;
  if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF && static_cast<unsigned char>(text[1]) == 0xBB &&
      static_cast<unsigned char>(text[2]) == 0xBF)
    i = 3;  // UTF-8 byte order mark
  const char sep = separator ? separator : choose_separator(text, i, source);
  table.separator = sep;

  char* p = text.data();
  const size_t n = text.size();
  size_t w = 0;  // write position of the next unescaped byte
  long line = 1;
  size_t columns = 0;
  bool have_header = false;
  std::vector<size_t>& ends = table.ends_;
  ends.reserve(n / 6 + 16);

  while (i < n) {
    if (p[i] == '\n') {  // completely empty line: skipped
      ++line, ++i;
      continue;
    }
    if (p[i] == '\r') {
      ++i;
      if (i < n && p[i] == '\n') ++i;
      ++line;
      continue;
    }
    const long row_line = line;
    size_t count = 0;
    for (;;) {
      if (i < n && p[i] == '"') {
        const long open_line = line;
        ++i;
        for (;;) {
          const char* q = static_cast<const char*>(std::memchr(p + i, '"', n - i));
          if (!q) {
            fail(source, open_line, long(count + 1),
                 "expected a closing quote for the field that opens here, found the end of the file");
          }
          const size_t j = size_t(q - p);
          line += long(std::count(p + i, p + j, '\n'));
          std::memmove(p + w, p + i, j - i);
          w += j - i;
          i = j + 1;
          if (i < n && p[i] == '"') {  // "" stands for one quote
            p[w++] = '"';
            ++i;
            continue;
          }
          break;
        }
        if (i < n && p[i] != sep && p[i] != '\n' && p[i] != '\r') {
          std::string message = std::string("expected ") + (sep == '\t' ? "a tab" : "a comma") +
                                " or the end of the line after a closing quote, found " + show_char(p[i]);
          if (open_line != line) message += " (the quoted field opened on line " + std::to_string(open_line) + ")";
          fail(source, line, long(count + 1), message);
        }
      } else {
        size_t j = i;
        while (j < n) {
          const char c = p[j];
          if (c == sep || c == '\n' || c == '\r') break;
          ++j;
        }
        if (w != i) std::memmove(p + w, p + i, j - i);
        w += j - i;
        i = j;
      }
      ends.push_back(w);
      ++count;
      if (i < n && p[i] == sep) {
        ++i;
        continue;
      }
      if (i < n) {  // line end
        if (p[i] == '\r' && i + 1 < n && p[i + 1] == '\n') ++i;
        ++i;
        ++line;
        table.end_line = line;
      } else {
        table.end_line = line + 1;  // a last line without a line end still counts as a line
      }
      break;
    }
    if (!have_header) {
      have_header = true;
      columns = count;
      table.header_line = row_line;
    } else {
      table.lines_.push_back(row_line);
      if (count != columns) {
        fail(source, row_line, long(std::min(count, columns) + 1),
             "expected " + std::to_string(columns) + (columns == 1 ? " field" : " fields") + " as in the header (line " +
                 std::to_string(table.header_line) + "), found " + std::to_string(count));
      }
    }
  }
  if (!have_header) fail(source, 1, 1, "expected a header row, found an empty file");

  table.header.reserve(columns);
  for (size_t c = 0; c < columns; ++c) {
    const size_t begin = c == 0 ? 0 : ends[c - 1];
    table.header.emplace_back(p + begin, ends[c] - begin);
  }
  text.resize(w);
  table.text_ = std::move(text);
  return table;
}

namespace {

const char* file_kind(mode_t mode) {
  if (S_ISDIR(mode)) return "a folder";
  if (S_ISCHR(mode)) return "a character device";
  if (S_ISBLK(mode)) return "a block device";
  if (S_ISFIFO(mode)) return "a pipe (FIFO)";
  if (S_ISSOCK(mode)) return "a socket";
  return "not a regular file";
}

}  // namespace

int open_regular_file(const std::string& path, struct stat* st) {
  // O_NONBLOCK: opening a FIFO must not wait for a writer; it is refused below anyway.
  const int fd = ::open(path.c_str(), O_RDONLY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) throw LoadError(Problem{path, 0, 0, std::string("cannot open: ") + std::strerror(errno)});
  if (::fstat(fd, st) != 0 || !S_ISREG(st->st_mode)) {
    const std::string what = ::fstat(fd, st) != 0 ? std::string(std::strerror(errno)) : std::string(file_kind(st->st_mode));
    ::close(fd);
    throw LoadError(Problem{path, 0, 0, "expected a regular file, found " + what});
  }
  return fd;
}

std::string read_file(const std::string& path) {
  struct stat st {};
  const int fd = open_regular_file(path, &st);
  // Bounded: the whole file is held in memory, so it must fit with room to spare.
  if (const std::string problem = memory_problem("reading the file (" + gigabytes(double(st.st_size)) + ")",
                                                 double(st.st_size));
      !problem.empty()) {
    ::close(fd);
    throw LoadError(Problem{path, 0, 0, problem});
  }
  std::string data(size_t(st.st_size), '\0');
  size_t done = 0;
  while (done < data.size()) {
    const ssize_t got = ::read(fd, data.data() + done, data.size() - done);
    if (got < 0 && errno == EINTR) continue;
    if (got <= 0) break;  // shrank meanwhile: keep what is there
    done += size_t(got);
  }
  const int read_errno = errno;
  ::close(fd);
  if (done < data.size() && read_errno != 0 && read_errno != EAGAIN)
    throw LoadError(Problem{path, 0, 0, std::string("cannot read the whole file: ") + std::strerror(read_errno)});
  data.resize(done);
  return data;
}

}  // namespace kith
