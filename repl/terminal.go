package repl

import (
	"errors"
	"io"
	"reflect"
	"sort"
	"strings"

	"github.com/chzyer/readline"

	"couplet/repl/cell"
	"couplet/repl/symbols"
	"couplet/repl/symbols/trusted"
)

// TermReader is a LineReader on a terminal, with line editing, history
// and tab completion.
type TermReader struct {
	rl *readline.Instance
}

// NewTermReader opens the terminal for a session. historyFile may be ""
// (no history kept between sessions).
func NewTermReader(s *Session, historyFile string) (*TermReader, error) {
	rl, err := readline.NewEx(&readline.Config{
		Prompt:          Prompt(1),
		HistoryFile:     historyFile,
		AutoComplete:    &completer{s: s},
		InterruptPrompt: "^C",
		EOFPrompt:       "",
	})
	if err != nil {
		return nil, err
	}
	return &TermReader{rl: rl}, nil
}

// ReadLine implements LineReader.
func (t *TermReader) ReadLine(prompt string) (string, error) {
	t.rl.SetPrompt(prompt)
	line, err := t.rl.Readline()
	if errors.Is(err, readline.ErrInterrupt) {
		return "", ErrInterrupt
	}
	if errors.Is(err, io.EOF) {
		return "", io.EOF
	}
	return line, err
}

// Close restores the terminal.
func (t *TermReader) Close() error { return t.rl.Close() }

// completer completes commands, package members and session variables.
type completer struct{ s *Session }

// Do implements readline.AutoCompleter.
func (c *completer) Do(line []rune, pos int) ([][]rune, int) {
	head := string(line[:pos])
	if strings.TrimSpace(head) == "" {
		// Tab at the start of a line indents it.
		return [][]rune{[]rune("\t")}, 0
	}
	cands := c.s.Complete(head)
	word := lastWord(head)
	var out [][]rune
	for _, k := range cands {
		out = append(out, []rune(k[len(word):]))
	}
	return out, len([]rune(word))
}

// lastWord returns the identifier (with dots) that ends text.
func lastWord(text string) string {
	i := len(text)
	for i > 0 {
		ch := text[i-1]
		if ch == '.' || ch == '_' || ch == '@' || ch >= '0' && ch <= '9' || ch >= 'a' && ch <= 'z' || ch >= 'A' && ch <= 'Z' {
			i--
			continue
		}
		break
	}
	return text[i:]
}

// Complete returns the completions of the word that ends text: command
// names after "@", members after "pkg.", and otherwise session variables
// and package names. Each completion is the whole word.
func (s *Session) Complete(text string) []string {
	word := lastWord(text)
	var cands []string
	switch {
	case strings.HasPrefix(word, CommandPrefix):
		if strings.TrimSpace(text) == word {
			cands = CommandNames()
		}
	case strings.Contains(word, "."):
		pkg, _, _ := strings.Cut(word, ".")
		for _, m := range s.members(pkg) {
			cands = append(cands, pkg+"."+m)
		}
	default:
		for n := range s.Globals() {
			cands = append(cands, n)
		}
		for _, c := range s.cells {
			if c.Err == nil {
				cands = append(cands, declaredNames(c.Source)...)
			}
		}
		cands = append(cands, s.packageNames()...)
	}
	var out []string
	seen := map[string]bool{}
	for _, k := range cands {
		if strings.HasPrefix(k, word) && !seen[k] {
			seen[k] = true
			out = append(out, k)
		}
	}
	sort.Strings(out)
	return out
}

// packageNames returns the names scripts refer to packages by.
func (s *Session) packageNames() []string {
	var out []string
	for _, key := range s.tableKeys() {
		out = append(out, key[strings.LastIndex(key, "/")+1:])
	}
	return out
}

// tableKeys lists the "path/name" keys of the exposed tables.
func (s *Session) tableKeys() []string {
	var keys []string
	for k := range symbols.Symbols {
		keys = append(keys, k)
	}
	if s.opts.Policy.Trusted {
		for k := range trusted.Symbols {
			keys = append(keys, k)
		}
	}
	keys = append(keys, cell.ImportPath+"/cell")
	return keys
}

// members returns the exported names of the package called name.
func (s *Session) members(name string) []string {
	var out []string
	for _, key := range s.tableKeys() {
		if key[strings.LastIndex(key, "/")+1:] != name {
			continue
		}
		for m := range s.tableOf(key) {
			if !strings.HasPrefix(m, "_") {
				out = append(out, m)
			}
		}
	}
	return out
}

// tableOf returns the symbols of one table key.
func (s *Session) tableOf(key string) map[string]reflect.Value {
	if t, ok := symbols.Symbols[key]; ok {
		return t
	}
	if t, ok := trusted.Symbols[key]; ok && s.opts.Policy.Trusted {
		return t
	}
	if key == cell.ImportPath+"/cell" {
		return s.env.Exports()[key]
	}
	return nil
}
