// CsvTable: a table of text fields read from CSV or TSV (RFC 4180) with a header row.
//
// Accepted: fields quoted with '"' that hold separators, doubled quotes ("") and line breaks;
// LF, CRLF or lone CR line ends; a UTF-8 byte order mark at the start; a missing line end on the
// last row. Lines that are completely empty are skipped. A '"' inside an unquoted field is kept
// as text (lenient, as most spreadsheet programs write). Every row must have as many fields as
// the header; anything else throws LoadError with the file, the line and the field number.
//
// The fields are kept unescaped, back to back in one buffer, with one end offset per field, so a
// 100,000 x 50 table costs one copy of the text plus 8 bytes per field.
// Pure functions; a CsvTable is a value and may be read from many threads.
#pragma once
#include <sys/stat.h>
#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace kith {

class CsvTable {
 public:
  std::string source;               // file name used in messages
  char separator = ',';             // ',' or '\t'
  long header_line = 1;             // 1-based line of the header row
  long end_line = 1;                // the line just after the last row (for "the file ends here")
  std::vector<std::string> header;  // column names as written (unescaped)

  size_t rows() const { return lines_.size(); }  // data rows, header not counted
  size_t columns() const { return header.size(); }
  // Field of data row `row` (0-based, header excluded) and column `column` (0-based).
  std::string_view field(size_t row, size_t column) const {
    const size_t k = (row + 1) * header.size() + column;
    const size_t begin = k == 0 ? 0 : ends_[k - 1];
    return std::string_view(text_.data() + begin, ends_[k] - begin);
  }
  long line(size_t row) const { return lines_[row]; }  // 1-based line where data row `row` starts

 private:
  friend CsvTable parse_csv(std::string text, const std::string& source, char separator);
  std::string text_;          // unescaped fields back to back
  std::vector<size_t> ends_;  // end offset of each field in text_, header fields first
  std::vector<long> lines_;   // start line of each data row
};

// Parses CSV/TSV text. `separator` ',' or '\t'; 0 chooses: '\t' for a .tsv/.tab source name,
// ',' for .csv, else whichever of the two is more frequent in the first line. Throws LoadError
// (solver/io/collection.h) for an empty file, an unclosed quote, text after a closing quote and
// ragged rows.
CsvTable parse_csv(std::string text, const std::string& source, char separator = 0);

// Reads a whole file into memory; throws LoadError when it cannot be read.
std::string read_file(const std::string& path);

// Opens PATH for reading and checks it is a regular file (not a folder, device or FIFO), filling
// *ST; the descriptor, or throws LoadError saying what PATH is instead. read_file and MappedFile
// (solver/io/mapped_file.h) share it.
int open_regular_file(const std::string& path, struct stat* st);

}  // namespace kith
