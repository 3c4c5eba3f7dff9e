// Package report lays out fieldtab's closeout report as a PDF: cover and
// summary, basis of the figures and safety cautions, findings, one section
// per system with its psychrometric charts, outlet tables, traverse sheets,
// water tests, instruments, revision history and the sign-off page.
//
// It computes no figure of its own: every number comes from
// schema.ComputeResults (which calls measure), and is only rounded and
// grouped for print; the chart's curves come from measure.PsychroChart at the
// results' site pressure. It is the only package that writes PDF (gofpdf,
// with the Go fonts embedded so that ΔT, °F, ±, ² and Greek or Cyrillic names
// print), and it imports only schema and measure of fieldtab's packages.
//
// Output is deterministic: the same Input, clock included, gives the same
// bytes.
package report
