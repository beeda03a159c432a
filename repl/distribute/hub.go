package distribute

import (
	"fmt"
	"os"
	"time"

	"github.com/nats-io/nats-server/v2/server"
)

// HubConfig configures an embedded JetStream server.
type HubConfig struct {
	// Host and Port are where it listens; empty Host is 127.0.0.1 and
	// Port 0 a free port.
	Host string
	Port int
	// Token, if not empty, is the token clients must give.
	Token string
	// StoreDir holds the streams; empty makes a temporary folder, removed
	// by Close.
	StoreDir string
}

// Hub is an embedded NATS server with JetStream, started in this process.
type Hub struct {
	srv    *server.Server
	tmp    string
	url    string
	config HubConfig
}

// StartHub starts an embedded server and waits until it takes
// connections.
func StartHub(cfg HubConfig) (*Hub, error) {
	if cfg.Port < 0 || cfg.Port > 65535 {
		return nil, fmt.Errorf("distribute: hub port %d: want 0 (a free port) to 65535", cfg.Port)
	}
	h := &Hub{config: cfg}
	if cfg.Host == "" {
		cfg.Host = "127.0.0.1"
	}
	port := cfg.Port
	if port == 0 {
		port = -1 // the server's "any free port"
	}
	dir := cfg.StoreDir
	if dir == "" {
		var err error
		if dir, err = os.MkdirTemp("", "couplet-hub-*"); err != nil {
			return nil, fmt.Errorf("distribute: hub store: %w", err)
		}
		h.tmp = dir
	}
	srv, err := server.NewServer(&server.Options{
		ServerName: "couplet-hub", Host: cfg.Host, Port: port,
		JetStream: true, StoreDir: dir, Authorization: cfg.Token,
		NoLog: true, NoSigs: true,
	})
	if err != nil {
		h.removeStore()
		return nil, fmt.Errorf("distribute: starting the hub: %w", err)
	}
	go srv.Start()
	if !srv.ReadyForConnections(20 * time.Second) {
		srv.Shutdown()
		h.removeStore()
		return nil, fmt.Errorf("distribute: the hub on %s:%d did not take connections within 20 s", cfg.Host, cfg.Port)
	}
	h.srv, h.url = srv, srv.ClientURL()
	return h, nil
}

// URL returns the address clients connect to (nats://host:port).
func (h *Hub) URL() string { return h.url }

// Token returns the token clients must give ("" for none).
func (h *Hub) Token() string { return h.config.Token }

// Close stops the server and removes its temporary store.
func (h *Hub) Close() error {
	h.srv.Shutdown()
	h.srv.WaitForShutdown()
	return h.removeStore()
}

// removeStore removes the temporary store folder, if the hub made one.
func (h *Hub) removeStore() error {
	if h.tmp == "" {
		return nil
	}
	if err := os.RemoveAll(h.tmp); err != nil {
		return fmt.Errorf("distribute: removing the hub's store: %w", err)
	}
	return nil
}
