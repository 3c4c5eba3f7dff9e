package measure

import "math"

// TraverseMethodUncertaintyPct is the ± uncertainty, in percent of flow, that a
// pitot or anemometer traverse carries from the method itself (a finite number
// of points in a real, uneven profile), before any instrument error: ±5 %,
// common practice for a field traverse. It is also the pitot-velocity accuracy
// a trade certifying body requires of its members' instruments (published
// requirements, 2024, a secondary copy in the team's reference notes). ISO 3966
// claims about ±2 % only under its own straight-duct conditions (from memory),
// which field planes seldom meet.
const TraverseMethodUncertaintyPct = 5.0

// PitotVelocityUncertainty returns the ± velocity that a ± uVP uncertainty on a
// velocity-pressure reading vp gives at air density rho, carried through
// V = √(2·VP/ρ): half the span of V over [vp − uVP, vp + uVP], the lower end
// held at zero. Near zero VP this is larger than the first-order V/2·uVP/VP
// would suggest, which is why the span is used. vp may be negative (it
// counts as zero velocity); |vp| and uVP must be 0 to 5000 Pa and rho 0.5 to
// 1.5 kg/m³. Errors are *InputError naming "velocity_pressure",
// "velocity_pressure_uncertainty" or "density".
func PitotVelocityUncertainty(vp, uVP Pressure, rho Density) (Velocity, error) {
	if err := checkRange("velocity_pressure", vp.Pa(), -maxVelocityPressurePa, maxVelocityPressurePa, "Pa"); err != nil {
		return 0, err
	}
	if err := checkRange("velocity_pressure_uncertainty", uVP.Pa(), 0, maxVelocityPressurePa, "Pa"); err != nil {
		return 0, err
	}
	if err := checkDensity(rho); err != nil {
		return 0, err
	}
	p := vp.Pa()
	hi := pitotVelocity(p+uVP.Pa(), rho.KgM3())
	lo := pitotVelocity(math.Max(p-uVP.Pa(), 0), rho.KgM3())
	return (hi - lo) / 2, nil
}
