package measure

import (
	"fmt"
	"strings"
)

// UnitSystem selects inch-pound (IP) or SI units for inputs and results.
type UnitSystem uint8

// The two unit systems. The zero value is not a valid system, so a forgotten
// field is caught rather than read as IP.
const (
	IP UnitSystem = iota + 1
	SI
)

// ParseUnitSystem accepts "ip" or "si" in any case.
func ParseUnitSystem(s string) (UnitSystem, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "ip":
		return IP, nil
	case "si":
		return SI, nil
	}
	return 0, fmt.Errorf("units %q: accepted values are ip and si", s)
}

// String returns "ip" or "si".
func (u UnitSystem) String() string {
	switch u {
	case IP:
		return "ip"
	case SI:
		return "si"
	}
	return fmt.Sprintf("UnitSystem(%d)", uint8(u))
}

func (u UnitSystem) valid() error {
	if u != IP && u != SI {
		return &InputError{Input: "units", Value: float64(u), Min: float64(IP), Max: float64(SI),
			Reason: "unit system must be IP or SI"}
	}
	return nil
}

// Exact or conventional conversion factors to SI base units.
const (
	footM           = 0.3048                            // exact
	inchM           = 0.0254                            // exact
	poundKg         = 0.45359237                        // exact
	cubicFootM3     = footM * footM * footM             // 0.028316846592 m³
	usGallonM3      = 3.785411784e-3                    // exact
	psiPa           = 6894.757293168                    // lbf/in², with g = 9.80665 m/s²
	btuJ            = 1055.05585262                     // International Table Btu
	tonW            = 12000 * btuJ / 3600               // refrigeration ton, 12 000 Btu/h
	horsepowerW     = 745.69987158227                   // mechanical hp, 550 ft·lbf/s
	inHgPa          = 3386.389                          // inch of mercury at 32 °F
	btuPerLbFJPerKg = 4186.8                            // Btu/(lb·°F) in J/(kg·K), exact by the IT definitions
	rankinePerK     = 1.8                               // exact
	fahrenheitZeroR = 459.67                            // °R at 0 °F, exact
	celsiusZeroK    = 273.15                            // K at 0 °C, exact
	water60FDensity = 999.01                            // kg/m³, liquid water at 60 °F and 1 atm (IAPWS-IF97)
	standardGravity = 9.80665                           // m/s², exact
	waterColumnPaM  = water60FDensity * standardGravity // Pa per metre of 60 °F water: 9797.0
)

// Temperature is an absolute temperature, stored in kelvin.
type Temperature float64

// DegF returns a temperature given in °F.
func DegF(f float64) Temperature { return Temperature((f + fahrenheitZeroR) / rankinePerK) }

// DegC returns a temperature given in °C.
func DegC(c float64) Temperature { return Temperature(c + celsiusZeroK) }

// Kelvin returns a temperature given in K.
func Kelvin(k float64) Temperature { return Temperature(k) }

// Rankine returns a temperature given in °R.
func Rankine(r float64) Temperature { return Temperature(r / rankinePerK) }

// TemperatureIn returns a temperature given in °F (IP) or °C (SI).
func TemperatureIn(u UnitSystem, v float64) Temperature {
	if u == SI {
		return DegC(v)
	}
	return DegF(v)
}

// F returns the temperature in °F.
func (t Temperature) F() float64 { return float64(t)*rankinePerK - fahrenheitZeroR }

// C returns the temperature in °C.
func (t Temperature) C() float64 { return float64(t) - celsiusZeroK }

// K returns the temperature in kelvin.
func (t Temperature) K() float64 { return float64(t) }

// R returns the temperature in °R.
func (t Temperature) R() float64 { return float64(t) * rankinePerK }

// In returns the temperature in °F (IP) or °C (SI).
func (t Temperature) In(u UnitSystem) float64 {
	if u == SI {
		return t.C()
	}
	return t.F()
}

// TempDiff is a temperature difference or an accuracy band, stored in kelvin.
type TempDiff float64

// DeltaF returns a temperature difference given in °F (= °R).
func DeltaF(f float64) TempDiff { return TempDiff(f / rankinePerK) }

// DeltaC returns a temperature difference given in °C (= K).
func DeltaC(c float64) TempDiff { return TempDiff(c) }

// TempDiffIn returns a difference given in °F (IP) or °C (SI).
func TempDiffIn(u UnitSystem, v float64) TempDiff {
	if u == SI {
		return DeltaC(v)
	}
	return DeltaF(v)
}

// F returns the difference in °F.
func (d TempDiff) F() float64 { return float64(d) * rankinePerK }

// C returns the difference in °C.
func (d TempDiff) C() float64 { return float64(d) }

// In returns the difference in °F (IP) or °C (SI).
func (d TempDiff) In(u UnitSystem) float64 {
	if u == SI {
		return d.C()
	}
	return d.F()
}

// VolumeFlow is a volumetric flow rate of air or liquid, stored in m³/s.
type VolumeFlow float64

// CFM returns a flow given in ft³/min.
func CFM(v float64) VolumeFlow { return VolumeFlow(v * cubicFootM3 / 60) }

// LitersPerSecond returns a flow given in L/s.
func LitersPerSecond(v float64) VolumeFlow { return VolumeFlow(v / 1000) }

// CubicMetersPerHour returns a flow given in m³/h.
func CubicMetersPerHour(v float64) VolumeFlow { return VolumeFlow(v / 3600) }

// CubicMetersPerSecond returns a flow given in m³/s.
func CubicMetersPerSecond(v float64) VolumeFlow { return VolumeFlow(v) }

// GPM returns a flow given in US gallons per minute.
func GPM(v float64) VolumeFlow { return VolumeFlow(v * usGallonM3 / 60) }

// AirFlowIn returns an air flow given in cfm (IP) or L/s (SI).
func AirFlowIn(u UnitSystem, v float64) VolumeFlow {
	if u == SI {
		return LitersPerSecond(v)
	}
	return CFM(v)
}

// WaterFlowIn returns a liquid flow given in gpm (IP) or L/s (SI).
func WaterFlowIn(u UnitSystem, v float64) VolumeFlow {
	if u == SI {
		return LitersPerSecond(v)
	}
	return GPM(v)
}

// CFM returns the flow in ft³/min.
func (q VolumeFlow) CFM() float64 { return float64(q) * 60 / cubicFootM3 }

// Lps returns the flow in L/s.
func (q VolumeFlow) Lps() float64 { return float64(q) * 1000 }

// M3h returns the flow in m³/h.
func (q VolumeFlow) M3h() float64 { return float64(q) * 3600 }

// M3s returns the flow in m³/s.
func (q VolumeFlow) M3s() float64 { return float64(q) }

// GPM returns the flow in US gallons per minute.
func (q VolumeFlow) GPM() float64 { return float64(q) * 60 / usGallonM3 }

// AirIn returns an air flow in cfm (IP) or L/s (SI).
func (q VolumeFlow) AirIn(u UnitSystem) float64 {
	if u == SI {
		return q.Lps()
	}
	return q.CFM()
}

// WaterIn returns a liquid flow in gpm (IP) or L/s (SI).
func (q VolumeFlow) WaterIn(u UnitSystem) float64 {
	if u == SI {
		return q.Lps()
	}
	return q.GPM()
}

// Pressure is a pressure or pressure difference, stored in Pa. Water-column
// units refer to water at 60 °F (999.01 kg/m³) under standard gravity, so
// 1 in. w.g. = 248.84 Pa and 1 psi = 2.3090 ft of water.
type Pressure float64

// Pascals returns a pressure given in Pa.
func Pascals(v float64) Pressure { return Pressure(v) }

// Kilopascals returns a pressure given in kPa.
func Kilopascals(v float64) Pressure { return Pressure(v * 1000) }

// Psi returns a pressure given in lbf/in² (psia or psid as the context says).
func Psi(v float64) Pressure { return Pressure(v * psiPa) }

// InWG returns a pressure given in inches of water (60 °F).
func InWG(v float64) Pressure { return Pressure(v * waterColumnPaM * inchM) }

// FtWater returns a pressure given in feet of water (60 °F).
func FtWater(v float64) Pressure { return Pressure(v * waterColumnPaM * footM) }

// MWater returns a pressure given in metres of water (60 °F).
func MWater(v float64) Pressure { return Pressure(v * waterColumnPaM) }

// InHg returns a pressure given in inches of mercury (32 °F), as barometers read.
func InHg(v float64) Pressure { return Pressure(v * inHgPa) }

// Pa returns the pressure in Pa.
func (p Pressure) Pa() float64 { return float64(p) }

// KPa returns the pressure in kPa.
func (p Pressure) KPa() float64 { return float64(p) / 1000 }

// Psi returns the pressure in lbf/in².
func (p Pressure) Psi() float64 { return float64(p) / psiPa }

// InWG returns the pressure in inches of water (60 °F).
func (p Pressure) InWG() float64 { return float64(p) / (waterColumnPaM * inchM) }

// FtWater returns the pressure in feet of water (60 °F).
func (p Pressure) FtWater() float64 { return float64(p) / (waterColumnPaM * footM) }

// MWater returns the pressure in metres of water (60 °F).
func (p Pressure) MWater() float64 { return float64(p) / waterColumnPaM }

// InHg returns the pressure in inches of mercury (32 °F).
func (p Pressure) InHg() float64 { return float64(p) / inHgPa }

// BarometricIn returns a barometric pressure given in psia (IP) or kPa (SI),
// the units of the psychrometric equations.
func BarometricIn(u UnitSystem, v float64) Pressure {
	if u == SI {
		return Kilopascals(v)
	}
	return Psi(v)
}

// BarometricIn returns the pressure in psia (IP) or kPa (SI).
func (p Pressure) BarometricIn(u UnitSystem) float64 {
	if u == SI {
		return p.KPa()
	}
	return p.Psi()
}

// DuctPressureIn returns a duct (static or velocity) pressure given in in. w.g. (IP) or Pa (SI).
func DuctPressureIn(u UnitSystem, v float64) Pressure {
	if u == SI {
		return Pascals(v)
	}
	return InWG(v)
}

// DuctIn returns the pressure in in. w.g. (IP) or Pa (SI).
func (p Pressure) DuctIn(u UnitSystem) float64 {
	if u == SI {
		return p.Pa()
	}
	return p.InWG()
}

// Power is a heat rate or electrical power, stored in W.
type Power float64

// Watts returns a power given in W.
func Watts(v float64) Power { return Power(v) }

// Kilowatts returns a power given in kW.
func Kilowatts(v float64) Power { return Power(v * 1000) }

// BtuPerHour returns a heat rate given in Btu/h (International Table Btu).
func BtuPerHour(v float64) Power { return Power(v * btuJ / 3600) }

// Tons returns a heat rate given in tons of refrigeration (12 000 Btu/h).
func Tons(v float64) Power { return Power(v * tonW) }

// Horsepower returns a power given in mechanical horsepower.
func Horsepower(v float64) Power { return Power(v * horsepowerW) }

// W returns the power in W.
func (q Power) W() float64 { return float64(q) }

// KW returns the power in kW.
func (q Power) KW() float64 { return float64(q) / 1000 }

// BtuH returns the power in Btu/h.
func (q Power) BtuH() float64 { return float64(q) * 3600 / btuJ }

// Tons returns the power in tons of refrigeration.
func (q Power) Tons() float64 { return float64(q) / tonW }

// HP returns the power in mechanical horsepower.
func (q Power) HP() float64 { return float64(q) / horsepowerW }

// In returns the power in Btu/h (IP) or W (SI).
func (q Power) In(u UnitSystem) float64 {
	if u == SI {
		return q.W()
	}
	return q.BtuH()
}

// Length is a length or distance, stored in m.
type Length float64

// Meters returns a length given in m.
func Meters(v float64) Length { return Length(v) }

// Millimeters returns a length given in mm.
func Millimeters(v float64) Length { return Length(v / 1000) }

// Feet returns a length given in ft.
func Feet(v float64) Length { return Length(v * footM) }

// Inches returns a length given in in.
func Inches(v float64) Length { return Length(v * inchM) }

// M returns the length in m.
func (l Length) M() float64 { return float64(l) }

// Mm returns the length in mm.
func (l Length) Mm() float64 { return float64(l) * 1000 }

// Ft returns the length in ft.
func (l Length) Ft() float64 { return float64(l) / footM }

// Inch returns the length in inches.
func (l Length) Inch() float64 { return float64(l) / inchM }

// DuctSizeIn returns a duct or sheave dimension given in in (IP) or mm (SI).
func DuctSizeIn(u UnitSystem, v float64) Length {
	if u == SI {
		return Millimeters(v)
	}
	return Inches(v)
}

// DuctSizeIn returns the length in in (IP) or mm (SI).
func (l Length) DuctSizeIn(u UnitSystem) float64 {
	if u == SI {
		return l.Mm()
	}
	return l.Inch()
}

// ElevationIn returns an elevation given in ft (IP) or m (SI).
func ElevationIn(u UnitSystem, v float64) Length {
	if u == SI {
		return Meters(v)
	}
	return Feet(v)
}

// ElevationIn returns the length in ft (IP) or m (SI).
func (l Length) ElevationIn(u UnitSystem) float64 {
	if u == SI {
		return l.M()
	}
	return l.Ft()
}

// Area is an area, stored in m².
type Area float64

// SquareMeters returns an area given in m².
func SquareMeters(v float64) Area { return Area(v) }

// SquareFeet returns an area given in ft².
func SquareFeet(v float64) Area { return Area(v * footM * footM) }

// SquareInches returns an area given in in².
func SquareInches(v float64) Area { return Area(v * inchM * inchM) }

// AreaIn returns an area given in ft² (IP) or m² (SI).
func AreaIn(u UnitSystem, v float64) Area {
	if u == SI {
		return SquareMeters(v)
	}
	return SquareFeet(v)
}

// M2 returns the area in m².
func (a Area) M2() float64 { return float64(a) }

// Ft2 returns the area in ft².
func (a Area) Ft2() float64 { return float64(a) / (footM * footM) }

// In returns the area in ft² (IP) or m² (SI).
func (a Area) In(u UnitSystem) float64 {
	if u == SI {
		return a.M2()
	}
	return a.Ft2()
}

// Velocity is an air or water speed, stored in m/s.
type Velocity float64

// FPM returns a velocity given in ft/min.
func FPM(v float64) Velocity { return Velocity(v * footM / 60) }

// MetersPerSecond returns a velocity given in m/s.
func MetersPerSecond(v float64) Velocity { return Velocity(v) }

// VelocityIn returns a velocity given in fpm (IP) or m/s (SI).
func VelocityIn(u UnitSystem, v float64) Velocity {
	if u == SI {
		return MetersPerSecond(v)
	}
	return FPM(v)
}

// FPM returns the velocity in ft/min.
func (v Velocity) FPM() float64 { return float64(v) * 60 / footM }

// MPS returns the velocity in m/s.
func (v Velocity) MPS() float64 { return float64(v) }

// In returns the velocity in fpm (IP) or m/s (SI).
func (v Velocity) In(u UnitSystem) float64 {
	if u == SI {
		return v.MPS()
	}
	return v.FPM()
}

// Density is a mass density, stored in kg/m³.
type Density float64

// KgPerM3 returns a density given in kg/m³.
func KgPerM3(v float64) Density { return Density(v) }

// LbPerFt3 returns a density given in lb/ft³.
func LbPerFt3(v float64) Density { return Density(v * poundKg / cubicFootM3) }

// DensityIn returns a density given in lb/ft³ (IP) or kg/m³ (SI).
func DensityIn(u UnitSystem, v float64) Density {
	if u == SI {
		return KgPerM3(v)
	}
	return LbPerFt3(v)
}

// KgM3 returns the density in kg/m³.
func (d Density) KgM3() float64 { return float64(d) }

// LbFt3 returns the density in lb/ft³.
func (d Density) LbFt3() float64 { return float64(d) * cubicFootM3 / poundKg }

// In returns the density in lb/ft³ (IP) or kg/m³ (SI).
func (d Density) In(u UnitSystem) float64 {
	if u == SI {
		return d.KgM3()
	}
	return d.LbFt3()
}

// MassFlow is a mass flow rate, stored in kg/s.
type MassFlow float64

// KgPerSecond returns a mass flow given in kg/s.
func KgPerSecond(v float64) MassFlow { return MassFlow(v) }

// LbPerHour returns a mass flow given in lb/h.
func LbPerHour(v float64) MassFlow { return MassFlow(v * poundKg / 3600) }

// KgS returns the mass flow in kg/s.
func (m MassFlow) KgS() float64 { return float64(m) }

// LbH returns the mass flow in lb/h.
func (m MassFlow) LbH() float64 { return float64(m) * 3600 / poundKg }

// In returns the mass flow in lb/h (IP) or kg/s (SI).
func (m MassFlow) In(u UnitSystem) float64 {
	if u == SI {
		return m.KgS()
	}
	return m.LbH()
}

// SpecificHeat is a specific heat capacity, stored in J/(kg·K).
type SpecificHeat float64

// JPerKgK returns a specific heat given in J/(kg·K).
func JPerKgK(v float64) SpecificHeat { return SpecificHeat(v) }

// BtuPerLbF returns a specific heat given in Btu/(lb·°F).
func BtuPerLbF(v float64) SpecificHeat { return SpecificHeat(v * btuPerLbFJPerKg) }

// JKgK returns the specific heat in J/(kg·K).
func (c SpecificHeat) JKgK() float64 { return float64(c) }

// KJKgK returns the specific heat in kJ/(kg·K).
func (c SpecificHeat) KJKgK() float64 { return float64(c) / 1000 }

// BtuLbF returns the specific heat in Btu/(lb·°F).
func (c SpecificHeat) BtuLbF() float64 { return float64(c) / btuPerLbFJPerKg }

// In returns the specific heat in Btu/(lb·°F) (IP) or kJ/(kg·K) (SI).
func (c SpecificHeat) In(u UnitSystem) float64 {
	if u == SI {
		return c.KJKgK()
	}
	return c.BtuLbF()
}
