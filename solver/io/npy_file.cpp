// .npy reading: a small recursive-descent parser for the header dict, then a checked copy of the
// elements. Every failure names the byte offset in the file.
#include "solver/io/npy_file.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <vector>

#include "solver/io/collection.h"

namespace kith {
namespace {

constexpr char kMagic[] = "\x93NUMPY";
constexpr size_t kMagicSize = 6;
constexpr uint64_t kMaxDimension = uint64_t(1) << 40;  // far above anything that fits in memory

bool host_is_little_endian() {
  const uint16_t one = 1;
  unsigned char first;
  std::memcpy(&first, &one, 1);
  return first == 1;
}

class HeaderParser {
 public:
  HeaderParser(std::string_view bytes, size_t begin, size_t end, const std::string& source)
      : b_(bytes), pos_(begin), end_(end), source_(source) {}

  std::string descr;
  bool fortran_order = false;
  std::vector<uint64_t> shape;

  void parse() {
    bool have_descr = false, have_order = false, have_shape = false;
    skip_space();
    expect('{', "'{' to open the header dict");
    for (;;) {
      if (closes('}')) break;
      const size_t key_at = pos_;
      const std::string key = parse_string("a quoted key");
      skip_space();
      expect(':', "':' after the key");
      skip_space();
      if (key == "descr") {
        if (peek() != '\'' && peek() != '"')
          fail(pos_, "expected a quoted element type for 'descr' (such as '<f8'), found " + shown());
        descr = parse_string("a quoted element type");
        have_descr = true;
      } else if (key == "fortran_order") {
        fortran_order = parse_bool();
        have_order = true;
      } else if (key == "shape") {
        parse_shape();
        have_shape = true;
      } else {
        fail(key_at, "expected only the keys 'descr', 'fortran_order' and 'shape', found '" + key + "'");
      }
      if (separator_or_close('}', "the header dict")) break;
    }
    while (pos_ < end_ && (b_[pos_] == ' ' || b_[pos_] == '\n' || b_[pos_] == '\t' || b_[pos_] == '\r')) ++pos_;
    if (pos_ != end_) fail(pos_, "expected only spaces and a line end after the header dict, found " + shown());
    if (!have_descr) fail(end_, "expected the key 'descr' in the header, found none");
    if (!have_order) fail(end_, "expected the key 'fortran_order' in the header, found none");
    if (!have_shape) fail(end_, "expected the key 'shape' in the header, found none");
  }

  [[noreturn]] void fail(size_t at, std::string message) const {
    throw LoadError(Problem{source_, 0, long(at), std::move(message)});
  }

 private:
  std::string_view b_;
  size_t pos_, end_;
  const std::string& source_;

  int peek() const { return pos_ < end_ ? static_cast<unsigned char>(b_[pos_]) : -1; }
  void skip_space() {
    while (pos_ < end_ && (b_[pos_] == ' ' || b_[pos_] == '\t' || b_[pos_] == '\n' || b_[pos_] == '\r')) ++pos_;
  }
  std::string shown() const {
    if (pos_ >= end_) return "the end of the header";
    const unsigned char c = static_cast<unsigned char>(b_[pos_]);
    if (c < 32 || c >= 127) {
      char buf[16];
      std::snprintf(buf, sizeof buf, "byte 0x%02x", c);
      return buf;
    }
    return std::string("'") + char(c) + "'";
  }
  void expect(char c, const char* what) {
    if (peek() != static_cast<unsigned char>(c)) fail(pos_, std::string("expected ") + what + ", found " + shown());
    ++pos_;
  }
  std::string parse_string(const char* what) {
    const int q = peek();
    if (q != '\'' && q != '"') fail(pos_, std::string("expected ") + what + ", found " + shown());
    const size_t start = ++pos_;
    while (pos_ < end_ && b_[pos_] != char(q)) {
      if (b_[pos_] == '\\') fail(pos_, "expected a plain quoted string, found a backslash escape");
      ++pos_;
    }
    if (pos_ >= end_) fail(start - 1, "expected a closing quote for the string that opens here, found the end of the header");
    std::string s(b_.substr(start, pos_ - start));
    ++pos_;
    return s;
  }
  // True (and consumed) when CLOSE comes next, after any spaces.
  bool closes(char close) {
    skip_space();
    if (peek() != close) return false;
    ++pos_;
    return true;
  }
  // After an element: ',' (more follow: false) or CLOSE (the end: true), else a problem in WHERE.
  bool separator_or_close(char close, const char* where) {
    skip_space();
    if (peek() == ',') {
      ++pos_;
      return false;
    }
    if (closes(close)) return true;
    fail(pos_, std::string("expected ',' or '") + close + "' in " + where + ", found " + shown());
  }
  bool parse_bool() {
    if (b_.substr(pos_, 4) == "True" && pos_ + 4 <= end_) {
      pos_ += 4;
      return true;
    }
    if (b_.substr(pos_, 5) == "False" && pos_ + 5 <= end_) {
      pos_ += 5;
      return false;
    }
    fail(pos_, "expected True or False for 'fortran_order', found " + shown());
  }
  void parse_shape() {
    expect('(', "'(' to open the shape tuple");
    for (;;) {
      if (closes(')')) break;
      if (peek() < '0' || peek() > '9') fail(pos_, "expected a whole number in the shape, found " + shown());
      const size_t at = pos_;
      uint64_t v = 0;
      while (peek() >= '0' && peek() <= '9') {
        v = v * 10 + uint64_t(peek() - '0');
        if (v > kMaxDimension) fail(at, "expected a shape that fits in memory, found a dimension too large");
        ++pos_;
      }
      shape.push_back(v);
      if (separator_or_close(')', "the shape")) break;
    }
  }
};

}  // namespace

bool looks_like_npy(std::string_view bytes) {
  return bytes.size() >= kMagicSize && std::memcmp(bytes.data(), kMagic, kMagicSize) == 0;
}

Points parse_npy(std::string_view b, const std::string& source, const NpyReadOptions& options) {
  auto fail = [&](size_t at, std::string message) -> void {
    throw LoadError(Problem{source, 0, long(at), std::move(message)});
  };
  if (b.empty()) fail(0, "expected a .npy file, found an empty file");
  if (!looks_like_npy(b)) fail(0, "expected a .npy file starting with the bytes \\x93NUMPY, found something else");
  if (b.size() < 10) fail(b.size(), "expected a version and header length after the magic bytes, found the end of the file");
  const int major = static_cast<unsigned char>(b[6]), minor = static_cast<unsigned char>(b[7]);
  if (major < 1 || major > 3 || minor != 0) {
    fail(6, "expected .npy format version 1.0, 2.0 or 3.0, found " + std::to_string(major) + "." +
                std::to_string(minor));
  }
  size_t header_begin, header_size;
  if (major == 1) {
    header_begin = 10;
    header_size = size_t(static_cast<unsigned char>(b[8])) | size_t(static_cast<unsigned char>(b[9])) << 8;
  } else {
    if (b.size() < 12) fail(b.size(), "expected a 4-byte header length, found the end of the file");
    header_begin = 12;
    header_size = 0;
    for (int k = 3; k >= 0; --k) header_size = header_size << 8 | static_cast<unsigned char>(b[8 + k]);
  }
  if (header_size > b.size() - header_begin) {
    fail(header_begin, "expected a header of " + std::to_string(header_size) + " bytes, found only " +
                           std::to_string(b.size() - header_begin) + " (the file is cut short)");
  }
  const size_t data_begin = header_begin + header_size;
  HeaderParser header(b, header_begin, data_begin, source);
  header.parse();

  size_t item_size = 0;
  const bool integer = options.allow_integers && (header.descr == "<i8" || header.descr == "<i4");
  if (header.descr == "<f8" || header.descr == "<i8") item_size = 8;
  if (header.descr == "<f4" || header.descr == "<i4") item_size = 4;
  if (item_size == 0 || (header.descr[1] == 'i' && !integer)) {
    fail(header_begin, std::string("expected element type '<f4' or '<f8' (little-endian float32 or float64") +
                           (options.allow_integers ? ", or '<i4' or '<i8' (int32 or int64)" : "") + "), found '" +
                           header.descr + "'");
  }
  if (header.fortran_order) {
    fail(header_begin, "expected C order (fortran_order False), found Fortran order; save with "
                       "numpy.ascontiguousarray first");
  }
  if (header.shape.empty() || header.shape.size() > 2) {
    fail(header_begin, "expected a 1-D or 2-D array (items x features), found " + std::to_string(header.shape.size()) +
                           "-D");
  }
  const uint64_t rows = header.shape[0], cols = header.shape.size() == 2 ? header.shape[1] : 1;
  const uint64_t count = rows * cols;  // both <= 2^40, so the product would overflow only past 2^64
  if (rows != 0 && count / rows != cols) fail(header_begin, "expected a shape that fits in memory");
  const uint64_t available = b.size() - data_begin;
  const bool cut_short = count > available / item_size;  // also keeps count * item_size from overflowing
  if (cut_short || count * item_size != available) {
    fail(data_begin, "expected " + std::to_string(rows) + " x " + std::to_string(cols) + " elements of " +
                         std::to_string(item_size) + " bytes after the header, found " + std::to_string(available) +
                         " bytes" + (cut_short ? " (the file is cut short)" : " (extra bytes at the end)"));
  }

  Points out(static_cast<Eigen::Index>(rows), static_cast<Eigen::Index>(cols));
  double* dst = out.data();
  const char* src = b.data() + data_begin;
  const bool swap = !host_is_little_endian();
  for (uint64_t k = 0; k < count; ++k) {
    unsigned char raw[8];
    std::memcpy(raw, src + k * item_size, item_size);
    if (swap) std::reverse(raw, raw + item_size);
    double v;
    if (integer) {
      int64_t whole = 0;
      if (item_size == 8) {
        std::memcpy(&whole, raw, 8);
      } else {
        int32_t small;
        std::memcpy(&small, raw, 4);
        whole = small;
      }
      constexpr int64_t kExact = int64_t(1) << 53;
      if (whole > kExact || whole < -kExact) {
        const uint64_t r = k / cols, c = k % cols;
        fail(data_begin + k * item_size, "expected a whole number of at most 2^53 in size at [" + std::to_string(r) +
                                             ", " + std::to_string(c) + "], found " + std::to_string(whole));
      }
      v = double(whole);
    } else if (item_size == 8) {
      std::memcpy(&v, raw, 8);
    } else {
      float f;
      std::memcpy(&f, raw, 4);
      v = f;
    }
    if (!std::isfinite(v)) {
      const uint64_t r = k / cols, c = k % cols;
      fail(data_begin + k * item_size, "expected a finite number at [" + std::to_string(r) + ", " + std::to_string(c) +
                                           "], found " + (std::isnan(v) ? "nan" : v > 0 ? "inf" : "-inf"));
    }
    if (std::abs(v) > kMaxFeatureMagnitude) {
      const uint64_t r = k / cols, c = k % cols;
      fail(data_begin + k * item_size, "expected a number of at most 1e100 in size at [" + std::to_string(r) + ", " +
                                           std::to_string(c) + "] (distances between such numbers overflow)");
    }
    dst[k] = v;
  }
  return out;
}

std::string npy_bytes(const Points& points) {
  std::string header = "{'descr': '<f8', 'fortran_order': False, 'shape': (" + std::to_string(points.rows()) + ", " +
                       std::to_string(points.cols()) + "), }";
  const size_t preamble = 10;  // magic (6), version (2), header length (2)
  header.append((64 - (preamble + header.size() + 1) % 64) % 64, ' ');
  header += '\n';
  std::string out = "\x93NUMPY";
  out += '\x01';
  out += '\x00';
  out += char(header.size() & 0xff);
  out += char((header.size() >> 8) & 0xff);
  out += header;
  const size_t start = out.size();
  out.resize(start + size_t(points.size()) * sizeof(double));
  char* data = out.data() + start;
  for (Eigen::Index i = 0; i < points.rows(); ++i)  // C order, whatever the matrix's own storage
    for (Eigen::Index j = 0; j < points.cols(); ++j, data += sizeof(double)) {
      const double v = points(i, j);
      std::memcpy(data, &v, sizeof v);  // little-endian machines only (as the reader)
    }
  return out;
}

}  // namespace kith
