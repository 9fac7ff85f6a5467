// kindred: the temporary files of index writers ("INDEX.tmp.PID" while a
// whole file is written, "INDEX.building.PID" while build writes in parts),
// which must not outlive the process that made them.
//
// A writer registers each one while it exists; InstallTempFileCleanup()
// makes SIGINT and SIGTERM remove the registered files before the process
// dies of the signal. RemoveStaleTempFiles() finds such files that a
// process killed without that chance (SIGKILL, power cut) left behind.
//
// Thread-safety: RegisterTempFile/ForgetTempFile may be called from any
// thread; at most kMaxTempFiles are tracked at once (more are not removed
// on a signal, but are still removed by their writer on failure).
#ifndef KINDRED_TEMP_FILES_H_
#define KINDRED_TEMP_FILES_H_

#include <string>
#include <vector>

namespace kindred {

inline constexpr int kMaxTempFiles = 8;

void RegisterTempFile(const std::string& path);
void ForgetTempFile(const std::string& path);

// Installs the SIGINT/SIGTERM handler (once per process): it unlinks the
// registered files, then re-raises the signal with the default action.
void InstallTempFileCleanup();

// Removes "<index>.tmp.<pid>" and "<index>.building.<pid>" files beside
// `index` whose process no longer runs on this machine; returns one line
// per removed file ("removed X (N bytes), left by process P that no longer
// runs"). Files of running processes are left alone.
std::vector<std::string> RemoveStaleTempFiles(const std::string& index);

}  // namespace kindred

#endif  // KINDRED_TEMP_FILES_H_
