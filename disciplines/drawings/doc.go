// Package drawings holds every aircraft drawing of Couplet, built on the
// generic figures of package couplet/mdo/plot: the wing planform and the
// top view of a design (Aircraft, Planform, TopView) and the sizing
// diagram, thrust-to-weight ratio against wing loading, of an analysed
// design (SizingDiagram, drawing a disciplines.SizingDiagram).
//
// Figures draws all of them for the best design of an aircraft study; it
// has the signature of report.FigureSource, the hook through which a run
// folder (report.WriteRun) gets a study's further figures, so that
// neither mdo nor repl knows an aircraft variable. Checklist, through the
// same hook, writes the designer's checklist of the best design and of
// each design on a front into the report's notes.
//
// The drawings show conceptual-design estimates, not data for
// certification, flight or airworthiness decisions.
package drawings
