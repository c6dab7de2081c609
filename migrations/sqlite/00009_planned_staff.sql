-- +goose NO TRANSACTION
-- +goose Up
-- Issue 10: the staffing_office role; the staff planned (rostered) per
-- dated shift, one row per ward × date × shift replaced by each save (the
-- audit log keeps earlier values); and API tokens that may send it.
-- Existing tokens stay read-only.
--
-- SQLite cannot change a CHECK constraint in place: the users table is
-- rebuilt as its documentation describes (ALTER TABLE, "Making Other Kinds
-- Of Table Schema Changes"), with foreign keys off for the rebuild and
-- checked before the commit. The migration runs on the store's single
-- write connection, so the pragmas apply to it.
PRAGMA foreign_keys = OFF;
BEGIN IMMEDIATE;
CREATE TABLE users_new (
	id                   INTEGER PRIMARY KEY,
	name                 TEXT NOT NULL UNIQUE,
	role                 TEXT NOT NULL CHECK (role IN ('charge_nurse', 'manager', 'admin', 'staffing_office')),
	password_hash        TEXT NOT NULL,
	disabled             INTEGER NOT NULL DEFAULT 0,
	created_at           TEXT NOT NULL,
	must_change_password INTEGER NOT NULL DEFAULT 0 CHECK (must_change_password IN (0, 1)),
	password_changes     INTEGER NOT NULL DEFAULT 0 CHECK (password_changes >= 0)
);
INSERT INTO users_new (id, name, role, password_hash, disabled, created_at, must_change_password, password_changes)
	SELECT id, name, role, password_hash, disabled, created_at, must_change_password, password_changes FROM users;
DROP TABLE users;
ALTER TABLE users_new RENAME TO users;

CREATE TABLE planned_staff (
	ward_id         INTEGER NOT NULL REFERENCES wards (id),
	date            TEXT NOT NULL,
	shift_id        INTEGER NOT NULL,
	nurses_planned  INTEGER NOT NULL CHECK (nurses_planned >= 0),
	support_planned INTEGER CHECK (support_planned >= 0),
	updated_by      INTEGER NOT NULL DEFAULT 0,
	updated_at      TEXT NOT NULL,
	PRIMARY KEY (ward_id, date, shift_id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);
CREATE INDEX planned_staff_date ON planned_staff (date);

ALTER TABLE api_tokens ADD COLUMN write_staffing INTEGER NOT NULL DEFAULT 0 CHECK (write_staffing IN (0, 1));
COMMIT;
PRAGMA foreign_keys = ON;

-- +goose Down
PRAGMA foreign_keys = OFF;
BEGIN IMMEDIATE;
ALTER TABLE api_tokens DROP COLUMN write_staffing;
DROP TABLE planned_staff;
CREATE TABLE users_old (
	id                   INTEGER PRIMARY KEY,
	name                 TEXT NOT NULL UNIQUE,
	role                 TEXT NOT NULL CHECK (role IN ('charge_nurse', 'manager', 'admin')),
	password_hash        TEXT NOT NULL,
	disabled             INTEGER NOT NULL DEFAULT 0,
	created_at           TEXT NOT NULL,
	must_change_password INTEGER NOT NULL DEFAULT 0 CHECK (must_change_password IN (0, 1)),
	password_changes     INTEGER NOT NULL DEFAULT 0 CHECK (password_changes >= 0)
);
-- A staffing office account cannot exist before this migration: it
-- becomes a disabled charge nurse with no wards rather than being lost.
INSERT INTO users_old (id, name, role, password_hash, disabled, created_at, must_change_password, password_changes)
	SELECT id, name, CASE role WHEN 'staffing_office' THEN 'charge_nurse' ELSE role END, password_hash,
		CASE role WHEN 'staffing_office' THEN 1 ELSE disabled END, created_at, must_change_password, password_changes FROM users;
DELETE FROM user_wards WHERE user_id IN (SELECT id FROM users WHERE role = 'staffing_office');
DROP TABLE users;
ALTER TABLE users_old RENAME TO users;
COMMIT;
PRAGMA foreign_keys = ON;
