-- +goose Up
-- Initial schema for SQLite. internal/postgres mirrors these table and
-- column names. Times are TEXT in UTC, fixed-width
-- "YYYY-MM-DDTHH:MM:SS.nnnnnnnnnZ" so they sort as text and round-trip to
-- the nanosecond; dates are TEXT "YYYY-MM-DD". No table holds a patient
-- identifier: observations and census carry only tier, date, shift and
-- numbers. User IDs in entered_by/created_by/updated_by/excluded_by have no
-- foreign key because 0 means the command line.

CREATE TABLE wards (
	id         INTEGER PRIMARY KEY,
	code       TEXT NOT NULL UNIQUE,
	name       TEXT NOT NULL,
	time_zone  TEXT NOT NULL,
	created_at TEXT NOT NULL
);

CREATE TABLE ward_factors (
	ward_id  INTEGER NOT NULL REFERENCES wards (id),
	name     TEXT NOT NULL,
	position INTEGER NOT NULL,
	PRIMARY KEY (ward_id, name)
);

CREATE TABLE tiers (
	id            INTEGER PRIMARY KEY,
	ward_id       INTEGER NOT NULL REFERENCES wards (id),
	code          TEXT NOT NULL,
	label         TEXT NOT NULL,
	description   TEXT NOT NULL DEFAULT '',
	display_order INTEGER NOT NULL DEFAULT 0,
	UNIQUE (ward_id, code),
	-- target of composite foreign keys: a row naming a tier must name its ward.
	UNIQUE (ward_id, id)
);

CREATE TABLE shift_patterns (
	id            INTEGER PRIMARY KEY,
	ward_id       INTEGER NOT NULL REFERENCES wards (id),
	name          TEXT NOT NULL,
	start_minute  INTEGER NOT NULL CHECK (start_minute >= 0 AND start_minute < 1440),
	nominal_hours REAL NOT NULL CHECK (nominal_hours > 0 AND nominal_hours <= 24),
	UNIQUE (ward_id, name),
	UNIQUE (ward_id, id)
);

CREATE TABLE observations (
	id              INTEGER PRIMARY KEY,
	ward_id         INTEGER NOT NULL REFERENCES wards (id),
	tier_id         INTEGER NOT NULL,
	date            TEXT NOT NULL,
	shift_id        INTEGER NOT NULL,
	window_hours    REAL NOT NULL CHECK (window_hours > 0 AND window_hours <= 24),
	care_minutes    REAL NOT NULL CHECK (care_minutes >= 0),
	entered_by      INTEGER NOT NULL DEFAULT 0,
	entered_at      TEXT NOT NULL,
	batch_id        TEXT NOT NULL,
	excluded        INTEGER NOT NULL DEFAULT 0 CHECK (excluded IN (0, 1)),
	excluded_reason TEXT NOT NULL DEFAULT '',
	excluded_by     INTEGER NOT NULL DEFAULT 0,
	excluded_at     TEXT,
	FOREIGN KEY (ward_id, tier_id) REFERENCES tiers (ward_id, id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);
CREATE INDEX observations_ward_date_idx ON observations (ward_id, date);
CREATE INDEX observations_batch_idx ON observations (batch_id);

CREATE TABLE observation_factors (
	observation_id INTEGER NOT NULL REFERENCES observations (id),
	name           TEXT NOT NULL,
	value          REAL NOT NULL,
	PRIMARY KEY (observation_id, name)
);

CREATE TABLE census (
	id         INTEGER PRIMARY KEY,
	ward_id    INTEGER NOT NULL REFERENCES wards (id),
	date       TEXT NOT NULL,
	shift_id   INTEGER NOT NULL,
	revision   INTEGER NOT NULL CHECK (revision >= 1),
	entered_by INTEGER NOT NULL DEFAULT 0,
	entered_at TEXT NOT NULL,
	UNIQUE (ward_id, date, shift_id, revision),
	UNIQUE (ward_id, id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);

CREATE TABLE census_counts (
	census_id INTEGER NOT NULL REFERENCES census (id),
	tier_id   INTEGER NOT NULL REFERENCES tiers (id),
	patients  INTEGER NOT NULL CHECK (patients >= 0),
	PRIMARY KEY (census_id, tier_id)
);

CREATE TABLE ward_settings (
	ward_id              INTEGER PRIMARY KEY REFERENCES wards (id),
	direct_care_fraction REAL NOT NULL,
	cover_level          REAL NOT NULL,
	lookback_weeks       INTEGER NOT NULL,
	quartiles            TEXT NOT NULL,
	beds                 INTEGER NOT NULL DEFAULT 0,
	updated_by           INTEGER NOT NULL DEFAULT 0,
	updated_at           TEXT NOT NULL
);

CREATE TABLE ratio_floors (
	ward_id             INTEGER NOT NULL REFERENCES wards (id),
	shift_id            INTEGER NOT NULL,
	tier_id             INTEGER, -- NULL: all patients of the ward
	patients_per_nurse  REAL NOT NULL CHECK (patients_per_nurse > 0),
	charge_nurse_counts INTEGER NOT NULL DEFAULT 0,
	position            INTEGER NOT NULL, -- floors come back in the order saved
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id),
	FOREIGN KEY (ward_id, tier_id) REFERENCES tiers (ward_id, id)
);
CREATE UNIQUE INDEX ratio_floors_key_idx ON ratio_floors (ward_id, shift_id, COALESCE(tier_id, 0));

CREATE TABLE users (
	id            INTEGER PRIMARY KEY,
	name          TEXT NOT NULL UNIQUE,
	role          TEXT NOT NULL CHECK (role IN ('charge_nurse', 'manager', 'admin')),
	password_hash TEXT NOT NULL,
	disabled      INTEGER NOT NULL DEFAULT 0,
	created_at    TEXT NOT NULL
);

CREATE TABLE user_wards (
	user_id INTEGER NOT NULL REFERENCES users (id),
	ward_id INTEGER NOT NULL REFERENCES wards (id),
	PRIMARY KEY (user_id, ward_id)
);

CREATE TABLE api_tokens (
	id           INTEGER PRIMARY KEY,
	name         TEXT NOT NULL UNIQUE,
	hash         TEXT NOT NULL UNIQUE,
	created_by   INTEGER NOT NULL DEFAULT 0,
	created_at   TEXT NOT NULL,
	last_used_at TEXT,
	revoked_at   TEXT
);

CREATE TABLE token_wards (
	token_id INTEGER NOT NULL REFERENCES api_tokens (id),
	ward_id  INTEGER NOT NULL REFERENCES wards (id),
	PRIMARY KEY (token_id, ward_id)
);

CREATE TABLE audit_log (
	id          INTEGER PRIMARY KEY,
	at          TEXT NOT NULL,
	user_id     INTEGER NOT NULL DEFAULT 0,
	actor       TEXT NOT NULL,
	action      TEXT NOT NULL,
	entity      TEXT NOT NULL,
	entity_id   INTEGER NOT NULL DEFAULT 0,
	ward_id     INTEGER NOT NULL DEFAULT 0,
	before_json TEXT NOT NULL DEFAULT '',
	after_json  TEXT NOT NULL DEFAULT ''
);
CREATE INDEX audit_log_at_idx ON audit_log (at);

-- Sessions for github.com/alexedwards/scs/sqlite3store, exactly as its README.
CREATE TABLE sessions (
	token  TEXT PRIMARY KEY,
	data   BLOB NOT NULL,
	expiry REAL NOT NULL
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
