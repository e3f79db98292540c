//go:build unix

package bundle

import "syscall"

// syscallNoFollow makes opening a symbolic link fail instead of following it.
const syscallNoFollow = syscall.O_NOFOLLOW
