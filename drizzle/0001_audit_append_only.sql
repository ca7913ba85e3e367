-- Audit events are append-only: the database itself refuses changes and deletions.
CREATE OR REPLACE FUNCTION blindcut_refuse_change() RETURNS trigger AS $$
BEGIN
  RAISE EXCEPTION 'rows of % are append-only', TG_TABLE_NAME USING ERRCODE = 'restrict_violation';
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER audit_events_append_only BEFORE UPDATE OR DELETE ON audit_events
  FOR EACH ROW EXECUTE FUNCTION blindcut_refuse_change();
