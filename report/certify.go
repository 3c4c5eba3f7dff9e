package report

import "strings"

// DefaultStatement is what the signer certifies when the sign-off gives no
// wording of its own: what was done and how, not that the design is right.
const DefaultStatement = "I certify that the readings in this report were taken as stated, on the dates and with the " +
	"instruments recorded, by me or under my direction, and that every figure in it was computed from those readings by " +
	"the methods given in the basis of the figures. The report records the conditions measured when the readings were " +
	"taken; it does not certify the design, and it defers to the project specification, local codes and the engineer of record."

// certification prints the signer's statement (the default when none is
// given) above the lines to sign on, and who signs under it.
func (d *doc) certification(s *Signoff) {
	stmt := DefaultStatement
	if s != nil && strings.TrimSpace(s.Statement) != "" {
		stmt = s.Statement
	}
	d.heading(1, "Certification")
	d.para(stmt, "", sizeBody)
	if s != nil {
		who := s.Name
		if s.Certification != "" {
			who += ", certification or license no. " + s.Certification
		}
		if s.Organisation != "" {
			who += ", " + s.Organisation
		}
		verb := "Signed by "
		if d.preliminary() {
			verb = "To be signed by "
		}
		d.para(verb+who+".", "I", sizeBody)
	}
}
