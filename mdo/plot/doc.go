// Package plot draws the pictures of a study with gonum/plot: the
// optimisation history, coupling-solver residuals, a design-of-experiments
// scatter matrix, parallel coordinates, the Pareto front, the wing
// planform and top view of a design, a constraint diagram and the design
// structure matrix. Each function returns a Figure, written as SVG or PNG.
//
// The package depends on mdo alone: aircraft geometry comes in as the
// plain Aircraft struct, constraint boundaries as functions.
package plot
