package ledger

import (
	"time"

	"github.com/inflatrace/inflatrace/pipeline"
)

// RunSummary is one line of the run list.
type RunSummary struct {
	ID          pipeline.RunID
	Started     time.Time
	Finished    time.Time // zero while the run is running
	Status      pipeline.RunStatus
	ToolVersion string
	ConfigPath  string
	ConfigHash  string
	Computed    int // nodes the run computed
	Reused      int // nodes the run took from the ledger
	Failed      int // nodes that failed in the run
	Results     int // labelled results the run recorded
}

// RunDetail is everything recorded about a run itself.
type RunDetail struct {
	pipeline.RunInfo
	Status   pipeline.RunStatus
	Finished time.Time // zero while the run is running
	Error    string
	// Seal is the hash of the run's account written when it finished
	// (see sealOf); empty while running and for runs finished before seals.
	Seal string
	// SealSignature is the seal's signature (an armored OpenSSH signature
	// of SealMessage), empty when the run was sealed without a key.
	SealSignature string
}

// RunNode is a node as one run saw it: the stored node together with what
// the run did with it. The embedded NodeRecord is the node's current row
// (so a node that failed in this run may since have succeeded in another);
// Action, RunDuration and RunError are this run's own account.
type RunNode struct {
	pipeline.NodeRecord
	Ordinal     int // the order in which the run touched the node, from 0
	Action      pipeline.Action
	RunDuration time.Duration
	RunError    string
}
