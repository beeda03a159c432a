package repl

import (
	"regexp"
	"strconv"
	"strings"
)

// panicFrameRE finds a frame of a panic the interpreter reports on its
// standard error as the panic unwinds, innermost first: "LINE:COL:
// panic: FUNC(...)", LINE counted in the chunk that declared the code.
var panicFrameRE = regexp.MustCompile(`(?m)^(\d+):(\d+): panic: (?:main\.)?(\w*)`)

// ranChunk is a chunk a cell of the session ran, as the interpreter was
// given it.
type ranChunk struct {
	src        string
	cell, line int // the cell and the line it starts on
}

// ranKept is how many of the chunks run last are kept for placing
// frames.
const ranKept = 4096

// ranChunk records a chunk of a cell before the interpreter runs it, for
// placing the frames of a panic (placePanic).
func (s *Session) ranChunk(c *Cell, src string, line int) {
	if s.opts.OnPanicLine == nil {
		return
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if len(s.ran) == ranKept {
		s.ran = append(s.ran[:0:0], s.ran[1:]...)
	}
	s.ran = append(s.ran, ranChunk{src: src, cell: c.Number, line: line})
}

// placePanic passes the frames of a panic that the interpreter wrote,
// placed on a line of a cell, to Options.OnPanicLine. It is how the
// panic of a goroutine a cell started, which no recover reaches and
// which ends the process, can be placed: the runtime's own report names
// only the interpreter's frames.
func (s *Session) placePanic(text string) {
	if s.opts.OnPanicLine == nil || !strings.Contains(text, ": panic") {
		return
	}
	s.mu.Lock()
	ran := s.ran
	s.mu.Unlock()
	for _, m := range panicFrameRE.FindAllStringSubmatch(text, -1) {
		l, _ := strconv.Atoi(m[1])
		col, _ := strconv.Atoi(m[2])
		if cellNo, line, ok := placeFrame(ran, l, col, m[3]); ok {
			s.opts.OnPanicLine(cellNo, line)
		}
	}
}

// placeFrame finds the cell and line of a frame at line l, column col of
// one of the chunks ran, in function fn: the only chunk that has such a
// place, or else the only one whose text there is a call of panic, or
// else the only one that declares fn. ok is false when no chunk, or
// more than one, fits.
func placeFrame(ran []ranChunk, l, col int, fn string) (cell, line int, ok bool) {
	var fit, calls, declares []ranChunk
	for _, ch := range ran {
		lines := strings.Split(ch.src, "\n")
		if l < 1 || l > len(lines) {
			continue
		}
		fits, call := false, false
		for _, shift := range wrapShifts(l) {
			c := col - shift
			if c < 1 || c > len(lines[l-1]) {
				continue
			}
			fits = true
			call = call || strings.HasPrefix(lines[l-1][c-1:], "panic(")
		}
		if fits {
			fit = append(fit, ch)
			if fn != "" && fn != "main" && (strings.Contains(ch.src, "func "+fn+"(") || strings.Contains(ch.src, ") "+fn+"(")) {
				declares = append(declares, ch)
			}
		}
		if call {
			calls = append(calls, ch)
		}
	}
	switch {
	case len(fit) == 1:
		return fit[0].cell, fit[0].line + l - 1, true
	case len(calls) == 1:
		return calls[0].cell, calls[0].line + l - 1, true
	case len(declares) == 1:
		return declares[0].cell, declares[0].line + l - 1, true
	}
	return 0, 0, false
}

// wrapShifts are the columns the interpreter may have put before a
// chunk's text on line l: it compiles a chunk of statements as the body
// of "package main; func main() {" and a declaration after "package
// main;", on the chunk's first line.
func wrapShifts(l int) []int {
	if l == 1 {
		return []int{0, len("package main;"), len("package main; func main() {")}
	}
	return []int{0}
}
