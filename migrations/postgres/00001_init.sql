-- +goose Up
-- Initial schema for PostgreSQL, mirroring migrations/sqlite table for table
-- and column for column. Civil dates are DATE, instants TIMESTAMPTZ
-- (microseconds), durations DOUBLE PRECISION. No table holds a patient
-- identifier: observations and census carry only tier, date, shift and
-- numbers. User IDs in entered_by/created_by/updated_by/excluded_by have no
-- foreign key because 0 means the command line. Unique constraints are
-- named explicitly: internal/postgres maps the names to form fields.

CREATE TABLE wards (
	id         BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	code       TEXT NOT NULL CONSTRAINT wards_code_key UNIQUE,
	name       TEXT NOT NULL,
	time_zone  TEXT NOT NULL,
	created_at TIMESTAMPTZ NOT NULL
);

CREATE TABLE ward_factors (
	ward_id  BIGINT NOT NULL REFERENCES wards (id),
	name     TEXT NOT NULL,
	position INTEGER NOT NULL,
	PRIMARY KEY (ward_id, name)
);

CREATE TABLE tiers (
	id            BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id       BIGINT NOT NULL REFERENCES wards (id),
	code          TEXT NOT NULL,
	label         TEXT NOT NULL,
	description   TEXT NOT NULL DEFAULT '',
	display_order INTEGER NOT NULL DEFAULT 0,
	CONSTRAINT tiers_ward_id_code_key UNIQUE (ward_id, code),
	-- target of composite foreign keys: a row naming a tier must name its ward.
	CONSTRAINT tiers_ward_id_id_key UNIQUE (ward_id, id)
);

CREATE TABLE shift_patterns (
	id            BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id       BIGINT NOT NULL REFERENCES wards (id),
	name          TEXT NOT NULL,
	start_minute  INTEGER NOT NULL CHECK (start_minute >= 0 AND start_minute < 1440),
	nominal_hours DOUBLE PRECISION NOT NULL CHECK (nominal_hours > 0 AND nominal_hours <= 24),
	CONSTRAINT shift_patterns_ward_id_name_key UNIQUE (ward_id, name),
	CONSTRAINT shift_patterns_ward_id_id_key UNIQUE (ward_id, id)
);

CREATE TABLE observations (
	id              BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id         BIGINT NOT NULL REFERENCES wards (id),
	tier_id         BIGINT NOT NULL,
	date            DATE NOT NULL,
	shift_id        BIGINT NOT NULL,
	window_hours    DOUBLE PRECISION NOT NULL CHECK (window_hours > 0 AND window_hours <= 24),
	care_minutes    DOUBLE PRECISION NOT NULL CHECK (care_minutes >= 0),
	entered_by      BIGINT NOT NULL DEFAULT 0,
	entered_at      TIMESTAMPTZ NOT NULL,
	batch_id        TEXT NOT NULL,
	excluded        BOOLEAN NOT NULL DEFAULT FALSE,
	excluded_reason TEXT NOT NULL DEFAULT '',
	excluded_by     BIGINT NOT NULL DEFAULT 0,
	excluded_at     TIMESTAMPTZ,
	FOREIGN KEY (ward_id, tier_id) REFERENCES tiers (ward_id, id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);
CREATE INDEX observations_ward_date_idx ON observations (ward_id, date);
CREATE INDEX observations_batch_idx ON observations (batch_id);

CREATE TABLE observation_factors (
	observation_id BIGINT NOT NULL REFERENCES observations (id),
	name           TEXT NOT NULL,
	value          DOUBLE PRECISION NOT NULL,
	PRIMARY KEY (observation_id, name)
);

CREATE TABLE census (
	id         BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id    BIGINT NOT NULL REFERENCES wards (id),
	date       DATE NOT NULL,
	shift_id   BIGINT NOT NULL,
	revision   INTEGER NOT NULL CHECK (revision >= 1),
	entered_by BIGINT NOT NULL DEFAULT 0,
	entered_at TIMESTAMPTZ NOT NULL,
	CONSTRAINT census_ward_id_date_shift_id_revision_key UNIQUE (ward_id, date, shift_id, revision),
	CONSTRAINT census_ward_id_id_key UNIQUE (ward_id, id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);

CREATE TABLE census_counts (
	census_id BIGINT NOT NULL REFERENCES census (id),
	tier_id   BIGINT NOT NULL REFERENCES tiers (id),
	patients  INTEGER NOT NULL CHECK (patients >= 0),
	PRIMARY KEY (census_id, tier_id)
);

CREATE TABLE ward_settings (
	ward_id              BIGINT PRIMARY KEY REFERENCES wards (id),
	direct_care_fraction DOUBLE PRECISION NOT NULL,
	cover_level          DOUBLE PRECISION NOT NULL,
	lookback_weeks       INTEGER NOT NULL,
	quartiles            TEXT NOT NULL,
	beds                 INTEGER NOT NULL DEFAULT 0,
	updated_by           BIGINT NOT NULL DEFAULT 0,
	updated_at           TIMESTAMPTZ NOT NULL
);

-- id plays the part of SQLite's rowid: floors read back in the order saved.
CREATE TABLE ratio_floors (
	id                  BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id             BIGINT NOT NULL REFERENCES wards (id),
	shift_id            BIGINT NOT NULL,
	tier_id             BIGINT, -- NULL: all patients of the ward
	patients_per_nurse  DOUBLE PRECISION NOT NULL CHECK (patients_per_nurse > 0),
	charge_nurse_counts BOOLEAN NOT NULL DEFAULT FALSE,
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id),
	FOREIGN KEY (ward_id, tier_id) REFERENCES tiers (ward_id, id)
);
CREATE UNIQUE INDEX ratio_floors_key_idx ON ratio_floors (ward_id, shift_id, COALESCE(tier_id, 0));

CREATE TABLE users (
	id            BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	name          TEXT NOT NULL CONSTRAINT users_name_key UNIQUE,
	role          TEXT NOT NULL CHECK (role IN ('charge_nurse', 'manager', 'admin')),
	password_hash TEXT NOT NULL,
	disabled      BOOLEAN NOT NULL DEFAULT FALSE,
	created_at    TIMESTAMPTZ NOT NULL
);

CREATE TABLE user_wards (
	user_id BIGINT NOT NULL REFERENCES users (id),
	ward_id BIGINT NOT NULL REFERENCES wards (id),
	PRIMARY KEY (user_id, ward_id)
);

CREATE TABLE api_tokens (
	id           BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	name         TEXT NOT NULL CONSTRAINT api_tokens_name_key UNIQUE,
	hash         TEXT NOT NULL CONSTRAINT api_tokens_hash_key UNIQUE,
	created_by   BIGINT NOT NULL DEFAULT 0,
	created_at   TIMESTAMPTZ NOT NULL,
	last_used_at TIMESTAMPTZ,
	revoked_at   TIMESTAMPTZ
);

CREATE TABLE token_wards (
	token_id BIGINT NOT NULL REFERENCES api_tokens (id),
	ward_id  BIGINT NOT NULL REFERENCES wards (id),
	PRIMARY KEY (token_id, ward_id)
);

-- Append-only. The JSON columns are TEXT, not JSONB, so that an entry reads
-- back byte for byte as written (JSONB would reorder keys).
CREATE TABLE audit_log (
	id          BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	at          TIMESTAMPTZ NOT NULL,
	user_id     BIGINT NOT NULL DEFAULT 0,
	actor       TEXT NOT NULL,
	action      TEXT NOT NULL,
	entity      TEXT NOT NULL,
	entity_id   BIGINT NOT NULL DEFAULT 0,
	ward_id     BIGINT NOT NULL DEFAULT 0,
	before_json TEXT NOT NULL DEFAULT '',
	after_json  TEXT NOT NULL DEFAULT ''
);
CREATE INDEX audit_log_at_idx ON audit_log (at);

-- Sessions for github.com/alexedwards/scs/pgxstore, exactly as its README.
CREATE TABLE sessions (
	token  TEXT PRIMARY KEY,
	data   BYTEA NOT NULL,
	expiry TIMESTAMPTZ NOT NULL
);
CREATE INDEX sessions_expiry_idx ON sessions (expiry);

-- +goose Down
DROP TABLE sessions;
DROP TABLE audit_log;
DROP TABLE token_wards;
DROP TABLE api_tokens;
DROP TABLE user_wards;
DROP TABLE users;
DROP TABLE ratio_floors;
DROP TABLE ward_settings;
DROP TABLE census_counts;
DROP TABLE census;
DROP TABLE observation_factors;
DROP TABLE observations;
DROP TABLE shift_patterns;
DROP TABLE tiers;
DROP TABLE ward_factors;
DROP TABLE wards;
