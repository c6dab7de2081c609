-- +goose Up
-- Issue 10: the staffing_office role; the staff planned (rostered) per dated shift, one row per
-- ward × date × shift replaced by each save (the audit log keeps earlier
-- values); and API tokens that may send it. Existing tokens stay
-- read-only.
CREATE TABLE planned_staff (
	ward_id         BIGINT NOT NULL REFERENCES wards (id),
	date            DATE NOT NULL,
	shift_id        BIGINT NOT NULL,
	nurses_planned  INTEGER NOT NULL CHECK (nurses_planned >= 0),
	support_planned INTEGER CHECK (support_planned >= 0),
	updated_by      BIGINT NOT NULL DEFAULT 0,
	updated_at      TIMESTAMPTZ NOT NULL,
	PRIMARY KEY (ward_id, date, shift_id),
	FOREIGN KEY (ward_id, shift_id) REFERENCES shift_patterns (ward_id, id)
);
CREATE INDEX planned_staff_date ON planned_staff (date);

ALTER TABLE api_tokens ADD COLUMN write_staffing BOOLEAN NOT NULL DEFAULT FALSE;

ALTER TABLE users DROP CONSTRAINT users_role_check;
ALTER TABLE users ADD CONSTRAINT users_role_check CHECK (role IN ('charge_nurse', 'manager', 'admin', 'staffing_office'));

-- +goose Down
-- A staffing office account cannot exist before this migration: it
-- becomes a disabled charge nurse with no wards rather than being lost.
DELETE FROM user_wards WHERE user_id IN (SELECT id FROM users WHERE role = 'staffing_office');
UPDATE users SET role = 'charge_nurse', disabled = TRUE WHERE role = 'staffing_office';
ALTER TABLE users DROP CONSTRAINT users_role_check;
ALTER TABLE users ADD CONSTRAINT users_role_check CHECK (role IN ('charge_nurse', 'manager', 'admin'));
ALTER TABLE api_tokens DROP COLUMN write_staffing;
DROP TABLE planned_staff;
