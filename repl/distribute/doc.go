// Package distribute spreads the analyses of a study over worker
// processes, on this machine or others, through a NATS JetStream server.
//
// The coordinator is the process that runs the study: a Coordinator is
// the mdo.Dispatcher of its Evaluator (mdo.WithDispatcher on the context
// the script's optimiser gets from cell.Context). A worker (`couplet
// worker --connect URL`, or Serve) connects to the same server, learns of
// the run from the runs bucket, checks that its build is the
// coordinator's, replays the study file with its own sandbox policy and
// in its own workspace (the same script and seed build the same study:
// the fingerprint of the study is checked on every request), and answers
// analysis requests for the study its replay has reached. The replay
// follows the coordinator: each batch of its own is answered with the
// results the workers published for the coordinator's batch of the same
// numbers (the designs checked bit for bit), so it comes to the script's
// next optimisation with the state the coordinator had, and serves that
// one in turn.
//
// The pieces on the server:
//
//   - the runs bucket (key-value "couplet_runs"): one entry per run, the
//     script, its SHA-256, the seed override, the build of the
//     coordinator and the acknowledgement deadline. The coordinator
//     deletes it when the run ends, which releases the workers;
//   - the work stream COUPLET_WORK, a work queue: one message per fresh
//     point, subject couplet.work.RUN, message id RUN.TURN.BATCH.INDEX (the
//     server drops a second copy), taken by the run's durable consumer
//     with explicit acknowledgement. A worker acknowledges a request only
//     after its result is published, and tells the server it is still
//     working at a third of the deadline while the analysis runs; a
//     worker that dies or stalls stops doing so, and the request goes to
//     another worker when the deadline passes;
//   - the result stream COUPLET_RESULTS, subject couplet.result.RUN, with
//     the same message ids: a result published twice (a request analysed
//     again after its first worker died past publishing) is stored once,
//     and the coordinator keeps the first result per request in any case;
//   - notices on couplet.notice.RUN (core NATS): a worker that refuses a
//     run says why (another build, another script, a study that rebuilds
//     differently, a script that fails), and the coordinator prints it.
//
// Design values and results travel as their float64 bits (encoding/gob),
// and the coordinator's Evaluator numbers, caches, records and tracks
// every point as it does for its own worker pool, so a run gives the
// same result, bit for bit, on one process and on any number of workers.
// Every optimisation the script runs with cell.Context() is spread, one
// after another: the Evaluators take turns (see Coordinator). One that a
// script runs at the same time as another (in a goroutine) runs in the
// coordinator's pool, and so does a later batch of an Evaluator whose turn
// is over; the coordinator's log says so once for each.
//
// Hub is an embedded JetStream server for the local case and for tests:
// nothing needs installing.
package distribute
