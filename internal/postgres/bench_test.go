package postgres_test

import (
	"os"
	"testing"
	"time"

	"wardload/internal/storetest"
)

// BenchmarkCreateObservations imports batches of 10,000 invented rows
// (with a factor each) and reports rows/s; bench/import.sh times the
// whole command against psql's \copy.
func BenchmarkCreateObservations(b *testing.B) {
	url := os.Getenv("WARDLOAD_TEST_DATABASE_URL")
	if url == "" {
		b.Skip("set WARDLOAD_TEST_DATABASE_URL to run PostgreSQL benchmarks")
	}
	s, _ := MustOpenStore(b, url, time.Now)
	storetest.BenchImport(b, s, 10_000)
}
