// The one way kith writes a file: the bytes go to a new temporary file in the target's folder
// (created with O_CREAT | O_EXCL | O_NOFOLLOW under an unpredictable name, so nothing planted
// there in advance is followed or reused), are written in full, checked and fsynced, and the
// temporary is renamed into place; then the folder is fsynced. On any failure the temporary is
// removed and the old file, if any, is left byte for byte as it was. A SQLite database (a
// session) is never written over, whatever the options say.
// Any thread; two writers of the same path at once end with one complete file or the other.
#pragma once
#include <string>

namespace kith {

struct SafeWriteOptions {
  // Write over an existing file; when false an existing file is refused, atomically (a file
  // that appears while writing is not replaced either). (default: true)
  bool replace = true;
};

// Writes BYTES to PATH. Returns "" or a message naming the path and the cause.
std::string write_file_safely(const std::string& path, const std::string& bytes, const SafeWriteOptions& options = {});

// "" when PATH may be written (it does not exist, or `replace` and it is not a SQLite database
// or a folder), else the message write_file_safely would give. Follows a symbolic link at PATH.
std::string check_write_target(const std::string& path, bool replace);

// True when PATH names a readable file that starts with the SQLite header "SQLite format 3\0".
bool is_sqlite_file(const std::string& path);

// Creates a new, empty file beside PATH (same folder) with O_CREAT | O_EXCL | O_NOFOLLOW under an
// unpredictable name (".NAME.XXXXXXXXXXXX.tmp"). Returns an open, writable descriptor and sets
// *temp_path, or returns -1 and sets *error. The caller closes and removes it.
int create_temp_beside(const std::string& path, std::string* temp_path, std::string* error);

// Opens NAME only if no file (or link) of that name exists: O_CREAT | O_EXCL | O_NOFOLLOW.
// Returns the descriptor or -1 with errno set.
int create_new_file(const std::string& name);

}  // namespace kith
