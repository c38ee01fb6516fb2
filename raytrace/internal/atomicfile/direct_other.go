//go:build !linux

package atomicfile

import "os"

// Direct writes are used on Linux only; elsewhere WriteLarge is Write.
const directFlag = 0

func clearDirect(f *os.File) error { return nil }
