package distribute

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"runtime"
	"runtime/debug"
	"strings"
)

// BuildID identifies the program this process runs: its module version,
// the Go version and the settings it was built with, and the SHA-256 of
// its executable. A coordinator and its workers must have the same one:
// the same build gives the same analyses, bit for bit.
func BuildID() (string, error) {
	exe, err := os.Executable()
	if err != nil {
		return "", fmt.Errorf("distribute: finding this program: %w", err)
	}
	f, err := os.Open(exe)
	if err != nil {
		return "", fmt.Errorf("distribute: reading this program: %w", err)
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("distribute: reading this program %s: %w", exe, err)
	}
	var b strings.Builder
	if bi, ok := debug.ReadBuildInfo(); ok {
		fmt.Fprintf(&b, "%s %s", bi.Main.Path, bi.Main.Version)
		for _, s := range bi.Settings {
			if s.Key == "vcs.revision" || s.Key == "vcs.modified" || s.Key == "GOARCH" || s.Key == "GOOS" || s.Key == "-race" {
				fmt.Fprintf(&b, " %s=%s", s.Key, s.Value)
			}
		}
	}
	fmt.Fprintf(&b, " %s %s/%s executable sha256:%s", runtime.Version(), runtime.GOOS, runtime.GOARCH, hex.EncodeToString(h.Sum(nil)))
	return b.String(), nil
}
