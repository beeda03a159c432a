package plot

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
)

// SVGText parses an SVG document to its end and returns the content of
// its text elements in order (titles, axis labels, legend entries), for
// checking what a figure shows. A document that is not well-formed XML or
// whose root is not an svg element is an error.
func SVGText(doc []byte) ([]string, error) {
	dec := xml.NewDecoder(bytes.NewReader(doc))
	var texts []string
	inText, root := false, ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("plot: SVG is not well-formed XML: %w", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			if root == "" {
				root = el.Name.Local
			}
			inText = el.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText {
				texts = append(texts, string(el))
			}
		}
	}
	if root != "svg" {
		return nil, fmt.Errorf("plot: the document's root element is %q, not svg", root)
	}
	return texts, nil
}
