package cell

import (
	"reflect"

	"github.com/traefik/yaegi/interp"
)

// Exports returns the symbol table of the cell package bound to e, for
// interp.Interpreter.Use. Scripts see these names as package functions.
func (e *Env) Exports() interp.Exports {
	return interp.Exports{
		ImportPath + "/cell": {
			"Context":     reflect.ValueOf(e.Context),
			"Seed":        reflect.ValueOf(e.Seed),
			"Attach":      reflect.ValueOf(e.Attach),
			"Progress":    reflect.ValueOf(e.Progress),
			"Publish":     reflect.ValueOf(e.Publish),
			"WriteFile":   reflect.ValueOf(e.WriteFile),
			"OutDir":      reflect.ValueOf(e.OutDir),
			"Programs":    reflect.ValueOf(e.Programs),
			"EveryOutput": reflect.ValueOf(e.EveryOutput),
			"SaveFigure":  reflect.ValueOf(e.SaveFigure),
			"AddFigures":  reflect.ValueOf(e.AddFigures),
			"Compare":     reflect.ValueOf(e.Compare),
		},
	}
}
