package schema

import (
	"fmt"
	"strings"
)

// FlagNoInstrument is the Flag kind for readings taken with no instrument on
// record: their figures carry no ± (not ± 0).
const FlagNoInstrument = "no_instrument"

// FindingNoInstrument lists a subject's readings taken with no instrument.
const FindingNoInstrument = "no_instrument"

// noInstrumentNeeded are dimensions read without a calibrated instrument
// (a sheave's diameter with a rule, a power factor from the nameplate).
var noInstrumentNeeded = map[Dimension]bool{DimLength: true, DimRatio: true}

// checkNoInstrument flags rd on its subject when it names no instrument.
func (c *resultsCalc) checkNoInstrument(k resKey, rd *Reading) {
	if rd.InstrumentID != "" {
		return
	}
	q, ok := LookupQuantity(rd.SubjectKind, rd.Quantity)
	if ok && noInstrumentNeeded[q.Dimension] {
		return
	}
	// The quantity in words, as the technician knows it, never its code.
	what := strings.ReplaceAll(rd.Quantity, "_", " ")
	if ok && q.Description != "" {
		what = q.Description
	}
	fl := c.flags[k]
	for i := range fl {
		if fl[i].Kind == FlagNoInstrument {
			fl[i].ReadingIDs = append(fl[i].ReadingIDs, rd.ID)
			if !strings.Contains("; "+strings.TrimPrefix(fl[i].Text, noInstrumentPrefix)+"; ", "; "+what+"; ") {
				fl[i].Text += "; " + what
			}
			return
		}
	}
	c.flags[k] = append(fl, Flag{Kind: FlagNoInstrument, ReadingIDs: []string{rd.ID}, Text: noInstrumentPrefix + what})
}

// noInstrumentPrefix starts a no-instrument flag's text while its readings
// are counted; noInstrumentText rewrites it once they all are.
const noInstrumentPrefix = "taken with no instrument on record, so shown with no ±: "

// noInstrumentText finishes a no-instrument flag's text once all readings
// are counted.
func noInstrumentText(f *Flag) {
	qs := strings.TrimPrefix(f.Text, noInstrumentPrefix)
	n := len(f.ReadingIDs)
	what := "1 reading"
	if n > 1 {
		what = fmt.Sprintf("%d readings", n)
	}
	f.Text = fmt.Sprintf("%s (%s) taken with no instrument on record: shown with no ±, and not traceable to a calibration.", what, qs)
}
