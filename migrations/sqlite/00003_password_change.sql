-- +goose Up
-- Password changes (NIST SP 800-63B-4 policy, issue 15). must_change_password
-- is set by an admin's reset and cleared by the user's own change;
-- password_changes counts changes and resets, and a session signed in under
-- an older count is ended. Existing users start at 0 with no flag, so their
-- sessions and passwords stay valid.
ALTER TABLE users ADD COLUMN must_change_password INTEGER NOT NULL DEFAULT 0 CHECK (must_change_password IN (0, 1));
ALTER TABLE users ADD COLUMN password_changes INTEGER NOT NULL DEFAULT 0 CHECK (password_changes >= 0);

-- +goose Down
ALTER TABLE users DROP COLUMN password_changes;
ALTER TABLE users DROP COLUMN must_change_password;
