-- A published protocol version is frozen: the database itself refuses to change or
-- delete it, whatever the application does. Drafts stay editable; publishing is the
-- UPDATE of a draft row (OLD.state = 'draft'), so it passes.
CREATE OR REPLACE FUNCTION blindcut_refuse_published_protocol_change() RETURNS trigger AS $$
BEGIN
  RAISE EXCEPTION 'protocol version % is published and frozen: start a new draft version instead', OLD.id
    USING ERRCODE = 'restrict_violation';
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER protocol_versions_published_frozen BEFORE UPDATE OR DELETE ON protocol_versions
  FOR EACH ROW WHEN (OLD.state = 'published') EXECUTE FUNCTION blindcut_refuse_published_protocol_change();
