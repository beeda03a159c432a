package main

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	"couplet/mdo"
	"couplet/repl"
	"couplet/repl/distribute"
)

// tokenEnv is where `couplet worker`, `couplet hub` and the spreading
// flags of `couplet run` read the cluster token when --cluster-token is
// not given (a token in the environment does not show in the process
// list).
const tokenEnv = "COUPLET_CLUSTER_TOKEN"

// spreadSettings are the flags of `couplet run` that spread its analyses
// over workers.
type spreadSettings struct {
	on      string        // --workers-on: the server of an existing cluster
	local   int           // --local-workers: workers this run starts, with a hub of its own
	token   string        // --cluster-token
	creds   string        // --cluster-creds
	ackWait time.Duration // --redeliver-after
}

// spreadFlags declares the spreading flags of `couplet run`.
func spreadFlags(fs *flag.FlagSet, sp *spreadSettings) {
	fs.StringVar(&sp.on, "workers-on", "", "spread the analyses over the workers (couplet worker) connected to this NATS JetStream server, e.g. nats://host:4222")
	fs.IntVar(&sp.local, "local-workers", 0, "spread the analyses over this many worker processes on this machine, through a JetStream server the run starts for itself")
	fs.StringVar(&sp.token, "cluster-token", "", "the token of the --workers-on server (default: $"+tokenEnv+")")
	fs.StringVar(&sp.creds, "cluster-creds", "", "a NATS credentials file (user JWT and NKey seed) for the --workers-on server")
	fs.DurationVar(&sp.ackWait, "redeliver-after", 30*time.Second, "hand an analysis to another worker when its worker has neither answered nor said it is at work for this long (default 30s)")
}

// check refuses contradictory spreading flags (a usage error).
func (sp *spreadSettings) check() error {
	switch {
	case sp.on != "" && sp.local != 0:
		return errors.New("--workers-on and --local-workers: give one (an existing cluster, or workers this run starts)")
	case sp.local < 0 || sp.local > 256:
		return fmt.Errorf("--local-workers %d: want 1 to 256", sp.local)
	case sp.on == "" && sp.local == 0 && (sp.token != "" || sp.creds != ""):
		return errors.New("--cluster-token and --cluster-creds go with --workers-on")
	case sp.token != "" && sp.creds != "":
		return errors.New("--cluster-token and --cluster-creds: give one")
	case sp.ackWait < 100*time.Millisecond:
		return fmt.Errorf("--redeliver-after %v: want at least 100ms", sp.ackWait)
	}
	return nil
}

// runOnly refuses the spreading flags where they do not apply: the
// notebook session analyses in its own process.
func (sp *spreadSettings) runOnly() error {
	if sp.on != "" || sp.local != 0 {
		return errors.New("--workers-on and --local-workers go with couplet run; the notebook session analyses in its own process")
	}
	return nil
}

// auth returns the credentials the flags give.
func (sp *spreadSettings) auth() distribute.Auth {
	a := distribute.Auth{Token: sp.token, CredsFile: sp.creds}
	if a.Token == "" && a.CredsFile == "" {
		a.Token = os.Getenv(tokenEnv)
	}
	return a
}

// start readies the spreading of the run's analyses: with neither flag it
// returns ctx as it is; otherwise ctx carries the run's Coordinator. The
// release function ends the run on the server and stops what start
// started.
func (sp *spreadSettings) start(ctx context.Context, opts repl.RunOptions, stderr io.Writer) (context.Context, func(), error) {
	if sp.on == "" && sp.local == 0 {
		return ctx, func() {}, nil
	}
	var cleanup []func()
	release := func() {
		for i := len(cleanup) - 1; i >= 0; i-- {
			cleanup[i]()
		}
	}
	fail := func(err error) (context.Context, func(), error) {
		release()
		return nil, nil, err
	}
	url, auth := sp.on, sp.auth()
	if sp.local > 0 {
		var tok [16]byte
		if _, err := rand.Read(tok[:]); err != nil {
			return fail(err)
		}
		hub, err := distribute.StartHub(distribute.HubConfig{Token: hex.EncodeToString(tok[:])})
		if err != nil {
			return fail(err)
		}
		cleanup = append(cleanup, func() { _ = hub.Close() })
		url, auth = hub.URL(), distribute.Auth{Token: hub.Token()}
		stop, err := startLocalWorkers(sp.local, hub, opts.Policy, stderr)
		if err != nil {
			return fail(err)
		}
		cleanup = append(cleanup, stop)
	}
	build, err := distribute.BuildID()
	if err != nil {
		return fail(err)
	}
	text, err := os.ReadFile(opts.File)
	if err != nil {
		return fail(fmt.Errorf("reading the study file: %w", err))
	}
	conn, err := distribute.Connect(ctx, url, "couplet run "+filepath.Base(opts.File), auth)
	if err != nil {
		return fail(err)
	}
	cleanup = append(cleanup, conn.Close)
	co, err := distribute.NewCoordinator(ctx, conn, distribute.CoordinatorConfig{
		Script: string(text), Seed: opts.Seed, SeedSet: opts.SeedSet, AckWait: sp.ackWait, Build: build, Log: stderr,
	})
	if err != nil {
		return fail(err)
	}
	cleanup = append(cleanup, func() {
		if err := co.Close(); err != nil {
			fmt.Fprintln(stderr, "couplet run:", err)
		}
	})
	return mdo.WithDispatcher(ctx, co), release, nil
}

// startLocalWorkers starts n worker processes of this program on the
// hub, with the run's sandbox policy; the function returned stops them.
func startLocalWorkers(n int, hub *distribute.Hub, policy repl.Policy, stderr io.Writer) (func(), error) {
	exe, err := os.Executable()
	if err != nil {
		return nil, fmt.Errorf("finding this program to start its workers: %w", err)
	}
	var cmds []*exec.Cmd
	stop := func() {
		for _, c := range cmds {
			_ = c.Process.Signal(syscall.SIGTERM)
		}
		for _, c := range cmds {
			_ = c.Wait()
		}
	}
	for k := 1; k <= n; k++ {
		args := []string{"worker", "--connect", hub.URL(), "--name", "local-" + strconv.Itoa(k)}
		if policy.Trusted {
			args = append(args, repl.TrustFlag)
		}
		for _, p := range policy.Programs {
			args = append(args, repl.AllowProgramFlag, p)
		}
		c := exec.Command(exe, args...)
		c.Env = append(os.Environ(), tokenEnv+"="+hub.Token())
		c.Stderr = stderr
		// the workers end with this process, however it ends
		c.SysProcAttr = &syscall.SysProcAttr{Pdeathsig: syscall.SIGKILL}
		if err := c.Start(); err != nil {
			stop()
			return nil, fmt.Errorf("starting local worker %d: %w", k, err)
		}
		cmds = append(cmds, c)
	}
	return stop, nil
}

// workerCommand is `couplet worker`.
func workerCommand(args []string, stdout, stderr io.Writer) int {
	var (
		connect, name, dir string
		parallel           int
		verbose            bool
		st                 settings
		sp                 spreadSettings
	)
	fs := flag.NewFlagSet("worker", flag.ContinueOnError)
	fs.StringVar(&connect, "connect", "", "the NATS JetStream server of the cluster, e.g. nats://host:4222 (required)")
	fs.StringVar(&sp.token, "cluster-token", "", "the server's token (default: $"+tokenEnv+")")
	fs.StringVar(&sp.creds, "cluster-creds", "", "a NATS credentials file (user JWT and NKey seed) for the server")
	fs.StringVar(&name, "name", "", "the worker's name in results and notices (default HOST-PID)")
	fs.StringVar(&dir, "workspace", "", "the worker's workspace: each run gets a folder in it (default: a temporary folder)")
	fs.IntVar(&parallel, "parallel", 1, "analyses run at once (default 1)")
	fs.BoolVar(&verbose, "verbose", false, "log every request taken and answered")
	fs.BoolVar(&st.trust, strings.TrimPrefix(repl.TrustFlag, "--"), false, "lift the sandbox for the scripts this worker replays (trusted coordinators only)")
	fs.Var(&st.programs, strings.TrimPrefix(repl.AllowProgramFlag, "--"), "approve one external program for the scripts this worker replays (repeatable)")
	pos, err := parseFlags("worker", fs, args, nil)
	if errors.Is(err, errHelp) {
		workerUsage(stdout, fs)
		return 0
	}
	if err == nil {
		switch {
		case len(pos) > 0:
			err = fmt.Errorf("unexpected argument %q: couplet worker takes flags only", pos[0])
		case connect == "":
			err = errors.New("need --connect URL, the NATS JetStream server of the cluster, e.g. nats://host:4222")
		case parallel < 1:
			err = fmt.Errorf("--parallel %d: want %s", parallel, flagValues["parallel"].want)
		case sp.token != "" && sp.creds != "":
			err = errors.New("--cluster-token and --cluster-creds: give one")
		}
	}
	if err != nil {
		return usageFailed(stderr, "worker", err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	build, err := distribute.BuildID()
	if err != nil {
		fmt.Fprintln(stderr, "couplet worker:", err)
		return 1
	}
	conn, err := distribute.Connect(ctx, connect, "couplet worker "+name, sp.auth())
	if err != nil {
		fmt.Fprintln(stderr, "couplet worker:", err)
		return 1
	}
	defer conn.Close()
	err = distribute.Serve(ctx, conn, distribute.WorkerConfig{
		Name: name, Dir: dir, Policy: st.policy(), Parallel: parallel, Build: build, Log: stdout, Verbose: verbose,
	})
	if err != nil {
		fmt.Fprintln(stderr, "couplet worker:", err)
		return 1
	}
	return 0
}

// workerUsage prints the usage of `couplet worker`.
func workerUsage(w io.Writer, fs *flag.FlagSet) {
	fmt.Fprintf(w, `usage: couplet worker --connect URL
          [--cluster-token TOKEN | --cluster-creds FILE] [--name NAME]
          [--workspace DIR] [--parallel N] [%s]
          [%s PATH]... [--verbose]

A worker answers the analyses of the runs spread over the cluster
(couplet run --workers-on URL): it replays each run's study file under its
own sandbox and in its own workspace, and refuses a run of another build.
It stops on Ctrl-C or SIGTERM.

flags:
`, repl.TrustFlag, repl.AllowProgramFlag)
	printFlags(w, fs)
}

// hubCommand is `couplet hub`: a JetStream server for workers on other
// machines, when no NATS server is installed.
func hubCommand(args []string, stdout, stderr io.Writer) int {
	var listen, store, token string
	fs := flag.NewFlagSet("hub", flag.ContinueOnError)
	fs.StringVar(&listen, "listen", "127.0.0.1:4222", "where the server listens (default 127.0.0.1:4222, this machine only; 0.0.0.0:4222 for other machines)")
	fs.StringVar(&token, "cluster-token", "", "the token clients must give (default: $"+tokenEnv+"; one of the two is required)")
	fs.StringVar(&store, "store", "", "the folder of the streams (default: a temporary folder)")
	pos, err := parseFlags("hub", fs, args, nil)
	if errors.Is(err, errHelp) {
		hubUsage(stdout, fs)
		return 0
	}
	if token == "" {
		token = os.Getenv(tokenEnv)
	}
	var host string
	var port int
	if err == nil {
		switch {
		case len(pos) > 0:
			err = fmt.Errorf("unexpected argument %q: couplet hub takes flags only", pos[0])
		case token == "":
			err = errors.New("need a token: --cluster-token TOKEN or $" + tokenEnv)
		default:
			host, port, err = splitHostPort(listen)
		}
	}
	if err != nil {
		return usageFailed(stderr, "hub", err)
	}
	hub, err := distribute.StartHub(distribute.HubConfig{Host: host, Port: port, Token: token, StoreDir: store})
	if err != nil {
		fmt.Fprintln(stderr, "couplet hub:", err)
		return 1
	}
	defer hub.Close()
	fmt.Fprintf(stdout, "couplet hub: serving %s; workers: couplet worker --connect %s, runs: couplet run --workers-on %s (token from --cluster-token or $%s)\n", hub.URL(), hub.URL(), hub.URL(), tokenEnv)
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	<-ctx.Done()
	return 0
}

// splitHostPort reads the HOST:PORT of --listen.
func splitHostPort(s string) (string, int, error) {
	i := strings.LastIndex(s, ":")
	p, err := strconv.Atoi(s[i+1:])
	if i < 0 || err != nil || p < 0 || p > 65535 || strconv.Itoa(p) != s[i+1:] {
		return "", 0, fmt.Errorf("--listen %q: want %s", s, flagValues["listen"].want)
	}
	return s[:i], p, nil
}

// hubUsage prints the usage of `couplet hub`.
func hubUsage(w io.Writer, fs *flag.FlagSet) {
	fmt.Fprint(w, `usage: couplet hub [--listen HOST:PORT] [--cluster-token TOKEN] [--store DIR]

The hub is a NATS JetStream server for couplet worker and
couplet run --workers-on on other machines, when no NATS server of your own
is at hand. It serves until Ctrl-C or SIGTERM.

flags:
`)
	printFlags(w, fs)
}
