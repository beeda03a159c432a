// Package report writes one self-contained HTML page per study run: its
// provenance, the study script, the best design with its objectives and
// constraint margins (or the Pareto front), and the plots embedded inline
// as SVG. The page loads nothing from elsewhere.
package report
