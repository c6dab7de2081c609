-- +goose Up
-- Issue 11: the change-over window, support staff and escalation text as
-- ward settings; the staff on duty with each census revision; the
-- end-of-shift record of a dated shift, a correction being a new revision.
ALTER TABLE ward_settings ADD COLUMN changeover_minutes INTEGER NOT NULL DEFAULT 90
	CHECK (changeover_minutes BETWEEN 0 AND 240);
ALTER TABLE ward_settings ADD COLUMN support_staff BOOLEAN NOT NULL DEFAULT FALSE;
ALTER TABLE ward_settings ADD COLUMN escalation TEXT NOT NULL DEFAULT '';

ALTER TABLE census ADD COLUMN nurses_on_duty INTEGER CHECK (nurses_on_duty >= 0);
ALTER TABLE census ADD COLUMN support_on_duty INTEGER CHECK (support_on_duty >= 0);

CREATE TABLE shift_records (
	id               BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
	ward_id          BIGINT NOT NULL REFERENCES wards (id),
	date             DATE NOT NULL,
	shift_id         BIGINT NOT NULL,
	revision         INTEGER NOT NULL CHECK (revision >= 1),
	nurses_worked    INTEGER NOT NULL CHECK (nurses_worked >= 0),
	support_worked   INTEGER CHECK (support_worked >= 0),
	admissions       INTEGER NOT NULL CHECK (admissions >= 0),
	discharges       INTEGER NOT NULL CHECK (discharges >= 0),
	care_left_undone BOOLEAN NOT NULL DEFAULT FALSE,
	care_category    TEXT NOT NULL DEFAULT '',
	entered_by       BIGINT NOT NULL DEFAULT 0,
	entered_at       TIMESTAMPTZ NOT NULL,
	CONSTRAINT shift_records_revision_key UNIQUE (ward_id, date, shift_id, revision),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);

-- +goose Down
DROP TABLE shift_records;
ALTER TABLE census DROP COLUMN support_on_duty;
ALTER TABLE census DROP COLUMN nurses_on_duty;
ALTER TABLE ward_settings DROP COLUMN escalation;
ALTER TABLE ward_settings DROP COLUMN support_staff;
ALTER TABLE ward_settings DROP COLUMN changeover_minutes;
