-- +goose Up
-- Issue 11 item 4: the admissions and discharges the charge nurse already
-- knows of for the shift, stored with each census revision (optional).
ALTER TABLE census ADD COLUMN planned_admissions INTEGER CHECK (planned_admissions >= 0);
ALTER TABLE census ADD COLUMN planned_discharges INTEGER CHECK (planned_discharges >= 0);

-- +goose Down
ALTER TABLE census DROP COLUMN planned_discharges;
ALTER TABLE census DROP COLUMN planned_admissions;
