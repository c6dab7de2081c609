-- +goose Up
-- Sessions are now stored under the hex SHA-256 of their token
-- (internal/session.Key), never the token itself. A row written before
-- this holds a plain token: it could never be found again (the server
-- hashes the cookie first), but it would keep a live token readable in the
-- database until it expired. Delete them all; every user signs in once
-- more after the upgrade.
DELETE FROM sessions;

