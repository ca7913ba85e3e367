-- Readings and bench events are append-only: corrections are new rows.
CREATE TRIGGER readings_append_only BEFORE UPDATE OR DELETE ON readings
  FOR EACH ROW EXECUTE FUNCTION blindcut_refuse_change();
--> statement-breakpoint
CREATE TRIGGER run_events_append_only BEFORE UPDATE OR DELETE ON run_events
  FOR EACH ROW EXECUTE FUNCTION blindcut_refuse_change();
--> statement-breakpoint
-- Readings and events are accepted only while their study is running; once it is
-- closed the database itself refuses them, whatever the application does.
CREATE OR REPLACE FUNCTION blindcut_require_running_study() RETURNS trigger AS $$
DECLARE
  s study_state;
BEGIN
  SELECT st.state INTO s FROM runs r JOIN studies st ON st.id = r.study_id WHERE r.id = NEW.run_id;
  IF s IS DISTINCT FROM 'running' THEN
    RAISE EXCEPTION 'study is % : % refused', s, TG_TABLE_NAME USING ERRCODE = 'BC409';
  END IF;
  RETURN NEW;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER readings_require_running BEFORE INSERT ON readings
  FOR EACH ROW EXECUTE FUNCTION blindcut_require_running_study();
--> statement-breakpoint
CREATE TRIGGER run_events_require_running BEFORE INSERT ON run_events
  FOR EACH ROW EXECUTE FUNCTION blindcut_require_running_study();
--> statement-breakpoint
-- Runs of a closed study cannot change.
CREATE OR REPLACE FUNCTION blindcut_freeze_closed_runs() RETURNS trigger AS $$
DECLARE
  s study_state;
BEGIN
  SELECT state INTO s FROM studies WHERE id = COALESCE(NEW.study_id, OLD.study_id);
  IF s IN ('closed', 'unblinded') THEN
    RAISE EXCEPTION 'study is % : runs cannot change', s USING ERRCODE = 'BC409';
  END IF;
  RETURN COALESCE(NEW, OLD);
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER runs_frozen_when_closed BEFORE INSERT OR UPDATE OR DELETE ON runs
  FOR EACH ROW EXECUTE FUNCTION blindcut_freeze_closed_runs();
--> statement-breakpoint
-- A closed study keeps its design, schedule and blinded snapshot: only unblinding may follow.
CREATE OR REPLACE FUNCTION blindcut_freeze_closed_study() RETURNS trigger AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    IF OLD.state IN ('closed', 'unblinded') THEN
      RAISE EXCEPTION 'a closed study cannot be deleted' USING ERRCODE = 'BC409';
    END IF;
    RETURN OLD;
  END IF;
  IF OLD.state IN ('closed', 'unblinded') THEN
    IF NEW.state NOT IN ('closed', 'unblinded')
       OR (OLD.state = 'unblinded' AND NEW.state <> 'unblinded')
       OR NEW.design_hash IS DISTINCT FROM OLD.design_hash
       OR NEW.schedule_hash IS DISTINCT FROM OLD.schedule_hash
       OR NEW.seed IS DISTINCT FROM OLD.seed
       OR NEW.blinded_snapshot IS DISTINCT FROM OLD.blinded_snapshot
       OR NEW.snapshot_hash IS DISTINCT FROM OLD.snapshot_hash
       OR NEW.closed_at IS DISTINCT FROM OLD.closed_at THEN
      RAISE EXCEPTION 'a closed study cannot change, except to be unblinded' USING ERRCODE = 'BC409';
    END IF;
  END IF;
  RETURN NEW;
END;
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER studies_frozen_when_closed BEFORE UPDATE OR DELETE ON studies
  FOR EACH ROW EXECUTE FUNCTION blindcut_freeze_closed_study();
