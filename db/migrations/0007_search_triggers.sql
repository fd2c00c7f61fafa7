-- Custom migration: what keeps the search index current, and the vocabulary's trigram index.
CREATE EXTENSION IF NOT EXISTS pg_trgm;
--> statement-breakpoint
CREATE INDEX search_terms_trgm_idx ON search_terms USING gin (term gin_trgm_ops);
--> statement-breakpoint
-- Every write to a searchable source queues its item in the outbox, in the same transaction, so no
-- write path (service, seed, moderation, migration) can forget the index. TG_ARGV: kind, id column.
CREATE FUNCTION search_enqueue() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  row_data jsonb;
BEGIN
  IF TG_OP = 'DELETE' THEN row_data := to_jsonb(OLD); ELSE row_data := to_jsonb(NEW); END IF;
  INSERT INTO search_outbox (kind, ref_id) VALUES (TG_ARGV[0], (row_data ->> TG_ARGV[1])::integer);
  IF TG_OP = 'UPDATE' AND TG_ARGV[1] <> 'id' AND (to_jsonb(OLD) ->> TG_ARGV[1]) IS DISTINCT FROM (row_data ->> TG_ARGV[1]) THEN
    INSERT INTO search_outbox (kind, ref_id) VALUES (TG_ARGV[0], (to_jsonb(OLD) ->> TG_ARGV[1])::integer);
  END IF;
  PERFORM pg_notify('search_outbox', '');
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER projects_search AFTER INSERT OR UPDATE OR DELETE ON projects FOR EACH ROW EXECUTE FUNCTION search_enqueue('project', 'id');
--> statement-breakpoint
CREATE TRIGGER documents_search AFTER INSERT OR UPDATE OR DELETE ON documents FOR EACH ROW EXECUTE FUNCTION search_enqueue('document', 'id');
--> statement-breakpoint
CREATE TRIGGER errata_search AFTER INSERT OR UPDATE OR DELETE ON errata FOR EACH ROW EXECUTE FUNCTION search_enqueue('erratum', 'id');
--> statement-breakpoint
CREATE TRIGGER erratum_tags_search AFTER INSERT OR UPDATE OR DELETE ON erratum_tags FOR EACH ROW EXECUTE FUNCTION search_enqueue('erratum', 'erratum_id');
--> statement-breakpoint
CREATE TRIGGER lessons_search AFTER INSERT OR UPDATE OR DELETE ON lessons FOR EACH ROW EXECUTE FUNCTION search_enqueue('lesson', 'id');
--> statement-breakpoint
CREATE TRIGGER lesson_tags_search AFTER INSERT OR UPDATE OR DELETE ON lesson_tags FOR EACH ROW EXECUTE FUNCTION search_enqueue('lesson', 'lesson_id');
--> statement-breakpoint
CREATE TRIGGER tags_search AFTER INSERT OR UPDATE OR DELETE ON tags FOR EACH ROW EXECUTE FUNCTION search_enqueue('tag', 'id');
--> statement-breakpoint
CREATE TRIGGER tag_aliases_search AFTER INSERT OR UPDATE OR DELETE ON tag_aliases FOR EACH ROW EXECUTE FUNCTION search_enqueue('tag', 'tag_id');
--> statement-breakpoint
CREATE TRIGGER board_revisions_search AFTER INSERT OR UPDATE OR DELETE ON board_revisions FOR EACH ROW EXECUTE FUNCTION search_enqueue('project', 'project_id');
