-- +goose Up
-- A ward's data version (Store.WardVersion) counts the ward's audit rows
-- on every review page and census save; without this index that is a
-- scan of the whole log, which grows with every ward's history.
CREATE INDEX audit_log_ward_idx ON audit_log (ward_id, id);

-- +goose Down
DROP INDEX audit_log_ward_idx;
