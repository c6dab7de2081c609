-- +goose Up
-- Wards, shift patterns and tiers are retired, never deleted: the
-- observations, censuses and projections that name them stay readable.
-- NULL means active; otherwise the UTC time ("YYYY-MM-DDTHH:MM:SS.nnnnnnnnnZ")
-- the admin or manager retired it.
ALTER TABLE wards ADD COLUMN retired_at TEXT;
ALTER TABLE tiers ADD COLUMN retired_at TEXT;
ALTER TABLE shift_patterns ADD COLUMN retired_at TEXT;

-- +goose Down
ALTER TABLE shift_patterns DROP COLUMN retired_at;
ALTER TABLE tiers DROP COLUMN retired_at;
ALTER TABLE wards DROP COLUMN retired_at;
