// Writing output files so that a reader never sees half of one, and inputs are never lost.
#ifndef PKARTA_ATOMIC_FILE_H_
#define PKARTA_ATOMIC_FILE_H_

#include <string>
#include <string_view>
#include <vector>

namespace pkarta {

/// Writes `content` to `path` through a temporary file in the same folder, closed and then
/// renamed over `path` (rename is atomic within one file system on POSIX), so `path` holds
/// either its old content or the whole new one, whatever interrupts the program. With
/// `durable` the file is also fsync'ed before the rename, so the new content survives a power
/// cut (this costs some milliseconds per file on ordinary disks). A new file gets mode 0666
/// less the umask; an existing one keeps its mode and owner; a symbolic link is followed (the
/// file it names is replaced, the link stays). A path naming a folder, device, FIFO or socket
/// is refused with InputError (never replaced).
///
/// Throws InputError naming `path` when it is the same file as one of `inputs_to_protect`
/// ("refusing to overwrite the input file compounds/x.xml"), and std::system_error when the
/// folder is missing or a write fails; its what() reads
/// "cannot write reports/x.html: No space left on device". The temporary file is removed on
/// failure.
///
/// Example: write_file_atomically("reports/demo.html", html, {"compounds/demo-base.xml"});
void write_file_atomically(const std::string& path, std::string_view content,
                           const std::vector<std::string>& inputs_to_protect = {}, bool durable = false);

/// Throws InputError when `path` names an existing file that is one of `inputs` (same file
/// after resolving links and relative paths), or names a folder, device, FIFO or socket.
/// Commands call it before they compute, so a bad output path costs nothing and writes nothing.
void refuse_to_overwrite_inputs(const std::string& path, const std::vector<std::string>& inputs);

/// One file of a set: its name inside the set's folder and its content.
struct SetFile {
  std::string name;
  std::string content;
};

/// Name of the list of files kept in a set's folder, so that pkarta knows which files it wrote.
inline constexpr const char* kSetManifest = ".pkarta-files";

/// Writes a set: `main_path` (e.g. an HTML report) and beside it the folder `folder_path` with
/// `files` (its CSV tables), as one unit. The whole new folder is written under a temporary
/// name first and then exchanged with the old one in one rename (Linux renameat2 with
/// RENAME_EXCHANGE), and the main file is renamed into place right after, so a reader or a
/// kill sees the old set or the new set; the only window where tables and main file belong to
/// different runs is between those two renames (microseconds). Stale files of an earlier,
/// larger set go with the old folder. Concurrent writers in one folder are serialised by a lock
/// on that folder, so eight writers to the same path leave one complete set.
/// Refuses (InputError, before writing anything) a folder that holds files pkarta did not write
/// (no manifest lists them), a folder name "." or "..", and everything refuse_to_overwrite_inputs
/// refuses. A failed run removes what it wrote and leaves the old set as it was. A replaced
/// main file keeps its mode and owner, as with write_file_atomically (one shared step).
void write_file_set(const std::string& main_path, std::string_view main_content, const std::string& folder_path,
                    const std::vector<SetFile>& files, const std::vector<std::string>& inputs_to_protect);

}  // namespace pkarta

#endif  // PKARTA_ATOMIC_FILE_H_
