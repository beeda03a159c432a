package repl

import (
	"errors"
	"io"
	"reflect"
	"sort"
	"strings"

	"github.com/chzyer/readline"
	"github.com/traefik/yaegi/interp"

	"couplet/repl/cell"
	"couplet/repl/symbols"
	"couplet/repl/symbols/trusted"
)

// TermReader is a LineReader on a terminal, with line editing, history
// and tab completion.
type TermReader struct {
	rl *readline.Instance
}

// Completer completes the word that ends a line of input: a Session, or
// Completions where the interpreter runs in another process.
type Completer interface {
	// Complete returns the whole words that complete the word ending text.
	Complete(text string) []string
}

// NewTermReader opens the terminal for a session, completing with c.
// historyFile may be "" (no history kept between sessions).
func NewTermReader(c Completer, historyFile string) (*TermReader, error) {
	rl, err := readline.NewEx(&readline.Config{
		Prompt:          Prompt(1),
		HistoryFile:     historyFile,
		AutoComplete:    &completer{c: c},
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
type completer struct{ c Completer }

// Do implements readline.AutoCompleter.
func (c *completer) Do(line []rune, pos int) ([][]rune, int) {
	head := string(line[:pos])
	if strings.TrimSpace(head) == "" {
		// Tab at the start of a line indents it.
		return [][]rune{[]rune("\t")}, 0
	}
	cands := c.c.Complete(head)
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
	var names []string
	for n := range s.Globals() {
		names = append(names, n)
	}
	for _, c := range s.cells {
		if c.Err == nil {
			names = append(names, declaredNames(c.Source)...)
		}
	}
	return tables{trusted: s.opts.Policy.Trusted, cell: s.env.Exports()}.complete(text, names)
}

// Completions completes as Session.Complete does without an interpreter:
// the session's variables are the names its cells declare.
type Completions struct {
	// Policy is the session's sandbox policy (which packages complete).
	Policy Policy
	// Sources returns the sources of the cells that ran to their end.
	Sources func() []string
}

// Complete implements Completer.
func (c Completions) Complete(text string) []string {
	var names []string
	if c.Sources != nil {
		for _, src := range c.Sources() {
			names = append(names, declaredNames(src)...)
		}
	}
	return tables{trusted: c.Policy.Trusted, cell: cell.NewEnv(cell.Host{}).Exports()}.complete(text, names)
}

// tables are the symbol tables a session's scripts see.
type tables struct {
	trusted bool
	cell    interp.Exports // the cell package's
}

// complete returns the completions of the word that ends text, names
// being the session's variables.
func (t tables) complete(text string, names []string) []string {
	word := lastWord(text)
	var cands []string
	switch {
	case strings.HasPrefix(word, CommandPrefix):
		if strings.TrimSpace(text) == word {
			cands = CommandNames()
		}
	case strings.Contains(word, "."):
		pkg, _, _ := strings.Cut(word, ".")
		for _, m := range t.members(pkg) {
			cands = append(cands, pkg+"."+m)
		}
	default:
		cands = append(names, t.packageNames()...)
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
func (t tables) packageNames() []string {
	var out []string
	for _, key := range t.keys() {
		out = append(out, key[strings.LastIndex(key, "/")+1:])
	}
	return out
}

// keys lists the "path/name" keys of the exposed tables.
func (t tables) keys() []string {
	var keys []string
	for k := range symbols.Symbols {
		keys = append(keys, k)
	}
	if t.trusted {
		for k := range trusted.Symbols {
			keys = append(keys, k)
		}
	}
	keys = append(keys, cell.ImportPath+"/cell")
	return keys
}

// members returns the exported names of the package called name.
func (t tables) members(name string) []string {
	var out []string
	for _, key := range t.keys() {
		if key[strings.LastIndex(key, "/")+1:] != name {
			continue
		}
		for m := range t.of(key) {
			if !strings.HasPrefix(m, "_") {
				out = append(out, m)
			}
		}
	}
	return out
}

// of returns the symbols of one table key.
func (t tables) of(key string) map[string]reflect.Value {
	if tb, ok := symbols.Symbols[key]; ok {
		return tb
	}
	if tb, ok := trusted.Symbols[key]; ok && t.trusted {
		return tb
	}
	if key == cell.ImportPath+"/cell" {
		return t.cell[key]
	}
	return nil
}
