// The one way kith writes a file: the bytes go to a new temporary file in the target's folder
// (created with O_CREAT | O_EXCL | O_NOFOLLOW under an unpredictable name, so nothing planted
// there in advance is followed or reused), are written in full, checked and fsynced, and the
// temporary is renamed into place; then the folder is fsynced. On any failure the temporary is
// removed and the old file, if any, is left byte for byte as it was. A SQLite database (a
// session) is never written over, whatever the options say, and neither is any of the files the
// command reads (SafeWriteOptions::inputs), compared as files (device and inode), so a link or
// another spelling of the same file is caught too.
//
// Failures are reported, never hidden: a short write, ENOSPC or EFBIG, an fsync or close that
// fails, each give "PATH: writing failed (CAUSE)"; the temporary is removed and the old file kept.
// Test hook (for machines where a test cannot mount a small file system): when the environment
// holds KITH_TEST_DISK_FULL_AFTER=N, every write of this process stops after N bytes of the
// temporary file with ENOSPC, as a full disk would; KITH_TEST_FSYNC_FAILS=1 makes the fsync of
// the temporary fail with EIO. Nothing else reads these variables.
// Any thread; two writers of the same path at once end with one complete file or the other.
#pragma once
#include <string>
#include <vector>

namespace kith {

struct SafeWriteOptions {
  // Write over an existing file; when false an existing file is refused, atomically (a file
  // that appears while writing is not replaced either). (default: true)
  bool replace = true;
  // The command's own input files: refused as targets even with `replace`. (default: none)
  std::vector<std::string> inputs;
};

// Writes BYTES to PATH. Returns "" or a message naming the path and the cause.
std::string write_file_safely(const std::string& path, const std::string& bytes, const SafeWriteOptions& options = {});

// "" when PATH may be written (it does not exist, or `replace` and it is not a SQLite database,
// a folder or one of `inputs`), else the message write_file_safely would give. Follows a symbolic
// link at PATH. Commands call it before their work, so a refused output costs nothing.
std::string check_write_target(const std::string& path, const SafeWriteOptions& options);
std::string check_write_target(const std::string& path, bool replace);

// True when A and B name the same existing file (same device and inode, links followed).
bool same_file(const std::string& a, const std::string& b);

// PATH if nothing is there, else the first free "STEM-2.EXT", "STEM-3.EXT", ... beside it (for
// the window's pictures, which choose a fresh name rather than write over a file).
std::string fresh_name(const std::string& path);

// True when PATH names a readable file that starts with the SQLite header "SQLite format 3\0".
bool is_sqlite_file(const std::string& path);

// Creates a new, empty file beside PATH (same folder) with O_CREAT | O_EXCL | O_NOFOLLOW under an
// unpredictable name (".NAME.XXXXXXXXXXXX.tmp"). Returns an open, writable descriptor and sets
// *temp_path, or returns -1 and sets *error. The caller closes and removes it.
int create_temp_beside(const std::string& path, std::string* temp_path, std::string* error);

// Opens NAME only if no file (or link) of that name exists: O_CREAT | O_EXCL | O_NOFOLLOW.
// Returns the descriptor or -1 with errno set.
int create_new_file(const std::string& name);

// The safe writer's last steps, for a file that another library built in place under a
// temporary name made by create_new_file or create_temp_beside (a SQLite session, which SQLite
// writes itself, so its bytes never pass through write_file_safely): fsyncs TMP, moves it to PATH
// (over an existing file only when REPLACE; without it, refused atomically if PATH has appeared),
// then fsyncs the folder. Returns 0, or an errno value (EEXIST: PATH was there) with *ERROR
// naming PATH and the cause. On failure TMP stays for the caller to remove.
int commit_temp_file(const std::string& tmp, const std::string& path, bool replace, std::string* error);

// fsyncs FOLDER ("" = the current one), so a rename or link in it survives a power cut. Best
// effort: a folder that cannot be synced is not an error.
void fsync_folder(const std::string& folder);

}  // namespace kith
