package schema

import (
	"strconv"
	"strings"

	"fieldtab/measure"
)

// FormatNumber formats v with d decimals as findings, notes and the report
// print figures: thousands grouped with commas in IP ("1,240"), with no-break
// spaces in SI from 10 000 ("12 400"; SI style leaves four digits whole), and
// a true minus sign. Negative zero prints as 0.
func FormatNumber(v float64, d int, si bool) string {
	s := strconv.FormatFloat(v, 'f', d, 64)
	neg := strings.HasPrefix(s, "-")
	if neg {
		s = s[1:]
		if strings.Trim(s, "0.") == "" {
			neg = false
		}
	}
	whole, frac, _ := strings.Cut(s, ".")
	sep, from := ",", 4
	if si {
		sep, from = "\u00a0", 5
	}
	if len(whole) >= from {
		var b strings.Builder
		for i, ch := range whole {
			if i > 0 && (len(whole)-i)%3 == 0 {
				b.WriteString(sep)
			}
			b.WriteRune(ch)
		}
		whole = b.String()
	}
	if frac != "" {
		whole += "." + frac
	}
	if neg {
		// A true minus sign: a hyphen reads as a dash in a table.
		whole = "\u2212" + whole
	}
	return whole
}

// num formats v with d decimals in the job's style.
func (c *resultsCalc) num(v float64, d int) string { return FormatNumber(v, d, c.u == measure.SI) }

// numU is num with its unit after a space: "1,240 cfm".
func (c *resultsCalc) numU(v float64, d int, unit string) string { return c.num(v, d) + " " + unit }

// sideText says where an undetermined value lies, in words.
func sideText(side measure.Status) string {
	switch side {
	case measure.StatusLow:
		return "low, within the instrument's accuracy of the limit"
	case measure.StatusHigh:
		return "high, within the instrument's accuracy of the limit"
	case measure.StatusWithin:
		return "inside the band, within the instrument's accuracy of a limit"
	}
	return ""
}

// capWords is a capacity (Btu/h or W) with the trade's larger units in
// brackets: MBH, and tons of refrigeration (12,000 Btu/h) for cooling only,
// in IP; kW in SI. "84,263 Btu/h (84.3 MBH, 7.02 tons)".
func (c *resultsCalc) capWords(v float64, mode string) string {
	if c.u == measure.SI {
		return c.numU(v, 0, c.units.Power) + " (" + c.numU(v/1000, 1, "kW") + ")"
	}
	alt := c.numU(v/1000, 1, "MBH")
	if mode == "cooling" {
		alt += ", " + c.numU(measure.BtuPerHour(v).Tons(), 2, "tons")
	}
	return c.numU(v, 0, c.units.Power) + " (" + alt + ")"
}
