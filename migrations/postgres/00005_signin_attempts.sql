-- +goose Up
-- Sign-in throttle counts, shared by every connection to the database.
-- key is "acct:", "addr:" or "dev:" followed by an account ID, a client
-- address, a keyed digest of a typed name that matches no account, or a
-- device ID: never what was typed.
CREATE TABLE signin_attempts (
	key      TEXT PRIMARY KEY,
	attempts INTEGER NOT NULL CHECK (attempts >= 0),
	last_at  TIMESTAMPTZ NOT NULL
);
CREATE INDEX signin_attempts_last_idx ON signin_attempts (last_at);

-- Secrets of this installation (device cookie and name digest keys), made
-- by the first instance that needs them and shared by all.
CREATE TABLE install_secrets (
	name   TEXT PRIMARY KEY,
	secret BYTEA NOT NULL
);

-- The retention purge selects security events by action and age.
CREATE INDEX audit_log_action_at_idx ON audit_log (action, at);

-- +goose Down
DROP INDEX audit_log_action_at_idx;
DROP TABLE install_secrets;
DROP TABLE signin_attempts;
