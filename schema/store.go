package schema

// Actor is who makes a change, for the audit log and the readings' provenance.
type Actor struct {
	DeviceID string // "" for the command line
	Name     string // the technician's or device's name
	Role     string // RoleLead or RoleTechnician
}

// Snapshot is a whole job as stored: its design records (deleted ones left out)
// and every reading, superseded and void ones included, in the order stored.
// ChangesSince returns the same shape holding only what changed, deleted
// records included so that deletions travel.
type Snapshot struct {
	Job           Job            `json:"job"`
	Instruments   []Instrument   `json:"instruments"`
	Systems       []System       `json:"systems"`
	Outlets       []Outlet       `json:"outlets"`
	Traverses     []Traverse     `json:"traverses"`
	CapacityTests []CapacityTest `json:"capacity_tests"`
	WaterTests    []WaterTest    `json:"water_tests"`
	Readings      []Reading      `json:"readings"`
}

// ReadingResult is the fate of one reading in a batch. Reason says why one was
// rejected, or notes something about one stored (its subject was deleted).
type ReadingResult struct {
	ID     string `json:"id"`
	Status string `json:"status"` // "stored", "duplicate" or "rejected"
	Field  string `json:"field,omitempty"`
	Reason string `json:"reason,omitempty"`
	Seq    int64  `json:"seq,omitempty"`
}

// Reading batch outcomes.
const (
	ReadingStored    = "stored"
	ReadingDuplicate = "duplicate"
	ReadingRejected  = "rejected"
)
