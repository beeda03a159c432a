package report

// page is the HTML template of a report.
const page = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>
` + style + `</style>
</head>
<body>
<h1>{{.Title}}</h1>
<p class="caution" id="caution"><strong>Caution.</strong> {{.Caution}}</p>

{{if .Surrogates}}
<div class="caution" id="surrogates"><strong>Numbers from surrogate models.</strong>
<ul>{{range .Surrogates}}<li>{{.}}</li>{{end}}</ul>
<p>{{.SurrogateCaution}}.</p></div>
{{end}}

<h2 id="provenance">Provenance</h2>
<table>
{{range .Provenance}}<tr><th>{{.Key}}</th><td>{{.Value}}</td></tr>
{{end}}</table>

{{with .Settings}}
<h2 id="settings">Settings</h2>
<p>The optimiser, {{.Optimizer}}, as the run recorded its settings (where the method's documentation says so, a zero value stands for its default):</p>
{{if .OptimizerSettings}}<table id="optimizer-settings">
<tr><th>setting</th><th>value</th></tr>
{{range .OptimizerSettings}}<tr><td>{{.Key}}</td><td>{{.Value}}</td></tr>
{{end}}</table>{{else}}<p>{{.NoSettings}}.</p>{{end}}
<p>The coupling solvers of the system's coupled groups when the run began:</p>
{{if .Solvers}}<table id="coupling-solvers">
<tr><th>coupled group</th><th>method</th><th>tolerance (scaled residual)</th><th>most iterations</th><th>relaxation</th><th>on a failed solve</th></tr>
{{range .Solvers}}<tr><td>{{range $i, $d := .Disciplines}}{{if $i}}, {{end}}{{$d}}{{end}}</td><td>{{.Method}}</td><td class="num">{{printf "%g" .Tolerance}}</td><td class="num">{{.MaxIterations}}</td><td class="num">{{printf "%g" .Relaxation}}</td><td>{{if .Fallback}}fallback chain{{else}}the point fails{{end}}{{if .FromReference}}; started from the reference state{{end}}{{if .Exhaustive}}; exhaustive{{end}}</td></tr>
{{end}}</table>{{else}}<p>Coupling solvers: {{.NoSolvers}}.</p>{{end}}
{{end}}

{{if .Best}}
<h2 id="best">Best design</h2>
<p>Evaluation #{{.Best.ID}}:
{{if .Best.Feasible}}<span class="verdict-feasible">feasible</span>{{else}}<span class="verdict-infeasible">INFEASIBLE</span> (violation {{.Best.Violation}}){{if .Best.Err}}: {{.Best.Err}}{{end}}{{end}}.</p>
<table>
<tr><th>design variable</th><th>value</th><th>unit</th><th>lower bound</th><th>upper bound</th><th>position in range</th></tr>
{{range .Best.Design}}<tr><td>{{.Name}}</td><td class="num">{{.Value}}</td><td>{{.Unit}}</td><td class="num">{{.Lower}}</td><td class="num">{{.Upper}}</td><td>{{.Position}}</td></tr>
{{end}}</table>
<table>
<tr><th>objective</th><th>sense</th><th>value</th><th>unit</th></tr>
{{range .Best.Objectives}}<tr><td>{{.Name}}</td><td>{{.Sense}}</td><td class="num">{{.Value}}</td><td>{{.Unit}}</td></tr>
{{end}}</table>
{{if .Best.Constraints}}
<h2 id="constraints">Constraints at the best design</h2>
<table>
<tr><th>constraint</th><th>value</th><th>unit</th><th>margin</th><th>state</th></tr>
{{range .Best.Constraints}}<tr class="{{.Class}}"><td>{{.Relation}}</td><td class="num">{{.Value}}</td><td>{{.Unit}}</td><td class="num">{{.Margin}}</td><td class="state-{{.Class}}">{{.State}}</td></tr>
{{end}}</table>
<p>The margin is how far the value lies inside its bound, in the constraint's unit (negative when violated); "active" marks a satisfied constraint within 0.1 % of its bound.</p>
{{end}}
{{end}}

{{with .Sensitivity}}
<h2 id="sensitivity">Post-optimality sensitivity</h2>
<p>What each limit costs at the optimum, and how the optimal {{.Objective}} moves with the named fixed parameters ({{.Caution}}).</p>
{{if .Limits}}<table>
<tr><th>limit of</th><th>bound</th><th>value</th><th>unit</th><th>state</th><th>d {{.Objective}} / d limit</th><th>unit</th></tr>
{{range .Limits}}<tr class="{{.Class}}"><td>{{.Name}}</td><td>{{.Bound}}</td><td class="num">{{.Value}}</td><td>{{.Unit}}</td><td class="state-{{.Class}}">{{.State}}</td><td class="num">{{.PerUnit}}</td><td>{{.PerUnitUnit}}</td></tr>
{{end}}</table>{{end}}
{{if .Parameters}}<table>
<tr><th>parameter</th><th>value</th><th>unit</th><th>d {{.Objective}} / d parameter</th><th>unit</th></tr>
{{range .Parameters}}<tr><td>{{.Name}}</td><td class="num">{{.Value}}</td><td>{{.Unit}}</td><td class="num">{{.PerUnit}}</td><td>{{.PerUnitUnit}}</td></tr>
{{end}}</table>{{end}}
{{end}}

{{if .Front}}
<h2 id="front">Pareto front ({{len .Front.Rows}} non-dominated feasible designs)</h2>
<table>
<tr>{{range .Front.Head}}<th>{{.}}</th>{{end}}</tr>
{{range .Front.Rows}}<tr>{{range $i, $c := .}}<td{{if $i}} class="num"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</table>
{{end}}

{{if .Figures}}
<h2 id="plots">Plots</h2>
` + figuresAndNotes + `
<h2 id="script">Study script</h2>
{{if .Script}}<pre><code>{{.Script}}</code></pre>{{else}}<p>No script was recorded with this run.</p>{{end}}

<p class="caution">{{.Caution}}</p>
</body>
</html>
`

// style is the style sheet of the tool's pages (report, index, comparison).
const style = `body { font-family: "DejaVu Sans", "Liberation Sans", Arial, sans-serif; margin: 2em auto; max-width: 70em; padding: 0 1em; color: #1b1b1b; background: #fff; }
h1 { font-size: 1.6em; border-bottom: 2px solid #3c5a8c; padding-bottom: .2em; }
h2 { font-size: 1.25em; margin-top: 1.8em; color: #3c5a8c; }
table { border-collapse: collapse; margin: .6em 0; }
th, td { border: 1px solid #c8c8c8; padding: .25em .6em; text-align: left; }
th { background: #eef2f8; }
td.num { text-align: right; font-variant-numeric: tabular-nums; font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; }
tr.violated td { background: #fde2e1; }
tr.active td { background: #fff4d6; }
.state-ok { color: #1f6f1f; }
.state-violated { color: #b21d1d; font-weight: bold; }
.state-active { color: #8a5a00; font-weight: bold; }
pre { background: #f6f6f6; border: 1px solid #ddd; padding: .8em; overflow-x: auto; font-size: .9em; }
figure { margin: 1.2em 0; }
figure svg { max-width: 100%; height: auto; border: 1px solid #e4e4e4; }
figcaption { font-size: .9em; color: #555; margin-top: .3em; }
.left-out { border: 1px dashed #b21d1d; color: #b21d1d; padding: .8em; }
.caution { border-left: 5px solid #c98a00; background: #fff8e6; padding: .7em 1em; margin: 1.2em 0; }
.verdict-feasible { color: #1f6f1f; font-weight: bold; }
.verdict-infeasible { color: #b21d1d; font-weight: bold; }
`

// figuresAndNotes is the part of a page (report, comparison) that shows
// its figures inline, each with its caption or the reason it could not be
// drawn, then its notes; it ends the {{if .Figures}} the page opens.
const figuresAndNotes = `{{range .Figures}}<figure id="fig-{{.ID}}">
{{if .LeftOut}}<p class="left-out">{{.LeftOut}}</p>{{else}}{{.SVG}}
<figcaption>{{.Caption}}</figcaption>{{end}}
</figure>
{{end}}
{{end}}

{{if .Notes}}
<h2 id="notes">Notes</h2>
<ul>{{range .Notes}}<li>{{.}}</li>{{end}}</ul>
{{end}}
`
