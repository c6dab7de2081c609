-- +goose Up
-- Workload projections, one per census revision that was saved with one
-- (PostgreSQL; mirrors migrations/sqlite/00002_projections.sql).
-- The census counts are not copied: census_counts of census_id are
-- immutable. input_json and result_json hold the model's full input and
-- result so that a projection can be recomputed exactly; seed is the
-- unsigned 64-bit bootstrap seed as decimal text (BIGINT is signed).
-- floor_nurses is NULL when no ratio floor was configured.

CREATE TABLE projections (
	id                   BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id              BIGINT NOT NULL REFERENCES wards (id),
	census_id            BIGINT NOT NULL CONSTRAINT projections_census_id_key UNIQUE,
	census_revision      INTEGER NOT NULL CHECK (census_revision >= 1),
	date                 DATE NOT NULL,
	shift_id             BIGINT NOT NULL,
	shift_name           TEXT NOT NULL,
	start_at             TIMESTAMPTZ NOT NULL,
	end_at               TIMESTAMPTZ NOT NULL,
	shift_hours          DOUBLE PRECISION NOT NULL CHECK (shift_hours > 0),
	total_patients       INTEGER NOT NULL CHECK (total_patients >= 0),
	cover_level          DOUBLE PRECISION NOT NULL CHECK (cover_level > 0 AND cover_level < 1),
	expected_nurse_hours DOUBLE PRECISION NOT NULL,
	cover_nurse_hours    DOUBLE PRECISION NOT NULL,
	band_low_nurse_hours  DOUBLE PRECISION NOT NULL,
	band_high_nurse_hours DOUBLE PRECISION NOT NULL,
	nurses_cover         INTEGER NOT NULL CHECK (nurses_cover >= 0),
	floor_nurses         INTEGER CHECK (floor_nurses >= 0),
	recommended          INTEGER NOT NULL CHECK (recommended >= 0),
	decided_by           TEXT NOT NULL,
	method_version       TEXT NOT NULL,
	seed                 TEXT NOT NULL,
	draws                INTEGER NOT NULL CHECK (draws >= 1),
	input_json           TEXT NOT NULL,
	result_json          TEXT NOT NULL,
	created_by           BIGINT NOT NULL DEFAULT 0,
	created_at           TIMESTAMPTZ NOT NULL,
	CONSTRAINT projections_ward_id_date_shift_id_census_revision_key UNIQUE (ward_id, date, shift_id, census_revision),
	FOREIGN KEY (ward_id, census_id) REFERENCES census (ward_id, id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);
CREATE INDEX projections_ward_date_idx ON projections (ward_id, date);

-- +goose Down
DROP TABLE projections;
