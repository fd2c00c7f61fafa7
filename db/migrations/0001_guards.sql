-- Custom migration: rules the schema file cannot express.

-- The audit log is append-only: no route, service or hand-written query may change history.
CREATE FUNCTION audit_log_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'audit_log is append-only (% refused)', TG_OP USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER audit_log_append_only BEFORE UPDATE OR DELETE ON audit_log
  FOR EACH ROW EXECUTE FUNCTION audit_log_refuse_change();
--> statement-breakpoint
CREATE TRIGGER audit_log_no_truncate BEFORE TRUNCATE ON audit_log
  FOR EACH STATEMENT EXECUTE FUNCTION audit_log_refuse_change();
--> statement-breakpoint
-- Revisions are immutable: saving never overwrites, restoring appends.
CREATE FUNCTION revisions_refuse_update() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'revisions are immutable' USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER revisions_immutable BEFORE UPDATE ON revisions
  FOR EACH ROW EXECUTE FUNCTION revisions_refuse_update();
--> statement-breakpoint
-- The starting set of erratum categories (DESIGN.md); moderators may add more.
INSERT INTO categories (slug, name, position) VALUES
  ('pin-capability', 'Pin capability', 1),
  ('logic-level', 'Logic level', 2),
  ('power', 'Power', 3),
  ('footprint-layout', 'Footprint / layout', 4),
  ('bom-part-choice', 'BOM / part choice', 5),
  ('mechanical', 'Mechanical', 6),
  ('firmware', 'Firmware', 7),
  ('documentation', 'Documentation', 8);
