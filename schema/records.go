package schema

import (
	"regexp"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"fieldtab/measure"
)

// Design records. Their numeric design values are in the job's unit system:
// airflow cfm or L/s, water flow gpm or L/s, static pressure in. w.g. or Pa,
// duct and sheave sizes in or mm, capacity Btu/h or W, areas ft² or m². A job's
// unit system cannot change once it holds design data.

// Job is one building or project: the unit of pairing, sync and reporting.
type Job struct {
	ID            string     `json:"id"`
	Name          string     `json:"name"`
	SiteAddress   string     `json:"site_address"`
	Client        string     `json:"client"`
	Engineer      string     `json:"engineer"`
	Contractor    string     `json:"contractor"`
	TABFirm       string     `json:"tab_firm"`
	ProjectNumber string     `json:"project_number"`       // the client's or engineer's project number
	Units         string     `json:"units"`                // "ip" or "si"
	Elevation     *float64   `json:"elevation,omitempty"`  // site elevation, ft or m
	Barometric    *float64   `json:"barometric,omitempty"` // measured barometric pressure, psia or kPa (wins over elevation)
	Tolerances    Tolerances `json:"tolerances"`
	Status        string     `json:"status"` // "open" or "closed"
	Remarks       string     `json:"remarks"`
	Seq           int64      `json:"seq"` // last change sequence number; set by the store
	CreatedAt     time.Time  `json:"created_at"`
	UpdatedAt     time.Time  `json:"updated_at"`
}

// Tolerances are the job's balancing bands, each the allowed deviation below or
// above design in percent of design. Defaults are common practice; the project
// specification governs, so they are editable per job.
type Tolerances struct {
	OutletLowPct    float64 `json:"outlet_low_pct"`
	OutletHighPct   float64 `json:"outlet_high_pct"`
	FanLowPct       float64 `json:"fan_low_pct"`
	FanHighPct      float64 `json:"fan_high_pct"`
	HydronicLowPct  float64 `json:"hydronic_low_pct"`
	HydronicHighPct float64 `json:"hydronic_high_pct"`
}

// DefaultTolerances are measure's common-practice bands (not from a standard).
func DefaultTolerances() Tolerances {
	return Tolerances{
		OutletLowPct: measure.DefaultOutletBand.LowPct, OutletHighPct: measure.DefaultOutletBand.HighPct,
		FanLowPct: measure.DefaultFanBand.LowPct, FanHighPct: measure.DefaultFanBand.HighPct,
		HydronicLowPct: measure.DefaultHydronicBand.LowPct, HydronicHighPct: measure.DefaultHydronicBand.HighPct,
	}
}

// Instrument is a meter used on the job, with its calibration and accuracy.
type Instrument struct {
	ID             string  `json:"id"`
	JobID          string  `json:"job_id"`
	Tag            string  `json:"tag"`  // the crew's name for it, e.g. "Hood 2"
	Kind           string  `json:"kind"` // see InstrumentKinds
	Make           string  `json:"make"`
	Model          string  `json:"model"`
	Serial         string  `json:"serial"`
	CalibratedOn   string  `json:"calibrated_on"`   // YYYY-MM-DD
	CalibrationDue string  `json:"calibration_due"` // YYYY-MM-DD
	AccuracyPct    float64 `json:"accuracy_pct"`    // ± % of reading
	AccuracyAbs    float64 `json:"accuracy_abs"`    // ± in AccuracyUnit
	AccuracyUnit   string  `json:"accuracy_unit"`   // unit of AccuracyAbs, e.g. "cfm", "°F", "%RH"
	Remarks        string  `json:"remarks"`
	recordMeta
}

// InstrumentKinds are the instrument kinds a job may list.
var InstrumentKinds = []string{"flow_hood", "anemometer", "manometer", "pitot_tube", "thermometer",
	"hygrometer", "psychrometer", "tachometer", "clamp_meter", "multimeter", "hydronic_meter", "flow_meter", "other"}

// System is an air handler, rooftop unit, fan, pump or water loop with its
// design and nameplate data.
type System struct {
	ID       string       `json:"id"`
	JobID    string       `json:"job_id"`
	Tag      string       `json:"tag"`  // e.g. "RTU-2"
	Kind     string       `json:"kind"` // see SystemKinds
	Name     string       `json:"name"`
	Location string       `json:"location"`
	Design   SystemDesign `json:"design"`
	Remarks  string       `json:"remarks"`
	recordMeta
}

// SystemKinds are the kinds of system.
var SystemKinds = []string{"air_handler", "rooftop_unit", "fan", "pump", "water_loop"}

// SystemDesign is a system's design and nameplate data; zero means not given.
type SystemDesign struct {
	Airflow        float64 `json:"airflow"`         // cfm or L/s
	OutdoorAir     float64 `json:"outdoor_air"`     // cfm or L/s
	ExternalStatic float64 `json:"external_static"` // in. w.g. or Pa
	RatedTotal     float64 `json:"rated_total"`     // Btu/h or W
	RatedSensible  float64 `json:"rated_sensible"`  // Btu/h or W
	MotorHP        float64 `json:"motor_hp"`        // nameplate hp (kW in SI)
	FLA            float64 `json:"fla"`             // nameplate full-load amps
	Volts          float64 `json:"volts"`
	Phase          int     `json:"phase"` // 1 or 3
	FanRPM         float64 `json:"fan_rpm"`
	MotorRPM       float64 `json:"motor_rpm"`
	WaterFlow      float64 `json:"water_flow"`     // pumps and loops: gpm or L/s
	PerfTableCSV   string  `json:"perf_table_csv"` // manufacturer's performance table, measure.ParsePerfTableCSV format

	// Nameplate and drive, as read off the equipment; all optional.
	Make             string  `json:"make"`
	Model            string  `json:"model"`
	Serial           string  `json:"serial"`
	MotorMake        string  `json:"motor_make"`
	MotorFrame       string  `json:"motor_frame"`
	ServiceFactor    float64 `json:"service_factor"`     // 1 to 2; 0 not given
	FanSheaveSize    string  `json:"fan_sheave_size"`    // as stamped, e.g. "2B5V124"
	FanSheavePitch   float64 `json:"fan_sheave_pitch"`   // pitch diameter, in or mm
	MotorSheaveSize  string  `json:"motor_sheave_size"`  // as stamped, e.g. "2VP60 adjustable"
	MotorSheavePitch float64 `json:"motor_sheave_pitch"` // pitch diameter as set, in or mm
	Belts            string  `json:"belts"`              // number and size, e.g. "2 × B55"
	FanBushing       string  `json:"fan_bushing"`
	MotorBushing     string  `json:"motor_bushing"`
	Filters          string  `json:"filters"` // number, size and grade, e.g. "8 × 24×24×2 MERV 13"
}

// Outlet is a supply, return, exhaust or outdoor-air terminal on a system.
type Outlet struct {
	ID         string  `json:"id"`
	JobID      string  `json:"job_id"`
	SystemID   string  `json:"system_id"`
	Tag        string  `json:"tag"` // e.g. "S-101"
	Room       string  `json:"room"`
	Kind       string  `json:"kind"` // see OutletKinds
	Size       string  `json:"size"` // as scheduled, e.g. "24x24" or "10 in round"
	DesignFlow float64 `json:"design_flow"`
	Method     string  `json:"method"` // "hood" (reading × factor) or "ak" (velocity × Ak)
	Factor     float64 `json:"factor"` // hood correction factor; 1 when none
	Ak         float64 `json:"ak"`     // effective area, ft² or m² (method ak)
	Remarks    string  `json:"remarks"`
	recordMeta
}

// OutletKinds are the kinds of outlet.
var OutletKinds = []string{"supply", "return", "exhaust", "outdoor_air"}

// Traverse is a pitot-traverse plane in a duct.
type Traverse struct {
	ID                string  `json:"id"`
	JobID             string  `json:"job_id"`
	SystemID          string  `json:"system_id"`
	Tag               string  `json:"tag"`
	Location          string  `json:"location"`
	Shape             string  `json:"shape"`  // "rect" or "round"
	Method            string  `json:"method"` // "log-tchebycheff", "log-linear" or "equal-area"
	Width             float64 `json:"width"`  // in or mm
	Height            float64 `json:"height"`
	Diameter          float64 `json:"diameter"`
	PointsW           int     `json:"points_w"`
	PointsH           int     `json:"points_h"`
	PointsPerDiameter int     `json:"points_per_diameter"`
	Diameters         int     `json:"diameters"`
	Remarks           string  `json:"remarks"`
	recordMeta
}

// CapacityTest proves a system's delivered capacity.
type CapacityTest struct {
	ID         string `json:"id"`
	JobID      string `json:"job_id"`
	SystemID   string `json:"system_id"`
	Tag        string `json:"tag"`
	Mode       string `json:"mode"`        // "cooling" or "heating"
	FlowSource string `json:"flow_source"` // "traverse", "outlets" or "direct"
	TraverseID string `json:"traverse_id"` // flow_source traverse
	FlowBasis  string `json:"flow_basis"`  // "standard", "enter" or "leave" for a direct reading
	Remarks    string `json:"remarks"`
	recordMeta
}

// WaterTest is a coil or circuit's water-side test.
type WaterTest struct {
	ID            string  `json:"id"`
	JobID         string  `json:"job_id"`
	SystemID      string  `json:"system_id"`
	Tag           string  `json:"tag"`         // coil or circuit tag, e.g. "CHW coil AHU-1"
	Mode          string  `json:"mode"`        // "cooling" or "heating": what the coil or circuit does
	FlowSource    string  `json:"flow_source"` // "valve" (Cv and ΔP) or "meter"
	ValveCv       float64 `json:"valve_cv"`
	Fluid         string  `json:"fluid"`         // "water", "pg" or "eg"
	Concentration float64 `json:"concentration"` // % by volume, glycols
	DesignFlow    float64 `json:"design_flow"`   // gpm or L/s
	CapacityTest  string  `json:"capacity_test_id"`
	Remarks       string  `json:"remarks"`

	// ValveAccuracyPct is the valve maker's stated flow accuracy, ± % of flow
	// (0 to 50; 0 takes DefaultValveAccuracyPct, common practice).
	ValveAccuracyPct float64 `json:"valve_accuracy_pct,omitempty"`
	recordMeta
}

// recordMeta is what the store sets on every design record.
type recordMeta struct {
	Seq       int64     `json:"seq"`
	CreatedAt time.Time `json:"created_at"`
	UpdatedAt time.Time `json:"updated_at"`
	Deleted   bool      `json:"deleted,omitempty"`
}

// Reading is one value as a technician entered it. Readings are never changed:
// a correction is a new reading that names the one it supersedes, and a void is
// a reading with Void set and no value.
type Reading struct {
	ID           string    `json:"id"` // client-made UUID: the idempotency key
	JobID        string    `json:"job_id"`
	SubjectKind  string    `json:"subject_kind"` // outlet, traverse, capacity_test, water_test, system
	SubjectID    string    `json:"subject_id"`
	Quantity     string    `json:"quantity"` // see Quantities
	Point        int       `json:"point"`    // traverse point or motor leg, 1-based; 0 none
	Value        *float64  `json:"value"`
	Unit         string    `json:"unit"`
	Stage        string    `json:"stage"` // "as_found" or "final"
	InstrumentID string    `json:"instrument_id"`
	Technician   string    `json:"technician"`
	DeviceID     string    `json:"device_id"`
	TakenAt      time.Time `json:"taken_at"`
	ReceivedAt   time.Time `json:"received_at"`
	Supersedes   string    `json:"supersedes"`
	Void         bool      `json:"void"`
	Note         string    `json:"note"`      // the technician's remark (damper position, access)
	Confirmed    bool      `json:"confirmed"` // the technician confirmed a value far from design or its neighbours
	Seq          int64     `json:"seq"`
}

// Device is a paired phone or tablet.
type Device struct {
	ID        string     `json:"id"`
	Name      string     `json:"name"`
	Role      string     `json:"role"` // "lead" or "technician"
	CreatedAt time.Time  `json:"created_at"`
	LastSeen  *time.Time `json:"last_seen,omitempty"`
	RevokedAt *time.Time `json:"revoked_at,omitempty"`
}

// Roles.
const (
	RoleLead       = "lead"
	RoleTechnician = "technician"
)

var uuidPattern = regexp.MustCompile(`^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$`)

// validUUID accepts the canonical lower-case 8-4-4-4-12 form.
func validUUID(s string) bool { return uuidPattern.MatchString(s) }

// checkText requires a non-empty (when required) single-line text of at most max
// runes, with no control characters.
func checkText(field, s string, required bool, max int) error {
	if required && strings.TrimSpace(s) == "" {
		return Errorf(Invalid, field, "is required")
	}
	if !utf8.ValidString(s) {
		return Errorf(Invalid, field, "is not valid UTF-8 text")
	}
	if n := utf8.RuneCountInString(s); n > max {
		return Errorf(Invalid, field, "is %d characters long; at most %d are accepted", n, max)
	}
	for _, r := range s {
		if r < 0x20 || r == 0x7f {
			return Errorf(Invalid, field, "contains a control character")
		}
	}
	return nil
}

// checkOneOf requires s to be one of allowed.
func checkOneOf(field, s string, allowed []string) error {
	for _, a := range allowed {
		if s == a {
			return nil
		}
	}
	return Errorf(Invalid, field, "%q is not accepted; accepted values are %s", s, quotedList(allowed))
}

// quotedList is codes as values to type: "as_found", "final". A value that
// was not accepted is answered with what to send instead, literally.
func quotedList(codes []string) string {
	out := make([]string, len(codes))
	for i, c := range codes {
		out[i] = strconv.Quote(c)
	}
	return strings.Join(out, ", ")
}

// codeWords are the words a message uses for a code that does not read as
// one ("pg"); other codes read with their underscores as spaces.
var codeWords = map[string]string{
	"pg": "propylene glycol", "eg": "ethylene glycol", "ip": "IP", "si": "SI", "rect": "rectangular",
	"log-tchebycheff": "log-Tchebycheff", "hood": "flow hood", "ak": "velocity × Ak",
	"standard": "standard air", "enter": "entering air", "leave": "leaving air",
}

// words is a code as a message says it: "outdoor_air" → "outdoor air". A
// message names things in words, never by their JSON codes.
func words(code string) string {
	if w, ok := codeWords[code]; ok {
		return w
	}
	return strings.ReplaceAll(code, "_", " ")
}

func wordList(codes []string) string {
	out := make([]string, len(codes))
	for i, c := range codes {
		out[i] = words(c)
	}
	return strings.Join(out, ", ")
}

// orList is codes in words as a choice: "cooling or heating", "a, b or c".
func orList(codes []string) string {
	s := wordList(codes)
	if i := strings.LastIndex(s, ", "); i >= 0 {
		s = s[:i] + " or " + s[i+2:]
	}
	return s
}
