package measure

// Sanity limits for outlet readings, wide enough for any real outlet or duct,
// tight enough that no product overflows. Errors report these in SI base units
// because the functions take typed quantities without a unit system.
const (
	outletMaxFlow     = 1000.0 // m³/s (about 2.1 million cfm)
	outletMinDesign   = 1e-9   // m³/s
	outletMinFactor   = 0.2    // flow hood correction factor, typical 0.5–2.0
	outletMaxFactor   = 5.0    //
	outletMaxVelocity = 100.0  // m/s (about 19 700 fpm)
	outletMaxArea     = 100.0  // m² (about 1076 ft²)
)

// OutletFlowHood returns an outlet's flow from a capture (flow) hood reading
// multiplied by a correction factor: the factor the hood's or the outlet's
// manufacturer gives for that outlet, or one the technician derived by
// traversing the outlet's branch duct. A caller with no factor passes 1: zero is
// an error, not a default, so a forgotten factor is never read as 1.
//
// Errors: *InputError for "reading" (0 to 1000 m³/s) and "factor" (0.2 to 5;
// typically 0.5–2.0).
func OutletFlowHood(reading VolumeFlow, factor float64) (VolumeFlow, error) {
	if err := checkRange("reading", float64(reading), 0, outletMaxFlow, "m³/s"); err != nil {
		return 0, err
	}
	if err := checkRange("factor", factor, outletMinFactor, outletMaxFactor, ""); err != nil {
		return 0, err
	}
	return VolumeFlow(float64(reading) * factor), nil
}

// OutletFlowAk returns an outlet's flow as mean velocity × Ak, the effective area
// factor the outlet's manufacturer publishes for velocities measured at the
// points and with the instrument the manufacturer specifies (Q = V·Ak, e.g.
// 500 fpm × 0.5 ft² = 250 cfm).
//
// Errors: *InputError for "velocity" (0 to 100 m/s) and "ak" (above 0, at most
// 100 m²).
func OutletFlowAk(v Velocity, ak Area) (VolumeFlow, error) {
	if err := checkRange("velocity", float64(v), 0, outletMaxVelocity, "m/s"); err != nil {
		return 0, err
	}
	if err := checkPositive("ak", float64(ak), "m²"); err != nil {
		return 0, err
	}
	if err := checkRange("ak", float64(ak), 0, outletMaxArea, "m²"); err != nil {
		return 0, err
	}
	return VolumeFlow(float64(v) * float64(ak)), nil
}

// PercentOfDesign returns measured ÷ design × 100, in percent, for air or
// liquid flows.
//
// Errors: *InputError for "measured" (0 to 1000 m³/s) and "design" (above 0;
// 1e-9 to 1000 m³/s).
func PercentOfDesign(measured, design VolumeFlow) (float64, error) {
	if err := checkRange("measured", float64(measured), 0, outletMaxFlow, "m³/s"); err != nil {
		return 0, err
	}
	if err := checkPositive("design", float64(design), "m³/s"); err != nil {
		return 0, err
	}
	if err := checkRange("design", float64(design), outletMinDesign, outletMaxFlow, "m³/s"); err != nil {
		return 0, err
	}
	return float64(measured) / float64(design) * 100, nil
}
