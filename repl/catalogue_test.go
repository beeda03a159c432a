package repl

import (
	"strings"
	"testing"
)

// @catalogue lists a session's system or study, filtered by a prefix.
func TestCatalogueCommand(t *testing.T) {
	s, out, errb := newTest(t, Options{})
	defer s.Close()
	serve(t, s, "st, err := mdo.SellarStudy(mdo.MDF)\n@catalogue st y\n@catalogue st.System z2\n@catalogue st q\nn := 3\n@catalogue n\n@catalogue\n")
	for _, w := range []string{"y1    -     1", "sellar2, sellar_functions", "z2 "} {
		if !strings.Contains(out.String(), w) {
			t.Errorf("output lacks %q:\n%s", w, out)
		}
	}
	for _, w := range []string{`starts with "q"`, "want a *mdo.System or a *mdo.Study", "needs a system or a study"} {
		if !strings.Contains(errb.String(), w) {
			t.Errorf("stderr lacks %q:\n%s", w, errb)
		}
	}
}
