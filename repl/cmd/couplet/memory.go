package main

import (
	"bufio"
	"fmt"
	"os"
	"strconv"
	"strings"
)

// The units a memory size may be written in.
var sizeUnits = []struct {
	suffix string
	bytes  uint64
}{{"TiB", 1 << 40}, {"GiB", 1 << 30}, {"MiB", 1 << 20}, {"KiB", 1 << 10}}

// minMemoryCap is the smallest memory cap accepted: the interpreter
// process needs about 30 MiB to start (common practice (no source): a
// margin of four times that).
const minMemoryCap = 128 << 20

// sizeWant is what a memory size may be.
const sizeWant = "a decimal whole number followed by KiB, MiB, GiB or TiB, e.g. 512MiB or 4GiB"

// parseSize reads a memory size: a decimal whole number followed by KiB,
// MiB, GiB or TiB, e.g. 512MiB or 4GiB.
func parseSize(flagName, s string) (uint64, error) {
	for _, u := range sizeUnits {
		num, ok := strings.CutSuffix(s, u.suffix)
		if !ok {
			continue
		}
		v, err := strconv.ParseUint(num, 10, 64)
		if err != nil || strconv.FormatUint(v, 10) != num || v > (1<<64-1)/u.bytes {
			break
		}
		if v*u.bytes < minMemoryCap {
			return 0, fmt.Errorf("%s %q: want at least 128MiB, the interpreter needs that much to run", flagName, s)
		}
		return v * u.bytes, nil
	}
	return 0, fmt.Errorf("%s %q: want %s", flagName, s, sizeWant)
}

// formatSize writes a size in the largest unit that divides it, or MiB.
func formatSize(b uint64) string {
	for _, u := range sizeUnits {
		if b%u.bytes == 0 {
			return fmt.Sprintf("%d%s", b/u.bytes, u.suffix)
		}
	}
	return fmt.Sprintf("%.0fMiB", float64(b)/(1<<20))
}

// defaultMemoryCap is half of the machine's memory (MemTotal of
// /proc/meminfo), or 4GiB where that cannot be read.
func defaultMemoryCap() uint64 {
	const fallback = 4 << 30
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return fallback
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		rest, ok := strings.CutPrefix(sc.Text(), "MemTotal:")
		if !ok {
			continue
		}
		fields := strings.Fields(rest)
		if len(fields) != 2 || fields[1] != "kB" {
			return fallback
		}
		kb, err := strconv.ParseUint(fields[0], 10, 64)
		if err != nil || kb == 0 {
			return fallback
		}
		return kb << 10 / 2
	}
	return fallback
}
