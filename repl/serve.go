package repl

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
)

// ErrInterrupt is returned by a LineReader when the user presses Ctrl-C
// at the prompt.
var ErrInterrupt = errors.New("interrupt")

// LineReader gives the session its input one line at a time. ReadLine
// returns io.EOF at the end of input and ErrInterrupt for Ctrl-C.
type LineReader interface {
	ReadLine(prompt string) (string, error)
}

// Prompt returns the prompt for a new cell.
func Prompt(n int) string { return fmt.Sprintf("c%d> ", n) }

// ContinuePrompt is the prompt for the further lines of a cell.
const ContinuePrompt = "  | "

// Serve runs the session on a stream of lines until the input ends or a
// quit command; Ctrl-C at an empty prompt twice in a row ends it too.
// A cell is complete when Incomplete says so, or after two blank lines.
func (s *Session) Serve(ctx context.Context, in LineReader) error {
	return ServeLines(ctx, s, in, s.opts.Stderr)
}

// Runner runs the cells and commands ServeLines reads: a Session, or the
// terminal side of a session whose interpreter runs in another process.
type Runner interface {
	// Exec runs one cell.
	Exec(ctx context.Context, src string) *Cell
	// Command runs a command line and reports whether to end the session.
	Command(ctx context.Context, line string) (quit bool)
	// NextNumber is the number of the next cell, for its prompt.
	NextNumber() int
}

// ServeLines runs r on a stream of lines as Session.Serve does; its
// remarks on the input (a discarded cell, how to leave) go to stderr.
func ServeLines(ctx context.Context, r Runner, in LineReader, stderr io.Writer) error {
	var buf strings.Builder
	blank := 0
	interrupted := false
	for {
		prompt := Prompt(r.NextNumber())
		if buf.Len() > 0 {
			prompt = ContinuePrompt
		}
		line, err := in.ReadLine(prompt)
		if errors.Is(err, ErrInterrupt) {
			if buf.Len() > 0 {
				buf.Reset()
				fmt.Fprintln(stderr, "(input discarded)")
				continue
			}
			if interrupted {
				return nil
			}
			interrupted = true
			fmt.Fprintln(stderr, "(press Ctrl-C again to leave, or type @quit)")
			continue
		}
		interrupted = false
		if errors.Is(err, io.EOF) {
			if buf.Len() > 0 {
				r.Exec(ctx, buf.String())
			}
			return nil
		}
		if err != nil {
			return fmt.Errorf("repl: reading input: %w", err)
		}
		if buf.Len() == 0 {
			t := strings.TrimSpace(line)
			if t == "" {
				continue
			}
			if strings.HasPrefix(t, CommandPrefix) {
				if quit := r.Command(ctx, t); quit {
					return nil
				}
				continue
			}
		}
		buf.WriteString(line)
		buf.WriteString("\n")
		if strings.TrimSpace(line) == "" {
			blank++
		} else {
			blank = 0
		}
		if Incomplete(buf.String()) && blank < 2 {
			continue
		}
		r.Exec(ctx, buf.String())
		buf.Reset()
		blank = 0
	}
}

// readerLines is a LineReader over an io.Reader.
type readerLines struct {
	sc     *bufio.Scanner
	prompt io.Writer
}

// NewLineReader reads lines from r; prompts are written to prompt unless
// it is nil.
func NewLineReader(r io.Reader, prompt io.Writer) LineReader {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 16*1024*1024)
	return &readerLines{sc: sc, prompt: prompt}
}

func (r *readerLines) ReadLine(prompt string) (string, error) {
	if r.prompt != nil {
		io.WriteString(r.prompt, prompt)
	}
	if !r.sc.Scan() {
		if err := r.sc.Err(); err != nil {
			return "", err
		}
		return "", io.EOF
	}
	return r.sc.Text(), nil
}
