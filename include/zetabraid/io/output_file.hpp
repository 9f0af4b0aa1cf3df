// Writing output files so that a failed or interrupted run never leaves a partial file, and never replaces
// something that is not a regular file.
#pragma once
#include <string>

namespace zb {

/// Writes `text` to `path` atomically: a temporary file in the same folder, written, fsync'ed, then renamed over
/// the target (the folder is fsync'ed too). "-" writes to standard output.
///  * An existing target keeps its permission bits (and owner, where allowed).
///  * A symbolic link is followed: the file it names is replaced, the link stays.
///  * /dev/null (and any path naming the same device) discards the output.
///  * Any other existing target that is not a regular file (directory, device, FIFO, socket) is refused with
///    InputError; so is an empty path.
///  * The temporary file is removed when writing fails, and when SIGINT, SIGTERM or SIGHUP arrives while it
///    exists (the signal's default action then follows).
void write_file_atomic(const std::string& path, const std::string& text);

}  // namespace zb
