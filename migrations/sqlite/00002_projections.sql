-- +goose Up
-- Workload projections, one per census revision that was saved with one.
-- The census counts are not copied: census_counts of census_id are
-- immutable. input_json and result_json hold the model's full input and
-- result so that a projection can be recomputed exactly; seed is the
-- unsigned 64-bit bootstrap seed as decimal text (INTEGER is signed).
-- floor_nurses is NULL when no ratio floor was configured.

CREATE TABLE projections (
	id                   INTEGER PRIMARY KEY,
	ward_id              INTEGER NOT NULL REFERENCES wards (id),
	census_id            INTEGER NOT NULL UNIQUE,
	census_revision      INTEGER NOT NULL CHECK (census_revision >= 1),
	date                 TEXT NOT NULL,
	shift_id             INTEGER NOT NULL,
	shift_name           TEXT NOT NULL,
	start_at             TEXT NOT NULL,
	end_at               TEXT NOT NULL,
	shift_hours          REAL NOT NULL CHECK (shift_hours > 0),
	total_patients       INTEGER NOT NULL CHECK (total_patients >= 0),
	cover_level          REAL NOT NULL CHECK (cover_level > 0 AND cover_level < 1),
	expected_nurse_hours REAL NOT NULL,
	cover_nurse_hours    REAL NOT NULL,
	band_low_nurse_hours  REAL NOT NULL,
	band_high_nurse_hours REAL NOT NULL,
	nurses_cover         INTEGER NOT NULL CHECK (nurses_cover >= 0),
	floor_nurses         INTEGER CHECK (floor_nurses >= 0),
	recommended          INTEGER NOT NULL CHECK (recommended >= 0),
	decided_by           TEXT NOT NULL,
	method_version       TEXT NOT NULL,
	seed                 TEXT NOT NULL,
	draws                INTEGER NOT NULL CHECK (draws >= 1),
	input_json           TEXT NOT NULL,
	result_json          TEXT NOT NULL,
	created_by           INTEGER NOT NULL DEFAULT 0,
	created_at           TEXT NOT NULL,
	UNIQUE (ward_id, date, shift_id, census_revision),
	FOREIGN KEY (ward_id, census_id) REFERENCES census (ward_id, id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);
CREATE INDEX projections_ward_date_idx ON projections (ward_id, date);

-- +goose Down
DROP TABLE projections;
