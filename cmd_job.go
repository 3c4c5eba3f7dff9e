package main

import (
	"context"
	"errors"
	"fmt"
	"strconv"
	"strings"
	"text/tabwriter"

	"fieldtab/schema"
)

const jobUsage = `usage:
  fieldtab job new --name NAME --units ip|si [--elevation FT_OR_M | --barometric PSIA_OR_KPA] [--site ADDRESS] [--client C] [--engineer E] [--contractor C] [--firm F] [--project-number N] [--db PATH]
  fieldtab job list [--db PATH]
job new prints the new job's ID on stdout (JOB=$(fieldtab job new ...)); job list
shows every job's ID, name, units, status and how much it holds.
`

// runJob handles `fieldtab job new|list`.
func (m *Main) runJob(ctx context.Context, args []string) error {
	if wantsHelp(args) {
		fmt.Fprint(m.Stdout, jobUsage)
		return errHelp
	}
	if len(args) == 0 {
		fmt.Fprint(m.Stderr, jobUsage)
		return errUsage
	}
	switch args[0] {
	case "new":
		return m.jobNew(ctx, args[1:])
	case "list":
		return m.jobList(ctx, args[1:])
	}
	fmt.Fprintf(m.Stderr, "fieldtab job: unknown subcommand %q\n%s", args[0], jobUsage)
	return errUsage
}

// jobFlags maps a job's field names in schema's errors to the flags that set
// them, so an error names what the user typed.
var jobFlags = map[string]string{
	"name": "--name", "units": "--units", "elevation": "--elevation", "barometric": "--barometric",
	"site_address": "--site", "client": "--client", "engineer": "--engineer",
	"contractor": "--contractor", "tab_firm": "--firm", "project_number": "--project-number",
}

func (m *Main) jobNew(ctx context.Context, args []string) error {
	fs := newFlagSet("job new", m.Stderr)
	dbPath := fs.String("db", "", "SQLite store (default: the one serve uses, fieldtab/fieldtab.db in the user's data directory)")
	var j schema.Job
	fs.StringVar(&j.Name, "name", "", "the job's name, e.g. \"Harbour Library HVAC renovation\" (required)")
	fs.StringVar(&j.Units, "units", "", "unit system of every figure in the job: ip (cfm, °F, in. w.g.) or si (L/s, °C, Pa) (required)")
	elevation := fs.String("elevation", "", "site elevation above sea level, ft (ip) or m (si), for the air's density (default: sea level)")
	barometric := fs.String("barometric", "", "measured barometric pressure, psia (ip) or kPa (si), instead of --elevation")
	fs.StringVar(&j.SiteAddress, "site", "", "site address")
	fs.StringVar(&j.Client, "client", "", "client or owner")
	fs.StringVar(&j.Engineer, "engineer", "", "engineer of record")
	fs.StringVar(&j.Contractor, "contractor", "", "mechanical contractor")
	fs.StringVar(&j.TABFirm, "firm", "", "the test-and-balance firm doing the work")
	fs.StringVar(&j.ProjectNumber, "project-number", "", "the client's or engineer's project number, printed on every page of the report")
	if err := m.parseFlags(fs, "job new --name NAME --units ip|si [--elevation FT_OR_M | --barometric PSIA_OR_KPA] [flags]",
		"Start a job in the store and print its ID on stdout. Tolerances start at common-practice defaults; change them in the app where the project specification says otherwise.", args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(m.Stderr, "fieldtab job new: unexpected argument %q\n", fs.Arg(0))
		return errUsage
	}
	if *elevation != "" && *barometric != "" {
		return errors.New("--elevation and --barometric: give one, not both (a measured barometric pressure is the better of the two)")
	}
	var err error
	if j.Elevation, err = optionalNumber("--elevation", *elevation); err != nil {
		return err
	}
	if j.Barometric, err = optionalNumber("--barometric", *barometric); err != nil {
		return err
	}
	j.Units = strings.ToLower(strings.TrimSpace(j.Units))
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	if err := db.CreateJob(ctx, schema.Actor{Name: "command line", Role: schema.RoleLead}, &j); err != nil {
		return jobFlagErr(err)
	}
	fmt.Fprintln(m.Stdout, j.ID)
	p, source, _ := schema.SitePressure(j)
	unit := map[string]string{"ip": "psia", "si": "kPa"}[j.Units]
	from := strings.ReplaceAll(source, "_", " ")
	if j.Elevation != nil {
		from = fmt.Sprintf("the elevation %s %s", strconv.FormatFloat(*j.Elevation, 'f', -1, 64), map[string]string{"ip": "ft", "si": "m"}[j.Units])
	}
	fmt.Fprintf(m.Stderr, "job %s (%s, %s units, air at %.2f %s from %s) started in %s\n",
		j.ID, j.Name, strings.ToUpper(j.Units), p, unit, from, db.Path)
	return nil
}

// optionalNumber parses a flag's number, or nil when the flag was not given.
func optionalNumber(flagName, s string) (*float64, error) {
	if s == "" {
		return nil, nil
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		return nil, fmt.Errorf("%s: %q is not a number", flagName, s)
	}
	return &v, nil
}

// jobFlagErr restates schema's error on a job field with the flag's name.
func jobFlagErr(err error) error {
	var se *schema.Error
	if !errors.As(err, &se) {
		return err
	}
	f, ok := jobFlags[se.Field]
	if !ok {
		return errors.New(se.Message)
	}
	if strings.HasPrefix(se.Message, "is ") {
		return fmt.Errorf("%s %s", f, se.Message)
	}
	return fmt.Errorf("%s: %s", f, se.Message)
}

func (m *Main) jobList(ctx context.Context, args []string) error {
	fs := newFlagSet("job list", m.Stderr)
	dbPath := fs.String("db", "", "SQLite store (default: the one serve uses, fieldtab/fieldtab.db in the user's data directory)")
	if err := m.parseFlags(fs, "job list [--db PATH]",
		"List the store's jobs, newest first: ID, name, units, status and how many systems, outlets, traverses, capacity tests, water tests and current readings each holds.", args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(m.Stderr, "fieldtab job list: unexpected argument %q\n", fs.Arg(0))
		return errUsage
	}
	db, err := openDB(ctx, *dbPath)
	if err != nil {
		return err
	}
	defer db.Close()
	sums, err := db.JobSummaries(ctx)
	if err != nil {
		return err
	}
	if len(sums) == 0 {
		fmt.Fprintf(m.Stderr, "no jobs in %s; start one with: fieldtab job new --name NAME --units ip|si\n", db.Path)
		return nil
	}
	tw := tabwriter.NewWriter(m.Stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "ID\tNAME\tUNITS\tSTATUS\tSYSTEMS\tOUTLETS\tTRAVERSES\tCAPACITY TESTS\tWATER TESTS\tREADINGS")
	for _, s := range sums {
		c := s.Counts
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%d\t%d\t%d\t%d\t%d\t%d\n", s.Job.ID, s.Job.Name, strings.ToUpper(s.Job.Units), s.Job.Status,
			c.Systems, c.Outlets, c.Traverses, c.CapacityTests, c.WaterTests, c.Readings)
	}
	return tw.Flush()
}
