// Package plot draws the pictures of a study with gonum/plot: the
// optimisation history, coupling-solver residuals, a design-of-experiments
// scatter matrix, parallel coordinates, the Pareto front and the design
// structure matrix. Each function returns a Figure, written as SVG or PNG.
//
// The package depends on mdo alone and knows nothing of the application:
// NewFigure, NewPlot, AxisLabel, AddLine, AddScatter and the colours are
// the builder on which an application draws pictures of its own.
package plot
