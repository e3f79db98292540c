//go:build !unix

package bundle

// syscallNoFollow is 0 where the system has no O_NOFOLLOW; the folder
// reader's Lstat-based check still refuses links.
const syscallNoFollow = 0
