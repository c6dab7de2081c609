package sqlite_test

import (
	"testing"
	"time"

	"wardload/internal/storetest"
)

// BenchmarkCreateObservations imports batches of 10,000 invented rows
// (with a factor each) into a database file and reports rows/s;
// bench/import.sh times the whole command against the sqlite3 shell.
func BenchmarkCreateObservations(b *testing.B) {
	storetest.BenchImport(b, MustOpen(b, time.Now), 10_000)
}
