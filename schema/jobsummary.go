package schema

import (
	"context"
	"database/sql"
)

// JobCounts are how many live design records a job holds, and its current
// readings (as CurrentReadings counts them: no voids, nothing superseded).
type JobCounts struct {
	Systems       int `json:"systems"`
	Outlets       int `json:"outlets"`
	Traverses     int `json:"traverses"`
	CapacityTests int `json:"capacity_tests"`
	WaterTests    int `json:"water_tests"`
	Readings      int `json:"readings"`
}

// JobSummary is a job with its counts, for a listing.
type JobSummary struct {
	Job    Job       `json:"job"`
	Counts JobCounts `json:"counts"`
}

// jobCountsQuery counts one job's records; the NOT IN subquery runs once per
// job, not once per reading.
const jobCountsQuery = `SELECT
	(SELECT COUNT(*) FROM systems WHERE job_id = ?1 AND deleted = 0),
	(SELECT COUNT(*) FROM outlets WHERE job_id = ?1 AND deleted = 0),
	(SELECT COUNT(*) FROM traverses WHERE job_id = ?1 AND deleted = 0),
	(SELECT COUNT(*) FROM capacity_tests WHERE job_id = ?1 AND deleted = 0),
	(SELECT COUNT(*) FROM water_tests WHERE job_id = ?1 AND deleted = 0),
	(SELECT COUNT(*) FROM readings WHERE job_id = ?1 AND void = 0 AND id NOT IN
		(SELECT supersedes FROM readings WHERE job_id = ?1 AND supersedes IS NOT NULL))`

// JobSummaries returns every job with its counts, the most recently created
// first (as Jobs), read in one transaction.
func (db *DB) JobSummaries(ctx context.Context) ([]JobSummary, error) {
	out := []JobSummary{}
	err := db.readTx(ctx, func(tx *sql.Tx) error {
		jobs, err := listJobs(ctx, tx)
		if err != nil {
			return err
		}
		for _, j := range jobs {
			out = append(out, JobSummary{Job: j})
		}
		for i := range out {
			c := &out[i].Counts
			if err := tx.QueryRowContext(ctx, jobCountsQuery, out[i].Job.ID).Scan(
				&c.Systems, &c.Outlets, &c.Traverses, &c.CapacityTests, &c.WaterTests, &c.Readings); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return nil, wrapStore("job summaries", err)
	}
	return out, nil
}
