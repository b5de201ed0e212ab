//go:build !unix

package decode

import "os"

// openNonBlocking opens path read-only; platforms without FIFOs in the
// Unix sense need nothing more.
func openNonBlocking(path string) (*os.File, error) { return os.Open(path) }

func clearNonBlocking(*os.File) error { return nil }
