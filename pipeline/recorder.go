package pipeline

import (
	"context"
	"time"
)

// RunID identifies one run of a configuration.
type RunID string

// RunStatus is the state of a run.
type RunStatus string

// Run states.
const (
	RunRunning   RunStatus = "running"
	RunSucceeded RunStatus = "succeeded"
	RunFailed    RunStatus = "failed" // at least one node failed
)

// NodeStatus is the state of a recorded node.
type NodeStatus string

// Node states. Only NodeOK rows are results; a failed node carries its error
// and no outputs, and is never reused.
const (
	NodeOK     NodeStatus = "ok"
	NodeFailed NodeStatus = "failed"
)

// Action says what a run did with a node.
type Action string

// Actions.
const (
	Computed Action = "computed"
	Reused   Action = "reused"
	Failed   Action = "failed"
)

// RunInfo describes a run when it begins.
type RunInfo struct {
	ID          RunID
	Started     time.Time
	ToolVersion string
	ConfigPath  string // as given by the user; informational
	ConfigText  string // the exact bytes of the configuration
	ConfigHash  string // prefixed SHA-256 of ConfigText
	// Owner identifies the process running the run ("host:pid"), so that a
	// run left running by a killed process can be told from a live one.
	Owner string
	// DerivedFrom is the recorded run whose configuration this run's is,
	// edited ("run --from"); empty for a configuration given directly.
	DerivedFrom RunID
	// Parts are the recorded runs this run assembles, in order: the shard
	// runs of a study assembled into one run of the whole study.
	Parts []RunID
}

// NodeRecord is everything stored about one node.
type NodeRecord struct {
	Key         KeyID
	Stage       string
	Version     int
	Params      Values
	Inputs      []InputRef
	Description string // the text Key is the hash of
	Outputs     Values // nil for a failed node
	OutputHash  OutputID
	Status      NodeStatus
	Error       string
	Duration    time.Duration
}

// ResultRef marks a node as one of a run's results, under a label.
type ResultRef struct {
	Ordinal int
	Label   string
	Key     KeyID
}

// Recorder is the storage the engine writes through; the ledger implements
// it. Each method is one transaction: a node's rows are written together or
// not at all.
type Recorder interface {
	// BeginRun records a run as running.
	BeginRun(ctx context.Context, info RunInfo) error
	// Lookup returns the successful node with this key, if recorded.
	Lookup(ctx context.Context, key KeyID) (NodeRecord, bool, error)
	// RecordNode stores a node (unless already stored, for Reused) and
	// links it to the run with the action taken and the time it took.
	RecordNode(ctx context.Context, run RunID, node NodeRecord, action Action) error
	// RecordResults stores which nodes are the run's results.
	RecordResults(ctx context.Context, run RunID, results []ResultRef) error
	// FinishRun closes a run with its final status.
	FinishRun(ctx context.Context, run RunID, status RunStatus, finished time.Time, errText string) error
}

// Recorded is one node and what a run did with it, for batched writes.
type Recorded struct {
	Node   NodeRecord
	Action Action
	// OutputsText is the canonical encoding of Node.Outputs (Values.Encode)
	// that the engine hashed, when it has it; a recorder may store it
	// instead of encoding the outputs again, after checking its hash.
	OutputsText []byte
	// InWork marks a node recorded as part of a work (WorkRecorder): it
	// gets no link to the run of its own, the work links it.
	InWork bool
	// New marks a computed node whose stage version the recorder held no
	// node of when the run began (StageHolder): its key was not looked
	// up, and the recorder may take it as absent (if another writer
	// recorded it since, the write fails on the key and is made again,
	// reading every key).
	New bool
}

// StageHolder is a recorder that says whether it holds any node of a
// stage version described with a tool identity. A key is the hash of a
// description that names all three, so no key of a kind the recorder does
// not hold can be found: a run skips looking them up (a cold scan of a
// new study or under a new release looks up nothing).
type StageHolder interface {
	HoldsStage(ctx context.Context, tool, stage string, version int) (bool, error)
}

// BatchRecorder is a Recorder that can store many nodes of a run in one
// transaction. Execute uses it when Options.Batch is above one; a batch is
// written whole or not at all, so an interrupted run loses at most the
// nodes of its last unwritten batch, which a re-run recomputes.
type BatchRecorder interface {
	Recorder
	RecordNodes(ctx context.Context, run RunID, batch []Recorded) error
}

// BatchLookup is a Recorder that can look up many keys at once. Execute
// uses it, when batching, to find every ready node in one query instead of
// one query a node: a warm run then settles most of its nodes without
// running a stage or waking a worker.
type BatchLookup interface {
	// LookupMany returns the successful nodes among keys, by key.
	LookupMany(ctx context.Context, keys []KeyID) (map[KeyID]NodeRecord, error)
}
