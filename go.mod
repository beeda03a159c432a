module couplet

go 1.26.0

require gonum.org/v1/gonum v0.17.0

require (
	github.com/chzyer/readline v1.5.1 // indirect
	github.com/creack/pty v1.1.24 // indirect
	github.com/mitchellh/colorstring v0.0.0-20190213212951-d06e56a500db // indirect
	github.com/rivo/uniseg v0.4.7 // indirect
	github.com/schollz/progressbar/v3 v3.19.1 // indirect
	github.com/traefik/yaegi v0.16.1 // indirect
	golang.org/x/sys v0.46.0 // indirect
	golang.org/x/term v0.44.0 // indirect
)
