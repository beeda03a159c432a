package distribute

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/nats-io/nats.go"
	"github.com/nats-io/nats.go/jetstream"
)

// Names on the server.
const (
	workStream   = "COUPLET_WORK"
	resultStream = "COUPLET_RESULTS"
	runsBucket   = "couplet_runs"
	workPrefix   = "couplet.work."
	resultPrefix = "couplet.result."
	noticePrefix = "couplet.notice."
	// dedupeWindow is how long the server remembers message ids.
	dedupeWindow = 10 * time.Minute
)

// Auth is how a client proves itself to the server: with the server's
// token, or with a credentials file (a user JWT and its NKey seed, as the
// server's operator issues them). At most one is given.
type Auth struct {
	Token     string
	CredsFile string
}

// options returns the connection options of the auth.
func (a Auth) options() ([]nats.Option, error) {
	switch {
	case a.Token != "" && a.CredsFile != "":
		return nil, errors.New("distribute: give a token or a credentials file, not both")
	case a.Token != "":
		return []nats.Option{nats.Token(a.Token)}, nil
	case a.CredsFile != "":
		return []nats.Option{nats.UserCredentials(a.CredsFile)}, nil
	}
	return nil, nil
}

// Conn is a connection to a JetStream server with the streams and the
// bucket a run needs.
type Conn struct {
	nc   *nats.Conn
	js   jetstream.JetStream
	runs jetstream.KeyValue
	work jetstream.Stream
	res  jetstream.Stream
}

// Connect connects to the server at url (nats://host:port, or several
// separated by commas) as name, and makes the streams and the bucket if
// they are not there.
func Connect(ctx context.Context, url, name string, auth Auth) (*Conn, error) {
	opts, err := auth.options()
	if err != nil {
		return nil, err
	}
	opts = append(opts, nats.Name(name), nats.MaxReconnects(-1), nats.ReconnectWait(250*time.Millisecond))
	nc, err := nats.Connect(url, opts...)
	if err != nil {
		return nil, fmt.Errorf("distribute: connecting to %s: %w", url, err)
	}
	c := &Conn{nc: nc}
	if err := c.setUp(ctx); err != nil {
		nc.Close()
		return nil, fmt.Errorf("distribute: %s: %w", url, err)
	}
	return c, nil
}

// setUp makes (or finds) the streams and the bucket.
func (c *Conn) setUp(ctx context.Context) error {
	js, err := jetstream.New(c.nc)
	if err != nil {
		return fmt.Errorf("JetStream: %w", err)
	}
	c.js = js
	if c.work, err = js.CreateOrUpdateStream(ctx, jetstream.StreamConfig{
		Name: workStream, Subjects: []string{workPrefix + ">"}, Retention: jetstream.WorkQueuePolicy,
		Storage: jetstream.FileStorage, Duplicates: dedupeWindow,
	}); err != nil {
		return fmt.Errorf("the work stream %s: %w (is JetStream enabled on the server?)", workStream, err)
	}
	if c.res, err = js.CreateOrUpdateStream(ctx, jetstream.StreamConfig{
		Name: resultStream, Subjects: []string{resultPrefix + ">"}, Retention: jetstream.LimitsPolicy,
		Storage: jetstream.FileStorage, Duplicates: dedupeWindow, MaxAge: 24 * time.Hour,
	}); err != nil {
		return fmt.Errorf("the result stream %s: %w", resultStream, err)
	}
	if c.runs, err = js.CreateOrUpdateKeyValue(ctx, jetstream.KeyValueConfig{Bucket: runsBucket, Storage: jetstream.FileStorage}); err != nil {
		return fmt.Errorf("the runs bucket %s: %w", runsBucket, err)
	}
	return nil
}

// Close closes the connection.
func (c *Conn) Close() { c.nc.Close() }

// consumerName is the name of a run's durable consumer.
func consumerName(run string) string { return "run-" + run }

// validRun checks a run id read from the server: it becomes part of
// subject and consumer names.
func validRun(run string) error {
	if run == "" || len(run) > 64 || strings.ContainsAny(run, ".*> \t\r\n") {
		return fmt.Errorf("distribute: run id %q is not a plain token", run)
	}
	return nil
}
