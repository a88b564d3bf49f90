// Package outfile is the one place where phasonhull writes files and
// folders. It keeps two promises for every command:
//
//  1. No output is, or holds, an input of the same run. Check compares
//     outputs with inputs by identity (device and inode, following symlinks
//     and hard links), not by name, and refuses before any work starts.
//     Which flags name inputs and outputs is recorded on the flags
//     themselves (Mark), so a command's inputs and outputs can be read off
//     the command tree.
//
//  2. A run stopped at any moment leaves the previous file or folder as it
//     was and no temporary file behind. Content is first staged where no
//     one sees it (an unnamed file on Linux, memory elsewhere); the short
//     commit that makes it visible — link beside the target, rename over
//     it — holds a process-wide lock, and the signal handler installed by
//     ExitOnSignal takes that lock before the process exits, so SIGINT,
//     SIGTERM and SIGHUP never cut a commit in half. Only SIGKILL within
//     the microseconds of a commit can leave one hidden ".NAME.phasonhull-*"
//     entry beside the target (the target itself is still either the old or
//     the new content, never a mix).
//
// The commit lock is process state by nature (signals are delivered to the
// process), which is why it is the package's one variable.
package outfile
